"""The reading parser and formatter (faultwise.core.units).

Outside references: SI prefixes (BIPM SI Brochure: p 1e-12, n 1e-9, µ 1e-6, m 1e-3,
k 1e3, M 1e6), the IEC 60062 letter code (REFERENCES "Preferred values and marking codes",
secondary source), and Python's decimal module as the exact arithmetic oracle.
"""

from __future__ import annotations

import math
import re
from decimal import Decimal

import pytest
from hypothesis import given, settings, strategies as st

from faultwise.core.errors import FaultwiseError, InputError
from faultwise.core.units import convert, dimension_of, format_reading, parse_reading

TARGETS = ["V", "mV", "kV", "Vpp", "A", "mA", "uA", "ohm", "kohm", "Mohm", "F", "uF", "nF",
           "pF", "H", "mH", "uH", "Hz", "kHz", "MHz", "W", "s", "ms", "us", "m", "ratio"]


def exact(text: str) -> float:
    """The float nearest to a decimal literal: the oracle for 'no rounding error added'."""
    return float(Decimal(text))


# --- SI prefixes and symbols (BIPM SI Brochure) ---------------------------------------

@pytest.mark.parametrize("text, unit, literal", [
    ("12.6 V", "V", "12.6"), ("12.6V", "V", "12.6"), ("90 mV", "V", "0.090"),
    ("0.15 A", "mA", "150"), ("45mA", "A", "0.045"), ("150 uA", "mA", "0.150"),
    ("150 µA", "mA", "0.150"), ("150 μA", "mA", "0.150"),
    ("47 uF", "F", "47e-6"), ("47 µF", "F", "47e-6"), ("470 pF", "uF", "0.00047"),
    ("455 kHz", "kHz", "455"), ("455 KHz", "kHz", "455"), ("455 khz", "kHz", "455"),
    ("1.6 MHz", "kHz", "1600"), ("10.7 MHz", "Hz", "10.7e6"),
    ("230 uH", "uH", "230"), ("2.5 mH", "uH", "2500"), ("1 H", "mH", "1000"),
    ("470 ohm", "ohm", "470"), ("470 ohms", "kohm", "0.470"), ("470 Ω", "ohm", "470"),
    ("4.7 kΩ", "ohm", "4700"), ("1 Mohm", "kohm", "1000"), ("1 meg", "ohm", "1e6"),
    ("2 W", "W", "2"), ("500 mW", "W", "0.5"), ("10 ms", "s", "0.010"), ("47 us", "ms", "0.047"),
    ("2.5 m", "m", "2.5"), ("120 volts", "V", "120"), ("1.5 amps", "mA", "1500"),
    ("10 microfarads", "uF", "10"), ("3 kilohms", "ohm", "3000"),
])
def test_prefixes_and_symbols(text, unit, literal):
    assert parse_reading(text, unit) == exact(literal)


def test_milli_and_mega_are_not_confused():
    # BIPM: "m" is milli (1e-3), "M" is mega (1e6)
    assert parse_reading("5 mohm", "ohm") == exact("0.005")
    assert parse_reading("5 Mohm", "ohm") == exact("5e6")
    assert parse_reading("5m", "V") == exact("0.005")      # a prefix alone: milli of the target
    assert parse_reading("5M", "ohm") == exact("5e6")


def test_lower_case_mhz_is_refused_rather_than_read_as_millihertz():
    with pytest.raises(InputError, match="MHz"):
        parse_reading("10.7 mhz", "kHz")


def test_old_trade_marking_mfd_is_microfarads():
    # common practice, no source: old capacitors marked "mfd" mean µF, "mmfd" pF
    assert parse_reading("50 mfd", "uF") == 50.0
    assert parse_reading("100 mmfd", "pF") == 100.0


@pytest.mark.parametrize("text, unit, literal", [
    ("12,6", "V", "12.6"), ("0,047", "uF", "0.047"), ("-12 V", "V", "-12"), ("+5", "V", "5"),
    ("1e-6", "F", "1e-6"), ("4.7e3", "ohm", "4700"), ("4.7E3 ohm", "kohm", "4.7"),
    (" 120 ", "V", "120"), ("122.8", "V", "122.8"), (".5", "V", "0.5"), ("12.", "V", "12"),
])
def test_signs_decimal_comma_exponents_and_bare_numbers(text, unit, literal):
    assert parse_reading(text, unit) == exact(literal)


def test_a_comma_that_may_be_a_thousands_separator_is_refused():
    with pytest.raises(InputError, match="ambiguous"):
        parse_reading("4,700", "ohm")
    with pytest.raises(InputError):
        parse_reading("1,200.5", "ohm")


# --- IEC 60062 letter code (secondary source) ----------------------------------------

@pytest.mark.parametrize("text, unit, literal", [
    ("4k7", "ohm", "4700"), ("2R2", "ohm", "2.2"), ("1M0", "ohm", "1e6"), ("R47", "ohm", "0.47"),
    ("22R", "ohm", "22"), ("4K7", "kohm", "4.7"), ("4k7 ohm", "ohm", "4700"), ("4k7Ω", "ohm", "4700"),
    ("4n7", "F", "4.7e-9"), ("100n", "F", "100e-9"), ("470p", "pF", "470"), ("2u2", "uF", "2.2"),
    ("4n7F", "nF", "4.7"), ("2u2", "uH", "2.2"),
])
def test_letter_code(text, unit, literal):
    assert parse_reading(text, unit) == exact(literal)


def test_letter_r_is_a_resistance():
    with pytest.raises(InputError, match="expected a capacitance .* got a resistance"):
        parse_reading("2R2", "uF")


# --- wrong input --------------------------------------------------------------------

def test_wrong_dimension_says_what_was_expected_and_seen():
    with pytest.raises(InputError) as err:
        parse_reading("160 V", "uF")
    assert err.value.message == "expected a capacitance (F, uF, nF, pF), got a voltage: '160 V'"


@pytest.mark.parametrize("text, unit, expected, seen", [
    ("45 mA", "V", "a voltage", "a current"), ("455 kHz", "uH", "an inductance", "a frequency"),
    ("4.7 kohm", "mA", "a current", "a resistance"), ("2 s", "Hz", "a frequency", "a time"),
    ("12 V", "ratio", "a plain number or ratio", "a voltage"),
])
def test_wrong_dimension_names_both(text, unit, expected, seen):
    with pytest.raises(InputError, match=f"expected {expected} .*got {seen}"):
        parse_reading(text, unit)


def test_peak_to_peak_and_rms_volts_are_not_mixed():
    assert parse_reading("0.5 Vrms", "V") == 0.5
    assert parse_reading("3 V", "Vpp") == 3.0          # plain volts suit either
    assert parse_reading("500 mVpp", "Vpp") == 0.5
    with pytest.raises(InputError, match="peak-to-peak"):
        parse_reading("0.5 Vrms", "Vpp")
    with pytest.raises(InputError, match="peak-to-peak"):
        parse_reading("2 Vpp", "V")


@pytest.mark.parametrize("text", ["", "   ", "\t\n", "nan", "NaN", "inf", "-inf", "infinity",
                                  "1e9999", "abc", "12..6", "1 2", "4k7k", "5 V 3", "0x1F",
                                  "१२", "12 Vx", "--5", "1/2", "5 bananas", "x" * 200])
def test_bad_text_is_an_input_error_with_an_example(text):
    with pytest.raises(InputError) as err:
        parse_reading(text, "V")
    assert err.value.hint                      # says what would be accepted
    assert "\n" not in str(err.value)


def test_unknown_text_error_gives_an_example_of_accepted_input():
    with pytest.raises(InputError) as err:
        parse_reading("loud", "uF")
    assert "47 uF" in err.value.hint


def test_ratio_forms():
    assert parse_reading("28:1", "ratio") == 28.0
    assert parse_reading("28", "ratio") == 28.0
    assert parse_reading("28x", "ratio") == 28.0
    assert parse_reading("50%", "ratio") == 0.5
    with pytest.raises(InputError, match="zero"):
        parse_reading("28:0", "ratio")


def test_dimension_and_convert():
    assert dimension_of("uF") == "capacitance"
    assert dimension_of("Vpp") == "voltage"
    assert dimension_of("kohm") == "resistance"
    assert dimension_of("ratio") == "ratio"
    assert convert(4.7, "kohm", "ohm") == 4700.0
    assert convert(455, "kHz", "MHz") == exact("0.455")
    with pytest.raises(InputError):
        convert(1, "V", "A")
    with pytest.raises(ValueError):
        dimension_of("furlong")


# --- formatting ---------------------------------------------------------------------

@pytest.mark.parametrize("value, unit, shown", [
    (4700, "ohm", "4.7 kΩ"), (0.000047, "F", "47 µF"), (455, "kHz", "455 kHz"),
    (0.15, "A", "150 mA"), (122.8, "V", "123 V"), (1.6, "MHz", "1.6 MHz"), (0, "V", "0 V"),
    (-12.6, "V", "-12.6 V"), (0.5, "Vpp", "500 mVpp"), (470, "pF", "470 pF"),
    (1000, "uF", "1000 µF"), (28, "ratio", "28"), (230, "uH", "230 µH"),
])
def test_format_reading(value, unit, shown):
    assert format_reading(value, unit) == shown


def test_format_digits():
    assert format_reading(122.8, "V", digits=4) == "122.8 V"
    assert format_reading(3.14159, "V", digits=2) == "3.1 V"


# --- properties (hypothesis) --------------------------------------------------------

@settings(max_examples=400, deadline=None)
@given(text=st.text(max_size=30), unit=st.sampled_from(TARGETS))
def test_arbitrary_text_raises_only_input_error(text, unit):
    try:
        value = parse_reading(text, unit)
    except InputError:
        return
    assert math.isfinite(value)


_ALPHABET = "0123456789.,+-eEkKmMunpµRrVAFHhzΩohmsWx: %"


@settings(max_examples=400, deadline=None)
@given(text=st.text(alphabet=_ALPHABET, max_size=12), unit=st.sampled_from(TARGETS))
def test_reading_like_text_raises_only_input_error(text, unit):
    """Reading-like text gives a finite value or one located sentence; a bare number is
    taken in the check's own unit, exactly as Python's float() reads it (the oracle)."""
    try:
        value = parse_reading(text, unit)
    except InputError as exc:
        assert str(exc).strip() and "Traceback" not in str(exc)
        return
    assert math.isfinite(value)
    plain = text.strip()
    if re.fullmatch(r"[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?", plain):
        assert value == pytest.approx(float(plain), rel=1e-12, abs=0.0)


@settings(max_examples=400, deadline=None)
@given(value=st.one_of(st.just(0.0),
                       st.floats(min_value=1e-13, max_value=1e13),
                       st.floats(min_value=-1e13, max_value=-1e-13)),
       unit=st.sampled_from(TARGETS), digits=st.integers(min_value=1, max_value=8))
def test_format_then_parse_round_trips(value, unit, digits):
    back = parse_reading(format_reading(value, unit, digits), unit)
    # rounding to `digits` significant digits moves a value by at most half a unit in the
    # last place: |error| <= 0.5 * 10^(1 - digits) * |value| (plus float slack)
    assert abs(back - value) <= 0.5 * 10 ** (1 - digits) * abs(value) * (1 + 1e-9) + 1e-300


@settings(max_examples=300, deadline=None)
@given(whole=st.integers(min_value=0, max_value=999), frac=st.integers(min_value=0, max_value=99),
       letter=st.sampled_from(["R", "k", "K", "M", "G"]))
def test_resistor_letter_codes_round_trip(whole, frac, letter):
    exp = {"R": 0, "k": 3, "K": 3, "M": 6, "G": 9}[letter]
    code = f"{whole}{letter}{frac}"
    expected = float(Decimal(f"{whole}.{frac}").scaleb(exp))
    assert parse_reading(code, "ohm") == expected


@settings(max_examples=300, deadline=None)
@given(whole=st.integers(min_value=1, max_value=999), frac=st.one_of(st.none(), st.integers(0, 9)),
       letter=st.sampled_from(["p", "n", "u", "µ", "m"]))
def test_capacitor_letter_codes_round_trip(whole, frac, letter):
    exp = {"p": -12, "n": -9, "u": -6, "µ": -6, "m": -3}[letter]
    code = f"{whole}{letter}" + ("" if frac is None else str(frac))
    expected = float(Decimal(f"{whole}.{frac or 0}").scaleb(exp))
    assert parse_reading(code, "F") == expected


def test_input_error_is_a_faultwise_error():
    assert issubclass(InputError, FaultwiseError)
