"""Marking codes and preferred values against published standards (secondary sources).

IEC 60063 (preferred-number series), IEC 60062 (colour code, letter code, tolerance
letters) and EIA-198 (three-digit capacitor code), as restated in secondary documents;
the values are those listed under "Preferred values and marking codes" in the project's
outside references.
"""

from __future__ import annotations

import math

import pytest

from faultwise.core.codes import (SERIES, decode_cap_code, decode_colour_bands, decode_letter_code,
                                  decode_marking, is_preferred, nearest_preferred,
                                  tolerance_letter)
from faultwise.core.errors import InputError

# IEC 60063 (secondary source): the published tables
E6 = "1.0 1.5 2.2 3.3 4.7 6.8"
E12 = "1.0 1.2 1.5 1.8 2.2 2.7 3.3 3.9 4.7 5.6 6.8 8.2"
E24 = ("1.0 1.1 1.2 1.3 1.5 1.6 1.8 2.0 2.2 2.4 2.7 3.0 3.3 3.6 3.9 4.3 4.7 5.1 5.6 6.2 "
       "6.8 7.5 8.2 9.1")


@pytest.mark.parametrize("name, table", [("E6", E6), ("E12", E12), ("E24", E24)])
def test_series_match_iec_60063(name, table):
    # IEC 60063 (secondary source)
    assert SERIES[name] == tuple(float(x) for x in table.split())


def test_eight_e24_values_are_not_the_rounded_geometric_series():
    # IEC 60063 (secondary source): 2.7 3.0 3.3 3.6 3.9 4.3 4.7 8.2 differ from
    # round(10^(k/24), 1); compute the generated series here and compare
    generated = [round(10 ** (k / 24), 1) for k in range(24)]
    differ = [v for v, g in zip(SERIES["E24"], generated) if v != g]
    assert differ == [2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2]


def test_e_series_nest():
    # IEC 60063 (secondary source): every E6 value is in E12, every E12 value in E24
    assert set(SERIES["E6"]) <= set(SERIES["E12"]) <= set(SERIES["E24"])


@pytest.mark.parametrize("value, series, nearest", [
    (4600, "E12", 4700.0), (4.0, "E24", 3.9), (9.6, "E12", 10.0), (0.00051, "E6", 0.00047),
    (1.0, "E12", 1.0), (141.5, "E12", 150.0), (174.4, "E12", 180.0), (9.9e6, "E24", 10e6),
])
def test_nearest_preferred(value, series, nearest):
    # IEC 60063 (secondary source); nearest by ratio, the preferred numbers being
    # (roughly) geometric
    assert nearest_preferred(value, series) == nearest


def test_nearest_is_nearest_by_ratio_over_a_sweep():
    # IEC 60063 (secondary source): no value of the table (across decades) is closer
    values = [m * 10 ** e for e in range(-1, 6) for m in SERIES["E12"]]
    for k in range(1, 400):
        x = 10 ** (k / 97)
        best = nearest_preferred(x, "E12")
        assert min(abs(math.log(v / x)) for v in values) == pytest.approx(abs(math.log(best / x)))


def test_is_preferred():
    # IEC 60063 (secondary source): 4.7 kΩ is E6; 5.1 kΩ is E24 only
    assert is_preferred(4700, "E6")
    assert is_preferred(5100, "E24") and not is_preferred(5100, "E12")
    assert not is_preferred(4650, "E24")
    with pytest.raises(InputError):
        nearest_preferred(0, "E12")
    with pytest.raises(InputError):
        nearest_preferred(10, "E7")


# --- IEC 60062 colour code (secondary source) ---------------------------------------

@pytest.mark.parametrize("bands, ohm, tol", [
    (["brown", "black", "red", "gold"], 1000.0, 5.0),           # IEC 60062 (2nd)
    (["yellow", "violet", "red", "gold"], 4700.0, 5.0),          # IEC 60062 (2nd)
    (["red", "red", "orange", "gold"], 22000.0, 5.0),            # IEC 60062 (2nd)
    (["brown", "black", "black", "gold", "brown"], 10.0, 1.0),   # IEC 60062 (2nd)
])
def test_colour_code_worked_decodes(bands, ohm, tol):
    code = decode_colour_bands(bands)
    assert (code.ohm, code.tolerance_pct) == (ohm, tol)


def test_three_band_resistor_is_twenty_percent():
    # IEC 60062 (2nd): no tolerance band = ±20 %
    code = decode_colour_bands(["yellow", "violet", "brown"])
    assert (code.ohm, code.tolerance_pct) == (470.0, 20.0)


@pytest.mark.parametrize("colour, pct", [
    ("brown", 1), ("red", 2), ("green", 0.5), ("blue", 0.25), ("violet", 0.1), ("gold", 5),
    ("silver", 10), ("none", 20),
])
def test_tolerance_bands(colour, pct):
    # IEC 60062 (2nd)
    assert decode_colour_bands(["brown", "black", "red", colour]).tolerance_pct == pct


@pytest.mark.parametrize("mult, factor", [
    ("black", 1), ("brown", 10), ("red", 100), ("orange", 1e3), ("yellow", 1e4), ("green", 1e5),
    ("blue", 1e6), ("violet", 1e7), ("grey", 1e8), ("white", 1e9), ("gold", 0.1),
    ("silver", 0.01),
])
def test_multiplier_bands(mult, factor):
    # IEC 60062 (2nd): multipliers by digit, gold x0.1, silver x0.01
    assert decode_colour_bands(["yellow", "violet", mult, "gold"]).ohm == pytest.approx(47 * factor)


def test_digit_bands_black_to_white():
    # IEC 60062 (2nd): digits black 0 ... white 9
    names = ["black", "brown", "red", "orange", "yellow", "green", "blue", "violet", "grey",
             "white"]
    for d, name in enumerate(names):
        assert decode_colour_bands(["brown", name, "black", "gold"]).ohm == 10 + d


def test_gold_multiplier_is_exact():
    assert decode_colour_bands(["yellow", "violet", "gold", "gold"]).ohm == 4.7
    assert decode_colour_bands(["red", "red", "silver", "gold"]).ohm == 0.22


@pytest.mark.parametrize("bands, fragment", [
    (["brown", "black", "red", "grey"], "tolerance"),      # sources disagree on grey: refused
    (["gold", "red", "black", "brown"], "other end"),
    (["brown", "gold", "red", "gold"], "digit"),
    (["brown", "black"], "3, 4 or 5"),
    (["brown", "black", "red", "gold", "brown", "red", "blue"], "3, 4 or 5"),
    (["brown", "black", "mauve", "gold"], "unknown band colour"),
    (["brown", "black", "none", "gold"], "multiplier"),
])
def test_bad_colour_codes(bands, fragment):
    with pytest.raises(InputError, match=fragment):
        decode_colour_bands(bands)


# --- IEC 60062 letter code and tolerance letters (2nd / memory) ------------------------

@pytest.mark.parametrize("code, kind, value", [
    ("4k7", "resistance", 4700.0), ("2R2", "resistance", 2.2), ("1M0", "resistance", 1e6),
    ("4n7", "capacitance", 4.7e-9), ("100n", "capacitance", 1e-7), ("470p", "capacitance", 4.7e-10),
])
def test_letter_code_examples(code, kind, value):
    # IEC 60062 letter code (2nd/memory): the letter is the decimal point and the multiplier
    assert decode_letter_code(code, kind) == value


@pytest.mark.parametrize("letter, pct", [("F", 1), ("G", 2), ("J", 5), ("K", 10), ("M", 20)])
def test_tolerance_letters(letter, pct):
    # IEC 60062 (2nd)
    assert tolerance_letter(letter) == pct


def test_marking_with_tolerance_letter():
    # IEC 60062 letter code followed by a tolerance letter; EIA-198 code with one
    assert decode_marking("4k7J", "resistance").tolerance_pct == 5.0
    assert decode_marking("4k7J", "resistance").value == 4700.0
    m = decode_marking("104K", "capacitance")
    assert (m.value, m.unit, m.tolerance_pct) == (1e-7, "F", 10.0)
    assert decode_marking("4M", "resistance").value == 4e6       # M here is mega, not 20 %


@pytest.mark.parametrize("code, kind", [("4x7", "resistance"), ("4k7", "capacitance"),
                                        ("k", "resistance"), ("", "resistance"),
                                        ("4n7", "loudness")])
def test_bad_letter_codes(code, kind):
    with pytest.raises(InputError):
        decode_letter_code(code, kind)


def test_bad_tolerance_letter():
    with pytest.raises(InputError, match="tolerance letter"):
        tolerance_letter("Q")


# --- EIA-198 three-digit capacitor code (2nd) --------------------------------------

@pytest.mark.parametrize("code, pf", [
    ("101", 100.0), ("102", 1000.0), ("103", 10_000.0), ("223", 22_000.0), ("104", 100_000.0),
    ("474", 470_000.0), ("105", 1_000_000.0), ("109", 1.0), ("229", 2.2), ("478", 0.47),
])
def test_cap_code(code, pf):
    # EIA-198 (2nd): two significant digits and a power of ten in pF; 8 = x0.01, 9 = x0.1
    assert decode_cap_code(code) == pf


def test_cap_code_six_and_seven_on_tantalums():
    # common practice, from memory: 106 = 10 uF, 107 = 100 uF on tantalum capacitors
    assert decode_cap_code("106") == 10e6
    assert decode_cap_code("107") == 100e6


@pytest.mark.parametrize("code", ["1040", "10", "10a", "1 04", "", "abc", "١٠٤"])
def test_bad_cap_codes(code):
    with pytest.raises(InputError):
        decode_cap_code(code)
