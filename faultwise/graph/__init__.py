"""The decision graph: node model, knowledge-file parsing, applicability, symptom match, lint.

The names below are re-exported from :mod:`faultwise.graph.knowledge` so that the old
``from faultwise.graph import ...`` keeps working; code inside faultwise imports the
submodules directly.
"""

from __future__ import annotations

from faultwise.graph.knowledge import (Knowledge, LoadResult, edges_of, knowledge_files, load_all,
                                       load_knowledge, load_symptoms)

__all__ = [
    "Knowledge",
    "LoadResult",
    "edges_of",
    "knowledge_files",
    "load_all",
    "load_knowledge",
    "load_symptoms",
]
