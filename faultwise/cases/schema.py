"""The shape of a case file, checked when it is read; the case file format is below.

A case file may have been edited by hand, merged by git or written by another shop tool.
Everything that reads a case (the walk on resume, replay, review, the job report) relies
on the types below, so a file that breaks them is damaged, reported with the first bad key,
and never written. Keys not listed here are kept and ignored (a later format may add them).

Case file format
----------------

One JSON file per case, `<cases>/<id>.json`, UTF-8, indent 2, keys in the order below.
Written atomically (temp file in the same folder, flush, fsync, rename, fsync the folder)
after every event. Id: `YYYYMMDD-<bench>-<nnn>` (letters, digits and `-` only).

```json
{
  "format": "faultwise-case/1",
  "id": "20261201-B1-001",
  "bench": "B1",
  "status": "open",                      // open | closed
  "opened": "2026-12-01T09:30:00+00:00",
  "updated": "...",
  "closed": null,
  "customer": "ticket 4411",
  "set": {"source": "demo-5-tube-table.yaml", "profile": { ...profile as dict... }},
  "complaint": "hums loudly, no stations",
  "symptom": "hum-loud",
  "family": "series-string",
  "knowledge": "sha256:0123abcd...",
  "apprentice": false,
  "acknowledged": ["live-chassis"],      // cautions acknowledged in this case
  "events": [
    {"n": 1, "at": "...", "type": "answer", "phase": "diagnose", "node": "supply.rectifier-out",
     "expect": "supply.rectifier_out_v",
     "band": {"nominal": 146.1, "low": 131.0, "high": 160.0, "unit": "V", "basis": "...", "typical": false},
     "raw": "58 V", "value": 58.0, "outcome": "low"},
    {"n": 2, "at": "...", "type": "answer", "phase": "diagnose", "node": "audio.hum-kind",
     "raw": "ripple-hum", "outcome": "ripple-hum"},
    {"n": 3, "at": "...", "type": "skip", "node": "...", "reason": "no ESR meter"},
    {"n": 4, "at": "...", "type": "note", "text": "..."},
    {"n": 5, "at": "...", "type": "off-graph", "finding": "..."},
    {"n": 6, "at": "...", "type": "parts", "parts": ["50 uF 160 V electrolytic"]},
    {"n": 7, "at": "...", "type": "answer", "phase": "verify", "node": "...", ...},
    {"n": 8, "at": "...", "type": "answer", "phase": "closing", "node": "supply.leakage-check", ...},
    {"n": 9, "at": "...", "type": "close", "outcome": "repaired", "minutes": 55}
  ],
  "conclusion": {"fault": "supply.open-first-cap", "title": "...", "stage": "supply"},
  "off_graph": null,
  "parts": ["50 uF 160 V electrolytic"],
  "outcome": "repaired",                 // repaired | returned-unrepaired | waiting-parts | null
  "minutes": 55,
  "reopened_from": null
}
```

`conclusion`, `off_graph`, `parts`, `outcome` and `minutes` are derived from the events and
written for readers (review, report, other shop tools); the events are the record.
"""

from __future__ import annotations

import math
from collections.abc import Collection
from typing import Any, Mapping

from faultwise.core.vocabulary import EVENT_TYPES

_TEXT, _NUMBER, _FLAG, _LIST_OF_TEXT, _MAP = "text", "number", "flag", "list of text", "mapping"

TOP = {"id": _TEXT, "bench": _TEXT, "status": _TEXT, "opened": _TEXT, "updated": _TEXT,
       "closed": _TEXT, "customer": _TEXT, "set": _MAP, "complaint": _TEXT, "symptom": _TEXT,
       "family": _TEXT, "knowledge": _TEXT, "apprentice": _FLAG, "acknowledged": _LIST_OF_TEXT,
       "conclusion": _MAP, "off_graph": _TEXT, "parts": _LIST_OF_TEXT, "outcome": _TEXT,
       "minutes": _NUMBER, "reopened_from": _TEXT}
NULLABLE = {"closed", "conclusion", "off_graph", "outcome", "minutes", "reopened_from"}
REQUIRED = ("id", "events")

EVENT = {"n": _NUMBER, "at": _TEXT, "type": _TEXT, "phase": _TEXT, "node": _TEXT,
         "expect": _TEXT, "band": _MAP, "raw": _TEXT, "value": _NUMBER, "outcome": _TEXT,
         "reason": _TEXT, "text": _TEXT, "caution": _TEXT, "finding": _TEXT,
         "parts": _LIST_OF_TEXT, "fault": _TEXT, "minutes": _NUMBER, "meter": _MAP,
         "shown": _TEXT, "read_s": _NUMBER, "assumed": _FLAG}
EVENT_NULLABLE = {"expect", "band", "raw", "value", "node", "minutes", "phase", "outcome",
                  "meter"}
EVENT_REQUIRED = {"answer": ("node", "outcome"), "skip": ("node",), "parts": ("parts",),
                  "off-graph": ("finding",), "resume": (), "to-closing": (), "note": ("text",),
                  "acknowledge": ("caution",), "close": ("outcome",), "reopen": ()}
# a reading taken from a bench meter (faultwise.meter): value null when the meter showed OL
METER = {"value": _NUMBER, "unit": _TEXT, "mode": _TEXT, "meter": _TEXT, "at": _TEXT,
         "overload": _FLAG}
BAND = {"nominal": _NUMBER, "low": _NUMBER, "high": _NUMBER, "unit": _TEXT, "basis": _TEXT,
        "typical": _FLAG, "absent_below": _NUMBER}


def _is(value: Any, kind: str) -> bool:
    if kind == _TEXT:
        return isinstance(value, str)
    if kind == _NUMBER:
        return (isinstance(value, (int, float)) and not isinstance(value, bool)
                and math.isfinite(value))
    if kind == _FLAG:
        return isinstance(value, bool)
    if kind == _LIST_OF_TEXT:
        return isinstance(value, list) and all(isinstance(v, str) for v in value)
    return isinstance(value, dict)


def _fields(data: Mapping, spec: Mapping[str, str], nullable: Collection[str],
            where: str) -> str | None:
    for key, kind in spec.items():
        if key not in data:
            continue
        value = data[key]
        if value is None and key in nullable:
            continue
        if not _is(value, kind):
            return f"{where}'{key}' is not {'a ' if kind != _LIST_OF_TEXT else ''}{kind}"
    return None


def case_problem(data: Mapping) -> str | None:
    """The first way ``data`` breaks the case shape, as a short reason, or None when it fits."""
    for key in REQUIRED:
        if key not in data:
            return f"missing key '{key}'"
    if not isinstance(data.get("events"), list):
        return "'events' is not a list"
    problem = _fields(data, TOP, NULLABLE, "")
    if problem:
        return problem
    if "set" in data and not isinstance(data["set"].get("profile"), dict):
        return "'set.profile' is not a mapping"
    for i, event in enumerate(data["events"], start=1):
        problem = _event_problem(event, i)
        if problem:
            return problem
    return None


def _event_problem(event: Any, i: int) -> str | None:
    where = f"event {i}: "
    if not isinstance(event, dict):
        return f"event {i} is not a mapping"
    kind = event.get("type")
    if kind not in EVENT_TYPES:
        return f"{where}unknown type {kind!r}"[:120]
    problem = _fields(event, EVENT, EVENT_NULLABLE, where)
    if problem:
        return problem
    if "n" in event and (not isinstance(event["n"], int) or event["n"] < 0):
        return f"{where}'n' is not a whole number"
    for key in EVENT_REQUIRED[kind]:
        if key not in event:
            return f"{where}missing key '{key}'"
    band = event.get("band")
    if isinstance(band, dict):
        problem = _fields(band, BAND, (), where + "band ")
        if problem:
            return problem
    meter = event.get("meter")
    if isinstance(meter, dict):
        problem = _fields(meter, METER, ("value",), where + "meter ")
        if problem:
            return problem
    return None
