"""Start screen and case handling: resume an open case, damaged and locked files, the
read-only viewer, and a save that fails until the folder is writable again."""

from __future__ import annotations

import os
from pathlib import Path

from conftest import FIXED_NOW, fixed_clock, read_case
from tui_helpers import acknowledge_cautions, answer, new_case, ready


def open_case_on_disk(workspace, *answers: str) -> str:
    """A case created and walked through the domain API (as another session left it)."""
    from faultwise.cases.store import CaseStore
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.profile.load import load_profile
    from faultwise.walk.state import Walk

    knowledge = load_knowledge(workspace.knowledge_dir)
    profile = load_profile(workspace.sets_dir / "demo-5-tube-table.yaml")
    walk = Walk(knowledge, profile, "hum-loud", clock=fixed_clock)
    store = CaseStore(workspace.cases_dir, "B1", fixed_clock)
    with store.new_case(profile, "demo-5-tube-table.yaml", "hums", "hum-loud",
                        knowledge_version=knowledge.version) as case:
        for caution in ("live-chassis", "charged-caps"):
            walk.acknowledge(caution)
        for text in answers:
            walk.answer(text)
        case.record(walk)
        return case.id


async def test_resume_open_case(make_app, workspace, cases_dir):
    case_id = open_case_on_disk(workspace, "1")
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await ready(pilot)
        table = app.screen.query_one("#cases")
        assert table.get_row(f"open:{case_id}")[1].plain == "open"
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen.id == "walk"
        # The walk continues where the file left it: the DC reading after "heaters glow".
        assert "first filter capacitor" in str(app.screen.query_one("#check-title").render())
        assert app.focused.id == "answer"
        assert (cases_dir / f"{case_id}.lock").exists()       # held while on screen
        await answer(pilot, "1k")            # 1000 V: high, recorded in the same file
        events = read_case(cases_dir, case_id)["events"]
        assert events[-1]["node"] == "supply.rectifier-out"
        assert events[-1]["outcome"] == "high"
        await pilot.press("escape")
        await pilot.pause()
        assert app.screen.id == "start"
        assert not (cases_dir / f"{case_id}.lock").exists()


async def test_damaged_case_is_listed_and_refused(make_app, cases_dir):
    bad = cases_dir / "20261130-B1-004.json"
    raw = b'{"format": "faultwise-case/1", "id": "20261130-B1-004", "eve'
    bad.write_bytes(raw)
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await ready(pilot)
        table = app.screen.query_one("#cases")
        row = table.get_row(f"damaged:{bad}")
        assert row[1].plain == "DAMAGED"
        assert "truncated" in row[2].plain
        detail = str(app.screen.query_one("#case-detail").render())
        assert "cannot be opened for writing" in detail
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen.id == "start"                  # not opened
        await pilot.press("v")                           # nor viewed as a case
        await pilot.pause()
        assert app.screen.id == "start"
        assert bad.read_bytes() == raw                   # left untouched
        assert not (cases_dir / "20261130-B1-004.lock").exists()


async def test_case_locked_at_another_bench(make_app, workspace, cases_dir):
    from faultwise.cases.store import CaseStore

    case_id = open_case_on_disk(workspace)
    other = CaseStore(cases_dir, "B2", fixed_clock).open(case_id)
    try:
        app = make_app()
        async with app.run_test(size=(80, 24)) as pilot:
            await ready(pilot)
            table = app.screen.query_one("#cases")
            assert "in use B2" in table.get_row(f"open:{case_id}")[1].plain
            await pilot.press("enter")
            await pilot.pause()
            assert app.screen.id == "start"
    finally:
        other.close()


def _make_unwritable(folder: Path) -> Path | None:
    """Make the cases folder refuse new files. Returns where it was moved, if it had to be.

    chmod 0555 does it for an ordinary user; root ignores permission bits, so there the
    folder is moved aside (the store then cannot write its temp file either).
    """
    folder.chmod(0o555)
    probe = folder / ".probe"
    try:
        probe.write_text("x")
    except OSError:
        return None
    probe.unlink()
    folder.chmod(0o755)
    away = folder.with_name(folder.name + "-away")
    folder.rename(away)
    return away


def _make_writable(folder: Path, away: Path | None) -> None:
    if away is not None:
        away.rename(folder)
    folder.chmod(0o755)


async def test_save_failure_keeps_answer_and_retry_works(make_app, cases_dir):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        saved_before = read_case(cases_dir)
        away = _make_unwritable(cases_dir)
        try:
            await pilot.press("1")
            await pilot.pause()
            assert app.screen.id == "save-failed"
            assert "could not be saved" in str(app.screen.query_one("#save-error").render())
            # The answer is in memory, not on disk, and the next check is not shown.
            assert app.screen_stack[-2].walk.steps[-1].node == "supply.heaters-glow"
            await pilot.press("enter")                     # retry while still failing
            await pilot.pause()
            assert app.screen.id == "save-failed"
            assert "Still failing" in str(app.screen.query_one("#save-error").render())
        finally:
            _make_writable(cases_dir, away)
        assert read_case(cases_dir)["events"] == saved_before["events"]
        await pilot.press("enter")                         # retry after the fix
        await pilot.pause()
        assert app.screen.id == "caution"                  # next check's caution comes up
        events = read_case(cases_dir)["events"]
        assert events[-1]["node"] == "supply.heaters-glow"
        assert events[-1]["outcome"] == "glow"


async def test_viewer_shows_closed_case_step_by_step(make_app, workspace, cases_dir):
    from faultwise.cases.store import CaseStore
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.walk.scripted import walk_from_case

    case_id = open_case_on_disk(workspace, "1", "1k")
    store = CaseStore(cases_dir, "B1", fixed_clock)
    with store.open(case_id) as case:
        walk = walk_from_case(load_knowledge(workspace.knowledge_dir), case.data,
                              clock=fixed_clock)
        walk.note("customer dropped it [bold]twice[/bold]")
        walk.close("waiting-parts", 12)
        case.record(walk)
    before = (cases_dir / f"{case_id}.json").read_bytes()
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await ready(pilot)
        table = app.screen.query_one("#cases")
        assert table.get_row(f"closed:{case_id}")[1].plain == "for parts"
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen.id == "viewer"
        events = app.screen.query_one("#viewer-events")
        data = read_case(cases_dir, case_id)
        assert events.row_count == len(data["events"])
        # Step by step: the cursor moves to the DC reading and its band and basis show.
        reading = next(e for e in data["events"] if e.get("node") == "supply.rectifier-out")
        await pilot.press(*["down"] * (reading["n"] - 1))
        await pilot.pause()
        detail = str(app.screen.query_one("#viewer-detail").render())
        assert "Basis:" in detail and reading["band"]["basis"][:30] in detail
        assert "1k" in detail and "high" in detail
        note_row = events.get_row(str(data["events"][-2]["n"]))
        assert note_row[2].plain == "customer dropped it [bold]twice[/bold]"
        await pilot.press("escape")
        assert app.screen.id == "start"
    assert (cases_dir / f"{case_id}.json").read_bytes() == before      # read-only


async def test_knowledge_that_does_not_load_exits_with_status_1(workspace, knowledge_dir):
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings

    (knowledge_dir / "symptoms.yaml").write_text("format: faultwise-symptoms/1\nsymptoms: 7\n")
    app = build_app(workspace, clock=fixed_clock,
                    settings=Settings(None, safety_acknowledged=FIXED_NOW.isoformat()))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.pause()
    assert app.return_code == 1


def test_run_tui_creates_the_cases_folder(tmp_path, monkeypatch):
    """`faultwise` with no subcommand makes ./cases when it is missing (DESIGN section 10)."""
    import argparse

    from faultwise.tui import run as run_module

    built = {}

    class FakeApp:
        return_code = 0

        def run(self):
            built["ran"] = True

    def fake_build_app(workspace, **kw):
        built["workspace"] = workspace
        return FakeApp()

    monkeypatch.chdir(tmp_path)
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))
    monkeypatch.setattr("faultwise.tui.app.build_app", fake_build_app)
    args = argparse.Namespace(knowledge=None, cases=None, bench=None)
    assert run_module.run_tui(args) == 0
    assert (tmp_path / "cases").is_dir()
    assert built["workspace"].cases_dir == tmp_path / "cases"
    assert built["ran"]


def test_settings_remember_the_safety_acknowledgement(tmp_path):
    from faultwise.tui.settings import Settings

    path = tmp_path / "config" / "faultwise" / "bench.json"
    fresh = Settings.load(path)
    assert fresh.safety_acknowledged is None
    fresh.acknowledge_safety(FIXED_NOW.isoformat())
    assert Settings.load(path).safety_acknowledged == FIXED_NOW.isoformat()
    path.write_text("{ not json")
    assert Settings.load(path).safety_acknowledged is None     # damaged file: clean state
    assert os.access(path, os.R_OK)


async def test_first_run_notice_then_not_again(workspace, tmp_path):
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings

    path = tmp_path / "config" / "bench.json"
    app = build_app(workspace, clock=fixed_clock, settings=Settings.load(path))
    async with app.run_test(size=(80, 24)) as pilot:
        await ready(pilot)
        assert app.screen.id == "safety"
        await pilot.press("escape")                     # cannot be dismissed unread
        assert app.screen.id == "safety"
        await pilot.press("enter")
        assert app.screen.id == "start"
        await pilot.press("f9")                         # reachable again later
        await pilot.pause()
        assert app.screen.id == "safety"
        await pilot.press("escape")
        assert app.screen.id == "start"
    again = build_app(workspace, clock=fixed_clock, settings=Settings.load(path))
    async with again.run_test(size=(80, 24)) as pilot:
        await ready(pilot)
        assert again.screen.id == "start"


async def test_quit_during_a_walk_releases_the_case(make_app, workspace, cases_dir):
    case_id = open_case_on_disk(workspace, "1")
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await ready(pilot)
        await pilot.press("enter")
        await pilot.pause()
        assert (cases_dir / f"{case_id}.lock").exists()
        await pilot.press("ctrl+q")                 # works while the answer field has focus
        await pilot.pause()
    assert not (cases_dir / f"{case_id}.lock").exists()
    assert read_case(cases_dir, case_id)["status"] == "open"
