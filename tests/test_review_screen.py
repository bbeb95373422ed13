"""Pilot test of the shop review screen mounted in a minimal App.

The figures on screen are the domain review's (tests/test_review.py checks them by hand);
here: the worker runs, the tables fill by key, the selected pair's bars follow the cursor,
damaged files are named, case text is not read as markup, and Escape goes back.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.app import App
from textual.widgets import DataTable, Static

from faultwise.tui.screens.review import ReviewScreen, block_bar
from faultwise.core.workspace import Workspace
from review_case_factory import make_case, write_case

KB = Path(__file__).parent / "fixtures" / "kb_review"


class _Host(App):
    def __init__(self, workspace) -> None:
        super().__init__()
        self.workspace = workspace

    def on_mount(self) -> None:
        self.push_screen(ReviewScreen(self.workspace))


@pytest.fixture()
def workspace(tmp_path: Path) -> Workspace:
    cases = tmp_path / "cases"
    for i, fault in enumerate(["supply.dry-first-cap", "audio.leaky-coupling-cap",
                               "audio.leaky-coupling-cap"]):
        write_case(cases, make_case(f"h{i}", symptom="hum-loud", fault=fault, day=i,
                                    checks=[("supply.first-cap-esr", "bad")]))
    write_case(cases, make_case("d1", symptom="dead-lights-on", fault="audio.weak-output",
                                off_graph="[/b] cracked [red]socket", day=4))
    (cases / "cut.json").write_text('{"format": "faultwise-case/1", "id": ')
    return Workspace(knowledge_dir=KB, cases_dir=cases, bench="B1")


def test_block_bar_eighths():
    # 0.5 of 10 cells = 5 full blocks; 0.55 of 10 = 5.5 cells = 5 full + a half block (4/8).
    assert block_bar(0.5, 10) == "\u2588" * 5 + " " * 5
    assert block_bar(0.55, 10) == "\u2588" * 5 + "\u258c" + " " * 4
    assert block_bar(1.5, 4) == "\u2588" * 4 and block_bar(-1, 3) == "   "


async def test_review_screen_shows_the_review(workspace):
    app = _Host(workspace)
    async with app.run_test(size=(110, 50)) as pilot:
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, ReviewScreen) and screen.id == "review"
        status = str(screen.query_one("#review-status", Static).render())
        assert "4 closed case(s)" in status and "cut.json (truncated)" in status
        pairs = screen.query_one("#review-pairs", DataTable)
        keys = [row.key.value for row in pairs.ordered_rows]
        assert keys == ["hum-loud|series-string", "dead-lights-on|series-string"]
        faults = screen.query_one("#review-faults", DataTable)
        assert faults.row_count == 3
        assert faults.get_row("audio.leaky-coupling-cap")[1] == "2"
        shares = str(screen.query_one("#review-shares", Static).render())
        assert shares.startswith("hum-loud / series-string") and "\u2588" in shares
        findings = screen.query_one("#review-findings", DataTable)
        assert str(findings.get_row_at(0)[0]) == "[/b] cracked [red]socket"   # plain text
        await pilot.press("down")
        await pilot.pause()
        shares = str(screen.query_one("#review-shares", Static).render())
        assert shares.startswith("dead-lights-on / series-string")
        assert faults.row_count == 4
        await pilot.press("escape")
        await pilot.pause()
        assert not isinstance(app.screen, ReviewScreen)


async def test_review_screen_takes_the_bench_context(workspace):
    # The start screen pushes ReviewScreen(bench): the context with .workspace.
    from faultwise.tui.context import Bench

    app = _Host(Bench(workspace=workspace))
    async with app.run_test(size=(110, 50)) as pilot:
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert app.screen.query_one("#review-pairs", DataTable).row_count == 2


async def test_review_screen_reports_a_bad_knowledge_folder(tmp_path):
    (tmp_path / "kb").mkdir()
    ws = Workspace(knowledge_dir=tmp_path / "kb", cases_dir=tmp_path, bench="B1")
    app = _Host(ws)
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.pause()
        status = str(app.screen.query_one("#review-status", Static).render())
        assert status.startswith("The review could not be made")
        assert isinstance(app.screen, ReviewScreen)       # the program keeps running
