"""The meter sources end to end: a simulated SCPI meter (pyvisa-sim, tests/fixtures/meter/
sim-meter.yaml), a LAN meter on the loopback (tests/meter_server.py, pyvisa-py's raw
socket), sigrok-cli's own demo driver, the walk API taking readings from the meter, and the
``faultwise meter`` command. No address but 127.0.0.1 is touched.
"""

from __future__ import annotations

import json
import os
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from faultwise.meter import QUANTITIES, MeterError, MeterTimeout, read_stable
from faultwise.meter.fit import answer_from_meter, quantity_for

pytest.importorskip("pyvisa_sim")
pytest.importorskip("pyvisa_py")

from faultwise.meter.visa import VisaMeter  # noqa: E402

HERE = Path(__file__).parent
SIM = HERE / "fixtures" / "meter" / "sim-meter.yaml"
GOOD = "USB0::0x1234::0x5678::SIM0001::INSTR"
DEAD = "USB0::0x1234::0x5678::SIM0002::INSTR"
IDN = "Demo Instruments DMM-45 simulated SIM0001 0.1"
KNOWLEDGE = HERE / "tui" / "fixtures" / "knowledge"
AT = "2026-12-01T09:30:00+00:00"


def clock():
    from datetime import datetime

    return datetime.fromisoformat(AT)


def sim(resource=GOOD, timeout=0.5):
    return VisaMeter(resource, timeout_s=timeout, backend=f"{SIM}@sim", clock=clock)


# ----------------------------------------------------------------------------- pyvisa-sim

def test_simulated_meter_answers_each_quantity():
    meter = sim()
    assert meter.identity() == IDN                       # *IDN? fields joined
    got = {q: meter.read(QUANTITIES[q]) for q in ("dc-v", "ac-v", "ohm", "dc-a")}
    assert (got["dc-v"].value, got["dc-v"].unit, got["dc-v"].mode) == (122.4, "V", "DC")
    assert (got["ac-v"].value, got["ac-v"].mode) == (118.5, "AC")
    assert got["ohm"].overload                           # 9.9E37 in the YAML
    assert got["dc-a"].value == pytest.approx(0.0045) and got["dc-a"].unit == "A"
    assert got["dc-v"].to_json() == {"value": 122.4, "unit": "V", "mode": "DC", "meter": IDN,
                                     "at": AT}
    # FUNC? says what the meter is set to, READ? reads it
    now = meter.read(None)
    assert (now.value, now.unit, now.mode) == (118.5, "V", "AC")
    meter.close()


def test_simulated_meter_error_and_time_out():
    meter = sim()
    with pytest.raises(MeterError, match="Undefined header"):   # an error answer
        meter.read(QUANTITIES["ac-a"])
    with pytest.raises(MeterTimeout, match="did not answer MEAS:FREQ"):
        meter.read(QUANTITIES["freq"])
    # after a failure the link is reopened on the next reading
    assert meter.read(QUANTITIES["dc-v"]).value == 122.4
    with pytest.raises(MeterTimeout):
        sim(DEAD).read(QUANTITIES["dc-v"])


def test_missing_backend_is_one_sentence(tmp_path):
    meter = VisaMeter(GOOD, timeout_s=0.5, backend=f"{tmp_path / 'none.yaml'}@sim")
    with pytest.raises(MeterError) as err:
        meter.read(QUANTITIES["dc-v"])
    assert "\n" not in str(err.value)


# ----------------------------------------------------------------------------- the walk API

def walk_to_b_plus():
    from faultwise.graph import load_knowledge
    from faultwise.profile import load_profile
    from faultwise.walk import Walk

    knowledge = load_knowledge(KNOWLEDGE)
    profile = load_profile(KNOWLEDGE / "sets" / "demo-5-tube-table.yaml")
    walk = Walk(knowledge, profile, "hum-loud", clock=clock)
    walk.answer("glow")
    assert walk.current_node == "supply.rectifier-out"
    return walk


def test_walk_takes_readings_from_the_meter_and_replays_them(tmp_path):
    from faultwise.cases.schema import case_problem
    from faultwise.walk import Walk, classify

    walk = walk_to_b_plus()
    meter = sim()
    expected = walk.prompt().expected
    event = answer_from_meter(walk, meter.read(quantity_for(expected)))
    assert event["value"] == 122.4 and event["outcome"] == classify(122.4, expected)
    assert event["meter"] == {"value": 122.4, "unit": "V", "mode": "DC", "meter": IDN,
                              "at": AT}
    assert walk.steps[-1].meter["meter"] == IDN
    # ripple is peak-to-peak: no meter reading; typed instead
    with pytest.raises(MeterError, match="scope"):
        quantity_for(walk.prompt().expected)
    walk.answer("30 V")
    # the unplugged meter: a time-out records nothing, typing goes on
    events = walk.events
    with pytest.raises(MeterTimeout):
        answer_from_meter(walk, sim(DEAD).read(QUANTITIES["dc-v"]))
    assert walk.events == events
    # the record fits the case shape and replays to the same steps
    data = {"id": "20261201-B1-001", "events": walk.events}
    assert case_problem(data) is None
    again = Walk.from_events(walk.knowledge, walk.profile, "hum-loud", walk.events)
    assert again.steps == walk.steps and again.current_node == walk.current_node
    bad = json.loads(json.dumps(data))
    bad["events"][1]["meter"]["unit"] = 5
    assert "meter 'unit'" in case_problem(bad)


def test_walk_refuses_a_meter_reading_on_an_observation():
    from faultwise.core.errors import WalkError
    from faultwise.graph import load_knowledge
    from faultwise.profile import load_profile
    from faultwise.walk import Walk

    knowledge = load_knowledge(KNOWLEDGE)
    walk = Walk(knowledge, load_profile(KNOWLEDGE / "sets" / "demo-5-tube-table.yaml"),
                "hum-loud", clock=clock)
    with pytest.raises(WalkError):
        answer_from_meter(walk, sim().read(QUANTITIES["dc-v"]))
    assert walk.events == []


# ----------------------------------------------------------------------------- LAN on loopback

@pytest.fixture
def lan_meter():
    sys.path.insert(0, str(HERE))
    from meter_server import MeterServer

    server = MeterServer(0).start()
    yield server
    server.shutdown()
    server.server_close()


def test_lan_meter_on_loopback(lan_meter):
    assert lan_meter.server_address[0] == "127.0.0.1"
    meter = VisaMeter(lan_meter.resource, timeout_s=0.5, clock=clock)
    assert meter.identity() == "Demo Instruments DMM-45 on loopback LAN0001 0.1"
    assert meter.read(QUANTITIES["ohm"]).value == 470.0
    lan_meter.mute.set()                                   # unplugged
    with pytest.raises(MeterTimeout):
        meter.read(QUANTITIES["dc-v"])
    lan_meter.mute.clear()                                 # plugged back: reconnects
    assert meter.read(QUANTITIES["dc-v"]).value == pytest.approx(122.4)
    meter.close()


def test_hold_until_stable_on_a_settling_reading(lan_meter):
    lan_meter.drift = 0.02                                 # starts 2 % high, settles x0.3
    meter = VisaMeter(lan_meter.resource, timeout_s=0.5, clock=clock)
    first = meter.read(QUANTITIES["dc-v"])
    assert first.value == pytest.approx(122.4 * 1.02)
    held = read_stable(lambda: meter.read(QUANTITIES["dc-v"]))
    assert abs(held.value - 122.4) <= held.resolution      # within one count of the truth
    assert lan_meter.counts["MEAS:VOLT:DC?"] >= 4
    meter.close()


# ----------------------------------------------------------------------------- sigrok-cli

@pytest.mark.skipif(shutil.which("sigrok-cli") is None, reason="sigrok-cli is not installed")
def test_sigrok_demo_driver_gives_one_sample():
    from faultwise.meter.sigrok import SigrokMeter

    meter = SigrokMeter("demo", channel="A4", clock=clock)
    s = meter.read()
    assert s.meter.startswith("demo: ")                  # the driver's own description
    assert (s.unit, s.mode, s.at) == ("V", "DC", AT)
    assert math_finite(s.value) and s.resolution is not None


def math_finite(x: float) -> bool:
    import math

    return math.isfinite(x)


# ----------------------------------------------------------------------------- the command

def run_meter(args, cwd, **kw):
    env = dict(os.environ)
    env.pop("FAULTWISE_METER", None)
    return subprocess.run([sys.executable, "-m", "faultwise", "meter", *args], cwd=cwd,
                          capture_output=True, text=True, timeout=120, env=env, **kw)


def test_meter_command_json_and_lines(tmp_path):
    (tmp_path / "faultwise.yaml").write_text(
        f"meter:\n  source: visa:{GOOD}\n  timeout: 0.5\n  backend: '{SIM}@sim'\n")
    done = run_meter(["--count", "2", "--json", "--interval", "0"], tmp_path)
    assert done.returncode == 0, done.stderr
    samples = json.loads(done.stdout)
    assert [s["value"] for s in samples] == [118.5, 118.5]       # FUNC? VOLT:AC, READ?
    assert all(set(s) == {"value", "unit", "mode", "meter", "at"} for s in samples)
    assert samples[0]["meter"] == IDN and samples[0]["mode"] == "AC"
    done = run_meter(["--count", "1", "--quantity", "dc-v"], tmp_path)
    assert done.returncode == 0 and "122.4 V DC" in done.stdout and IDN in done.stdout
    done = run_meter(["--quantity", "freq"], tmp_path)            # the time-out
    assert done.returncode == 1 and "Traceback" not in done.stderr
    assert "did not answer" in done.stderr and len(done.stderr.strip().splitlines()) == 1
    done = run_meter(["--meter", "manual"], tmp_path)
    assert done.returncode == 1 and "no meter is set" in done.stderr


def test_meter_command_stops_cleanly_on_ctrl_c(tmp_path, lan_meter):
    proc = subprocess.Popen([sys.executable, "-m", "faultwise", "meter", "--meter",
                             f"visa:{lan_meter.resource}", "--interval", "0.05"],
                            cwd=tmp_path, stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                            text=True)
    first = proc.stdout.readline()
    assert "122.4 V DC" in first
    time.sleep(0.2)
    proc.send_signal(signal.SIGINT)
    out, err = proc.communicate(timeout=30)
    assert proc.returncode == 0
    assert "stopped after" in err and "Traceback" not in err


@pytest.mark.skipif(shutil.which("sigrok-cli") is None, reason="sigrok-cli is not installed")
def test_meter_command_with_the_sigrok_demo_driver(tmp_path):
    done = run_meter(["--meter", "sigrok:demo", "--count", "1"], tmp_path)
    assert done.returncode == 0, done.stderr
    assert "V DC" in done.stdout and "demo: " in done.stdout
    # the demo driver's channels read volts: asking for ohms is the dial's mistake
    done = run_meter(["--meter", "sigrok:demo", "--quantity", "ohm"], tmp_path)
    assert done.returncode == 1 and "not resistance" in done.stderr
    assert "Traceback" not in done.stderr
