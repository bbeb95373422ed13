"""`faultwise walk` and `faultwise replay` as a technician runs them (subprocesses).

Expected paths follow the p/c order worked by hand in test_rank.py; the reading 58 V is
far below any band a 120 V half-wave series-string supply gives for its first capacitor
(trade: about 1.2-1.4 x line RMS, common practice, no source), so it classifies low.
"""

from __future__ import annotations

import hashlib
import json
import subprocess
import sys
from pathlib import Path

import helpers_walk_proc as H
import pytest

PY = "/work/.venv/bin/python" if Path("/work/.venv/bin/python").exists() else sys.executable
ROOT = Path(__file__).resolve().parent.parent
KB = str(H.KB)
SET = str(H.KB / "sets" / "series.yaml")


def fw(*args, cwd=None):
    return subprocess.run([PY, "-m", "faultwise", *args], check=False, capture_output=True, text=True,
                          timeout=120, cwd=cwd or ROOT)


def answers(tmp_path, text: str) -> str:
    path = tmp_path / "answers.yaml"
    path.write_text(text)
    return str(path)


def test_walk_json_to_the_capacitor(tmp_path):
    a = answers(tmp_path, "readings:\n  supply.rectifier_out_v: 58 V\n"
                          "observations:\n  supply.rectifier-test: good\n"
                          "  supply.first-cap-esr: high-esr\n")
    out = fw("walk", SET, "--symptom", "dead-lights-on", "--answers", a, "--knowledge", KB, "--json")
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert doc["conclusion"] == "supply.dry-first-cap"
    assert doc["title"] == "Dried-out first filter capacitor"
    assert [(s["node"], s["outcome"]) for s in doc["steps"]] == [
        ("supply.rect-out", "low"), ("supply.rectifier-test", "good"),
        ("supply.first-cap-esr", "high-esr")]
    assert doc["checks"] == 3 and doc["minutes"] == 2 + 2 + 4
    assert doc["steps"][0]["value"] == 58.0


def test_walk_assume_normal_defaults_to_nominal_marks_it_and_escalates(tmp_path):
    a = answers(tmp_path, "{}\n")
    out = fw("walk", SET, "--symptom", "dead-lights-on", "--answers", a, "--knowledge", KB,
             "--assume-normal")
    assert out.returncode == 0, out.stderr
    assert "supply.rect-out" in out.stdout and "-> normal" in out.stdout
    step_lines = [line for line in out.stdout.splitlines() if line[:4].strip().rstrip(".").isdigit()]
    assert len(step_lines) == 3 and all("[assumed" in line for line in step_lines), out.stdout
    assert "3 answers assumed normal" in out.stdout
    assert "No conclusion: audio.esc-dead" in out.stdout
    assert "3 checks, 5 min." in out.stdout


def test_walk_stops_at_the_first_unanswered_check(tmp_path):
    """A logged job with a forgotten observation: exit 1, the check named with the answers
    it accepts; nothing concluded from invented data."""
    a = answers(tmp_path, "readings:\n  supply.rectifier_out_v: 58 V\n"
                          "observations:\n  supply.first-cap-esr: high-esr\n")
    out = fw("walk", SET, "--symptom", "dead-lights-on", "--answers", a, "--knowledge", KB)
    assert out.returncode == 1
    assert "Traceback" not in out.stderr and out.stderr.count("\n") == 1, out.stderr
    assert "supply.rectifier-test" in out.stderr and "Rectifier tube on the tester" in out.stderr
    assert "weak or good" in out.stderr and "--assume-normal" in out.stderr
    assert "answers.yaml" in out.stderr
    assert "Conclusion" not in out.stdout
    out = fw("walk", SET, "--symptom", "dead-lights-on", "--answers", a, "--knowledge", KB,
             "--json")
    assert out.returncode == 1
    doc = json.loads(out.stdout)
    assert doc["conclusion"] is None
    assert doc["missing"]["node"] == "supply.rectifier-test"
    assert doc["missing"]["section"] == "observations"
    assert doc["missing"]["accepts"] == ["weak", "good"]
    assert [s["node"] for s in doc["steps"]] == ["supply.rect-out"]
    # A missing reading names the expectation and says it takes a reading in its unit.
    b = answers(tmp_path, "{}\n")
    out = fw("walk", SET, "--symptom", "dead-lights-on", "--answers", b, "--knowledge", KB,
             "--json")
    doc = json.loads(out.stdout)
    assert out.returncode == 1 and doc["missing"]["key"] == "supply.rectifier_out_v"
    assert doc["missing"]["accepts"][0] == "a reading in V"


def test_walk_assume_normal_marks_json_and_case(tmp_path):
    a = answers(tmp_path, "readings:\n  supply.rectifier_out_v: 58 V\n"
                          "observations:\n  supply.first-cap-esr: high-esr\n")
    out = fw("walk", SET, "--symptom", "dead-lights-on", "--answers", a, "--knowledge", KB,
             "--json", "--assume-normal")
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert doc["conclusion"] == "supply.dry-first-cap"
    assert [(s["node"], s["assumed"]) for s in doc["steps"]] == [
        ("supply.rect-out", False), ("supply.rectifier-test", True),
        ("supply.first-cap-esr", False)]
    assert doc["assumed"] == ["supply.rectifier-test"]
    # The case: the answer event carries the mark, it passes the case-file shape check and
    # survives a rebuild from the events.
    from faultwise.cases.schema import case_problem
    from faultwise.walk import Walk, auto_walk

    result = auto_walk(H.knowledge(), H.series_profile(), "dead-lights-on",
                       {"supply.rectifier_out_v": "58 V"},
                       {"supply.first-cap-esr": "high-esr"}, expectations=H.expectations(),
                       missing="mark")
    events = result.walk.to_case_fields()["events"]
    assert [e.get("assumed", False) for e in events if e["type"] == "answer"] == \
        [False, True, False]
    rebuilt = Walk.from_events(H.knowledge(), H.series_profile(), "dead-lights-on", events,
                               expectations=H.expectations())
    assert [s.assumed for s in rebuilt.steps] == [False, True, False]
    assert case_problem({"id": "x", "events": events}) is None


@pytest.mark.parametrize("text,needle", [
    ("readings:\n  supply.nope_v: 3\n", "unknown expectation name 'supply.nope_v'"),
    ("readings:\n  supply.rectifier_out_v: lots\n", ":2"),
    ("observations:\n  supply.first-cap-esr: maybe\n", "not a choice"),
    ("observations:\n  supply.rect-out: low\n", "not an observation check"),
    ("answers:\n  x: 1\n", "unknown key 'answers'"),
    ("readings: [1, 2]\n", "must be a mapping"),
    ("readings:\n  supply.rectifier_out_v: 58 V\n   bad indent: [\n", "answers.yaml"),
])
def test_walk_bad_answers_file_is_located(tmp_path, text, needle):
    a = answers(tmp_path, text)
    out = fw("walk", SET, "--symptom", "dead-lights-on", "--answers", a, "--knowledge", KB)
    assert out.returncode == 1
    assert "Traceback" not in out.stderr and needle in out.stderr, out.stderr
    assert out.stderr.count("\n") == 1


def test_walk_unknown_symptom_and_missing_files(tmp_path):
    a = answers(tmp_path, "{}\n")
    for args in (["--symptom", "nope", "--answers", a],
                 ["--symptom", "dead-lights-on", "--answers", str(tmp_path / "missing.yaml")]):
        out = fw("walk", SET, *args, "--knowledge", KB)
        assert out.returncode == 1 and "Traceback" not in out.stderr, out.stderr
    out = fw("walk", str(tmp_path / "none.yaml"), "--symptom", "dead-lights-on", "--answers", a,
             "--knowledge", KB)
    assert out.returncode == 1 and "Traceback" not in out.stderr


def test_replay_cli_json_text_and_damaged(tmp_path):
    import test_replay as R

    folder = tmp_path / "cases"
    ids = R.record_cases(folder)
    damaged = folder / "20261201-B1-999.json"
    damaged.write_bytes(b'{"format": "faultwise-case/1", "id": ')
    digest = hashlib.sha256(damaged.read_bytes()).hexdigest()
    out = fw("replay", "--cases", str(folder), "--knowledge", KB, "--json")
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert doc["replayed"] == len(R.CASES) and doc["same"] == len(R.CASES)
    assert doc["changed"] == []
    assert doc["damaged"] == [{"file": str(damaged), "reason": "truncated"}]
    assert hashlib.sha256(damaged.read_bytes()).hexdigest() == digest
    out = fw("replay", ids["cap"], "--cases", str(folder), "--knowledge", KB)
    assert out.returncode == 0, out.stderr
    assert f"{ids['cap']}  same  supply.dry-first-cap" in out.stdout
    assert "replayed 1 case: 1 same, 0 changed, 0 damaged." in out.stdout
    changed = R.changed_kb(tmp_path, "    minutes: 4\n", "    minutes: 1\n")
    out = fw("replay", "--cases", str(folder), "--knowledge", str(changed), "--json")
    doc = json.loads(out.stdout)
    assert {c["case"]: c["step"] for c in doc["changed"]}[ids["cap"]] == 2


@pytest.mark.parametrize("bad", ["../x", "a/b", "20261201-B1-404"])
def test_replay_bad_case_ids(tmp_path, bad):
    (tmp_path / "cases").mkdir()
    out = fw("replay", bad, "--cases", str(tmp_path / "cases"), "--knowledge", KB)
    assert out.returncode == 1 and "Traceback" not in out.stderr, out.stderr


def test_walk_shipped_knowledge_end_to_end(tmp_path):
    """The demo set and the bundled knowledge: a fault's own signature, written as an
    answers file, walks to that fault (whatever the shipped content holds)."""
    import yaml

    from faultwise.graph.knowledge import load_knowledge
    from faultwise.core.workspace import bundled_knowledge_dir

    kb = load_knowledge(bundled_knowledge_dir())
    faults = sorted(kb.faults_for("dead-lights-on", "series-string"))
    assert faults
    fault = kb.node(faults[0])
    a = tmp_path / "answers.yaml"
    a.write_text(yaml.safe_dump({"readings": dict(fault.signature.readings),
                                 "observations": dict(fault.signature.observations)}))
    # A signature lists only what the fault changes: the rest is assumed normal.
    out = fw("walk", str(ROOT / "knowledge" / "sets" / "demo-5-tube-table.yaml"),
             "--symptom", "dead-lights-on", "--answers", str(a), "--json", "--assume-normal")
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert doc["conclusion"] == fault.id and doc["checks"] == len(doc["steps"]) > 0


def test_replay_takes_folders_as_the_readme_does(tmp_path):
    """`faultwise replay cases` (a README example): a folder means every case in it,
    subfolders too; a folder without cases is one clear sentence."""
    import test_replay as R

    folder = tmp_path / "cases"
    ids = R.record_cases(folder)
    (folder / "2025").mkdir()
    moved = sorted(folder.glob("*.json"))[0]
    moved.rename(folder / "2025" / moved.name)
    out = fw("replay", "cases", "--knowledge", KB, "--json", cwd=tmp_path)
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert doc["replayed"] == len(ids) and doc["same"] == len(ids)
    out = fw("replay", "cases/2025", "--knowledge", KB, "--json", cwd=tmp_path)
    assert out.returncode == 0 and json.loads(out.stdout)["replayed"] == 1
    (tmp_path / "empty").mkdir()
    out = fw("replay", "empty", "--knowledge", KB, cwd=tmp_path)
    assert out.returncode == 1 and "Traceback" not in out.stderr
    assert out.stderr.count("\n") == 1 and "no case files" in out.stderr
