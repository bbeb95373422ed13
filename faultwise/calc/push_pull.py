"""Transistor push-pull output pairs: bias network, idle current, base voltages, midpoint.

Junctions follow the diode law, Vbe = Vbe1 + n Vt ln(I / 1 mA) (Shockley; textbooks), with
Vbe1 the junction's drop at 1 mA. Two circuits (magnitudes, to the common rail):

- transformer-coupled (class B, common emitter): a divider (top resistor from the supply,
  bottom resistor, thermistor or diode to common) feeds both bases through the driver
  transformer's secondary halves; each transistor: Vth - 2 Ib Rth = Vbe(Ic) + Ie Re.
- complementary (NPN over PNP, emitters joined through their resistors at the midpoint,
  speaker through a capacitor): the driver's collector current flows through the bias
  diodes between the two bases; base-to-base = the diodes' drops, and the pair's idle
  current solves Vbe_n(Ic) + Vbe_p(Ic) + Ic (Re1 + Re2) = base-to-base.

Fault models call the same functions with a part changed: ``top_ohm=math.inf`` (bias feed
open: no base bias, no idle current, crossover distortion), ``bottom_ohm=0`` or
``diodes=0`` (bias network shorted), ``driver_ma=0`` (driver dead).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

THERMAL_V = 0.025865
"""kT/q at 27 degC, volts (physical constants; SPICE's default temperature)."""
JUNCTION_N = 1.0
"""Emission coefficient of a transistor's base-emitter junction (ideal diode law; textbooks)."""
PAIR_AREA = 4.0
"""An output transistor's junction passes about 4 x the current of a small bias diode at the
same drop (larger die; common practice, no source): a bias diode's drop at 1 mA is the
transistor's plus Vt ln 4 (``diode_1ma_v`` of :func:`complementary_pair`)."""


@dataclass(frozen=True)
class PushPull:
    """The pair's DC point (magnitudes): per-transistor collector current, the pair's supply
    current, base bias (to emitter rail, or base to base), each emitter drop, the midpoint."""

    ic_ma: float
    idle_ma: float
    bases_v: float
    ve_v: float
    midpoint_v: float
    driver_ma: float


def junction_v(i_ma: float, vbe_1ma_v: float, n: float = JUNCTION_N) -> float:
    """Vbe = Vbe(1 mA) + n Vt ln(I / 1 mA) (Shockley diode law)."""
    return vbe_1ma_v + n * THERMAL_V * math.log(max(i_ma, 1e-12))


def _root(f: Callable[[float], float], hi: float) -> float:
    """Root of a falling f on [0, hi] by bisection on the log of the current (f(0+) > 0)."""
    lo_l, hi_l = math.log(1e-9), math.log(hi)
    if f(math.exp(lo_l)) <= 0:
        return 0.0
    for _ in range(60):
        mid = 0.5 * (lo_l + hi_l)
        if f(math.exp(mid)) > 0:
            lo_l = mid
        else:
            hi_l = mid
    return math.exp(0.5 * (lo_l + hi_l))


def transformer_pair(vcc_v: float, top_ohm: float, bottom_ohm: float, emitter_ohm: float,
                     beta: float, vbe_1ma_v: float) -> PushPull:
    """Vth - 2 (Ic/beta) Rth = Vbe(Ic) + Ic (1 + 1/beta) Re; Vth, Rth of the divider (Thevenin)."""
    if not math.isfinite(top_ohm) or bottom_ohm <= 0.0:
        vth, rth = 0.0, 0.0 if bottom_ohm <= 0.0 else bottom_ohm
    else:
        vth = vcc_v * bottom_ohm / (top_ohm + bottom_ohm)
        rth = top_ohm * bottom_ohm / (top_ohm + bottom_ohm)

    def f(ic: float) -> float:
        return (vth - 2.0 * ic / beta / 1000.0 * rth - junction_v(ic, vbe_1ma_v)
                - ic * (1.0 + 1.0 / beta) / 1000.0 * emitter_ohm)

    ic = _root(f, max(vcc_v / max(emitter_ohm, 0.1) * 1000.0, 1.0)) if vth > 0 else 0.0
    vb = vth - 2.0 * ic / beta / 1000.0 * rth
    ve = ic * (1.0 + 1.0 / beta) / 1000.0 * emitter_ohm
    return PushPull(ic, 2.0 * ic, max(vb, 0.0), ve, vcc_v, 0.0)


def complementary_pair(vcc_v: float, load_ohm: float, diodes: int, emitter_ohm: float,
                       beta: float, vbe_1ma_v: float, diode_1ma_v: float,
                       midpoint_fraction: float = 0.5) -> PushPull:
    """Id = (Vcc - Vmid - Vbe) / Rload; Vbb = N Vd(Id); Vbe_n(Ic) + Vbe_p(Ic) + 2 Ic Re = Vbb."""
    vmid = vcc_v * midpoint_fraction
    v_top = vmid + vbe_1ma_v   # the top base sits about one junction above the midpoint
    driver = max(vcc_v - v_top, 0.0) / load_ohm * 1000.0 if math.isfinite(load_ohm) else 0.0
    vbb = diodes * junction_v(driver, diode_1ma_v) if driver > 0 else 0.0

    def f(ic: float) -> float:
        vbe = junction_v(ic, vbe_1ma_v)
        return vbb - 2.0 * vbe - 2.0 * ic / 1000.0 * emitter_ohm

    ic = _root(f, max(vcc_v / max(emitter_ohm, 0.1) * 1000.0, 1.0)) if vbb > 0 else 0.0
    return PushPull(ic, ic, max(vbb, 0.0), ic / 1000.0 * emitter_ohm, vmid, driver)
