"""What a shop review holds: per-pair figures, shop-wide findings, the whole review.

Frozen records filled by :mod:`faultwise.shop.review` (with :mod:`faultwise.shop.review_pairs`
and :mod:`faultwise.shop.review_shop`), turned into JSON by ``review.review_to_dict`` and
back by ``review_cache.review_from_dict``. ``node_title`` is the one lookup of a node's
title they all use (empty without knowledge or for an unknown id).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from faultwise.cases.listing import DamagedFile

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge


@dataclass(frozen=True)
class FaultShare:
    """One fault's raw count and shares for a pair; ``smoothed``/``prior`` None if off-graph."""

    fault: str
    title: str
    count: int
    raw: float
    prior: float | None
    smoothed: float | None


@dataclass(frozen=True)
class ListOrder:
    """A suspects list: the priors-only and the data order, each costed with data p."""

    suspects: str
    title: str
    weight: float                       # P(the fault lies under this list), data
    current: tuple[str, ...]
    data: tuple[str, ...]
    current_minutes: float
    data_minutes: float


@dataclass(frozen=True)
class SteadyCheck:
    """A check that gave the same outcome in every case of a pair that made it."""

    check: str
    title: str
    outcome: str
    cases: int


@dataclass(frozen=True)
class PairReview:
    symptom: str
    family: str
    cases: int                          # closed cases of this pair
    concluded: int                      # repaired with a concluded fault (the counts)
    faults: tuple[FaultShare, ...]
    mean_checks: float | None
    mean_minutes: float | None
    orders: tuple[ListOrder, ...]
    current_minutes: float | None
    data_minutes: float | None
    never_varied: tuple[SteadyCheck, ...]
    note: str = ""

    @property
    def saving_minutes(self) -> float | None:
        """Minutes per job the data order saves against the current order."""
        if self.current_minutes is None or self.data_minutes is None:
            return None
        return self.current_minutes - self.data_minutes


@dataclass(frozen=True)
class SkippedCheck:
    check: str
    title: str
    count: int
    reasons: tuple[tuple[str, int], ...]


@dataclass(frozen=True)
class FindingGroup:
    """Off-graph findings that read alike: a candidate new fault node."""

    finding: str
    variants: tuple[str, ...]
    cases: tuple[str, ...]


@dataclass(frozen=True)
class UnreachedFault:
    fault: str
    title: str
    stage: str
    families: tuple[str, ...]
    symptoms: tuple[str, ...]


@dataclass(frozen=True)
class Reopened:
    case: str
    after: str
    rule: str                           # "reopened_from" | "same customer and set"
    days: float | None


@dataclass(frozen=True)
class MonthMinutes:
    month: str                          # YYYY-MM of the close
    jobs: int
    mean_minutes: float


@dataclass(frozen=True)
class Review:
    cases: int
    damaged: tuple[DamagedFile, ...]
    since: str | None
    pairs: tuple[PairReview, ...]
    skipped: tuple[SkippedCheck, ...]
    off_graph: tuple[FindingGroup, ...]
    never_reached: tuple[UnreachedFault, ...]
    reopened: tuple[Reopened, ...]
    months: tuple[MonthMinutes, ...]
    knowledge: str = ""
    parsed: int = 0
    from_index: int = 0
    index_note: str = ""


def node_title(knowledge: Knowledge | None, node_id: str) -> str:
    """The node's title, or '' without knowledge or for an id the graph does not have."""
    if knowledge is None:
        return ""
    node = knowledge.nodes.get(node_id)
    return node.title if node is not None else ""
