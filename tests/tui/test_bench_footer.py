"""The case screens' key bar follows the keys that apply, and is rebuilt only when they change.

What the bar must show is what Textual itself says applies (``Screen.active_bindings``, the
screen's ``check_action``): that is the reference each check compares the bar with.
"""

from __future__ import annotations

from tui_helpers import acknowledge_cautions, answer, new_case

from faultwise.tui.widgets.bench_footer import BenchFooter


def bar(app) -> list[str]:
    """The descriptions of the keys on the walk screen's bar, in order."""
    return [key.description for key in app.screen.query_one(BenchFooter).query("FooterKey")]


def applies(app) -> list[str]:
    """What Textual says the bar should show: shown bindings that apply now."""
    return [b.description for (_, b, enabled, _) in app.screen.active_bindings.values()
            if b.show and enabled]


async def settle(pilot) -> None:
    for _ in range(3):              # the bar is checked after the step has been painted
        await pilot.pause()


async def test_key_bar_follows_the_step_and_keeps_its_keys_when_nothing_changed(make_app):
    app = make_app()
    async with app.run_test(size=(100, 30)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        await settle(pilot)
        assert "Undo" not in bar(app)              # nothing to undo yet
        assert bar(app) == applies(app)

        await pilot.press("1")                     # the first answer: undo applies now
        await settle(pilot)
        await acknowledge_cautions(pilot)
        await settle(pilot)
        assert "Undo" in bar(app)
        assert bar(app) == applies(app)

        # A step that leaves the same keys applying keeps the same key widgets.
        before = list(app.screen.query_one(BenchFooter).query("FooterKey"))
        keys_before = applies(app)
        await answer(pilot, "20")
        await settle(pilot)
        await acknowledge_cautions(pilot)
        await settle(pilot)
        assert bar(app) == applies(app) == keys_before      # same keys (a reading, then
        after = list(app.screen.query_one(BenchFooter).query("FooterKey"))   # an observation)
        assert after == before and all(a is b for a, b in zip(after, before))
