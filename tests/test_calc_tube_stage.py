"""Tube stage DC (faultwise.calc.tube_stage) against handbook typical operation and hand work.

Each model is anchored on ONE handbook operating point (faultwise.expect.stage_typical); the checks
below compare it with a DIFFERENT handbook line of the same type, or with a hand-worked load
line, so they test the law and the circuit solution, not the anchor.
"""

from __future__ import annotations

import math

import pytest

from faultwise.calc.tube_stage import TypicalOperation, law_ma, solve_stage
from faultwise.expect.stage_typical import OPERATION

AV6 = OPERATION["6AV6"]
BA6 = OPERATION["6BA6"]
BE6 = OPERATION["6BE6"]


def test_law_reproduces_its_anchor_and_its_slope():
    # the law's slope at the anchor is the handbook gm (6BA6 4.4 mA/V, from memory)
    i0 = law_ma(BA6, BA6.grid_v, BA6.screen_v)
    i1 = law_ma(BA6, BA6.grid_v + 0.01, BA6.screen_v)
    assert i0 == pytest.approx(BA6.cathode_ma)
    gm_plate = (i1 - i0) / 0.01 * BA6.plate_ma / BA6.cathode_ma
    assert gm_plate == pytest.approx(4.4, rel=0.01)


def test_6av6_at_250_v_from_its_100_v_anchor():
    # 6AV6 handbook typical operation (from memory): 100 V, -1 V -> 0.5 mA (anchor);
    # 250 V, -2 V -> 1.2 mA (the other line, not used by the model)
    dc = solve_stage(AV6, 250.0, 0.0, 0.0, -2.0)
    assert dc.plate_ma == pytest.approx(1.2, rel=0.1)


def test_6ba6_at_100_v_with_68_ohm_cathode():
    # 6BA6 handbook (from memory): 100 V plate and screen, 68 ohm cathode resistor -> 11 mA
    # plate, 4.4 mA screen; the model is anchored at 250 V plate, 100 V screen, -1 V fixed bias
    dc = solve_stage(BA6, 100.0, 0.0, 68.0, 0.0, 100.0, 0.0)
    assert dc.plate_ma == pytest.approx(11.0, rel=0.15)
    assert dc.screen_ma == pytest.approx(4.4, rel=0.15)
    assert dc.cathode_v == pytest.approx(dc.cathode_ma / 1000 * 68.0)


def test_6be6_converter_at_250_v_plate():
    # 6BE6 handbook (from memory): 250 V plate, 100 V screen -> 2.9 mA plate, 6.8 mA screen:
    # the cathode current (9.7 mA) barely depends on the plate, as the model has it
    dc = solve_stage(BE6, 250.0, 0.0, 0.0, 0.0, 100.0, 0.0)
    assert dc.cathode_ma == pytest.approx(2.9 + 6.8, rel=0.05)


def test_resistance_coupled_triode_against_a_hand_worked_load_line():
    # hand-worked (textbook small-signal load line about the 100 V point, rp = mu/gm = 80 kohm):
    # Ip = 0.5 + 1.25 x (1 - 0.7) + (Vp - 100)/80k, Vp = 95 - 220k Ip  ->  Ip = 0.2 mA, Vp = 51 V
    dc = solve_stage(AV6, 95.0, 220e3, 0.0, -0.7)
    assert dc.plate_ma == pytest.approx(0.2, rel=0.2)
    assert dc.plate_v == pytest.approx(95.0 - dc.plate_ma * 220.0)
    assert 40.0 <= dc.plate_v <= 60.0   # AA5 service charts: first-audio plate 40-60 V (trade)


def test_50c5_cathode_bias_self_consistent():
    # 50C5 handbook (from memory): 110 V, 150 ohm cathode resistor for the -7.5 V point, 49 + 4 mA
    op = TypicalOperation(110, 110, -7.5, 49, 4, 6.0, 7.5)
    dc = solve_stage(op, 110.0, 0.0, 150.0, 0.0, 110.0, 0.0)
    assert dc.cathode_v == pytest.approx(dc.cathode_ma * 0.150)
    assert 6.0 <= dc.cathode_v <= 8.0
    assert dc.cathode_ma == pytest.approx(53.0, rel=0.15)


def test_fault_models():
    good = solve_stage(BA6, 110.0, 15.0, 68.0, 0.0, 110.0, 0.0)
    # open screen resistor: no screen volts, the tube cuts off, the plate rises to its supply
    open_g2 = solve_stage(BA6, 110.0, 15.0, 68.0, 0.0, 110.0, math.inf)
    assert open_g2.screen_v == 0.0 and open_g2.cathode_ma == 0.0 and open_g2.plate_v == 110.0
    # a worn tube (emission x 0.4) draws less, so its cathode reads low
    worn = solve_stage(BA6, 110.0, 15.0, 68.0, 0.0, 110.0, 0.0, emission=0.4)
    assert worn.cathode_v < 0.6 * good.cathode_v
    # open plate load: the plate reads nothing, the screen takes the current
    open_p = solve_stage(BA6, 110.0, math.inf, 68.0, 0.0, 110.0, 0.0)
    assert open_p.plate_ma == 0.0 and open_p.screen_ma > good.screen_ma
    # a screen resistor drops the screen by its current (Ohm's law)
    fed = solve_stage(BA6, 250.0, 15.0, 68.0, 0.0, 250.0, 33e3)
    assert fed.screen_v == pytest.approx(250.0 - fed.screen_ma * 33.0)
