"""The walk: the state machine over the graph and the ranking of the next check.

The names below are re-exported from the submodules (state, scripted, results) so that the old
``from faultwise.walk import ...`` keeps working; code inside faultwise imports the
submodules directly.
"""

from __future__ import annotations

from faultwise.expect.classify import classify, representative_value
from faultwise.walk.results import resolve_choice
from faultwise.walk.scripted import auto_answer, auto_walk, walk_from_case
from faultwise.walk.state import Walk

__all__ = [
    "Walk",
    "auto_answer",
    "auto_walk",
    "classify",
    "representative_value",
    "resolve_choice",
    "walk_from_case",
]
