"""Fault models against ngspice: the broken set's readings (faultwise.expect.fault_physics) match the
SAME circuit with the part broken, solved by ngspice (Debian package) as an oracle.

Rectifier-filter faults start from the healthy netlist of tests/reference/ngspice_util.py and
break one part: a dried capacitor (value x0.1), an open filter resistor (the resistor gone, the
stages after it a resistive load with nothing to draw on), a shorted second capacitor (replaced by SHORT_OHM; the filter
resistor limits the current) and a shorted first capacitor (replaced by SHORT_OHM; the surge
resistor limits it). Bias faults run the healthy bias netlist with one resistor open (10 Mohm
for the emitter resistor: the meter is then the only path; 1e12 ohm for a divider resistor)
and compare with :func:`faultwise.expect.fault_state.stage_point` at ngspice's own Vbe, and check
that both readings fall in the same outcome class of the healthy band.
"""

from __future__ import annotations

import pytest

from faultwise.expect import expect
from faultwise.expect.fault_models import OPEN_OHM, SHORT_OHM
from faultwise.expect.fault_physics import inject
from faultwise.expect.fault_physics_line import _circuit
from faultwise.expect.fault_state import fold, stage_point
from faultwise.expect.fault_models import parse_model
from faultwise.profile import load_profile
from faultwise.walk import classify
from faultwise.core.workspace import bundled_knowledge_dir

from .ngspice_util import bias_netlist, rectifier_netlist, run_ngspice

SETS = bundled_knowledge_dir() / "sets"


def _set(name):
    p = load_profile(SETS / name)
    return p, expect(p)


def _edit(netlist: str, **lines) -> str:
    """Replace netlist lines by their first word (C1, I1, RF, C2, I2)."""
    out = []
    for line in netlist.splitlines():
        word = line.split(" ", 1)[0]
        out.append(lines.get(word, line) if word in lines else line)
    return "\n".join(x for x in out if x) + "\n"


def _spice_supply(profile, model, tmp_path, **edits):
    c = _circuit(profile, fold(parse_model(model)), None)
    return run_ngspice(_edit(rectifier_netlist(c), **edits), tmp_path)


RECT_SETS = ["demo-5-tube-table.yaml", "demo-230v-transformer.yaml"]


@pytest.mark.parametrize("name", RECT_SETS)
@pytest.mark.parametrize("cap", ["first_cap_uf", "second_cap_uf"])
def test_dried_capacitor_matches_ngspice(name, cap, tmp_path):
    p, healthy = _set(name)
    model = {f"supply.{cap}": "x0.1"}
    ours = inject(p, model, healthy)
    m = _spice_supply(p, model, tmp_path)
    assert ours["supply.rectifier_out_v"].nominal == pytest.approx(m["v1avg"], rel=0.01)
    assert ours["supply.filtered_v"].nominal == pytest.approx(m["v2avg"], rel=0.01)
    ripple = m["v1max"] - m["v1min"]
    assert ours["supply.ripple_vpp"].nominal == pytest.approx(ripple, rel=0.05)
    band = healthy["supply.ripple_vpp"]
    assert classify(ours["supply.ripple_vpp"].nominal, band) == classify(ripple, band)


@pytest.mark.parametrize("name", RECT_SETS)
def test_open_filter_resistor_matches_ngspice(name, tmp_path):
    p, healthy = _set(name)
    model = {"supply.filter_ohm": "open"}
    ours = inject(p, model, healthy)
    s = p.supply
    i1 = (s.load_ma - s.filter_load_ma) / 1000.0
    stages = healthy["supply.filtered_v"].nominal / (s.filter_load_ma / 1000.0)
    m = _spice_supply(p, model, tmp_path, I1=f"I1 k 0 DC {i1:.9g}", RF="RF k flt 1e12",
                      C2=f"C2 flt 0 {s.second_cap_uf:g}u IC=0", I2=f"RB flt 0 {stages:.9g}")
    assert ours["supply.rectifier_out_v"].nominal == pytest.approx(m["v1avg"], rel=0.01)
    assert ours["supply.filtered_v"].nominal == pytest.approx(m["v2avg"], abs=0.5)
    for key, spice in (("supply.rectifier_out_v", m["v1avg"]), ("supply.filtered_v", m["v2avg"])):
        assert classify(ours[key].nominal, healthy[key]) == classify(spice, healthy[key])


@pytest.mark.parametrize("name", RECT_SETS)
def test_shorted_second_capacitor_matches_ngspice(name, tmp_path):
    p, healthy = _set(name)
    model = {"supply.second_cap_uf": "short"}
    ours = inject(p, model, healthy)
    s = p.supply
    i1 = (s.load_ma - s.filter_load_ma) / 1000.0
    m = _spice_supply(p, model, tmp_path, I1=f"I1 k 0 DC {i1:.9g}",
                      C2=f"RSH flt 0 {SHORT_OHM:.9g}", I2="")
    assert ours["supply.rectifier_out_v"].nominal == pytest.approx(m["v1avg"], rel=0.02)
    assert ours["supply.filtered_v"].nominal == pytest.approx(m["v2avg"], abs=0.05)
    ripple = m["v1max"] - m["v1min"]
    assert ours["supply.ripple_vpp"].nominal == pytest.approx(ripple, rel=0.1)
    for key, spice in (("supply.rectifier_out_v", m["v1avg"]), ("supply.filtered_v", m["v2avg"]),
                       ("supply.ripple_vpp", ripple)):
        assert classify(ours[key].nominal, healthy[key]) == classify(spice, healthy[key])


@pytest.mark.parametrize("name", RECT_SETS)
def test_shorted_first_capacitor_matches_ngspice(name, tmp_path):
    p, healthy = _set(name)
    model = {"supply.first_cap_uf": "short"}
    ours = inject(p, model, healthy)
    m = _spice_supply(p, model, tmp_path, C1=f"RSH k 0 {SHORT_OHM:.9g}", I1="", I2="")
    assert ours["supply.rectifier_out_v"].nominal == pytest.approx(m["v1avg"], rel=0.02)
    assert classify(ours["supply.rectifier_out_v"].nominal, healthy["supply.rectifier_out_v"]) \
        == "absent"


# ----------------------------------------------------------------------------------- bias

BIAS = [("demo-si-npn-portable.yaml", "if"), ("demo-si-npn-portable.yaml", "audio"),
        ("demo-ge-pnp-portable.yaml", "converter")]
OPENS = {"emitter_ohm": OPEN_OHM, "top_ohm": 1e12, "bottom_ohm": 1e12}


@pytest.mark.parametrize("part", list(OPENS))
@pytest.mark.parametrize("name,role", BIAS)
def test_open_bias_resistor_matches_ngspice(name, role, part, tmp_path):
    p, healthy = _set(name)
    tr = p.transistor(role)
    b = tr.bias
    vals = {"top_ohm": b.top_ohm, "bottom_ohm": b.bottom_ohm, "emitter_ohm": b.emitter_ohm}
    vals[part] = OPENS[part]
    m = run_ngspice(bias_netlist(tr.polarity, tr.material, tr.beta, p.battery_v, vals["top_ohm"],
                                 vals["bottom_ohm"], vals["emitter_ohm"], b.collector_ohm), tmp_path)
    vb, ve, vc, ic = abs(m["vb"]), abs(m["ve"]), abs(m["vc"]), abs(m["ic"]) * 1000
    ours = stage_point(p.battery_v, vals["top_ohm"], vals["bottom_ohm"], vals["emitter_ohm"],
                       b.collector_ohm, tr.beta, max(vb - ve, 0.0))
    assert ours.vb_v == pytest.approx(vb, rel=0.02, abs=0.01)
    assert ours.ve_v == pytest.approx(ve, rel=0.02, abs=0.01)
    # saturated (an open bottom resistor with a collector load): the model takes Vce(sat) =
    # 0.2 V (textbooks 0.1-0.3 V); the ideal ngspice transistor saturates deeper
    sat = abs(ours.vc_v - ours.ve_v - 0.2) < 1e-6
    assert ours.vc_v == pytest.approx(vc, rel=0.02, abs=0.15 if sat else 0.01)
    assert ours.ic_ma == pytest.approx(ic, rel=0.05 if sat else 0.02, abs=0.005)
    # the model as the injected sweep uses it (textbook Vbe), classified like ngspice's reading
    faulty = inject(p, {f"transistor.{role}.{part}": "open"}, healthy)
    for fld, spice in (("vb_v", vb), ("ve_v", ve), ("ic_ma", ic), ("vc_v", vc)):
        key = f"bias.{role}.{fld}"
        assert classify(faulty[key].nominal, healthy[key]) == classify(spice, healthy[key]), key
