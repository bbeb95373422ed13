"""Corrections from the trade review of the knowledge, each held by a check that can fail.

Facts of the trade used here (common practice, no source unless named):
- crossover distortion comes from too little idle current in a push-pull output and is
  worst at low volume, so low idle current must lead to the bias check;
- a tired converter's oscillator fails first at the low end of the dial (gang fully meshed);
- cord and switch open far more often than a power transformer primary; a worn battery is
  the commonest cause of a portable fading after a while; a dead converter is a commoner
  cause of "no stations" than local interference;
- the form factor of a sine wave is pi / (2 sqrt 2) = 1.1107 (any electrical text), which is
  how an averaging meter is scaled; a sawtooth's RMS is Vpp / (2 sqrt 3) (same).
"""

from __future__ import annotations

import math
import re

import numpy as np
import pytest

from faultwise.expect.expected import expect
from faultwise.expect.meter import averaging_meter_reads, true_rms_meter_reads
from faultwise.graph.knowledge import load_knowledge
from faultwise.profile.load import load_profile
from faultwise.walk.state import Walk
from faultwise.walk.scripted import auto_answer
from faultwise.core.workspace import bundled_knowledge_dir

KNOWLEDGE = bundled_knowledge_dir()
SETS = KNOWLEDGE / "sets"


@pytest.fixture(scope="module")
def k():
    return load_knowledge(KNOWLEDGE)


def test_low_idle_current_leads_to_the_base_bias_check(k):
    """Crossover: low idle current is no longer 'cleared'; the walk asks for the base bias."""
    profile = load_profile(SETS / "demo-ge-pnp-portable.yaml")
    exp = expect(profile)
    walk = Walk(k, profile, "distorted-audio", expectations=exp)
    obs = {"audio.tr-distortion-kind": "crossover", "supply.tr-distortion-battery": "normal"}
    seen = []
    for _ in range(30):
        prompt = walk.prompt()
        if prompt is None or prompt.kind != "check":
            break
        seen.append(prompt.node.id)
        if prompt.node.id == "audio.tr-output-idle":
            ic = exp["bias.output.ic_ma"]
            walk.answer_value(ic.low * 0.5, raw="half the low end")
            break
        auto_answer(walk, {}, obs)
    assert "audio.tr-output-idle" in seen
    assert walk.prompt().node.id == "audio.tr-output-base-bias"
    node = k.nodes["audio.tr-output-idle"]
    assert node.outcomes["low"] == "audio.tr-output-base-bias"


def test_crossover_choice_is_worst_at_low_volume_and_apart_from_loud_distortion(k):
    node = k.nodes["audio.tr-distortion-kind"]
    assert "low volume" in node.choices["crossover"]
    assert "low volume" not in node.choices["audio"]
    assert k.nodes["audio.tr-output-bias-low"].signature.observations[
        "audio.tr-distortion-kind"] == "crossover"


def test_weak_converter_is_looked_for_at_the_low_end(k):
    low = [i.target for i in k.nodes["antenna.weak-low-suspects"].investigations]
    high = [i.target for i in k.nodes["antenna.weak-high-suspects"].investigations]
    assert "oscillator.osc-grid" in low and "oscillator.osc-grid" not in high
    pattern = re.compile(r"(tired|tiring|weak) converter[^.;]*high end", re.IGNORECASE)
    for node in k.nodes.values():
        for text in (getattr(node, "why", ""), getattr(node, "how", "")):
            assert not pattern.search(text or ""), node.id


def test_priors_agree_with_the_text(k):
    p = lambda fid, sym: k.nodes[fid].priors.get(sym, 0)  # noqa: E731
    cord_switch = p("supply.open-line-cord", "dead-nothing-lights") + \
        p("supply.worn-power-switch", "dead-nothing-lights")
    assert cord_switch >= 3 * p("supply.tf-open-primary", "dead-nothing-lights")
    battery = p("supply.tr-battery-flat", "fades-after-warmup")
    assert battery > p("if.tr-leakage-warm", "fades-after-warmup")
    assert battery > p("oscillator.tr-leakage-warm", "fades-after-warmup")
    assert p("oscillator.tr-converter-open", "noise-no-stations") > \
        p("antenna.tr-interference", "noise-no-stations")


def test_polarity_is_checked_without_power(k):
    how = k.nodes["supply.tr-rail-polarity"].how
    assert "for a second" not in how.replace("not even for a second", "")
    assert "switched off" in how and "current-limited" in how


def test_output_grid_is_measured_to_b_minus(k):
    how = k.nodes["audio.output-grid-dc"].how
    assert "grid to B-" in how


def test_plug_resistance_range_covers_every_series_string_demo_set(k):
    """The string's cold resistance (computed, plus any dropping resistor) fits the 2 kOhm range."""
    assert "2 kOhm range" in k.nodes["supply.ss-plug-ohms"].how
    for path in sorted(SETS.glob("*.yaml")):
        profile = load_profile(path)
        if profile.family != "series-string":
            continue
        exp = expect(profile)
        total = sum(e.nominal for n, e in exp.items() if n.endswith(".cold_ohm"))
        total += exp["heaters.dropping_ohm"].nominal
        assert 0 < total < 2000, path.name


def test_adapter_advice_is_linear_not_switch_mode(k):
    text = " ".join(k.nodes["supply.tr-adapter-ripple"].repair)
    assert "linear" in text and "switch-mode" in text


def _sawtooth(vpp: float, n: int = 200_000) -> np.ndarray:
    t = np.arange(n) / n
    return vpp * (t - 0.5)           # linear ramp, zero mean


def test_meter_readings_of_a_sawtooth_match_a_numerical_waveform():
    wave = _sawtooth(10.0)
    form_factor = math.pi / (2 * math.sqrt(2))          # sine, textbook
    averaging = form_factor * np.mean(np.abs(wave))
    rms = math.sqrt(np.mean(wave ** 2))
    assert averaging_meter_reads(10.0) == pytest.approx(averaging, rel=1e-4)
    assert true_rms_meter_reads(10.0) == pytest.approx(rms, rel=1e-4)


def test_meter_ripple_band_accepts_both_meter_kinds():
    exp = expect(load_profile(SETS / "demo-5-tube-table.yaml"))
    vpp, meter = exp["supply.ripple_vpp"], exp["supply.ripple_meter_vac"]
    for reading in (averaging_meter_reads(vpp.nominal), true_rms_meter_reads(vpp.nominal)):
        assert meter.low <= reading <= meter.high


def test_ripple_checks_ask_for_a_scope_and_fall_back_to_the_meter(k):
    for cid in ("supply.hum-ripple", "supply.low-b-ripple"):
        node = k.nodes[cid]
        assert "peak to peak" in node.how and "AC volts" not in node.how
        assert k.nodes[node.unable].expect == "supply.ripple_meter_vac"


def test_coverage_200_faults_and_10_per_stage_per_family(k):
    """The review's bar (common practice for a useful bench graph, no source)."""
    from collections import Counter

    from faultwise.graph.nodes import FAMILIES, STAGES, Fault

    faults = [n for n in k.nodes.values() if isinstance(n, Fault)]
    assert len(faults) >= 200
    per = Counter((f.stage, fam) for f in faults for fam in f.families)
    short = {(s, fam): per[(s, fam)] for s in STAGES for fam in FAMILIES if per[(s, fam)] < 10}
    assert short == {}
    titles = " ".join(f.title.lower() for f in faults)
    for kind in ("drifted", "leaky", "image", "cracked", "backwards", "slipping"):
        assert kind in titles, kind


def test_a_resistor_is_condemned_only_after_both_its_ends_are_read(k):
    """Trade fact, common practice, no source: a low reading at the far end of a feed
    resistor blames the resistor only if the supply feeding it is right; a low B+ starves
    every stage the same way. On the demo 300 mA set a dried first filter capacitor, with
    readings drawn anywhere in its faulty band, used to end at 'oscillator feed resistor
    drifted' from a low oscillator anode alone."""
    from faultwise.graph.nodes import Check, Fault

    feed = "oscillator.drifted-osc-feed-resistor"
    ifbias = "if.tr-bias-resistor-drifted"
    for node in k.nodes.values():
        if isinstance(node, Check):
            for outcome, target in node.outcomes.items():
                if target == feed:
                    assert node.expect == "supply.filtered_v", (node.id, outcome)
                if target == ifbias:
                    assert node.expect is None and "ohms" in node.how, (node.id, outcome)
    source = k.nodes["oscillator.osc-feed-source"]
    assert source.outcomes["low"] == "supply.low-b-suspects"
    assert source.outcomes["normal"] == feed
    assert isinstance(k.nodes[feed], Fault)
    # The walk itself, on the injected sweep's band pass (seed 1962): readings drawn in the
    # dried capacitor's faulty band read the oscillator anode low.
    import random

    from faultwise.shop.sweep import load_demo_sets
    from faultwise.shop.sweep_inject import band_readings, walk_fault
    from faultwise.shop.sweep_walk import set_evidence

    demo = next(d for fam in load_demo_sets(SETS, KNOWLEDGE).values() for d in fam
                if d.name == "demo-300ma-series.yaml")
    fault = k.nodes["supply.open-first-filter-cap"]
    faulty = set_evidence(k, demo).physics(fault.id)
    drawn = band_readings(faulty, random.Random(f"1962:{demo.name}:{fault.id}"))
    walk = walk_fault(k, demo, fault, "weak-reception", drawn)
    assert ("oscillator.osc-feed-v", "low") in [(n, o) for n, o, _ in walk.path]
    assert walk.concluded != feed
