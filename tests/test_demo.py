"""The demo-case generator: seeded, real walks, and the shipped demo cases replay unchanged."""

from __future__ import annotations

import hashlib
import json
from pathlib import Path

import pytest

from faultwise.cases.store import CaseStore
from faultwise.shop.demo import generate
from faultwise.core.errors import FaultwiseError
from faultwise.graph.knowledge import load_knowledge
from faultwise.shop.replay import case_files, replay_files
from faultwise.core.workspace import bundled_knowledge_dir

REPO_CASES = Path(__file__).resolve().parent.parent / "cases"


def _digest(folder: Path) -> dict[str, str]:
    return {p.name: hashlib.sha256(p.read_bytes()).hexdigest()
            for p in sorted(folder.glob("*.json"))}


def test_same_seed_same_cases(tmp_path):
    a, b = tmp_path / "a", tmp_path / "b"
    generate(bundled_knowledge_dir(), a, seed=3, closed=24, open_cases=2)
    generate(bundled_knowledge_dir(), b, seed=3, closed=24, open_cases=2)
    assert _digest(a) == _digest(b)
    listing = CaseStore(a, "B1").list()
    assert len(listing.closed) == 24 and len(listing.open) == 2 and not listing.damaged


def test_refuses_a_folder_with_cases_unless_forced(tmp_path):
    generate(bundled_knowledge_dir(), tmp_path, seed=1, closed=3, open_cases=0)
    with pytest.raises(FaultwiseError, match="already holds cases"):
        generate(bundled_knowledge_dir(), tmp_path, seed=1, closed=3, open_cases=0)
    generate(bundled_knowledge_dir(), tmp_path, seed=2, closed=3, open_cases=0, force=True)
    assert len(list(tmp_path.glob("*.json"))) == 3


def test_shipped_demo_cases_are_many_and_replay_unchanged():
    """The issue's acceptance: 60+ closed and 3+ open cases; replay gives the same walk."""
    listing = CaseStore(REPO_CASES, "B1").list()
    assert len(listing.closed) >= 60 and len(listing.open) >= 3 and not listing.damaged
    families = {c.family for c in listing.closed}
    assert families == {"series-string", "transformer", "transistor"}
    assert len({c.symptom for c in listing.closed}) >= 12
    assert len({c.bench for c in listing.closed}) == 3
    report = replay_files(load_knowledge(bundled_knowledge_dir()), case_files(REPO_CASES))
    assert report.replayed == len(listing.closed) + len(listing.open)
    assert report.same == report.replayed, [c for c in report.changed][:3]


def test_closed_demo_cases_are_complete():
    for path in sorted(REPO_CASES.glob("*.json")):
        data = json.loads(path.read_text(encoding="utf-8"))
        if data["status"] != "closed":
            continue
        assert data["outcome"] in ("repaired", "returned-unrepaired", "waiting-parts")
        assert data["minutes"] and data["minutes"] > 0
        if data["outcome"] == "repaired":
            assert data["conclusion"] or data["off_graph"], path.name
            if data["family"] != "transistor":
                closing = [e for e in data["events"] if e.get("phase") == "closing"]
                assert closing and closing[-1]["outcome"] == "normal", path.name
