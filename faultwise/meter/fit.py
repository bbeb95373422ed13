"""What a meter reading means for a check: which quantity to ask for, and whether it fits.

The quantity comes from the check's expectation: its unit gives the dimension (volts,
ohms, amperes, hertz) and, for volts and amperes, its name says AC or DC. The AC
readings of these sets are the line and its leakage check, transformer windings and
heaters (series-string heaters run on the line, transformer heaters on their winding);
everything else a receiver's volt or current check asks for is DC (common practice, no
source). Peak-to-peak volts, inductance, time and lengths are not multimeter readings:
the meter key refuses them and the reading is typed.

A sample fits when its unit has the check's dimension and, for volts and amperes, its
mode matches (a meter that does not say AC or DC is taken at its word). An overload is
refused. A refusal is a :class:`~faultwise.meter.base.MeterRefused` and nothing is
recorded.
"""

from __future__ import annotations

import math
import re
from typing import TYPE_CHECKING

from faultwise.meter.base import QUANTITIES, MeterRefused, Quantity, Sample

if TYPE_CHECKING:
    from faultwise.expect.context import Expected
    from faultwise.walk.state import Walk

_AC_NAMES = re.compile(r"^(mains\.line_v|safety\.leakage_v|supply\.secondary_v|"
                       r"heaters\.(winding_v|string_v|string_ma|total_a)|heater\.[^.]+\.v)$")
_BY_DIMENSION = {"resistance": "ohm", "frequency": "freq"}
_WHY_NOT = {
    "pp": "peak-to-peak volts are read on a scope",
    "inductance": "inductance is read on a bridge or an LC meter",
    "capacitance": "capacitance is read on a capacitance meter",
    "time": "a time is read on a scope",
    "length": "a length is measured, not metered",
    "ratio": "a ratio is worked out, not metered",
}


def quantity_for(expected: Expected) -> Quantity:
    """The meter quantity for an expectation; MeterRefused when a meter cannot read it."""
    from faultwise.core.units import resolve_unit

    try:
        unit = resolve_unit(expected.unit)
    except ValueError:
        unit = None
    if unit is not None and unit.qualifier == "pp":
        reason = _WHY_NOT["pp"]
    elif unit is not None and unit.dimension in ("voltage", "current"):
        ac = bool(_AC_NAMES.match(expected.name))
        kind = "v" if unit.dimension == "voltage" else "a"
        return QUANTITIES[f"{'ac' if ac else 'dc'}-{kind}"]
    elif unit is not None and unit.dimension in _BY_DIMENSION:
        return QUANTITIES[_BY_DIMENSION[unit.dimension]]
    else:
        reason = _WHY_NOT.get(unit.dimension if unit else "", f"'{expected.unit}' is not a "
                                                                "meter reading")
    raise MeterRefused(f"the meter cannot take this reading: {reason}",
                       hint="type the reading")


def value_for_check(sample: Sample, expected: Expected) -> float:
    """The sample's value in the expectation's unit; MeterRefused when it does not fit."""
    from faultwise.core.units import convert

    wanted = quantity_for(expected)
    got = _quantity_of_sample(sample)
    if got is None or got.unit != wanted.unit:
        raise MeterRefused(f"the meter reads {_what(sample)}, but this check asks for "
                           f"{wanted.title}", hint=f"set the meter to {wanted.title} and "
                                                   "read again, or type the reading")
    if sample.mode and wanted.mode and sample.mode != wanted.mode:
        raise MeterRefused(f"the meter reads {sample.mode} {_noun(sample.unit)}, but this "
                           f"check asks for {wanted.title}",
                           hint=f"set the meter to {wanted.title} and read again")
    if sample.overload or not math.isfinite(sample.value):
        raise MeterRefused("the meter shows OL (overload): the reading is beyond its range",
                           hint="check the range and the probes, or type what you read")
    return convert(sample.value, sample.unit, expected.unit)


def answer_from_meter(walk: Walk, sample: Sample) -> dict:
    """Answer the walk's current measurement with a meter sample; returns the event.

    The event carries the classification as a typed answer does, and ``meter``: the
    sample's value, the unit the meter reported, its mode, the meter's identity and the
    time of the reading. A sample that does not fit leaves the walk unchanged.
    """
    from faultwise.core.errors import WalkError
    from faultwise.core.units import format_reading

    prompt = walk.prompt()
    expected = getattr(prompt, "expected", None)
    if prompt is None or not prompt.is_measurement or expected is None:
        raise WalkError("this step does not take a meter reading",
                        hint="answer with one of its choices")
    value = value_for_check(sample, expected)
    raw = f"{format_reading(value, expected.unit, 5)} (meter)"
    return walk.answer_value(value, raw=raw, meter=sample.to_json())


def _quantity_of_sample(sample: Sample) -> Quantity | None:
    for q in QUANTITIES.values():
        if q.unit == sample.unit and (not sample.mode or not q.mode or q.mode == sample.mode):
            return q
    return None


def _noun(unit: str) -> str:
    return {"V": "volts", "A": "current", "ohm": "ohms", "Hz": "frequency", "F": "capacitance",
            "H": "inductance", "s": "time"}.get(unit, unit)


def _what(sample: Sample) -> str:
    return f"{sample.mode} {_noun(sample.unit)}".strip()
