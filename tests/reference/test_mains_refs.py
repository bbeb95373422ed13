"""Line voltage ranges, peak values, the leakage limit and antenna lengths (REFERENCES.md)."""

from __future__ import annotations

import math

import pytest

from faultwise.calc import antenna, battery, safety
from faultwise.calc.mains import line_range_v, peak_v


def test_ansi_c84_1_range_a():
    # ANSI C84.1, 120 V nominal, service voltage Range A: 114-126 V
    r = line_range_v(120)
    assert (r.low, r.nominal, r.high) == (114, 120, 126)
    assert "ANSI C84.1" in r.rule


def test_iec_60038():
    # IEC 60038: 230 V +-10 % at the supply terminals, 207-253 V
    r = line_range_v(230)
    assert (r.low, r.high) == pytest.approx((207, 253))
    assert "IEC 60038" in r.rule


def test_other_nominals_follow_the_documented_proportions():
    # our rule: the 100-130 V class takes Range A's +-5 %, others IEC 60038's +-10 %
    r = line_range_v(117)
    assert (r.low, r.high) == pytest.approx((117 * 0.95, 117 * 1.05))
    r = line_range_v(240)
    assert (r.low, r.high) == pytest.approx((216, 264))


def test_peak_is_sqrt2_times_rms():
    # peak = sqrt(2) x RMS: 117 V -> 165.5 V; 120 V -> 169.7 V; 230 V -> 325.3 V
    assert peak_v(117) == pytest.approx(165.5, abs=0.05)
    assert peak_v(120) == pytest.approx(169.7, abs=0.05)
    assert peak_v(230) == pytest.approx(325.3, abs=0.05)


def test_leakage_limit():
    # 1500 ohm shunted by 0.15 uF (ANSI C39.5); 0.5 mA limit (UL 101, from memory) -> 0.75 V RMS
    assert safety.leakage_limit_v() == pytest.approx(0.75)
    # the capacitor barely matters at line frequency: |Z| stays within 1 % of 1500 ohm at 60 Hz
    z = safety.network_impedance_ohm(60)
    assert z == pytest.approx(1500 / math.sqrt(1 + (2 * math.pi * 60 * 1500 * 0.15e-6) ** 2))
    assert 1485 < z < 1500
    assert safety.leakage_ma(0.75, 60) == pytest.approx(0.5, rel=0.01)


def test_half_wave_antenna_at_1_mhz():
    # amateur handbooks: 150/f(MHz) m electrical, 143/f practical: 143-150 m at 1 MHz
    assert antenna.half_wave_m(1.0) == pytest.approx(150)
    assert antenna.practical_half_wave_m(1.0) == pytest.approx(143)
    # 468/f ft is the same practical rule in feet
    assert antenna.practical_half_wave_m(1.0) == pytest.approx(468 * 0.3048, rel=0.005)


def test_battery_usable_range():
    # trade: a 9 V battery is usable down to about 6.5-7 V
    low, high = battery.usable_range_v(9)
    assert 6.5 <= low <= 7.0
    assert high > 9
