"""Expectations for a transistor push-pull output pair (``output_stage`` of the profile).

``bias.output.idle_ma`` (the pair's supply current, no signal; its band excludes zero),
``bias.output.bases_v`` (transformer-coupled: base bias to the emitter rail, one junction
drop; complementary: base to base across the bias diodes, two drops) and, for a
capacitor-coupled complementary pair, ``bias.output.midpoint_v``. The older per-transistor
names ``bias.output.ic_ma``, ``.vb_v``, ``.ve_v``, ``.vc_v`` are rebuilt from the same pair
model, so a pair with no idle current reads ``absent`` on them too. A single-ended stage keeps
the class-A divider model of :mod:`faultwise.expect_bias`.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import TYPE_CHECKING

from faultwise.expect.context import Context, basis_num as _n

if TYPE_CHECKING:
    from faultwise.calc.push_pull import PushPull
    from faultwise.calc.tolerance import Band, Spread
    from faultwise.profile.model import Profile, Transistor

PAIR_STAGES = ("push-pull-transformer", "complementary")
PAIR_FIELDS = ("idle_ma", "bases_v", "midpoint_v")
PAIR_VBE_SPREAD_V = 0.025
"""Vbe of one transistor or diode type at a given current: +-25 mV part to part (trade,
from memory); the pair's idle current follows it exponentially."""
MIDPOINT_SPREAD = 0.05
"""A complementary pair's midpoint sits at half the supply within about +-5 % of the supply
(DC feedback from the midpoint to the driver; common practice, no source)."""
DRIVER_MA = 2.0
"""Driver collector current of a complementary stage when the profile gives no load: about
2 mA (trade); the load resistor is sized for it."""
ABSENT_FRACTION = 0.5
"""A reading below half the worst-case low end counts as absent (no idle current at all)."""
UNDERBIAS_FRACTION = 0.25
"""A class-B pair crosses over most smoothly with about the thermal voltage Vt (26 mV) across
each emitter resistor at idle (B. M. Oliver, 1971, from memory); with under a quarter of that
the crossover notch is audible on quiet passages (common practice, no source). A working set
idles above that floor, however far the worst-case corners of a plain resistor divider reach
(its exponential law puts the low corner near zero): below it the pair reads low."""


def is_pair(profile: Profile) -> bool:
    return (not profile.line_powered and profile.output_stage in PAIR_STAGES
            and profile.transistor("output") is not None)


def _spreads(ctx: Context, tr: Transistor) -> dict[str, Spread]:
    from faultwise.calc import battery
    from faultwise.calc.tolerance import VBE_V, Spread, beta, resistor_ohm

    v = ctx.p.battery_v
    lo, hi = battery.healthy_range_v(v)
    vbe_nom = VBE_V[tr.material][1]
    vbe = Spread(vbe_nom, vbe_nom - PAIR_VBE_SPREAD_V, vbe_nom + PAIR_VBE_SPREAD_V,
                 f"Vbe {tr.material} {vbe_nom:g} V at 1 mA +-25 mV part to part (trade)")
    return {"vcc_v": Spread(v, lo, hi, "battery in good health 1.35-1.6 V per cell (trade)"),
            "emitter_ohm": resistor_ohm(tr.bias.emitter_ohm), "beta": beta(tr.beta),
            "vbe_1ma_v": vbe}


def pair_model(ctx: Context
               ) -> tuple[Callable[..., PushPull], dict[str, Spread], str, list[str]]:
    """(function of the spreads, spreads, description, typical keys) for the set's pair."""
    from faultwise.calc import push_pull as pp
    from faultwise.calc.tolerance import Spread, relative, resistor_ohm

    p = ctx.p
    tr = p.transistor("output")
    sp = _spreads(ctx, tr)
    keys = ["transistors.output", "output_stage"]
    if p.output_stage == "push-pull-transformer":
        b = tr.bias
        sp.update(top_ohm=resistor_ohm(b.top_ohm), bottom_ohm=resistor_ohm(b.bottom_ohm))
        vth = p.battery_v * b.bottom_ohm / (b.top_ohm + b.bottom_ohm)
        text = (f"transformer-coupled pair: divider {_n(b.top_ohm)} / {_n(b.bottom_ohm)} ohm gives "
                f"Vth = {_n(vth)} V to both bases; each transistor: Vth - 2 Ib Rth = Vbe(Ic) + "
                f"Ie x {_n(b.emitter_ohm)} ohm, Vbe = Vbe(1 mA) + Vt ln(Ic/1 mA) (Shockley)")
        return pp.transformer_pair, sp, text, keys
    drv = p.transistor("driver")
    load = drv.bias.collector_ohm if drv is not None and drv.bias.collector_ohm > 0 else None
    if load is None:
        load = (p.battery_v / 2.0 - 0.65) / DRIVER_MA * 1000.0
        keys.append("transistors.driver.bias.collector_ohm")
    sp.pop("beta")
    ln_area = math.log(pp.PAIR_AREA)
    sp.update(load_ohm=resistor_ohm(load),
              diode_1ma_v=Spread(sp["vbe_1ma_v"].nominal + pp.THERMAL_V * ln_area,
                                 sp["vbe_1ma_v"].low + pp.THERMAL_V * ln_area,
                                 sp["vbe_1ma_v"].high + pp.THERMAL_V * ln_area, "bias diodes"),
              midpoint_fraction=relative(0.5, 2 * MIDPOINT_SPREAD))
    text = (f"complementary pair: driver current (Vcc/2 - Vbe) / {_n(load)} ohm through two bias "
            f"diodes sets base to base = 2 Vd(Id); the pair: 2 Vbe(Ic) + 2 Ic Re = 2 Vd (diodes "
            f"{_n(pp.PAIR_AREA)} x smaller junctions, Shockley); midpoint at half the supply")

    def fn(vcc_v: float, emitter_ohm: float, vbe_1ma_v: float, load_ohm: float,
           diode_1ma_v: float, midpoint_fraction: float) -> PushPull:
        return pp.complementary_pair(vcc_v, load_ohm, 2, emitter_ohm, 100.0, vbe_1ma_v,
                                     diode_1ma_v, midpoint_fraction)

    return fn, sp, text, keys


def faulty_pair_readings(ctx: Context, **changes) -> dict[str, float]:
    """The pair's chart readings with parts changed (a fault model): ``top_ohm=math.inf``
    (transformer pair's bias feed open), ``bottom_ohm=0`` (bias shorted), ``load_ohm=math.inf``
    (complementary: driver feed open), ``midpoint_fraction=0.1`` (lower half leaking)."""
    if not is_pair(ctx.p):
        return {}
    fn, sp, _, _ = pair_model(ctx)
    r = fn(**({k: s.nominal for k, s in sp.items()} | changes))
    comp = ctx.p.output_stage == "complementary"
    out = {"bias.output.idle_ma": r.idle_ma, "bias.output.bases_v": r.bases_v,
           "bias.output.ic_ma": r.ic_ma, "bias.output.ve_v": r.ve_v,
           "bias.output.vb_v": r.bases_v / 2.0 if comp else r.bases_v}
    if comp:
        out.update({"bias.output.midpoint_v": r.midpoint_v, "bias.output.vc_v": r.midpoint_v})
    return out


def _underbias_floor(ic_ma: float, emitter_ohm: float) -> tuple[float, str]:
    """(the least idle current per transistor of a working pair, mA; the arithmetic shown):
    a quarter of Vt across the emitter resistor, never above half the nominal."""
    from faultwise.calc.push_pull import THERMAL_V

    oliver = UNDERBIAS_FRACTION * THERMAL_V / max(emitter_ohm, 0.1) * 1000.0
    floor = min(oliver, 0.5 * ic_ma)
    text = (f"; a working pair idles at least {_n(floor)} mA a transistor (Vt / 4 across its "
            f"{_n(emitter_ohm)} ohm emitter resistor = {_n(oliver)} mA, at most half the nominal; "
            "less is underbiased: crossover distortion)")
    return floor, text


def _floored(b: Band, floor: float | None, text: str) -> tuple[float, str]:
    """The band's low end raised to the underbias floor where the corners reach below it."""
    if floor is None or floor <= b.low:
        return b.low, ""
    return floor, text


def _half(b: Band) -> Band:
    from faultwise.calc.tolerance import Band

    return Band(b.nominal / 2.0, b.low / 2.0, b.high / 2.0)


def add_output_pair(ctx: Context) -> tuple[float, float, float] | None:
    """Add the pair's names; return its supply draw (nominal, low, high) mA for the standby sum."""
    from faultwise.calc.tolerance import worst_case_fields

    if not is_pair(ctx.p):
        return None
    fn, sp, text, keys = pair_model(ctx)
    bands = worst_case_fields(fn, sp)
    nom = fn(**{k: s.nominal for k, s in sp.items()})
    tr = ctx.p.transistor("output")
    band = "band: worst case over " + ", ".join(s.rule for s in sp.values() if s.rule)
    pol = "magnitudes (PNP readings are negative to chassis)" if tr.polarity == "pnp" else \
        "to the common rail"
    comp = ctx.p.output_stage == "complementary"
    head = f"{text}: Ic = {_n(nom.ic_ma)} mA; {pol}"
    rows = {
        "idle_ma": ("Output pair idle current, no signal", "idle_ma", "mA",
                    (f"the pair's supply current = Ic = {_n(nom.idle_ma)} mA (the same current "
                     "flows through both)") if comp else
                    f"the pair's supply current = 2 x Ic = {_n(nom.idle_ma)} mA"),
        "bases_v": ("Output pair bias: base to base" if comp else
                    "Output pair bias: base to emitter rail", "bases_v", "V",
                    f"bias = {_n(nom.bases_v)} V ({'two junction drops' if comp else 'one junction drop'})"),
    }
    if comp:
        rows["midpoint_v"] = ("Output midpoint (emitters' junction) to common", "midpoint_v", "V",
                              f"Vcc / 2 = {_n(nom.midpoint_v)} V")
    floor_ic, floor_text = _underbias_floor(nom.ic_ma, tr.bias.emitter_ohm)
    per_pair = 1.0 if comp else 2.0
    floors = {"idle_ma": floor_ic * per_pair, "ic_ma": floor_ic,
              "ve_v": floor_ic / 1000.0 * tr.bias.emitter_ohm}
    for name, (title, attr, unit, tail) in rows.items():
        b = bands[attr]
        low, text = _floored(b, floors.get(attr), floor_text)
        ctx.add(f"bias.output.{name}", title, "audio", b.nominal, low, b.high, unit,
                f"{head}; {tail}; {band}{text}; none at all means the bias network is open or "
                "shorted (crossover distortion) or the pair is open", keys=tuple(keys),
                absent=ABSENT_FRACTION * b.low)
    ic, ve = bands["ic_ma"], bands["ve_v"]
    vcc = sp["vcc_v"]
    per = {"ic_ma": ("collector current", "mA", ic, f"Ic = {_n(nom.ic_ma)} mA per transistor"),
           "ve_v": ("emitter", "V", ve, f"Ve = Ie Re = {_n(nom.ve_v)} V"),
           "vb_v": ("base", "V", _half(bands["bases_v"]) if comp else bands["bases_v"],
                    (f"Vbe = half the base-to-base {_n(nom.bases_v)} V" if comp else
                     f"Vb = {_n(nom.bases_v)} V")),
           "vc_v": ("collector", "V", bands["midpoint_v"] if comp else vcc,
                    "Vc = the midpoint" if comp else "Vc = the supply through half the primary")}
    for field, (what, unit, b, tail) in per.items():
        low, text = _floored(b, floors.get(field), floor_text)
        ctx.add(f"bias.output.{field}", f"Output {tr.material} {tr.polarity.upper()} {what}",
                "audio", b.nominal, low, b.high, unit, f"{head}; {tail}; {band}{text}",
                keys=tuple(keys), absent=ABSENT_FRACTION * b.low)
    idle = bands["idle_ma"]
    return idle.nominal, _floored(idle, floors["idle_ma"], "")[0], idle.high
