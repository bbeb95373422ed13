"""A handheld meter through the ``sigrok-cli`` command (Debian package ``sigrok-cli``).

One reading is one run of ``sigrok-cli --driver DRIVER[:conn=PORT] --samples 1 -O analog``
(with ``--channels CH`` when a channel is set). Its analog output module writes one line per
channel and sample (libsigrok ``src/output/analog.c``): ``NAME: VALUE [PREFIX]UNIT FLAGS``,
for example ``P1: 146.23 V DC AUTO``, ``P1: 4.7000 kΩ`` or ``A0: -10.0000 V DC``. The value is
printed with the digits the meter resolves, so one count is read from the number of
decimals. Flags are words after the unit: ``AC``, ``DC``, ``RMS``, ``HOLD``, ``AUTO``, ``REL``
and others. An overload (the meter's "OL") reaches the line as ``inf`` or ``-inf`` (the
meter drivers set the value to infinity; from memory); a literal ``OL`` is taken too.

The meter's function is set on its dial: the check's quantity is not sent, it is compared
with what the meter reports (:mod:`faultwise.meter.fit`). Identity is the driver's own
description from ``sigrok-cli --driver DRIVER --scan`` ("UNI-T UT61E"), else the spec.

sigrok-cli 0.7.2 may print a GLib assertion on stderr and exit with status 1 after a good
sample (seen with the demo driver on Debian): a run that printed an analog line counts.
"""

from __future__ import annotations

import math
import re
import shutil
import subprocess
from collections.abc import Callable
from datetime import datetime

from faultwise.core.safe_text import one_line
from faultwise.meter.base import Meter, MeterError, MeterTimeout, Quantity, Sample, stamp

PROGRAM = "sigrok-cli"
INSTALL_HINT = "install it: apt-get install sigrok-cli"
_PREFIXES = {"": 0, "p": -12, "n": -9, "u": -6, "µ": -6, "μ": -6, "m": -3, "k": 3, "M": 6,
             "G": 9}
# units as libsigrok prints them -> the unit symbol faultwise uses
# (the Greek capital omega U+03A9 and the ohm sign U+2126 both name the ohm)
_UNITS = {"V": "V", "A": "A", "Ω": "ohm", "\u2126": "ohm", "ohm": "ohm", "Hz": "Hz",
          "F": "F", "H": "H", "s": "s"}
_LINE = re.compile(
    r"^\s*(?P<channel>[^:\s][^:]*):\s+"
    r"(?P<number>[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?|[+-]?inf|[+-]?nan|OL)"
    r"\s*(?P<unit>\S*)(?P<flags>(?:\s+\S+)*)\s*$", re.IGNORECASE)


def _split_unit(text: str) -> tuple[int, str] | None:
    """'kΩ' -> (3, 'ohm'); 'mV' -> (-3, 'V'); None when no known unit."""
    if text in _UNITS:
        return 0, _UNITS[text]
    if len(text) > 1 and text[0] in _PREFIXES and text[1:] in _UNITS:
        return _PREFIXES[text[0]], _UNITS[text[1:]]
    return None


def parse_analog_line(line: str, meter: str = "sigrok", at: str = "") -> Sample | None:
    """One line of sigrok-cli's analog output -> Sample (value in V, A, ohm, Hz ...).

    Returns None for a line that is not an analog reading (FRAME-BEGIN, log lines);
    a reading in a unit faultwise does not read (°C, dB ...) is a MeterError.
    """
    match = _LINE.match(line)
    if match is None:
        return None
    number, unit_text = match["number"], match["unit"]
    flags = tuple(match["flags"].split())
    word = number.lower().lstrip("+-")
    if word in ("inf", "nan", "ol"):
        value = -math.inf if number.startswith("-") else math.inf
        decimals = None
    else:
        value = float(number)
        decimals = len(number.split(".")[1]) if "." in number and "e" not in word else 0
    unit = _split_unit(unit_text)
    if unit is None:
        if not unit_text and not flags:
            return None
        raise MeterError(f"the meter reports '{unit_text or '(no unit)'}', which faultwise "
                         "does not read", hint="set the meter to volts, ohms, current or "
                                               "frequency")
    exponent, symbol = unit
    resolution = None
    if math.isfinite(value):
        value = value * 10.0 ** exponent
        if decimals is not None:
            resolution = 10.0 ** (exponent - decimals)
    mode = "AC" if "AC" in flags else "DC" if "DC" in flags else ""
    return Sample(value=value, unit=symbol, mode=mode, meter=meter, at=at,
                  resolution=resolution, flags=flags)


def parse_analog_output(text: str, meter: str, at: str, channel: str | None = None) -> Sample:
    """The first analog reading in sigrok-cli's output (of ``channel`` when given)."""
    for line in text.splitlines():
        match = _LINE.match(line)
        if match is None or (channel and match["channel"].strip() != channel):
            continue
        sample = parse_analog_line(line, meter, at)
        if sample is not None:
            return sample
    which = f" for channel {channel}" if channel else ""
    raise MeterError(f"sigrok-cli gave no reading{which}",
                     hint="check the driver, the port (conn=) and that the meter's data "
                          "output is switched on")


class SigrokMeter(Meter):
    """A meter read through sigrok-cli (see the module doc)."""

    kind = "sigrok"

    def __init__(self, driver: str, *, conn: str | None = None, channel: str | None = None,
                 timeout_s: float = 10.0, clock: Callable[[], datetime] | None = None,
                 program: str = PROGRAM) -> None:
        spec = f"sigrok:{driver}" + (f":conn={conn}" if conn else "")
        super().__init__(spec, timeout_s=timeout_s, clock=clock)
        self.driver, self.conn, self.channel, self.program = driver, conn, channel, program
        self._identity: str | None = None

    def _driver_arg(self) -> str:
        return self.driver + (f":conn={self.conn}" if self.conn else "")

    def _run(self, args: list[str]) -> subprocess.CompletedProcess:
        exe = shutil.which(self.program)
        if exe is None:
            raise MeterError(f"{self.program} is not installed, so a sigrok meter cannot be "
                             "read", hint=INSTALL_HINT)
        try:
            return subprocess.run([exe, *args], capture_output=True, text=True,
                                  timeout=self.timeout_s, stdin=subprocess.DEVNULL,
                                  encoding="utf-8", errors="replace")
        except subprocess.TimeoutExpired:
            raise MeterTimeout(f"the meter gave no reading within {self.timeout_s:g} s",
                               hint="check that it is on, connected and sending data, then "
                                    "read again or type the reading") from None
        except OSError as exc:
            raise MeterError(f"{self.program} could not be run ({exc.strerror or exc})",
                             hint=INSTALL_HINT) from None

    def identity(self) -> str:
        """'DRIVER: description' from a device scan (once), else the spec."""
        if self._identity is None:
            name = self.spec
            try:
                done = self._run(["--driver", self._driver_arg(), "--scan"])
            except MeterError:
                done = None
            for line in (done.stdout.splitlines() if done else ()):
                head, sep, description = line.partition(" - ")
                if sep and head.split(":")[0].strip() == self.driver:
                    description = description.split(" with ")[0].strip()
                    name = f"{self.driver}: {description}" if description else self.driver
                    break
            self._identity = one_line(name)[:120]
        return self._identity

    def read(self, quantity: Quantity | None = None) -> Sample:
        meter = self.identity()
        args = ["--driver", self._driver_arg(), "--samples", "1", "-O", "analog"]
        if self.channel:
            args += ["--channels", self.channel]
        done = self._run(args)
        try:
            return parse_analog_output(done.stdout, meter, stamp(self.clock), self.channel)
        except MeterError as exc:
            if done.returncode != 0 and done.stderr.strip():
                last = done.stderr.strip().splitlines()[-1][:160]
                raise MeterError(f"sigrok-cli failed ({last})", hint=exc.hint) from None
            raise
