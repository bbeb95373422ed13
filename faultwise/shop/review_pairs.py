"""Review per (symptom, family): fault shares, the orders the data supports, steady checks.

Fault counts take the closed cases whose outcome is ``repaired`` with a concluded fault.
Shares are raw and smoothed with the graph's priors as Dirichlet pseudo-counts
(:func:`faultwise.walk.rank.fault_probabilities`). Every suspects list a walk for the pair
can reach (breadth-first from the entry, networkx) is ranked by priors only and by priors +
counts, each costed with ``rank.expected_cost`` under the data probabilities, and weighted
by the data probability that the fault lies under it; the pair's figure is the weighted
sum. Checks to the fault count the diagnose-phase answers of a case with a conclusion;
minutes to the fault run from ``opened`` to the last diagnose-phase event. A check whose
outcome never varied over at least ``STEADY_MIN_CASES`` cases is listed.
"""

from __future__ import annotations

from collections import Counter, defaultdict
from collections.abc import Iterable, Mapping
from typing import TYPE_CHECKING

from faultwise.core.errors import KnowledgeError
from faultwise.shop.review_results import (FaultShare, ListOrder, PairReview, SteadyCheck,
                                           node_title)

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge

STEADY_MIN_CASES = 3


def _mean(values: Iterable[float]) -> float | None:
    values = list(values)
    return sum(values) / len(values) if values else None


def fault_counts(cases: Iterable[Mapping]) -> dict[tuple[str, str], Counter]:
    """{(symptom, family): Counter(fault id)} over repaired cases with a concluded fault."""
    out: dict[tuple[str, str], Counter] = defaultdict(Counter)
    for s in cases:
        if s.get("outcome") == "repaired" and s.get("fault"):
            out[(s.get("symptom", ""), s.get("family", ""))][s["fault"]] += 1
    return out


def suspects_lists(knowledge: Knowledge, symptom: str, family: str) -> list[str]:
    """Suspects lists a walk for the pair can reach, in breadth-first order from the entry."""
    import networkx as nx

    entry = knowledge.entry(symptom, family)
    g = knowledge.family_graph(family)
    if entry not in g:
        return []
    order = [entry] + [v for _, v in nx.bfs_edges(g, entry)]
    return [n for n in order if knowledge.nodes[n].kind == "suspects"]


def list_orders(knowledge: Knowledge, symptom: str, family: str,
                counts: Mapping[str, int]) -> list[ListOrder]:
    """Every reachable suspects list, ordered by priors only and by priors + counts."""
    from faultwise.walk.rank import expected_cost, fault_probabilities, rank_investigations

    probs = fault_probabilities(knowledge, symptom, family, counts)
    out = []
    for sid in suspects_lists(knowledge, symptom, family):
        weight = sum(probs.get(f, 0.0) for f in knowledge.faults_under(sid, family))
        if weight <= 0:
            continue
        prior = rank_investigations(knowledge, sid, symptom, family, counts={})
        data = rank_investigations(knowledge, sid, symptom, family, counts=counts)
        p = {r.target: r.p for r in data}
        cost = {r.target: r.cost for r in data}
        out.append(ListOrder(
            suspects=sid, title=knowledge.nodes[sid].title, weight=weight,
            current=tuple(r.target for r in prior), data=tuple(r.target for r in data),
            current_minutes=expected_cost([(p[r.target], cost[r.target]) for r in prior]),
            data_minutes=expected_cost([(r.p, r.cost) for r in data])))
    return out


def _never_varied(knowledge: Knowledge | None, cases: list[Mapping], min_cases: int) -> list[SteadyCheck]:
    made: Counter = Counter()          # check -> cases that made it
    seen: Counter = Counter()          # (check, outcome) -> cases that had it
    for s in cases:
        flat = s.get("checks", ())
        made.update(set(flat[::2]))
        seen.update(set(zip(flat[::2], flat[1::2])))
    outcomes: dict[str, list[str]] = defaultdict(list)
    for node, outcome in seen:
        outcomes[node].append(outcome)
    out = [SteadyCheck(node, node_title(knowledge, node), outcomes[node][0], n)
           for node, n in made.items() if n >= min_cases and len(outcomes[node]) == 1]
    return sorted(out, key=lambda c: (-c.cases, c.check))


def review_pair(knowledge: Knowledge | None, symptom: str, family: str, cases: list[Mapping],
                counts: Mapping[str, int], *, min_cases: int = STEADY_MIN_CASES) -> PairReview:
    """The figures of one (symptom, family) over its closed cases."""
    concluded = [s for s in cases if s.get("fault")]
    n = sum(counts.values())
    smoothed: dict[str, float] = {}
    prior: dict[str, float] = {}
    orders: list[ListOrder] = []
    note = ""
    if knowledge is not None:
        from faultwise.walk.rank import fault_probabilities

        try:
            smoothed = fault_probabilities(knowledge, symptom, family, counts)
            prior = fault_probabilities(knowledge, symptom, family, {})
            orders = list_orders(knowledge, symptom, family, counts)
        except KnowledgeError:
            note = "the knowledge has no walk for this symptom and family"
    faults = []
    for fault in sorted(set(smoothed) | set(counts),
                        key=lambda f: (-counts.get(f, 0), -smoothed.get(f, 0.0), f)):
        c = int(counts.get(fault, 0))
        faults.append(FaultShare(fault, node_title(knowledge, fault) or fault, c,
                                 c / n if n else 0.0, prior.get(fault), smoothed.get(fault)))
    cur = sum(o.weight * o.current_minutes for o in orders) if orders else None
    dat = sum(o.weight * o.data_minutes for o in orders) if orders else None
    return PairReview(
        symptom=symptom, family=family, cases=len(cases), concluded=n, faults=tuple(faults),
        mean_checks=_mean(len(s.get("checks", ())) // 2 for s in concluded),
        mean_minutes=_mean(s["to_fault_min"] for s in concluded
                           if s.get("to_fault_min") is not None),
        orders=tuple(orders), current_minutes=cur, data_minutes=dat,
        never_varied=tuple(_never_varied(knowledge, cases, min_cases)), note=note)
