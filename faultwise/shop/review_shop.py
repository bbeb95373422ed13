"""Review over the whole shop: skipped checks, off-graph findings, faults never reached,
cases back after a repair, and job minutes by month.

Off-graph findings are grouped greedily by rapidfuzz's token_set_ratio (``SIMILARITY``, 0 to
100), the most frequent text first: each group is a candidate new fault node. A case is
back after a repair when its ``reopened_from`` names a case, or when the same customer
brings the same set (by label) within ``REOPEN_DAYS`` of a case of theirs closed as
repaired.
"""

from __future__ import annotations

from collections import Counter, defaultdict
from collections.abc import Iterable, Mapping
from datetime import date
from typing import TYPE_CHECKING

from faultwise.cases.summary import pairs
from faultwise.shop.review_results import (FindingGroup, MonthMinutes, Reopened, SkippedCheck,
                                           UnreachedFault, node_title)

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge

REOPEN_DAYS = 30
SIMILARITY = 75          # rapidfuzz token_set_ratio, 0-100, for grouping findings


def skipped_checks(knowledge: Knowledge | None, cases: Iterable[Mapping]) -> list[SkippedCheck]:
    """Checks by how often they were skipped, with the reasons given."""
    reasons: dict[str, Counter] = defaultdict(Counter)
    for s in cases:
        for node, reason in pairs(s.get("skips", ())):
            reasons[node][reason.strip() or "(no reason given)"] += 1
    out = [SkippedCheck(node, node_title(knowledge, node), sum(r.values()),
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


def never_reached(knowledge: Knowledge | None, cases: Iterable[Mapping]) -> list[UnreachedFault]:
    """Faults of the graph that no closed case concluded."""
    if knowledge is None:
        return []
    seen = {s.get("fault") for s in cases}
    out = []
    for node in knowledge.nodes.values():
        if node.kind == "fault" and node.id not in seen:
            out.append(UnreachedFault(node.id, node.title, node.stage, tuple(node.families),
                                      node.causes))
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
