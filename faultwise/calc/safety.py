"""Leakage ("hot chassis") check on a line-connected set."""

from __future__ import annotations

import math

NETWORK_OHM = 1500.0
"""Measuring network: 1500 ohm shunted by 0.15 uF (ANSI C39.5, as quoted in service literature)."""
NETWORK_UF = 0.15
LIMIT_MA = 0.5
"""Usual limit for two-wire cord-connected equipment: 0.5 mA (UL 101, from memory)."""


def leakage_limit_v(limit_ma: float = LIMIT_MA, network_ohm: float = NETWORK_OHM) -> float:
    """Voltage limit across the network: V = I R = 0.5 mA x 1500 ohm = 0.75 V RMS."""
    return limit_ma / 1000.0 * network_ohm


def network_impedance_ohm(freq_hz: float, r_ohm: float = NETWORK_OHM, c_uf: float = NETWORK_UF) -> float:
    """|Z| of R || C: R / sqrt(1 + (2 pi f R C)^2)."""
    x = 2.0 * math.pi * freq_hz * r_ohm * c_uf * 1e-6
    return r_ohm / math.sqrt(1.0 + x * x)


def leakage_ma(reading_v: float, freq_hz: float) -> float:
    """Leakage current implied by a reading across the network: I = V / |Z|."""
    return reading_v / network_impedance_ohm(freq_hz) * 1000.0
