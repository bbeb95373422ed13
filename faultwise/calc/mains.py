"""Line (mains) voltage ranges and RMS/peak arithmetic."""

from __future__ import annotations

import math

from faultwise.calc.tolerance import Spread


def peak_v(rms_v: float) -> float:
    """Vpk = sqrt(2) x Vrms for a sine wave (any electrical text)."""
    return math.sqrt(2.0) * rms_v


def line_range_v(nominal_v: float) -> Spread:
    """Normal service-voltage range for a line nominal.

    120 V: ANSI C84.1 Range A, 114-126 V. 230 V: IEC 60038, +-10 % (207-253 V).
    Other nominals, by the same documents' proportions: the 100-130 V class (110, 115,
    117, 125 V) +-5 % as ANSI C84.1 Range A; everything else +-10 % as IEC 60038.
    """
    if nominal_v == 120:
        return Spread(120.0, 114.0, 126.0, "line 114-126 V (ANSI C84.1 Range A)")
    if nominal_v == 230:
        return Spread(230.0, 207.0, 253.0, "line 207-253 V (IEC 60038, +-10 %)")
    if 100 <= nominal_v <= 130:
        low, high = nominal_v * 0.95, nominal_v * 1.05
        return Spread(nominal_v, low, high,
                      f"line {low:.0f}-{high:.0f} V (+-5 %, the ANSI C84.1 Range A proportion)")
    low, high = nominal_v * 0.9, nominal_v * 1.1
    return Spread(nominal_v, low, high,
                  f"line {low:.0f}-{high:.0f} V (+-10 %, the IEC 60038 proportion)")
