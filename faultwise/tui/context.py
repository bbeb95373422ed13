"""What every screen is given: the workspace, the clock, the settings and (once loaded) the
knowledge; and the one way a screen opens a case and replays its walk
(:meth:`Bench.open_walk`). Built by :func:`faultwise.tui.app.build_app`; screens never
reach for globals.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import datetime, timezone
from typing import TYPE_CHECKING, Any, Callable

from faultwise.tui.settings import Settings
from faultwise.core.workspace import Workspace

if TYPE_CHECKING:        # the app paints its first screen before these are imported
    from faultwise.cases.store import CaseStore, OpenCase
    from faultwise.walk.state import Walk

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
    def store(self) -> CaseStore:
        """The case store for this bench's cases folder (imported on first use)."""
        if self._store is None:
            from faultwise.cases.store import CaseStore

            self._store = CaseStore(self.workspace.cases_dir, self.workspace.bench, self.clock)
        return self._store

    def now_iso(self) -> str:
        """The clock's time, to the second, as the case files write it."""
        return self.clock().isoformat(timespec="seconds")

    def open_walk(self, case_id: str) -> tuple[OpenCase, Walk]:
        """(OpenCase, Walk) for an open case: takes the lock and replays its events.

        FaultwiseError (locked, damaged, events that no longer fit the knowledge) leaves the
        case unlocked.
        """
        from faultwise.walk.scripted import walk_from_case   # not before a case is opened

        case = self.store.open(case_id)
        try:
            walk = walk_from_case(self.knowledge, case.data, clock=self.clock,
                                  knowledge_dir=self.workspace.knowledge_dir)
        except BaseException:
            case.close()
            raise
        return case, walk
