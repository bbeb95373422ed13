"""The caution modal with several cautions: the texts scroll inside the dialog and the
buttons stay on screen (docked at the bottom of the dialog) at 80x24 and larger.

The cautions are the shipped knowledge's own (the leakage check names three), so the test
follows the text lengths the bench really shows.
"""

from __future__ import annotations

import pytest
from conftest import FIXED_NOW, fixed_clock, read_case
from tui_helpers import acknowledge_cautions, new_case, wait_armed

from faultwise.core.workspace import Workspace, bundled_knowledge_dir


def bundled_app(cases_dir):
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings

    workspace = Workspace(knowledge_dir=bundled_knowledge_dir(), cases_dir=cases_dir, bench="B1")
    return build_app(workspace, clock=fixed_clock,
                     settings=Settings(None, safety_acknowledged=FIXED_NOW.isoformat()))


def leakage_cautions():
    from faultwise.graph.knowledge import load_knowledge

    knowledge = load_knowledge(bundled_knowledge_dir())
    check = knowledge.node("supply.leakage-check")
    return [knowledge.cautions[c] for c in check.cautions]


def inside(inner, outer) -> bool:
    """True when region ``inner`` lies wholly within region ``outer``."""
    return (inner.x >= outer.x and inner.y >= outer.y and inner.right <= outer.right
            and inner.bottom <= outer.bottom)


@pytest.mark.parametrize("size", [(80, 24), (100, 40)])
async def test_buttons_stay_visible_and_the_text_scrolls(make_app, size):
    from textual.geometry import Region

    from faultwise.tui.screens.caution import CautionScreen

    cautions = leakage_cautions()
    assert len(cautions) >= 2
    app = make_app()
    results: list[bool] = []
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        app.push_screen(CautionScreen(cautions), results.append)
        await pilot.pause()
        screen = app.screen
        assert screen.id == "caution"
        whole = Region(0, 0, *size)
        box = screen.query_one("#caution-box").region
        assert inside(box, whole)
        for button_id in ("#caution-ok", "#caution-leave"):
            button = screen.query_one(button_id).region
            assert button.height > 0 and inside(button, box), (button_id, button, box)
        scroll = screen.query_one("#caution-scroll")
        assert inside(scroll.region, box)
        # The scroll area never overlaps the buttons.
        assert scroll.region.bottom <= screen.query_one("#caution-buttons").region.y
        if size == (80, 24):
            # Three long cautions do not fit at 80x24: the text scrolls, by key too.
            assert scroll.max_scroll_y > 0
            await pilot.press("pagedown")
            await pilot.pause()
            assert scroll.scroll_y > 0
        await wait_armed(pilot)
        await pilot.press("enter")                 # Enter still acknowledges
        await pilot.pause()
        assert results == [True]
        assert app.screen.id == "start"


async def test_leakage_check_cautions_on_the_bundled_knowledge(cases_dir):
    """Returning a series-string set unrepaired: the leakage check's unread cautions come
    in one modal; the buttons are on screen at 80x24, Enter acknowledges both."""
    app = bundled_app(cases_dir)
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot, search="5 tube table", complaint="hums loudly")
        await acknowledge_cautions(pilot)       # the first check's own cautions
        before = set(read_case(cases_dir)["acknowledged"])
        app.screen.action_to_closing()            # palette: return the set unrepaired
        await pilot.pause()
        assert app.screen.id == "caution"
        pending = [c.id for c in app.screen.cautions]
        assert len(pending) >= 2 and not set(pending) & before
        ok = app.screen.query_one("#caution-ok").region
        assert ok.height > 0 and ok.bottom <= 24
        await wait_armed(pilot)
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen.id == "conclusion"
        assert set(pending) <= set(read_case(cases_dir)["acknowledged"])
        assert "Leakage" in str(app.screen.query_one("#check-title").render())
