"""Rectifier model: steady state, physical sense, and the two-corner band shortcut."""

from __future__ import annotations

import math

import pytest

from faultwise.calc import rectifier as r
from faultwise.calc import tolerance as t
from faultwise.calc.mains import line_range_v

BASE = r.RectifierCircuit("half-wave", 120, 60, 22, r.tube_diode(15, 100), 50, 55, 1000, 30, 12)


def _with(**kw) -> r.RectifierCircuit:
    from dataclasses import replace

    return replace(BASE, **kw)


def test_steady_state_dc_through_the_filter_resistor_is_its_load():
    # in periodic steady state C2's average current is zero: (V1 - V2)/Rf = I2 (Kirchhoff)
    res = r.simulate(BASE)
    assert res.rectifier_out_v - res.filtered_v == pytest.approx(1000 * 0.012, rel=1e-4)


def test_child_law_fit_reproduces_the_stated_drop():
    d = r.tube_diode(22, 70)    # 6X4: about 22 V at 70 mA (tube data, REFERENCES.md)
    assert d.drop_v(0.070) == pytest.approx(22)
    # Child-Langmuir: i ~ v^1.5, so twice the current needs 2^(2/3) the drop
    assert d.drop_v(0.140) == pytest.approx(22 * 2 ** (2 / 3))


def test_silicon_drop_is_about_0_7_v():
    # textbooks: a silicon rectifier drops about 0.7 V at normal current
    assert 0.6 < r.silicon_diode().drop_v(0.1) < 0.8


def test_selenium_stack_drops_a_few_volts():
    # trade: about 1 V per cell, a 130 V stack (5 cells) about 5 V at 100 mA
    d = r.selenium_stack(120)
    assert 3 < d.drop_v(0.1) < 7


def test_more_load_less_dc_more_ripple():
    light, heavy = r.simulate(_with(load_ma=30, filter_load_ma=10)), r.simulate(_with(load_ma=80))
    assert heavy.rectifier_out_v < light.rectifier_out_v
    assert heavy.ripple_vpp > light.ripple_vpp


def test_full_wave_beats_half_wave_on_ripple():
    half = r.simulate(_with(circuit="half-wave", surge_ohm=50))
    full = r.simulate(_with(circuit="full-wave", surge_ohm=50))
    assert full.ripple_vpp < half.ripple_vpp
    assert full.rectifier_out_v > half.rectifier_out_v


def test_bridge_loses_two_drops():
    # a bridge conducts through two rectifiers: its DC is below a full-wave leg's
    fw = r.simulate(_with(circuit="full-wave", diode=r.tube_diode(15, 100)))
    br = r.simulate(_with(circuit="bridge", diode=r.tube_diode(15, 100)))
    assert br.rectifier_out_v < fw.rectifier_out_v


def test_finer_steps_agree():
    coarse, fine = r.simulate(BASE), r.simulate(BASE, steps_per_cycle=1600)
    assert coarse.rectifier_out_v == pytest.approx(fine.rectifier_out_v, rel=1e-3)
    assert coarse.ripple_vpp == pytest.approx(fine.ripple_vpp, rel=5e-3)


FULL_WAVE = r.RectifierCircuit("full-wave", 250, 60, 100, r.tube_diode(60, 125), 20, 70, 1500, 20, 25)


@pytest.mark.parametrize("base", [BASE, FULL_WAVE], ids=["half-wave tube", "full-wave 5Y3GT"])
def test_sensitivity_corners_match_the_whole_tolerance_box(base):
    """supply_bands picks one corner per output end; check it against all 2^6 corners."""
    from dataclasses import replace

    spreads = {"line": line_range_v(120), "rs": t.resistor_ohm(base.surge_ohm),
               "c1": t.electrolytic_uf(base.first_cap_uf), "load": t.load_ma(1.0),
               "rf": t.resistor_ohm(base.filter_ohm), "c2": t.electrolytic_uf(base.second_cap_uf)}

    def make(v):
        return replace(base, source_rms_v=base.source_rms_v * v["line"] / 120, surge_ohm=v["rs"],
                       first_cap_uf=v["c1"], load_ma=base.load_ma * v["load"],
                       filter_load_ma=base.filter_load_ma * v["load"], filter_ohm=v["rf"],
                       second_cap_uf=v["c2"])

    bands = r.supply_bands(make, spreads)
    everything = [r.simulate(make(c)) for c in t.corners(spreads)]
    for name in r.OUTPUTS:
        values = [getattr(x, name) for x in everything]
        assert bands[name].low == pytest.approx(min(values), rel=1e-9)
        assert bands[name].high == pytest.approx(max(values), rel=1e-9)
        assert bands[name].low < bands[name].nominal < bands[name].high


def test_unknown_circuit_is_refused():
    with pytest.raises(ValueError):
        r.simulate(_with(circuit="doubler"))


def test_peak_current_exceeds_dc_load():
    # a capacitor-input filter charges in short pulses: the peak is several times the DC
    res = r.simulate(BASE)
    assert res.peak_current_ma > 3 * BASE.load_ma
    assert math.isfinite(res.peak_current_ma)
