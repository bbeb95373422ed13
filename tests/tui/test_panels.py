"""The walk's side panels and sheets: guidance, why-this-check, the readings sheet, the
template form, and the stage map's states (word and colour class)."""

from __future__ import annotations

from conftest import read_case
from tui_helpers import past_first_observation, acknowledge_cautions, answer, new_case, ready, type_text

from faultwise.core.errors import InputError
from faultwise.expect.expected import expect
from faultwise.profile.load import load_profile
from faultwise.core.units import parse_reading


async def test_guidance_toggles_and_apprentice_opens_it(make_app, cases_dir):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot, apprentice=True)
        assert read_case(cases_dir)["apprentice"] is True
        await acknowledge_cautions(pilot)
        guidance = app.screen.query_one("#guidance")
        assert guidance.display                                 # open by default
        text = str(app.screen.query_one("#guidance-text").render())
        assert "series lamp" in text                            # the check's "how"
        assert "one open heater" in text                        # and its "why"
        assert app.focused.id == "answer"
        await pilot.press("f1")                                 # works while typing
        assert not guidance.display
        await pilot.press("f1")
        assert guidance.display


async def test_why_this_check_lists_suspects_by_p_over_c(make_app, knowledge_dir):
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.walk.rank import rank_investigations

    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await past_first_observation(pilot)
        await answer(pilot, "20")                   # low B+ -> the suspects list
        await pilot.press("f2")
        await pilot.pause()
        assert app.screen.id == "explain"
        table = app.screen.query_one("#explain-table")
        # Same order and numbers as the ranking the walk uses (p/c, Heckerman et al. 1995).
        ranked = rank_investigations(load_knowledge(knowledge_dir), "supply.low-b-suspects",
                                     "hum-loud", "series-string")
        assert [table.get_row(r.target)[2] for r in ranked] == [f"{r.p:.2f}" for r in ranked]
        assert table.get_row(ranked[0].target)[0] == "▶"
        assert ranked[0].ratio >= ranked[1].ratio
        await pilot.press("escape")
        assert app.screen.id == "walk"


async def test_readings_sheet_groups_by_stage_and_shows_basis(make_app, knowledge_dir):
    expected = expect(load_profile(knowledge_dir / "sets" / "demo-5-tube-table.yaml"))
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        await pilot.press("f6")
        await pilot.pause()
        assert app.screen.id == "readings"
        table = app.screen.query_one("#readings-table")
        stages = {e.stage for e in expected.values()}
        assert table.row_count == len(expected) + len(stages)     # a heading row per stage
        for name, exp in expected.items():
            row = table.get_row(name)
            assert row[4] == ("≈" if exp.typical else "")          # typical marked
        # Move to the rectifier output and read its basis.
        keys = [row_key.value for row_key in table.rows]
        await pilot.press(*["down"] * (keys.index("supply.rectifier_out_v") - 1))
        await pilot.pause()
        basis = str(app.screen.query_one("#readings-basis").render())
        assert expected["supply.rectifier_out_v"].basis[:40] in basis
        await pilot.press("escape")
        assert app.screen.id == "walk"
        assert app.focused.id == "answer"


async def test_template_form_checks_each_field_like_the_cli(make_app):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await ready(pilot)
        await pilot.press("n")
        await ready(pilot)
        await pilot.press("f2")
        await pilot.pause()
        assert app.screen.id == "template-form"
        await pilot.press("1")                             # series-string
        await pilot.pause()
        assert app.focused.id == "tf-label"
        await pilot.press("enter")                         # label left empty for now
        assert app.focused.id == "tf-mains-volts-v"        # the family's supply comes first
        await type_text(pilot, "12 furlongs")
        await pilot.pause()
        with_parser = None
        try:
            parse_reading("12 furlongs", "V")
        except InputError as exc:
            with_parser = str(exc)
        shown = str(app.screen.query_one("#tf-mains-volts-v-error").render())
        assert with_parser and shown == with_parser          # same parser, same message
        await pilot.press("f10")
        assert app.screen.id == "template-form"              # refused
        app.focused.value = ""
        await type_text(pilot, "117 V")
        await pilot.press("f10")
        await pilot.pause()
        # profile_from_dict refuses the missing label; the message sits under the label.
        label_error = str(app.screen.query_one("#tf-label-error").render())
        assert "label" in label_error
        assert app.focused.id == "tf-label"
        await type_text(pilot, "Bench")
        await pilot.press("f10")
        await pilot.pause()
        # Next refusal: a series-string set needs its tube lineup.
        assert app.focused.id == "tf-tubes"
        assert "tube" in str(app.screen.query_one("#tf-tubes-error").render())
        # A long lineup is pasted rather than typed key by key.
        app.focused.insert_text_at_cursor("converter=12BE6, if=12BA6, detector=12AV6, "
                                          "output=50C5, rectifier=35W4")
        await pilot.press("f10")
        await pilot.pause()
        assert app.screen.id == "new-case"
        assert app.screen.chosen_set.profile.mains_v == 117.0
        assert "Bench" in str(app.screen.query_one("#set-chosen").render())


async def test_stage_map_marks_states_with_words(make_app):
    from faultwise.tui.widgets.stage_map import StageMap

    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        assert not app.screen.query_one("#guidance").display     # closed without apprentice
        supply = app.screen.query_one("#stage-supply")
        assert supply.has_class("-current")
        await pilot.press("1")                              # heaters glow: normal
        await pilot.pause()
        await acknowledge_cautions(pilot)
        assert "cleared" in str(supply.render()) and supply.has_class("-cleared")
        await answer(pilot, "20")                           # low: suspect
        assert "suspect" in str(supply.render()) and supply.has_class("-suspect")
        assert "to test" in str(app.screen.query_one("#stage-if").render())
        assert len(app.screen.query_one(StageMap).children) == 7


async def test_bindings_follow_the_phase(make_app):
    """check_action hides what does not apply: no skip/why at the conclusion, no 'not cured'
    during the diagnosis; the palette offers the rare 'return unrepaired'."""
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        keys = app.screen.active_bindings
        assert {"f1", "f2", "f3", "f4", "f5", "f6", "escape"} <= set(keys)
        assert "f8" not in keys
        assert "ctrl+z" not in keys                       # nothing to undo yet
        titles = [c.title for c in app.get_system_commands(app.screen)]
        assert "Return the set unrepaired" in titles and "Safety notice" in titles
        await pilot.press("1")
        await pilot.pause()
        await acknowledge_cautions(pilot)
        assert "ctrl+z" in app.screen.active_bindings
        await pilot.press("f5")
        await type_text(pilot, "burnt")
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen.id == "conclusion"
        keys = app.screen.active_bindings
        assert "f4" not in keys and "f2" not in keys and "f5" not in keys
        assert "f8" not in keys                     # an off-graph finding has no suspect to clear
        assert {"f3", "f6", "f9", "ctrl+z", "escape"} <= set(keys)


async def test_review_key_opens_the_shop_review(make_app):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await ready(pilot)
        assert "r" in app.screen.active_bindings
        await pilot.press("r")
        await pilot.pause()
        assert app.screen.id == "review"


async def test_help_page_opens_from_the_start_screen(make_app):
    from faultwise.tui.screens.help import help_text

    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await ready(pilot)
        await pilot.press("question_mark")
        await pilot.pause()
        assert app.screen.id == "help"
        assert "ctrl+z" in help_text() and "F5" in help_text()
        await pilot.press("escape")
        assert app.screen.id == "start"


async def test_readings_sheet_shows_the_chart_of_the_stage_under_test(make_app, knowledge_dir):
    """F6 on a check puts that stage's voltage chart (device, pin, electrode, nominal) above
    the table; the rows are the domain's chart rows for the check's stage."""
    from faultwise.expect.chart import chart_rows, stage_chart_lines

    profile = load_profile(knowledge_dir / "sets" / "demo-5-tube-table.yaml")
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        stage = app.screen.walk.prompt().stage
        await pilot.press("f6")
        await pilot.pause()
        assert app.screen.id == "readings"
        lines = stage_chart_lines(chart_rows(profile, expect(profile)), stage)
        assert lines, f"the demo set has chart rows for stage {stage}"
        shown = str(app.screen.query_one("#readings-chart").render())
        assert lines[0][:30] in shown
        assert "pin " in shown
