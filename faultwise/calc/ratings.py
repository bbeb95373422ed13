"""Replacement part ratings computed from the set: filter capacitor voltage and capacitance.

A replacement electrolytic must survive the highest voltage it can see, which is the
no-load peak: before the tubes warm (a directly heated or solid-state rectifier conducts
first) or with a tube pulled, the capacitor charges to the peak of its source with nothing
drawing current. That peak is taken at the top of the line band, and on a transformer set
with the winding's no-load rise (the secondary is rated under load). The rating is that
peak times a stated margin, rounded up to the next common rating.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

ELECTROLYTIC_RATINGS_V = (6.3, 10.0, 16.0, 25.0, 35.0, 50.0, 63.0, 100.0, 160.0, 200.0, 250.0,
                          350.0, 400.0, 450.0, 500.0, 600.0)
"""Common aluminium electrolytic working-voltage ratings (trade, from memory of parts catalogues)."""

RATING_MARGIN = 1.2
"""Rating at least 1.2 x the worst no-load peak: the usual 20 % derating headroom for
electrolytics (common practice, no source); it also covers a line surge above the band."""

TRANSFORMER_NO_LOAD_RISE = 1.1
"""A small power transformer's secondary rises about 10 % from rated load to no load
(regulation of receiver-size transformers, trade, from memory)."""


@dataclass(frozen=True)
class CapRating:
    """The least safe working-voltage rating and how it was reached."""

    peak_v: float          # no-load peak at the top of the line band
    required_v: float      # peak_v x margin
    rating_v: float        # next common rating at or above required_v
    margin: float


def no_load_peak_v(source_rms_v: float, no_load_rise: float = 1.0) -> float:
    """Vpk = sqrt(2) x Vrms x no-load rise (no current: no rectifier or surge-resistor drop)."""
    return math.sqrt(2.0) * source_rms_v * no_load_rise


def next_rating_v(volts: float, ratings: tuple[float, ...] = ELECTROLYTIC_RATINGS_V) -> float:
    """The smallest common rating at or above ``volts``; ValueError above the largest."""
    for rating in ratings:
        if rating >= volts - 1e-9:
            return rating
    raise ValueError(f"{volts:.0f} V is above the largest common electrolytic rating "
                     f"({ratings[-1]:g} V): use capacitors in series with balancing resistors")


def filter_cap_rating(source_rms_high_v: float, no_load_rise: float = 1.0,
                      margin: float = RATING_MARGIN) -> CapRating:
    """Rating >= sqrt(2) x Vrms(top of line band) x no-load rise x margin, rounded up."""
    peak = no_load_peak_v(source_rms_high_v, no_load_rise)
    required = peak * margin
    return CapRating(peak, required, next_rating_v(required), margin)
