"""The voltage chart (faultwise.expect.chart, faultwise.report.chart_html, expect --chart) on every demo set."""

from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path

import pytest

from faultwise.expect.chart import chart_rows, render_chart
from faultwise.report.chart_html import chart_html
from faultwise.expect import expect
from faultwise.profile import load_profile

SETS = sorted((Path(__file__).resolve().parents[1] / "knowledge" / "sets").glob("*.yaml"))


@pytest.mark.parametrize("path", SETS, ids=lambda p: p.stem)
def test_every_device_every_electrode_with_pins(path):
    profile = load_profile(path)
    rows = chart_rows(profile, expect(profile))
    roles = {r.role for r in rows}
    if profile.line_powered:
        for tube in profile.tubes:
            assert tube.role in roles
            mine = [r for r in rows if r.role == tube.role]
            assert all(re.fullmatch(r"[0-9]+(-[0-9]+)*|cap", r.pin) for r in mine), mine
            if tube.role != "rectifier":
                assert {"plate", "cathode"} <= {r.electrode for r in mine}
                assert any("grid" in r.electrode for r in mine)
    else:
        for tr in profile.transistors:
            assert tr.role in roles or tr.role == "output2"
            if tr.role != "output2":
                assert {"base", "emitter", "collector"} <= {r.electrode for r in rows
                                                            if r.role == tr.role}
    lines = render_chart(profile, rows)
    assert max(len(line) for line in lines) <= 80


@pytest.mark.parametrize("path", SETS[:2] + SETS[-2:], ids=lambda p: p.stem)
def test_html_page_is_self_contained(path):
    profile = load_profile(path)
    rows = chart_rows(profile, expect(profile))
    page = chart_html(profile, rows)
    devices = {r.device for r in rows if r.role != "supply"}   # the battery has no drawing
    assert page.count("<svg") == len(devices)
    assert "<script" not in page and "src=" not in page and "href=" not in page
    assert re.findall(r"https?://[^\"' ]*", page) == ["http://www.w3.org/2000/svg"] * len(devices)


def test_cli_chart_and_html(tmp_path):
    demo = next(p for p in SETS if "5-tube" in p.name)
    out = subprocess.run([sys.executable, "-m", "faultwise", "expect", str(demo), "--chart"],
                         capture_output=True, text=True, check=True).stdout
    assert re.search(r"^\s+5\s+plate\s+[0-9.]+ V", out, re.MULTILINE)   # 12BE6/12BA6/50C5 pin 5
    page = tmp_path / "chart.html"
    subprocess.run([sys.executable, "-m", "faultwise", "expect", str(demo), "--chart", "--html",
                    str(page)], check=True, capture_output=True)
    assert "Voltage chart" in page.read_text(encoding="utf-8")
    bad = subprocess.run([sys.executable, "-m", "faultwise", "expect", str(demo), "--html",
                          str(page)], capture_output=True, text=True)
    assert bad.returncode == 1 and "--chart" in bad.stderr and "Traceback" not in bad.stderr


def test_grids_are_shown_negative_as_the_meter_reads_them():
    """An oscillating converter's grid-leak bias and a detector triode's contact bias read
    negative to B- (common practice, no source): the chart prints the sign, the band runs
    from the more negative end, and plates and cathodes stay positive."""
    profile = load_profile(next(p for p in SETS if "5-tube" in p.name))
    lines = render_chart(profile, chart_rows(profile, expect(profile)))
    osc = next(line for line in lines if "oscillator grid" in line)
    assert re.search(r"-\d+(\.\d+)? V\s+-\d+(\.\d+)? to -\d", osc), osc
    plate = next(line for line in lines if " plate " in line)
    assert not re.search(r"\s-\d", plate), plate
