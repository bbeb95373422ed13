"""Case files as bytes: the fixed key order, the format check and migration, damage found on read.

DESIGN section 8; the format is in :mod:`faultwise.cases.schema`. Pure: no file I/O.
"""

from __future__ import annotations

import json
import os
from collections.abc import Callable, Mapping

from faultwise.core.errors import DamagedCaseError

CASE_FORMAT = "faultwise-case/1"
FORMAT_PREFIX = "faultwise-case/"
CASE_KEYS = ("format", "id", "bench", "status", "opened", "updated", "closed", "customer",
             "set", "complaint", "symptom", "family", "knowledge", "apprentice",
             "acknowledged", "events", "conclusion", "off_graph", "parts", "outcome",
             "minutes", "reopened_from")
EVENT_KEYS = ("n", "at", "type", "phase", "node", "expect", "band", "raw", "value", "outcome")


def _migrate_v1(data: dict) -> dict:
    return data


#: format version -> function giving the data of the next version (the last one is current).
MIGRATIONS: dict[str, Callable[[dict], dict]] = {CASE_FORMAT: _migrate_v1}


def migrate(data: dict) -> dict:
    """Bring case data to the current format through MIGRATIONS; ValueError for an unknown version."""
    for _ in range(len(MIGRATIONS)):
        step = MIGRATIONS.get(data.get("format"))
        if step is None:
            break
        data = step(data)
        if data.get("format") == CASE_FORMAT:
            return data
    raise ValueError("unknown format version")


# ------------------------------------------------------------------------ reading bytes

def _damage(file: object, reason: str) -> DamagedCaseError:
    err = DamagedCaseError(f"the case file is damaged ({reason})", file=str(file),
                           hint="it is left as it is; restore it from a backup or move it aside")
    err.reason = reason
    return err


def _ends_early(text: str, exc: json.JSONDecodeError) -> bool:
    """The parser failed on the last line of a document that starts like JSON: cut short."""
    stripped = text.rstrip()
    if stripped[:1] not in "{[" or exc.msg.startswith("Extra data"):
        return False
    return exc.pos >= len(stripped) or "\n" not in stripped[exc.pos:]


def read_case_bytes(raw: bytes, file: str | os.PathLike[str] = "case") -> dict:
    """Bytes of a case file -> migrated case data; DamagedCaseError with ``reason`` otherwise."""
    if not raw.strip():
        raise _damage(file, "empty")
    if b"\x00" in raw:
        raise _damage(file, "binary")
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise _damage(file, "binary") from None
    try:
        data = json.loads(text)
    except json.JSONDecodeError as exc:
        if _ends_early(text, exc):
            raise _damage(file, "truncated") from None
        raise _damage(file, "not JSON") from None
    except (RecursionError, ValueError):   # too deep, or an int past CPython's digit limit
        raise _damage(file, "not JSON") from None
    if not isinstance(data, dict):
        raise _damage(file, "not a mapping")
    fmt = data.get("format")
    if not isinstance(fmt, str) or not fmt.startswith(FORMAT_PREFIX):
        raise _damage(file, "wrong format version")
    try:
        data = migrate(data)
    except ValueError:
        raise _damage(file, "unknown format version") from None
    for key, kind in (("id", str), ("events", list)):
        if not isinstance(data.get(key), kind):
            raise _damage(file, f"missing or bad key '{key}'")
    if not all(isinstance(e, dict) for e in data["events"]):
        raise _damage(file, "missing or bad key 'events'")
    from faultwise.cases.schema import case_problem

    problem = case_problem(data)
    if problem:
        raise _damage(file, problem)
    return data


def ordered(data: Mapping) -> dict:
    """The case data with keys in CASE_KEYS order (other keys kept after them)."""
    out = {k: data[k] for k in CASE_KEYS if k in data}
    out.update((k, v) for k, v in data.items() if k not in out)
    if isinstance(out.get("events"), list):
        out["events"] = [_ordered_event(e) for e in out["events"]]
    return out


def _ordered_event(event: Mapping) -> dict:
    out = {k: event[k] for k in EVENT_KEYS if k in event}
    out.update((k, v) for k, v in event.items() if k not in out)
    return out


def dump_case(data: Mapping) -> bytes:
    """UTF-8 JSON, indent 2, keys in the fixed order, non-ASCII kept, trailing newline."""
    return (json.dumps(ordered(data), indent=2, ensure_ascii=False) + "\n").encode("utf-8")
