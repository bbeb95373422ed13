"""The bench meter in the walk, keys pressed as a technician would (answer field focused).

The meter is a simulated SCPI meter (pyvisa-sim, tests/fixtures/meter/sim-meter.yaml) read
through the project's VisaMeter; its answers are what the YAML says, so the values checked
below come from that file, and the classification from the domain's own band.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from conftest import FIXED_NOW, fixed_clock, read_case
from tui_helpers import acknowledge_cautions, answer, new_case, ready

pytest.importorskip("pyvisa_sim")

from faultwise.expect import expect  # noqa: E402
from faultwise.core.meter_setting import MeterConfig  # noqa: E402
from faultwise.profile import load_profile  # noqa: E402
from faultwise.walk import classify  # noqa: E402

SIM = Path(__file__).parent.parent / "fixtures" / "meter" / "sim-meter.yaml"
GOOD = "USB0::0x1234::0x5678::SIM0001::INSTR"
DEAD = "USB0::0x1234::0x5678::SIM0002::INSTR"
IDN = "Demo Instruments DMM-45 simulated SIM0001 0.1"
METER_CAUTION = """
  - id: meter-link
    title: A meter wired to the computer
    text: Meter leads rated for the circuit (CAT); an unisolated USB link on a live chassis makes the USB ground live.
"""


@pytest.fixture
def meter_app(knowledge_dir, cases_dir):
    """The bench app with the simulated meter set for the bench, fixture knowledge plus the
    meter caution (the bundled cautions.yaml carries it)."""
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings
    from faultwise.core.workspace import Workspace

    with (knowledge_dir / "cautions.yaml").open("a", encoding="utf-8") as f:
        f.write(METER_CAUTION)
    config = MeterConfig("visa", GOOD, timeout_s=0.5, backend=f"{SIM}@sim")
    ws = Workspace(knowledge_dir=knowledge_dir, cases_dir=cases_dir, bench="B1", meter=config)
    return build_app(ws, clock=fixed_clock,
                     settings=Settings(None, safety_acknowledged=FIXED_NOW.isoformat()))


def band(knowledge_dir, name):
    return expect(load_profile(knowledge_dir / "sets" / "demo-5-tube-table.yaml"))[name]


def last_answer(cases_dir) -> dict:
    return [e for e in read_case(cases_dir)["events"] if e["type"] == "answer"][-1]


async def meter_key(pilot, key: str = "f10") -> None:
    await pilot.press(key)
    await pilot.pause()
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()
    await pilot.pause()


def footer_keys(app) -> list[str]:
    return [b.description for (_, b, enabled, _) in app.screen.active_bindings.values()
            if enabled and b.show]


async def test_meter_reading_recorded_with_value_unit_meter_and_time(meter_app, cases_dir,
                                                                     knowledge_dir):
    app = meter_app
    async with app.run_test(size=(100, 32)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        assert "Meter" not in footer_keys(app)        # an observation takes no reading
        await pilot.press("1")
        await pilot.pause()
        await acknowledge_cautions(pilot)
        # B+ (DC volts): the footer names the meter key, the panel says what it reads.
        assert "Meter" in footer_keys(app)
        assert "DC volts" in str(app.screen.query_one("#meter-line").render())
        before = read_case(cases_dir)["events"]
        await pilot.press("f10")
        await pilot.pause()
        # First meter use in this case: the meter-link caution, acknowledged once.
        assert app.screen.id == "caution"
        assert "wired to the computer" in str(app.screen.query_one("#caution-scroll")
                                               .query_one(".caution-text").render())
        await acknowledge_cautions(pilot)          # after its guard time, like any caution
        await app.workers.wait_for_complete()
        await pilot.pause()
        await pilot.pause()
        data = read_case(cases_dir)
        assert "meter-link" in data["acknowledged"]
        event = last_answer(cases_dir)
        assert len(data["events"]) > len(before)
        assert event["node"] == "supply.rectifier-out"
        assert event["value"] == pytest.approx(122.4)          # the sim's MEAS:VOLT:DC?
        assert event["meter"] == {"value": 122.4, "unit": "V", "mode": "DC", "meter": IDN,
                                  "at": FIXED_NOW.isoformat(timespec="seconds")}
        assert event["outcome"] == classify(122.4, band(knowledge_dir,
                                                        "supply.rectifier_out_v"))

        # Ripple is peak-to-peak: the meter key leaves the footer, the line says why, and
        # pressing it anyway records nothing.
        assert "ripple" in str(app.screen.query_one("#check-title").render()).lower()
        assert "Meter" not in footer_keys(app)
        assert "scope" in str(app.screen.query_one("#meter-line").render())
        before = read_case(cases_dir)["events"]
        await meter_key(pilot)
        assert read_case(cases_dir)["events"] == before
        assert app.focused.id == "answer"
        await answer(pilot, "30 V")                              # typed as before: high
        assert last_answer(cases_dir)["node"] == "supply.ripple"
        assert "meter" not in last_answer(cases_dir)

        # Conclusion, parts, then the verify reading from the meter on the conclusion
        # screen, in hold mode: three agreeing samples (the sim answers the same each time).
        assert app.screen.id == "conclusion"
        await pilot.press("enter")                               # parts: none
        await pilot.pause()
        await acknowledge_cautions(pilot)
        assert "Meter" in footer_keys(app)
        await meter_key(pilot, "ctrl+t")
        assert app.bench.meter.hold
        line = str(app.screen.query_one("#meter-line").render())
        assert "until three samples agree" in line
        assert IDN in line                       # the meter's own name once it answered
        await meter_key(pilot)
        event = last_answer(cases_dir)
        assert (event["phase"], event["node"]) == ("verify", "supply.rectifier-out")
        assert event["meter"]["meter"] == IDN and event["meter"]["unit"] == "V"
        # the caution was shown once per case only
        assert read_case(cases_dir)["acknowledged"].count("meter-link") == 1


async def test_meter_time_out_mid_walk_loses_nothing_and_falls_back_to_typing(
        meter_app, cases_dir):
    app = meter_app
    async with app.run_test(size=(100, 32)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        await pilot.press("1")
        await pilot.pause()
        await acknowledge_cautions(pilot)
        await pilot.press("f10")
        await pilot.pause()
        await acknowledge_cautions(pilot)                        # the meter-link caution
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.pause()
        await pilot.pause()
        await answer(pilot, "30")                                # ripple, typed
        await pilot.press("enter")                               # parts: none
        await pilot.pause()
        await acknowledge_cautions(pilot)
        # The meter is unplugged: the same bench now reaches a meter that never answers.
        from faultwise.meter.visa import VisaMeter

        app.bench.meter.meter.close()
        app.bench.meter.meter = VisaMeter(DEAD, timeout_s=0.5, backend=f"{SIM}@sim",
                                          clock=fixed_clock)
        before = read_case(cases_dir)
        await meter_key(pilot)
        error = str(app.screen.query_one("#answer-error").render())
        assert "time-out" in error and "type the reading" in error.lower()
        assert read_case(cases_dir) == before                    # nothing lost, nothing added
        assert app.focused.id == "answer"
        await answer(pilot, "122 V")
        event = last_answer(cases_dir)
        assert (event["phase"], event["raw"]) == ("verify", "122 V")
        assert "meter" not in event
        assert len(read_case(cases_dir)["events"]) == len(before["events"]) + 1


async def test_a_unit_that_does_not_fit_is_refused(meter_app, cases_dir):
    """A sigrok meter left on ohms while the check asks for DC volts (its line as sigrok-cli
    prints it) is refused under the field and nothing is recorded."""
    from faultwise.meter.base import Meter
    from faultwise.meter.sigrok import parse_analog_line

    class DialOnOhms(Meter):
        kind = "sigrok"

        def read(self, quantity=None):
            return parse_analog_line("P1: 4.7000 kΩ AUTO", "test meter on ohms",
                                     FIXED_NOW.isoformat())

    app = meter_app
    async with app.run_test(size=(100, 32)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        await pilot.press("1")
        await pilot.pause()
        await acknowledge_cautions(pilot)
        await ready(pilot)
        from faultwise.tui.meter_state import meter_state

        meter_state(app.bench).meter = DialOnOhms("sigrok:test")
        await pilot.press("f10")
        await pilot.pause()
        await acknowledge_cautions(pilot)                        # the meter-link caution
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.pause()
        await pilot.pause()
        data = read_case(cases_dir)
        assert [e["type"] for e in data["events"]][-1] == "acknowledge"
        error = str(app.screen.query_one("#answer-error").render())
        assert "reads ohms" in error and "DC volts" in error and "Not recorded" in error
        assert app.screen.query_one("#check-title") is not None
        assert "first filter" in str(app.screen.query_one("#check-title").render())


async def test_declining_the_meter_caution_leaves_the_case(meter_app, cases_dir):
    """As with every caution: 'Leave the case' leaves it, and nothing is read or recorded."""
    app = meter_app
    async with app.run_test(size=(100, 32)) as pilot:
        await new_case(pilot)
        await acknowledge_cautions(pilot)
        await pilot.press("1")
        await pilot.pause()
        await acknowledge_cautions(pilot)
        before = read_case(cases_dir)
        await pilot.press("f10")
        await pilot.pause()
        assert app.screen.id == "caution"
        await pilot.press("ctrl+l")
        await pilot.pause()
        await app.workers.wait_for_complete()
        assert app.screen.id == "start"
        after = read_case(cases_dir)
        assert after["events"] == before["events"]
        assert "meter-link" not in after["acknowledged"]
