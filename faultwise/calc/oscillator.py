"""Local oscillator health: trade ranges for the DC signs of oscillation."""

from __future__ import annotations

GRID_BIAS_V = (3.0, 8.0, 14.0)
"""Tube converter oscillator grid, grid-leak bias when oscillating: a few to about 14 V
negative (trade; handbook typical operation is about 20 kohm x 0.5 mA = 10 V, from memory)."""
EMITTER_SHIFT_V = (0.05, 0.15, 0.4)
"""Transistor converter: emitter voltage change when the oscillator is stopped, about
0.05-0.4 V (trade)."""
EMITTER_SHIFT_ABSENT_V = 0.02
"""No change at all (below about 20 mV, a meter's resolution) means it was not oscillating."""


def grid_leak_bias_v(grid_leak_ohm: float, grid_ma: float) -> float:
    """Grid-leak bias: V = Rg x Ig (Ohm's law)."""
    return grid_leak_ohm * grid_ma / 1000.0
