"""Output stage and speaker: reflected load, cathode bias, plate voltage, winding resistances."""

from __future__ import annotations

SPEAKER_MIN_FRACTION = 0.8
"""The impedance minimum in the working band is at least 80 % of rated (IEC 60268-5)."""
SPEAKER_MAX_FRACTION = 1.25
"""Just above that minimum the modulus rises to about 1.25 x rated (common practice, no source)."""
VOICE_COIL_DC_LOW, VOICE_COIL_DC, VOICE_COIL_DC_HIGH = 0.7, 0.75, 0.8
"""Voice-coil DC resistance is about 0.7-0.8 x the rated impedance (trade)."""
PRIMARY_DC_LOW, PRIMARY_DC, PRIMARY_DC_HIGH = 0.05, 0.10, 0.15
"""Small single-ended output transformer primary: DC resistance about 5-15 % of the reflected
load (winding losses of receiver output transformers; common practice, no source)."""


def reflected_ohm(turns_ratio: float, speaker_ohm: float) -> float:
    """Zp = (Np/Ns)^2 Zs (transformer impedance ratio)."""
    return turns_ratio ** 2 * speaker_ohm


def turns_ratio_for(primary_ohm: float, speaker_ohm: float) -> float:
    """Np/Ns = sqrt(Zp / Zs) (transformer impedance ratio)."""
    return (primary_ohm / speaker_ohm) ** 0.5


def cathode_v(cathode_ma: float, cathode_ohm: float) -> float:
    """Cathode bias Vk = Ik Rk (Ohm's law, textbook)."""
    return cathode_ma / 1000.0 * cathode_ohm


def primary_drop_v(plate_ma: float, primary_ohm: float) -> float:
    """DC drop in the output transformer primary: Ip R_primary (Ohm's law)."""
    return plate_ma / 1000.0 * primary_ohm


def voice_coil_ohm(rated_ohm: float, fraction: float = VOICE_COIL_DC) -> float:
    """Voice-coil DC resistance: about 0.75 x rated impedance (trade)."""
    return fraction * rated_ohm
