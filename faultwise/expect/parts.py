"""Replacement part ratings for this set (``parts.*`` expectations), shown in repair steps.

``parts.filter_cap_v``: the least working-voltage rating for a filter capacitor (low = the
required volts, nominal = high = the common rating to buy). ``parts.first_cap_max_uf``: the
largest first filter capacitor the rectifier tube's data allows (only when the tube table
gives it). Fault texts refer to them as ``{parts.filter_cap_v|fallback}`` (see
:mod:`faultwise.graph.node_text`); they are not readings and no check measures them.
"""

from __future__ import annotations

from faultwise.expect.context import Context, basis_num as _n

PART_NAMES = ("parts.filter_cap_v", "parts.first_cap_max_uf")


def add_part_ratings(ctx: Context) -> None:
    from faultwise.calc.ratings import TRANSFORMER_NO_LOAD_RISE, filter_cap_rating

    p, s = ctx.p, ctx.p.supply
    if not p.line_powered or p.mains_v is None:
        return
    line = ctx.line()
    if p.family == "transformer":
        if s.secondary_v is None:
            return
        src_high = s.secondary_v * line.high / line.nominal
        rise = TRANSFORMER_NO_LOAD_RISE
        each = "the whole winding" if s.circuit == "bridge" else (
            "each half of the winding" if s.circuit == "full-wave" else "the winding")
        src = (f"secondary {_n(s.secondary_v)} V RMS ({each}) x {_n(line.high)}/{_n(line.nominal)} "
               f"(top of the line band) = {_n(src_high)} V, x {_n(rise)} no-load rise "
               "(receiver transformers regulate about 10 %, trade, from memory)")
        keys = ("supply.secondary_v", "mains")
    else:
        src_high, rise = line.high, 1.0
        src = f"off the line: {_n(line.high)} V RMS at the top of the line band"
        keys = ("mains",)
    r = filter_cap_rating(src_high, rise)
    ctx.add("parts.filter_cap_v", "Least working voltage for a replacement filter capacitor",
            "supply", r.rating_v, r.required_v, r.rating_v, "V",
            f"{src}; no-load peak sqrt(2) x that = {_n(r.peak_v)} V (before the tubes draw "
            f"current); x {_n(r.margin)} margin (20 % derating, common practice) = "
            f"{_n(r.required_v)} V; next common rating {_n(r.rating_v)} V. Line band: {line.rule}",
            keys=keys, absent=0.0)
    tube = p.tube("rectifier") if s.rectifier == "tube" else None
    data = ctx.tube_type(tube.type) if tube is not None else None
    limit = getattr(getattr(data, "rectifier", None), "max_first_cap_uf", None)
    if limit:
        note = ""
        if s.first_cap_uf is not None and s.first_cap_uf > limit:
            note = (f"; this profile's first capacitor ({_n(s.first_cap_uf)} uF) is above it: "
                    "fit no more than the limit")
        ctx.add("parts.first_cap_max_uf", "Largest first filter capacitor the rectifier allows",
                "supply", limit, 0.0, limit, "uF",
                f"{tube.type}: at most {_n(limit)} uF at the rectifier cathode (tube table){note}",
                keys=("tubes",), absent=0.0, typical=False)
