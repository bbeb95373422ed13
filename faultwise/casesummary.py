"""The part of a case file the shop review needs, as plain JSON-ready data.

The review reads thousands of cases; the index (:mod:`faultwise.index`) stores the compact
summary built here, so an unchanged case is never parsed twice. Case format: DEVELOPERS.md,
"Case file"; reading and damage detection: :func:`faultwise.cases.read_case_bytes`.
"""

from __future__ import annotations

from datetime import datetime

SUMMARY_VERSION = 1          # bump when summarise() changes: the index is then rebuilt


def parse_time(text) -> datetime | None:
    """ISO 8601 text -> datetime, None when absent or unreadable."""
    if not isinstance(text, str) or not text:
        return None
    try:
        return datetime.fromisoformat(text.replace("Z", "+00:00"))
    except ValueError:
        return None


def _minutes_between(start, end) -> float | None:
    """(end - start) in minutes, None when either time is missing or they do not compare."""
    a, b = parse_time(start), parse_time(end)
    if a is None or b is None:
        return None
    try:
        return max(0.0, (b - a).total_seconds() / 60.0)
    except TypeError:  # one naive, one aware
        return None


def _text(value) -> str:
    return value if isinstance(value, str) else ("" if value is None else str(value))


def _set_name(case: dict) -> str:
    """The set's label from the copied profile, else the profile file name."""
    s = case.get("set")
    if not isinstance(s, dict):
        return ""
    profile = s.get("profile")
    if isinstance(profile, dict) and isinstance(profile.get("label"), str):
        return profile["label"]
    return _text(s.get("source"))


def _number(value) -> float | None:
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return float(value)
    return None


def summarise(case: dict, file: str) -> dict:
    """What the review needs of one case: plain JSON-ready data (see DEVELOPERS, review).

    ``checks``: [node, outcome] of each diagnose-phase answer in order; ``skips``: [node,
    reason]; ``off_graph``: findings; ``to_fault_min``: minutes from ``opened`` to the last
    diagnose-phase event (the one that reached the conclusion), as recorded.
    """
    checks, skips, findings = [], [], []
    last_diag_at = None
    events = case.get("events")
    for ev in events if isinstance(events, list) else ():
        if not isinstance(ev, dict):
            continue
        kind = ev.get("type")
        phase = ev.get("phase", "diagnose")
        if kind == "answer" and phase == "diagnose":
            checks.append([_text(ev.get("node")), _text(ev.get("outcome"))])
            last_diag_at = ev.get("at")
        elif kind == "skip":
            skips.append([_text(ev.get("node")), _text(ev.get("reason"))])
            if phase == "diagnose":
                last_diag_at = ev.get("at")
        elif kind == "off-graph" and ev.get("finding"):
            findings.append(_text(ev.get("finding")))
    off = case.get("off_graph")
    if not findings and off:
        findings.append(_text(off.get("finding") if isinstance(off, dict) else off))
    conclusion = case.get("conclusion")
    conclusion = conclusion if isinstance(conclusion, dict) else {}
    return {
        "id": _text(case.get("id")) or file.removesuffix(".json"),
        "file": file,
        "status": _text(case.get("status")),
        "bench": _text(case.get("bench")),
        "opened": _text(case.get("opened")),
        "closed": _text(case.get("closed")),
        "customer": _text(case.get("customer")),
        "set": _set_name(case),
        "symptom": _text(case.get("symptom")),
        "family": _text(case.get("family")),
        "outcome": _text(case.get("outcome")),
        "minutes": _number(case.get("minutes")),
        "fault": _text(conclusion.get("fault")),
        "fault_title": _text(conclusion.get("title")),
        "reopened_from": _text(case.get("reopened_from")),
        "checks": checks,
        "skips": skips,
        "off_graph": findings,
        "to_fault_min": _minutes_between(case.get("opened"), last_diag_at),
    }
