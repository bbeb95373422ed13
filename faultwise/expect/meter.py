"""What an ordinary AC meter reads of a waveform whose expectation is peak to peak.

Ripple at a capacitor-input filter is close to a sawtooth: a short charge at the peak and a
nearly linear discharge. A scope reads its peak to peak directly. A meter through a blocking
capacitor reads much less: a true-RMS meter Vpp / (2 sqrt 3) = 0.289 Vpp; an averaging meter
scaled for sine waves 1.111 x the mean rectified value Vpp / 4 = 0.278 Vpp. The band of
``supply.ripple_meter_vac`` spans both meters over the ripple's own band.
"""

from __future__ import annotations

import math

from faultwise.expect.context import Context, basis_num as _n

SINE_FORM_FACTOR = math.pi / (2.0 * math.sqrt(2.0))
"""RMS / mean rectified value of a sine, 1.1107: the scale of an averaging meter (textbook)."""
SAWTOOTH_RMS_PER_PP = 1.0 / (2.0 * math.sqrt(3.0))
"""RMS of a linear sawtooth per volt peak to peak, 0.2887 (textbook)."""
SAWTOOTH_MEAN_ABS_PER_PP = 0.25
"""Mean rectified value of a linear sawtooth (about its mean) per volt peak to peak (textbook)."""


def averaging_meter_reads(vpp: float) -> float:
    """Sine-scaled averaging meter on a sawtooth: 1.1107 x Vpp / 4."""
    return SINE_FORM_FACTOR * SAWTOOTH_MEAN_ABS_PER_PP * vpp


def true_rms_meter_reads(vpp: float) -> float:
    """True-RMS meter on a sawtooth: Vpp / (2 sqrt 3)."""
    return SAWTOOTH_RMS_PER_PP * vpp


def add_ripple_meter(ctx: Context) -> None:
    ripple = ctx.out.get("supply.ripple_vpp")
    if ripple is None:
        return
    lo, hi = averaging_meter_reads(ripple.low), true_rms_meter_reads(ripple.high)
    nom = averaging_meter_reads(ripple.nominal)
    ctx.add("supply.ripple_meter_vac", "Ripple at the first filter capacitor, on a meter's AC range",
            "supply", nom, lo, hi, "V",
            f"ripple {_n(ripple.nominal)} Vpp (band {_n(ripple.low)}-{_n(ripple.high)} Vpp) is "
            f"close to a sawtooth: an averaging meter reads 1.111 x Vpp/4 = {_n(nom)} V, a "
            f"true-RMS meter Vpp/(2 sqrt 3) = {_n(true_rms_meter_reads(ripple.nominal))} V; band "
            f"from the averaging reading of the low end to the true-RMS reading of the high end",
            typical=ripple.typical, absent=0.0)
