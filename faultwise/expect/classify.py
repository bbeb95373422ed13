"""Classify a reading against its expected band: absent, low, normal or high."""

from __future__ import annotations

from typing import TYPE_CHECKING

from faultwise.core.errors import InputError
from faultwise.core.vocabulary import MEASURE_OUTCOMES

if TYPE_CHECKING:
    from faultwise.expect.context import Expected


def classify(value: float, expected: Expected) -> str:
    """|v| <= absent_below (when > 0) -> absent; |v| < low -> low; |v| > high -> high; else normal."""
    magnitude = abs(value)
    if expected.absent_below > 0 and magnitude <= expected.absent_below:
        return "absent"
    if magnitude < expected.low:
        return "low"
    if magnitude > expected.high:
        return "high"
    return "normal"


def representative_value(expected: Expected, outcome: str) -> float:
    """A value (in the expectation's unit) that classifies as ``outcome``: used by automatic walks."""
    floor = max(expected.absent_below, 0.0)
    if outcome == "normal":
        if classify(expected.nominal, expected) == "normal":
            return float(expected.nominal)
        return (expected.low + expected.high) / 2.0
    if outcome == "absent":
        return 0.0
    if outcome == "low":
        return (floor + expected.low) / 2.0 if expected.low > floor else float(expected.low)
    if outcome == "high":
        return expected.high + max(0.25 * abs(expected.high - expected.low),
                                   0.1 * abs(expected.high), 1e-6)
    raise InputError(f"'{outcome}' is not a reading class", hint="use " + ", ".join(MEASURE_OUTCOMES))


def band_of(expected: Expected) -> dict[str, object]:
    """The band as recorded in an answer event."""
    band = expected.to_json()
    band["absent_below"] = expected.absent_below
    return band
