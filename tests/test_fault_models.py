"""Fault models: the vocabulary, lint of every model, and the broken set's readings.

Physics checks name their source: series-string heaters (trade: the open heater reads the
whole line, the others nothing); capacitor-input ripple roughly I / (f C) (textbooks: ripple
inversely proportional to the reservoir capacitance); divider bias (textbooks: Thevenin
divider, an open transistor draws no collector current and its collector sits at the supply).
"""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from faultwise.expect import expect
from faultwise.expect.fault_models import TARGETS, model_problems, parse_change
from faultwise.expect.fault_physics import inject
from faultwise.graph import load_knowledge
from faultwise.graph.lint import lint
from faultwise.graph.nodes import Fault
from faultwise.profile import load_profile
from faultwise.walk import classify
from faultwise.core.workspace import bundled_knowledge_dir


KB = Path(__file__).parent / "fixtures" / "kb_small"
KNOWLEDGE = bundled_knowledge_dir()
SETS = KNOWLEDGE / "sets"


def _set(name):
    p = load_profile(SETS / name)
    return p, expect(p)


@pytest.mark.parametrize("target,text,kind,factor", [
    ("supply.first_cap_uf", "x0.1", "scale", 0.1), ("heater.output", "open", "open", 1.0),
    ("transistor.if", "leaky", "leaky", 1.0), ("transistor.driver.emitter_ohm", "short", "short", 1.0),
    ("tube.output.emission", "X.4", "scale", 0.4), ("gang.oscillator", "short", "short", 1.0)])
def test_parse_change(target, text, kind, factor):
    c = parse_change(target, text)
    assert (c.kind, c.factor) == (kind, pytest.approx(factor))


@pytest.mark.parametrize("target,text,why", [
    ("supply.first_cap", "x0.1", "not a fault-model target"),
    ("heater.woofer", "open", "not a fault-model target"),
    ("heater.output", "x0.5", "takes open"),
    ("supply.first_cap_uf", "dry", "not a change")])
def test_bad_changes_say_why(target, text, why):
    with pytest.raises(ValueError, match=why):
        parse_change(target, text)


def test_family_mismatch_is_a_problem():
    (target, message, _), = model_problems({"battery": "open"}, ("series-string",))
    assert target == "battery" and "names nothing" in message


def test_lint_locates_a_bad_model(tmp_path):
    kb = tmp_path / "kb"
    shutil.copytree(KB, kb)
    path = kb / "graph" / "antenna.yaml"
    text = path.read_text()
    text = text.replace("    title: Open loop antenna\n",
                        "    title: Open loop antenna\n    model: {coil.loop: open}\n")
    path.write_text(text)
    report = lint(kb)
    errors = [e for e in report.errors if "model" in e.message]
    assert len(errors) == 1
    e = errors[0]
    assert e.file.endswith("antenna.yaml") and e.node == "antenna.open-loop" and e.line
    proc = subprocess.run([sys.executable, "-m", "faultwise", "lint", "--knowledge", str(kb)],
                          capture_output=True, text=True, timeout=120)
    assert proc.returncode == 1 and "coil.loop" in proc.stdout + proc.stderr
    assert "Traceback" not in proc.stderr


def test_shipped_models_lint_clean_and_cover_sixty_percent():
    k = load_knowledge(KNOWLEDGE)
    faults = [n for n in k.nodes.values() if isinstance(n, Fault)]
    modelled = [f for f in faults if f.model]
    assert len(modelled) >= 0.6 * len(faults)
    for f in modelled:
        assert model_problems(f.model, f.families) == [], f.id


def test_every_target_is_documented_in_the_knowledge_readme():
    text = (KNOWLEDGE / "README.md").read_text()
    for pattern in TARGETS:
        assert f"`{pattern}`" in text, pattern


def test_no_model_changes_nothing():
    p, healthy = _set("demo-5-tube-table.yaml")
    assert inject(p, {}, healthy) == healthy


def test_open_heater_reads_the_line_and_the_others_nothing():
    p, healthy = _set("demo-5-tube-table.yaml")
    faulty = inject(p, {"heater.output": "open"}, healthy)
    assert faulty["heater.output.v"].nominal == pytest.approx(p.mains_v)
    for role in ("converter", "if", "detector", "rectifier"):
        assert faulty[f"heater.{role}.v"].nominal == 0.0
    assert faulty["heaters.string_ma"].nominal == 0.0
    # a cold tube rectifier passes nothing: no B+
    assert faulty["supply.rectifier_out_v"].nominal == 0.0
    assert classify(faulty["heater.output.v"].nominal, healthy["heater.output.v"]) == "high"


def test_dried_first_capacitor_ripple_grows_about_inversely():
    p, healthy = _set("demo-5-tube-table.yaml")
    faulty = inject(p, {"supply.first_cap_uf": "x0.1"}, healthy)
    ratio = faulty["supply.ripple_vpp"].nominal / healthy["supply.ripple_vpp"].nominal
    assert 4.0 < ratio <= 10.5          # I/(fC) caps it at 10x; the sagging B+ takes some
    assert faulty["supply.rectifier_out_v"].nominal < healthy["supply.rectifier_out_v"].nominal


def test_silicon_set_with_an_open_heater_has_b_plus_at_the_peak():
    p, healthy = _set("demo-4-tube-silicon.yaml")
    faulty = inject(p, {"heater.output": "open"}, healthy)
    # no tube draws: the first capacitor charges to about the line's peak (1.414 x 120 V)
    assert faulty["supply.rectifier_out_v"].nominal == pytest.approx(p.mains_v * 2 ** 0.5, rel=0.02)


def test_open_transistor_draws_nothing_and_its_collector_sits_at_the_supply():
    p, healthy = _set("demo-si-npn-portable.yaml")
    faulty = inject(p, {"transistor.if": "open"}, healthy)
    assert faulty["bias.if.ic_ma"].nominal == 0.0
    assert faulty["bias.if.ve_v"].nominal == 0.0
    assert faulty["bias.if.vc_v"].nominal == pytest.approx(p.battery_v)
    assert faulty["supply.standby_ma"].nominal < healthy["supply.standby_ma"].nominal
    assert faulty["detector.avc_v"].nominal == 0.0        # no IF gain: no carrier at the detector


def test_battery_circuit_open_leaves_the_cells_reading_normal():
    p, healthy = _set("demo-ge-pnp-portable.yaml")
    faulty = inject(p, {"battery": "open"}, healthy)
    assert faulty["supply.battery_v"].nominal == healthy["supply.battery_v"].nominal
    assert faulty["supply.standby_ma"].nominal == pytest.approx(0.0, abs=1e-9)


# --------------------------------------------------------- the voltage chart of a broken set

def test_open_screen_resistor_reads_absent_on_the_chart():
    """Trade: an open screen resistor leaves the screen at nothing and the tube passes almost
    no current (common practice, no source); the chart's engine must say so."""
    p, healthy = _set("demo-5-tube-table.yaml")
    for role in ("output", "if"):
        faulty = inject(p, {f"tube.{role}.screen_ohm": "open"}, healthy)
        for field in ("screen_v", "cathode_ma"):
            name = f"stage.{role}.{field}"
            assert classify(faulty[name].nominal, healthy[name]) == "absent", name


def test_open_plate_load_reads_absent_at_the_first_audio_plate():
    p, healthy = _set("demo-5-tube-table.yaml")
    faulty = inject(p, {"tube.detector.plate_ohm": "open"}, healthy)
    assert classify(faulty["stage.detector.plate_v"].nominal,
                    healthy["stage.detector.plate_v"]) == "absent"


def test_low_b_plus_lowers_every_stage():
    """A filter resistor at three times its value: the filtered B+ falls, and every stage fed
    from it reads lower (Ohm's law; the stage currents fall with their supply)."""
    p, healthy = _set("demo-230v-transformer.yaml")
    faulty = inject(p, {"supply.filter_ohm": "x3"}, healthy)
    assert faulty["supply.filtered_v"].nominal < healthy["supply.filtered_v"].nominal
    lowered = [n for n in healthy if n.startswith("stage.") and n.endswith(".screen_v")]
    assert lowered
    for name in lowered:
        assert faulty[name].nominal < healthy[name].nominal, name


def test_cold_tube_passes_no_current_on_the_chart():
    p, healthy = _set("demo-230v-transformer.yaml")
    faulty = inject(p, {"tube.if.emission": "open"}, healthy)
    assert faulty["stage.if.cathode_ma"].nominal == 0.0
    # no current, no drop in the screen resistor: the screen rises to its supply
    assert faulty["stage.if.screen_v"].nominal > healthy["stage.if.screen_v"].high


def test_positive_grid_reads_high_and_raises_the_current():
    p, healthy = _set("demo-5-tube-table.yaml")
    faulty = inject(p, {"tube.output.grid": "leaky"}, healthy)
    assert classify(faulty["stage.output.grid_v"].nominal, healthy["stage.output.grid_v"]) == "high"
    assert faulty["stage.output.cathode_ma"].nominal > healthy["stage.output.cathode_ma"].nominal
    assert faulty["output.cathode_v"].nominal > healthy["output.cathode_v"].nominal


@pytest.mark.parametrize("change", ["open", "short"])
def test_push_pull_bias_network_fault_leaves_no_idle_current(change):
    """Issue 11's check: a pair whose bias network is open (or shorted) reads absent on idle
    current and base bias; the battery current falls by the pair's idle current."""
    p, healthy = _set("demo-ge-pnp-portable.yaml")
    faulty = inject(p, {"output.bias": change}, healthy)
    for name in ("bias.output.idle_ma", "bias.output.bases_v"):
        assert classify(faulty[name].nominal, healthy[name]) == "absent", name
    drop = healthy["supply.standby_ma"].nominal - faulty["supply.standby_ma"].nominal
    assert drop == pytest.approx(healthy["bias.output.idle_ma"].nominal, rel=1e-6)


def test_flat_battery_lowers_the_pair_current():
    p, healthy = _set("demo-si-npn-portable.yaml")
    faulty = inject(p, {"battery_v": "x0.7"}, healthy)
    assert faulty["bias.output.idle_ma"].nominal < healthy["bias.output.idle_ma"].nominal


@pytest.mark.parametrize("model,families,why", [
    ({"tube.rectifier.screen_ohm": "open"}, ("transformer",), "no amplifier stage"),
    ({"output.bias": "open"}, ("series-string",), "names nothing"),
    ({"tube.output.grid": "open"}, ("transformer",), "takes leaky"),
])
def test_lint_checks_the_chart_targets(model, families, why):
    (_, message, _), = model_problems(model, families)
    assert why in message


def test_no_signature_reading_contradicts_its_model_on_every_set():
    # The set's own physics is the oracle (the chart engine with the part broken): a fault's
    # signature may say more than its model computes, and may differ on one set whose supply
    # or stage is stiffer, but a reading class that the model contradicts on every demo set it
    # applies to is a wrong signature (the walk would then look for a cathode that never moves).
    from faultwise.expect.fault_models import applies_to, parse_model
    from faultwise.graph.applicability import node_applies
    from faultwise.shop.sweep import load_demo_sets

    kb = load_knowledge(KNOWLEDGE)
    demos = [d for ds in load_demo_sets(SETS, KNOWLEDGE).values() for d in ds]
    verdicts: dict[tuple[str, str], list[bool]] = {}
    for fault in (n for n in kb.nodes.values() if isinstance(n, Fault) and n.model):
        for d in demos:
            if d.family not in fault.families or not node_applies(fault, d.profile, d.expectations) \
                    or applies_to(parse_model(fault.model), d.profile):
                continue
            faulty = inject(d.profile, fault.model, d.expectations)
            for name, spec in fault.signature.readings.items():
                if name not in faulty or name not in d.expectations:
                    continue
                band = d.expectations[name]
                said = spec if isinstance(spec, str) else classify(float(spec), band)
                verdicts.setdefault((fault.id, name), []).append(
                    said == classify(faulty[name].nominal, band))
    assert len(verdicts) > 100          # 122 (fault, reading) pairs when written
    wrong = sorted(key for key, agree in verdicts.items() if not any(agree))
    assert wrong == []
