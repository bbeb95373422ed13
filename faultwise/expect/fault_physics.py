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
  is a half-wave (or full-wave) rectifier into Rs + short
  (:func:`faultwise.expect.fault_physics_line._into_short_v`). When the
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
* Transistor stages: :func:`~faultwise.expect.fault_state.stage_point` (the divider-bias Thevenin solution of
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
from dataclasses import replace
from typing import TYPE_CHECKING

from faultwise.expect.expected import Expected
from faultwise.expect.fault_models import LEAKY_SUPPLY_MA, parse_model
from faultwise.expect.fault_physics_chart import pair_readings
from faultwise.expect.fault_physics_line import line_readings
from faultwise.expect.fault_state import (OPEN_READ, VOICE_COIL_SHORT, State, fold,
                                          transistor_points)

if TYPE_CHECKING:
    from faultwise.profile.model import Profile
    from faultwise.profile.tubes import TubeTable


def _scaled(e: Expected, value: float) -> Expected:
    """The healthy band moved to ``value`` (relative spread kept; a zero healthy nominal: as is)."""
    if e.nominal and math.isfinite(value):
        k = value / e.nominal
        lo, hi = sorted((e.low * k, e.high * k))
        return replace(e, nominal=value, low=min(lo, value), high=max(hi, value))
    return replace(e, nominal=value, low=min(e.low, value), high=max(e.high, value))


def inject(profile: Profile, model: Mapping[str, object], healthy: Mapping[str, Expected], *,
           tube_table: TubeTable | None = None) -> dict[str, Expected]:
    """What every healthy expectation reads on the set with this fault (see the module doc)."""
    st = fold(parse_model(model))
    out = dict(healthy)
    values: dict[str, float] = {}
    if profile.line_powered:
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


def _battery_readings(profile: Profile, st: State, healthy: Mapping[str, Expected],
                      table: TubeTable | None = None) -> dict[str, float]:
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
