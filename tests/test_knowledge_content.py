"""The shipped knowledge covers the job: coverage, guidance, safety routes.

The figures (80+ faults, 8+ per stage, guidance and cost on every check) are the project's
acceptance criteria for the graph; the safety facts are sourced where they come from a
standard and marked "common practice, no source" where they are the trade's habit.
"""

from __future__ import annotations

from collections import Counter

import pytest

from faultwise.expect.expected import expect
from faultwise.graph.knowledge import load_knowledge
from faultwise.graph.nodes import FAMILIES, STAGES, Check, Fault
from faultwise.profile.load import load_profile
from faultwise.core.workspace import bundled_knowledge_dir

SYMPTOM_IDS = {  # DESIGN section 6, a contract
    "dead-nothing-lights", "dead-lights-on", "hum-loud", "noise-no-stations",
    "weak-reception", "low-volume", "distorted-audio", "intermittent",
    "squeal-or-motorboat", "dial-off-calibration", "fades-after-warmup",
    "scratchy-controls", "smoke-or-overheat", "dead-after-repair",
}


@pytest.fixture(scope="module")
def kn():
    return load_knowledge(bundled_knowledge_dir())


def _faults(kn):
    return [n for n in kn.nodes.values() if isinstance(n, Fault)]


def test_fault_coverage_per_stage(kn):
    faults = _faults(kn)
    assert len({f.id for f in faults}) >= 80
    per_stage = Counter(f.stage for f in faults)
    for stage in STAGES:
        assert per_stage[stage] >= 8, (stage, per_stage[stage])


def test_every_fault_is_complete(kn):
    for fault in _faults(kn):
        assert fault.repair, fault.id
        assert fault.verify, fault.id
        assert fault.signature.readings or fault.signature.observations, fault.id
        assert fault.priors and all(w >= 0 for w in fault.priors.values()), fault.id
        assert any(w > 0 for w in fault.priors.values()), fault.id   # 0: reached, not a cause
        assert set(fault.priors) <= SYMPTOM_IDS, fault.id


def test_every_check_has_guidance_and_cost(kn):
    for node in kn.nodes.values():
        if isinstance(node, Check):
            assert node.how.strip() and node.why.strip(), node.id
            assert node.minutes > 0, node.id


def test_all_symptoms_for_all_families(kn):
    assert set(kn.symptoms) == SYMPTOM_IDS
    for sym in kn.symptoms.values():
        for family in sym.families:
            assert kn.applies(kn.entry(sym.id, family), family)
            assert kn.faults_for(sym.id, family), (sym.id, family)


@pytest.mark.parametrize("family", FAMILIES)
def test_smoke_starts_with_stop_now(kn, family):
    """Smoke or overheating: the first thing asked carries the stop-now caution."""
    first = kn.node(kn.entry("smoke-or-overheat", family))
    assert isinstance(first, Check)
    assert "stop-now" in first.cautions


def test_line_sets_close_with_the_leakage_check(kn):
    """Leakage check before a line-connected set goes back (DESIGN section 11)."""
    for family in ("series-string", "transformer"):
        closing = kn.closing_checks(family)
        assert [c.expect for c in closing] == ["safety.leakage_v"], family
        assert "leakage-check" in closing[0].cautions or closing[0].cautions
    assert kn.closing_checks("transistor") == []


def test_leakage_limit_is_the_published_one(kn):
    """0.75 V across 1500 ohm = 0.5 mA (ANSI C39.5 network; UL 101 limit, from memory)."""
    profile = load_profile(bundled_knowledge_dir() / "sets" / "demo-5-tube-table.yaml")
    limit = expect(profile)["safety.leakage_v"]
    assert limit.high == pytest.approx(1500 * 0.5e-3)
    assert limit.low == 0 and limit.absent_below == 0


def test_line_checks_that_touch_the_chassis_carry_cautions(kn):
    """Every powered check on a series-string set warns of the live chassis or B+.

    Common practice, no source: on a set with no power transformer, any probe on the
    chassis while the set is plugged in may be at line potential.
    """
    text_words = ("power on", "powered", "plug it in", "switch on")
    missing = []
    for node in kn.nodes.values():
        if not isinstance(node, Check) or "series-string" not in node.families:
            continue
        if node.expect and node.expect.startswith(("supply.rectifier", "supply.filtered",
                                                   "output.cathode", "output.plate")):
            if not set(node.cautions) & {"live-chassis", "b-plus", "charged-caps"}:
                missing.append(node.id)
        elif (any(w in node.how.lower() for w in text_words) and not node.cautions
              and not any(w in node.how.lower() for w in ("unplug", "power off"))):
            missing.append(node.id)
    assert not missing, missing


def test_safety_capacitor_rule_is_stated(kn):
    """IEC 60384-14: line-to-chassis parts are Y class; a Y may replace an X, never the reverse."""
    text = kn.cautions["safety-caps"].text
    assert "Y" in text and "X" in text


def test_conclusions_do_not_depend_on_the_order(kn):
    """Learned counts re-order suspects; the walk must still name the right fault.

    Every signature is walked under the written order, speaker-back and a seeded random
    order (the sweep's baselines): each must still conclude its own fault, so no route is
    right only because an earlier suspect happened to be cleared first.
    """
    from faultwise.shop.sweep import load_demo_sets, run_sweep

    sets = load_demo_sets(bundled_knowledge_dir() / "sets")
    report = run_sweep(kn, sets)
    assert report.isolated == report.signatures
    for name, walks in report.baseline_walks.items():
        wrong = [(w.symptom, w.family, w.fault) for w in walks if not w.isolated]
        assert not wrong, (name, wrong[:5])


def test_a_transistor_set_is_never_shown_a_tube_caution(kn):
    # A portable has no tubes, no line cord and no filament: a caution it is shown must speak
    # of what it has (trade fact, common practice, no source). Every caution that concerns
    # the transistor family, and so every caution a transistor check can show, is checked.
    tube_words = ("tube", "line cord", "line-cord", "filament", "heater", "mains")
    for caution in kn.cautions.values():
        if "transistor" not in caution.families:
            continue
        text = f"{caution.title} {caution.text}".lower()
        assert not any(w in text for w in tube_words), (caution.id, text)
    for node in kn.nodes.values():
        if isinstance(node, Check) and "transistor" in node.families:
            for cid in node.cautions:
                shown = kn.cautions[cid]
                assert "transistor" in shown.families or len(node.families) > 1, (node.id, cid)


def test_verify_reads_the_unplugged_checks_before_powering_up(kn):
    # Common practice, no source: after a repair the new part's ohms (and the absence of a
    # short) are read with the set unplugged before it is brought up again; a verify list
    # that powers the set first and only then reads ohms applies power to an unproven repair.
    def unplugged(cid):
        how = (kn.nodes[cid].how or "").lstrip().lower()
        return how.startswith("unplug")

    def powered(cid):
        how = (kn.nodes[cid].how or "").lstrip().lower()
        return how.startswith(("set on", "set playing"))

    late = []
    for f in _faults(kn):
        seen_powered = False
        for cid in f.verify:
            seen_powered = seen_powered or powered(cid)
            if seen_powered and unplugged(cid):
                late.append((f.id, f.verify))
                break
    assert not late, late
