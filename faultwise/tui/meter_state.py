"""The bench meter's state for this run, and the line that tells the technician about it.

Kept apart from :mod:`faultwise.tui.meter_keys` (the screens' meter actions) so that the
check panel can show the meter's line without importing the screens' mixin. Holds no
domain logic: which quantity a check needs is :func:`faultwise.meter.fit.quantity_for`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from faultwise.meter import MeterError, open_meter
from faultwise.meter.fit import quantity_for
from faultwise.tui.context import Bench
from faultwise.walk.results import Prompt


@dataclass
class MeterState:
    """The bench's meter for this run (on ``Bench.meter``): the opened source and the mode."""

    meter: Any
    hold: bool = False
    busy: bool = False
    identity: str | None = None       # the meter's own name, once it has answered


def meter_state(bench: Bench) -> MeterState | None:
    """The bench's meter state, opened on first use; None when the bench has no meter."""
    config = getattr(bench.workspace, "meter", None)
    if config is None or config.is_manual:
        return None
    if bench.meter is None:
        bench.meter = MeterState(open_meter(config, clock=bench.clock))
    return bench.meter


def meter_can_take(expected: object) -> bool:
    """Whether a meter can take the reading ``expected`` names (not, say, volts peak-to-peak)."""
    try:
        quantity_for(expected)
    except MeterError:
        return False
    return True


def meter_hint(bench: Bench | None, prompt: Prompt | None) -> str:
    """The line under a reading check when the bench has a meter, else ''."""
    if bench is None or prompt is None or not prompt.is_measurement:
        return ""
    state = meter_state(bench)
    if state is None:
        return ""
    try:
        quantity = quantity_for(prompt.expected)
    except MeterError as exc:
        return f"Meter: type this reading ({exc.message})."
    name = state.identity or state.meter.spec
    if state.hold:
        return (f"Meter {name}: F10 reads {quantity.title} until three samples agree; "
                "ctrl+t: one sample.")
    return f"Meter {name}: F10 reads {quantity.title}; ctrl+t: hold until stable."
