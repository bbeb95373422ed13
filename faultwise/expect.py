"""Expected readings: profile -> {name: Expected} (DESIGN section 5; the names are a contract).

Each expectation is built from the pure formulas in :mod:`faultwise.calc` with its band by
worst-case evaluation over the stated tolerances (:mod:`faultwise.calc.tolerance`), and a
``basis`` that shows the arithmetic with this set's numbers and says where the band comes
from. ``expectation_names(family)`` lists every name ``expect`` can produce for a family.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Expected:
    """What one test point should read on this set.

    ``low``/``high`` bound the normal band (worst case over the stated tolerances);
    ``basis`` is the arithmetic with this set's numbers and says where the band comes from;
    ``typical`` is true when it rests on a value the profile did not give.
    ``absent_below``: a reading at or below this magnitude is classified ``absent``
    (0 for limits such as leakage, where zero is normal).
    """

    name: str
    title: str
    stage: str
    nominal: float
    low: float
    high: float
    unit: str
    basis: str
    typical: bool = False
    absent_below: float = 0.0

    def to_json(self) -> dict:
        return {"nominal": self.nominal, "low": self.low, "high": self.high,
                "unit": self.unit, "basis": self.basis, "typical": self.typical}



STAGES = ("supply", "audio", "detector", "if", "oscillator", "antenna")

_ROLE_STAGE = {"rf": "antenna", "converter": "oscillator", "mixer": "if",
               "oscillator": "oscillator", "if": "if", "if2": "if", "if3": "if",
               "detector": "detector", "driver": "audio", "audio": "audio", "output": "audio",
               "output2": "audio"}
"""Stage of a transistor's bias readings, by its role."""
_BIAS_FIELDS = {"vb_v": ("base", "V", "vb_v"), "ve_v": ("emitter", "V", "ve_v"),
                "ic_ma": ("collector current", "mA", "ic_ma"), "vc_v": ("collector", "V", "vc_v")}


def _tube_roles() -> tuple[str, ...]:
    from faultwise.profile import TUBE_ROLES

    return TUBE_ROLES


def _transistor_roles() -> tuple[str, ...]:
    from faultwise.profile import TRANSISTOR_ROLES

    return TRANSISTOR_ROLES


def expectation_names(family: str) -> frozenset[str]:
    """Exactly the names ``expect`` can produce for profiles of ``family`` (for the graph lint)."""
    common = {"if.peak_khz", "if.bandwidth_khz", "tuning.lo_low_khz", "tuning.lo_high_khz",
              "tuning.image_low_khz", "tuning.image_high_khz", "tuning.cap_ratio",
              "tuning.antenna_uh", "tuning.osc_uh", "tuning.align_low_khz",
              "tuning.align_high_khz", "tuning.tracking_error_khz", "antenna.half_wave_m",
              "detector.time_constant_us", "detector.avc_v", "output.reflected_ohm",
              "output.voice_coil_ohm"}
    if family == "transistor":
        names = common | {"supply.battery_v", "supply.standby_ma", "oscillator.emitter_shift_v"}
        for role in _transistor_roles():
            names |= {f"bias.{role}.{f}" for f in _BIAS_FIELDS}
        return frozenset(names)
    if family not in ("series-string", "transformer"):
        return frozenset()
    names = common | {"mains.line_v", "safety.leakage_v", "supply.rectifier_out_v",
                      "supply.ripple_vpp", "supply.filtered_v", "supply.filter_drop_v",
                      "output.cathode_v", "output.plate_v", "output.primary_ohm",
                      "oscillator.grid_v"}
    if family == "series-string":
        names |= {"heaters.string_v", "heaters.string_ma", "heaters.dropping_ohm"}
    else:
        names |= {"heaters.winding_v", "heaters.total_a", "supply.secondary_v"}
    for role in _tube_roles():
        names |= {f"heater.{role}.v", f"heater.{role}.cold_ohm"}
    return frozenset(names)


def expect(profile, *, tube_table=None) -> dict[str, Expected]:
    """Every expectation this profile allows, keyed by name, in stage order.

    ``tube_table``: a :class:`faultwise.tubes.TubeTable` for rectifier and output-tube data
    (default: the bundled table, read once and cached).
    """
    ctx = _Context(profile, tube_table)
    if profile.line_powered:
        _mains(ctx)
        _heaters(ctx)
        _rectifier(ctx)
        _output_tube(ctx)
    else:
        _battery(ctx)
        _bias(ctx)
    _speaker(ctx)
    _detector(ctx)
    _if_strip(ctx)
    _oscillator(ctx)
    _tuning(ctx)
    _antenna(ctx)
    order = {s: i for i, s in enumerate(STAGES)}
    items = sorted(ctx.out.items(), key=lambda kv: order[kv[1].stage])  # stable: build order
    return dict(items)


# --------------------------------------------------------------------------- helpers

def _n(x: float) -> str:
    """A number for a basis line: 4 significant digits, plain notation."""
    if x == 0:
        return "0"
    text = f"{x:.4g}"
    if "e" in text:
        text = f"{float(text):f}".rstrip("0").rstrip(".")
    return text


class _Context:
    """The profile, the tube table (loaded on first use) and the expectations built so far."""

    def __init__(self, profile, tube_table) -> None:
        self.p = profile
        self._table = tube_table
        self.out: dict[str, Expected] = {}
        self._rect = None

    @property
    def table(self):
        if self._table is None:
            from faultwise.tubes import load_tube_table

            self._table = load_tube_table()
        return self._table

    def tube_type(self, type_name: str):
        from faultwise.tubes import lookup

        return lookup(type_name, self.table)

    def typical(self, *keys: str) -> bool:
        """True when any key (or a section above or below it) was filled with a typical value."""
        for key in keys:
            for t in self.p.typical:
                if t == key or key.startswith(t + ".") or t.startswith(key + "."):
                    return True
        return False

    def add(self, name: str, title: str, stage: str, nominal: float, low: float, high: float,
            unit: str, basis: str, keys: tuple[str, ...] = (), absent: float | None = None,
            typical: bool | None = None) -> None:
        lo, hi = min(low, high, nominal), max(low, high, nominal)
        self.out[name] = Expected(
            name=name, title=title, stage=stage, nominal=nominal, low=lo, high=hi, unit=unit,
            basis=basis, typical=self.typical(*keys) if typical is None else typical,
            absent_below=0.1 * abs(nominal) if absent is None else absent)

    def line(self):
        from faultwise.calc.mains import line_range_v

        return line_range_v(self.p.mains_v)


# --------------------------------------------------------------------------- supply: line sets

def _mains(ctx: _Context) -> None:
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


def _heaters(ctx: _Context) -> None:
    if not ctx.p.tubes:
        return
    if ctx.p.family == "series-string":
        _series_string(ctx)
    else:
        _heater_winding(ctx)


def _string_current_a(p) -> float:
    """The string's rated current: the heater current most of its tubes share."""
    currents = [t.heater_a for t in p.tubes]
    return max(set(currents), key=lambda a: (currents.count(a), a))


def _series_string(ctx: _Context) -> None:
    from faultwise.calc import heaters as h
    from faultwise.calc.tolerance import (
        HEATER_TOL,
        RESISTOR_TOL,
        heater,
        relative,
        resistor_ohm,
        worst_case,
    )

    p, line = ctx.p, ctx.line()
    tubes = p.tubes
    rated_a = _string_current_a(p)
    total = h.string_v(t.heater_v for t in tubes)
    sum_text = "+".join(_n(t.heater_v) for t in tubes)
    odd = [t for t in tubes if abs(t.heater_a - rated_a) > 1e-9]
    odd_text = ("; " + ", ".join(f"{t.type} is rated {_n(t.heater_a * 1000)} mA" for t in odd)
                + f", not the string's {_n(rated_a * 1000)} mA: check the lineup") if odd else ""
    keys = tuple(f"tubes.{t.role}.{k}" for t in tubes for k in ("heater_v", "heater_a"))
    tol = heater(total)
    ctx.add("heaters.string_v", "Sum of the heater voltages in the string", "supply", total,
            tol.low, tol.high, "V",
            f"{sum_text} = {_n(total)} V; band: {tol.rule}, the line the string runs on at rated "
            f"current{odd_text}", keys=keys)
    r_drop = h.dropping_ohm(line.nominal, total, rated_a)
    drop = resistor_ohm(r_drop)
    if r_drop > 0:
        drop_text = (f"({_n(line.nominal)} - {_n(total)}) V / {_n(rated_a)} A = {_n(r_drop)} ohm; "
                     f"band: {drop.rule}")
    else:
        drop_text = (f"the string sums to {_n(total)} V, at or above the {_n(line.nominal)} V line: "
                     "no dropping resistor (0 ohm)")
    ctx.add("heaters.dropping_ohm", "Heater dropping resistor needed", "supply", r_drop,
            drop.low, drop.high, "ohm", drop_text, keys=keys + ("mains",), absent=0.0)
    hot_total = sum(h.hot_ohm(t.heater_v, t.heater_a) for t in tubes)

    def current_ma(line_v: float, rd: float) -> float:
        return h.string_current_a(line_v, hot_total, rd) * 1000.0

    band = worst_case(current_ma, {"line_v": line, "rd": drop})
    rated = heater(rated_a * 1000.0)
    window = (f"widened to the rating +-{HEATER_TOL * 100:.0f} % (tube handbooks: heaters within "
              "+-10 % of rating)")
    ctx.add("heaters.string_ma", "Heater string current", "supply", band.nominal,
            min(band.low, rated.low), max(band.high, rated.high), "mA",
            f"rated {_n(rated_a * 1000)} mA; the line drives {_n(line.nominal)} V / "
            f"({_n(hot_total)} + {_n(r_drop)}) ohm = {_n(band.nominal)} mA; band: {line.rule}"
            + (f", dropper +-{RESISTOR_TOL * 100:.0f} %" if r_drop else "")
            + f", {window}; hot resistance taken constant (a tungsten heater's rises with "
            "temperature, so the real current moves less than this); 0 mA: the string is open",
            keys=keys + ("mains",))
    drop_v = r_drop * rated_a
    design = h.design_line_v(total, r_drop, rated_a)
    for t in tubes:
        def heater_v(line_v: float, dv: float, t=t) -> float:
            return h.series_heater_v(line_v, t.heater_v, 1.0, total, 1.0, dv)

        b = worst_case(heater_v, {"line_v": line, "dv": relative(drop_v, RESISTOR_TOL)})
        own = heater(t.heater_v)
        ctx.add(f"heater.{t.role}.v", f"Heater voltage, {t.role} ({t.type})", "supply", b.nominal,
                min(b.low, own.low), max(b.high, own.high), "V",
                f"{_n(t.heater_v)} V x {_n(line.nominal)} / {_n(design)} = {_n(b.nominal)} V "
                f"(series string: rated volts scaled by line over the string's design voltage); "
                f"band: {line.rule}, {window}; an open heater reads the whole line, about "
                f"{_n(line.nominal)} V (high), and then every other heater reads 0",
                keys=(f"tubes.{t.role}.heater_v", f"tubes.{t.role}.heater_a", "mains"))
        _cold_ohm(ctx, t)


def _cold_ohm(ctx: _Context, t) -> None:
    from faultwise.calc import heaters as h
    from faultwise.calc.tolerance import heater

    hot = h.hot_ohm(t.heater_v, t.heater_a)
    spread = heater(hot)
    nominal = h.cold_ohm(t.heater_v, t.heater_a)
    ctx.add(f"heater.{t.role}.cold_ohm", f"Cold heater resistance, {t.role} ({t.type}), power off",
            "supply", nominal, spread.low * h.COLD_TO_HOT_LOW, spread.high * h.COLD_TO_HOT_HIGH,
            "ohm",
            f"hot {_n(t.heater_v)} V / {_n(t.heater_a)} A = {_n(hot)} ohm; cold about 1/10 of hot "
            f"= {_n(nominal)} ohm (tungsten heater, trade); band: 1/14 to 1/7 of hot (trade) "
            "with heaters +-10 % (tube handbooks); an open heater reads infinite (high)",
            keys=(f"tubes.{t.role}.heater_v", f"tubes.{t.role}.heater_a"), absent=0.0)


def _heater_winding(ctx: _Context) -> None:
    from faultwise.calc import heaters as h
    from faultwise.calc.tolerance import heater, worst_case

    p, line = ctx.p, ctx.line()
    wv = p.heater_winding_v
    if wv is None:
        return
    on = [t for t in p.tubes if abs(t.heater_v - wv) <= 0.05 * wv]
    off = [t for t in p.tubes if t not in on]
    b = worst_case(lambda line_v: h.winding_v(line_v, line.nominal, wv), {"line_v": line})
    ctx.add("heaters.winding_v", "Heater winding voltage", "supply", b.nominal, b.low, b.high, "V",
            f"{_n(wv)} V rated at {_n(line.nominal)} V line; the winding follows the line; band: "
            f"{line.rule}", keys=("heater_winding_v", "mains"))
    total = h.winding_total_a(t.heater_a for t in on)
    tb = worst_case(lambda line_v, f: f * total * line_v / line.nominal,
                    {"line_v": line, "f": heater(1.0)})
    others = ("; on their own winding: " + ", ".join(f"{t.type} ({_n(t.heater_v)} V)" for t in off)
              if off else "")
    ctx.add("heaters.total_a", "Current of the heater winding", "supply", tb.nominal, tb.low, tb.high,
            "A", "+".join(_n(t.heater_a) for t in on) + f" = {_n(total)} A (parallel heaters)"
            f"{others}; band: {line.rule}, heaters +-10 % (tube handbooks)",
            keys=tuple(f"tubes.{t.role}.heater_a" for t in on) + ("mains",))
    for t in p.tubes:
        rated = wv if t in on else t.heater_v
        vb = worst_case(lambda line_v, rated=rated: h.winding_v(line_v, line.nominal, rated),
                        {"line_v": line})
        ctx.add(f"heater.{t.role}.v", f"Heater voltage, {t.role} ({t.type})", "supply", vb.nominal,
                vb.low, vb.high, "V",
                f"{_n(rated)} V winding x line / {_n(line.nominal)} V (parallel heaters); band: "
                f"{line.rule}; a handbook heater is good within +-10 % of {_n(t.heater_v)} V",
                keys=(f"tubes.{t.role}.heater_v", "heater_winding_v", "mains"))
        _cold_ohm(ctx, t)


# --------------------------------------------------------------------------- rectifier and filter

GENERIC_TUBE_DROP = {"half-wave": (15.0, 100.0), "full-wave": (60.0, 125.0), "bridge": (15.0, 100.0)}
"""Tube rectifier drop when the table has none: 15 V at 100 mA (small half-wave types, from
memory) or 60 V at 125 mA (5Y3GT-class full-wave, tube data in REFERENCES)."""


@dataclass(frozen=True)
class _Supply:
    """The simulated supply: nominal result, worst-case bands, and what to say about them."""

    nominal: object               # RectifierResult at nominal values
    bands: dict                   # output name -> SupplyBand
    diode_label: str
    diode_typical: bool
    source_text: str
    band_text: str
    keys: tuple[str, ...]


def _rectifier_diode(ctx: _Context, circuit: str, source_rms_v: float):
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


def _supply(ctx: _Context) -> _Supply | None:
    """Simulate the supply at nominal and at the corners that bound each output."""
    if ctx._rect is not None:
        return ctx._rect
    from faultwise.calc import rectifier as r
    from faultwise.calc.tolerance import electrolytic_uf, load_ma, resistor_ohm
    from faultwise.errors import ProfileError

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
    ctx._rect = _Supply(nominal, bands, diode.label, diode_typ, src_text, band_text,
                        ("supply", "mains"))
    return ctx._rect


def _rectifier(ctx: _Context) -> None:
    from faultwise.calc.rectifier import ripple_bound_vpp
    from faultwise.calc.tolerance import load_ma, resistor_ohm, worst_case

    sup = _supply(ctx)
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


# --------------------------------------------------------------------------- output stage, speaker

PLATE_FRACTION = 0.9
"""Share of a beam/pentode output tube's cathode current that flows to the plate when the
tube table gives no operating point: about 0.9, the screen taking the rest (trade)."""


def _output_tube(ctx: _Context) -> None:
    from faultwise.calc import audio
    from faultwise.calc.tolerance import (
        TUBE_CURRENT_TOL,
        relative,
        resistor_ohm,
        worst_case,
    )

    t = ctx.p.tube("output")
    if t is None:
        return
    keys = ("tubes.output.cathode_ohm", "tubes.output.cathode_ma")
    ik = relative(t.cathode_ma, TUBE_CURRENT_TOL) if t.cathode_ma is not None else None
    if t.cathode_ohm is not None and ik is not None:
        b = worst_case(lambda ma, ohm: audio.cathode_v(ma, ohm),
                       {"ma": ik, "ohm": resistor_ohm(t.cathode_ohm)})
        ctx.add("output.cathode_v", f"Output tube cathode bias ({t.type})", "audio", b.nominal,
                b.low, b.high, "V",
                f"{_n(t.cathode_ma)} mA x {_n(t.cathode_ohm)} ohm = {_n(b.nominal)} V; band: "
                "cathode current +-20 % tube to tube (trade), resistor +-10 % (trade); 0 V means "
                "no cathode current (or a shorted resistor)", keys=keys)
    a = ctx.p.audio
    rect = _supply(ctx)
    if a.output_turns_ratio is None or a.speaker_ohm is None or ik is None:
        return
    zp = audio.reflected_ohm(a.output_turns_ratio, a.speaker_ohm)
    rp = relative(zp * audio.PRIMARY_DC, 0.5)
    ctx.add("output.primary_ohm", "Output transformer primary, DC resistance (power off)", "audio",
            rp.nominal, rp.low, rp.high, "ohm",
            f"about {audio.PRIMARY_DC * 100:.0f} % of the {_n(zp)} ohm reflected load = "
            f"{_n(rp.nominal)} ohm; band: {audio.PRIMARY_DC_LOW * 100:.0f}-"
            f"{audio.PRIMARY_DC_HIGH * 100:.0f} % (small single-ended output transformers, "
            "common practice, no source); an open primary reads infinite and leaves the plate at 0 V",
            keys=("audio",), absent=0.0)
    if rect is None:
        return
    data = ctx.tube_type(t.type)
    op = getattr(data, "operation", None)
    frac = op.plate_ma / op.cathode_ma if op is not None and op.cathode_ma else PLATE_FRACTION
    frac_text = (f"plate {_n(op.plate_ma)} of {_n(op.cathode_ma)} mA in the tube data"
                 if op is not None else
                 f"plate about {_n(PLATE_FRACTION)} of the cathode current (trade)")
    drop = audio.primary_drop_v(t.cathode_ma * frac, rp.nominal)
    bplus = rect.bands["rectifier_out_v"]
    nom = bplus.nominal - drop
    low = bplus.low - audio.primary_drop_v(ik.high * frac, rp.high)
    high = bplus.high - audio.primary_drop_v(ik.low * frac, rp.low)
    ctx.add("output.plate_v", f"Output tube plate to chassis ({t.type})", "audio", nom, low, high,
            "V",
            f"B+ {_n(bplus.nominal)} V - {_n(t.cathode_ma * frac)} mA x "
            f"{_n(rp.nominal)} ohm primary = {_n(nom)} V ({frac_text}); band: the B+ corners with "
            "the cathode current +-20 % (trade) and the primary 5-15 % of the reflected load",
            typical=ctx.typical(*rect.keys, "audio", *keys) or rect.diode_typical)


def _speaker(ctx: _Context) -> None:
    from faultwise.calc import audio
    from faultwise.calc.tolerance import relative

    a = ctx.p.audio
    if a.speaker_ohm is None:
        return
    if a.output_turns_ratio is not None:
        zp = audio.reflected_ohm(a.output_turns_ratio, a.speaker_ohm)
        ctx.add("output.reflected_ohm", "Load the output stage sees", "audio", zp,
                zp * audio.SPEAKER_MIN_FRACTION, zp * audio.SPEAKER_MAX_FRACTION, "ohm",
                f"{_n(a.output_turns_ratio)}^2 x {_n(a.speaker_ohm)} ohm = {_n(zp)} ohm; band: the "
                "speaker's impedance is at least 80 % of rated in its working band (IEC 60268-5) "
                "and about 1.25 x rated just above that minimum (common practice, no source)",
                keys=("audio",), absent=0.0)
    vc = relative(audio.voice_coil_ohm(a.speaker_ohm), 0.0)
    low, high = a.speaker_ohm * audio.VOICE_COIL_DC_LOW, a.speaker_ohm * audio.VOICE_COIL_DC_HIGH
    ctx.add("output.voice_coil_ohm", "Voice-coil DC resistance (speaker disconnected)", "audio",
            vc.nominal, low, high, "ohm",
            f"{_n(audio.VOICE_COIL_DC)} x {_n(a.speaker_ohm)} ohm rated = {_n(vc.nominal)} ohm; band: "
            "0.7-0.8 x rated (trade); an open voice coil reads infinite",
            keys=("audio.speaker_ohm",), absent=0.0)


# --------------------------------------------------------------------------- transistor sets

def _battery(ctx: _Context) -> None:
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


def _bias_spreads(ctx: _Context, tr) -> dict:
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


def _bias(ctx: _Context) -> None:
    from faultwise.calc.bias import divider_bias
    from faultwise.calc.tolerance import Spread, corners, worst_case_fields

    p = ctx.p
    if p.battery_v is None or not p.transistors:
        return
    standby_nom = 0.0
    ends = {"low": [0.0, 0.0], "high": [0.0, 0.0]}   # battery end -> [sum of mins, sum of maxes]
    parts: list[str] = []
    keys_all: list[str] = ["battery"]
    for tr in p.transistors:
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
        stage = _ROLE_STAGE.get(tr.role, "audio")
        tails = {"vb_v": f"Vb = Ve + Vbe = {_n(nom.vb_v)} V",
                 "ve_v": f"Ve = (beta+1) Ib Re = {_n(nom.ve_v)} V",
                 "ic_ma": (f"Ic = beta Ib = {_n(tr.beta)} x {_n(nom.ib_ma * 1000)} uA = "
                           f"{_n(nom.ic_ma)} mA"),
                 "vc_v": (f"Vc = Vcc - Ic Rc = {_n(p.battery_v)} - {_n(nom.ic_ma)} mA x "
                          f"{_n(b.collector_ohm)} ohm = {_n(nom.vc_v)} V")}
        for field, (what, unit, attr) in _BIAS_FIELDS.items():
            bb = bands[attr]
            ctx.add(f"bias.{tr.role}.{field}",
                    f"{tr.role.capitalize()} {tr.material} {tr.polarity.upper()} {what}", stage,
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


# --------------------------------------------------------------------------- detector, IF, oscillator

def _detector(ctx: _Context) -> None:
    from faultwise.calc import detector as d
    from faultwise.calc.tolerance import relative, worst_case

    tube = ctx.p.line_powered
    r_ohm, c_pf = (d.TUBE_LOAD_OHM, d.TUBE_LOAD_PF) if tube else (d.TRANSISTOR_LOAD_OHM,
                                                                  d.TRANSISTOR_LOAD_PF)
    b = worst_case(d.time_constant_us, {"r_ohm": relative(r_ohm, d.LOAD_R_TOL),
                                        "c_pf": relative(c_pf, d.LOAD_C_TOL)})
    floor = d.carrier_limit_us(ctx.p.if_khz)
    m = d.MODULATION_CHECK
    f_max = d.max_audio_hz(b.nominal, m)
    m_top = d.max_modulation(b.nominal, d.AUDIO_TOP_HZ)
    ctx.add("detector.time_constant_us", "Detector load time constant", "detector", b.nominal,
            b.low, b.high, "us",
            f"RC = {_n(r_ohm / 1000)} kohm x {_n(c_pf)} pF = {_n(b.nominal)} us (typical values); "
            f">> 1/(2 pi {_n(ctx.p.if_khz)} kHz) = {_n(floor)} us, so the IF is filtered; follows "
            f"m = {_n(m)} up to sqrt(1-m^2)/(2 pi m RC) = {_n(f_max)} Hz and {_n(d.AUDIO_TOP_HZ)} Hz "
            f"up to m = {_n(m_top)} (communication textbooks); band: volume control +-20 %, "
            "capacitor +-10 % (trade)", typical=True, absent=0.0)
    lo, nom, hi = d.AVC_TUBE_V if tube else d.AVC_TRANSISTOR_V
    what = ("negative to chassis on the AVC line, shown as a magnitude" if tube else
            "DC at the detector load, fed back to the first IF stage")
    ctx.add("detector.avc_v", "AVC voltage on a strong local station", "detector", nom, lo, hi, "V",
            f"about {_n(nom)} V, {what}; band: {_n(lo)}-{_n(hi)} V with signal strength (trade); "
            "near zero on a strong station means no IF signal reaches the detector",
            typical=True)


def _if_strip(ctx: _Context) -> None:
    from faultwise.calc import detector as d

    f = ctx.p.if_khz
    tol = d.IF_ALIGN_TOL
    ctx.add("if.peak_khz", "IF the strip peaks at", "if", f, f * (1 - tol), f * (1 + tol), "kHz",
            f"the set's IF, {_n(f)} kHz; band: +-{tol * 100:g} % alignment tolerance (trade)",
            keys=("if_khz",), absent=0.0)
    q_lo, q_nom, q_hi = d.IF_Q
    bw = d.if_bandwidth_khz(f, q_nom)
    ctx.add("if.bandwidth_khz", "IF bandwidth (-3 dB)", "if", bw, d.if_bandwidth_khz(f, q_hi),
            d.if_bandwidth_khz(f, q_lo), "kHz",
            f"B = f0/Q = {_n(f)} kHz / {_n(q_nom)} = {_n(bw)} kHz; band: loaded Q {_n(q_lo)}-"
            f"{_n(q_hi)} (trade; broadcast IF strips pass about 6-10 kHz overall)",
            keys=("if_khz",), absent=0.0)


def _oscillator(ctx: _Context) -> None:
    from faultwise.calc import oscillator as o

    p = ctx.p
    if p.line_powered:
        t = p.tube("converter") or p.tube("oscillator")
        if t is None:
            return
        lo, nom, hi = o.GRID_BIAS_V
        ctx.add("oscillator.grid_v", f"Oscillator grid bias, oscillating ({t.type})", "oscillator",
                nom, lo, hi, "V",
                f"grid-leak bias, negative to chassis, shown as a magnitude: about {_n(nom)} V; band "
                f"{_n(lo)}-{_n(hi)} V (trade); near 0 V means the oscillator is dead (measure with "
                "a high-impedance meter, through a 1 Mohm probe resistor if possible)", typical=True)
        return
    tr = p.transistor("converter") or p.transistor("oscillator")
    if tr is None:
        return
    lo, nom, hi = o.EMITTER_SHIFT_V
    ctx.add("oscillator.emitter_shift_v", "Converter emitter change when the oscillator is stopped",
            "oscillator", nom, lo, hi, "V",
            f"short the oscillator section of the gang and watch the emitter: it moves about "
            f"{_n(nom)} V; band {_n(lo)}-{_n(hi)} V (trade); no change (below "
            f"{_n(o.EMITTER_SHIFT_ABSENT_V * 1000)} mV) means it was not oscillating",
            typical=True, absent=o.EMITTER_SHIFT_ABSENT_V)


# --------------------------------------------------------------------------- tuning, antenna

def _tuning(ctx: _Context) -> None:
    from faultwise.calc import tuning as tu
    from faultwise.calc.detector import IF_ALIGN_TOL
    from faultwise.calc.tolerance import GANG_TOL, STRAY_TOL, relative, worst_case

    p = ctx.p
    lo_f, hi_f, iff = p.band_low_khz, p.band_high_khz, p.if_khz
    dial = lambda f: relative(f, tu.DIAL_TOL)
    ifs = relative(iff, IF_ALIGN_TOL)
    tol_text = (f"dial +-{tu.DIAL_TOL * 100:g} % (common practice, no source), "
                f"IF +-{IF_ALIGN_TOL * 100:g} % (trade)")
    for end, f in (("low", lo_f), ("high", hi_f)):
        b = worst_case(tu.lo_khz, {"signal_khz": dial(f), "if_khz": ifs})
        ctx.add(f"tuning.lo_{end}_khz", f"Local oscillator, dial at the {end} end", "oscillator",
                b.nominal, b.low, b.high, "kHz",
                f"f + IF = {_n(f)} + {_n(iff)} = {_n(b.nominal)} kHz (high-side oscillator); band: "
                f"{tol_text}", keys=("band", "if_khz"), absent=0.0)
        im = worst_case(tu.image_khz, {"signal_khz": dial(f), "if_khz": ifs})
        ctx.add(f"tuning.image_{end}_khz", f"Image frequency, dial at the {end} end", "antenna",
                im.nominal, im.low, im.high, "kHz",
                f"f + 2 IF = {_n(f)} + 2 x {_n(iff)} = {_n(im.nominal)} kHz; band: {tol_text}",
                keys=("band", "if_khz"), absent=0.0)
    cr = worst_case(tu.cap_ratio, {"low_khz": dial(lo_f), "high_khz": dial(hi_f)})
    c_max, c_min = p.gang_max_pf + p.gang_stray_pf, p.gang_min_pf + p.gang_stray_pf
    covers = ("enough" if c_max / c_min >= cr.nominal else "NOT enough: check the gang figures")
    ctx.add("tuning.cap_ratio", "Capacitance ratio the antenna section must cover", "antenna",
            cr.nominal, cr.low, cr.high, "ratio",
            f"({_n(hi_f)}/{_n(lo_f)})^2 = {_n(cr.nominal)}; the gang with strays gives "
            f"({_n(p.gang_max_pf)}+{_n(p.gang_stray_pf)})/({_n(p.gang_min_pf)}+{_n(p.gang_stray_pf)}) "
            f"= {_n(c_max / c_min)} ({covers}); band: dial +-{tu.DIAL_TOL * 100:g} % at both ends",
            keys=("band", "gang"), absent=0.0)
    gang = {"f_khz": dial(lo_f), "gmax": relative(p.gang_max_pf, GANG_TOL),
            "stray": relative(p.gang_stray_pf, STRAY_TOL)}
    ant = worst_case(lambda f_khz, gmax, stray: tu.inductance_uh(f_khz, gmax + stray), gang)
    ctx.add("tuning.antenna_uh", "Antenna coil inductance", "antenna", ant.nominal, ant.low,
            ant.high, "uH",
            f"L = 25330 / (f^2 C) = 25330 / ({_n(lo_f / 1000)}^2 x {_n(c_max)}) = {_n(ant.nominal)} "
            f"uH (band's low end with gang maximum plus stray); band: gang +-{GANG_TOL * 100:g} %, "
            f"stray +-{STRAY_TOL * 100:g} % (trade), dial +-{tu.DIAL_TOL * 100:g} %",
            keys=("band", "gang"), absent=0.0)
    _oscillator_coil(ctx, gang, c_max)
    for end, f in zip(("low", "high"), tu.alignment_points_khz(lo_f, hi_f)):
        d = dial(f)
        where = "padder" if end == "low" else "trimmer"
        rule = ("about a tenth above the band's low end" if end == "low" else
                "about an eighth below the band's top")
        ctx.add(f"tuning.align_{end}_khz", f"Alignment point for the oscillator {where}",
                "oscillator", f, d.low, d.high, "kHz",
                f"{_n(f)} kHz: {rule}, rounded (50 kHz steps on the broadcast band; common "
                f"practice: 600 and 1400 kHz on 540-1600); band: dial +-{tu.DIAL_TOL * 100:g} %",
                keys=("band",), absent=0.0)


def _oscillator_coil(ctx: _Context, gang: dict, c_max: float) -> None:
    from faultwise.calc import tuning as tu
    from faultwise.calc.tolerance import worst_case

    p = ctx.p
    lo_f, hi_f, iff = p.band_low_khz, p.band_high_khz, p.if_khz
    two = tu.padder_design(lo_f, hi_f, iff, c_max)
    three = tu.three_point_design(lo_f, hi_f, iff, c_max)
    b = worst_case(lambda f_khz, gmax, stray: tu.padder_design(f_khz, hi_f * f_khz / lo_f, iff,
                                                                gmax + stray).osc_uh, gang)
    low, high = min(b.low, three.osc_uh), max(b.high, three.osc_uh)
    ctx.add("tuning.osc_uh", "Oscillator coil inductance", "oscillator", two.osc_uh, low, high, "uH",
            f"two-point padder design (exact at {_n(lo_f)} and {_n(hi_f)} kHz): padder Cp = C (q-1)/"
            f"(r-q) = {_n(two.padder_pf)} pF with r = {_n(tu.cap_ratio(lo_f, hi_f))}, q = "
            f"(({_n(hi_f)}+{_n(iff)})/({_n(lo_f)}+{_n(iff)}))^2 = "
            f"{_n(tu.cap_ratio(two.osc_low_khz, two.osc_high_khz))}; L = 25330 / "
            f"({_n(two.osc_low_khz / 1000)}^2 x {_n(tu.series_pf(c_max, two.padder_pf))}) = "
            f"{_n(two.osc_uh)} uH; band: gang and stray tolerances, and it takes in the three-point "
            f"design's {_n(three.osc_uh)} uH (padder {_n(three.padder_pf)} pF, trimmer "
            f"{_n(three.trimmer_pf)} pF)", keys=("band", "gang", "if_khz"), absent=0.0)
    curve = tu.tracking_error_curve(three.antenna_uh, three.osc_uh, three.padder_pf, iff,
                                    two.c_min_pf, two.c_max_pf, three.trimmer_pf)
    worst = max(curve, key=lambda pt: abs(pt.error_khz))
    err = abs(worst.error_khz)
    mid = (lo_f + hi_f) / 2.0
    slack = mid / (2.0 * tu.ANTENNA_Q)
    pts = "/".join(_n(f) for f in three.points_khz)
    ctx.add("tuning.tracking_error_khz", "Oscillator tracking error (worst across the band)",
            "oscillator", err, 0.0, err + slack, "kHz",
            f"three-point tracking exact at {pts} kHz (padder {_n(three.padder_pf)} pF, trimmer "
            f"{_n(three.trimmer_pf)} pF, L {_n(three.osc_uh)} uH): worst |f_osc - f - IF| = "
            f"{_n(err)} kHz at {_n(worst.signal_khz)} kHz; band: up to that plus half the antenna "
            f"circuit's bandwidth at mid-band, {_n(mid)}/(2 x {_n(tu.ANTENNA_Q)}) = {_n(slack)} kHz "
            "(loaded Q about 100, trade)", keys=("band", "gang", "if_khz"), absent=0.0)


def _antenna(ctx: _Context) -> None:
    from faultwise.calc import antenna

    mid_khz = (ctx.p.band_low_khz + ctx.p.band_high_khz) / 2.0
    f = mid_khz / 1000.0
    full, practical = antenna.half_wave_m(f), antenna.practical_half_wave_m(f)
    ctx.add("antenna.half_wave_m", "Half-wave antenna length at mid-band", "antenna", full,
            practical, full, "m",
            f"150 / {_n(f)} MHz = {_n(full)} m; a practical half-wave wire is 143 / {_n(f)} = "
            f"{_n(practical)} m (amateur handbooks); far longer than any set's aerial, which is why "
            "broadcast sets use loops and ferrite rods", keys=("band",), absent=0.0)
