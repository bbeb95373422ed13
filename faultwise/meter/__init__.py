"""Readings straight from the bench meter: a small :class:`Meter` interface and its sources.

Sources (DESIGN section 10, ``--meter SPEC``): ``visa:RESOURCE`` (a SCPI meter through
pyvisa and its pure-Python pyvisa-py backend: USB-TMC, serial, LAN), ``sigrok:DRIVER[:conn=...]``
(a handheld meter through the ``sigrok-cli`` command) and ``manual`` (no meter: the reading
is typed, as before). The spec and its options are read by :mod:`faultwise.meter.config`;
what a reading means for a check (which quantity, which unit, whether it fits) is in
:mod:`faultwise.meter.fit`; the sources are :mod:`faultwise.meter.visa` and
:mod:`faultwise.meter.sigrok`. Nothing here imports Textual; pyvisa is imported only when a
VISA meter is opened, so the base install does without it.
"""

from faultwise.meter.base import (
    QUANTITIES,
    Meter,
    MeterError,
    MeterRefused,
    MeterTimeout,
    Quantity,
    Sample,
    read_stable,
)
from faultwise.core.meter_setting import MANUAL, MeterConfig, parse_meter_setting
from faultwise.meter.config import open_meter

__all__ = ["QUANTITIES", "MANUAL", "Meter", "MeterConfig", "MeterError", "MeterRefused",
           "MeterTimeout", "Quantity", "Sample", "open_meter", "parse_meter_setting",
           "read_stable"]
