"""Shop review figures against values worked out by hand, damaged files, and --learn.

The knowledge is tests/fixtures/kb_review (prior_strength S = 10). Its priors, the
Dirichlet smoothing p_f = (S w_f / sum w + n_f) / (S + N) and the expected cost
sum_i c_i P(not found before i) follow DEVELOPERS.md "Ordering (rank)" (Heckerman, Breese
and Rommelse, 1995); every expected value below is computed by hand in the comments.
"""

from __future__ import annotations

import hashlib
import json
import subprocess
import sys
from datetime import date
from fractions import Fraction as F
from pathlib import Path

import pytest

from faultwise.graph.knowledge import load_knowledge
from faultwise.shop.review import review_folder, review_to_dict
from faultwise.shop.review_shop import group_findings, reopened_cases
from review_case_factory import make_case, write_case

KB = Path(__file__).parent / "fixtures" / "kb_review"
PY = sys.executable
HUM, DEAD = "hum-loud", "dead-lights-on"
FIRST, SECOND = "supply.first-cap-esr", "supply.second-cap-esr"
COUPLING = "audio.coupling-cap-check"
SKIP_NODE = "supply.rectifier-out"


def seven_cases() -> list[dict]:
    """4 hum cases, 3 dead cases, one open case; answers 5 minutes apart from opening."""
    three = [(FIRST, "good"), (SECOND, "good"), (COUPLING, "positive")]
    return [
        make_case("h1", symptom=HUM, checks=[(FIRST, "bad")], fault="supply.dry-first-cap",
                  minutes=20, day=0),
        make_case("h2", symptom=HUM, checks=three, fault="audio.leaky-coupling-cap", minutes=40,
                  day=10, skips=[(SKIP_NODE, "meter at the other bench")]),
        make_case("h3", symptom=HUM, checks=three, fault="audio.leaky-coupling-cap", minutes=50,
                  day=11, skips=[(SKIP_NODE, "meter at the other bench")]),
        make_case("h4", symptom=HUM, checks=three, fault="audio.leaky-coupling-cap", minutes=30,
                  day=40),
        make_case("d1", symptom=DEAD, checks=[("audio.click-test", "silent"),
                                              ("audio.output-tube-check", "weak")],
                  fault="audio.weak-output", minutes=25, day=12,
                  skips=[(SKIP_NODE, "no isolation transformer")]),
        make_case("d2", symptom=DEAD, checks=[("audio.click-test", "click"),
                                              ("if.if-stage-check", "blocked")],
                  fault="if.open-if-transformer", minutes=60, day=13),
        make_case("d3", symptom=DEAD, checks=[("audio.click-test", "click"),
                                              ("if.if-stage-check", "passes"),
                                              ("oscillator.grid-check", "running"),
                                              ("antenna.loop-check", "continuous")],
                  off_graph="cracked 12BE6 socket arcing", minutes=90, day=41),
        # An open case concludes a fault but is not closed: it counts nowhere.
        make_case("o1", symptom=HUM, checks=[(FIRST, "good"), (SECOND, "bad")],
                  fault="supply.dry-second-cap", status="open", day=42),
    ]


@pytest.fixture(scope="module")
def knowledge():
    return load_knowledge(KB)


@pytest.fixture()
def folder(tmp_path: Path) -> Path:
    for case in seven_cases():
        write_case(tmp_path / "cases", case)
    return tmp_path / "cases"


def _pair(review, symptom):
    return next(p for p in review.pairs if p.symptom == symptom and p.family == "series-string")


def test_counts_and_smoothed_shares(folder, knowledge):
    review = review_folder(folder, knowledge)
    assert review.cases == 7                      # 7 closed; o1 is open
    hum = _pair(review, HUM)
    assert (hum.cases, hum.concluded) == (4, 4)
    shares = {f.fault: f for f in hum.faults}
    # Raw counts: first cap 1, coupling cap 3, second cap 0 (N = 4).
    assert shares["supply.dry-first-cap"].count == 1
    assert shares["audio.leaky-coupling-cap"].count == 3
    assert shares["supply.dry-second-cap"].count == 0
    assert shares["audio.leaky-coupling-cap"].raw == pytest.approx(3 / 4)
    # Weights 60/30/10 (sum 100), S = 10 -> alpha = 6, 3, 1.
    # p = (alpha + n) / (S + N): first (6+1)/14, second (3+0)/14, coupling (1+3)/14.
    assert shares["supply.dry-first-cap"].smoothed == pytest.approx(7 / 14)
    assert shares["supply.dry-second-cap"].smoothed == pytest.approx(3 / 14)
    assert shares["audio.leaky-coupling-cap"].smoothed == pytest.approx(4 / 14)
    # Priors alone: alpha / S = 0.6, 0.3, 0.1.
    assert shares["supply.dry-first-cap"].prior == pytest.approx(0.6)
    assert shares["audio.leaky-coupling-cap"].prior == pytest.approx(0.1)

    dead = _pair(review, DEAD)
    # d3 ended off-graph with no conclusion: 3 closed cases, 2 counted.
    assert (dead.cases, dead.concluded) == (3, 2)
    d = {f.fault: f.smoothed for f in dead.faults}
    # Weights 40/30/20/10, S = 10 -> alpha 4, 3, 2, 1; N = 2 (if 1, weak output 1).
    assert d["oscillator.dead-converter"] == pytest.approx(4 / 12)
    assert d["if.open-if-transformer"] == pytest.approx((3 + 1) / 12)
    assert d["audio.weak-output"] == pytest.approx((2 + 1) / 12)
    assert d["antenna.open-loop"] == pytest.approx(1 / 12)
    assert sum(d.values()) == pytest.approx(1.0)


def test_mean_checks_and_minutes(folder, knowledge):
    review = review_folder(folder, knowledge)
    hum = _pair(review, HUM)
    # Checks: h1 made 1, h2-h4 made 3 each -> (1 + 3 + 3 + 3) / 4 = 2.5.
    assert hum.mean_checks == pytest.approx(2.5)
    # Answers 5 minutes apart from opening: h1 reached the fault at 5 min, the others at 15.
    # (5 + 15 + 15 + 15) / 4 = 12.5.
    assert hum.mean_minutes == pytest.approx(12.5)
    dead = _pair(review, DEAD)
    # Only d1 and d2 concluded a fault: 2 checks each, 10 minutes each.
    assert dead.mean_checks == pytest.approx(2.0)
    assert dead.mean_minutes == pytest.approx(10.0)


def test_expected_cost_of_current_and_data_order(folder, knowledge):
    hum = _pair(review_folder(folder, knowledge), HUM)
    (order,) = hum.orders
    # Costs: first cap 5 min, second cap 4, coupling 2 (fixture).
    # Priors only, p/c: 0.6/5 = 0.12, 0.3/4 = 0.075, 0.1/2 = 0.05 -> first, second, coupling.
    assert order.current == (FIRST, SECOND, COUPLING)
    # Data p/c: (7/14)/5 = 0.100, (3/14)/4 = 0.054, (4/14)/2 = 0.143 -> coupling, first, second.
    assert order.data == (COUPLING, FIRST, SECOND)
    p1, p2, p3 = F(7, 14), F(3, 14), F(4, 14)
    current = 5 + 4 * (1 - p1) + 2 * (1 - p1 - p2)          # = 106/14
    data = 2 + 5 * (1 - p3) + 4 * (1 - p3 - p1)             # = 90/14
    assert hum.current_minutes == pytest.approx(float(current))
    assert hum.data_minutes == pytest.approx(float(data))
    assert hum.saving_minutes == pytest.approx(float(current - data))   # 16/14 = 1.14 min
    assert float(current - data) == pytest.approx(16 / 14)


def test_expected_cost_weights_each_list_by_its_share(folder, knowledge):
    dead = _pair(review_folder(folder, knowledge), DEAD)
    lists = {o.suspects: o for o in dead.orders}
    det, aud = lists["detector.dead-suspects"], lists["audio.dead-suspects"]
    # Under the detector list: converter 4/12 + IF 4/12 + loop 1/12 = 9/12; audio: 3/12.
    assert det.weight == pytest.approx(9 / 12)
    assert aud.weight == pytest.approx(3 / 12)
    # Within the list (renormalised): 4/9, 4/9, 1/9; costs grid 3, IF 2, loop 2 min.
    # p/c: IF 0.222, grid 0.148, loop 0.056 -> IF, grid, loop (same as priors-only:
    # 0.375/2 = 0.1875, 0.5/3 = 0.167, 0.125/2 = 0.0625).
    assert det.data == det.current == ("if.if-stage-check", "oscillator.grid-check",
                                       "antenna.loop-check")
    ec = 2 + 3 * (1 - F(4, 9)) + 2 * (1 - F(8, 9))          # = 35/9
    assert det.data_minutes == pytest.approx(float(ec))
    pair = F(9, 12) * ec + F(3, 12) * 3                      # = 44/12
    assert dead.current_minutes == pytest.approx(float(pair))
    assert dead.saving_minutes == pytest.approx(0.0)


def test_never_varied_skipped_and_never_reached(folder, knowledge):
    review = review_folder(folder, knowledge)
    hum = _pair(review, HUM)
    steady = {(c.check, c.outcome, c.cases) for c in hum.never_varied}
    # First cap read bad once and good three times: it varied. The other two were made in
    # h2-h4 only (3 cases) with one outcome each.
    assert steady == {(SECOND, "good", 3), (COUPLING, "positive", 3)}
    assert _pair(review, DEAD).never_varied == ()    # every dead check varied or < 3 cases
    (skipped,) = review.skipped
    assert (skipped.check, skipped.count) == (SKIP_NODE, 3)
    assert dict(skipped.reasons) == {"meter at the other bench": 2, "no isolation transformer": 1}
    # Faults of the fixture: 7. Closed cases concluded first cap, coupling cap, weak output,
    # IF transformer. The open case's second cap does not count.
    assert [f.fault for f in review.never_reached] == [
        "antenna.open-loop", "oscillator.dead-converter", "supply.dry-second-cap"]


def test_since_keeps_later_closes(folder, knowledge):
    # h1 closed on day 0 (2026-03-02); everything else from day 10 (2026-03-12) on.
    review = review_folder(folder, knowledge, since=date(2026, 3, 5))
    assert review.cases == 6
    assert _pair(review, HUM).concluded == 3
    assert review.since == "2026-03-05"


def test_minutes_by_month(folder, knowledge):
    months = {m.month: (m.jobs, m.mean_minutes) for m in review_folder(folder, knowledge).months}
    # Closed in March (days 0-13 after 2026-03-02): h1 20, h2 40, h3 50, d1 25, d2 60 ->
    # 195 / 5 = 39. April (days 40, 41): h4 30, d3 90 -> 60.
    assert months == {"2026-03": (5, 39.0), "2026-04": (2, 60.0)}


def test_off_graph_findings_grouped_by_similarity():
    findings = [("a", "cracked 12BE6 socket arcing"), ("b", "12BE6 socket cracked and arcing"),
                ("c", "Cracked 12BE6 socket, arcing"), ("d", "dial cord slipping on drive shaft"),
                ("e", "dial cord slips on the drive shaft"), ("f", "mouse nest in the chassis")]
    groups = group_findings(findings)
    # Three complaints of the trade (common practice, no source): arcing socket, slipping
    # dial cord, a nest; rapidfuzz's token_set_ratio groups the rewordings.
    assert sorted(g.cases for g in groups) == [("a", "b", "c"), ("d", "e"), ("f",)]
    assert groups[0].cases == ("a", "b", "c")       # largest group first


def test_reopened_by_link_and_by_customer_within_days():
    from faultwise.cases.summary import summarise

    cases = [
        make_case("r1", symptom=HUM, fault="supply.dry-first-cap", customer="Mrs Okafor",
                  day=0, minutes=30),
        make_case("r2", symptom=HUM, customer="mrs okafor", day=20, status="open"),
        make_case("r3", symptom=HUM, customer="Mrs Okafor", day=80, status="open"),
        make_case("r4", symptom=DEAD, reopened_from="r1", day=3, status="open"),
        make_case("r5", symptom=HUM, customer="Mr Lindqvist", day=5, status="open"),
    ]
    found = {(r.case, r.after, r.rule) for r in
             reopened_cases([summarise(c, c["id"] + ".json") for c in cases], days=30)}
    # r2: same customer (case ignored) and set, 20 days after r1 closed: within 30.
    # r3: 80 days: outside. r4: linked. r5: another customer.
    assert found == {("r2", "r1", "same customer and set"), ("r4", "r1", "reopened_from")}


def _sha(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def test_damaged_files_named_left_unchanged_exit_zero(folder):
    good = json.dumps(seven_cases()[0], indent=2).splitlines(keepends=True)
    bad = {
        "cut.json": "".join(good[: len(good) // 2]).encode(),          # cut short at a line
        "blob.json": bytes(range(256)) * 4,                            # binary
        "notes.json": b"format: faultwise-case/1\nid: x\nevents: []\n",  # YAML, not JSON
        "future.json": json.dumps({**seven_cases()[1], "format": "faultwise-case/9"}).encode(),
        "list.json": b"[1, 2, 3]\n",
    }
    for name, data in bad.items():
        (folder / name).write_bytes(data)
    before = {name: _sha(folder / name) for name in bad}
    proc = subprocess.run([PY, "-m", "faultwise", "review", "--cases", str(folder),
                           "--knowledge", str(KB), "--json"], capture_output=True, text=True,
                          timeout=120)
    assert proc.returncode == 0, proc.stderr
    doc = json.loads(proc.stdout)
    assert doc["cases"] == 7
    reasons = {d["file"]: d["reason"] for d in doc["damaged"]}
    # Reasons as listed in DEVELOPERS.md (faultwise.cases.store damage reasons).
    assert reasons == {"cut.json": "truncated", "blob.json": "binary", "notes.json": "not JSON",
                       "future.json": "unknown format version", "list.json": "not a mapping"}
    assert {name: _sha(folder / name) for name in bad} == before


def test_text_output_fits_100_columns(folder):
    proc = subprocess.run([PY, "-m", "faultwise", "review", "--cases", str(folder),
                           "--knowledge", str(KB)], capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    lines = proc.stdout.splitlines()
    assert max(len(line) for line in lines) <= 100
    assert any("saves 1.1 min per job" in line for line in lines)   # 16/14 = 1.14


def test_html_option_writes_the_page(folder, tmp_path):
    page = tmp_path / "review.html"
    proc = subprocess.run([PY, "-m", "faultwise", "review", "--cases", str(folder),
                           "--knowledge", str(KB), "--json", "--html", str(page)],
                          capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    json.loads(proc.stdout)                                   # stdout stays one document
    text = page.read_text()
    assert text.startswith("<!DOCTYPE html>") and "<svg" in text


def test_bad_since_is_one_sentence_exit_1(folder):
    proc = subprocess.run([PY, "-m", "faultwise", "review", "--cases", str(folder),
                           "--knowledge", str(KB), "--since", "yesterday"],
                          capture_output=True, text=True, timeout=120)
    assert proc.returncode == 1
    assert "Traceback" not in proc.stderr and "YYYY-MM-DD" in proc.stderr


@pytest.fixture()
def own_kb(tmp_path: Path) -> Path:
    import shutil

    kb = tmp_path / "kb"
    shutil.copytree(KB, kb)
    return kb


def _graph_hashes(kb: Path) -> dict:
    return {p.relative_to(kb).as_posix(): _sha(p) for p in sorted(kb.rglob("*.yaml"))}


def test_learn_writes_sorted_counts_and_leaves_graph_alone(folder, own_kb):
    before = _graph_hashes(own_kb)
    proc = subprocess.run([PY, "-m", "faultwise", "review", "--cases", str(folder),
                           "--knowledge", str(own_kb), "--learn", "--json"],
                          capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    learned = own_kb / "learned.yaml"
    assert _graph_hashes(own_kb) == {**before, "learned.yaml": _sha(learned)}
    import yaml

    data = yaml.safe_load(learned.read_text())
    assert data["format"] == "faultwise-learned/1"
    # Repaired closed cases with a fault: h1..h4 and d1, d2 = 6 (d3 off-graph, o1 open).
    assert data["cases"] == 6
    assert data["counts"] == {
        DEAD: {"series-string": {"audio.weak-output": 1, "if.open-if-transformer": 1}},
        HUM: {"series-string": {"audio.leaky-coupling-cap": 3, "supply.dry-first-cap": 1}}}
    text = learned.read_text()
    assert text.index(DEAD) < text.index(HUM)              # keys sorted
    assert text.index("audio.leaky") < text.index("supply.dry-first")
    # The walk reads it back through Knowledge.learned.
    k = load_knowledge(own_kb)
    assert k.learned.count(HUM, "series-string", "audio.leaky-coupling-cap") == 3
    assert k.learned.cases == 6
    doc = json.loads(proc.stdout)
    change = next(c for c in doc["learn"]["changes"] if c["symptom"] == HUM)
    assert change["orders"][0]["after"] == [COUPLING, FIRST, SECOND]


def test_learn_dry_run_writes_nothing_and_shows_orders(folder, own_kb):
    before = _graph_hashes(own_kb)
    proc = subprocess.run([PY, "-m", "faultwise", "review", "--cases", str(folder),
                           "--knowledge", str(own_kb), "--learn", "--dry-run"],
                          capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    assert not (own_kb / "learned.yaml").exists()
    assert _graph_hashes(own_kb) == before
    out = proc.stdout
    assert "would write 6 case(s)" in out
    assert "audio.leaky-coupling-cap: 0 -> 3" in out
    assert f"before: {FIRST} > {SECOND} > {COUPLING}" in out
    assert f"after:  {COUPLING} > {FIRST} > {SECOND}" in out


def test_json_document_has_every_part(folder, knowledge):
    doc = review_to_dict(review_folder(folder, knowledge))
    for key in ("cases", "damaged", "pairs", "skipped", "off_graph", "never_reached",
                "reopened", "months"):
        assert key in doc
    json.dumps(doc)   # plain JSON
    hum = next(p for p in doc["pairs"] if p["symptom"] == HUM)
    assert hum["saving_minutes"] == pytest.approx(16 / 14)


def test_review_modules_do_not_import_textual():
    code = ("import sys, faultwise.shop.review, faultwise.cases.index, faultwise.report.job, "
            "faultwise.report.html_report, faultwise.shop.learn, faultwise.report.svg; "
            "print('textual' in sys.modules or 'rich' in sys.modules)")
    out = subprocess.run([PY, "-c", code], capture_output=True, text=True, timeout=60)
    assert out.stdout.strip() == "False", out.stderr


def test_review_reads_subfolders_and_the_index_keeps_relative_paths(folder):
    """A shop that files old jobs by year: cases in subfolders count in the review, a
    damaged one there is named by its path under the cases folder, and the index beside
    the cases keys them by that relative path (a second scan reads them from it)."""
    import sqlite3

    from faultwise.cases.index import INDEX_NAME, scan_cases

    files = sorted(folder.glob("*.json"))
    (folder / "2025").mkdir()
    (folder / "2024" / "old").mkdir(parents=True)
    for path in files[:3]:
        path.rename(folder / "2025" / path.name)
    (folder / "2024" / "old" / "cut.json").write_bytes(b'{"format": "faultwise-case/1", ')
    proc = subprocess.run([PY, "-m", "faultwise", "review", "--cases", str(folder),
                           "--knowledge", str(KB), "--json"], capture_output=True, text=True,
                          timeout=120)
    assert proc.returncode == 0, proc.stderr
    doc = json.loads(proc.stdout)
    assert doc["cases"] == 7
    assert {d["file"]: d["reason"] for d in doc["damaged"]} == {"2024/old/cut.json": "truncated"}
    with sqlite3.connect(folder / INDEX_NAME) as con:
        tables = [r[0] for r in con.execute("select name from sqlite_master where type='table'")]
        keys = {r[0] for t in tables for r in con.execute(f"select * from {t}")
                if isinstance(r[0], str) and r[0].endswith(".json")}
    assert {f"2025/{p.name}" for p in files[:3]} <= keys
    again = scan_cases(folder)
    assert again.parsed == 0 and again.from_index == len(files) + 1
