"""Divider bias algebra: limits and magnitudes."""

from __future__ import annotations

import pytest

from faultwise.calc.bias import VCE_SAT_V, divider_bias, parallel_ohm, thevenin_v


def test_thevenin_divider():
    # voltage divider and parallel resistance (circuit theory)
    assert thevenin_v(9, 56e3, 8.2e3) == pytest.approx(9 * 8.2 / 64.2)
    assert parallel_ohm(56e3, 8.2e3) == pytest.approx(56e3 * 8.2e3 / 64.2e3)


def test_textbook_formula():
    # Ib = (Vth - Vbe)/(Rth + (beta+1) Re); Ic = beta Ib; Ve = (beta+1) Ib Re
    d = divider_bias(9, 56e3, 8.2e3, 1e3, 0.0, 80, 0.25)
    vth, rth = 9 * 8.2 / 64.2, 56e3 * 8.2e3 / 64.2e3
    ib = (vth - 0.25) / (rth + 81 * 1e3)
    assert d.ib_ma == pytest.approx(ib * 1e3)
    assert d.ic_ma == pytest.approx(80 * ib * 1e3)
    assert d.ve_v == pytest.approx(81 * ib * 1e3)
    assert d.vb_v == pytest.approx(d.ve_v + 0.25)
    assert d.vc_v == 9      # no collector resistance: the collector sits at the supply
    assert d.divider_ma == pytest.approx((9 - d.vb_v) / 56e3 * 1e3)


def test_large_beta_tends_to_the_stiff_divider_limit():
    # with beta -> infinity, Ve -> Vth - Vbe (textbook approximation)
    d = divider_bias(9, 56e3, 8.2e3, 1e3, 0.0, 1e7, 0.65)
    assert d.ve_v == pytest.approx(thevenin_v(9, 56e3, 8.2e3) - 0.65, rel=1e-3)


def test_cut_off_when_the_divider_is_below_vbe():
    d = divider_bias(1.5, 100e3, 1e3, 1e3, 1e3, 100, 0.65)
    assert d.ic_ma == 0 and d.ve_v == 0


def test_saturation_is_clamped():
    d = divider_bias(9, 10e3, 10e3, 100, 10e3, 200, 0.65)
    assert d.saturated
    assert d.vc_v == pytest.approx(d.ve_v + VCE_SAT_V)
