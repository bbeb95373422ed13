"""Diode detector: load time constant against the IF period and the modulation."""

from __future__ import annotations

import math


def time_constant_us(r_ohm: float, c_pf: float) -> float:
    """tau = R C."""
    return r_ohm * c_pf * 1e-12 * 1e6


def carrier_limit_us(if_khz: float) -> float:
    """Lower limit: RC >> 1 / omega_c = 1 / (2 pi f_IF) (communication textbooks)."""
    return 1.0 / (2.0 * math.pi * if_khz * 1e3) * 1e6


def rc_limit_us(audio_hz: float, m: float) -> float:
    """No diagonal clipping: RC <= sqrt(1 - m^2) / (omega_m m) (communication textbooks)."""
    return math.sqrt(1.0 - m * m) / (2.0 * math.pi * audio_hz * m) * 1e6


def max_modulation(tau_us: float, audio_hz: float) -> float:
    """Deepest modulation followed without diagonal clipping: m = 1 / sqrt(1 + (omega_m RC)^2)."""
    x = 2.0 * math.pi * audio_hz * tau_us * 1e-6
    return 1.0 / math.sqrt(1.0 + x * x)


def max_audio_hz(tau_us: float, m: float) -> float:
    """Highest audio frequency followed at modulation m: f = sqrt(1 - m^2) / (2 pi m RC)."""
    return math.sqrt(1.0 - m * m) / (2.0 * math.pi * m * tau_us * 1e-6)


def if_bandwidth_khz(f0_khz: float, q: float) -> float:
    """Bandwidth of a tuned circuit: B = f0 / Q."""
    return f0_khz / q


TUBE_LOAD_OHM, TUBE_LOAD_PF = 470e3, 100.0
"""Typical tube-set diode load: about 470 kohm (volume control) with 100 pF of IF bypass (trade)."""
TRANSISTOR_LOAD_OHM, TRANSISTOR_LOAD_PF = 4.7e3, 10e3
"""Typical transistor-set diode load: about 4.7 kohm (volume control) with 10 nF (trade)."""
LOAD_R_TOL, LOAD_C_TOL = 0.20, 0.10
"""Volume controls +-20 %, small mica/ceramic capacitors +-10 % (trade)."""
AUDIO_TOP_HZ = 5000.0
"""Highest audio frequency of interest on AM broadcast: about 5 kHz (trade)."""
MODULATION_CHECK = 0.8
"""Modulation depth at which the detector's audio limit is stated (trade: peaks of about 80 %)."""
AVC_TUBE_V = (2.0, 5.0, 12.0)
"""Tube-set AVC line on a strong local station: a few volts negative, about 2-12 V (trade)."""
AVC_TRANSISTOR_V = (0.1, 0.3, 0.8)
"""Transistor-set detector DC (AVC) on a strong local station: about 0.1-0.8 V (trade)."""
IF_Q = (45.0, 60.0, 75.0)
"""Loaded Q of a broadcast IF transformer: about 45-75 (trade; strips pass about 6-10 kHz)."""
IF_ALIGN_TOL = 0.005
"""An IF strip counts as on frequency within +-0.5 % of its nominal IF (trade)."""
