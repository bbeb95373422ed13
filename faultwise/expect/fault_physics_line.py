"""The broken line set's readings: supply, heaters and tube stages (see :mod:`faultwise.expect.fault_physics`)."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import replace
from typing import TYPE_CHECKING

from faultwise.expect.fault_models import SHORT_OHM
from faultwise.expect.fault_physics_chart import grid_current_factor, tube_stage_readings
from faultwise.expect.fault_state import SCREEN_OPEN_CURRENT

if TYPE_CHECKING:
    from faultwise.calc.rectifier import RectifierCircuit
    from faultwise.expect.context import Expected
    from faultwise.expect.fault_state import State
    from faultwise.profile.model import Profile
    from faultwise.profile.tubes import TubeTable

BLEED_MA = 0.01
"""Load left on the supply when every tube is cold: the meter and leakage (a token 10 uA)."""
CUTOFF_FRACTION = 1.0 / 8.0
"""An output pentode with its cathode resistor open biases itself near cut-off, the
cathode about an eighth of the screen voltage above the grid (small beam tubes, from memory)."""
ZERO_BIAS_CURRENT = 1.8
"""Cathode current of a small output pentode at zero grid bias over its rated current
(a shorted cathode resistor), about 1.5-2 (tube curves, from memory)."""


def _circuit(profile: Profile, st: State, table: TubeTable | None, *,
             load_ma: float | None = None, filter_load_ma: float | None = None
             ) -> RectifierCircuit:
    """The nominal RectifierCircuit of this profile with the model's value changes."""
    from faultwise.calc import rectifier as r
    from faultwise.expect.context import Context
    from faultwise.expect.supply import _rectifier_diode

    s, scale = profile.supply, st.profile_scale
    ctx = Context(profile, table)
    line_v = profile.mains_v
    src = line_v if profile.family == "series-string" else s.secondary_v
    src *= scale.get("secondary_v", 1.0)
    diode, _ = _rectifier_diode(ctx, s.circuit, src)
    if st.rect_drop != 1.0:
        k = st.rect_drop
        if diode.kind == "child":
            diode = replace(diode, child_k=diode.child_k / k ** 1.5)
        else:
            diode = replace(diode, n=diode.n * k, rs_ohm=diode.rs_ohm * k)
    return r.RectifierCircuit(
        circuit=s.circuit, source_rms_v=src, freq_hz=profile.mains_hz,
        surge_ohm=s.surge_ohm * scale.get("surge_ohm", 1.0), diode=diode,
        first_cap_uf=s.first_cap_uf * scale.get("first_cap_uf", 1.0),
        load_ma=s.load_ma * scale.get("load_ma", 1.0) if load_ma is None else load_ma,
        filter_ohm=max(s.filter_ohm * scale.get("filter_ohm", 1.0), 1e-3),
        second_cap_uf=s.second_cap_uf * scale.get("second_cap_uf", 1.0),
        filter_load_ma=(s.filter_load_ma * scale.get("filter_load_ma", 1.0)
                        if filter_load_ma is None else filter_load_ma))


def _into_short_v(c: RectifierCircuit, short_ohm: float = SHORT_OHM, steps: int = 400) -> tuple[float, float]:
    """(mean, peak-to-peak) voltage across a shorted first capacitor: the rectifier into Rs + short.

    Each instant solves vs = i (Rs + Rsh) + n_diodes * drop(i) by bisection.
    """
    from faultwise.calc.mains import peak_v

    vpk = peak_v(c.source_rms_v)
    r = c.surge_ohm + short_ohm
    vals = []
    for n in range(steps):
        vs = vpk * math.sin(2 * math.pi * (n + 0.5) / steps)
        if c.circuit != "half-wave":
            vs = abs(vs)
        if vs <= 0:
            vals.append(0.0)
            continue
        lo, hi = 0.0, vs / r
        for _ in range(60):
            mid = 0.5 * (lo + hi)
            if mid * r + c.diodes_in_path * c.diode.drop_v(mid) > vs:
                hi = mid
            else:
                lo = mid
        vals.append(lo * short_ohm)
    return sum(vals) / steps, max(vals) - min(vals)


def simulate_faulty(profile: Profile, st: State, table: TubeTable | None, *,
                    tubes_hot: bool) -> dict[str, float]:
    """rectifier_out_v, ripple_vpp, filtered_v and filter_drop_v of the faulty supply."""
    from faultwise.calc import rectifier as r

    s = profile.supply
    dead = dict(rectifier_out_v=0.0, ripple_vpp=0.0, filtered_v=0.0, filter_drop_v=0.0)
    if st.line_open or st.rect_open or st.surge_open or st.secondary_open:
        return dead
    if st.first_short:
        v, pp = _into_short_v(_circuit(profile, st, table))
        return dict(rectifier_out_v=v, ripple_vpp=pp, filtered_v=v, filter_drop_v=0.0)
    load = s.load_ma * st.profile_scale.get("load_ma", 1.0)
    fload = s.filter_load_ma * st.profile_scale.get("filter_load_ma", 1.0)
    if not tubes_hot:
        load, fload = 2 * BLEED_MA, BLEED_MA
    load += st.leak_first_ma + st.leak_second_ma      # a leaky capacitor draws hot or cold
    fload += st.leak_second_ma
    if st.filter_open:
        res = r.simulate(_circuit(profile, st, table, load_ma=max(load - fload, BLEED_MA),
                                  filter_load_ma=0.0))
        return dict(rectifier_out_v=res.rectifier_out_v, ripple_vpp=res.ripple_vpp,
                    filtered_v=0.0, filter_drop_v=res.rectifier_out_v)
    if st.second_short:
        rf = s.filter_ohm * st.profile_scale.get("filter_ohm", 1.0)
        v1 = 0.0
        extra = 0.0
        for _ in range(30):
            c = _circuit(profile, st, table, load_ma=max(load - fload, 0.0) + extra,
                         filter_load_ma=0.0)
            res = r.simulate(c)
            new = res.rectifier_out_v / (rf + SHORT_OHM) * 1000.0
            if abs(new - extra) < 1e-6 * max(new, 1.0):
                break
            extra = 0.5 * extra + 0.5 * new if v1 else new
            v1 = res.rectifier_out_v
        v1 = res.rectifier_out_v
        i = v1 / (rf + SHORT_OHM)
        return dict(rectifier_out_v=v1, ripple_vpp=res.ripple_vpp, filtered_v=i * SHORT_OHM,
                    filter_drop_v=i * rf)
    res = r.simulate(_circuit(profile, st, table, load_ma=load, filter_load_ma=fload))
    rf = s.filter_ohm * st.profile_scale.get("filter_ohm", 1.0)
    return dict(rectifier_out_v=res.rectifier_out_v, ripple_vpp=res.ripple_vpp,
                filtered_v=res.filtered_v, filter_drop_v=rf * fload / 1000.0)


def _heaters(profile: Profile, st: State, healthy: Mapping[str, Expected], out: dict[str, float]) -> set[str]:
    """Heater readings; returns the tube roles left cold."""
    roles = [t.role for t in profile.tubes]
    cold: set[str] = set()
    line = healthy["mains.line_v"].nominal if "mains.line_v" in healthy else profile.mains_v
    for role in st.heater_open:
        out[f"heater.{role}.cold_ohm"] = 1e9
    if profile.family == "series-string":
        string_open = st.line_open or st.dropper_open or bool(st.heater_open)
        if string_open:
            cold = set(roles)
            out["heaters.string_ma"] = 0.0
            for role in roles:
                open_here = role in st.heater_open and not st.line_open
                out[f"heater.{role}.v"] = line if open_here else 0.0
        return cold
    if st.line_open or st.winding_open:
        cold = set(roles)
        for name in ("heaters.winding_v", "heaters.total_a"):
            out[name] = 0.0
        for role in roles:
            out[f"heater.{role}.v"] = 0.0
        if st.winding_open and not st.line_open and profile.tube("rectifier") is not None:
            cold.discard("rectifier")       # a tube rectifier's filament has its own winding
            out["heater.rectifier.v"] = healthy["heater.rectifier.v"].nominal
        return cold
    if st.heater_open and "heaters.total_a" in healthy:
        lost = sum(t.heater_a for t in profile.tubes if t.role in st.heater_open)
        out["heaters.total_a"] = max(healthy["heaters.total_a"].nominal - lost, 0.0)
    return set(st.heater_open)


def line_readings(profile: Profile, st: State, healthy: Mapping[str, Expected],
                  table: TubeTable | None) -> dict[str, float]:
    """Every reading of a line set the model moves (plus '_gain' for the signal readings)."""
    out: dict[str, float] = {}
    cold = _heaters(profile, st, healthy, out)
    if st.line_open and profile.family == "transformer" and "supply.secondary_v" in healthy:
        out["supply.secondary_v"] = 0.0
    if "supply.secondary_v" in healthy and not st.line_open:
        k = 0.0 if st.secondary_open else st.profile_scale.get("secondary_v", 1.0)
        out["supply.secondary_v"] = healthy["supply.secondary_v"].nominal * k
    tube_rect = profile.supply.rectifier == "tube"
    st_rect = st
    if tube_rect and "rectifier" in cold:
        st_rect = replace(st, rect_open=True)
    others = {t.role for t in profile.tubes if t.role != "rectifier"}
    hot = bool(others - cold) and not st.line_open
    if "supply.rectifier_out_v" in healthy:
        out.update({f"supply.{k}": v for k, v in
                    simulate_faulty(profile, st_rect, table, tubes_hot=hot).items()})
    f_h = healthy["supply.filtered_v"].nominal if "supply.filtered_v" in healthy else None
    f_f = out.get("supply.filtered_v", f_h)
    ratio = (max(f_f, 0.0) / f_h) if f_h else 1.0

    def current(role: str) -> float:
        if role in cold or st.line_open:
            return 0.0
        screen = st.stage.get(role, {}).get("screen_ohm")
        starved = SCREEN_OPEN_CURRENT if screen is not None and screen.kind == "open" else 1.0
        return st.emission.get(role, 1.0) * ratio ** 1.5 * starved

    k_out = current("output") * grid_current_factor(profile, st, healthy, table, "output")
    _output_stage(profile, st, healthy, out, k_out, f_f)
    if "oscillator.grid_v" in healthy:
        osc = st.osc * (1.0 if current("converter") > 0 else 0.0) * \
            min(st.emission.get("converter", 1.0), 1.0) * ratio
        out["oscillator.grid_v"] = healthy["oscillator.grid_v"].nominal * osc
    gain = 1.0
    for role in ("converter", "if", "detector"):
        if profile.tube(role) is not None:
            gain *= min(current(role), 1.0) if role != "detector" else (0.0 if role in cold else 1.0)
    out["_gain"] = gain * (1.0 if st.osc > 0 else 0.0)
    r_h = healthy["supply.rectifier_out_v"].nominal if "supply.rectifier_out_v" in healthy else None
    r_f = out.get("supply.rectifier_out_v", r_h)
    first = (max(r_f, 0.0) / r_h) if r_h else ratio
    out.update(tube_stage_readings(profile, st, healthy, table, first_scale=first, scale=ratio,
                                   cold=cold))
    return out


def _output_stage(profile: Profile, st: State, healthy: Mapping[str, Expected], out: dict[str, float],
                  k_current: float, screen_v: float | None) -> None:
    t = profile.tube("output")
    if t is None:
        return
    if "output.primary_ohm" in healthy:
        if st.primary == "open":
            out["output.primary_ohm"] = 1e9
        elif st.primary == "short":
            out["output.primary_ohm"] = healthy["output.primary_ohm"].nominal * 0.05
    if st.primary == "open":
        k_current *= 0.1      # only the screen draws: about a tenth of the cathode current
    cath = None
    if t.cathode_ma is not None and t.cathode_ohm is not None:
        if st.cathode == "open":
            cath = (screen_v or 0.0) * CUTOFF_FRACTION if k_current > 0 else 0.0
            k_current = 0.0
        elif st.cathode == "short":
            k_current *= ZERO_BIAS_CURRENT
            cath = 0.0
        else:
            cath = t.cathode_ma * k_current * t.cathode_ohm * st.cathode_scale / 1000.0
        if "output.cathode_v" in healthy:
            out["output.cathode_v"] = cath
    if "output.plate_v" in healthy and "supply.rectifier_out_v" in out:
        bplus = out["supply.rectifier_out_v"]
        if st.primary == "open":
            out["output.plate_v"] = 0.0
            return
        # the healthy drop across the primary (the engine's own), scaled by the plate current
        drop = healthy["supply.rectifier_out_v"].nominal - healthy["output.plate_v"].nominal
        if st.primary == "short":
            drop *= 0.05
        out["output.plate_v"] = max(bplus - drop * k_current, 0.0)
