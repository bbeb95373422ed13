"""The lock that keeps two benches off one open case.

filelock's SoftFileLock on ``<id>.lock`` (exclusive creation, so it works on a shared
network folder; a holder on this host whose process died is taken over, another host's
lock is respected) and ``<id>.lock-owner`` beside it, a small JSON naming the bench, host,
process and time for messages. The owner file is written just after the lock is taken, so
a reader that finds the lock without an owner waits a moment before saying "another
bench". A failure to write the owner file is ignored: the lock itself holds.
"""

from __future__ import annotations

import json
import os
import re
import socket
import time
from collections.abc import Callable
from dataclasses import dataclass
from datetime import UTC, datetime
from pathlib import Path
from typing import TYPE_CHECKING

from faultwise.cases.ids import case_path
from faultwise.core.errors import CaseError, CaseLockedError

if TYPE_CHECKING:
    from filelock import BaseFileLock


@dataclass(frozen=True)
class LockInfo:
    """Who holds a case: bench, host, process id (when known) and since when."""

    bench: str
    host: str
    pid: int | None
    since: str


def safe_host() -> str:
    """This machine's name as it may appear in a file name (letters, digits, '-', '_')."""
    return re.sub(r"[^A-Za-z0-9_-]", "-", socket.gethostname())[:60] or "host"


def pid_alive(pid: int) -> bool:
    """Whether a process with this id runs on this host (signal 0; no permission: alive)."""
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    except OSError:
        return False
    return True


class CaseLocks:
    """The locks of one cases folder, taken in the name of one bench on this host."""

    def __init__(self, folder: Path, bench: str, clock: Callable[[], datetime]) -> None:
        self.folder = folder
        self.bench = bench
        self.clock = clock
        self.host = safe_host()

    def lock_path(self, case_id: str) -> Path:
        return self.folder / f"{case_id}.lock"

    def owner_path(self, case_id: str) -> Path:
        return self.folder / f"{case_id}.lock-owner"

    def info(self, case_id: str) -> LockInfo | None:
        """Who holds the case, or None when nobody does."""
        lock_path = self.lock_path(case_id)
        if not lock_path.exists():
            return None
        info = {}
        try:
            info = json.loads(self.owner_path(case_id).read_text(encoding="utf-8"))
            if not isinstance(info, dict):
                info = {}
        except (OSError, ValueError):
            info = {}
        since = info.get("since")
        if not since:
            try:
                since = datetime.fromtimestamp(lock_path.stat().st_mtime, UTC) \
                    .astimezone().isoformat(timespec="seconds")
            except OSError:
                since = "?"
        pid = info.get("pid")
        return LockInfo(bench=str(info.get("bench") or "another bench"),
                        host=str(info.get("host") or "?"),
                        pid=pid if isinstance(pid, int) else None, since=str(since))

    def acquire(self, case_id: str) -> BaseFileLock:
        """Take the case's lock; CaseLockedError names who holds it, CaseError on a failure."""
        from filelock import SoftFileLock, Timeout

        self.folder.mkdir(parents=True, exist_ok=True)
        lock = SoftFileLock(str(self.lock_path(case_id)), timeout=0, thread_local=False)
        try:
            lock.acquire()
        except Timeout:
            info = self.info(case_id)
            for _ in range(20):        # the holder names itself just after it takes the lock
                if info is None or info.bench != "another bench":
                    break
                time.sleep(0.025)
                info = self.info(case_id)
            who = f"bench {info.bench}" if info else "another bench"
            since = f" (since {info.since})" if info else ""
            where = f" on {info.host}" if info and info.host not in ("?", self.host) else ""
            raise CaseLockedError(f"case {case_id} is open at {who}{where}{since}",
                                  bench=info.bench if info else None,
                                  file=str(case_path(self.folder, case_id)),
                                  hint="close it there first, or open it read-only") from None
        except OSError as exc:
            raise CaseError(f"the case {case_id} could not be locked ({exc.strerror or exc})",
                            file=str(self.lock_path(case_id)),
                            hint="check that the cases folder is writable") from None
        owner = {"bench": self.bench, "host": self.host, "pid": os.getpid(),
                 "since": self.clock().isoformat(timespec="seconds")}
        try:
            self.owner_path(case_id).write_text(json.dumps(owner) + "\n", encoding="utf-8")
        except OSError:
            pass          # the lock itself holds; the name is only for messages
        return lock

    def release(self, case_id: str, lock: BaseFileLock) -> None:
        """Drop the owner file and the lock; a failure to remove either is ignored."""
        try:
            self.owner_path(case_id).unlink()
        except OSError:
            pass
        try:
            lock.release(force=True)
        except OSError:
            pass
