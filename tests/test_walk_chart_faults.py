"""Walks fed the readings a technician takes from the voltage chart reach the stage fault.

The readings are not hand-written: each comes from the same calc functions with the faulty
part put in (an open IF screen resistor: screen_ohm = inf; an output pair whose bias feed has
opened: top_ohm = inf), every other reading at its nominal value, as a healthy stage would
read. The observations are what the technician sees on the way (an injected IF signal gives
nothing; the distortion is made in the audio amplifier).
"""

from __future__ import annotations

import math
from dataclasses import replace
from pathlib import Path

from faultwise.expect import expect
from faultwise.expect_context import Context
from faultwise.graph import load_knowledge
from faultwise.profile import load_profile
from faultwise.walk import auto_walk
from faultwise.workspace import bundled_knowledge_dir

SETS = Path(__file__).resolve().parents[1] / "knowledge" / "sets"
KNOWLEDGE = load_knowledge(bundled_knowledge_dir())


def nominal_readings(expectations: dict) -> dict:
    return {name: e.nominal for name, e in expectations.items()}


def test_open_if_screen_resistor_from_the_chart_readings():
    from faultwise.calc.tube_stage import solve_stage
    from faultwise.expect_stages import stage_circuit, stage_operation
    from faultwise.expect_supply import simulate_supply

    profile = load_profile(SETS / "demo-5-tube-table.yaml")
    exp = expect(profile)
    ctx = Context(profile, None)
    tube = profile.tube("if")
    op, _ = stage_operation(ctx, tube)
    circuit, _ = stage_circuit(ctx, tube, "if")
    sim = simulate_supply(ctx)
    supply = sim.bands["filtered_v"].nominal
    faulty = solve_stage(op, supply, circuit.plate_ohm, circuit.cathode_ohm, 0.0, supply,
                         math.inf)
    readings = nominal_readings(exp)
    readings.update({"stage.if.plate_v": faulty.plate_v, "stage.if.screen_v": faulty.screen_v,
                     "stage.if.cathode_v": faulty.cathode_v,
                     "stage.if.cathode_ma": faulty.cathode_ma})
    assert faulty.screen_v == 0.0 and faulty.cathode_ma == 0.0
    result = auto_walk(KNOWLEDGE, profile, "dead-lights-on", readings,
                       {"if.inject-if-grid": "nothing"}, expectations=exp)
    assert result.conclusion is not None
    assert result.conclusion.id == "if.open-if-screen-resistor"
    asked = [s.node for s in result.steps]
    assert "if.if-screen-v" in asked


def test_portable_output_pair_lost_its_bias():
    from faultwise.expect_output_pair import pair_model

    profile = load_profile(SETS / "demo-ge-pnp-portable.yaml")
    assert profile.output_stage == "push-pull-transformer"
    exp = expect(profile)
    fn, sp, _, _ = pair_model(Context(profile, None))
    lost = fn(**{k: s.nominal for k, s in sp.items()} | {"top_ohm": math.inf})
    readings = nominal_readings(exp)
    readings.update({"bias.output.idle_ma": lost.idle_ma, "bias.output.bases_v": lost.bases_v,
                     "bias.output.ic_ma": lost.ic_ma, "bias.output.vb_v": lost.bases_v,
                     "bias.output.ve_v": lost.ve_v,
                     "supply.standby_ma": exp["supply.standby_ma"].nominal
                     - exp["bias.output.idle_ma"].nominal})
    result = auto_walk(KNOWLEDGE, profile, "distorted-audio", readings,
                       {"audio.tr-distortion-kind": "audio"}, expectations=exp)
    assert result.conclusion is not None
    assert result.conclusion.id == "audio.tr-output-bias-low"


def test_healthy_pair_readings_do_not_reach_the_bias_fault():
    profile = load_profile(SETS / "demo-ge-pnp-portable.yaml")
    exp = expect(profile)
    result = auto_walk(KNOWLEDGE, profile, "distorted-audio", nominal_readings(exp),
                       {"audio.tr-distortion-kind": "audio"}, expectations=exp)
    assert result.conclusion is None or result.conclusion.id != "audio.tr-output-bias-low"


def test_complementary_pair_midpoint_fault_reachable():
    # a complementary pair whose lower transistor leaks pulls the midpoint down
    profile = replace(load_profile(SETS / "demo-si-npn-portable.yaml"),
                      output_stage="complementary")
    exp = expect(profile)
    readings = nominal_readings(exp)
    readings["bias.output.midpoint_v"] = 0.5
    result = auto_walk(KNOWLEDGE, profile, "distorted-audio", readings,
                       {"audio.tr-distortion-kind": "audio"}, expectations=exp)
    assert result.conclusion is not None and result.conclusion.id == "audio.tr-output-shorted"
