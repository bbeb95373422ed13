"""Text from the user and from files is shown literally, never parsed as markup: a
complaint, a customer, a set label (from the template form), a note and an off-graph
finding holding "[/b]" and "[red]x" appear as typed on every screen that shows them
(walk, conclusion, start screen, case viewer), and nothing breaks.
"""

from __future__ import annotations

from conftest import read_case
from tui_helpers import acknowledge_cautions, ready, type_text

COMPLAINT = "hums [/b] then [red]x"
CUSTOMER = "[b]Ms. [red]x[/b]"
LABEL = "Shop [red]x set [/b]"
NOTE = "old fix [/b] [red]x"
FINDING = "cracked [/b] joint [red]x"


def shown(screen, selector: str) -> str:
    return str(screen.query_one(selector).render())


async def test_user_text_is_shown_as_typed(make_app, cases_dir):
    app = make_app()
    async with app.run_test(size=(100, 30)) as pilot:
        await ready(pilot)
        await pilot.press("n")
        await ready(pilot)
        # The set from the template form, with a label that looks like markup.
        await pilot.press("f2")
        await pilot.press("1")
        await pilot.pause()
        app.focused.insert_text_at_cursor(LABEL)
        for _ in range(2):                     # label, line, then the lineup
            await pilot.press("tab")
        assert app.focused.id == "tf-tubes"
        app.focused.insert_text_at_cursor("converter=12BE6, if=12BA6, detector=12AV6, "
                                          "output=50C5, rectifier=35W4")
        await pilot.press("f10")
        await pilot.pause()
        assert app.screen.id == "new-case"
        assert LABEL in shown(app.screen, "#set-chosen")
        app.focused.insert_text_at_cursor(COMPLAINT)
        await pilot.press("enter")
        app.focused.insert_text_at_cursor(CUSTOMER)
        await pilot.press("enter")
        await pilot.pause()
        data = read_case(cases_dir)
        assert (data["complaint"], data["customer"]) == (COMPLAINT, CUSTOMER)
        assert data["set"]["profile"]["label"] == LABEL
        await acknowledge_cautions(pilot)
        assert app.screen.id == "walk"
        assert COMPLAINT in shown(app.screen, "#walk-context")
        # A note and an off-graph finding.
        await pilot.press("f3")
        await pilot.pause()
        app.focused.insert_text_at_cursor(NOTE)
        await pilot.press("enter")
        await pilot.pause()
        await pilot.press("f5")
        await pilot.pause()
        app.focused.insert_text_at_cursor(FINDING)
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen.id == "conclusion"
        assert FINDING in shown(app.screen, "#conclusion-title")
        history = app.screen.query_one("#history")
        cells = [tuple(c.plain for c in history.get_row(k)) for k in history.rows]
        assert ("", "note", "", NOTE) in cells
        assert ("", "off-graph", "", FINDING) in cells
        # The readings sheet names the set by its label.
        await pilot.press("f6")
        await pilot.pause()
        assert LABEL in shown(app.screen, "#readings-caption")
        await pilot.press("escape")
        await pilot.pause()
        # Close it as waiting for parts, then look at it from the start screen.
        await type_text(pilot, "none")
        await pilot.press("enter")                 # parts; no verify after a finding
        await pilot.pause()
        assert app.screen.walk.phase == "closing"
        await type_text(pilot, "0.1")
        await pilot.press("enter")
        await pilot.pause()
        await pilot.press("3")
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen.id == "start"
        assert read_case(cases_dir)["status"] == "closed"
        await ready(pilot)
        table = app.screen.query_one("#cases")
        row = table.get_row(f"closed:{data['id']}")
        assert row[2].plain == LABEL
        assert LABEL in shown(app.screen, "#case-detail")
        await pilot.press("v")
        await pilot.pause()
        assert app.screen.id == "viewer"
        summary = shown(app.screen, "#viewer-summary")
        for text in (LABEL, CUSTOMER, COMPLAINT, FINDING):
            assert text in summary, text
        events = app.screen.query_one("#viewer-events")
        typed = [events.get_row(k)[2].plain for k in events.rows]
        assert NOTE in typed and FINDING in typed


def test_control_characters_are_made_visible_not_sent():
    """ECMA-48 (5th ed., 1991): ESC (0x1B) and the 8-bit CSI (0x9B) start control
    sequences; on screen they become Unicode control pictures (U+2400 block, Unicode
    standard) or U+FFFD, tab and newline stay, ordinary text and markup are untouched."""
    from faultwise.tui.wording import printable

    assert printable("a\x1b[2Jb") == "a\u241b[2Jb"           # ESC -> SYMBOL FOR ESCAPE
    assert printable("\x07\x7f\x9b31m") == "\u2407\u2421\ufffd31m"
    assert printable("line\nnext\tcol [/b]") == "line\nnext\tcol [/b]"
