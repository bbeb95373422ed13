"""The case layer: the case store and file codec, the case schema, summaries and the index.

The names below are re-exported from :mod:`faultwise.cases.store` and :mod:`faultwise.cases.codec` so that the old
``from faultwise.cases import ...`` keeps working; code inside faultwise imports the
submodules directly.
"""

from __future__ import annotations

from faultwise.cases.codec import CASE_FORMAT, CASE_KEYS, dump_case, ordered, read_case_bytes
from faultwise.cases.store import CaseStore, case_path, check_bench

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
