"""The walk: the state machine over the graph and the ranking of the next check.

The names below are re-exported from :mod:`faultwise.walk.state` so that the old
``from faultwise.walk import ...`` keeps working; code inside faultwise imports the
submodules directly.
"""

from __future__ import annotations

from faultwise.walk.state import (Walk, auto_answer, auto_walk, classify, representative_value,
                                  resolve_choice, walk_from_case)

__all__ = [
    "Walk",
    "auto_answer",
    "auto_walk",
    "classify",
    "representative_value",
    "resolve_choice",
    "walk_from_case",
]
