"""Tube stage DC: plate, screen, cathode and grid of one stage, solved for its cathode current.

The tube is a 3/2-power law anchored on one handbook typical operating point
(:class:`TypicalOperation`):

    Ik = emission x Ik0 x (D / D0)^1.5,   D = (Vgk - Vg0) + (Vsk - Vs0) / mu + D0,
    D0 = 1.5 Ik0 / gm_k                      (Child-Langmuir law; gm_k = gm x Ik0 / Ip0)

where Vs is the screen (pentode) or the plate (triode) and mu the amplification factor of
the grid against it. D0 makes the law's slope at the anchor equal the handbook mutual
conductance, so the law and the handbook agree at and near the typical operation. A pentagrid
converter has no single control grid (its oscillator grid biases itself): with ``gm_ma_v``
None, every electrode voltage scales together and Ik = Ik0 (Vsk / Vs0)^1.5.

The stage circuit: plate load from a plate supply node, screen resistor (0 = fed directly)
from a screen supply node, cathode resistor to chassis/B-, the grid held at ``grid_v`` by
its own network (AVC line, grid leak, cathode-bias return). :func:`solve_stage` finds the
cathode current by regula falsi (the law falls as Ik rises, through Rk and Rg2 feedback).

Fault models call the same function with a changed part: ``screen_ohm=math.inf`` (screen
resistor open), ``plate_ohm=math.inf`` (plate load open: the cathode current goes to the
screen), ``cathode_ohm=math.inf`` (cathode resistor open), ``emission=0.4`` (a worn tube),
``grid_v`` moved (a leaky coupling capacitor pulling the grid positive).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

KNEE_FRACTION = 0.2
"""A pentode's plate current holds until the plate falls to about 0.2 x the screen voltage
(the knee of the plate curves; common practice, no source)."""


@dataclass(frozen=True)
class TypicalOperation:
    """A handbook typical operating point: the anchor of the tube law (volts to cathode)."""

    plate_v: float
    screen_v: float          # 0 for a triode
    grid_v: float            # control grid to cathode (negative); 0 for a converter
    plate_ma: float
    screen_ma: float         # 0 for a triode
    mu: float                # grid against screen (pentode) or plate (triode)
    gm_ma_v: float | None    # mutual conductance; None: converter (self-biased, scales)
    source: str = ""

    @property
    def is_triode(self) -> bool:
        return self.screen_v <= 0.0

    @property
    def cathode_ma(self) -> float:
        return self.plate_ma + self.screen_ma


@dataclass(frozen=True)
class StageDC:
    """The stage's DC point: voltages to chassis/B-, currents in mA."""

    plate_v: float
    screen_v: float
    cathode_v: float
    grid_v: float
    cathode_ma: float
    plate_ma: float
    screen_ma: float


def anchor_drive_v(op: TypicalOperation) -> float:
    """D0 = 1.5 Ik0 / gm_k with gm_k = gm Ik0 / Ip0 (slope of the 3/2-power law at the anchor)."""
    if op.gm_ma_v is None:
        return 1.0
    gm_k = op.gm_ma_v * op.cathode_ma / op.plate_ma
    return 1.5 * op.cathode_ma / gm_k


def law_ma(op: TypicalOperation, grid_k_v: float, ref_k_v: float, emission: float = 1.0) -> float:
    """Ik = emission Ik0 (D/D0)^1.5, D = (Vgk - Vg0) + (Vref,k - Vref0)/mu + D0 (Child-Langmuir)."""
    ref0 = op.plate_v if op.is_triode else op.screen_v
    if ref_k_v <= 0.0:
        return 0.0          # nothing accelerates the electrons: no current (Child-Langmuir)
    if op.gm_ma_v is None:
        drive, d0 = max(ref_k_v, 0.0) / ref0, 1.0
    else:
        d0 = anchor_drive_v(op)
        drive = (grid_k_v - op.grid_v) + (ref_k_v - ref0) / op.mu + d0
    return emission * op.cathode_ma * (max(drive, 0.0) / d0) ** 1.5


def _drop_v(ma: float, ohm: float) -> float:
    """I R in volts; an open part (infinite ohms) passes no current, so 0 x inf counts as 0."""
    return 0.0 if ma <= 0.0 else ma / 1000.0 * ohm


def _electrodes(op: TypicalOperation, ik_ma: float, plate_supply_v: float,
                screen_supply_v: float, plate_ohm: float, screen_ohm: float,
                cathode_ohm: float, grid_v: float) -> StageDC:
    """Voltages and the plate/screen split for a trial cathode current."""
    vk = min(_drop_v(ik_ma, cathode_ohm), plate_supply_v)
    if op.is_triode:
        ip = ik_ma if math.isfinite(plate_ohm) else 0.0
        vp = plate_supply_v - _drop_v(ip, plate_ohm) if ip > 0 else (
            plate_supply_v if math.isfinite(plate_ohm) else vk)
        return StageDC(vp, 0.0, vk, grid_v, ip, ip, 0.0)
    share = op.plate_ma / op.cathode_ma if math.isfinite(plate_ohm) else 0.0
    ip = share * ik_ma
    vg2 = screen_supply_v
    for _ in range(4):  # the knee depends on the screen voltage, which depends on the split
        ig2 = ik_ma - ip
        vg2 = screen_supply_v - _drop_v(ig2, screen_ohm) if math.isfinite(screen_ohm) else vk
        vg2 = max(vg2, vk)
        knee = vk + KNEE_FRACTION * (vg2 - vk)
        if ip <= 0 or plate_supply_v - _drop_v(ip, plate_ohm) >= knee - 1e-9:
            break
        ip = max((plate_supply_v - knee) / plate_ohm * 1000.0, 0.0)
    ig2 = ik_ma - ip
    if not math.isfinite(screen_ohm):
        ig2, ip = 0.0, ik_ma if math.isfinite(plate_ohm) else 0.0
    vp = plate_supply_v - _drop_v(ip, plate_ohm) if math.isfinite(plate_ohm) else vk
    return StageDC(vp, vg2, vk, grid_v, ip + ig2, ip, ig2)


def _root_ma(residual: Callable[[float], float], hi: float) -> float:
    """The root of a falling residual on [0, hi]: regula falsi with the Illinois step."""
    lo, f_lo = 0.0, residual(0.0)
    if hi <= 0.0 or f_lo <= 0.0:
        return 0.0
    f_hi = residual(hi)
    side = 0
    for _ in range(60):
        x = hi - f_hi * (hi - lo) / (f_hi - f_lo)
        fx = residual(x)
        if abs(fx) <= 1e-6 * max(hi, 1e-6) or hi - lo <= 1e-9:
            return x
        if fx > 0:
            lo, f_lo = x, fx
            if side == 1:
                f_hi *= 0.5
            side = 1
        else:
            hi, f_hi = x, fx
            if side == -1:
                f_lo *= 0.5
            side = -1
    return x


def solve_stage(op: TypicalOperation, plate_supply_v: float, plate_ohm: float,
                cathode_ohm: float, grid_v: float, screen_supply_v: float | None = None,
                screen_ohm: float = 0.0, emission: float = 1.0) -> StageDC:
    """Ik = law(Vg - Ik Rk, Vs(Ik) - Ik Rk), Vs = supply - I Rload (Child-Langmuir, Ohm's law)."""
    s_supply = plate_supply_v if screen_supply_v is None else screen_supply_v

    def residual(ik: float) -> float:
        e = _electrodes(op, ik, plate_supply_v, s_supply, plate_ohm, screen_ohm, cathode_ohm,
                        grid_v)
        ref = e.plate_v if op.is_triode else e.screen_v
        return law_ma(op, grid_v - e.cathode_v, ref - e.cathode_v, emission) - ik

    if (op.is_triode and not math.isfinite(plate_ohm)) or not math.isfinite(cathode_ohm) \
            or (not op.is_triode and not math.isfinite(screen_ohm)
                and not math.isfinite(plate_ohm)):
        ik = 0.0
    else:
        ik = _root_ma(residual, max(residual(0.0), 0.0))
    return _electrodes(op, ik, plate_supply_v, s_supply, plate_ohm, screen_ohm, cathode_ohm,
                       grid_v)

