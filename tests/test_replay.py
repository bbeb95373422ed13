"""Replay: recorded cases re-walked against the same and a changed knowledge folder.

The changed folder is a copy of tests/fixtures/kb_walk with one edit each; what must change
follows from the p/c order worked by hand in test_rank.py (Heckerman, Breese and Rommelse,
1995). Damaged files are compared by SHA-256 before and after.
"""

from __future__ import annotations

import hashlib
import shutil
from datetime import UTC, datetime
from pathlib import Path

import helpers_walk_proc as H
import pytest

from faultwise.cases.store import CaseStore
from faultwise.expect.expected import expect
from faultwise.graph.knowledge import load_knowledge
from faultwise.shop.replay import case_files, replay_case, replay_files
from faultwise.walk.state import Walk

CLOCK = lambda: datetime(2026, 12, 1, 9, 30, tzinfo=UTC)

# name -> actions; each action is (method, argument)
CASES = {
    "cap": [("answer", "58 V"), ("answer", "good"), ("answer", "high-esr"),
            ("record_parts", ["50 uF 160 V electrolytic"]), ("answer", "125 V"),
            ("answer", "0.1 V"), ("close", "repaired")],
    "rectifier": [("answer", "58 V"), ("answer", "weak")],
    "open-mid-walk": [("answer", "58 V"), ("answer", "good")],
    "skip": [("answer", "58 V"), ("skip", "no tube tester"), ("answer", "yes")],
    "resumed": [("answer", "58 V"), ("answer", "good"), ("answer", "high-esr"),
                ("record_parts", ["50 uF"]), ("answer", "60 V"), ("resume_diagnosis", None),
                ("answer", "open")],
    "off-graph": [("answer", "58 V"), ("answer", "good"), ("answer", "ok"), ("answer", "ok"),
                  ("off_graph", "cracked joint at the rectifier socket")],
}


def record_cases(folder: Path) -> dict[str, str]:
    kb = H.knowledge()
    profile = H.series_profile()
    ex = expect(profile)
    store = CaseStore(folder, "B1", clock=CLOCK)
    ids = {}
    for name, actions in CASES.items():
        case = store.new_case(profile, "sets/series.yaml", name, "dead-lights-on",
                              knowledge_version=kb.version)
        walk = Walk(kb, profile, "dead-lights-on", expectations=ex)
        for method, arg in actions:
            if method == "close":
                walk.close(arg, 20)
            elif arg is None:
                getattr(walk, method)()
            else:
                getattr(walk, method)(arg)
            case.record(walk)
        case.close()
        ids[name] = case.id
    return ids


@pytest.fixture
def recorded(tmp_path):
    folder = tmp_path / "cases"
    return folder, record_cases(folder)


def changed_kb(tmp_path: Path, old: str, new: str) -> Path:
    """A copy of the fixture knowledge with one text edit in graph/supply.yaml."""
    dest = tmp_path / "kb_changed"
    shutil.copytree(H.KB, dest)
    path = dest / "graph" / "supply.yaml"
    text = path.read_text()
    assert old in text
    path.write_text(text.replace(old, new))
    return dest


def by_case(report):
    return {Path(r.file).stem: r for r in report.results}


def test_same_knowledge_every_case_same(recorded):
    folder, ids = recorded
    report = replay_files(H.knowledge(), case_files(folder))
    assert report.replayed == len(CASES) and report.same == len(CASES), report.to_json()
    assert report.damaged == () and report.failed == ()
    r = by_case(report)[ids["resumed"]]
    assert r.was == r.now == "supply.open-surge"
    assert by_case(report)[ids["off-graph"]].now is None


def test_cheaper_capacitor_check_changes_paths_not_conclusions(recorded, tmp_path):
    # first-cap-esr at 1 min instead of 4: p/c .5/1 = .5 beats the rectifier's (1/3)/2 = .167,
    # so the capacitor is asked second instead of third.
    folder, ids = recorded
    kb = load_knowledge(changed_kb(tmp_path, "    minutes: 4\n", "    minutes: 1\n"))
    results = by_case(replay_files(kb, case_files(folder)))
    cap = results[ids["cap"]]
    assert not cap.same and cap.step == 2
    assert cap.check_was == "supply.rectifier-test: good"
    assert cap.check_now == "supply.first-cap-esr: high-esr"
    assert cap.was == cap.now == "supply.dry-first-cap"
    rect = results[ids["rectifier"]]
    # The case never answered the capacitor: replay answers it normal ("ok") and goes on.
    assert rect.check_now == "supply.first-cap-esr: ok" and rect.now == "supply.weak-rectifier"
    assert rect.new_path[-1] == ("supply.rectifier-test", "weak")
    # An unfinished case stops where its answers stop: the rectifier answer no longer fits
    # step 2, so its path changes but no conclusion is invented.
    mid = results[ids["open-mid-walk"]]
    assert mid.now is None and not mid.same


def test_rerouted_fault_changes_the_conclusion(recorded, tmp_path):
    # The capacitor check now leads to the surge resistor fault, so dry-first-cap is no
    # longer reachable: weights weak 20, surge 10, primary 15, voice coil 5 (sum 50).
    # Under low-b: first-cap -> {surge} .2, rectifier -> {weak} .4, surge-test -> {surge} .2;
    # renormalised .25, .5, .25; costs 4, 2, 3 -> ratios .0625, .25, .083: rectifier, then
    # surge-test (never answered in the case: replay answers it "ok"), then the capacitor.
    folder, ids = recorded
    kb = load_knowledge(changed_kb(tmp_path, "outcomes: {high-esr: supply.dry-first-cap, ok: cleared}",
                                   "outcomes: {high-esr: supply.open-surge, ok: cleared}"))
    r = by_case(replay_files(kb, case_files(folder)))[ids["cap"]]
    assert (r.same, r.step, r.was, r.now) == (False, 3, "supply.dry-first-cap",
                                              "supply.open-surge")
    assert r.to_json() == {"case": ids["cap"], "step": 3, "was": "supply.dry-first-cap",
                           "now": "supply.open-surge",
                           "check_was": "supply.first-cap-esr: high-esr",
                           "check_now": "supply.surge-test: ok"}


def test_damaged_files_named_unchanged_and_replay_goes_on(recorded):
    folder, ids = recorded
    good = (folder / f"{ids['cap']}.json").read_bytes()
    bad = {"20261201-B1-901.json": good[:200], "20261201-B1-902.json": b"not: json\n",
           "20261201-B1-903.json": b"\x00\x01\x02binary", "20261201-B1-904.json": b"[1, 2]\n",
           "20261201-B1-905.json": good.replace(b"faultwise-case/1", b"faultwise-case/7")}
    for name, content in bad.items():
        (folder / name).write_bytes(content)
    before = {n: hashlib.sha256((folder / n).read_bytes()).hexdigest() for n in bad}
    report = replay_files(H.knowledge(), case_files(folder))
    assert report.replayed == len(CASES) and report.same == len(CASES)
    assert {Path(f).name: r for f, r in report.damaged} == {
        "20261201-B1-901.json": "truncated", "20261201-B1-902.json": "not JSON",
        "20261201-B1-903.json": "binary", "20261201-B1-904.json": "not a mapping",
        "20261201-B1-905.json": "unknown format version"}
    after = {n: hashlib.sha256((folder / n).read_bytes()).hexdigest() for n in bad}
    assert after == before


def test_case_with_unknown_symptom_is_listed_not_fatal(recorded):
    from faultwise.cases.codec import dump_case

    folder, ids = recorded
    data = CaseStore(folder, "B1").read(ids["cap"])
    data["id"] = "20261201-B1-950"
    data["symptom"] = "no-such-symptom"
    (folder / "20261201-B1-950.json").write_bytes(dump_case(data))
    report = replay_files(H.knowledge(), case_files(folder))
    assert report.replayed == len(CASES)
    assert [c for c, _ in report.failed] == ["20261201-B1-950"]
    assert "unknown symptom" in report.failed[0][1]


def test_replay_reclassifies_against_the_current_band(recorded):
    # The same recorded 58 V against a band whose low end is 50 V reads normal now, so the
    # walk leaves the supply for the audio suspects at step 1.
    folder, ids = recorded
    profile = H.series_profile()
    ex = dict(expect(profile))
    e = ex["supply.rectifier_out_v"]
    from dataclasses import replace

    ex["supply.rectifier_out_v"] = replace(e, low=50.0)
    data = CaseStore(folder, "B1").read(ids["cap"])
    r = replay_case(H.knowledge(), data, expectations=ex)
    assert r.step == 1 and r.check_now == "supply.rect-out: normal"
