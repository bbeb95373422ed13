"""Case ids and their file names: ``YYYYMMDD-<bench>-<nnn>``, one ``<id>.json`` per case.

An id is letters, digits, '-' and '_' (120 at most, so that ``<id>.json``, ``<id>.lock`` and
a temp name stay under the file system's NAME_MAX); anything else is refused with a
CaseError before it becomes a path, so an id can never reach outside the cases folder.
"""

from __future__ import annotations

import os
import re
from pathlib import Path

from faultwise.core.errors import CaseError

# \Z, not "$" (which lets a final newline through); lengths keep names under NAME_MAX.
_ID_RE = re.compile(r"^[A-Za-z0-9_-]{1,120}\Z")


def is_case_id(text: str) -> bool:
    """Whether ``text`` is a valid case id (letters, digits, '-' and '_', 1 to 120)."""
    return isinstance(text, str) and bool(_ID_RE.match(text))


def case_path(folder: str | os.PathLike[str], case_id: str) -> Path:
    """``<folder>/<id>.json``; CaseError unless the id is letters, digits, '-' and '_'."""
    if not is_case_id(case_id):
        raise CaseError(f"'{case_id}' is not a case id", key="case",
                        hint="a case id holds only letters, digits, '-' and '_' (120 at most), "
                             "such as 20261201-B1-001")
    return Path(folder) / f"{case_id}.json"


def next_case_number(folder: Path, prefix: str) -> int:
    """One more than the highest ``<prefix><n>.json`` in the folder (1 when there is none)."""
    pattern = re.compile(re.escape(prefix) + r"(\d+)\.json$")
    numbers = [int(m.group(1)) for p in folder.glob(prefix + "*.json")
               if (m := pattern.match(p.name))]
    return max(numbers, default=0) + 1
