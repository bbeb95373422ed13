"""A bench process for the kill tests: walks a case through the walk API and dies by
SIGKILL at a chosen point of the store's write path, or walks until killed from outside.

    python kill_child.py CASES_DIR POINT SAVE [SAVES_PER_STEP]

POINT is one of ``mid-write`` (half of the temp file written), ``before-replace`` (temp
file complete and synced, not yet renamed), ``after-replace`` (renamed, folder not yet
synced), ``new-case`` (the first version written to its temp file, not yet linked into
place) or ``none`` (no self-kill: the parent kills at a random moment). SAVE is the
number of the save (1-based, counting every atomic write of the case) at which to die.
The case is created by the child when the folder holds none, else the only case is opened
(a dead holder's lock is taken over) and the walk is rebuilt from its events.
"""

from __future__ import annotations

import os
import signal
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from rb_helpers import H, clock  # noqa: E402


def die() -> None:
    os.kill(os.getpid(), signal.SIGKILL)


def arm(point: str, save: int) -> None:
    """Patch the system calls the store uses so that the chosen save dies at ``point``."""
    count = {"n": 0}
    real_fdopen, real_replace, real_link = os.fdopen, os.replace, os.link

    class HalfFile:
        def __init__(self, fh):
            self.fh = fh

        def write(self, data):
            self.fh.write(data[: len(data) // 2])
            self.fh.flush()
            os.fsync(self.fh.fileno())
            die()

        def __getattr__(self, name):
            return getattr(self.fh, name)

        def __enter__(self):
            return self

        def __exit__(self, *exc):
            self.fh.close()

    def fdopen(fd, *a, **k):
        fh = real_fdopen(fd, *a, **k)
        count["n"] += 1
        if point == "mid-write" and count["n"] == save:
            return HalfFile(fh)
        return fh

    def replace(src, dst, *a, **k):
        if point == "before-replace" and count["n"] == save:
            die()
        real_replace(src, dst, *a, **k)
        if point == "after-replace" and count["n"] == save:
            die()

    def link(src, dst, *a, **k):
        if point == "new-case":
            die()
        return real_link(src, dst, *a, **k)

    os.fdopen, os.replace, os.link = fdopen, replace, link


def main(folder: str, point: str, save: int, saves_per_step: int = 1) -> int:
    from faultwise.cases.store import CaseStore
    from faultwise.walk.state import Walk
    from faultwise.walk.scripted import walk_from_case

    if point != "none":
        arm(point, save)
    kn, ex = H.knowledge(), H.expectations()
    store = CaseStore(folder, "B1", clock=clock)
    existing = sorted(Path(folder).glob("*.json")) if Path(folder).is_dir() else []
    if existing:
        case = store.open(existing[0].stem)
        walk = walk_from_case(kn, case.data, expectations=ex, clock=clock)
    else:
        case = store.new_case(H.series_profile(), "series.yaml", "hums, then went dead",
                              "dead-lights-on", customer="ticket 4411")
        walk = Walk(kn, H.series_profile(), "dead-lights-on", expectations=ex, clock=clock)
    done = len(walk.events)
    for kind, text in H.SCRIPT[done:]:
        H.script_step(walk, kind, text)
        for _ in range(saves_per_step):
            case.record(walk)
    case.close()
    print("finished", flush=True)
    return 0


if __name__ == "__main__":
    args = sys.argv[1:]
    raise SystemExit(main(args[0], args[1], int(args[2]),
                          int(args[3]) if len(args) > 3 else 1))
