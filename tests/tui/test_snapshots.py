"""Pictures of the main screens at 80x24 (pytest-textual-snapshot).

Deterministic: fixed clock, in-memory settings with the cursor not blinking, the fixture
knowledge, the working folder set to the temp folder (so paths read 'cases'), and toasts
cleared before the picture. The pilot tests assert the behaviour; these only guard the look.
Regenerate with: python -m pytest tests/tui/test_snapshots.py --snapshot-update
"""

from __future__ import annotations

import pytest
from conftest import FIXED_NOW, fixed_clock
from tui_helpers import acknowledge_cautions, answer, make_cases, new_case, ready


@pytest.fixture
def snap_app(workspace, tmp_path, monkeypatch):
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings

    monkeypatch.chdir(tmp_path)

    def make():
        settings = Settings(None, safety_acknowledged=FIXED_NOW.isoformat(), cursor_blink=False)
        return build_app(workspace, clock=fixed_clock, settings=settings)

    return make


async def _settle(pilot) -> None:
    await ready(pilot)
    pilot.app.clear_notifications()
    await pilot.pause()


def test_start_screen(snap_app, workspace, snap_compare):
    """Start screen: the safety strip at the top; the case table with one open case
    (20261201-B1-002, selected first), one DAMAGED file (truncated) and one closed case
    (20261201-B1-001, for parts), symptoms by title ('Loud hum'); the detail
    line of the selected open case;
    the footer with ⏎ Open, n New case, v View, r Review, f9 Safety, ? Help, ^q Quit."""
    make_cases(workspace)

    async def run_before(pilot):
        await _settle(pilot)

    assert snap_compare(snap_app(), terminal_size=(80, 24), run_before=run_before)


def _walk_to_suspects(apprentice: bool):
    async def run_before(pilot):
        await new_case(pilot, apprentice=apprentice)
        await acknowledge_cautions(pilot)
        await pilot.press("1")
        await pilot.pause()
        await acknowledge_cautions(pilot)
        await answer(pilot, "20 V")
        await _settle(pilot)
    return run_before


def test_walk_guidance_open(snap_app, snap_compare):
    """Walk screen, apprentice case: stage map with SUPPLY highlighted as current and
    '? suspect', the other stages '· to test'; 'Following: Weak first filter capacitor';
    the check 'Does bridging the first capacitor cure the hum?' with choices 1 and 2; the
    empty answer field; the history numbered by check (1 ✓ glow, then 2 ! low for 20 V); the
    guidance pane on the right with How, Why and the suspects list; the compact footer
    f1 Guide ... esc Back ^q Quit on one line."""
    assert snap_compare(snap_app(), terminal_size=(80, 24), run_before=_walk_to_suspects(True))


def test_walk_guidance_closed(snap_app, snap_compare):
    """Same walk step without apprentice mode: no guidance pane, the check and the history
    use the full width."""
    assert snap_compare(snap_app(), terminal_size=(80, 24), run_before=_walk_to_suspects(False))


def test_conclusion_screen(snap_app, snap_compare):
    """Conclusion screen after the capacitor was cleared and 'B+ comes back': the SUPPLY box
    '✗ FAULTY'; the title '✗ FAULT  Weak rectifier tube (supply)'; the repair step 'Replace
    the rectifier tube.' and 'Parts: 35W4 rectifier tube'; the suggestion 'Suggested: 35W4 rectifier
    tube (ctrl+t puts it in the field)' above an empty parts field; the history of the four answers below, numbered 1 to 4."""
    async def run_before(pilot):
        await _walk_to_suspects(False)(pilot)
        await pilot.press("2")          # capacitor: no change -> next suspect
        await pilot.pause()
        await pilot.press("1")          # rectifier: B+ comes back -> fault
        await _settle(pilot)

    assert snap_compare(snap_app(), terminal_size=(80, 24), run_before=run_before)


def test_readings_sheet(snap_app, snap_compare):
    """Readings sheet of the demo 5-tube set: caption with the set's label; the voltage chart
    of the stage under test (supply: each tube's heater pins, the rectifier's cathode) above
    the table; the table with
    the SUPPLY heading row first and its readings (low, nominal, high, and the ≈ column in
    view at the right where typical);
    the first reading selected and its basis in the panel at the bottom."""
    async def run_before(pilot):
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        await pilot.press("f6")
        await _settle(pilot)

    assert snap_compare(snap_app(), terminal_size=(80, 24), run_before=run_before)
