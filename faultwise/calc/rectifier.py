"""Rectifier and capacitor-input filter, solved as a circuit (time-stepped to steady state).

The circuit (the same one the ngspice reference test builds):

    source --Rs--|>|--+---- Rf ----+
                      |            |
                      C1   I1      C2   I2        I1 = load - filter_load, I2 = filter_load
                      |            |
    return -----------+------------+

* source: a sine of ``source_rms_v``. Half-wave: one leg. Full-wave (centre-tapped): two
  legs in antiphase, each ``source_rms_v`` (each half of the winding) with its own Rs and
  rectifier. Bridge: one winding of ``source_rms_v`` through Rs and two rectifiers in series.
* Rs (``surge_ohm``): the surge resistor, plus winding resistance for transformer sets.
* rectifier: a forward characteristic, no reverse current. Vacuum diode: Child-Langmuir
  i = K v^1.5 with K fitted to the tube data's drop at its stated current. Silicon and
  selenium: a junction i = Is (exp(v / (n Vt)) - 1) with series resistance.
* the load: constant-current sinks (I1 at C1, I2 at C2). A receiver's tube or transistor
  stages draw nearly constant current over the range of B+ of interest, and a sink is what
  the profile states (``load_ma``, ``filter_load_ma``). Chosen over a resistor; the
  ngspice oracle uses the same sinks.

Integration: trapezoidal rule on both capacitors, with the rectifier current solved
implicitly at every step through a precomputed table (current as a function of the
source-minus-predicted-C1 voltage), so a step costs one bisection. The periodic steady state is
found by Newton's method on the cycle map (C1 and C2 at the start of a cycle -> at its end),
with a finite-difference Jacobian, until a cycle changes neither by more than 1e-7 of the
source peak. About 1-2 ms per simulation; results are cached per circuit.

Bands: :func:`supply_bands` finds, with one simulation per toleranced input, which end of
each input lowers each output, then simulates each output's lowest and highest corner.
"""

from __future__ import annotations

import math
from bisect import bisect_right
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from functools import lru_cache

from faultwise.calc.mains import peak_v
from faultwise.calc.tolerance import Spread

VT_V = 0.025852
"""Thermal voltage kT/q at 300 K (physics constant)."""
SELENIUM_CELL_RMS_V = 26.0
"""One selenium plate per about 26 V RMS of applied AC (trade, older plates)."""

CIRCUITS = ("half-wave", "full-wave", "bridge")


@dataclass(frozen=True)
class Diode:
    """Forward characteristic of one rectifier element (``child`` or ``junction``)."""

    kind: str
    label: str
    child_k: float = 0.0     # A / V^1.5, vacuum diode
    is_a: float = 0.0        # saturation current, junction
    n: float = 1.0           # emission coefficient, junction (cells in series multiply it)
    rs_ohm: float = 0.0      # series resistance, junction

    def drop_v(self, current_a: float) -> float:
        """Forward drop at ``current_a``: (i/K)^(2/3), or n Vt ln(1 + i/Is) + i Rs."""
        if current_a <= 0.0:
            return 0.0
        if self.kind == "child":
            return (current_a / self.child_k) ** (2.0 / 3.0)
        return self.n * VT_V * math.log1p(current_a / self.is_a) + current_a * self.rs_ohm


def tube_diode(drop_v: float, at_ma: float, label: str = "tube rectifier") -> Diode:
    """Vacuum diode, Child-Langmuir i = K v^1.5, K = I / V^1.5 at the tube data's stated drop."""
    k = (at_ma / 1000.0) / drop_v ** 1.5
    return Diode("child", f"{label} (Child-law fit to {drop_v:g} V at {at_ma:g} mA)", child_k=k)


def silicon_diode() -> Diode:
    """Silicon rectifier: Is 10 nA, n 1.7, about 0.7 V at 100 mA (textbook junction values)."""
    return Diode("junction", "silicon diode (Is 10 nA, n 1.7: 0.71 V at 100 mA)", is_a=10e-9, n=1.7)


def selenium_stack(source_rms_v: float) -> Diode:
    """Selenium stack: one cell per ~26 V RMS, each 0.5 V at 100 mA plus 5 ohm (trade)."""
    cells = max(1, math.ceil(source_rms_v / SELENIUM_CELL_RMS_V))
    return Diode("junction", f"selenium stack of {cells} cells (about 1 V per cell at 100 mA, trade)",
                 is_a=6.3e-6, n=2.0 * cells, rs_ohm=5.0 * cells)


@dataclass(frozen=True)
class RectifierCircuit:
    """Everything the simulation needs; hashable so results can be cached."""

    circuit: str
    source_rms_v: float
    freq_hz: float
    surge_ohm: float
    diode: Diode
    first_cap_uf: float
    load_ma: float
    filter_ohm: float
    second_cap_uf: float
    filter_load_ma: float

    @property
    def diodes_in_path(self) -> int:
        return 2 if self.circuit == "bridge" else 1


@dataclass(frozen=True)
class RectifierResult:
    """Periodic steady state: DC and ripple at C1 and C2, peak rectifier current."""

    rectifier_out_v: float
    ripple_vpp: float
    filtered_v: float
    filtered_ripple_vpp: float
    peak_current_ma: float
    cycles: int


def ripple_bound_vpp(load_ma: float, cap_uf: float, freq_hz: float, circuit: str) -> float:
    """Upper bound on ripple: I/(f C) half-wave, I/(2 f C) full-wave and bridge (electronics texts)."""
    pulses = 1 if circuit == "half-wave" else 2
    return (load_ma / 1000.0) / (pulses * freq_hz * cap_uf * 1e-6)


def _path_table(c: RectifierCircuit, k_eff: float) -> tuple[list[float], list[float]]:
    """(s values, currents) with s = i Rs + drops(i) + k_eff i, increasing; s <= 0 -> 0 A."""
    vpk = peak_v(c.source_rms_v)
    i_max = 2.0 * vpk / max(c.surge_ohm + c.diode.rs_ohm * c.diodes_in_path, 0.5)
    points = 600
    currents = [0.0] + [i_max * 10.0 ** (-9.0 + 9.0 * j / (points - 1)) for j in range(points)]
    nd = c.diodes_in_path
    s = [i * c.surge_ohm + nd * c.diode.drop_v(i) + k_eff * i for i in currents]
    return s, currents


def _solve_current(s: float, s_tab: list[float], i_tab: list[float]) -> float:
    """Rectifier current for the table argument s (linear interpolation, linear beyond the end)."""
    if s <= 0.0:
        return 0.0
    j = bisect_right(s_tab, s)
    if j >= len(s_tab):
        j = len(s_tab) - 1
    s0, s1 = s_tab[j - 1], s_tab[j]
    i0, i1 = i_tab[j - 1], i_tab[j]
    return i0 + (i1 - i0) * (s - s0) / (s1 - s0)


@lru_cache(maxsize=256)
def simulate(c: RectifierCircuit, steps_per_cycle: int = 400, max_cycles: int = 400) -> RectifierResult:
    """Time-step the rectifier and filter to periodic steady state (trapezoidal rule)."""
    if c.circuit not in CIRCUITS:
        raise ValueError(f"unknown rectifier circuit {c.circuit!r}")
    dt = 1.0 / (c.freq_hz * steps_per_cycle)
    c1dt = c.first_cap_uf * 1e-6 / dt
    c2dt = c.second_cap_uf * 1e-6 / dt
    g2 = 0.5 / c.filter_ohm
    i2 = c.filter_load_ma / 1000.0
    i1 = c.load_ma / 1000.0 - i2
    den2 = c2dt + g2
    alpha = g2 / den2
    den1 = c1dt + g2 * (1.0 - alpha)
    k_eff = 0.5 / den1
    s_tab, i_tab = _path_table(c, k_eff)
    vpk = peak_v(c.source_rms_v)
    w = 2.0 * math.pi / steps_per_cycle
    # Full-wave and bridge both see |v|: only one leg (or one diagonal) conducts at a time.
    if c.circuit == "half-wave":
        src = [vpk * math.sin(w * (n + 1)) for n in range(steps_per_cycle)]
    else:
        src = [abs(vpk * math.sin(w * (n + 1))) for n in range(steps_per_cycle)]

    def one_cycle(v1: float, v2: float, ip: float, record: bool):
        trace1, trace2, peak = [], [], 0.0
        for vs in src:
            d = v1 - v2
            beta0 = (c2dt * v2 + g2 * d - i2) / den2
            a = (c1dt * v1 + 0.5 * ip - i1 - g2 * d + g2 * beta0) / den1
            i = _solve_current(vs - a, s_tab, i_tab)
            v1 = a + k_eff * i
            v2 = alpha * v1 + beta0
            ip = i
            if record:
                trace1.append(v1)
                trace2.append(v2)
                peak = max(peak, i)
        return v1, v2, ip, trace1, trace2, peak

    def residual(v1: float, v2: float) -> tuple[float, float]:
        n1, n2, _, _, _, _ = one_cycle(v1, v2, 0.0, False)
        return n1 - v1, n2 - v2

    drop_guess = c.diodes_in_path * c.diode.drop_v(3.0 * c.load_ma / 1000.0)
    v1 = max(vpk - drop_guess - 3.0 * (c.load_ma / 1000.0) * c.surge_ohm, 0.1 * vpk)
    v2 = v1 - c.filter_ohm * i2
    tol = 1e-7 * vpk
    h = 1e-4 * vpk
    cycles = 0
    for _ in range(max_cycles // 3):
        f1, f2 = residual(v1, v2)
        cycles += 1
        if abs(f1) < tol and abs(f2) < tol:
            break
        # Newton on the cycle map x -> P(x) (x = C1, C2 at the start of a cycle), Jacobian by
        # finite differences; the map is nearly linear, so two or three steps suffice.
        a1, a2 = residual(v1 + h, v2)
        b1, b2 = residual(v1, v2 + h)
        cycles += 2
        j11, j21 = (a1 - f1) / h, (a2 - f2) / h
        j12, j22 = (b1 - f1) / h, (b2 - f2) / h
        det = j11 * j22 - j12 * j21
        if det == 0.0:
            v1, v2 = v1 + f1, v2 + f2
            continue
        d1 = (-f1 * j22 + f2 * j12) / det
        d2 = (-j11 * f2 + j21 * f1) / det
        limit = 0.5 * vpk
        scale = min(1.0, limit / max(abs(d1), abs(d2), 1e-30))
        v1, v2 = v1 + scale * d1, v2 + scale * d2
    ip = 0.0  # a cycle starts at the source's zero crossing: no rectifier conducts
    _, _, _, t1, t2, peak = one_cycle(v1, v2, ip, True)
    return RectifierResult(
        rectifier_out_v=sum(t1) / len(t1),
        ripple_vpp=max(t1) - min(t1),
        filtered_v=sum(t2) / len(t2),
        filtered_ripple_vpp=max(t2) - min(t2),
        peak_current_ma=peak * 1000.0,
        cycles=cycles + 1,
    )


OUTPUTS = ("rectifier_out_v", "ripple_vpp", "filtered_v")


@dataclass(frozen=True)
class SupplyBand:
    """Worst-case band of one simulated output, with the corner that gives each end."""

    output: str
    nominal: float
    low: float
    high: float
    low_corner: tuple[tuple[str, float], ...]
    high_corner: tuple[tuple[str, float], ...]


def supply_bands(make: Callable[[dict[str, float]], RectifierCircuit],
                 spreads: Mapping[str, Spread]) -> dict[str, SupplyBand]:
    """Worst case of DC, ripple and filtered DC over the tolerance box, by sensitivity corners.

    One simulation per input at its high end (others nominal) gives the sign of each output's
    dependence on it; each output's low corner takes every input at the end that lowers it,
    its high corner the opposite. Exact when each output is monotone in each input over the
    box (the test suite checks that against all 2^n corners); 1 + n + up to 6 simulations
    instead of 2^n.
    """
    nominal_values = {k: s.nominal for k, s in spreads.items()}
    base = simulate(make(nominal_values))
    signs: dict[str, dict[str, int]] = {o: {} for o in OUTPUTS}
    for key, s in spreads.items():
        if s.is_fixed:
            continue
        moved = simulate(make(dict(nominal_values, **{key: s.high})))
        for o in OUTPUTS:
            signs[o][key] = 1 if getattr(moved, o) >= getattr(base, o) else -1
    out: dict[str, SupplyBand] = {}
    for o in OUTPUTS:
        low_c = {k: (s.low if signs[o].get(k, 1) > 0 else s.high) for k, s in spreads.items()}
        high_c = {k: (s.high if signs[o].get(k, 1) > 0 else s.low) for k, s in spreads.items()}
        lo, hi = getattr(simulate(make(low_c)), o), getattr(simulate(make(high_c)), o)
        out[o] = SupplyBand(o, getattr(base, o), min(lo, hi), max(lo, hi),
                            tuple(low_c.items()), tuple(high_c.items()))
    return out
