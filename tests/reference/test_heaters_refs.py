"""Heater strings against receiving-tube handbook facts (REFERENCES.md)."""

from __future__ import annotations

import pytest

from faultwise.calc import heaters as h

# 150 mA series types (handbooks, mostly memory): 12.6 V for the small tubes, 50 V output, 35 V rectifier
FIVE_TUBE = {"12BE6": 12.6, "12BA6": 12.6, "12AV6": 12.6, "50C5": 50.0, "35W4": 35.0}


def test_five_tube_string_sum():
    # a five-tube 150 mA lineup sums to 12.6 x 3 + 50 + 35 (computed, not hard-coded)
    expected = 12.6 * 3 + 50 + 35
    assert h.string_v(FIVE_TUBE.values()) == pytest.approx(expected)
    assert expected == pytest.approx(122.8)


def test_dropping_resistor():
    # Ohm's law: (line - sum)/I; a 4-tube 12.6+12.6+12.6+35 = 72.8 V string on 120 V at 0.15 A
    s = 12.6 * 3 + 35
    assert h.dropping_ohm(120, s, 0.15) == pytest.approx((120 - s) / 0.15)
    # none needed when the string sums to the line or more (122.8 V on 120 V)
    assert h.dropping_ohm(120, 122.8, 0.15) == 0.0


def test_series_heater_takes_its_share_of_the_line():
    # voltage divider of hot resistances: with ratings matched, each heater gets rated x line/sum
    total = h.string_v(FIVE_TUBE.values())
    v = h.series_heater_v(120, 12.6, 1.0, total, 1.0, 0.0)
    assert v == pytest.approx(12.6 * 120 / total)
    # the shares add up to the line (Kirchhoff's voltage law)
    shares = [h.series_heater_v(120, x, 1.0, total, 1.0, 0.0) for x in FIVE_TUBE.values()]
    assert sum(shares) == pytest.approx(120)
    # designed for rated current at the design line (handbooks): rated volts exactly there
    assert h.series_heater_v(total, 50.0, 1.0, total, 1.0, 0.0) == pytest.approx(50.0)


def test_string_current_at_rated_line_is_rated():
    # handbooks: series strings run at rated current at the design line voltage
    total = h.string_v(FIVE_TUBE.values())
    hot = sum(h.hot_ohm(v, 0.15) for v in FIVE_TUBE.values())
    assert h.string_current_a(total, hot, 0.0) == pytest.approx(0.15)
    # with a dropper the design line is sum + I R
    r = h.dropping_ohm(120, 72.8, 0.15)
    assert h.design_line_v(72.8, r, 0.15) == pytest.approx(120)


def test_cold_resistance_is_about_a_tenth_of_hot():
    # trade (common practice, no source): a tungsten heater cold reads about 1/10 of V/I hot
    hot = h.hot_ohm(12.6, 0.15)
    assert hot == pytest.approx(84.0)
    assert h.cold_ohm(12.6, 0.15) == pytest.approx(hot / 10)
    assert h.COLD_TO_HOT_LOW < h.COLD_TO_HOT < h.COLD_TO_HOT_HIGH


def test_parallel_winding_current():
    # 6.3 V parallel types (memory): 6BE6, 6BA6, 6AV6 0.3 A; 6V6GT 0.45 A (secondary source)
    assert h.winding_total_a([0.3, 0.3, 0.3, 0.45]) == pytest.approx(1.35)
    assert h.winding_v(114, 120, 6.3) == pytest.approx(6.3 * 114 / 120)
