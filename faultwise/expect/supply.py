"""Expectations for the supply of line sets: line and leakage, rectifier and filter.

The rectifier and filter are simulated once per profile (:func:`simulate_supply`, cached on
the context); the output stage reads its B+ corners from the same simulation.
"""

from __future__ import annotations

from dataclasses import dataclass

from faultwise.expect.context import Context, basis_num as _n


def add_mains(ctx: Context) -> None:
    from faultwise.calc import safety

    p, line = ctx.p, ctx.line()
    ctx.add("mains.line_v", "Line voltage at the outlet", "supply", line.nominal, line.low,
            line.high, "V", f"{_n(line.nominal)} V nominal, {_n(p.mains_hz)} Hz; band: {line.rule}",
            keys=("mains",))
    limit = safety.leakage_limit_v()
    z = safety.network_impedance_ohm(p.mains_hz)
    ctx.add("safety.leakage_v", "Leakage check: AC across 1500 ohm // 0.15 uF to earth", "supply",
            0.0, 0.0, limit, "V",
            f"limit {_n(safety.LIMIT_MA)} mA x {_n(safety.NETWORK_OHM)} ohm = {_n(limit)} V RMS "
            f"(network |Z| = {_n(z)} ohm at {_n(p.mains_hz)} Hz); zero is normal; measure from "
            "each exposed metal part to a true earth, reverse the plug and repeat, never through "
            "an isolation transformer (network per ANSI C39.5, 0.5 mA limit per UL 101, from memory)",
            absent=0.0, typical=False)


# --------------------------------------------------------------------------- rectifier and filter

GENERIC_TUBE_DROP = {"half-wave": (15.0, 100.0), "full-wave": (60.0, 125.0), "bridge": (15.0, 100.0)}
"""Tube rectifier drop when the table has none: 15 V at 100 mA (small half-wave types, from
memory) or 60 V at 125 mA (5Y3GT-class full-wave, tube data in REFERENCES)."""


@dataclass(frozen=True)
class SimulatedSupply:
    """The simulated supply: nominal result, worst-case bands, and what to say about them."""

    nominal: object               # RectifierResult at nominal values
    bands: dict                   # output name -> SupplyBand
    diode_label: str
    diode_typical: bool
    source_text: str
    band_text: str
    keys: tuple[str, ...]


def _rectifier_diode(ctx: Context, circuit: str, source_rms_v: float):
    from faultwise.calc import rectifier as r

    s = ctx.p.supply
    if s.rectifier == "silicon":
        return r.silicon_diode(), False
    if s.rectifier == "selenium":
        return r.selenium_stack(source_rms_v), False
    tube = ctx.p.tube("rectifier")
    data = ctx.tube_type(tube.type) if tube is not None else None
    rd = getattr(data, "rectifier", None)
    if rd is not None and rd.drop_v:
        return r.tube_diode(rd.drop_v, rd.drop_at_ma, tube.type), False
    drop, at = GENERIC_TUBE_DROP[circuit]
    name = tube.type if tube is not None else "tube rectifier"
    return r.tube_diode(drop, at, f"{name}, typical drop (not in the tube table)"), True


def simulate_supply(ctx: Context) -> SimulatedSupply | None:
    """Simulate the supply at nominal and at the corners that bound each output."""
    if ctx.supply_sim is not None:
        return ctx.supply_sim
    from faultwise.calc import rectifier as r
    from faultwise.calc.tolerance import electrolytic_uf, load_ma, resistor_ohm
    from faultwise.core.errors import ProfileError

    p, s = ctx.p, ctx.p.supply
    need = (s.circuit, s.rectifier, s.surge_ohm, s.first_cap_uf, s.filter_ohm, s.second_cap_uf,
            s.load_ma, s.filter_load_ma, p.mains_v, p.mains_hz)
    if any(v is None for v in need) or (p.family == "transformer" and s.secondary_v is None):
        return None
    line = ctx.line()
    if p.family == "series-string":
        if s.circuit == "full-wave":
            raise ProfileError("a series-string set has no centre-tapped winding for a full-wave "
                               "rectifier", file=p.source, key="supply.circuit",
                               hint="use half-wave or bridge")
        src_nom, src_text = line.nominal, f"off the line, {_n(line.nominal)} V RMS"
    else:
        src_nom = s.secondary_v
        each = "each half of the winding" if s.circuit == "full-wave" else "the winding"
        src_text = f"secondary {_n(src_nom)} V RMS ({each}), following the line"
    diode, diode_typ = _rectifier_diode(ctx, s.circuit, src_nom)
    sp = {"line": line, "rs": resistor_ohm(s.surge_ohm), "c1": electrolytic_uf(s.first_cap_uf),
          "load": load_ma(1.0), "rf": resistor_ohm(s.filter_ohm),
          "c2": electrolytic_uf(s.second_cap_uf)}

    def make(v: dict) -> r.RectifierCircuit:
        return r.RectifierCircuit(
            circuit=s.circuit, source_rms_v=src_nom * v["line"] / line.nominal,
            freq_hz=p.mains_hz, surge_ohm=v["rs"], diode=diode, first_cap_uf=v["c1"],
            load_ma=s.load_ma * v["load"], filter_ohm=v["rf"], second_cap_uf=v["c2"],
            filter_load_ma=s.filter_load_ma * v["load"])

    nominal = r.simulate(make({k: x.nominal for k, x in sp.items()}))
    if nominal.rectifier_out_v <= 0.2 * r.peak_v(src_nom) or \
            nominal.filtered_v <= 0.1 * r.peak_v(src_nom):
        raise ProfileError(f"the supply cannot deliver {_n(s.load_ma)} mA through "
                           f"{_n(s.surge_ohm)} ohm and {_n(s.filter_ohm)} ohm from "
                           f"{_n(src_nom)} V", file=p.source, key="supply.load_ma",
                           hint="check load_ma, filter_load_ma, surge_ohm and filter_ohm")
    bands = r.supply_bands(make, sp)
    band_text = (f"worst case over {line.rule}, {sp['rs'].rule}, {sp['c1'].rule}, "
                 f"{sp['load'].rule}, each output at the corner that moves it furthest (signs "
                 "from one simulation per input)")
    ctx.supply_sim = SimulatedSupply(nominal, bands, diode.label, diode_typ, src_text,
                                     band_text, ("supply", "mains"))
    return ctx.supply_sim


def add_rectifier(ctx: Context) -> None:
    from faultwise.calc.rectifier import ripple_bound_vpp
    from faultwise.calc.tolerance import load_ma, resistor_ohm, worst_case

    sup = simulate_supply(ctx)
    if sup is None:
        return
    s, p = ctx.p.supply, ctx.p
    nom, bands = sup.nominal, sup.bands
    typ = ctx.typical(*sup.keys) or sup.diode_typical
    model = (f"{s.circuit} {s.rectifier} rectifier {sup.source_text}, {_n(s.surge_ohm)} ohm surge, "
             f"{sup.diode_label}, {_n(s.first_cap_uf)} uF, {_n(s.load_ma)} mA load "
             f"(constant-current sinks), {_n(s.filter_ohm)} ohm filter with {_n(s.filter_load_ma)} "
             f"mA, {_n(s.second_cap_uf)} uF: simulated to steady state")
    b1 = bands["rectifier_out_v"]
    ctx.add("supply.rectifier_out_v", "DC at the first filter capacitor (B+)", "supply",
            b1.nominal, b1.low, b1.high, "V",
            f"{model} = {_n(b1.nominal)} V; band: {sup.band_text}", typical=typ)
    bound = ripple_bound_vpp(s.load_ma, s.first_cap_uf, p.mains_hz, s.circuit)
    br = bands["ripple_vpp"]
    ctx.add("supply.ripple_vpp", "Ripple at the first filter capacitor", "supply", br.nominal,
            br.low, br.high, "Vpp",
            f"same simulation: {_n(br.nominal)} Vpp (below the textbook bound I/(f C) or I/(2 f C), "
            f"{_n(bound)} Vpp); band: {sup.band_text}; far above it: a dried-out first capacitor",
            typical=typ, absent=0.0)
    b2 = bands["filtered_v"]
    ctx.add("supply.filtered_v", "DC at the second filter capacitor", "supply", b2.nominal,
            b2.low, b2.high, "V",
            f"{_n(nom.rectifier_out_v)} V - {_n(s.filter_ohm)} ohm x {_n(s.filter_load_ma)} mA = "
            f"{_n(b2.nominal)} V (same simulation); band: {sup.band_text}, with the filter "
            "resistor +-10 % and the second capacitor -20/+50 % (trade)", typical=typ)
    b = worst_case(lambda rf, f: rf * s.filter_load_ma * f / 1000.0,
                   {"rf": resistor_ohm(s.filter_ohm), "f": load_ma(1.0)})
    ctx.add("supply.filter_drop_v", "DC across the filter resistor", "supply", b.nominal, b.low,
            b.high, "V",
            f"{_n(s.filter_ohm)} ohm x {_n(s.filter_load_ma)} mA = {_n(b.nominal)} V; band: "
            "resistor +-10 % (carbon composition, trade), load +-10 % (trade); 0 V with B+ "
            "present means no current: an open load or a shorted resistor",
            keys=("supply.filter_ohm", "supply.filter_load_ma"), absent=0.0)
    if p.family == "transformer" and s.secondary_v is not None:
        line = ctx.line()
        sb = worst_case(lambda v: s.secondary_v * v / line.nominal, {"v": line})
        each = "each half of the HV winding" if s.circuit == "full-wave" else "the HV winding"
        ctx.add("supply.secondary_v", "AC across the high-voltage winding", "supply", sb.nominal,
                sb.low, sb.high, "V",
                f"{_n(s.secondary_v)} V RMS across {each}, rated under load at {_n(line.nominal)} V "
                f"line; band: {line.rule}, the winding follows the line",
                keys=("supply.secondary_v", "mains"))

