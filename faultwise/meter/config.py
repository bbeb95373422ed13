"""Open the bench meter a setting names (:mod:`faultwise.core.meter_setting` parses it)."""

from __future__ import annotations

from typing import TYPE_CHECKING

from faultwise.core.meter_setting import MANUAL, MeterConfig
from collections.abc import Callable
from datetime import datetime

if TYPE_CHECKING:
    from faultwise.meter.base import Meter


def open_meter(config: MeterConfig, *,
               clock: Callable[[], datetime] | None = None) -> Meter:
    """The :class:`~faultwise.meter.base.Meter` for a setting (nothing is contacted yet)."""
    if config.kind == "visa":
        from faultwise.meter.visa import VisaMeter

        return VisaMeter(config.target, timeout_s=config.timeout, backend=config.backend,
                         clock=clock)
    if config.kind == "sigrok":
        from faultwise.meter.sigrok import SigrokMeter

        return SigrokMeter(config.target, conn=config.conn, channel=config.channel,
                           timeout_s=config.timeout, clock=clock)
    from faultwise.meter.base import ManualMeter

    return ManualMeter(MANUAL, clock=clock)
