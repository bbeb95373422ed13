"""Expectations for transistor sets: battery, each stage's bias point, standby current."""

from __future__ import annotations

from typing import TYPE_CHECKING

from faultwise.expect.context import Context, basis_num as _n, role_word

if TYPE_CHECKING:
    from faultwise.calc.tolerance import Spread
    from faultwise.profile.model import Transistor

ROLE_STAGE = {"rf": "antenna", "converter": "oscillator", "mixer": "if",
              "oscillator": "oscillator", "if": "if", "if2": "if", "if3": "if",
              "detector": "detector", "driver": "audio", "audio": "audio", "output": "audio",
              "output2": "audio"}
"""Stage of a transistor's bias readings, by its role."""
BIAS_FIELDS = {"vb_v": ("base", "V", "vb_v"), "ve_v": ("emitter", "V", "ve_v"),
               "ic_ma": ("collector current", "mA", "ic_ma"), "vc_v": ("collector", "V", "vc_v")}
"""Bias readings per transistor stage: name suffix -> (what, unit, DividerBias field)."""


def add_battery(ctx: Context) -> None:
    from faultwise.calc import battery

    v = ctx.p.battery_v
    if v is None:
        return
    n = battery.cells(v)
    low, high = battery.usable_range_v(v)
    ctx.add("supply.battery_v", "Battery voltage under load", "supply", v, low, high, "V",
            f"{_n(v)} V battery = {n} cells of 1.5 V; band: usable from {n} x "
            f"{_n(battery.CELL_END_V)} = {_n(low)} V (spent) to {n} x {_n(battery.CELL_FRESH_V)} = "
            f"{_n(high)} V (fresh) (trade)", keys=("battery",))


def _bias_spreads(ctx: Context, tr: Transistor) -> dict[str, Spread]:
    from faultwise.calc import battery
    from faultwise.calc.tolerance import Spread, beta, resistor_ohm, vbe_v

    v = ctx.p.battery_v
    lo, hi = battery.healthy_range_v(v)
    b = tr.bias
    return {"vcc_v": Spread(v, lo, hi, "battery in good health 1.35-1.6 V per cell (trade)"),
            "top_ohm": resistor_ohm(b.top_ohm), "bottom_ohm": resistor_ohm(b.bottom_ohm),
            "emitter_ohm": resistor_ohm(b.emitter_ohm),
            "collector_ohm": resistor_ohm(b.collector_ohm), "beta": beta(tr.beta),
            "vbe_v": vbe_v(tr.material)}


def add_bias(ctx: Context) -> None:
    from faultwise.calc.bias import divider_bias
    from faultwise.calc.tolerance import Spread, corners, worst_case_fields

    p = ctx.p
    if p.battery_v is None or not p.transistors:
        return
    from faultwise.expect.output_pair import add_output_pair

    standby_nom = 0.0
    ends = {"low": [0.0, 0.0], "high": [0.0, 0.0]}   # battery end -> [sum of mins, sum of maxes]
    parts: list[str] = []
    keys_all: list[str] = ["battery"]
    pair = add_output_pair(ctx)
    if pair is not None:   # the push-pull pair: its own model, its whole band at either end
        standby_nom += pair[0]
        for end in ends.values():
            end[0] += pair[1]
            end[1] += pair[2]
        parts.append(f"output pair {_n(pair[0])}")
        keys_all.append("transistors.output")
    for tr in p.transistors:
        if pair is not None and tr.role in ("output", "output2"):
            continue
        sp = _bias_spreads(ctx, tr)
        bands = worst_case_fields(divider_bias, sp)
        nom = divider_bias(**{k: s.nominal for k, s in sp.items()})
        b = tr.bias
        pol = ("PNP: readings are negative to chassis (negative supply); shown as magnitudes"
               if tr.polarity == "pnp" else "NPN: readings positive to the common rail")
        keys = (f"transistors.{tr.role}", "battery")
        keys_all.append(f"transistors.{tr.role}")
        head = (f"Vth = {_n(p.battery_v)} x {_n(b.bottom_ohm)} / ({_n(b.top_ohm)} + "
                f"{_n(b.bottom_ohm)}) = {_n(nom.vth_v)} V, Rth = {_n(nom.rth_ohm)} ohm, Ib = "
                f"({_n(nom.vth_v)} - {_n(sp['vbe_v'].nominal)}) / ({_n(nom.rth_ohm)} + "
                f"{_n(tr.beta + 1)} x {_n(b.emitter_ohm)}) = {_n(nom.ib_ma * 1000)} uA")
        band = (f"band: worst case over {sp['vcc_v'].rule}, {sp['top_ohm'].rule}, "
                f"{sp['beta'].rule}, {sp['vbe_v'].rule}; {pol}")
        stage = ROLE_STAGE.get(tr.role, "audio")
        tails = {"vb_v": f"Vb = Ve + Vbe = {_n(nom.vb_v)} V",
                 "ve_v": f"Ve = (beta+1) Ib Re = {_n(nom.ve_v)} V",
                 "ic_ma": (f"Ic = beta Ib = {_n(tr.beta)} x {_n(nom.ib_ma * 1000)} uA = "
                           f"{_n(nom.ic_ma)} mA"),
                 "vc_v": (f"Vc = Vcc - Ic Rc = {_n(p.battery_v)} - {_n(nom.ic_ma)} mA x "
                          f"{_n(b.collector_ohm)} ohm = {_n(nom.vc_v)} V")}
        for field, (what, unit, attr) in BIAS_FIELDS.items():
            bb = bands[attr]
            ctx.add(f"bias.{tr.role}.{field}",
                    f"{role_word(tr.role)} {tr.material} {tr.polarity.upper()} {what}", stage,
                    bb.nominal, bb.low, bb.high, unit, f"{head}; {tails[field]}; {band}", keys=keys)
        # standby: per battery end, the sum of each stage's min/max over its own corners
        draw = lambda d: d.ic_ma + d.divider_ma
        standby_nom += draw(nom)
        for end in ("low", "high"):
            vcc = getattr(sp["vcc_v"], end)
            sub = dict(sp, vcc_v=Spread(vcc, vcc, vcc))
            vals = [draw(divider_bias(**c)) for c in corners(sub)]
            ends[end][0] += min(vals)
            ends[end][1] += max(vals)
        parts.append(f"{tr.role} {_n(draw(nom))}")
    standby_lo = min(e[0] for e in ends.values())
    standby_hi = max(e[1] for e in ends.values())
    ctx.add("supply.standby_ma", "Battery current, no signal", "supply", standby_nom, standby_lo,
            standby_hi, "mA",
            " + ".join(parts) + f" = {_n(standby_nom)} mA (each stage's collector current plus its "
            "bias divider; class-B output idle current is part of it); band: the bias corners of "
            "every stage at the low and the high battery end", keys=tuple(keys_all))

