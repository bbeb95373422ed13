"""The injected sweep: the CLI contract (DESIGN section 10), the healthy sets, and that a
broken route is caught (a sweep that cannot fail would prove nothing)."""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from faultwise.graph import load_knowledge
from faultwise.shop.sweep import load_demo_sets
from faultwise.shop.sweep_inject import run_inject
from faultwise.core.workspace import bundled_knowledge_dir

KNOWLEDGE = bundled_knowledge_dir()


def _cli(*args):
    return subprocess.run([sys.executable, "-m", "faultwise", "sweep", "--inject", *args],
                          capture_output=True, text=True, timeout=600)


def test_json_contract_on_the_transistor_sets():
    proc = _cli("--json", "--family", "transistor")
    doc = json.loads(proc.stdout)
    inj = doc["inject"]
    for key in ("sets", "modelled_faults", "faults", "walks", "found", "wrong", "missed",
                "healthy_blamed"):
        assert key in inj
    assert inj["sets"] == 2 and inj["walks"] > 0
    assert inj["found"] + len(inj["wrong"]) + len(inj["missed"]) + len(inj["explained"]) \
        == inj["walks"]
    assert inj["healthy_blamed"] == []
    for row in doc["optimal"]:
        assert set(row) >= {"symptom", "family", "minutes", "optimal_minutes", "ratio"}
        # the bound is a real optimum: no order beats it, so the walk cannot either
        assert row["optimal_minutes"] <= row["minutes"] + 1e-6
    assert proc.returncode == (0 if doc["ok"] else 1)
    assert "Traceback" not in proc.stderr


def _copy(tmp_path) -> Path:
    kb = tmp_path / "kb"
    shutil.copytree(KNOWLEDGE, kb, ignore=shutil.ignore_patterns("__pycache__", "learned.yaml"))
    return kb


def test_a_wrong_route_is_caught(tmp_path):
    kb = _copy(tmp_path)
    path = kb / "graph" / "supply.yaml"
    text = path.read_text()
    # swap the conclusions of two heater checks: both faults stay reachable, each is misnamed
    a = "outcomes: {high: supply.open-heater-output, otherwise: cleared}"
    b = "outcomes: {high: supply.open-heater-if, otherwise: cleared}"
    assert a in text and b in text
    path.write_text(text.replace(a, "@A@").replace(b, a).replace("@A@", b))
    k = load_knowledge(kb)
    sets = {"series-string": load_demo_sets(kb / "sets", kb)["series-string"][:1]}
    rep = run_inject(k, sets, band_pass=False, optimal=False)
    wrong = {(w.fault, w.concluded) for w in rep.wrong}
    assert ("supply.open-heater-output", "supply.open-heater-if") in wrong
    assert not rep.ok


def test_a_band_that_hides_the_fault_is_caught(tmp_path):
    """A set profile whose first capacitor is already tiny: x0.1 then hides nothing of the
    ripple band, the walk still finds the fault or the sweep says it missed: never silent."""
    kb = _copy(tmp_path)
    k = load_knowledge(kb)
    sets = load_demo_sets(kb / "sets", kb)
    rep = run_inject(k, {"transistor": sets["transistor"]}, band_pass=True, optimal=False)
    assert len(rep.walks) == len(rep.band_walks)
    assert rep.found == len(rep.walks) - len(rep.wrong) - len(rep.missed)
    assert rep.healthy and not rep.healthy_blamed


def test_bad_sets_folder_is_a_located_error(tmp_path):
    proc = _cli("--sets", str(tmp_path / "nowhere"))
    assert proc.returncode == 1
    assert "sets" in proc.stderr and "Traceback" not in proc.stderr


def test_html_table_per_complaint():
    from faultwise.shop.sweep_inject_report import inject_html, inject_text

    k = load_knowledge(KNOWLEDGE)
    sets = load_demo_sets(KNOWLEDGE / "sets", KNOWLEDGE)
    rep = run_inject(k, {"transistor": sets["transistor"][:1]}, band_pass=False)
    html = inject_html(rep)
    for sym in {r.symptom for r in rep.optimal}:
        assert f"<h3>{sym}</h3>" in html
    assert html.count("<table>") == len({r.symptom for r in rep.optimal})
    assert "worst:" in inject_text(rep)


def test_known_misses_are_explained_and_checked(tmp_path):
    from faultwise.core.errors import FaultwiseError
    from faultwise.graph.inject_known import load_known
    from faultwise.graph.lint import lint

    k = load_knowledge(KNOWLEDGE)
    known = load_known(k, KNOWLEDGE)
    sets = load_demo_sets(KNOWLEDGE / "sets", KNOWLEDGE)
    one = {"transistor": [d for d in sets["transistor"] if d.name == "demo-si-npn-portable.yaml"]}
    plain = run_inject(k, one, band_pass=False, optimal=False)
    explained = run_inject(k, one, band_pass=False, optimal=False, known=known)
    assert explained.explained and len(plain.missed) == len(explained.missed) + len(explained.explained)
    for w in explained.explained:
        assert (w.set_name, w.fault) in known
    kb = _copy(tmp_path)
    path = kb / "inject_known.yaml"
    path.write_text(path.read_text().replace("found_by: if.tr-gain-test", "found_by: if.tr-if-peak"))
    with pytest.raises(FaultwiseError, match="cannot reach"):
        load_known(load_knowledge(kb), kb)
    assert any("cannot reach" in e.message for e in lint(kb).errors)


def test_readings_anywhere_in_a_faulty_band_never_blame_another_part():
    """The second pass draws each reading anywhere in the broken set's band (seeded). A walk
    may then end without a conclusion (the readings overlap the healthy band and the walk
    says so), but it must never name a different part: at the bench that part would be
    changed for nothing. Before the both-ends rule, a dried first capacitor ended at the
    oscillator feed resistor or the first audio plate resistor, an open IF winding at the IF
    bias resistor, and an under-biased output pair at an open output transistor."""
    k = load_knowledge(KNOWLEDGE)
    sets = load_demo_sets(KNOWLEDGE / "sets", KNOWLEDGE)
    rep = run_inject(k, sets, band_pass=True, optimal=False)
    assert len(rep.band_walks) == len(rep.walks) > 2000
    blamed = [(w.set_name, w.fault, w.symptom, w.concluded) for w in rep.band_walks
              if w.concluded is not None and w.concluded != w.fault]
    assert blamed == []
