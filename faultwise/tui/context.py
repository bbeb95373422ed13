"""What every screen is given: the workspace, the clock, the settings and (once loaded) the
knowledge. Built by :func:`faultwise.tui.app.build_app`; screens never reach for globals.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import datetime, timezone
from typing import Any, Callable

from faultwise.tui.settings import Settings
from faultwise.core.workspace import Workspace

Clock = Callable[[], datetime]


def system_clock() -> datetime:
    """The local time, timezone-aware."""
    return datetime.now(timezone.utc).astimezone()


@dataclass
class Bench:
    """The running bench program's dependencies (mutable only where it loads lazily)."""

    workspace: Workspace
    clock: Clock = system_clock
    settings: Settings = field(default_factory=Settings)
    knowledge: Any = None                 # faultwise.graph.nodes Knowledge, set by the loader worker
    meter: Any = None                     # tui.meter_keys.MeterState, opened on first use
    _store: Any = field(default=None, repr=False)

    @property
    def store(self):
        """The case store for this bench's cases folder (imported on first use)."""
        if self._store is None:
            from faultwise.cases.store import CaseStore

            self._store = CaseStore(self.workspace.cases_dir, self.workspace.bench, self.clock)
        return self._store

    def now_iso(self) -> str:
        return self.clock().isoformat(timespec="seconds")
