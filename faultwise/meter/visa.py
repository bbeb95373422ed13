"""A SCPI bench meter through pyvisa (USB-TMC, serial, LAN) with the pure-Python pyvisa-py
backend (``@py``) unless the setting names another (the tests use pyvisa-sim, ``FILE@sim``).

The link is opened on the first reading and kept; any failure closes it, so the next reading
opens it again (a meter unplugged and plugged back works without a restart). Identity is the
answer to ``*IDN?`` (IEEE 488.2 common command: maker, model, serial, firmware). A reading is
one MEASure query for the quantity the check needs (:data:`faultwise.meter.base.QUANTITIES`);
with no quantity, ``FUNC?`` tells what the meter is set to and ``READ?`` reads it.

SCPI meters answer an overload with 9.9E37 (SCPI-1999 volume 1 gives +/-9.9E37 for
+/-infinity and 9.91E37 for not-a-number; section number from memory); any answer of that
size is an overload (the trade's "OL").
"""

from __future__ import annotations

import math
import re
import threading
import warnings
from collections.abc import Callable
from datetime import datetime

from faultwise.core.safe_text import one_line
from faultwise.meter.base import (
    QUANTITIES,
    Meter,
    MeterError,
    MeterTimeout,
    Quantity,
    Sample,
    relative_resolution,
    stamp,
)

OVERLOAD = 9.9e37
_NUMBER = re.compile(r"^\s*[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?\s*$")
_FUNCTIONS = {
    "VOLT": "dc-v", "VOLT:DC": "dc-v", "VOLT:AC": "ac-v", "RES": "ohm", "FRES": "ohm",
    "CURR": "dc-a", "CURR:DC": "dc-a", "CURR:AC": "ac-a", "FREQ": "freq",
}
INSTALL_HINT = "install the meter extra: pip install 'faultwise[meter]'"
# pyvisa warns on stderr about a reply without its terminator; on the bench screen that
# would scribble over the terminal, and the reply is judged here anyway
warnings.filterwarnings("ignore", message="read string doesn't end", category=UserWarning)


def quantity_of_function(answer: str) -> Quantity | None:
    """The quantity for a ``FUNC?`` answer ('"VOLT:AC"', 'VOLTAGE', 'RES' ...), or None."""
    text = answer.strip().strip('"').upper()
    text = re.sub(r"(VOLT)AGE", r"\1", text)
    text = re.sub(r"(CURR)ENT", r"\1", text)
    text = re.sub(r"(RES)ISTANCE", r"\1", text)
    text = re.sub(r"(FREQ)UENCY", r"\1", text)
    qid = _FUNCTIONS.get(text)
    return QUANTITIES[qid] if qid else None


def parse_scpi_number(answer: str, query: str) -> float:
    """A SCPI numeric answer -> float (9.9E37 -> inf); anything else is a MeterError."""
    text = answer.strip()
    if not text:
        raise MeterError(f"the meter sent an empty answer to {query}",
                         hint="check the resource name and the cable, or type the reading")
    if not _NUMBER.match(text):
        shown = text[:60] or "nothing"
        raise MeterError(f"the meter answered '{shown}' to {query}",
                         hint="the meter may not measure this; set it by hand and type the "
                              "reading")
    value = float(text)
    if abs(value) >= OVERLOAD:
        return math.inf if value > 0 else -math.inf
    return value


class VisaMeter(Meter):
    """A SCPI meter at a VISA resource (see the module doc)."""

    kind = "visa"
    can_select = True

    def __init__(self, resource: str, *, timeout_s: float = 3.0, backend: str | None = None,
                 clock: Callable[[], datetime] | None = None) -> None:
        super().__init__(f"visa:{resource}", timeout_s=timeout_s, clock=clock)
        self.resource = resource
        self.backend = backend or "@py"
        self._rm = None
        self._inst = None
        self._idn: str | None = None
        self._lock = threading.Lock()

    # ------------------------------------------------------------------ link

    def _open(self):
        if self._inst is not None:
            return self._inst
        try:
            import pyvisa
        except ImportError:
            raise MeterError("pyvisa is not installed, so a VISA meter cannot be read",
                             hint=INSTALL_HINT) from None
        try:
            self._rm = pyvisa.ResourceManager(self.backend)
        except (OSError, ValueError, pyvisa.errors.Error) as exc:
            raise MeterError(f"the VISA backend '{self.backend}' cannot be used ({exc})",
                             hint="check meter.backend in faultwise.yaml, or "
                                  + INSTALL_HINT) from None
        try:
            inst = self._rm.open_resource(self.resource)
        except Exception as exc:  # pyvisa raises VisaIOError, ValueError, OSError ...
            self.close()
            raise MeterError(f"no meter answers at '{self.resource}' ({_why(exc)})",
                             hint="check the cable and the resource name (the meter's "
                                  "interface menu shows it)") from None
        inst.timeout = max(1, int(self.timeout_s * 1000))
        for attr in ("read_termination", "write_termination"):
            try:
                setattr(inst, attr, "\n")
            except Exception:  # a backend without terminations (raw sockets differ)
                pass
        self._inst = inst
        return inst

    def close(self) -> None:
        inst, rm = self._inst, self._rm
        self._inst = self._rm = None
        for thing in (inst, rm):
            try:
                if thing is not None:
                    thing.close()
            except Exception:  # closing a link that is already gone
                pass

    def _query(self, command: str) -> str:
        inst = self._open()
        try:
            return str(inst.query(command))
        except Exception as exc:
            self.close()
            if _is_timeout(exc):
                raise MeterTimeout(f"the meter did not answer {command} within "
                                   f"{self.timeout_s:g} s",
                                   hint="check that it is on and connected, then read "
                                        "again or type the reading") from None
            raise MeterError(f"the meter link failed on {command} ({_why(exc)})",
                             hint="check the cable, then read again or type the "
                                  "reading") from None

    # ------------------------------------------------------------------ readings

    def identity(self) -> str:
        """``*IDN?`` with its fields joined by spaces ('MAKER MODEL SERIAL FIRMWARE')."""
        with self._lock:
            if self._idn is None:
                answer = self._query("*IDN?").strip()
                fields = [f.strip() for f in answer.split(",") if f.strip()]
                self._idn = one_line(" ".join(fields) or self.resource)[:120]
            return self._idn

    def read(self, quantity: Quantity | None = None) -> Sample:
        meter = self.identity()
        with self._lock:
            if quantity is None:
                found = quantity_of_function(self._query("FUNC?"))
                if found is None:
                    raise MeterError("the meter is set to a function faultwise does not read",
                                     hint="set it to volts, ohms, current or frequency")
                quantity, query = found, "READ?"
            else:
                query = quantity.scpi
            value = parse_scpi_number(self._query(query), query)
        return Sample(value=value, unit=quantity.unit, mode=quantity.mode, meter=meter,
                      at=stamp(self.clock), resolution=None if not math.isfinite(value)
                      else relative_resolution(value), flags=("AUTO",))


def _is_timeout(exc: BaseException) -> bool:
    code = getattr(exc, "error_code", None)
    try:
        from pyvisa.constants import StatusCode

        if code == StatusCode.error_timeout:
            return True
    except ImportError:
        pass
    return isinstance(exc, TimeoutError) or "timeout" in str(exc).lower()


def _why(exc: BaseException) -> str:
    text = " ".join(str(exc).split())
    return (text[:120] or type(exc).__name__).rstrip(".")
