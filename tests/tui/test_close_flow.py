"""Closing a case: the confirmation asked before "repaired" when a verify reading was not
normal (nothing recorded until the technician chooses), and the minutes field (prefilled
with the whole minutes since the case was opened, at least 1; a whole number >= 0, refused
in place otherwise).

The readings typed are placed against the bands the project's expect() computes for the
fixture's demo set, not hard-coded.
"""

from __future__ import annotations

from datetime import timedelta

import pytest
from conftest import FIXED_NOW, read_case
from tui_helpers import acknowledge_cautions, answer, new_case, type_text

from faultwise.expect.expected import expect
from faultwise.profile.load import load_profile


@pytest.fixture
def bands(knowledge_dir):
    return expect(load_profile(knowledge_dir / "sets" / "demo-5-tube-table.yaml"))


class StepClock:
    """A clock the test moves by hand (no real time involved)."""

    def __init__(self) -> None:
        self.now = FIXED_NOW

    def __call__(self):
        return self.now


def clocked_app(workspace, clock):
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings

    return build_app(workspace, clock=clock,
                     settings=Settings(None, safety_acknowledged=FIXED_NOW.isoformat()))


async def walk_to_capacitor_fault(pilot, bands) -> None:
    """Hum: heaters glow, B+ low, bridging the first capacitor cures it -> the fault."""
    await new_case(pilot)
    await acknowledge_cautions(pilot)
    await pilot.press("1")
    await pilot.pause()
    await acknowledge_cautions(pilot)
    band = bands["supply.rectifier_out_v"]
    await answer(pilot, f"{(band.absent_below + band.low) / 2:.1f}")      # low
    await pilot.press("1")                                                # cured
    await pilot.pause()
    await acknowledge_cautions(pilot)
    assert pilot.app.screen.id == "conclusion"
    assert pilot.app.screen.walk.conclusion.id == "supply.open-first-cap"


async def verify_low_then_leakage(pilot, bands) -> None:
    """Parts, the verify reading still low, the leakage check normal: the close form."""
    await pilot.press("enter")                                            # parts
    await pilot.pause()
    band = bands["supply.rectifier_out_v"]
    await answer(pilot, f"{(band.absent_below + band.low) / 2:.1f}")      # verify: low
    await acknowledge_cautions(pilot)
    # The warning over the leakage check names the verify check by its title.
    warning = str(pilot.app.screen.query_one("#check-warning").render())
    assert "DC at the first filter capacitor" in warning
    assert "supply.rectifier-out" not in warning
    leak = bands["safety.leakage_v"]
    await answer(pilot, f"{leak.high / 4:.2f}")                           # normal
    assert pilot.app.screen.query_one("#close-form").display
    assert pilot.app.screen.walk.verify_failed


async def test_repaired_with_a_failed_verify_asks_first(make_app, cases_dir, bands):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await walk_to_capacitor_fault(pilot, bands)
        await verify_low_then_leakage(pilot, bands)
        before = read_case(cases_dir)
        await pilot.press("1")                              # repaired
        await pilot.pause()
        assert app.screen.id == "confirm-repaired"
        shown = str(app.screen.query_one("#confirm-question").render())
        assert "A verify reading was not normal: close as repaired anyway?" in shown
        failing = str(app.screen.query_one("#confirm-failing").render())
        assert "DC at the first filter capacitor" in failing and "low" in failing
        assert "supply.rectifier-out" not in failing        # the title, not the id
        for button in ("#confirm-yes", "#confirm-resume", "#confirm-cancel"):
            region = app.screen.query_one(button).region
            assert region.height > 0 and region.bottom <= 24
        assert read_case(cases_dir) == before                # nothing recorded yet

        # Cancel: back to the close form, the outcome cleared, still nothing recorded.
        await pilot.press("escape")
        await pilot.pause()
        assert app.screen.id == "conclusion"
        assert app.focused.id == "close-outcome" and app.focused.value == ""
        assert read_case(cases_dir) == before

        # Yes: the outcome is taken; the close is recorded only with the minutes.
        await pilot.press("1")
        await pilot.pause()
        await pilot.press("y")
        await pilot.pause()
        assert app.screen.id == "conclusion" and app.focused.id == "close-minutes"
        assert read_case(cases_dir) == before
        app.focused.value = ""
        await type_text(pilot, "40")
        await pilot.press("enter")
        await pilot.pause()
        data = read_case(cases_dir)
        assert (data["status"], data["outcome"], data["minutes"]) == ("closed", "repaired", 40)


async def test_resume_from_the_confirmation(make_app, cases_dir, bands):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await walk_to_capacitor_fault(pilot, bands)
        await verify_low_then_leakage(pilot, bands)
        await pilot.press("1")
        await pilot.pause()
        await pilot.press("r")                              # resume the diagnosis
        await pilot.pause()
        data = read_case(cases_dir)
        assert data["events"][-1]["type"] == "resume"
        assert data["status"] == "open" and data["conclusion"] is None
        assert app.screen.id == "walk"
        # The next suspect of the same list: the rectifier.
        assert "rectifier" in str(app.screen.query_one("#check-title").render())
        # The history names the fault taken back by its title.
        history = app.screen.query_one("#history")
        resumed = history.get_row(str(data["events"][-1]["n"]))
        assert resumed[1].plain == "not cured"
        assert resumed[3].plain.endswith("Dried-out first filter capacitor")


async def test_returned_unrepaired_is_not_asked(make_app, cases_dir, bands):
    """The confirmation concerns "repaired" only."""
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await walk_to_capacitor_fault(pilot, bands)
        await verify_low_then_leakage(pilot, bands)
        await pilot.press("2")
        await pilot.pause()
        assert app.screen.id == "conclusion" and app.focused.id == "close-minutes"


@pytest.mark.parametrize("moves", [(), ("tab",)], ids=["typed", "after-tab"])
async def test_minutes_typed_after_the_outcome_replace_the_prefilled_ones(make_app, cases_dir,
                                                                          bands, moves):
    """At the bench the tech presses the outcome's number, then types the minutes: the typed
    number replaces the prefilled elapsed minutes (a prefilled 1 with 25 typed was 125).
    Found walking a case in tmux: a habitual Tab first (the focus moves on to the history,
    and typing brings it back) made a typed 25 into 125 again."""
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await walk_to_capacitor_fault(pilot, bands)
        await verify_low_then_leakage(pilot, bands)
        await pilot.press("2")                       # returned unrepaired: no confirmation
        await pilot.pause()
        minutes = app.screen.query_one("#close-minutes")
        assert app.focused is minutes and minutes.value != ""
        for key in moves:
            await pilot.press(key)
            await pilot.pause()
        await pilot.press("2", "5")                  # as fast as a tmux send-keys
        await pilot.press("enter")
        await pilot.pause()
        data = read_case(cases_dir)
        assert (data["status"], data["minutes"]) == ("closed", 25)


async def test_minutes_prefilled_and_checked(workspace, cases_dir, bands):
    clock = StepClock()
    app = clocked_app(workspace, clock)
    async with app.run_test(size=(80, 24)) as pilot:
        await walk_to_capacitor_fault(pilot, bands)
        opened = read_case(cases_dir)["opened"]
        clock.now = FIXED_NOW + timedelta(minutes=47, seconds=50)
        await pilot.press("enter")                           # parts
        await pilot.pause()
        nominal = bands["supply.rectifier_out_v"].nominal
        await answer(pilot, f"{nominal:.0f}")               # verify: normal
        await acknowledge_cautions(pilot)
        await answer(pilot, "0.1")                          # leakage: normal
        minutes = app.screen.query_one("#close-minutes")
        # Whole minutes from the case's own 'opened' stamp to the app's clock.
        from datetime import datetime

        expected = int((clock.now - datetime.fromisoformat(opened)).total_seconds() // 60)
        assert expected == 47 and minutes.value == str(expected)
        await pilot.press("1")
        await pilot.pause()
        assert app.focused.id == "close-minutes"
        before = read_case(cases_dir)
        # A negative number is refused in place and nothing is recorded.
        minutes.value = ""
        await type_text(pilot, "-5")
        error = str(app.screen.query_one("#close-error").render())
        assert "-5 is not a whole number of minutes, 0 or more" in error
        assert minutes.has_class("-invalid")
        await pilot.press("enter")
        await pilot.pause()
        assert read_case(cases_dir) == before
        # An empty field too.
        minutes.value = ""
        await pilot.press("enter")
        await pilot.pause()
        assert "an empty field is not a whole number" in \
            str(app.screen.query_one("#close-error").render())
        assert read_case(cases_dir) == before
        # A letter cannot even be typed (integer field); 0 is a valid whole number.
        await type_text(pilot, "x0")
        assert minutes.value == "0"
        await pilot.press("enter")
        await pilot.pause()
        data = read_case(cases_dir)
        assert (data["status"], data["minutes"]) == ("closed", 0)


async def test_minutes_at_least_one_right_after_opening(make_app, cases_dir):
    """A case closed within its first minute is prefilled with 1, not 0."""
    app = make_app()                                        # the fixed clock: 0 s elapsed
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        app.screen.action_to_closing()
        await pilot.pause()
        await answer(pilot, "0.1")
        assert app.screen.query_one("#close-minutes").value == "1"


def test_whole_minutes_since():
    """Floor of the elapsed minutes, at least 1; an unreadable stamp gives 1."""
    from faultwise.tui.screens.conclusion import whole_minutes_since

    opened = FIXED_NOW.isoformat()
    assert whole_minutes_since(opened, FIXED_NOW + timedelta(seconds=20)) == 1
    assert whole_minutes_since(opened, FIXED_NOW + timedelta(minutes=90, seconds=59)) == 90
    assert whole_minutes_since("not a time", FIXED_NOW) == 1
