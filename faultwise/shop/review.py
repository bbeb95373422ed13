"""Shop review: what the closed cases say about the graph (DESIGN section 9).

Per symptom and family: cases, fault shares (raw counts, and smoothed with the graph's
priors as Dirichlet pseudo-counts through :mod:`faultwise.walk.rank`), mean checks and minutes
to the fault, the expected minutes of the current order (priors only) against the order the
data supports (priors + counts), and checks whose outcome never varied. Over the shop:
checks most often skipped, off-graph findings grouped by similarity (rapidfuzz), faults
never reached, cases back after a repair, and job minutes by month.

Rules:

- Only closed cases count (``status: closed``); ``since`` keeps those closed on or after a
  date. Fault counts take the closed cases whose outcome is ``repaired`` with a concluded
  fault.
- Checks to the fault: diagnose-phase answers of a case with a conclusion; minutes to the
  fault: from ``opened`` to the last diagnose-phase event, as recorded.
- Expected cost of an order: each suspects list reachable for the pair is costed with
  ``rank.expected_cost`` under the data-supported probabilities, for the priors-only order
  and for the data order, and weighted by the data probability that the fault lies under
  that list (the chance the walk needs it); the pair's figure is the weighted sum.
- A case is back after a repair when its ``reopened_from`` names a case, or when the same
  customer brings the same set (by label) within ``reopen_days`` (default 30) of a case of
  theirs closed as repaired.
"""

from __future__ import annotations

import os
from collections import Counter, defaultdict
from dataclasses import dataclass
from datetime import date
from typing import Iterable, Mapping

from faultwise.cases.listing import DamagedFile
from faultwise.cases.summary import pairs
from faultwise.core.errors import FaultwiseError, KnowledgeError

REOPEN_DAYS = 30
STEADY_MIN_CASES = 3
SIMILARITY = 75          # rapidfuzz token_set_ratio, 0-100, for grouping findings


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


# --------------------------------------------------------------------------- helpers

def parse_since(text: str | None) -> date | None:
    """``YYYY-MM-DD`` -> date; InputError-like FaultwiseError with a hint otherwise."""
    if not text:
        return None
    try:
        return date.fromisoformat(text)
    except ValueError:
        raise FaultwiseError(f"'{text}' is not a date", key="--since",
                             hint="write it as YYYY-MM-DD, e.g. 2026-01-31") from None


def _mean(values: Iterable[float]) -> float | None:
    values = list(values)
    return sum(values) / len(values) if values else None


def _title(knowledge, node_id: str) -> str:
    if knowledge is None:
        return ""
    node = knowledge.nodes.get(node_id)
    return node.title if node is not None else ""


def selected_cases(summaries: Iterable[Mapping], since: date | None = None) -> list[Mapping]:
    """The closed cases, closed on or after ``since`` when given."""
    first = since.isoformat() if since is not None else ""
    return [s for s in summaries
            if s.get("status") == "closed" and (not first or s.get("day", "") >= first)]


def fault_counts(cases: Iterable[Mapping]) -> dict[tuple[str, str], Counter]:
    """{(symptom, family): Counter(fault id)} over repaired cases with a concluded fault."""
    out: dict[tuple[str, str], Counter] = defaultdict(Counter)
    for s in cases:
        if s.get("outcome") == "repaired" and s.get("fault"):
            out[(s.get("symptom", ""), s.get("family", ""))][s["fault"]] += 1
    return out


# ------------------------------------------------------------------------ per pair

def _suspects_lists(knowledge, symptom: str, family: str) -> list[str]:
    """Suspects lists a walk for the pair can reach, in breadth-first order from the entry."""
    import networkx as nx

    entry = knowledge.entry(symptom, family)
    g = knowledge.family_graph(family)
    if entry not in g:
        return []
    order = [entry] + [v for _, v in nx.bfs_edges(g, entry)]
    return [n for n in order if knowledge.nodes[n].kind == "suspects"]


def list_orders(knowledge, symptom: str, family: str,
                counts: Mapping[str, int]) -> list[ListOrder]:
    """Every reachable suspects list, ordered by priors only and by priors + counts."""
    from faultwise.walk.rank import expected_cost, fault_probabilities, rank_investigations

    probs = fault_probabilities(knowledge, symptom, family, counts)
    out = []
    for sid in _suspects_lists(knowledge, symptom, family):
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


def _never_varied(knowledge, cases: list[Mapping], min_cases: int) -> list[SteadyCheck]:
    made: Counter = Counter()          # check -> cases that made it
    seen: Counter = Counter()          # (check, outcome) -> cases that had it
    for s in cases:
        flat = s.get("checks", ())
        made.update(set(flat[::2]))
        seen.update(set(zip(flat[::2], flat[1::2])))
    outcomes: dict[str, list[str]] = defaultdict(list)
    for node, outcome in seen:
        outcomes[node].append(outcome)
    out = [SteadyCheck(node, _title(knowledge, node), outcomes[node][0], n)
           for node, n in made.items() if n >= min_cases and len(outcomes[node]) == 1]
    return sorted(out, key=lambda c: (-c.cases, c.check))


def review_pair(knowledge, symptom: str, family: str, cases: list[Mapping],
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
        faults.append(FaultShare(fault, _title(knowledge, fault) or fault, c,
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


# ------------------------------------------------------------------------ shop-wide

def skipped_checks(knowledge, cases: Iterable[Mapping]) -> list[SkippedCheck]:
    """Checks by how often they were skipped, with the reasons given."""
    reasons: dict[str, Counter] = defaultdict(Counter)
    for s in cases:
        for node, reason in pairs(s.get("skips", ())):
            reasons[node][reason.strip() or "(no reason given)"] += 1
    out = [SkippedCheck(node, _title(knowledge, node), sum(r.values()),
                        tuple(sorted(r.items(), key=lambda kv: (-kv[1], kv[0]))))
           for node, r in reasons.items()]
    return sorted(out, key=lambda c: (-c.count, c.check))


def group_findings(findings: list[tuple[str, str]],
                   similarity: float = SIMILARITY) -> list[FindingGroup]:
    """(case id, finding) -> groups of alike findings: greedy, most frequent text first.

    Each ungrouped text in turn seeds a group that takes every ungrouped text scoring at
    least ``similarity`` on rapidfuzz's token_set_ratio (after its default normalisation).
    """
    from rapidfuzz import fuzz, process, utils

    by_text: dict[str, list[str]] = defaultdict(list)
    for case_id, text in findings:
        text = " ".join(text.split())
        if text:
            by_text[text].append(case_id)
    texts = sorted(by_text, key=lambda t: (-len(by_text[t]), t))
    left = list(texts)
    groups = []
    while left:
        seed = left[0]
        hits = process.extract(seed, left, scorer=fuzz.token_set_ratio,
                               processor=utils.default_process, score_cutoff=similarity,
                               limit=None)
        members = {left[i] for _, _, i in hits} | {seed}
        variants = [t for t in left if t in members]
        left = [t for t in left if t not in members]
        cases = sorted({c for t in variants for c in by_text[t]})
        groups.append(FindingGroup(seed, tuple(variants), tuple(cases)))
    return sorted(groups, key=lambda g: (-len(g.cases), g.finding))


def never_reached(knowledge, cases: Iterable[Mapping]) -> list[UnreachedFault]:
    """Faults of the graph that no closed case concluded."""
    if knowledge is None:
        return []
    seen = {s.get("fault") for s in cases}
    out = []
    for node in knowledge.nodes.values():
        if node.kind == "fault" and node.id not in seen:
            out.append(UnreachedFault(node.id, node.title, node.stage, tuple(node.families),
                                      tuple(sorted(node.priors))))
    return sorted(out, key=lambda f: f.fault)


def reopened_cases(summaries: Iterable[Mapping], since: date | None = None,
                   days: float = REOPEN_DAYS) -> list[Reopened]:
    """Cases back after a repair, by ``reopened_from`` or same customer and set in ``days``."""
    summaries = list(summaries)
    by_id = {s.get("id"): s for s in summaries}
    repaired: dict[str, list[tuple[float, str]]] = defaultdict(list)
    for s in summaries:
        if s.get("who") and s.get("t_close") is not None and s.get("status") == "closed" \
                and s.get("outcome") == "repaired":
            repaired[s["who"]].append((s["t_close"], s["id"]))
    first_day = since.isoformat() if since is not None else ""
    window = days * 86400.0
    out = []
    for s in summaries:
        opened = s.get("t_open")
        if first_day and s.get("open_day", "") < first_day:
            continue
        before = s.get("reopened_from")
        if before:
            first = by_id.get(before)
            t0 = first.get("t_close") if first else None
            gap = (opened - t0) / 86400.0 if t0 is not None and opened is not None else None
            out.append(Reopened(s["id"], before, "reopened_from", gap))
            continue
        if opened is None or not s.get("who") or s["who"] not in repaired:
            continue
        earlier = [(t, cid) for t, cid in repaired[s["who"]]
                   if cid != s["id"] and t <= opened <= t + window]
        if earlier:
            t0, cid = max(earlier)
            out.append(Reopened(s["id"], cid, "same customer and set", (opened - t0) / 86400.0))
    return sorted(out, key=lambda r: r.case)


def minutes_by_month(cases: Iterable[Mapping]) -> list[MonthMinutes]:
    """Closed jobs and their mean recorded minutes per month of the close."""
    minutes: dict[str, list[float]] = defaultdict(list)
    for s in cases:
        if s.get("month") and s.get("minutes") is not None:
            minutes[s["month"]].append(float(s["minutes"]))
    return [MonthMinutes(m, len(v), sum(v) / len(v)) for m, v in sorted(minutes.items())]


# ----------------------------------------------------------------------- top level

def review_summaries(summaries: Iterable[Mapping], knowledge=None, *, since: date | None = None,
                     damaged: Iterable = (), reopen_days: float = REOPEN_DAYS,
                     min_cases: int = STEADY_MIN_CASES,
                     similarity: float = SIMILARITY) -> Review:
    """The whole review from case summaries (:func:`faultwise.cases.summary.summarise`)."""
    summaries = list(summaries)
    cases = selected_cases(summaries, since)
    by_pair: dict[tuple[str, str], list] = defaultdict(list)
    for s in cases:
        by_pair[(s.get("symptom", ""), s.get("family", ""))].append(s)
    counts = fault_counts(cases)
    pairs = [review_pair(knowledge, sym, fam, group, dict(counts.get((sym, fam), {})),
                         min_cases=min_cases)
             for (sym, fam), group in by_pair.items()]
    pairs.sort(key=lambda p: (-p.cases, p.symptom, p.family))
    findings = [(s["id"], f) for s in cases for f in s.get("off_graph", ())]
    return Review(
        cases=len(cases),
        damaged=tuple(DamagedFile(d.file, d.reason) for d in damaged),
        since=since.isoformat() if since else None,
        pairs=tuple(pairs),
        skipped=tuple(skipped_checks(knowledge, cases)),
        off_graph=tuple(group_findings(findings, similarity)),
        never_reached=tuple(never_reached(knowledge, cases)),
        reopened=tuple(reopened_cases(summaries, since, reopen_days)),
        months=tuple(minutes_by_month(cases)),
        knowledge=getattr(knowledge, "version", "") if knowledge is not None else "")


def review_scan(scan, knowledge=None, *, since: date | None = None, **options) -> Review:
    """Review the result of :func:`faultwise.cases.index.scan_cases`, with its read counts."""
    from dataclasses import replace

    review = review_summaries(scan.summaries, knowledge, since=since, damaged=scan.damaged,
                              **options)
    return replace(review, parsed=scan.parsed, from_index=scan.from_index,
                   index_note=scan.index_note)


def review_folder(cases_dir: str | os.PathLike, knowledge=None, *, since: date | None = None,
                  use_index: bool = True, progress=None, **options) -> Review:
    """Scan a cases folder through its index and review it; damaged files are listed."""
    from faultwise.cases.index import scan_cases

    scan = scan_cases(cases_dir, use_index=use_index, progress=progress)
    return review_scan(scan, knowledge, since=since, **options)


def review_to_dict(review: Review) -> dict:
    """JSON-ready form of the review (the ``review --json`` document)."""
    def pair(p: PairReview) -> dict:
        return {
            "symptom": p.symptom, "family": p.family, "cases": p.cases,
            "concluded": p.concluded,
            "faults": [{"fault": f.fault, "title": f.title, "count": f.count, "raw": f.raw,
                        "prior": f.prior, "smoothed": f.smoothed} for f in p.faults],
            "mean_checks": p.mean_checks, "mean_minutes": p.mean_minutes,
            "current_minutes": p.current_minutes, "data_minutes": p.data_minutes,
            "saving_minutes": p.saving_minutes,
            "orders": [{"suspects": o.suspects, "title": o.title, "weight": o.weight,
                        "current": list(o.current), "data": list(o.data),
                        "current_minutes": o.current_minutes, "data_minutes": o.data_minutes}
                       for o in p.orders],
            "never_varied": [{"check": c.check, "title": c.title, "outcome": c.outcome,
                              "cases": c.cases} for c in p.never_varied],
            "note": p.note,
        }

    return {
        "cases": review.cases,
        "damaged": [{"file": d.file, "reason": d.reason} for d in review.damaged],
        "since": review.since,
        "knowledge": review.knowledge,
        "pairs": [pair(p) for p in review.pairs],
        "skipped": [{"check": c.check, "title": c.title, "count": c.count,
                     "reasons": [{"reason": r, "count": n} for r, n in c.reasons]}
                    for c in review.skipped],
        "off_graph": [{"finding": g.finding, "variants": list(g.variants),
                       "cases": list(g.cases)} for g in review.off_graph],
        "never_reached": [{"fault": f.fault, "title": f.title, "stage": f.stage,
                           "families": list(f.families), "symptoms": list(f.symptoms)}
                          for f in review.never_reached],
        "reopened": [{"case": r.case, "after": r.after, "rule": r.rule, "days": r.days}
                     for r in review.reopened],
        "months": [{"month": m.month, "jobs": m.jobs, "mean_minutes": m.mean_minutes}
                   for m in review.months],
        "index": {"parsed": review.parsed, "from_index": review.from_index,
                  "note": review.index_note},
    }
