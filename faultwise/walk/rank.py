"""Ordering of suspects by probability over cost (the rule is this docstring).

Decision-theoretic troubleshooting (Heckerman, Breese and Rommelse, 1995, "Decision-theoretic
troubleshooting", Communications of the ACM 38(3)): with one fault present and independent
steps, taking the steps in decreasing p/c minimises the expected cost of repair, and the
expected cost of an order is sum_i c_i * P(not found before step i).

Fault probabilities are Dirichlet posterior means: the graph's prior weights become
pseudo-counts ``alpha_f = S * w_f / sum(w)`` (S = ``knowledge.prior_strength`` equivalent
cases) and the shop's closed cases add their counts ``n_f``: ``p_f = (alpha_f + n_f) / (S + N)``.

Profile-aware ranking: ``applies(node_id) -> bool`` (from
:func:`faultwise.graph.applicability.applies_predicate`) drops the investigations whose target does
not apply to the set on the bench (a suspects list applies when one of its investigations
does, recursively) and sums an investigation's probability over the faults under it that
apply; the shares are then renormalised over the investigations left, as before.
``applies=None`` ranks for the family alone.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, field

from faultwise.core.errors import KnowledgeError
from typing import TYPE_CHECKING

from faultwise.graph.nodes import Check, Investigation, Suspects

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge


@dataclass(frozen=True)
class Ranked:
    """One investigation of a suspects list with the numbers behind its place in the order.

    ``p``: probability that the fault is under it (renormalised over the not-cleared ones);
    ``cost``: minutes; ``ratio``: p / cost (infinite for a zero-cost step with p > 0);
    ``faults``: the fault ids reachable under it; ``counts``: closed-case count per fault.
    """

    investigation: Investigation
    p: float
    cost: float
    ratio: float
    faults: frozenset[str] = frozenset()
    counts: Mapping[str, int] = field(default_factory=dict)

    @property
    def target(self) -> str:
        return self.investigation.target


def _counts(knowledge: Knowledge, symptom: str, family: str, counts: Mapping[str, int] | None) -> Mapping[str, int]:
    if counts is not None:
        return counts
    return knowledge.learned.pair(symptom, family)


def dirichlet_means(weights: Mapping[str, float], counts: Mapping[str, int],
                    strength: float) -> dict[str, float]:
    """p_f = (S w_f / sum w + n_f) / (S + N): Dirichlet-multinomial posterior means (Gelman et al., BDA)."""
    total_w = sum(weights.values())
    n_total = sum(int(counts.get(f, 0)) for f in weights)
    if total_w <= 0:
        weights = {f: 1.0 for f in weights}
        total_w = float(len(weights))
    denominator = strength + n_total
    if denominator <= 0 or not weights:
        return {f: 1.0 / len(weights) for f in weights} if weights else {}
    return {f: (strength * w / total_w + int(counts.get(f, 0))) / denominator
            for f, w in weights.items()}


def fault_probabilities(knowledge: Knowledge, symptom: str, family: str,
                        counts: Mapping[str, int] | None = None) -> dict[str, float]:
    """Dirichlet posterior means over the faults reachable for (symptom, family), sorted by id."""
    faults = sorted(knowledge.faults_for(symptom, family))
    weights = {f: knowledge.fault_weight(f, symptom) for f in faults}
    return dirichlet_means(weights, _counts(knowledge, symptom, family, counts),
                           float(knowledge.prior_strength))


Applies = Callable[[str], bool]
Reach = Callable[[str, str], float]


def target_applies(knowledge: Knowledge, target: str, family: str, applies: Applies | None = None,
                   _depth: int = 0) -> bool:
    """Family, then ``applies``: a check or fault by the predicate, a suspects list when one of
    its investigations applies (recursively)."""
    node = knowledge.nodes.get(target)
    if node is None or not knowledge.applies(node, family):
        return False
    if applies is None:
        return True
    if isinstance(node, Suspects):
        if _depth > len(knowledge.nodes):
            raise KnowledgeError("suspects lists nest in a loop", node=target,
                                 hint="run 'faultwise lint'")
        return any(target_applies(knowledge, sub.target, family, applies, _depth + 1)
                   for sub in node.investigations)
    return bool(applies(target))


def investigation_cost(knowledge: Knowledge, inv: Investigation, family: str, _depth: int = 0,
                       applies: Applies | None = None) -> float:
    """Minutes: the investigation's own, else its target check's, else the sum over a suspects
    target's investigations that apply."""
    if inv.minutes is not None:
        return float(inv.minutes)
    node = knowledge.nodes.get(inv.target)
    if isinstance(node, Check):
        return float(node.minutes)
    if isinstance(node, Suspects):
        if _depth > len(knowledge.nodes):
            raise KnowledgeError("suspects lists nest in a loop", node=inv.target,
                                 hint="run 'faultwise lint'")
        return sum(investigation_cost(knowledge, sub, family, _depth + 1, applies)
                   for sub in node.investigations
                   if target_applies(knowledge, sub.target, family, applies))
    return 0.0   # a fault or escalate named directly costs nothing to reach


def _ratio(p: float, cost: float) -> float:
    if cost > 0:
        return p / cost
    return math.inf if p > 0 else 0.0


def rank_investigations(knowledge: Knowledge, suspects_id: str, symptom: str, family: str,
                        cleared: Iterable[str] = (), counts: Mapping[str, int] | None = None,
                        applies: Applies | None = None,
                        likelihood: Mapping[str, float] | None = None,
                        reach: Reach | None = None) -> list[Ranked]:
    """The not-cleared investigations of a suspects list, best p/c first, ties by written order.

    ``applies(node_id)``: drop investigations whose target does not apply to the set and sum
    each one's probability over the faults under it that apply (None: the family decides).
    ``likelihood``: per fault, how well the answers so far fit it
    (:mod:`faultwise.walk.evidence`); each fault's probability is multiplied by it (missing: 1).
    ``reach(fault, target)``: how much of a fault's weight the investigation of ``target``
    carries (the check is predicted to lead to the fault, or to clear it:
    :meth:`faultwise.walk.evidence.Evidence.reach`); None: all of it. An investigation's p is
    then the chance that it finds the fault, the p of Heckerman's p/c rule.
    """
    node = knowledge.node(suspects_id)
    if not isinstance(node, Suspects):
        raise KnowledgeError(f"'{suspects_id}' is not a suspects list", node=suspects_id,
                             hint="rank only suspects nodes")
    counts = _counts(knowledge, symptom, family, counts)
    probs = fault_probabilities(knowledge, symptom, family, counts)
    if likelihood:
        probs = {f: p * float(likelihood.get(f, 1.0)) for f, p in probs.items()}
    done = set(cleared)
    rows: list[tuple[Investigation, float, frozenset[str]]] = []
    for inv in node.investigations:
        if inv.target in done or inv.target not in knowledge.nodes:
            continue
        if not target_applies(knowledge, inv.target, family, applies):
            continue
        faults = knowledge.faults_under(inv.target, family)
        if applies is not None:
            faults = frozenset(f for f in faults if applies(f))
        if reach is None:
            p = sum(probs.get(f, 0.0) for f in faults)
        else:
            p = sum(probs.get(f, 0.0) * reach(f, inv.target) for f in faults)
        rows.append((inv, p, faults))
    total = sum(p for _, p, _ in rows)
    ranked = []
    for inv, p, faults in rows:
        share = p / total if total > 0 else 1.0 / len(rows)
        cost = investigation_cost(knowledge, inv, family, applies=applies)
        ranked.append(Ranked(inv, share, cost, _ratio(share, cost), faults,
                             {f: int(counts.get(f, 0)) for f in sorted(faults)}))
    order = sorted(range(len(ranked)), key=lambda i: (-ranked[i].ratio, i))
    return [ranked[i] for i in order]


def expected_cost(pairs: list[tuple[float, float]]) -> float:
    """sum_i c_i * (1 - sum_{j<i} p_j): expected cost of taking steps in this order (Heckerman 1995)."""
    total = 0.0
    found = 0.0
    for p, c in pairs:
        total += c * max(0.0, 1.0 - found)
        found += p
    return total
