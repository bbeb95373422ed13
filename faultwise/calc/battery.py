"""Battery of a transistor portable: cells and usable range."""

from __future__ import annotations

CELL_V = 1.5
"""Nominal voltage of a primary dry cell (trade)."""
CELL_FRESH_V = 1.6
"""A fresh cell reads about 1.6 V (trade)."""
CELL_END_V = 1.1
"""A cell is spent at about 1.0-1.1 V: a 9 V battery is usable down to about 6.5-7 V (trade)."""
CELL_HEALTHY_V = 1.35
"""A cell in good health under load stays above about 1.35 V (trade)."""


def cells(battery_v: float) -> int:
    """Number of 1.5 V cells: round(V / 1.5), at least one."""
    return max(1, round(battery_v / CELL_V))


def usable_range_v(battery_v: float) -> tuple[float, float]:
    """Usable range: cells x 1.1 V (spent) to cells x 1.6 V (fresh) (trade)."""
    n = cells(battery_v)
    return n * CELL_END_V, n * CELL_FRESH_V


def healthy_range_v(battery_v: float) -> tuple[float, float]:
    """A battery in good health: cells x 1.35 V to cells x 1.6 V (trade)."""
    n = cells(battery_v)
    return n * CELL_HEALTHY_V, n * CELL_FRESH_V
