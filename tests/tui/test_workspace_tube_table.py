"""A workspace's own tube table reaches the bench screen, a resumed case and ``faultwise walk``.

The knowledge copy below raises the 35W4's forward drop from the bundled 15 V to 40 V. The
rectifier model (faultwise.calc.rectifier) takes the tube's drop off the peak, so the B+
expected at the first filter capacitor must fall: the bench screen, a case opened again
and the command line must all expect the same, lower B+ for the same set.
"""

from __future__ import annotations

import json
import re

from conftest import read_case
from tui_helpers import acknowledge_cautions, new_case, ready

from faultwise.cli import main
from faultwise.core.workspace import bundled_knowledge_dir
from faultwise.expect.expected import expect
from faultwise.profile.load import load_profile

B_PLUS = "supply.rectifier_out_v"
SET = "demo-5-tube-table.yaml"


def _raise_35w4_drop(knowledge_dir) -> None:
    """Copy the bundled tube table into the workspace with the 35W4 drop at 40 V."""
    text = (bundled_knowledge_dir() / "tubes.yaml").read_text(encoding="utf-8")
    start = text.index("  - type: 35W4\n")
    end = text.index("  - type:", start + 5)
    entry = text[start:end]
    changed, count = re.subn(r"drop_v: 15,", "drop_v: 40,", entry)
    assert count == 1, entry
    (knowledge_dir / "tubes.yaml").write_text(text[:start] + changed + text[end:],
                                              encoding="utf-8")


def _cli_band(tmp_path, knowledge_dir, cases_dir, capsys) -> dict:
    answers = tmp_path / "answers.yaml"
    answers.write_text("observations: {supply.heaters-glow: glow}\n", encoding="utf-8")
    code = main(["walk", str(knowledge_dir / "sets" / SET), "--symptom", "hum-loud",
                 "--answers", str(answers), "--knowledge", str(knowledge_dir),
                 "--cases", str(cases_dir), "--json", "--assume-normal"])
    assert code == 0
    doc = json.loads(capsys.readouterr().out)
    step = next(s for s in doc["steps"] if s["expect"] == B_PLUS)
    return step["band"]


async def test_bench_and_command_line_expect_the_same_b_plus(
        make_app, knowledge_dir, cases_dir, tmp_path, capsys):
    _raise_35w4_drop(knowledge_dir)
    bundled = expect(load_profile(knowledge_dir / "sets" / SET))[B_PLUS]
    band = _cli_band(tmp_path, knowledge_dir, cases_dir, capsys)
    # The changed drop matters: 25 V more across the rectifier, less B+ (else the test proves
    # nothing).
    assert band["high"] < bundled.nominal

    app = make_app()
    async with app.run_test(size=(100, 30)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        walk = app.screen.walk
        on_bench = walk.expectations[B_PLUS]
        assert (on_bench.low, on_bench.high) == (band["low"], band["high"])
        await pilot.press("1")                       # heaters glow -> the B+ check
        await pilot.pause()
        await acknowledge_cautions(pilot)
        prompt = walk.prompt()
        assert prompt.expected is not None and prompt.expected.name == B_PLUS
        assert prompt.expected.nominal == on_bench.nominal
        case_id = read_case(cases_dir)["id"]
        await pilot.press("escape")                  # leave the case (its lock goes)
        await ready(pilot)

    # The case opened again (a new app, its events replayed) expects the same B+.
    app = make_app()
    async with app.run_test(size=(100, 30)) as pilot:
        await ready(pilot)
        case, resumed = app.bench.open_walk(case_id)
        try:
            again = resumed.expectations[B_PLUS]
            assert (again.low, again.high) == (band["low"], band["high"])
        finally:
            case.close()
