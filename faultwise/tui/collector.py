"""Full garbage collections moved out of the technician's way.

Every so often Python runs a full collection of its cyclic garbage, walking every object
the process holds. With the knowledge loaded and a case on screen that is 40-100 ms on the
bench machine (measured by tests/benchmarks/bench_walk_step.py), and it falls on whatever
the technician is doing: a walk step that takes 20 ms took 180 ms when one landed in it.
So the bench app:

- freezes what is alive once the knowledge is loaded (``gc.freeze``: the knowledge and the
  program's modules live as long as the program), so no collection walks them again; once
  per process, so a test run that builds many apps freezes only the first;
- while it runs, stops Python's own full collections (the young generations are still
  collected as usual, 1-5 ms each) and runs a full collection itself when Python would
  have (``gc.get_count()``) and no key has come for :data:`IDLE_S` seconds: in the pause
  while the technician reads the check or holds the probe. Python's setting is given back
  when the app stops.
"""

from __future__ import annotations

import gc
import time
from typing import Callable

IDLE_S = 1.0            # no key for this long: the technician is reading or measuring
NEVER = 2**30           # a full-collection threshold no count reaches

_frozen = False


def freeze_long_lived() -> None:
    """Put every object alive now out of the collector's reach (once per process)."""
    global _frozen
    if not _frozen:
        _frozen = True
        gc.freeze()


class IdleCollector:
    """Runs the full collections Python would run, but only after ``idle_s`` without a key."""

    def __init__(self, idle_s: float = IDLE_S,
                 clock: Callable[[], float] = time.monotonic) -> None:
        self.idle_s = idle_s
        self.clock = clock
        self.last_key = clock()
        self.collections = 0             # full collections run here
        self._saved: tuple[int, int, int] | None = None

    @property
    def running(self) -> bool:
        return self._saved is not None

    def start(self) -> None:
        """Take over full collections (Python keeps collecting the young generations)."""
        if self._saved is None:
            self._saved = gc.get_threshold()
            young, middle, _ = self._saved
            gc.set_threshold(young, middle, NEVER)

    def stop(self) -> None:
        """Give full collections back to Python, with its own setting."""
        if self._saved is not None:
            gc.set_threshold(*self._saved)
            self._saved = None

    def key_pressed(self) -> None:
        """A key came: no full collection for the next ``idle_s`` seconds."""
        self.last_key = self.clock()

    def due(self) -> bool:
        """Whether Python would have run a full collection by now (its own count)."""
        return self._saved is not None and gc.get_count()[2] >= self._saved[2]

    def tick(self) -> bool:
        """Run the due full collection if no key came for ``idle_s``; True when it ran."""
        if not self.due() or self.clock() - self.last_key < self.idle_s:
            return False
        gc.collect()
        self.collections += 1
        return True
