"""``faultwise review`` with nothing changed is answered from the review cache, and only then.

The cached answer must be the review itself (compared with a fresh review of the same
cases), the graph must not be loaded for it, and any change to a case file, to the set of
case files or to the knowledge must recompute it. The review figures themselves are
checked by hand in tests/test_review.py; here only "same answer, recomputed when due".
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest
from review_case_factory import make_case, write_case

import faultwise.graph.knowledge as knowledge_module
from faultwise.cli import main
from faultwise.cases.index import INDEX_NAME

KB = Path(__file__).parent / "fixtures" / "kb_review"


@pytest.fixture
def shop(tmp_path):
    kb = tmp_path / "knowledge"
    shutil.copytree(KB, kb)
    cases = tmp_path / "cases"
    for i, (fault, day) in enumerate((("supply.dry-first-cap", 0), ("supply.dry-first-cap", 3),
                                      ("audio.leaky-coupling-cap", 9))):
        write_case(cases, make_case(f"c{i}", symptom="hum-loud", fault=fault, day=day))
    return cases, kb


@pytest.fixture
def loads(monkeypatch):
    """Count the knowledge loads the review command makes."""
    calls = []
    real = knowledge_module.load_knowledge

    def spy(*args, **kwargs):
        calls.append(args)
        return real(*args, **kwargs)

    monkeypatch.setattr(knowledge_module, "load_knowledge", spy)
    return calls


def review(shop, capsys) -> dict:
    cases, kb = shop
    assert main(["review", "--cases", str(cases), "--knowledge", str(kb), "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def without_index(doc: dict) -> dict:
    return {k: v for k, v in doc.items() if k != "index"}


def test_second_run_is_the_same_review_without_loading_the_graph(shop, capsys, loads):
    first = review(shop, capsys)
    assert len(loads) == 1
    assert sorted(p.name for p in shop[0].iterdir() if p.name.startswith(".")) == [INDEX_NAME]
    second = review(shop, capsys)
    assert len(loads) == 1                                   # no graph loaded
    assert without_index(second) == without_index(first)
    assert second["index"]["parsed"] == 0 and "cache" in second["index"]["note"]
    assert first["cases"] == 3


def test_a_changed_case_recomputes(shop, capsys, loads):
    cases, _ = shop
    first = review(shop, capsys)
    # same size on purpose: the stat still changes (mtime), so the generation does
    path = cases / "c2.json"
    text = path.read_text(encoding="utf-8")
    path.write_text(text.replace('"closed"', '"open"  ', 1), encoding="utf-8")
    second = review(shop, capsys)
    assert len(loads) == 2
    assert second["cases"] == first["cases"] - 1


def test_an_added_case_recomputes(shop, capsys, loads):
    cases, _ = shop
    review(shop, capsys)
    write_case(cases, make_case("c9", symptom="hum-loud", fault="supply.dry-first-cap", day=20))
    second = review(shop, capsys)
    assert len(loads) == 2 and second["cases"] == 4


def test_changed_knowledge_recomputes(shop, capsys, loads):
    _, kb = shop
    first = review(shop, capsys)
    symptoms = kb / "symptoms.yaml"
    symptoms.write_text(symptoms.read_text(encoding="utf-8") + "\n# edited\n", encoding="utf-8")
    second = review(shop, capsys)
    assert len(loads) == 2
    assert second["knowledge"] != first["knowledge"]


def test_other_options_and_a_damaged_cache_recompute(shop, capsys, loads):
    cases, kb = shop
    review(shop, capsys)
    assert main(["review", "--cases", str(cases), "--knowledge", str(kb), "--json",
                 "--reopen-days", "5"]) == 0
    capsys.readouterr()
    assert len(loads) == 2
    import sqlite3

    con = sqlite3.connect(cases / INDEX_NAME, isolation_level=None)
    con.execute("UPDATE meta SET value = '{not json' WHERE key = 'review'")
    con.close()
    again = review(shop, capsys)
    assert len(loads) == 3 and again["cases"] == 3
