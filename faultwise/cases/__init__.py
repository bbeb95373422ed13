"""The case layer: the case store and file codec, the case schema, summaries and the index.

The names below are re-exported from :mod:`faultwise.cases.store` so that the old
``from faultwise.cases import ...`` keeps working; code inside faultwise imports the
submodules directly.
"""

from __future__ import annotations

from faultwise.cases.store import (CASE_FORMAT, CASE_KEYS, CaseStore, case_path, check_bench,
                                   dump_case, ordered, read_case_bytes)

__all__ = [
    "CASE_FORMAT",
    "CASE_KEYS",
    "CaseStore",
    "case_path",
    "check_bench",
    "dump_case",
    "ordered",
    "read_case_bytes",
]
