"""The rectifier-filter model against ngspice (Debian package) running the SAME circuit,
and against SciPy's solve_ivp on the same ODE, and the textbook ripple bounds.

The netlist is generated from the model's own RectifierCircuit (tests/reference/ngspice_util.py):
sine source(s), surge resistor, rectifier (Child-law behavioural source for a tube, a D model
for silicon/selenium), C1 with a constant-current sink, filter resistor, C2 with its sink.
ngspice starts from a neutral 0.8 x peak and runs 30 cycles with a 10 us step; the last cycle
is measured.
"""

from __future__ import annotations

import math

import pytest

from faultwise.calc.rectifier import (
    RectifierCircuit,
    ripple_bound_vpp,
    selenium_stack,
    silicon_diode,
    simulate,
    tube_diode,
)

from .ngspice_util import rectifier_netlist, run_ngspice

# Tube drops from the tube data in REFERENCES.md: 6X4 about 22 V at 70 mA (full-wave),
# 5Y3GT about 60 V at 125 mA; a small half-wave series type about 15 V at 100 mA (memory).
CASES = {
    "half-wave tube (35W4-class) off a 120 V line": RectifierCircuit(
        "half-wave", 120, 60, 22, tube_diode(15, 100), 50, 55, 1000, 30, 12),
    "half-wave silicon off a 120 V line": RectifierCircuit(
        "half-wave", 120, 60, 22, silicon_diode(), 50, 55, 1000, 30, 12),
    "full-wave centre-tapped 5Y3GT, 250 V each half": RectifierCircuit(
        "full-wave", 250, 60, 100, tube_diode(60, 125), 20, 70, 1500, 20, 25),
    "full-wave centre-tapped 6X4, 230 V 50 Hz set": RectifierCircuit(
        "full-wave", 200, 50, 80, tube_diode(22, 70), 32, 60, 1200, 32, 20),
    "bridge silicon, 120 V winding": RectifierCircuit(
        "bridge", 120, 60, 10, silicon_diode(), 100, 100, 470, 100, 30),
    "half-wave selenium off a 120 V line": RectifierCircuit(
        "half-wave", 120, 60, 22, selenium_stack(120), 50, 55, 1000, 30, 12),
}


@pytest.mark.parametrize("name", list(CASES))
def test_model_matches_ngspice(name, tmp_path):
    c = CASES[name]
    ours = simulate(c)
    spice = run_ngspice(rectifier_netlist(c), tmp_path)
    # ngspice settled: the last two cycles agree (otherwise the comparison means nothing)
    assert spice["v1avg"] == pytest.approx(spice["v1prev"], rel=1e-3)
    # DC at C1 and C2 and the ripple at C1 within 1 % of ngspice (oracle: ngspice transient)
    assert ours.rectifier_out_v == pytest.approx(spice["v1avg"], rel=0.01)
    assert ours.filtered_v == pytest.approx(spice["v2avg"], rel=0.01)
    assert ours.ripple_vpp == pytest.approx(spice["v1max"] - spice["v1min"], rel=0.01)


@pytest.mark.parametrize("name", list(CASES))
def test_ripple_below_textbook_bound(name):
    # electronics texts: ripple <= I/(f C) half-wave, I/(2 f C) full-wave (upper bounds that
    # assume discharge over the whole period)
    c = CASES[name]
    r = simulate(c)
    bound = ripple_bound_vpp(c.load_ma, c.first_cap_uf, c.freq_hz, c.circuit)
    pulses = 1 if c.circuit == "half-wave" else 2
    assert bound == pytest.approx(c.load_ma / 1000 / (pulses * c.freq_hz * c.first_cap_uf * 1e-6))
    assert 0 < r.ripple_vpp < bound


@pytest.mark.parametrize("name", list(CASES))
def test_dc_below_peak_never_1_41_times_line(name):
    # the DC at C1 lies below the source peak (sqrt(2) x RMS) less the ripple's lower half
    c = CASES[name]
    r = simulate(c)
    assert r.rectifier_out_v < math.sqrt(2) * c.source_rms_v - r.ripple_vpp / 2


def test_model_matches_scipy_solve_ivp():
    """The same ODE integrated by SciPy's adaptive solver (independent of our stepping)."""
    integrate = pytest.importorskip("scipy.integrate")
    c = CASES["half-wave silicon off a 120 V line"]
    d = c.diode
    vpk, w = math.sqrt(2) * c.source_rms_v, 2 * math.pi * c.freq_hz
    c1, c2 = c.first_cap_uf * 1e-6, c.second_cap_uf * 1e-6
    i2 = c.filter_load_ma / 1000
    i1 = c.load_ma / 1000 - i2

    def diode_current(u: float) -> float:
        # current through Rs + junction for a voltage u: solve u = i Rs + n Vt ln(1 + i/Is)
        if u <= 0:
            return 0.0
        lo, hi = 0.0, u / c.surge_ohm
        for _ in range(80):
            mid = 0.5 * (lo + hi)
            if mid * c.surge_ohm + d.drop_v(mid) > u:
                hi = mid
            else:
                lo = mid
        return 0.5 * (lo + hi)

    def rhs(t, y):
        v1, v2 = y
        i = diode_current(vpk * math.sin(w * t) - v1)
        f = (v1 - v2) / c.filter_ohm
        return [(i - i1 - f) / c1, (f - i2) / c2]

    ours = simulate(c)
    period = 1 / c.freq_hz
    y0 = [0.8 * vpk, 0.8 * vpk - c.filter_ohm * i2]
    sol = integrate.solve_ivp(rhs, (0, 30 * period), y0, method="LSODA", max_step=period / 400,
                              rtol=1e-7, atol=1e-6, dense_output=True)
    assert sol.success
    ts = [29 * period + k * period / 400 for k in range(401)]
    v1 = [sol.sol(t)[0] for t in ts]
    v2 = [sol.sol(t)[1] for t in ts]
    assert ours.rectifier_out_v == pytest.approx(sum(v1) / len(v1), rel=0.005)
    assert ours.filtered_v == pytest.approx(sum(v2) / len(v2), rel=0.005)
    assert ours.ripple_vpp == pytest.approx(max(v1) - min(v1), rel=0.02)
