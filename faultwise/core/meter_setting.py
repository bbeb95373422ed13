"""The bench's meter setting: ``--meter SPEC``, ``FAULTWISE_METER`` or ``meter:`` in faultwise.yaml.

SPEC is ``visa:RESOURCE`` (a VISA resource name: ``USB0::0x1234::0x5678::SN1::INSTR``,
``ASRL/dev/ttyUSB0::INSTR``, ``TCPIP::192.0.2.7::5025::SOCKET``), ``sigrok:DRIVER`` or
``sigrok:DRIVER:conn=PORT`` (a sigrok-cli driver name, e.g. a serial meter's driver with
``conn=/dev/ttyUSB0``), or ``manual`` (the default: readings are typed).

In faultwise.yaml ``meter:`` is either the SPEC alone or a mapping::

    meter:
      source: visa:USB0::0x1234::0x5678::SN1::INSTR
      timeout: 3          # seconds to wait for one reading (default 3; sigrok: 10)
      backend: "@py"      # pyvisa backend (default the pure-Python one); the tests use
                          # "FILE.yaml@sim" (pyvisa-sim)
      channel: P1         # sigrok: the channel to read when the device has several

``--meter`` replaces the source and keeps the other keys. Every problem is a
:class:`FaultwiseError` naming the file, line and key.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable
from dataclasses import dataclass, replace

from faultwise.core.errors import FaultwiseError

MANUAL = "manual"
KINDS = ("visa", "sigrok", "manual")
OPTION_KEYS = ("source", "timeout", "backend", "channel")
DEFAULT_TIMEOUT_S = {"visa": 3.0, "sigrok": 10.0, "manual": 0.0}
_DRIVER = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.-]*$")
SPEC_HELP = "write visa:RESOURCE, sigrok:DRIVER[:conn=PORT] or manual"


@dataclass(frozen=True)
class MeterConfig:
    """A parsed meter setting. ``target`` is the VISA resource or the sigrok driver."""

    kind: str = MANUAL
    target: str = ""
    conn: str | None = None
    timeout_s: float | None = None
    backend: str | None = None
    channel: str | None = None

    @property
    def spec(self) -> str:
        if self.kind == MANUAL:
            return MANUAL
        tail = f":conn={self.conn}" if self.conn else ""
        return f"{self.kind}:{self.target}{tail}"

    @property
    def timeout(self) -> float:
        return self.timeout_s if self.timeout_s is not None else DEFAULT_TIMEOUT_S[self.kind]

    @property
    def is_manual(self) -> bool:
        return self.kind == MANUAL


def parse_spec(text: object, *, file: str | None = None, line: int | None = None,
               key: str = "meter") -> MeterConfig:
    """``visa:RESOURCE`` / ``sigrok:DRIVER[:conn=...]`` / ``manual`` -> MeterConfig."""
    where = {"file": file, "line": line, "key": key}
    if not isinstance(text, str) or not text.strip():
        raise FaultwiseError("the meter setting must be a text such as visa:RESOURCE",
                             hint=SPEC_HELP, **where)
    spec = text.strip()
    if spec.lower() == MANUAL:
        return MeterConfig()
    kind, sep, rest = spec.partition(":")
    kind = kind.lower()
    if not sep or kind not in KINDS or kind == MANUAL:
        raise FaultwiseError(f"unknown meter setting '{spec}'", hint=SPEC_HELP, **where)
    rest = rest.strip()
    if kind == "visa":
        if not rest or any(ch.isspace() for ch in rest):
            raise FaultwiseError(f"'{spec}' names no VISA resource", hint="write e.g. "
                                 "visa:USB0::0x1234::0x5678::SN1::INSTR", **where)
        return MeterConfig("visa", rest)
    driver, sep, option = rest.partition(":")
    if not _DRIVER.match(driver):
        raise FaultwiseError(f"'{driver or spec}' is not a sigrok driver name",
                             hint="write e.g. sigrok:DRIVER:conn=/dev/ttyUSB0 (sigrok-cli "
                                  "--list-supported lists the drivers)", **where)
    conn = None
    if sep:
        name, eq, value = option.partition("=")
        if name != "conn" or not eq or not value or any(ch.isspace() for ch in value):
            raise FaultwiseError(f"'{option}' is not a sigrok connection option",
                                 hint="write conn=PORT, e.g. sigrok:DRIVER:conn=/dev/ttyUSB0",
                                 **where)
        conn = value
    return MeterConfig("sigrok", driver, conn)


def parse_meter_setting(value: object, *, file: str | None = None,
                        line_of: Callable[[object, object], int | None] | None = None
                        ) -> MeterConfig:
    """The ``meter:`` value of faultwise.yaml (a SPEC or a mapping, module doc).

    ``line_of(container, key)`` gives the line of a key (faultwise.core.yamlload.line_of).
    """
    def at(container: object, key: object) -> int | None:
        return line_of(container, key) if line_of else None

    if isinstance(value, str):
        return parse_spec(value, file=file, key="meter")
    if not isinstance(value, dict):
        raise FaultwiseError("the meter setting must be a text or a mapping", file=file,
                             key="meter", hint=SPEC_HELP + ", or a mapping with source:")
    for key in value:
        if key not in OPTION_KEYS:
            raise FaultwiseError(f"unknown key '{key}' under meter", file=file,
                                 line=at(value, key), key=f"meter.{key}",
                                 hint="use only " + ", ".join(OPTION_KEYS))
    if "source" not in value:
        raise FaultwiseError("the meter mapping has no source", file=file, key="meter",
                             hint=SPEC_HELP + " under source:")
    config = parse_spec(value["source"], file=file, line=at(value, "source"),
                        key="meter.source")
    timeout = value.get("timeout")
    if timeout is not None:
        if isinstance(timeout, bool) or not isinstance(timeout, (int, float)) \
                or not math.isfinite(timeout) or not 0.1 <= timeout <= 120:
            raise FaultwiseError("the meter time-out must be a number of seconds from 0.1 "
                                 "to 120", file=file, line=at(value, "timeout"),
                                 key="meter.timeout", hint="write e.g. timeout: 3")
        config = replace(config, timeout_s=float(timeout))
    for key in ("backend", "channel"):
        item = value.get(key)
        if item is None:
            continue
        if not isinstance(item, str) or not item.strip():
            raise FaultwiseError(f"the meter {key} must be a text", file=file,
                                 line=at(value, key), key=f"meter.{key}",
                                 hint='write e.g. backend: "@py"' if key == "backend"
                                 else "write e.g. channel: P1")
        config = replace(config, **{key: item.strip()})
    return config


def with_spec(config: MeterConfig, spec: str | None, *, key: str = "--meter") -> MeterConfig:
    """``config`` with its source replaced by ``spec`` (the options kept), or unchanged."""
    if spec is None:
        return config
    fresh = parse_spec(spec, key=key)
    return replace(config, kind=fresh.kind, target=fresh.target, conn=fresh.conn)
