"""The history's "#" column numbers the checks of the case (1, 2, 3...), not the case's
events (acknowledgements, notes and parts are events too); other events carry no number
and say what they are in words. The read-only viewer numbers them the same way.
"""

from __future__ import annotations

from conftest import read_case
from tui_helpers import acknowledge_cautions, answer, new_case, type_text


def rows_by_event(table) -> dict[str, tuple[str, ...]]:
    """Row key (event n) -> the plain text of its cells."""
    return {getattr(key, "value", key): tuple(getattr(c, "plain", str(c))
                                              for c in table.get_row(key))
            for key in table.rows}


async def test_history_numbers_checks_not_events(make_app, cases_dir):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        await pilot.press("1")                      # check 1: heaters glow
        await pilot.pause()
        await acknowledge_cautions(pilot)
        await answer(pilot, "20")                   # check 2: low B+
        await pilot.press("f3")
        await pilot.pause()
        await type_text(pilot, "smells hot")
        await pilot.press("enter")
        await pilot.pause()
        await pilot.press("2")                      # check 3: bridging: no change
        await pilot.pause()
        events = read_case(cases_dir)["events"]
        checks = [e for e in events if e["type"] in ("answer", "skip")]
        # The case's event numbers are not 1, 2, 3 (cautions read are events too) ...
        assert [e["n"] for e in checks] != [1, 2, 3]
        rows = rows_by_event(app.screen.query_one("#history"))
        # ... but the history numbers the checks 1, 2, 3 in the order they were made.
        assert [rows[str(e["n"])][0] for e in checks] == ["1", "2", "3"]
        note = next(e for e in events if e["type"] == "note")
        assert rows[str(note["n"])][:2] == ("", "note")          # no number, a word
        assert rows[str(note["n"])][3] == "smells hot"


async def test_viewer_numbers_checks_and_names_cautions(make_app, workspace, cases_dir):
    from tui_helpers import make_cases

    make_cases(workspace)                           # 001 closed (one check answered)
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        from tui_helpers import ready

        await ready(pilot)
        app.screen.query_one("#cases").move_cursor(row=2)    # open, damaged, closed
        await pilot.pause()
        await pilot.press("v")
        await pilot.pause()
        assert app.screen.id == "viewer"
        data = read_case(cases_dir, "20261201-B1-001")
        table = app.screen.query_one("#viewer-events")
        rows = rows_by_event(table)
        ack = next(e for e in data["events"] if e["type"] == "acknowledge")
        check = next(e for e in data["events"] if e["type"] == "answer")
        assert ack["n"] == 1 and check["n"] == 2
        assert rows[str(check["n"])][0] == "1"                       # the first check
        assert rows[str(ack["n"])][0] == ""
        # The caution is named by its title, not its id.
        title = app.bench.knowledge.cautions[ack["caution"]].title
        assert rows[str(ack["n"])][1:3] == ("caution read", title)
        # The result column is on screen beside a long step title.
        shown = sum(c.get_render_width(table) for c in table.columns.values())
        assert shown <= table.size.width
        assert rows[str(check["n"])][3].endswith(check["outcome"])
        # The summary names the symptom by its title.
        summary = str(app.screen.query_one("#viewer-summary").render())
        assert app.bench.knowledge.symptoms[data["symptom"]].title in summary


async def test_history_keeps_the_newest_row_in_view(make_app, cases_dir):
    """More rows than the table has lines at 80x24: the header stays on top and the newest
    row is on screen after each step; an undo takes its row away (the rows are those of the
    case file's events, read back from disk)."""
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        await pilot.press("1")
        await pilot.pause()
        await acknowledge_cautions(pilot)
        history = app.screen.query_one("#history")
        for i in range(1, 9):
            await pilot.press("f3")
            await pilot.pause()
            await type_text(pilot, f"note {i}")
            await pilot.press("enter")
            await pilot.pause()
            lines = [history.render_line(y).text for y in range(history.size.height)]
            assert lines[0].split() == ["#", "Result", "Input", "Step"]
            assert any(line.split()[-2:] == ["note", str(i)] for line in lines[1:]), lines
        assert history.row_count > history.size.height - 1     # it had to scroll
        events = read_case(cases_dir)["events"]
        assert list(rows_by_event(history))[-1] == str(events[-1]["n"])

        await pilot.press("ctrl+z")                 # undoes the answer (notes stay)
        await pilot.pause()
        shown = rows_by_event(history)
        kept = {str(e["n"]) for e in read_case(cases_dir)["events"]}
        assert set(shown) <= kept
        assert not any(cells[1].endswith("glow") for cells in shown.values())
