"""Job report (Markdown and HTML) and the shop review's HTML form.

Checks: every section is there, the band shown is the one recorded in the case, case text
is escaped (html.escape), the page names no URL of any kind and runs no script, and the
SVG stage map marks the faulty and the cleared stages.
"""

from __future__ import annotations

import re
import subprocess
import sys
from html.parser import HTMLParser
from pathlib import Path

import pytest

from faultwise.graph.knowledge import load_knowledge
from faultwise.report.job import job_report, job_report_markdown
from faultwise.report.html_report import job_report_html, review_html
from faultwise.shop.review import review_folder
from review_case_factory import make_case, write_case

KB = Path(__file__).parent / "fixtures" / "kb_review"
PY = sys.executable
EVIL = "<script>alert('x')</script> & [/b] | pipe"


def full_case() -> dict:
    case = make_case(
        "20260302-B2-004", symptom="hum-loud", customer=f"ticket 4411 {EVIL}",
        checks=[("supply.first-cap-esr", "good"), ("supply.second-cap-esr", "good"),
                ("audio.coupling-cap-check", "positive")],
        fault="audio.leaky-coupling-cap", fault_title="Leaky output grid coupling capacitor",
        parts=["22 nF 630 V film capacitor"], verify=[("audio.coupling-cap-check", "none")],
        closing=[("supply.leakage-check", "0.21")], minutes=75, bench="B2")
    case["complaint"] = f"hums loudly {EVIL}"
    # A measurement with its band as recorded when it was read (invented numbers).
    case["events"].insert(0, {
        "n": 0, "at": case["opened"], "type": "answer", "phase": "diagnose",
        "node": "supply.rectifier-out", "expect": "supply.rectifier_out_v",
        "band": {"nominal": 146.1, "low": 131.0, "high": 160.0, "unit": "V",
                 "basis": "worst case of line 114-126 V", "typical": False},
        "raw": "142 V", "value": 142.0, "outcome": "normal"})
    case["events"].append({"n": 99, "at": case["opened"], "type": "note", "text": f"note {EVIL}"})
    return case


@pytest.fixture(scope="module")
def knowledge():
    return load_knowledge(KB)


def test_markdown_has_every_section(knowledge):
    from faultwise.core.workspace import Shop

    md = job_report_markdown(job_report(full_case(), knowledge,
                                        Shop(name="Larkspur Lane Radio Works")))
    for heading in ("# Job report 20260302-B2-004", "## Set", "## Complaint", "## Checks",
                    "## Fault", "## Repair", "### Parts replaced", "## Readings after the repair",
                    "## Leakage check", "## Time and outcome", "## Safety"):
        assert heading in md, heading
    assert "Larkspur Lane Radio Works" in md
    assert "demo 5-tube series-string table set" in md
    # The recorded band, not a recomputed one: 131 to 160 V, nominal 146 V (3 digits).
    assert "131 V to 160 V (nominal 146 V)" in md
    assert "142 V" in md
    assert "Leaky output grid coupling capacitor" in md
    assert "Replace the coupling capacitor with a film part" in md      # repair from the graph
    assert "22 nF 630 V film capacitor" in md
    assert "Result: passed." in md
    assert "1 h 15 min" in md                                           # 75 minutes
    assert "repaired" in md
    assert "trained people" in md and "local electrical codes" in md
    assert "0.75 V" in md                                               # leakage statement
    # A pipe in case text must not split a Markdown table row.
    row = next(line for line in md.splitlines() if line.startswith("| 1 |"))
    assert row.count("|") - row.count("\\|") == 7          # six columns, node id last


def test_battery_set_is_not_line_connected(knowledge):
    case = make_case("t1", symptom="dead-lights-on", family="transistor",
                     checks=[("audio.click-test", "silent"), ("audio.output-tube-check", "weak")],
                     fault="audio.weak-output")
    md = job_report_markdown(job_report(case, knowledge))
    assert "Not mains-powered" in md
    assert "0.75 V" not in md


def test_line_set_without_leakage_check_is_flagged(knowledge):
    case = make_case("s1", symptom="hum-loud", checks=[("supply.first-cap-esr", "bad")],
                     fault="supply.dry-first-cap")
    md = job_report_markdown(job_report(case, knowledge))
    assert "NOT RECORDED" in md


class _Collector(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.tags: list[str] = []
        self.attrs: list[tuple[str, str]] = []
        self.text: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        self.attrs += [(k, v or "") for k, v in attrs]

    def handle_data(self, data):
        self.text.append(data)


def _assert_self_contained(page: str) -> _Collector:
    low = page.lower()
    assert "http" not in low                     # no http(s) URL, not even an xmlns
    assert "<script" not in low
    assert "//" not in page                      # no protocol-relative URL either
    assert "@import" not in low and "@font-face" not in low
    assert not re.search(r"url\((?!#)", low)     # only in-page references (SVG markers)
    p = _Collector()
    p.feed(page)
    assert "script" not in p.tags and "img" not in p.tags and "link" not in p.tags
    assert not [k for k, _ in p.attrs if k in ("src", "href") or k.startswith("on")]
    return p


def test_html_report_is_self_contained_and_escaped(knowledge):
    page = job_report_html(job_report(full_case(), knowledge))
    p = _assert_self_contained(page)
    assert "&lt;script&gt;alert(&#39;x&#39;)&lt;/script&gt;" in page     # markupsafe.escape
    assert EVIL in "".join(p.text)               # shown to the reader as typed
    assert "<svg" in page


def test_stage_map_marks_fault_and_cleared_stages(knowledge):
    page = job_report_html(job_report(full_case(), knowledge))
    svg = page[page.index("<svg"): page.index("</svg>")]
    # Boxes in the signal path and the supply beneath.
    for label in ("Antenna", "Oscillator / mixer", "IF", "Detector", "Audio", "Speaker",
                  "Supply"):
        assert f">{label}" in svg, label
    # The fault is in the audio stage; the supply checks read normal (cleared).
    texts = re.findall(r">([^<>]+)</text>", svg)
    assert texts[texts.index("Audio") + 1] == "FAULT"
    assert texts[texts.index("Supply (heaters, B+)") + 1] == "cleared"
    assert texts[texts.index("Antenna") + 1] != "cleared"


def test_review_html_has_charts_and_no_urls(tmp_path, knowledge):
    for c in (make_case("a", symptom="hum-loud", fault="supply.dry-first-cap", day=0),
              make_case("b", symptom="hum-loud", fault="audio.leaky-coupling-cap", day=35,
                        off_graph=f"odd {EVIL}")):
        write_case(tmp_path, c)
    page = review_html(review_folder(tmp_path, knowledge))
    _assert_self_contained(page)
    assert page.count("<svg") >= 2               # shares bars + minutes by month
    assert "Fault shares" in page and "Minutes per job by month" in page
    assert "&lt;script&gt;" in page


def test_report_command_markdown_and_html(tmp_path):
    cases = tmp_path / "cases"
    write_case(cases, full_case())
    proc = subprocess.run([PY, "-m", "faultwise", "report", "20260302-B2-004", "--cases",
                           str(cases), "--knowledge", str(KB)], capture_output=True, text=True,
                          timeout=120)
    assert proc.returncode == 0, proc.stderr
    assert proc.stdout.startswith("# Job report 20260302-B2-004")
    out = tmp_path / "job.html"
    proc = subprocess.run([PY, "-m", "faultwise", "report", str(cases / "20260302-B2-004.json"),
                           "--html", str(out), "--knowledge", str(KB)], capture_output=True,
                          text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    _assert_self_contained(out.read_text())


def test_report_of_missing_or_damaged_case_is_one_sentence(tmp_path):
    (tmp_path / "bad.json").write_bytes(b"\x00\x01\x02")
    for ref in ("nope", "bad"):
        proc = subprocess.run([PY, "-m", "faultwise", "report", ref, "--cases", str(tmp_path),
                               "--knowledge", str(KB)], capture_output=True, text=True,
                              timeout=120)
        assert proc.returncode == 1
        assert "Traceback" not in proc.stderr and proc.stderr.count("\n") == 1
    assert (tmp_path / "bad.json").read_bytes() == b"\x00\x01\x02"
