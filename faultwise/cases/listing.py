"""The cases folder listed: every case file summarised, open and closed, and the damaged ones.

A listing reads each ``*.json`` of the folder (never a hidden file, a folder or a FIFO
named like a case: reading a FIFO blocks), validates it through
:func:`faultwise.cases.codec.read_case_bytes`, and keeps a file it cannot read as a
:class:`DamagedFile` with the reason, untouched. An open case carries who holds its lock.
The same ``DamagedFile`` record is used by the index and by review.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from faultwise.cases.codec import read_case_bytes
from faultwise.cases.ids import is_case_id
from faultwise.cases.lock import LockInfo
from faultwise.core.errors import DamagedCaseError


@dataclass(frozen=True)
class CaseSummary:
    """One case as a listing shows it."""

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
    """The cases of a folder: open, closed (each in file-name order) and damaged."""

    open: tuple[CaseSummary, ...]
    closed: tuple[CaseSummary, ...]
    damaged: tuple[DamagedFile, ...]


LockInfoFn = Callable[[str], LockInfo | None]


def list_cases(folder: Path, lock_info: LockInfoFn) -> Listing:
    """Every case file of the folder, open and closed, and the damaged ones by name."""
    opened, closed, damaged = [], [], []
    if not folder.is_dir():
        return Listing((), (), ())
    for path in sorted(folder.glob("*.json")):
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
        summary = case_summary(path, data, lock_info)
        (closed if summary.status == "closed" else opened).append(summary)
    return Listing(tuple(opened), tuple(closed), tuple(damaged))


def case_summary(path: Path, data: dict, lock_info: LockInfoFn) -> CaseSummary:
    """The listing's summary of one case's data (who holds it, when it is open)."""
    conclusion = data.get("conclusion") if isinstance(data.get("conclusion"), dict) else {}
    profile = (data.get("set") or {}).get("profile") if isinstance(data.get("set"), dict) else {}
    label = profile.get("label") if isinstance(profile, dict) else None
    status = str(data.get("status") or "open")
    case_id = str(data.get("id"))
    locked = lock_info(case_id) if status != "closed" and is_case_id(case_id) else None
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
