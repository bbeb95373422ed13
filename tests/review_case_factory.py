"""Build case-file dicts in the format of DEVELOPERS.md "Case file", for the review tests.

Invented data (Larkspur Lane Radio Works, benches B1-B3, invented customers). Times are
minutes after a fixed start so that tests can do the arithmetic by hand.
"""

from __future__ import annotations

import json
from datetime import datetime, timedelta, timezone
from pathlib import Path

START = datetime(2026, 3, 2, 9, 0, tzinfo=timezone.utc)


def at(day: int, minute: float) -> str:
    """ISO time ``day`` days and ``minute`` minutes after START."""
    return (START + timedelta(days=day, minutes=minute)).isoformat()


def make_case(case_id: str, *, symptom: str, family: str = "series-string",
              checks: list[tuple[str, str]] = (), fault: str | None = None,
              fault_title: str = "", outcome: str | None = "repaired", status: str = "closed",
              minutes: float | None = 30, day: int = 0, step_minutes: float = 5,
              skips: list[tuple[str, str]] = (), off_graph: str | None = None,
              customer: str = "", set_label: str = "demo 5-tube series-string table set",
              reopened_from: str | None = None, parts: list[str] = (),
              verify: list[tuple[str, str]] = (), closing: list[tuple[str, str]] = (),
              bench: str = "B1") -> dict:
    """A case: each diagnose answer ``step_minutes`` after the previous one, from ``opened``."""
    events: list[dict] = []
    t = 0.0

    def add(ev: dict) -> None:
        ev = {"n": len(events) + 1, "at": at(day, t), **ev}
        events.append(ev)

    for node, result in checks:
        t += step_minutes
        add({"type": "answer", "phase": "diagnose", "node": node, "raw": result,
             "outcome": result})
    for node, reason in skips:
        add({"type": "skip", "phase": "diagnose", "node": node, "reason": reason})
    if off_graph:
        add({"type": "off-graph", "finding": off_graph})
    if parts:
        add({"type": "parts", "parts": list(parts)})
    for node, result in verify:
        add({"type": "answer", "phase": "verify", "node": node, "raw": result, "outcome": result})
    for node, result in closing:
        add({"type": "answer", "phase": "closing", "node": node, "expect": "safety.leakage_v",
             "band": {"nominal": 0.0, "low": 0.0, "high": 0.75, "unit": "V",
                      "basis": "0.5 mA x 1500 ohm = 0.75 V", "typical": False},
             "raw": f"{result} V", "value": float(result), "outcome": "normal"})
    if status == "closed":
        add({"type": "close", "outcome": outcome, "minutes": minutes})
    closed = at(day, (minutes or t) + 1) if status == "closed" else None
    return {
        "format": "faultwise-case/1",
        "id": case_id,
        "bench": bench,
        "status": status,
        "opened": at(day, 0),
        "updated": events[-1]["at"] if events else at(day, 0),
        "closed": closed,
        "customer": customer,
        "set": {"source": "demo-5-tube-table.yaml",
                "profile": {"format": "faultwise-set/1", "label": set_label, "family": family}},
        "complaint": "test complaint",
        "symptom": symptom,
        "family": family,
        "knowledge": "sha256:0",
        "apprentice": False,
        "acknowledged": [],
        "events": events,
        "conclusion": ({"fault": fault, "title": fault_title,
                        "stage": fault.split(".")[0]} if fault else None),
        "off_graph": off_graph,
        "parts": list(parts),
        "outcome": outcome if status == "closed" else None,
        "minutes": minutes,
        "reopened_from": reopened_from,
    }


def write_case(folder: Path, case: dict) -> Path:
    """Write a case as the store does (indent 2, UTF-8) and return its path."""
    folder.mkdir(parents=True, exist_ok=True)
    path = folder / f"{case['id']}.json"
    path.write_text(json.dumps(case, indent=2) + "\n", encoding="utf-8")
    return path
