"""The part of a case file the shop review needs, as plain JSON-ready data.

The review reads thousands of cases; the index (:mod:`faultwise.cases.index`) stores the compact
summary built here, so an unchanged case is never parsed twice. Case format:
:mod:`faultwise.cases.schema`; reading and damage detection: :func:`faultwise.cases.store.read_case_bytes`.
"""

from __future__ import annotations

from datetime import datetime, timezone

SUMMARY_VERSION = 2          # bump when summarise() changes: the index is then rebuilt


def parse_time(text: object) -> datetime | None:
    """ISO 8601 text -> datetime, None when absent or unreadable."""
    if not isinstance(text, str) or not text:
        return None
    try:
        return datetime.fromisoformat(text)   # Python 3.11 reads "Z" too
    except ValueError:
        return None


def _text(value: object) -> str:
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


def _number(value: object) -> float | None:
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return float(value)
    return None


def _str(value: object) -> str:
    return value if type(value) is str else _text(value)


def norm_text(text: str) -> str:
    """Lower case, runs of white space as one space: for matching customers and sets."""
    return " ".join(str(text).lower().split())


def summarise(case: dict, file: str) -> dict:
    """What the review needs of one case: plain JSON-ready data, compact (it is stored).

    ``checks``: node, outcome, node, outcome, ... of the diagnose-phase answers in order
    (flat); ``skips``: node, reason, ... (flat); ``off_graph``: findings; ``to_fault_min``:
    minutes from ``opened`` to the last diagnose-phase event (the one that reached the
    conclusion), as recorded; ``t_open``/``t_close``: POSIX seconds; ``open_day``/``day``/
    ``month``: the dates as recorded (``day`` is the close's, else the opening's); ``who``:
    customer and set, normalised, for spotting a set that comes back ("" with no customer).
    """
    checks, skips, findings = [], [], []
    last_at = None
    events = case.get("events")
    for ev in events if type(events) is list else ():
        if type(ev) is not dict:
            continue
        kind = ev.get("type")
        if kind == "answer":
            if ev.get("phase", "diagnose") == "diagnose":
                checks += (_str(ev.get("node")), _str(ev.get("outcome")))
                last_at = ev.get("at")
        elif kind == "skip":
            skips += (_str(ev.get("node")), _str(ev.get("reason")))
            if ev.get("phase", "diagnose") == "diagnose":
                last_at = ev.get("at")
        elif kind == "off-graph" and ev.get("finding"):
            findings.append(_str(ev.get("finding")))
    off = case.get("off_graph")
    if not findings and off:
        findings.append(_text(off.get("finding") if isinstance(off, dict) else off))
    conclusion = case.get("conclusion")
    conclusion = conclusion if type(conclusion) is dict else {}
    opened, closed = parse_time(case.get("opened")), parse_time(case.get("closed"))
    at_fault = parse_time(last_at)
    to_fault = None
    if opened is not None and at_fault is not None:
        try:
            to_fault = max(0.0, (at_fault - opened).total_seconds() / 60.0)
        except TypeError:  # one time with a zone, one without
            to_fault = None
    customer = _text(case.get("customer"))
    when = closed or opened
    day = when.date().isoformat() if when else ""
    return {
        "id": _text(case.get("id")) or file.removesuffix(".json"),
        "status": _text(case.get("status")),
        "symptom": _text(case.get("symptom")),
        "family": _text(case.get("family")),
        "outcome": _text(case.get("outcome")),
        "minutes": _number(case.get("minutes")),
        "fault": _text(conclusion.get("fault")),
        "reopened_from": _text(case.get("reopened_from")),
        "checks": checks,
        "skips": skips,
        "off_graph": findings,
        "to_fault_min": to_fault,
        "t_open": _stamp(opened),
        "t_close": _stamp(closed),
        "open_day": opened.date().isoformat() if opened else "",
        "day": day,
        "month": day[:7] if closed else "",
        "who": (norm_text(customer) + " | " + norm_text(_set_name(case)))
        if customer.strip() else "",
    }


def pairs(flat: list) -> zip:
    """(a, b) pairs of a flat [a, b, a, b, ...] list (summary ``checks`` and ``skips``)."""
    it = iter(flat)
    return zip(it, it)


def _stamp(t: datetime | None) -> float | None:
    """POSIX seconds of an aware time (a naive one is taken as UTC), None for None."""
    if t is None:
        return None
    if t.tzinfo is None:
        t = t.replace(tzinfo=timezone.utc)
    return t.timestamp()
