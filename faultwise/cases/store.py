"""The case store: one JSON file per job, written atomically after every event.

DESIGN section 8; the format is in :mod:`faultwise.cases.schema`. A case file is
replaced whole through a temp file in the same folder (write, flush, fsync, rename, fsync the
folder), so a crash leaves either the old or the new file, never half of one. A lock keeps
two benches off one open case: filelock's SoftFileLock on ``<id>.lock`` (exclusive
creation, so it works on a shared network folder; a holder on this host whose process died
is taken over, another host's lock is respected) and ``<id>.lock-owner`` beside it naming
the bench for messages. A damaged file is reported with its reason and never written.
"""

from __future__ import annotations

import json
import os
import re
import socket
import time
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from datetime import UTC, datetime
from pathlib import Path

from faultwise.core.atomic import TEMP_SUFFIX, atomic_write, fsync_dir, write_temp
from faultwise.core.errors import CaseError, CaseLockedError, DamagedCaseError
from faultwise.core.workspace import check_bench
from faultwise.cases.codec import (CASE_FORMAT, _ordered_event, dump_case, ordered, read_case_bytes)

# \Z, not "$" (which lets a final newline through); lengths keep names under NAME_MAX.
_ID_RE = re.compile(r"^[A-Za-z0-9_-]{1,120}\Z")
_TEMP_RE = re.compile(r"^\.(?P<id>[A-Za-z0-9_-]+)\.(?P<host>[A-Za-z0-9_-]*)\.(?P<pid>\d+)\."
                      r"[0-9a-f]+" + re.escape(TEMP_SUFFIX) + "$")


# ------------------------------------------------------------------------------ results

@dataclass(frozen=True)
class LockInfo:
    bench: str
    host: str
    pid: int | None
    since: str


@dataclass(frozen=True)
class CaseSummary:
    id: str
    path: Path
    bench: str
    status: str
    opened: str
    updated: str
    customer: str
    symptom: str
    family: str
    set_label: str
    fault: str | None
    fault_title: str | None
    outcome: str | None
    minutes: float | None
    locked_by: LockInfo | None = None


@dataclass(frozen=True)
class DamagedFile:
    """A case file that could not be read (listing, index, review); left exactly as it is."""

    file: str                 # the path as found, or the name inside the cases folder
    reason: str

    @property
    def path(self) -> Path:
        return Path(self.file)


@dataclass(frozen=True)
class Listing:
    open: tuple[CaseSummary, ...]
    closed: tuple[CaseSummary, ...]
    damaged: tuple[DamagedFile, ...]


# ----------------------------------------------------------------------------- helpers

def _safe_host() -> str:
    return re.sub(r"[^A-Za-z0-9_-]", "-", socket.gethostname())[:60] or "host"


def _pid_alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    except OSError:
        return False
    return True


def _write_temp(folder: Path, case_id: str, payload: bytes) -> Path:
    """``.<id>.<host>.<pid>.<hex>.fwtmp``: the host and pid let a stale temp be traced."""
    return write_temp(folder, f"{case_id}.{_safe_host()}.{os.getpid()}", payload)


def _now_text(clock: Callable[[], datetime]) -> str:
    return clock().isoformat(timespec="seconds")


def _utc_now() -> datetime:
    return datetime.now(UTC).astimezone()


def case_path(folder, case_id: str) -> Path:
    """``<folder>/<id>.json``; CaseError unless the id is letters, digits, '-' and '_'."""
    if not isinstance(case_id, str) or not _ID_RE.match(case_id):
        raise CaseError(f"'{case_id}' is not a case id", key="case",
                        hint="a case id holds only letters, digits, '-' and '_' (120 at most), "
                             "such as 20261201-B1-001")
    return Path(folder) / f"{case_id}.json"


# --------------------------------------------------------------------------- open case

class OpenCase:
    """A case held by this bench: its data, saved atomically after every change."""

    def __init__(self, store: CaseStore, case_id: str, data: dict, lock) -> None:
        self.store = store
        self.id = case_id
        self.path = store.path_for(case_id)
        self.data = ordered(data)
        self._lock = lock

    def __enter__(self) -> OpenCase:
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    @property
    def is_open(self) -> bool:
        return self._lock is not None

    def _require_open(self) -> None:
        if self._lock is None:
            raise CaseError(f"the case {self.id} is no longer held by this bench",
                            file=str(self.path), hint="open it again")

    def save(self) -> None:
        """Atomic write of the whole case; CaseError on failure with the data kept for a retry."""
        self._require_open()
        payload = dump_case(self.data)
        try:
            atomic_write(self.path, payload,
                         temp_prefix=f"{self.id}.{_safe_host()}.{os.getpid()}")
        except OSError as exc:
            raise CaseError(f"the case {self.id} could not be saved ({exc.strerror or exc})",
                            file=str(self.path),
                            hint="check that the cases folder exists, is writable and has "
                                 "space, then save again; nothing is lost yet") from None

    def update(self, **fields) -> None:
        """Set top-level fields and save."""
        self.data.update(fields)
        self.data = ordered(self.data)
        self.data["updated"] = _now_text(self.store.clock)
        self.save()

    def append(self, event: Mapping) -> dict:
        """Number the event, append it and save; returns the stored event."""
        self._require_open()
        stored = _ordered_event(dict(event))
        stored["n"] = len(self.data["events"]) + 1
        stored.setdefault("at", _now_text(self.store.clock))
        self.data["events"].append(stored)
        self.data["updated"] = _now_text(self.store.clock)
        self.save()
        return stored

    def record(self, walk) -> None:
        """Copy the walk's events and derived fields into the case and save."""
        fields = walk.to_case_fields()
        self.data.update(fields)
        self.data["updated"] = _now_text(self.store.clock)
        self.data = ordered(self.data)
        self.save()

    def close(self) -> None:
        """Release the lock (the file stays as last saved)."""
        if self._lock is None:
            return
        lock, self._lock = self._lock, None
        self.store._release(self.id, lock)


# -------------------------------------------------------------------------------- store

class CaseStore:
    """The cases folder of a workspace, used by one bench."""

    def __init__(self, folder, bench: str, clock: Callable[[], datetime] | None = None) -> None:
        self.folder = Path(folder)
        self.bench = check_bench(bench)
        self.clock = clock or _utc_now
        self.host = _safe_host()
        self.remove_stale_temps()

    # ----- paths

    def path_for(self, case_id: str) -> Path:
        """The case file of an id; CaseError unless the id is letters, digits, '-' and '_'."""
        return case_path(self.folder, case_id)

    def _lock_path(self, case_id: str) -> Path:
        return self.folder / f"{case_id}.lock"

    def _owner_path(self, case_id: str) -> Path:
        return self.folder / f"{case_id}.lock-owner"

    def remove_stale_temps(self) -> list[Path]:
        """Delete our own temp files left by a crash (this host, dead process)."""
        removed = []
        if not self.folder.is_dir():
            return removed
        for entry in self.folder.iterdir():
            m = _TEMP_RE.match(entry.name)
            if not m or m["host"] != self.host or _pid_alive(int(m["pid"])):
                continue
            try:
                entry.unlink()
                removed.append(entry)
            except OSError:
                pass
        return removed

    # ----- locks

    def lock_info(self, case_id: str) -> LockInfo | None:
        """Who holds the case, or None when nobody does."""
        lock_path = self._lock_path(case_id)
        if not lock_path.exists():
            return None
        info = {}
        try:
            info = json.loads(self._owner_path(case_id).read_text(encoding="utf-8"))
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

    def _acquire(self, case_id: str):
        from filelock import SoftFileLock, Timeout

        self.folder.mkdir(parents=True, exist_ok=True)
        lock = SoftFileLock(str(self._lock_path(case_id)), timeout=0, thread_local=False)
        try:
            lock.acquire()
        except Timeout:
            info = self.lock_info(case_id)
            for _ in range(20):        # the holder names itself just after it takes the lock
                if info is None or info.bench != "another bench":
                    break
                time.sleep(0.025)
                info = self.lock_info(case_id)
            who = f"bench {info.bench}" if info else "another bench"
            since = f" (since {info.since})" if info else ""
            where = f" on {info.host}" if info and info.host not in ("?", self.host) else ""
            raise CaseLockedError(f"case {case_id} is open at {who}{where}{since}",
                                  bench=info.bench if info else None,
                                  file=str(self.path_for(case_id)),
                                  hint="close it there first, or open it read-only") from None
        except OSError as exc:
            raise CaseError(f"the case {case_id} could not be locked ({exc.strerror or exc})",
                            file=str(self._lock_path(case_id)),
                            hint="check that the cases folder is writable") from None
        owner = {"bench": self.bench, "host": self.host, "pid": os.getpid(),
                 "since": _now_text(self.clock)}
        try:
            self._owner_path(case_id).write_text(json.dumps(owner) + "\n", encoding="utf-8")
        except OSError:
            pass          # the lock itself holds; the name is only for messages
        return lock

    def _release(self, case_id: str, lock) -> None:
        try:
            self._owner_path(case_id).unlink()
        except OSError:
            pass
        try:
            lock.release(force=True)
        except OSError:
            pass

    # ----- reading

    def read(self, case_id_or_path) -> dict:
        """Read a case without locking it; DamagedCaseError names the file and the reason."""
        path = self._resolve(case_id_or_path)
        if path.exists() and not path.is_file():
            raise CaseError(f"{path.name} is not a case file (not a regular file)",
                            file=str(path), hint="move it out of the cases folder")
        try:
            raw = path.read_bytes()
        except FileNotFoundError:
            raise CaseError(f"there is no case file {path.name}", file=str(path),
                            hint="check the case id, or list the cases") from None
        except OSError as exc:
            raise CaseError(f"the case file could not be read ({exc.strerror or exc})",
                            file=str(path)) from None
        return read_case_bytes(raw, path)

    def _resolve(self, case_id_or_path) -> Path:
        if isinstance(case_id_or_path, os.PathLike) or str(case_id_or_path).endswith(".json"):
            return Path(case_id_or_path)
        return self.path_for(str(case_id_or_path))

    def list(self) -> Listing:
        """Every case file of the folder, open and closed, and the damaged ones by name."""
        opened, closed, damaged = [], [], []
        if not self.folder.is_dir():
            return Listing((), (), ())
        for path in sorted(self.folder.glob("*.json")):
            if path.name.startswith(".") or not path.is_file():
                continue          # a folder or FIFO named like a case (reading a FIFO blocks)
            try:
                data = read_case_bytes(path.read_bytes(), path)
            except DamagedCaseError as exc:
                damaged.append(DamagedFile(str(path), exc.reason))
                continue
            except OSError as exc:
                damaged.append(DamagedFile(str(path), f"unreadable ({exc.strerror or exc})"))
                continue
            summary = self._summary(path, data)
            (closed if summary.status == "closed" else opened).append(summary)
        return Listing(tuple(opened), tuple(closed), tuple(damaged))

    def _summary(self, path: Path, data: dict) -> CaseSummary:
        conclusion = data.get("conclusion") if isinstance(data.get("conclusion"), dict) else {}
        profile = (data.get("set") or {}).get("profile") if isinstance(data.get("set"), dict) else {}
        label = profile.get("label") if isinstance(profile, dict) else None
        status = str(data.get("status") or "open")
        case_id = str(data.get("id"))
        locked = self.lock_info(case_id) if status != "closed" and _ID_RE.match(case_id) else None
        minutes = data.get("minutes")
        return CaseSummary(
            id=case_id, path=path, bench=str(data.get("bench") or ""), status=status,
            opened=str(data.get("opened") or ""), updated=str(data.get("updated") or ""),
            customer=str(data.get("customer") or ""), symptom=str(data.get("symptom") or ""),
            family=str(data.get("family") or ""), set_label=str(label or ""),
            fault=conclusion.get("fault"), fault_title=conclusion.get("title"),
            outcome=data.get("outcome"),
            minutes=float(minutes) if isinstance(minutes, (int, float)) and
            not isinstance(minutes, bool) else None,
            locked_by=locked)

    # ----- opening and creating

    def open(self, case_id: str) -> OpenCase:
        """Take the case for this bench; CaseLockedError when another bench holds it."""
        path = self.path_for(case_id)
        if not path.is_file():
            raise CaseError(f"there is no case file {path.name}", file=str(path),
                            hint="check the case id, or list the cases")
        lock = self._acquire(case_id)
        try:
            data = self.read(path)
        except BaseException:
            self._release(case_id, lock)
            raise
        return OpenCase(self, case_id, data, lock)

    def _next_number(self, prefix: str) -> int:
        pattern = re.compile(re.escape(prefix) + r"(\d+)\.json$")
        numbers = [int(m.group(1)) for p in self.folder.glob(prefix + "*.json")
                   if (m := pattern.match(p.name))]
        return max(numbers, default=0) + 1

    def new_case(self, profile, profile_source: str, complaint: str, symptom: str,
                 customer: str = "", apprentice: bool = False, knowledge_version: str = "",
                 reopened_from: str | None = None) -> OpenCase:
        """Create ``YYYYMMDD-<bench>-<nnn>`` exclusively (the next free number) and hold it."""
        try:
            self.folder.mkdir(parents=True, exist_ok=True)
        except OSError as exc:
            raise CaseError(f"the cases folder could not be created ({exc.strerror or exc})",
                            file=str(self.folder), hint="pass --cases with a writable folder") \
                from None
        if isinstance(profile, Mapping):
            profile_data, family = dict(profile), str(profile.get("family", ""))
        else:
            from faultwise.profile.model import profile_to_dict

            profile_data, family = profile_to_dict(profile), profile.family
        now = self.clock()
        stamp = now.isoformat(timespec="seconds")
        prefix = f"{now:%Y%m%d}-{self.bench}-"
        number = self._next_number(prefix)
        for _ in range(10_000):
            case_id = f"{prefix}{number:03d}"
            data = ordered({
                "format": CASE_FORMAT, "id": case_id, "bench": self.bench, "status": "open",
                "opened": stamp, "updated": stamp, "closed": None, "customer": customer or "",
                "set": {"source": str(profile_source or ""), "profile": profile_data},
                "complaint": complaint or "", "symptom": symptom, "family": family,
                "knowledge": knowledge_version or "", "apprentice": bool(apprentice),
                "acknowledged": [], "events": [], "conclusion": None, "off_graph": None,
                "parts": [], "outcome": None, "minutes": None, "reopened_from": reopened_from,
            })
            try:
                lock = self._acquire(case_id)
            except CaseLockedError:
                number += 1
                continue
            try:
                created = self._create_exclusive(case_id, dump_case(data))
            except BaseException:
                self._release(case_id, lock)
                raise
            if created:
                return OpenCase(self, case_id, data, lock)
            self._release(case_id, lock)
            number += 1
        raise CaseError("no free case number for today", file=str(self.folder))  # pragma: no cover

    def _create_exclusive(self, case_id: str, payload: bytes) -> bool:
        """Put the first version of a case in place only if no file has the name; False if taken."""
        path = self.path_for(case_id)
        try:
            tmp = _write_temp(self.folder, case_id, payload)
        except OSError as exc:
            raise CaseError(f"the new case could not be written ({exc.strerror or exc})",
                            file=str(path), hint="check that the cases folder is writable") \
                from None
        try:
            try:
                os.link(tmp, path)          # atomic and exclusive: fails if the name exists
            except FileExistsError:
                return False
            except OSError:
                # no hard links here (some network folders): claim the name, then replace
                try:
                    fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o644)
                except FileExistsError:
                    return False
                os.close(fd)
                try:
                    os.replace(tmp, path)
                except OSError:
                    try:
                        path.unlink()       # give back the claimed (still empty) name
                    except OSError:
                        pass
                    raise
                tmp = None
            fsync_dir(self.folder)
            return True
        except OSError as exc:
            raise CaseError(f"the new case could not be written ({exc.strerror or exc})",
                            file=str(path), hint="check that the cases folder is writable") \
                from None
        finally:
            if tmp is not None:
                try:
                    tmp.unlink()
                except OSError:
                    pass
