"""A caution is acknowledged only deliberately (issue: a stray Enter after a number key
acknowledged the next check's caution unseen).

Keys are sent as fast as the pilot can send them, with the answer field focused as a tech
uses it, at 80x24. The shipped guard time is used (Settings' default), not the short one the
other flow tests use. Common practice, no source: a confirmation that a habitual keystroke
can reach must ignore input for a moment after it opens.
"""

from __future__ import annotations

from conftest import FIXED_NOW, fixed_clock, read_case
from tui_helpers import new_case, wait_armed


def guarded_app(workspace):
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings

    return build_app(workspace, clock=fixed_clock,
                     settings=Settings(None, safety_acknowledged=FIXED_NOW.isoformat()))


def acks(data: dict) -> list[dict]:
    return [e for e in data["events"] if e["type"] == "acknowledge"]


async def test_stray_enter_after_a_number_key_does_not_acknowledge(workspace, cases_dir):
    from faultwise.tui.screens.caution import GUARD_S

    app = guarded_app(workspace)
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot, complaint="hums loudly")
        assert app.screen.id == "caution"
        # The dialog says keys are ignored for a moment, and a key at once does nothing.
        assert f"ignored for {GUARD_S:g} s" in str(app.screen.query_one("#caution-guard").render())
        await pilot.press("enter", "enter", "space")
        assert app.screen.id == "caution"
        assert acks(read_case(cases_dir)) == []
        await wait_armed(pilot)
        assert "Enter: understood" in str(app.screen.query_one("#caution-guard").render())
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen.id == "walk" and app.focused.id == "answer"
        first = acks(read_case(cases_dir))
        assert [a["caution"] for a in first] == ["live-chassis"]
        # The acknowledgement records when the dialog was shown and how long it was open.
        assert first[0]["shown"] == FIXED_NOW.isoformat(timespec="seconds")
        assert first[0]["read_s"] >= GUARD_S

        # The number answers at once; the habitual Enter (twice) lands on the next caution.
        await pilot.press("1", "enter", "enter")
        assert app.screen.id == "caution"
        data = read_case(cases_dir)
        assert [e["outcome"] for e in data["events"] if e["type"] == "answer"] == ["glow"]
        assert "charged-caps" not in data["acknowledged"]
        await wait_armed(pilot)
        await pilot.press("enter")
        await pilot.pause()
        data = read_case(cases_dir)
        assert "charged-caps" in data["acknowledged"]
        assert acks(data)[-1]["read_s"] >= GUARD_S


async def test_reminder_opens_without_a_guard(make_app):
    """F7 only shows the cautions again (nothing is recorded): Enter closes it at once."""
    from faultwise.graph import load_knowledge
    from faultwise.tui.screens.caution import CautionScreen

    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        knowledge = load_knowledge(app.bench.workspace.knowledge_dir)
        results: list = []
        app.push_screen(CautionScreen(list(knowledge.cautions.values())[:1], reminder=True),
                        results.append)
        await pilot.pause()
        await pilot.press("enter")
        await pilot.pause()
        assert results == [True]
