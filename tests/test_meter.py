"""The bench meter's pure parts: sigrok output lines, SCPI answers, the meter setting, which
quantity a check asks for, whether a sample fits, and "hold until stable".

sigrok lines: the format is libsigrok's analog output module (src/output/analog.c: channel
name, ": ", the value with an SI prefix, the unit -- the ohm as U+2126 --, then the flags
" AC", " DC", " RMS", " HOLD", " AUTO" ...). The DC line was captured from this machine's
sigrok-cli 0.7.2 demo driver; the AC, ohms and overload lines are written in that format
(no hardware here); an overload reaching the output as "inf" is from memory of the meter
drivers, which set the value to infinity when the display shows OL.
"""

from __future__ import annotations

import math

import pytest

from faultwise.core.errors import FaultwiseError
from faultwise.expect import Expected
from faultwise.meter import QUANTITIES, MeterError, MeterRefused, Sample, read_stable
from faultwise.core.meter_setting import MeterConfig, parse_meter_setting, parse_spec, with_spec
from faultwise.meter.fit import quantity_for, value_for_check
from faultwise.meter.sigrok import parse_analog_line, parse_analog_output
from faultwise.meter.visa import parse_scpi_number, quantity_of_function

AT = "2026-12-01T09:30:00+00:00"


def exp(name: str, unit: str, low: float = 100.0, high: float = 140.0) -> Expected:
    return Expected(name, name, "supply", (low + high) / 2, low, high, unit, "test")


# ----------------------------------------------------------------------------- sigrok lines

@pytest.mark.parametrize("line, value, unit, mode, resolution", [
    ("A0: -10.0000 V DC", -10.0, "V", "DC", 1e-4),             # captured: demo driver
    ("A1: 0.0 mV DC", 0.0, "V", "DC", 1e-4),                   # captured: demo driver
    ("P1: 146.23 V DC AUTO", 146.23, "V", "DC", 0.01),
    ("P1: 118.6 V AC RMS AUTO", 118.6, "V", "AC", 0.1),
    ("P1: 4.7000 kΩ AUTO", 4700.0, "ohm", "", 0.1),
    ("P1: 470.3 Ω", 470.3, "ohm", "", 0.1),
    ("P1: 45.12 mA DC", 0.04512, "A", "DC", 1e-5),
    ("P1: 455.02 kHz", 455020.0, "Hz", "", 10.0),
])
def test_sigrok_line(line, value, unit, mode, resolution):
    s = parse_analog_line(line, "m", AT)
    assert s.value == pytest.approx(value)
    assert (s.unit, s.mode) == (unit, mode)
    assert s.resolution == pytest.approx(resolution)
    assert not s.overload


@pytest.mark.parametrize("line", ["P1: inf Ω AUTO", "P1: -inf V DC", "P1: OL Ω"])
def test_sigrok_overload(line):
    s = parse_analog_line(line, "m", AT)
    assert s.overload and math.isinf(s.value)
    assert s.to_json()["value"] is None and s.to_json()["overload"] is True
    with pytest.raises(MeterRefused, match="OL"):
        value_for_check(s, exp("output.primary_ohm", "ohm") if s.unit == "ohm"
                        else exp("supply.rectifier_out_v", "V"))


def test_sigrok_output_skips_other_lines_and_picks_the_channel():
    text = "FRAME-BEGIN\nA1: 0.0 mV DC\nA4: -2.3400 V DC\nFRAME-END\n"
    assert parse_analog_output(text, "m", AT).value == 0.0
    assert parse_analog_output(text, "m", AT, channel="A4").value == pytest.approx(-2.34)
    with pytest.raises(MeterError, match="no reading"):
        parse_analog_output("FRAME-BEGIN\n", "m", AT)
    with pytest.raises(MeterError, match="°C"):
        parse_analog_line("P1: 21.5 °C", "m", AT)


# ----------------------------------------------------------------------------- SCPI answers

def test_scpi_numbers():
    assert parse_scpi_number("+1.46200000E+02\n", "MEAS:VOLT:DC?") == 146.2
    # SCPI-1999 vol. 1: 9.9E37 stands for infinity (overload); from memory of the standard
    assert parse_scpi_number("+9.90000000E+37", "MEAS:RES?") == math.inf
    with pytest.raises(MeterError, match="Undefined header"):
        parse_scpi_number('-113,"Undefined header"', "MEAS:CURR:AC?")
    with pytest.raises(MeterError, match="empty"):
        parse_scpi_number("", "MEAS:RES?")
    assert quantity_of_function('"VOLT:AC"').id == "ac-v"
    assert quantity_of_function("VOLTAGE").id == "dc-v"
    assert quantity_of_function('"FRES"').id == "ohm"
    assert quantity_of_function('"TEMP"') is None


# ----------------------------------------------------------------------------- the setting

def test_specs():
    assert parse_spec("manual").is_manual
    c = parse_spec("visa:USB0::0x1234::0x5678::SN1::INSTR")
    assert (c.kind, c.target, c.spec) == ("visa", "USB0::0x1234::0x5678::SN1::INSTR",
                                          "visa:USB0::0x1234::0x5678::SN1::INSTR")
    c = parse_spec("sigrok:some-dmm:conn=/dev/ttyUSB0")
    assert (c.kind, c.target, c.conn) == ("sigrok", "some-dmm", "/dev/ttyUSB0")
    assert c.timeout == 10.0 and parse_spec("visa:X").timeout == 3.0
    for bad in ("", "visa:", "gpib:7", "sigrok:", "sigrok:dmm:port=COM1", "sigrok:dmm:conn=",
                "sigrok:bad name", 42):
        with pytest.raises(FaultwiseError):
            parse_spec(bad)


def test_meter_mapping_errors_are_located(tmp_path):
    from faultwise.core.workspace import resolve_workspace

    (tmp_path / "faultwise.yaml").write_text(
        "bench: B2\nmeter:\n  source: visa:USB0::1::2::3::INSTR\n  timeout: 500\n")
    with pytest.raises(FaultwiseError) as err:
        resolve_workspace(cwd=tmp_path)
    assert err.value.line == 4 and err.value.key == "meter.timeout"
    assert "faultwise.yaml:4" in str(err.value)
    (tmp_path / "faultwise.yaml").write_text("meter:\n  source: visa:X\n  speed: 9600\n")
    with pytest.raises(FaultwiseError) as err:
        resolve_workspace(cwd=tmp_path)
    assert (err.value.line, err.value.key) == (3, "meter.speed")
    (tmp_path / "faultwise.yaml").write_text("bench: B1\nmeter: serial:COM1\n")
    with pytest.raises(FaultwiseError) as err:
        resolve_workspace(cwd=tmp_path)
    assert err.value.line == 2 and "unknown meter setting" in str(err.value)


def test_meter_option_replaces_the_source_and_keeps_the_options(tmp_path, monkeypatch):
    from faultwise.core.workspace import resolve_workspace

    monkeypatch.delenv("FAULTWISE_METER", raising=False)
    (tmp_path / "faultwise.yaml").write_text(
        "meter:\n  source: visa:USB0::1::2::3::INSTR\n  timeout: 1.5\n  backend: '@py'\n")
    ws = resolve_workspace(cwd=tmp_path)
    assert ws.meter == MeterConfig("visa", "USB0::1::2::3::INSTR", None, 1.5, "@py")
    ws = resolve_workspace(cwd=tmp_path, meter="sigrok:dmm:conn=/dev/ttyUSB1")
    assert (ws.meter.kind, ws.meter.conn, ws.meter.timeout) == ("sigrok", "/dev/ttyUSB1", 1.5)
    monkeypatch.setenv("FAULTWISE_METER", "manual")
    assert resolve_workspace(cwd=tmp_path).meter.is_manual
    assert with_spec(MeterConfig(), None) == MeterConfig()
    assert parse_meter_setting("manual").is_manual


# ----------------------------------------------------------------------------- fit to a check

@pytest.mark.parametrize("name, unit, quantity", [
    ("supply.rectifier_out_v", "V", "dc-v"),
    ("bias.output.vc_v", "V", "dc-v"),
    ("mains.line_v", "V", "ac-v"),            # the line is AC
    ("safety.leakage_v", "V", "ac-v"),        # the leakage check reads AC volts
    ("heater.output.v", "V", "ac-v"),         # heaters run on the line or a winding
    ("heaters.string_ma", "mA", "ac-a"),
    ("supply.standby_ma", "mA", "dc-a"),      # a battery set's drain is DC
    ("output.primary_ohm", "ohm", "ohm"),
    ("if.peak_khz", "kHz", "freq"),
])
def test_quantity_for_the_check(name, unit, quantity):
    """AC for the line, windings and heaters, DC elsewhere: common practice, no source."""
    assert quantity_for(exp(name, unit)).id == quantity


@pytest.mark.parametrize("name, unit, word", [("supply.ripple_vpp", "Vpp", "scope"),
                                              ("tuning.osc_uh", "uH", "bridge"),
                                              ("tuning.cap_ratio", "ratio", "ratio")])
def test_readings_a_meter_cannot_take(name, unit, word):
    with pytest.raises(MeterRefused, match=word):
        quantity_for(exp(name, unit))


def sample(value, unit, mode=""):
    return Sample(value, unit, mode, "m", AT)


def test_value_for_check_converts_and_refuses():
    assert value_for_check(sample(0.0451, "A", "DC"), exp("supply.standby_ma", "mA")) \
        == pytest.approx(45.1)
    assert value_for_check(sample(455000.0, "Hz"), exp("if.peak_khz", "kHz")) == 455.0
    assert value_for_check(sample(122.4, "V"), exp("supply.rectifier_out_v", "V")) == 122.4
    with pytest.raises(MeterRefused, match="reads ohms.*DC volts"):
        value_for_check(sample(470.0, "ohm"), exp("supply.rectifier_out_v", "V"))
    with pytest.raises(MeterRefused, match="reads AC volts.*DC volts"):
        value_for_check(sample(118.0, "V", "AC"), exp("supply.rectifier_out_v", "V"))
    with pytest.raises(MeterRefused, match="reads DC volts.*AC volts"):
        value_for_check(sample(118.0, "V", "DC"), exp("mains.line_v", "V"))
    with pytest.raises(MeterRefused, match="capacitance"):
        value_for_check(sample(4.7e-5, "F"), exp("output.primary_ohm", "ohm"))


# ----------------------------------------------------------------------------- hold until stable

def scripted(values, resolution=0.1):
    it = iter(values)
    return lambda: Sample(next(it), "V", "DC", "m", AT, resolution=resolution)


def test_hold_waits_for_three_agreeing_samples():
    # a reading that settles: 130, 125, 122.5, 122.4, 122.45 -> the last three lie within 0.1
    s = read_stable(scripted([130.0, 125.0, 122.5, 122.4, 122.45, 99.0]))
    assert s.value == 122.45
    # two counts apart is not agreement; one count is
    s = read_stable(scripted([1.0, 1.2, 1.0, 1.15, 1.1, 1.2]))
    assert s.value == 1.2


def test_hold_gives_up_on_a_drifting_reading():
    with pytest.raises(MeterError, match="did not settle"):
        read_stable(scripted([float(v) for v in range(100)]), limit=8)


def test_hold_stops_at_a_time_out():
    from faultwise.meter import MeterTimeout

    def read():
        raise MeterTimeout("no answer")

    with pytest.raises(MeterTimeout):
        read_stable(read)


def test_samples_json_shape():
    """DESIGN section 10: {"value", "unit", "mode", "meter", "at"}."""
    assert sample(1.5, "V", "DC").to_json() == {"value": 1.5, "unit": "V", "mode": "DC",
                                                "meter": "m", "at": AT}
    assert set(QUANTITIES) == {"dc-v", "ac-v", "ohm", "dc-a", "ac-a", "freq"}


# ----------------------------------------------------------------------------- properties

from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402


@settings(max_examples=200, deadline=None)
@given(st.floats(min_value=-999.0, max_value=999.0, allow_nan=False),
       st.sampled_from([("", 1.0), ("m", 1e-3), ("k", 1e3), ("M", 1e6)]),
       st.sampled_from(["V", "A", "Ω", "Hz"]), st.integers(min_value=0, max_value=5),
       st.sampled_from(["", " DC", " AC RMS", " AUTO", " DC HOLD"]))
def test_sigrok_line_round_trip(mantissa, prefix, unit, decimals, flags):
    """A line written as libsigrok writes it (value to N decimals, prefix, unit, flags)
    reads back to the value printed, in base units, with one count of resolution."""
    number = f"{mantissa:.{decimals}f}"
    s = parse_analog_line(f"P1: {number} {prefix[0]}{unit}{flags}", "m", AT)
    assert s.value == pytest.approx(float(number) * prefix[1], rel=1e-9, abs=1e-12)
    assert s.resolution == pytest.approx(10.0 ** -decimals * prefix[1])
    assert s.mode == ("AC" if "AC" in flags else "DC" if "DC" in flags else "")


@settings(max_examples=300, deadline=None)
@given(st.text(max_size=60))
def test_sigrok_parser_never_fails_but_with_a_meter_error(text):
    try:
        parse_analog_line(text, "m", AT)
    except MeterError:
        pass
