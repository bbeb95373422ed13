"""The meter interface: quantities, samples, errors and the "hold until stable" reading.

A :class:`Sample` is one reading as the meter gave it: the value in the SI unit the meter
reported (``V``, ``A``, ``ohm``, ``Hz``; an overload, the trade's "OL", is an infinite
value), the AC/DC mode when the meter says it, the meter's identity (``*IDN?`` or the
sigrok driver) and the time it was taken. ``resolution`` is one count of the meter's
display in the same unit (the step between two readings it can show), used by
:func:`read_stable`.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field
from datetime import UTC, datetime

from faultwise.core.errors import FaultwiseError


class MeterError(FaultwiseError):
    """The meter could not give a reading (not found, refused the command, bad answer)."""


class MeterTimeout(MeterError):
    """The meter did not answer within its time-out (unplugged, switched off, asleep)."""


class MeterRefused(MeterError):
    """The meter answered, but its reading does not fit the check (unit, AC/DC, overload)."""


@dataclass(frozen=True)
class Quantity:
    """What the meter is asked to measure: its unit, its AC/DC mode and its SCPI query.

    The SCPI queries are the MEASure subsystem of the SCPI standard (SCPI-1999, volume 2,
    MEASure: VOLTage[:DC], VOLTage:AC, RESistance, CURRent[:DC], CURRent:AC, FREQuency);
    with no range given a meter measures on its default range, which the common SCPI
    meters take as auto range (from memory of their programming manuals).
    """

    id: str
    title: str
    unit: str             # SI unit the sample comes in: V, A, ohm, Hz
    mode: str             # "DC", "AC" or "" (not an AC/DC quantity)
    scpi: str             # the MEASure query
    function: str         # the SCPI function name a meter reports for FUNC? (VOLT:AC ...)


QUANTITIES: dict[str, Quantity] = {q.id: q for q in (
    Quantity("dc-v", "DC volts", "V", "DC", "MEAS:VOLT:DC?", "VOLT"),
    Quantity("ac-v", "AC volts", "V", "AC", "MEAS:VOLT:AC?", "VOLT:AC"),
    Quantity("ohm", "resistance", "ohm", "", "MEAS:RES?", "RES"),
    Quantity("dc-a", "DC current", "A", "DC", "MEAS:CURR:DC?", "CURR"),
    Quantity("ac-a", "AC current", "A", "AC", "MEAS:CURR:AC?", "CURR:AC"),
    Quantity("freq", "frequency", "Hz", "", "MEAS:FREQ?", "FREQ"),
)}


def _now() -> datetime:
    return datetime.now(UTC).astimezone()


@dataclass(frozen=True)
class Sample:
    """One reading: value in ``unit`` (inf for overload), mode, meter identity, time."""

    value: float
    unit: str
    mode: str
    meter: str
    at: str
    resolution: float | None = None
    flags: tuple[str, ...] = field(default=())

    @property
    def overload(self) -> bool:
        return not math.isfinite(self.value)

    def to_json(self) -> dict:
        """``{"value", "unit", "mode", "meter", "at"}`` (DESIGN section 10); an overload has
        ``value`` null and ``"overload": true`` (JSON has no infinity)."""
        doc = {"value": None if self.overload else self.value, "unit": self.unit,
               "mode": self.mode, "meter": self.meter, "at": self.at}
        if self.overload:
            doc["overload"] = True
        return doc

    def shown(self) -> str:
        """'146.2 V DC', 'OL ohm' as one line of text."""
        from faultwise.core.units import format_reading

        if self.overload:
            text = f"OL {self.unit}"
        else:
            try:
                text = format_reading(self.value, self.unit, 5)
            except (ValueError, FaultwiseError):
                text = f"{self.value:g} {self.unit}"
        return f"{text} {self.mode}".rstrip()


def stamp(clock: Callable[[], datetime] | None = None) -> str:
    """The time of a sample, ISO 8601 to the second, with its UTC offset."""
    return (clock or _now)().isoformat(timespec="seconds")


def relative_resolution(value: float, digits: int = 5) -> float:
    """One count of a display showing ``digits`` significant digits of ``value``
    (used when the meter does not say its resolution; 5 digits is a 4½-digit display's
    worst case, common practice, no source)."""
    if not math.isfinite(value) or value == 0:
        return 10.0 ** -(digits - 1)
    return 10.0 ** (math.floor(math.log10(abs(value))) - (digits - 1))


class Meter:
    """A source of readings. Subclasses implement :meth:`read` (and may override the rest).

    ``read(quantity)`` returns a :class:`Sample` or raises :class:`MeterTimeout` (no answer
    within ``timeout_s``) or :class:`MeterError`. ``quantity`` None reads whatever the meter
    is set to (the ``faultwise meter`` command); a sigrok meter always does, since its
    function is set on its dial.
    """

    kind = "manual"
    can_select = False          # True when the program can set the meter's function

    def __init__(self, spec: str, *, timeout_s: float = 3.0,
                 clock: Callable[[], datetime] | None = None) -> None:
        self.spec = spec
        self.timeout_s = float(timeout_s)
        self.clock = clock

    def identity(self) -> str:
        return self.spec

    def read(self, quantity: Quantity | None = None) -> Sample:  # pragma: no cover - abstract
        raise NotImplementedError

    def close(self) -> None:
        """Release the link (the next read opens it again)."""


def read_stable(read: Callable[[], Sample], *, agree: int = 3, limit: int = 12) -> Sample:
    """"Hold until stable": read until ``agree`` samples in a row lie within one count of
    the meter's resolution of each other; return the last of them.

    Gives up with :class:`MeterError` after ``limit`` samples (the reading drifts or the
    probes are not steady); a time-out or a refusal of any sample stops at once.
    """
    window: list[Sample] = []
    last: list[Sample] = []
    for _ in range(max(agree, limit)):
        sample = read()
        if window and (sample.unit != window[-1].unit or sample.mode != window[-1].mode
                       or sample.overload != window[-1].overload):
            window = []
        window.append(sample)
        window = window[-agree:]
        last = window
        if len(window) < agree:
            continue
        if all(s.overload for s in window):
            return window[-1]
        values = [s.value for s in window]
        step = max((s.resolution if s.resolution else relative_resolution(s.value))
                   for s in window)
        if max(values) - min(values) <= step * (1 + 1e-9):
            return window[-1]
    shown = ", ".join(s.shown() for s in last)
    raise MeterError(f"the reading did not settle: {agree} samples in a row never agreed "
                     f"within the meter's resolution (last: {shown})",
                     hint="hold the probes steady and read again, or type the reading")


class ManualMeter(Meter):
    """No meter at this bench: every reading is typed (the default)."""

    def read(self, quantity: Quantity | None = None) -> Sample:
        raise MeterError("no meter is set for this bench (meter: manual)",
                         hint="set meter: in faultwise.yaml or pass --meter visa:RESOURCE "
                              "or sigrok:DRIVER")
