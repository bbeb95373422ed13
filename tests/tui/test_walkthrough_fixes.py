"""What a technician tripped on in the 80x24 walk-throughs, each checked on screen:
the template form's fields visible, refusals without internal locations, titles instead
of node ids, long repair steps that scroll, the close form's message on screen, the
readings sheet's typical column in view, the apprentice state in words, the review's
lines within the width.
"""

from __future__ import annotations

from textual.geometry import Region
from tui_helpers import past_first_observation, acknowledge_cautions, answer, make_cases, new_case, ready

from faultwise.core.errors import InputError
from faultwise.core.units import parse_reading

SCREEN = Region(0, 0, 80, 24)


def inside(inner, outer) -> bool:
    return (inner.x >= outer.x and inner.y >= outer.y and inner.right <= outer.right
            and inner.bottom <= outer.bottom)


def fits(table) -> bool:
    """Every column of a DataTable fits beside its vertical scrollbar."""
    used = sum(c.get_render_width(table) for c in table.columns.values())
    return used <= table.size.width - table.styles.scrollbar_size_vertical


async def test_template_form_fields_are_visible_at_80x24(make_app):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await ready(pilot)
        await pilot.press("n")
        await ready(pilot)
        await pilot.press("f2", "1")
        await pilot.pause()
        screen = app.screen
        box = screen.query_one("#template-box").region
        assert inside(box, SCREEN)
        fields = screen.query_one("#template-fields").region
        for key in ("tf-label", "tf-band-low-khz", "tf-band-high-khz"):
            field = screen.query_one(f"#{key}")
            # The input sits on its label's row, on screen, not pushed out of it.
            assert field.region.height == 1 and inside(field.region, fields), key
            assert field.region.y == field.parent.region.y
        label = screen.query_one("#tf-band-high-khz").parent.children[0]
        assert label.region.width >= len("Band high (kHz)")
        # The hint (F10, Esc) is on screen under the fields.
        hint = screen.query_one("#tf-hint").region
        assert hint.height >= 1 and inside(hint, box) and hint.y >= fields.bottom
        # A refusal shows under the form without the internal location.
        await pilot.press("f10")
        await pilot.pause()
        error = screen.query_one("#tf-error")
        assert error.display and inside(error.region, box)
        label_error = str(screen.query_one("#tf-label-error").render())
        assert "label" in label_error and "template form" not in label_error
        assert "key '" not in label_error
        # The family can be changed by typing its number after the one shown.
        screen.query_one("#tf-family").focus()
        await pilot.press("end", "3")
        await pilot.pause()
        assert screen.family == "transistor"
        assert screen.query_one("#tf-battery-volts-v")


async def test_a_refused_reading_is_explained_without_node_and_key(make_app):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await past_first_observation(pilot)
        await pilot.press("enter")                       # nothing typed
        await pilot.pause()
        shown = str(app.screen.query_one("#answer-error").render())
        try:
            parse_reading("", "V")
        except InputError as exc:
            expected = exc.message
        assert expected in shown
        assert "node '" not in shown and "key '" not in shown


async def test_why_names_cleared_suspects_by_title(make_app):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await past_first_observation(pilot)
        await answer(pilot, "20")                        # low: the suspects list
        await pilot.press("2")                           # bridging: no change, cleared
        await pilot.pause()
        await pilot.press("f2")
        await pilot.pause()
        text = str(app.screen.query_one("#explain-text").render())
        title = app.bench.knowledge.node("supply.bridge-cap").title
        assert "Cleared already" in text and title in text
        assert "supply.bridge-cap" not in text


async def test_long_repair_steps_scroll_and_the_parts_field_stays(make_app, knowledge_dir):
    """The fixture's capacitor fault has six long repair steps: more than fit at 80x24."""
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await past_first_observation(pilot)
        await answer(pilot, "20")
        await pilot.press("1")                           # bridging cures it: the fault
        await pilot.pause()
        await acknowledge_cautions(pilot)
        screen = app.screen
        assert screen.id == "conclusion"
        fault = screen.walk.conclusion
        assert len(fault.repair) == 6
        scroll = screen.query_one("#repair-scroll")
        assert scroll.max_scroll_y > 0                   # they do not all fit ...
        parts = screen.query_one("#parts")
        assert app.focused is parts and inside(parts.region, SCREEN)   # ... the field shows
        await pilot.press("pagedown")
        await pilot.pause()
        assert scroll.scroll_y > 0 and app.focused is parts
        # The last step can be brought into view.
        await pilot.press("pagedown", "pagedown", "pagedown")
        await pilot.pause()
        assert scroll.scroll_y == scroll.max_scroll_y


async def test_the_close_message_is_on_screen(make_app):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        app.screen.action_to_closing()
        await pilot.pause()
        await answer(pilot, "5")                          # leakage high
        await pilot.press("1")                            # repaired: refused
        await pilot.pause()
        error = app.screen.query_one("#close-error")
        text = str(error.render())
        assert "Cannot close as repaired" in text
        assert "supply.leakage-check" not in text         # named by its title
        assert error.region.height >= 1 and inside(error.region, SCREEN)


async def test_readings_sheet_fits_and_opens_on_the_current_reading(make_app):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await past_first_observation(pilot)
        name = app.screen.walk.prompt().expected.name      # the DC reading being asked
        await pilot.press("f6")
        await pilot.pause()
        table = app.screen.query_one("#readings-table")
        assert fits(table)                               # the ≈ column is in view
        key = table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value
        assert key == name


async def test_apprentice_mode_says_its_state_in_words(make_app):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await ready(pilot)
        await pilot.press("n")
        await ready(pilot)
        box = app.screen.query_one("#apprentice")
        assert "off" in str(box.label)
        await pilot.press("f8")
        await pilot.pause()
        assert box.value and "ON" in str(box.label)


async def test_start_screen_names_the_symptom(make_app, workspace):
    make_cases(workspace)
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await ready(pilot)
        table = app.screen.query_one("#cases")
        title = app.bench.knowledge.symptoms["hum-loud"].title
        assert table.get_row("open:20261201-B1-002")[3].plain == title


def test_share_lines_fit_the_screen():
    """A fault share line (label, bar, percentage, count) fits in 80 columns."""
    from faultwise.shop.review_results import FaultShare
    from faultwise.tui.screens.review import chart_widths, share_chart

    class Pair:
        faults = (FaultShare("supply.x", "A rather long fault title that goes on and on", 12,
                             0.5, 0.4, 0.45),
                  FaultShare("supply.y", "Short", 1, 0.1, 0.1, 0.1))

    bar, label = chart_widths(80)
    lines = share_chart(Pair, bar, label).splitlines()
    assert len(lines) == 2
    assert all(len(line) <= 80 - 4 for line in lines)      # inside padding and scrollbar


async def test_long_basis_is_cut_and_points_to_the_sheet(make_app):
    """A long basis is cut at a word and points to the readings sheet for the rest."""
    from faultwise.tui.widgets.check_panel import BASIS_CHARS, short_basis

    long = "word " * 100
    cut = short_basis(long)
    assert cut.endswith("(F6: the full basis)") and len(cut) < BASIS_CHARS + 30
    assert short_basis("short basis") == "short basis"
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await past_first_observation(pilot)
        shown = str(app.screen.query_one("#check-expected").render())
        assert "F6: the full basis" in shown
        # The history keeps its rows on screen under the check.
        history = app.screen.query_one("#history")
        assert history.region.height >= 3 and inside(history.region, SCREEN)
