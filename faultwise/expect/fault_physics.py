"""The broken set's readings: a fault model (:mod:`faultwise.expect.fault_models`) applied to the calc model.

:func:`inject` returns, for every expectation name of the healthy set, what the meter reads
on the set with the fault: an :class:`~faultwise.expect.Expected` whose ``nominal`` is the
faulty nominal reading and whose band is where that reading lies over the tolerances.

How each part of the set is computed:

* Supply of line sets: the same rectifier/filter simulation as ``expect``
  (:func:`faultwise.calc.rectifier.simulate`) with the faulty parts. An open filter resistor
  leaves the second capacitor's load unfed (the meter across the resistor reads B+); a
  shorted second capacitor (or B+ bypass) becomes a resistive load V1 / (Rf + short) on the
  first capacitor, solved by fixed-point iteration on that load; a shorted first capacitor
  is a half-wave (or full-wave) rectifier into Rs + short (:func:`_into_short_v`). When the
  tubes are cold the load falls to the bleed of the meter: B+ rises to the source peak
  (a silicon or selenium rectifier; a cold tube rectifier passes nothing).
* Tube stages follow the screen supply (the second capacitor): a stage's current scales as
  (V / V_healthy)^1.5 (Child's three-halves law, textbooks) times its emission factor; the
  output tube's cathode bias and plate voltage follow from that current; the oscillator's
  grid bias and the AVC voltage scale with the supply ratio (their amplitudes follow the
  stage gain, common practice, no source).
* The voltage chart (``stage.<role>.*``, ``bias.output.*``): the chart's own engine with the
  model's part changes and the broken supply (:mod:`faultwise.expect.fault_physics_chart`).
  The older ``output.cathode_v`` and ``output.plate_v`` keep the scaling below.
* Heaters: a series string with an open element reads the whole line across the open heater
  and 0 across every other; a dead heater winding reads 0 everywhere.
* Transistor stages: :func:`stage_point` (the divider-bias Thevenin solution of
  :func:`faultwise.calc.bias.divider_bias`, with collector-base leakage, a collector-emitter
  short and a saturation solution that keeps Ie = Ic + Ib). Standby current: the healthy
  total with each changed stage's draw replaced.
* Signal: a break upstream of the detector (antenna, converter, IF, detector, a stopped
  oscillator, a shorted gang section, an open coil) takes the AVC voltage to 0; a scale
  factor scales it; the audio stage is after the AVC take-off and changes no reading here.

Bands of changed readings are the healthy band scaled by faulty/healthy nominal (the relative
spread kept); readings the fault does not move keep the healthy band.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field, replace

from faultwise.expect.expected import Expected
from faultwise.expect.fault_models import (LEAKY_CAP_MA, LEAKY_ICBO_MA, LEAKY_SUPPLY_MA, OPEN_OHM, SHORT_OHM, STAGE_PARTS, Change,
                                           parse_model)

VCE_SAT_V = 0.2
"""Collector-emitter voltage of a saturated small-signal transistor (as calc.bias)."""
SCREEN_OPEN_CURRENT = 0.05
"""A pentode with no screen voltage passes a few per cent of its plate current (tube curves,
from memory)."""
VOICE_COIL_SHORT = 0.05
"""A shorted voice coil (burned turns, leads touching) reads a few per cent of its value."""
OPEN_READ = 1e9
"""What a power-off resistance reading of an open winding or heater is taken to be: infinite."""


@dataclass
class State:
    """The parsed model, folded into the facts the calculation needs."""

    line_open: bool = False
    dropper_open: bool = False
    winding_open: bool = False
    heater_open: tuple[str, ...] = ()
    rect_open: bool = False
    rect_drop: float = 1.0
    secondary_open: bool = False
    first_short: bool = False
    second_short: bool = False
    filter_open: bool = False
    surge_open: bool = False
    emission: dict = field(default_factory=dict)       # tube role -> emission factor
    cathode: str = ""                  # '', open, short
    cathode_scale: float = 1.0
    primary: str = ""
    voice_coil_open: bool = False
    voice_coil_short: bool = False
    leak_first_ma: float = 0.0         # a leaky first / second filter capacitor's current
    leak_second_ma: float = 0.0
    battery_open: bool = False
    supply_leak: bool = False
    osc: float = 1.0
    signal: float = 1.0
    avc: float = 1.0
    if_peak: float = 1.0
    tuning: dict = field(default_factory=dict)         # 'low'/'high' -> factor
    transistors: dict = field(default_factory=dict)    # role -> {field: Change}
    stage: dict = field(default_factory=dict)          # tube role -> {part: Change}
    pair_bias: str = ""                                # '', open, short (output.bias)
    profile_scale: dict = field(default_factory=dict)  # profile field -> factor


def fold(changes: tuple[Change, ...]) -> State:
    """The model's changes as one :class:`State` (an open capacitor keeps 1 % of its value)."""
    st = State()
    for c in changes:
        p, kind, k = c.parts, c.kind, c.factor
        head = p[0]
        if c.target == "line":
            st.line_open = True
        elif c.target == "heaters.dropper":
            st.dropper_open = True
        elif c.target == "heaters.winding":
            st.winding_open = True
        elif head == "heater":
            st.heater_open += (p[1],)
        elif c.target == "rectifier":
            st.rect_open = True
        elif c.target == "rectifier.drop":
            st.rect_drop *= k
        elif head == "tube" and p[2] in STAGE_PARTS:
            st.stage.setdefault(p[1], {})[p[2]] = c
            if c.target == "tube.output.cathode_ohm":
                st.cathode, st.cathode_scale = ("" if kind == "scale" else kind), k
        elif head == "tube":
            st.emission[p[1]] = st.emission.get(p[1], 1.0) * (0.0 if kind == "open" else k)
        elif c.target == "output.bias":
            st.pair_bias = kind
        elif c.target == "output.primary":
            st.primary = kind
        elif c.target == "speaker.voice_coil":
            if kind == "short":
                st.voice_coil_short = True
            else:
                st.voice_coil_open = True
        elif c.target == "battery":
            if kind == "leaky":
                st.supply_leak = True
            else:
                st.battery_open = True
        elif head == "transistor":
            field = p[2] if len(p) > 2 else "self"
            st.transistors.setdefault(p[1], {})[field] = c
        elif head == "oscillator":
            st.osc *= 0.0 if kind == "stopped" else k
        elif head in ("gang", "coil"):
            if p[1] in ("oscillator",):
                st.osc = 0.0
            elif p[1] == "antenna" and head == "coil":
                st.signal *= 0.1            # the rod's coupling winding still picks a little up
            else:
                st.signal = 0.0
        elif head == "signal":
            if p[1] != "audio":
                st.signal *= 0.0 if kind == "open" else k
        elif head == "avc":
            st.avc *= 0.0 if kind == "open" else k
        elif c.target == "if.peak":
            st.if_peak *= k
        elif head == "tuning":
            st.tuning[p[1]] = st.tuning.get(p[1], 1.0) * k
        elif head == "supply" and kind == "leaky":
            if p[1] == "first_cap_uf":
                st.leak_first_ma += LEAKY_CAP_MA
            else:
                st.leak_second_ma += LEAKY_CAP_MA
        elif head == "supply":
            fld = p[1]
            if fld == "first_cap_uf" and kind == "short":
                st.first_short = True
            elif fld == "second_cap_uf" and kind == "short":
                st.second_short = True
            elif fld == "filter_ohm" and kind == "open":
                st.filter_open = True
            elif fld == "surge_ohm" and kind == "open":
                st.surge_open = True
            elif fld == "secondary_v" and kind == "open":
                st.secondary_open = True
            else:
                factor = {"scale": k, "open": 0.01, "short": 0.0}[kind]
                if fld == "filter_ohm" and kind == "short":
                    factor = SHORT_OHM / 1e6
                st.profile_scale[fld] = st.profile_scale.get(fld, 1.0) * factor
        elif c.target == "battery_v":
            st.profile_scale["battery_v"] = st.profile_scale.get("battery_v", 1.0) * k
    return st


# ----------------------------------------------------------------------- transistor stage

@dataclass(frozen=True)
class StagePoint:
    vb_v: float
    ve_v: float
    ic_ma: float
    vc_v: float
    draw_ma: float      # collector current plus divider current: what the stage takes from the battery


def _res(base: float, c: Change | None, *, open_ohm: float = OPEN_OHM) -> float:
    if c is None:
        return base
    if c.kind == "open":
        return open_ohm
    if c.kind == "short":
        return SHORT_OHM * 1e-3 if base > 0 else 0.0
    return base * c.factor


def stage_point(vcc: float, top: float, bottom: float, re: float, rc: float, beta: float,
                vbe: float, *, icbo_ma: float = 0.0, state: str = "") -> StagePoint:
    """A divider-biased stage (magnitudes): Thevenin solution with leakage and saturation.

    Active region: Ib = (Vth - Vbe - (beta+1) Icbo Re) / (Rth + (beta+1) Re),
    Ie = (beta+1)(Ib + Icbo), Ic = Ie - Ib. Saturation (Vc < Ve + 0.2 V): Ve from
    Ve (1 + Re/Rc + Re/Rth) = Re ((Vcc - 0.2)/Rc + (Vth - Vbe)/Rth). ``state``: '' (good),
    'open' (no junction conducts: Vb = Vth, Ve = 0, Vc = Vcc), 'short' (collector to emitter).
    """
    vth = vcc * bottom / (top + bottom)
    rth = top * bottom / (top + bottom)
    icbo = icbo_ma / 1000.0
    divider = lambda vb: max(vcc - vb, 0.0) / top * 1000.0
    if state == "open":
        return StagePoint(vth, 0.0, 0.0, vcc, divider(vth))
    if state == "short":
        ic = vcc / (rc + re) if rc + re > 0 else vcc / (SHORT_OHM * 1e-3)
        ve = ic * re
        vb = min(vth, ve + vbe)
        return StagePoint(vb, ve, ic * 1000.0, ve, ic * 1000.0 + divider(vb))
    ib = (vth - vbe - (beta + 1) * icbo * re) / (rth + (beta + 1) * re)
    ib = max(ib, -icbo) if vth > vbe or icbo > 0 else 0.0
    ie = (beta + 1) * (ib + icbo)
    if vth <= vbe and icbo == 0:
        ie = 0.0
    ic = ie - ib
    ve = ie * re
    vc = vcc - ic * rc
    vb = ve + vbe if ie > 0 else vth
    if rc > 0 and vc < ve + VCE_SAT_V:
        ve = re * ((vcc - VCE_SAT_V) / rc + (vth - vbe) / rth) / (1 + re / rc + re / rth)
        ve = max(ve, 0.0)
        vc = ve + VCE_SAT_V
        ic = (vcc - vc) / rc
        vb = ve + vbe
    return StagePoint(vb, ve, ic * 1000.0, vc, ic * 1000.0 + divider(vb))


def transistor_points(profile, st: State, vcc: float) -> dict[str, StagePoint]:
    """Every stage's point at battery ``vcc`` with the model's changes."""
    from faultwise.calc.tolerance import vbe_v

    out = {}
    for tr in profile.transistors:
        ch = st.transistors.get(tr.role, {})
        b = tr.bias
        me = ch.get("self")
        state = me.kind if me is not None and me.kind in ("open", "short") else ""
        leak = LEAKY_ICBO_MA[tr.material] if me is not None and me.kind == "leaky" else 0.0
        beta = tr.beta * (ch["beta"].factor if "beta" in ch else 1.0)
        out[tr.role] = stage_point(
            vcc, _res(b.top_ohm, ch.get("top_ohm"), open_ohm=1e12),
            _res(b.bottom_ohm, ch.get("bottom_ohm"), open_ohm=1e12),
            _res(b.emitter_ohm, ch.get("emitter_ohm")), _res(b.collector_ohm, ch.get("collector_ohm")),
            beta, vbe_v(tr.material).nominal, icbo_ma=leak, state=state)
    return out


# -------------------------------------------------------------------------------- inject

def _scaled(e: Expected, value: float) -> Expected:
    """The healthy band moved to ``value`` (relative spread kept; a zero healthy nominal: as is)."""
    if e.nominal and math.isfinite(value):
        k = value / e.nominal
        lo, hi = sorted((e.low * k, e.high * k))
        return replace(e, nominal=value, low=min(lo, value), high=max(hi, value))
    return replace(e, nominal=value, low=min(e.low, value), high=max(e.high, value))


def inject(profile, model: Mapping, healthy: Mapping[str, Expected], *,
           tube_table=None) -> dict[str, Expected]:
    """What every healthy expectation reads on the set with this fault (see the module doc)."""
    st = fold(parse_model(model))
    out = dict(healthy)
    values: dict[str, float] = {}
    if profile.line_powered:
        from faultwise.expect.fault_physics_line import line_readings

        values.update(line_readings(profile, st, healthy, tube_table))
    else:
        values.update(_battery_readings(profile, st, healthy, tube_table))
    # signal readings (both families)
    sig = st.signal * (1.0 if st.osc > 0 else 0.0) * st.avc * values.pop("_gain", 1.0)
    if "detector.avc_v" in healthy:
        values["detector.avc_v"] = healthy["detector.avc_v"].nominal * sig
    for end, k in st.tuning.items():
        name = f"tuning.align_{end}_khz"
        if name in healthy:
            values[name] = healthy[name].nominal * k
    if "if.peak_khz" in healthy and st.if_peak != 1.0:
        values["if.peak_khz"] = healthy["if.peak_khz"].nominal * st.if_peak
    if "oscillator.emitter_shift_v" in healthy:
        conv = values.pop("_converter_on", 1.0)
        values["oscillator.emitter_shift_v"] = healthy["oscillator.emitter_shift_v"].nominal * \
            min(st.osc, 1.5) * conv
    if st.voice_coil_short:
        for name in ("output.voice_coil_ohm", "output.reflected_ohm"):
            if name in healthy:
                values[name] = healthy[name].nominal * VOICE_COIL_SHORT
    if st.voice_coil_open:
        for name in ("output.voice_coil_ohm", "output.reflected_ohm"):
            if name in healthy:
                values[name] = OPEN_READ
    for name, v in values.items():
        if name in out and not name.startswith("_"):
            e = out[name]
            if abs(v - e.nominal) > 1e-12 * max(1.0, abs(e.nominal)):
                out[name] = _scaled(e, v)
    return out


def _battery_readings(profile, st: State, healthy, table=None) -> dict[str, float]:
    from faultwise.calc.bias import divider_bias
    from faultwise.calc.tolerance import vbe_v
    from faultwise.expect.output_pair import is_pair

    v = profile.battery_v or 0.0
    vb = v * st.profile_scale.get("battery_v", 1.0)
    out: dict[str, float] = {}
    if "supply.battery_v" in healthy:
        out["supply.battery_v"] = vb
    vcc = 0.0 if st.battery_open else vb
    points = transistor_points(profile, st, vcc)
    standby = healthy["supply.standby_ma"].nominal if "supply.standby_ma" in healthy else 0.0
    pair = is_pair(profile)
    for tr in profile.transistors:
        if pair and tr.role in ("output", "output2"):
            continue            # the pair's own model, below
        b = tr.bias
        good = divider_bias(v, b.top_ohm, b.bottom_ohm, b.emitter_ohm, b.collector_ohm,
                            tr.beta, vbe_v(tr.material).nominal)
        pt = points[tr.role]
        standby += pt.draw_ma - (good.ic_ma + good.divider_ma)
        for fld in ("vb_v", "ve_v", "ic_ma", "vc_v"):
            out[f"bias.{tr.role}.{fld}"] = getattr(pt, fld)
    if pair:
        from faultwise.expect.fault_physics_chart import pair_readings

        got, idle = pair_readings(profile, st, healthy, table, vcc)
        out.update(got)
        if "bias.output.idle_ma" in healthy:
            standby += idle - healthy["bias.output.idle_ma"].nominal
    if st.supply_leak and v:
        standby += LEAKY_SUPPLY_MA * vcc / v
    if "supply.standby_ma" in healthy:
        out["supply.standby_ma"] = max(standby, 0.0)
    conv = profile.transistor("converter")
    on = 1.0
    if conv is not None:
        pt = points["converter"]
        me = st.transistors.get("converter", {}).get("self")
        if pt.ic_ma < 0.05 * max(healthy.get("bias.converter.ic_ma").nominal, 1e-9) or \
                (me is not None and me.kind in ("open", "short")):
            on = 0.0
    out["_converter_on"] = on
    gain = 1.0 if vcc > 0 else 0.0
    for role in ("if", "if2", "if3"):
        me = st.transistors.get(role, {}).get("self")
        if me is not None and me.kind in ("open", "short"):
            gain = 0.0
    out["_gain"] = gain * on
    return out
