"""What the answers so far say about each fault (faultwise.walk.evidence), and its use in ranking.

Outside references: Bayes' rule with a likelihood per answered check (any probability text;
from memory); the p/c rule of Heckerman, Breese and Rommelse (1995), Comm. ACM 38(3). Trade
facts, common practice, no source: an open filter resistor leaves nothing on the filtered B+
line, so every plate fed from it (the IF tube's, through a few ohms of IF primary) reads
nothing; a class-B pair that has lost its bias shows a low base-to-base voltage.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from faultwise.core.workspace import bundled_knowledge_dir
from faultwise.expect.classify import classify
from faultwise.graph.knowledge import load_knowledge
from faultwise.shop.sweep import load_demo_sets
from faultwise.walk import evidence, rank

KB = Path(__file__).parent / "fixtures" / "kb_walk"


@pytest.fixture(scope="module")
def bundled():
    kd = bundled_knowledge_dir()
    k = load_knowledge(kd)
    sets = load_demo_sets(kd / "sets", kd)
    return k, {d.name: d for fam in sets.values() for d in fam}


def _evidence(bundled, set_name):
    k, demos = bundled
    d = demos[set_name]
    return evidence.Evidence(k, d.profile, d.expectations)


def test_signature_reading_agrees_or_contradicts(bundled):
    ev = _evidence(bundled, "demo-si-npn-portable.yaml")
    f = "audio.tr-output-bias-low"          # signature: bias.output.bases_v low
    assert ev.predicted(f, "audio.tr-output-bases-distort") == "low"
    assert ev.weights([f], {"audio.tr-output-bases-distort": "low"})[f] == evidence.AGREE
    assert ev.weights([f], {"audio.tr-output-bases-distort": "normal"})[f] == \
        pytest.approx(evidence.CONTRADICTED)
    # Two contradictions multiply; a skipped check says nothing.
    both = {"audio.tr-output-bases-distort": "normal", "audio.tr-output-bases-lowvol": "normal",
            "audio.tr-driver-vb-distort": "skipped"}
    assert ev.weights([f], both)[f] == pytest.approx(evidence.CONTRADICTED ** 2)


def test_observation_without_prediction(bundled):
    ev = _evidence(bundled, "demo-si-npn-portable.yaml")
    f = "audio.tr-output-bias-low"          # its signature says nothing of the volume control
    assert ev.predicted(f, "audio.tr-volume-rotate") is None
    assert ev.weights([f], {"audio.tr-volume-rotate": "smooth"})[f] == 1.0
    assert ev.weights([f], {"audio.tr-volume-rotate": "scratchy"})[f] == evidence.UNEXPLAINED


def test_physics_fills_what_the_signature_leaves_out(bundled):
    # The open filter resistor's signature names the filtered B+ but not the IF plate; the
    # set's own physics does: nothing reaches the IF plate (trade fact above).
    k, _ = bundled
    f = k.nodes["supply.open-filter-resistor"]
    assert "stage.if.plate_v" not in f.signature.readings
    ev = _evidence(bundled, "demo-5-tube-table.yaml")
    assert ev.predicted(f.id, "if.if-plate-weak") == "absent"
    # A healthy-looking IF plate then counts against it; a dead one for it.
    assert ev.weights([f.id], {"if.if-plate-weak": "normal"})[f.id] == evidence.CONTRADICTED
    assert ev.weights([f.id], {"if.if-plate-weak": "absent"})[f.id] == evidence.AGREE


def test_a_fault_without_model_or_signature_entry_predicts_nothing(bundled):
    ev = _evidence(bundled, "demo-5-tube-table.yaml")
    k, _ = bundled
    f = k.nodes["audio.tr-output-transformer-open"]      # no model, transistor family
    assert not f.model
    assert ev.predicted(f.id, "if.if-plate-weak") is None


def test_likelihood_reorders_by_hand():
    # tests/fixtures/kb_walk, supply.low-b-suspects (see test_rank): priors .375 (first-cap-esr),
    # .25 (rectifier-test), .125 (surge-test); costs 4, 2, 3 min. An answer that contradicts
    # the dry first capacitor leaves it a tenth: .0375, .25, .125; sum .4125; shares
    # .0909, .6061, .3030; p/c .0227, .3030, .1010 -> rectifier, surge, first cap.
    kb = load_knowledge(KB)
    ranked = rank.rank_investigations(kb, "supply.low-b-suspects", "dead-lights-on",
                                      "series-string", counts={},
                                      likelihood={"supply.dry-first-cap": 0.1})
    assert [r.target for r in ranked] == ["supply.rectifier-test", "supply.surge-test",
                                          "supply.first-cap-esr"]
    assert [r.p for r in ranked] == pytest.approx([.25 / .4125, .125 / .4125, .0375 / .4125])


def test_the_walk_uses_the_answers(bundled):
    # Weak reception on the demo 5-tube set, answered as a healthy set reads: weak across the
    # dial, then the AVC line and the oscillator grid at their nominal values. Inside the
    # weak-reception suspects list the ranking the walk shows is the p/c ranking weighted by
    # the evidence, and the healthy AVC reading has moved faults that pull it low back.
    from faultwise.walk.state import Walk

    k, demos = bundled
    d = demos["demo-5-tube-table.yaml"]
    w = Walk(k, d.profile, "weak-reception", expectations=d.expectations, counts={})
    for _ in range(3):
        check = k.nodes[w.current_node]
        if check.is_measurement:
            w.answer_value(d.expectations[check.expect].nominal)
        else:
            w.answer(check.normal if check.id != "antenna.weak-where" else "all-dial")
    ex = w.explain()
    assert ex is not None and ex.suspects
    frame = w._state.stack[-1]
    faults = k.faults_under(frame.suspects, d.family)
    like = w.evidence.weights(faults, w._state.memory)
    assert min(like.values()) < 1.0        # some fault predicted a low AVC line
    expected = rank.rank_investigations(
        k, frame.suspects, "weak-reception", d.family, frame.cleared, {}, applies=w._applies,
        likelihood=like, reach=lambda f, t: w.evidence.reach(f, t, d.family))
    assert [(r.target, round(r.p, 9)) for r in ex.ranked] == \
        [(r.target, round(r.p, 9)) for r in expected]


def test_warm_computes_the_physics_ahead(bundled, monkeypatch):
    # The bench warms a walk's evidence in a worker as the walk opens: afterwards a reading
    # answered at the bench is weighed without computing any fault's physics again.
    import faultwise.expect.fault_physics as physics

    k, _ = bundled
    ev = _evidence(bundled, "demo-5-tube-table.yaml")
    faults = k.faults_for("weak-reception", "series-string")
    calls = []
    real = physics.inject
    monkeypatch.setattr(physics, "inject", lambda *a, **kw: calls.append(1) or real(*a, **kw))
    ev.warm(faults)
    modelled = [f for f in faults if k.nodes[f].model]
    assert len(calls) == len(modelled) > 10
    calls.clear()
    ev.weights(faults, {"if.if-plate-weak": "normal", "detector.avc-check": "low"})
    assert calls == []


def test_an_investigation_carries_only_the_faults_its_check_would_find(bundled):
    # Physics (the set's own chart engine): a leaky coupling capacitor puts a couple of volts
    # on the output grid of a cathode-biased output tube, and the cathode resistor's feedback
    # holds the cathode within its band (the stage's current rises by about gm Rk / (1 + gm Rk)
    # of the grid's shift; textbook cathode degeneration). So the cathode reading does not
    # find it and carries a tenth of its weight; the output grid reading does, and ranks
    # above the cathode reading in the distortion list (Heckerman 1995: p is the chance the
    # step finds the fault).
    from faultwise.walk.evidence import CONTRADICTED, Evidence

    k, demos = bundled
    d = demos["demo-5-tube-table.yaml"]
    ev = Evidence(k, d.profile, d.expectations)
    assert ev.predicted("audio.leaky-coupling-cap", "audio.output-cathode") == "normal"
    assert ev.reach("audio.leaky-coupling-cap", "audio.output-cathode", d.family) == CONTRADICTED
    assert ev.predicted("audio.leaky-coupling-cap", "audio.output-grid-v") == "high"
    assert ev.reach("audio.leaky-coupling-cap", "audio.output-grid-v", d.family) == 1.0
    ranked = rank.rank_investigations(
        k, "audio.distortion-suspects", "distorted-audio", d.family, counts={},
        reach=lambda f, t: ev.reach(f, t, d.family))
    order = [r.target for r in ranked]
    assert order.index("audio.output-grid-v") < order.index("audio.output-cathode")


def test_physics_uses_the_workspace_tube_table(tmp_path):
    # One tube table per workspace (the project's rule): a knowledge copy whose 35W4 drops
    # 40 V instead of the bundled 15 V computes a lower B+ for the 5-tube set, its bands and
    # the broken set's readings alike. The walk's predictions must come from that same table,
    # or a reading the set's own bands call normal could be predicted otherwise.
    import re
    import shutil

    from faultwise.expect.expected import expect
    from faultwise.expect.fault_physics import inject
    from faultwise.profile.load import load_profile
    from faultwise.profile.tubes import workspace_tube_table

    root = tmp_path / "knowledge"
    shutil.copytree(bundled_knowledge_dir(), root)
    text = (root / "tubes.yaml").read_text(encoding="utf-8")
    start = text.index("  - type: 35W4\n")
    end = text.index("  - type:", start + 5)
    entry, count = re.subn(r"drop_v: 15,", "drop_v: 40,", text[start:end])
    assert count == 1
    (root / "tubes.yaml").write_text(text[:start] + entry + text[end:], encoding="utf-8")
    kb = load_knowledge(root)
    table = workspace_tube_table(root)
    profile = load_profile(root / "sets" / "demo-5-tube-table.yaml")
    bands = expect(profile, tube_table=table)
    model = kb.nodes["supply.open-first-filter-cap"].model
    own = inject(profile, model, bands, tube_table=table)["supply.rectifier_out_v"].nominal
    bundled = inject(profile, model, bands)["supply.rectifier_out_v"].nominal
    assert own < bundled - 10.0          # the table matters (25 V more across the rectifier)
    got = evidence.Evidence(kb, profile, bands).physics("supply.open-first-filter-cap")
    assert got["supply.rectifier_out_v"].nominal == pytest.approx(own)


def test_an_injection_ahead_of_an_unfed_stage_is_silent(bundled):
    # Trade fact, common practice, no source: a tube with no plate or screen volts passes no
    # signal, so a tone injected ahead of it is not heard. On the 230 V transformer set the
    # second filter capacitor shorted leaves the first capacitor's B+ near normal (the filter
    # resistor holds the short off the rectifier) but takes the filtered line, which feeds
    # the first audio plate and the output screen, to nothing.
    k, demos = bundled
    demo = demos["demo-230v-transformer.yaml"]
    ev = _evidence(bundled, "demo-230v-transformer.yaml")
    f = k.nodes["supply.shorted-second-filter-cap"]
    assert "audio.dlo-inject-lug" not in f.signature.observations
    physics = ev.physics(f.id)
    assert classify(physics["stage.detector.plate_v"].nominal,
                    demo.expectations["stage.detector.plate_v"]) == "absent"
    assert classify(physics["supply.rectifier_out_v"].nominal,
                    demo.expectations["supply.rectifier_out_v"]) != "absent"
    for check in ("audio.dlo-inject-lug", "audio.inject-output-grid", "if.inject-if-grid"):
        assert ev.predicted(f.id, check) == "nothing", check
    assert ev.observations(f)["audio.dlo-inject-lug"] == "nothing"
    # A fault that leaves every stage fed predicts nothing from physics: its signature rules.
    weak = k.nodes["oscillator.weak-converter"]
    assert evidence.unfed_choice(k.nodes["audio.dlo-inject-lug"], ev.physics(weak.id),
                                 demo.expectations) is None
    assert ev.predicted(weak.id, "audio.dlo-inject-lug") is None
    # Readings given as class words (a signature's) count too.
    lug = k.nodes["audio.dlo-inject-lug"]
    assert evidence.unfed_choice(lug, {"stage.output.screen_v": "absent"}, {}) == "nothing"
    assert evidence.unfed_choice(lug, {"stage.output.screen_v": "low"}, {}) is None


def test_the_injected_walk_hears_nothing_through_an_unfed_stage(bundled):
    from faultwise.shop.sweep_inject import walk_fault

    # A flat battery on the silicon portable cuts the IF stage off: the IF injection is
    # heard as nothing from physics (the signature says nothing about it), and the walk
    # still ends at the battery. It had ended at "IF transistor open".
    k, demos = bundled
    demo = demos["demo-si-npn-portable.yaml"]
    ev = _evidence(bundled, "demo-si-npn-portable.yaml")
    f = k.nodes["supply.tr-battery-flat"]
    assert "if.tr-inject-if" not in f.signature.observations
    readings = {n: e.nominal for n, e in ev.physics(f.id).items()}
    walk = walk_fault(k, demo, f, "dead-lights-on", readings)
    assert ("if.tr-inject-if", "none") in [(n, o) for n, o, _ in walk.path]
    assert walk.concluded == f.id
