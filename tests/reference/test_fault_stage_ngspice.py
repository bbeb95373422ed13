"""Stage fault models against ngspice: the same netlists as the healthy stage tests
(tests/reference/test_stage_ngspice.py, Koren's tube equations; ngspice's built-in BJT) with
the broken part put in: an open part is 1e12 ohm, a low supply is the supply scaled.

These are the changes the injected sweep makes through ``faulty_stage_readings`` and
``faulty_pair_readings``: what the chart's own model gives for a broken part must be what the
circuit simulator gives for the same circuit.
"""

from __future__ import annotations

import math

import pytest

from faultwise.calc import push_pull as pp
from faultwise.calc.tube_stage import solve_stage

from .ngspice_util import run_ngspice
from .test_stage_ngspice import (KOREN_12AX7, KOREN_SMALL, _is_a, pentode_anchor,
                                 pentode_netlist, triode_anchor, triode_netlist)

OPEN = 1e12

# the transformer-set IF stage of the healthy test: 250 V, screen through 33 kohm
IF_STAGE = dict(plate_supply=250.0, plate_ohm=15.0, screen_supply=250.0, screen_ohm=33e3,
                cathode_ohm=68.0, grid_v=0.0)
IF_ANCHOR = dict(vg1=-1.0, vg2=100.0, vp=250.0)


def _ours(op, c, **change):
    c = dict(c, **change)
    return solve_stage(op, c["plate_supply"], c["plate_ohm"], c["cathode_ohm"], c["grid_v"],
                       c["screen_supply"], c["screen_ohm"])


def test_open_screen_resistor_stops_the_stage(tmp_path):
    op = pentode_anchor(KOREN_SMALL, **IF_ANCHOR)
    m = run_ngspice(pentode_netlist(KOREN_SMALL, **dict(IF_STAGE, screen_ohm=OPEN)), tmp_path)
    ours = _ours(op, IF_STAGE, screen_ohm=math.inf)
    # ngspice: the screen floats down to the cathode and the plate current is a trickle
    assert m["sv"] < 1.0 and m["ipl"] * 1000.0 < 0.05 * 7.0
    assert ours.screen_v == pytest.approx(m["sv"], abs=1.0)
    assert ours.plate_ma == pytest.approx(m["ipl"] * 1000.0, abs=0.3)
    assert ours.plate_v == pytest.approx(m["pv"], rel=0.01)


def test_open_cathode_resistor_stops_the_stage(tmp_path):
    op = pentode_anchor(KOREN_SMALL, **IF_ANCHOR)
    m = run_ngspice(pentode_netlist(KOREN_SMALL, **dict(IF_STAGE, cathode_ohm=OPEN)), tmp_path)
    ours = _ours(op, IF_STAGE, cathode_ohm=math.inf)
    assert ours.plate_ma == pytest.approx(m["ipl"] * 1000.0, abs=0.3)
    assert ours.plate_v == pytest.approx(m["pv"], rel=0.01)


@pytest.mark.parametrize("k", [0.7, 0.5])
def test_low_supply_lowers_the_stage_as_ngspice_does(k, tmp_path):
    op = pentode_anchor(KOREN_SMALL, **IF_ANCHOR)
    c = dict(IF_STAGE, plate_supply=250.0 * k, screen_supply=250.0 * k)
    m = run_ngspice(pentode_netlist(KOREN_SMALL, **c), tmp_path)
    ours = _ours(op, c)
    assert ours.plate_v == pytest.approx(m["pv"], rel=0.03)
    assert ours.screen_v == pytest.approx(m["sv"], rel=0.05)
    assert ours.plate_ma == pytest.approx(m["ipl"] * 1000.0, rel=0.15)


def test_open_plate_load_leaves_the_triode_plate_at_nothing(tmp_path):
    op = triode_anchor(KOREN_12AX7, -1.0, 100.0)
    # the meter (10 Mohm, a digital meter's input) is the only other path from the plate
    net = triode_netlist(KOREN_12AX7, 111.0, OPEN, -0.7).replace(".control", "RM p 0 10e6\n.control")
    m = run_ngspice(net, tmp_path)
    ours = solve_stage(op, 111.0, math.inf, 0.0, -0.7)
    assert m["pv"] < 1.0
    assert ours.plate_v == pytest.approx(m["pv"], abs=1.0)
    assert ours.plate_ma == 0.0


@pytest.mark.parametrize("top, bottom", [
    (OPEN, 100.0),          # bias feed open: no idle current (crossover distortion)
    (3300.0, 300.0),        # bottom resistor drifted to three times: over-biased
])
def test_transformer_pair_bias_faults_match_ngspice(top, bottom, tmp_path):
    vcc, re, beta, vbe = 9.0, 10.0, 60.0, 0.25       # the germanium pair of the healthy test
    net = "\n".join([
        "* faultwise push-pull oracle: transformer-coupled pair, bias fault",
        f"VCC vcc 0 DC {vcc}", f"R1 vcc b {top}", f"R2 b 0 {bottom}",
        "RSA b ba 1e-3", "RSB b bb 1e-3", "VMA vcc ca DC 0", "VMB vcc cb DC 0",
        "QA ca ba ea QM", "QB cb bb eb QM", f"REA ea 0 {re}", f"REB eb 0 {re}",
        f".model QM NPN(IS={_is_a(vbe):.9g} BF={beta})",
        ".control", "op", "let ic = i(vma)", "let vb = v(b)", "print ic vb", "quit", ".endc",
        ".end"]) + "\n"
    m = run_ngspice(net, tmp_path)
    ours = pp.transformer_pair(vcc, math.inf if top >= OPEN else top, bottom, re, beta, vbe)
    assert ours.ic_ma == pytest.approx(m["ic"] * 1000.0, rel=0.02, abs=1e-3)
    assert ours.bases_v == pytest.approx(m["vb"], rel=0.01, abs=1e-3)
