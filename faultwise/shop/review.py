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

This module selects the cases and puts the review together (``review_folder``,
``review_scan``, ``review_summaries``) and gives its JSON form; the per-pair figures are in
:mod:`faultwise.shop.review_pairs`, the shop-wide ones in :mod:`faultwise.shop.review_shop`,
the records in :mod:`faultwise.shop.review_results`.
"""

from __future__ import annotations

import os
from collections import defaultdict
from collections.abc import Iterable, Mapping
from datetime import date
from typing import TYPE_CHECKING, Any

from faultwise.cases.listing import DamagedFile
from faultwise.core.errors import FaultwiseError
from faultwise.shop.review_pairs import STEADY_MIN_CASES, fault_counts, review_pair
from faultwise.shop.review_results import PairReview, Review
from faultwise.shop.review_shop import (REOPEN_DAYS, SIMILARITY, group_findings,
                                        minutes_by_month, never_reached, reopened_cases,
                                        skipped_checks)

if TYPE_CHECKING:
    from faultwise.cases.index import Progress, Scan
    from faultwise.graph.knowledge import Knowledge


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


def selected_cases(summaries: Iterable[Mapping], since: date | None = None) -> list[Mapping]:
    """The closed cases, closed on or after ``since`` when given."""
    first = since.isoformat() if since is not None else ""
    return [s for s in summaries
            if s.get("status") == "closed" and (not first or s.get("day", "") >= first)]


# ----------------------------------------------------------------------- top level

def review_summaries(summaries: Iterable[Mapping], knowledge: Knowledge | None = None, *,
                     since: date | None = None,
                     damaged: Iterable[DamagedFile] = (), reopen_days: float = REOPEN_DAYS,
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


def review_scan(scan: Scan, knowledge: Knowledge | None = None, *, since: date | None = None,
                **options: Any) -> Review:
    """Review the result of :func:`faultwise.cases.index.scan_cases`, with its read counts."""
    from dataclasses import replace

    review = review_summaries(scan.summaries, knowledge, since=since, damaged=scan.damaged,
                              **options)
    return replace(review, parsed=scan.parsed, from_index=scan.from_index,
                   index_note=scan.index_note)


def review_folder(cases_dir: str | os.PathLike, knowledge: Knowledge | None = None, *,
                  since: date | None = None, use_index: bool = True,
                  progress: Progress | None = None, **options: Any) -> Review:
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
