"""Divider bias (Thevenin divider, (beta+1) Re) against an ngspice operating point (.op).

The oracle runs the same network (supply, top and bottom divider resistors, emitter and
collector resistors) with an ideal Gummel-Poon transistor whose gain is exactly BF. Our
formula is evaluated with ngspice's own Vbe, so the comparison tests the network algebra;
separately, ngspice's Vbe is checked to fall in the material's textbook range.
"""

from __future__ import annotations

import pytest

from faultwise.calc.bias import divider_bias
from faultwise.calc.tolerance import VBE_V

from .ngspice_util import bias_netlist, run_ngspice

# (polarity, material, beta, vcc, top, bottom, emitter, collector)
CASES = {
    "silicon NPN converter-like": ("npn", "silicon", 100, 9.0, 56e3, 8.2e3, 1e3, 0.0),
    "silicon NPN audio with collector load": ("npn", "silicon", 150, 9.0, 100e3, 22e3, 1e3, 4.7e3),
    "germanium PNP converter": ("pnp", "germanium", 80, 9.0, 56e3, 8.2e3, 1e3, 0.0),
    "germanium PNP audio, 6 V": ("pnp", "germanium", 60, 6.0, 47e3, 6.8e3, 1e3, 2.2e3),
    "silicon PNP IF": ("pnp", "silicon", 120, 9.0, 68e3, 10e3, 1e3, 0.0),
    "germanium NPN IF": ("npn", "germanium", 50, 9.0, 68e3, 10e3, 1e3, 1e3),
}


@pytest.mark.parametrize("name", list(CASES))
def test_divider_bias_matches_ngspice_op(name, tmp_path):
    pol, mat, beta, vcc, top, bottom, re, rc = CASES[name]
    m = run_ngspice(bias_netlist(pol, mat, beta, vcc, top, bottom, re, rc), tmp_path)
    vb, ve, vc, ic_ma = abs(m["vb"]), abs(m["ve"]), abs(m["vc"]), m["ic"] * 1000
    vbe = vb - ve
    # textbooks: Vbe at normal bias, silicon 0.6-0.7 V, germanium 0.2-0.3 V
    low, _, high = VBE_V[mat]
    assert low <= vbe <= high
    ours = divider_bias(vcc, top, bottom, re, rc, beta, vbe)
    assert ic_ma > 0
    assert ours.ic_ma == pytest.approx(ic_ma, rel=2e-3)
    assert ours.ve_v == pytest.approx(ve, rel=2e-3)
    assert ours.vb_v == pytest.approx(vb, rel=2e-3)
    assert ours.vc_v == pytest.approx(vc, rel=2e-3, abs=1e-4)
    assert not ours.saturated
