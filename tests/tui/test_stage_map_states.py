"""The stage map once a fault is concluded: only the faulty stage stands out.

The fixture's "distorted" walk starts with an audio check whose abnormal answer makes the
audio stage (and the speaker box, which belongs to it) suspect, then concludes a supply
fault. From the conclusion on, the suspected-but-never-cleared stages read "no need"
(symbol, word and colour class), through the repair, verify and close screens.
"""

from __future__ import annotations

import pytest
from tui_helpers import acknowledge_cautions, answer, new_case

from faultwise.expect.expected import expect
from faultwise.profile.load import load_profile


def box_text(screen, box_id: str) -> str:
    return str(screen.query_one(f"#stage-{box_id}").render())


def assert_only_fault_stands_out(screen) -> None:
    for box_id in ("audio", "speaker"):
        box = screen.query_one(f"#stage-{box_id}")
        assert "no need" in box_text(screen, box_id), box_id
        assert box.has_class("-not-needed") and not box.has_class("-suspect")
    assert "FAULTY" in box_text(screen, "supply")
    assert screen.query_one("#stage-supply").has_class("-faulty")
    for box_id in ("antenna", "oscillator", "if", "detector"):
        assert "to test" in box_text(screen, box_id)


@pytest.fixture
def ripple_band(knowledge_dir):
    return expect(load_profile(knowledge_dir / "sets" / "demo-5-tube-table.yaml"))


async def test_suspects_are_set_aside_after_the_conclusion(make_app, ripple_band):
    app = make_app()
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot, complaint="distorted")
        assert app.screen.id == "walk"
        await pilot.press("2")                 # stays at zero volume: abnormal, in audio
        await pilot.pause()
        assert "suspect" in box_text(app.screen, "audio")
        assert app.screen.query_one("#stage-speaker").has_class("-suspect")
        # The supply box (the current check's stage) gets the heavy border like any other.
        supply = app.screen.query_one("#stage-supply")
        assert supply.has_class("-current") and supply.styles.border_top[0] == "heavy"
        high = ripple_band["supply.ripple_vpp"].high * 2     # far above the band: high
        await answer(pilot, f"{high:.3g}")
        await acknowledge_cautions(pilot)
        assert app.screen.id == "conclusion"
        assert app.screen.walk.conclusion.stage == "supply"
        assert_only_fault_stands_out(app.screen)          # repair
        await pilot.press("enter")                           # parts -> verify
        await pilot.pause()
        await acknowledge_cautions(pilot)
        assert "VERIFY" in str(app.screen.query_one("#check-title").render())
        assert_only_fault_stands_out(app.screen)          # verify
        nominal = ripple_band["supply.rectifier_out_v"].nominal
        await answer(pilot, f"{nominal:.0f}")
        await acknowledge_cautions(pilot)
        await answer(pilot, "0.1")                           # leakage: normal
        assert app.screen.query_one("#close-form").display
        assert_only_fault_stands_out(app.screen)          # close


def test_rule_keeps_cleared_stages_and_sets_suspects_aside():
    """The pure rule: cleared stays cleared, suspect becomes not needed, fault is faulty."""
    from faultwise.tui.widgets.stage_map import (
        CLEARED,
        FAULTY,
        NOT_NEEDED,
        STATE_TEXT,
        SUSPECT,
        StepView,
        stage_states,
    )

    steps = [StepView("audio", "stays", False), StepView("detector", "ok", True),
             StepView("supply", "high", False), StepView("if", "skipped", True),
             StepView("antenna", "low", False, phase="verify")]
    during = stage_states(steps, None)
    assert during == {"audio": SUSPECT, "detector": CLEARED, "supply": SUSPECT}
    after = stage_states(steps, "supply")
    assert after == {"audio": NOT_NEEDED, "detector": CLEARED, "supply": FAULTY}
    # Every state has its own symbol and word (never colour alone).
    symbols = {text.split()[0] for text in STATE_TEXT.values()}
    assert len(symbols) == len(STATE_TEXT)
