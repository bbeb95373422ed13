"""The case layer: store, lock, ids, listing, file codec, schema, summaries and the index.

The names below are re-exported from the submodules so that the old
``from faultwise.cases import ...`` keeps working; code inside faultwise imports the
submodules directly.
"""

from __future__ import annotations

from faultwise.cases.codec import CASE_FORMAT, CASE_KEYS, dump_case, ordered, read_case_bytes
from faultwise.cases.ids import case_path
from faultwise.cases.store import CaseStore
from faultwise.core.workspace import check_bench

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
