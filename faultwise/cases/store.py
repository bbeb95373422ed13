"""The case store: one JSON file per job, written atomically after every event.

DESIGN section 8; the format is in :mod:`faultwise.cases.schema`. A case file is
replaced whole through a temp file in the same folder (write, flush, fsync, rename, fsync the
folder), so a crash leaves either the old or the new file, never half of one. A lock keeps
two benches off one open case: filelock's SoftFileLock on ``<id>.lock`` (exclusive
creation, so it works on a shared network folder; a holder on this host whose process died
is taken over, another host's lock is respected) and ``<id>.lock-owner`` beside it naming
the bench for messages (:mod:`faultwise.cases.lock`). A damaged file is reported with its
reason and never written. A new case takes the next free number of the day for the bench
and is put in place exclusively (a hard link, or an exclusive create where the folder has
none), so two benches never get one id. Ids and file names: :mod:`faultwise.cases.ids`;
the folder's listing: :mod:`faultwise.cases.listing`.
"""

from __future__ import annotations

import os
import re
from collections.abc import Callable, Mapping
from datetime import UTC, datetime
from pathlib import Path
from typing import TYPE_CHECKING, Any, Protocol

from faultwise.cases.codec import CASE_FORMAT, _ordered_event, dump_case, ordered, read_case_bytes
from faultwise.cases.ids import case_path, next_case_number
from faultwise.cases.listing import Listing, list_cases
from faultwise.cases.lock import CaseLocks, LockInfo, pid_alive, safe_host
from faultwise.core.atomic import TEMP_SUFFIX, atomic_write, fsync_dir, write_temp
from faultwise.core.errors import CaseError, CaseLockedError
from faultwise.core.workspace import check_bench

if TYPE_CHECKING:
    from filelock import BaseFileLock

    from faultwise.profile.model import Profile

_TEMP_RE = re.compile(r"^\.(?P<id>[A-Za-z0-9_-]+)\.(?P<host>[A-Za-z0-9_-]*)\.(?P<pid>\d+)\."
                      r"[0-9a-f]+" + re.escape(TEMP_SUFFIX) + "$")


# ----------------------------------------------------------------------------- helpers

class RecordsCase(Protocol):
    """What ``OpenCase.record`` takes: a walk (:class:`faultwise.walk.state.Walk`)."""

    def to_case_fields(self) -> dict[str, Any]: ...


def _write_temp(folder: Path, case_id: str, payload: bytes) -> Path:
    """``.<id>.<host>.<pid>.<hex>.fwtmp``: the host and pid let a stale temp be traced."""
    return write_temp(folder, f"{case_id}.{safe_host()}.{os.getpid()}", payload)


def _now_text(clock: Callable[[], datetime]) -> str:
    return clock().isoformat(timespec="seconds")


def _utc_now() -> datetime:
    return datetime.now(UTC).astimezone()


# --------------------------------------------------------------------------- open case

class OpenCase:
    """A case held by this bench: its data, saved atomically after every change."""

    def __init__(self, store: CaseStore, case_id: str, data: Mapping[str, Any],
                 lock: BaseFileLock) -> None:
        self.store = store
        self.id = case_id
        self.path = store.path_for(case_id)
        self.data = ordered(data)
        self._lock = lock

    def __enter__(self) -> OpenCase:
        return self

    def __exit__(self, *exc: object) -> None:
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
                         temp_prefix=f"{self.id}.{safe_host()}.{os.getpid()}")
        except OSError as exc:
            raise CaseError(f"the case {self.id} could not be saved ({exc.strerror or exc})",
                            file=str(self.path),
                            hint="check that the cases folder exists, is writable and has "
                                 "space, then save again; nothing is lost yet") from None

    def update(self, **fields: Any) -> None:
        """Set top-level fields and save."""
        self.data.update(fields)
        self.data = ordered(self.data)
        self.data["updated"] = _now_text(self.store.clock)
        self.save()

    def append(self, event: Mapping[str, Any]) -> dict[str, Any]:
        """Number the event, append it and save; returns the stored event."""
        self._require_open()
        stored = _ordered_event(dict(event))
        stored["n"] = len(self.data["events"]) + 1
        stored.setdefault("at", _now_text(self.store.clock))
        self.data["events"].append(stored)
        self.data["updated"] = _now_text(self.store.clock)
        self.save()
        return stored

    def record(self, walk: RecordsCase) -> None:
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

    def __init__(self, folder: str | os.PathLike[str], bench: str,
                 clock: Callable[[], datetime] | None = None) -> None:
        self.folder = Path(folder)
        self.bench = check_bench(bench)
        self.clock = clock or _utc_now
        self.host = safe_host()
        self.locks = CaseLocks(self.folder, self.bench, self.clock)
        self.remove_stale_temps()

    # ----- paths

    def path_for(self, case_id: str) -> Path:
        """The case file of an id; CaseError unless the id is letters, digits, '-' and '_'."""
        return case_path(self.folder, case_id)

    def remove_stale_temps(self) -> list[Path]:
        """Delete our own temp files left by a crash (this host, dead process)."""
        removed = []
        if not self.folder.is_dir():
            return removed
        for entry in self.folder.iterdir():
            m = _TEMP_RE.match(entry.name)
            if not m or m["host"] != self.host or pid_alive(int(m["pid"])):
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
        return self.locks.info(case_id)

    def _acquire(self, case_id: str) -> BaseFileLock:
        return self.locks.acquire(case_id)

    def _release(self, case_id: str, lock: BaseFileLock) -> None:
        self.locks.release(case_id, lock)

    # ----- reading

    def read(self, case_id_or_path: str | os.PathLike[str]) -> dict[str, Any]:
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

    def _resolve(self, case_id_or_path: str | os.PathLike[str]) -> Path:
        if isinstance(case_id_or_path, os.PathLike) or str(case_id_or_path).endswith(".json"):
            return Path(case_id_or_path)
        return self.path_for(str(case_id_or_path))

    def list(self) -> Listing:
        """Every case file of the folder, open and closed, and the damaged ones by name."""
        return list_cases(self.folder, self.lock_info)

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

    def new_case(self, profile: Profile | Mapping[str, Any], profile_source: str,
                 complaint: str, symptom: str, customer: str = "", apprentice: bool = False,
                 knowledge_version: str = "", reopened_from: str | None = None) -> OpenCase:
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
        number = next_case_number(self.folder, prefix)
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
