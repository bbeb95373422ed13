"""Antenna lengths."""

from __future__ import annotations


def half_wave_m(f_mhz: float) -> float:
    """Electrical half wavelength: 150 / f(MHz) m (amateur handbooks)."""
    return 150.0 / f_mhz


def practical_half_wave_m(f_mhz: float) -> float:
    """Practical half-wave wire, end effect included: 143 / f(MHz) m (468/f ft, amateur handbooks)."""
    return 143.0 / f_mhz
