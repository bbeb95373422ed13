"""Transistor stage DC point: voltage-divider bias with an emitter resistor.

All voltages are magnitudes measured from the common (emitter-side) rail; a PNP stage on a
negative supply reads the same numbers negative to chassis.
"""

from __future__ import annotations

from dataclasses import dataclass

VCE_SAT_V = 0.2
"""Collector-emitter voltage of a saturated small-signal transistor, about 0.1-0.3 V (textbooks)."""


@dataclass(frozen=True)
class DividerBias:
    """The stage DC point (magnitudes); divider_ma is the current in the top resistor."""

    vth_v: float
    rth_ohm: float
    vb_v: float
    ve_v: float
    vc_v: float
    ib_ma: float
    ic_ma: float
    ie_ma: float
    divider_ma: float
    saturated: bool


def thevenin_v(vcc_v: float, top_ohm: float, bottom_ohm: float) -> float:
    """Vth = Vcc R2 / (R1 + R2) (voltage divider)."""
    return vcc_v * bottom_ohm / (top_ohm + bottom_ohm)


def parallel_ohm(a_ohm: float, b_ohm: float) -> float:
    """R1 || R2 = R1 R2 / (R1 + R2)."""
    return a_ohm * b_ohm / (a_ohm + b_ohm)


def divider_bias(vcc_v: float, top_ohm: float, bottom_ohm: float, emitter_ohm: float,
                 collector_ohm: float, beta: float, vbe_v: float) -> DividerBias:
    """Ib = (Vth - Vbe) / (Rth + (beta+1) Re), Ic = beta Ib, Ve = Ie Re (textbooks: Thevenin divider)."""
    vth = thevenin_v(vcc_v, top_ohm, bottom_ohm)
    rth = parallel_ohm(top_ohm, bottom_ohm)
    ib = max(vth - vbe_v, 0.0) / (rth + (beta + 1.0) * emitter_ohm)
    ic, ie = beta * ib, (beta + 1.0) * ib
    ve = ie * emitter_ohm
    vc = vcc_v - ic * collector_ohm
    saturated = vc < ve + VCE_SAT_V
    if saturated:  # the collector cannot fall below the emitter: clamp at saturation
        vc = ve + VCE_SAT_V
        ic = (vcc_v - vc) / collector_ohm
    vb = ve + vbe_v if ib > 0.0 else vth
    return DividerBias(vth_v=vth, rth_ohm=rth, vb_v=vb, ve_v=ve, vc_v=vc, ib_ma=ib * 1e3,
                       ic_ma=ic * 1e3, ie_ma=ie * 1e3,
                       divider_ma=(vcc_v - vb) / top_ohm * 1e3, saturated=saturated)
