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

import pytest

from faultwise.expect import expect
from faultwise.expect.context import Context
from faultwise.graph.knowledge import load_knowledge
from faultwise.profile import load_profile
from faultwise.walk import auto_walk
from faultwise.core.workspace import bundled_knowledge_dir

SETS = Path(__file__).resolve().parents[1] / "knowledge" / "sets"
KNOWLEDGE = load_knowledge(bundled_knowledge_dir())


def nominal_readings(expectations: dict) -> dict:
    return {name: e.nominal for name, e in expectations.items()}


def test_open_if_screen_resistor_from_the_chart_readings():
    from faultwise.expect.stages import faulty_stage_readings

    profile = load_profile(SETS / "demo-5-tube-table.yaml")
    exp = expect(profile)
    faulty = faulty_stage_readings(Context(profile, None), "if", screen_ohm=math.inf)
    assert faulty["stage.if.screen_v"] == 0.0 and faulty["stage.if.cathode_ma"] == 0.0
    assert faulty["stage.if.plate_v"] > exp["stage.if.plate_v"].low   # the plate keeps its B+
    readings = nominal_readings(exp) | faulty
    result = auto_walk(KNOWLEDGE, profile, "dead-lights-on", readings,
                       {"if.inject-if-grid": "nothing"}, expectations=exp)
    assert result.conclusion is not None
    assert result.conclusion.id == "if.open-if-screen-resistor"
    asked = [s.node for s in result.steps]
    assert "if.if-screen-v" in asked


def test_healthy_stage_readings_equal_the_chart_nominals():
    from faultwise.expect.stages import faulty_stage_readings

    profile = load_profile(SETS / "demo-230v-transformer.yaml")
    exp = expect(profile)
    for role in ("converter", "if", "detector", "output"):
        for name, value in faulty_stage_readings(Context(profile, None), role).items():
            assert value == pytest.approx(exp[name].nominal, rel=1e-9, abs=1e-12), name


def test_portable_output_pair_lost_its_bias():
    from faultwise.expect.output_pair import faulty_pair_readings

    profile = load_profile(SETS / "demo-ge-pnp-portable.yaml")
    assert profile.output_stage == "push-pull-transformer"
    exp = expect(profile)
    lost = faulty_pair_readings(Context(profile, None), top_ohm=math.inf)
    assert lost["bias.output.idle_ma"] == 0.0
    readings = nominal_readings(exp) | lost
    readings["supply.standby_ma"] = (exp["supply.standby_ma"].nominal
                                     - exp["bias.output.idle_ma"].nominal)
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
