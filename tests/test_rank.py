"""Ordering of suspects by p/c: hand-worked numbers on tests/fixtures/kb_walk.

Outside references: Heckerman, Breese and Rommelse (1995), "Decision-theoretic
troubleshooting", Comm. ACM 38(3): with a single fault and independent steps the expected
cost of an order is sum_i c_i * P(not found before i), and decreasing p/c minimises it
(checked here by exhaustive enumeration, not by trusting the code). Dirichlet posterior
mean of a multinomial with pseudo-counts alpha and counts n: (alpha_f + n_f) / (sum alpha + N)
(Gelman et al., Bayesian Data Analysis, the multinomial model; from memory).
"""

from __future__ import annotations

import itertools
import math
from pathlib import Path

import pytest

from faultwise.walk import rank
from faultwise.graph.knowledge import load_knowledge

KB = Path(__file__).parent / "fixtures" / "kb_walk"
FAM = "series-string"


@pytest.fixture(scope="module")
def kb():
    return load_knowledge(KB)


def test_fault_probabilities_by_hand(kb):
    # Reachable faults for dead-lights-on on a series-string set and their weights (fixture):
    # dry-first-cap 30, weak-rectifier 20, open-surge 10, open-primary 15, open-voice-coil 5;
    # sum = 80, S = 10 -> p_f = 10 * w / 80 / 10 = w / 80.
    p = rank.fault_probabilities(kb, "dead-lights-on", FAM, counts={})
    assert p == pytest.approx({"supply.dry-first-cap": 30 / 80, "supply.weak-rectifier": 20 / 80,
                               "supply.open-surge": 10 / 80, "audio.open-primary": 15 / 80,
                               "audio.open-voice-coil": 5 / 80})
    assert sum(p.values()) == pytest.approx(1.0)


def test_fault_probabilities_with_counts_by_hand(kb):
    # alpha = S w / sum w = 3.75, 2.5, 1.25, 1.875, 0.625; counts: 20 open surge resistors,
    # N = 20 -> p = (alpha + n) / (10 + 20); open-surge = (1.25 + 20) / 30 = 0.708333...
    p = rank.fault_probabilities(kb, "dead-lights-on", FAM, counts={"supply.open-surge": 20})
    assert p["supply.open-surge"] == pytest.approx(21.25 / 30)
    assert p["supply.dry-first-cap"] == pytest.approx(3.75 / 30)
    assert sum(p.values()) == pytest.approx(1.0)


def test_counts_for_unreachable_faults_are_ignored(kb):
    # A count for a fault the symptom cannot reach must not dilute the others (N counts
    # only reachable faults), so the probabilities are the same as with no counts.
    assert rank.fault_probabilities(kb, "dead-lights-on", FAM, counts={"supply.tr-flat-battery": 50}) \
        == pytest.approx(rank.fault_probabilities(kb, "dead-lights-on", FAM, counts={}))


def test_rank_low_b_suspects_by_hand(kb):
    # Under low-b-suspects: first-cap-esr -> {dry-first-cap} 30/80 = .375; rectifier-test
    # (and its unable route) -> {weak-rectifier} .25; surge-test -> {open-surge} .125.
    # Renormalised over the three (sum .75): .5, 1/3, 1/6.  Costs: 4 min (check), 2 min
    # (check), 3 min (the investigation's own minutes override the check's 2).
    # p/c: .125, .1667, .0556 -> rectifier-test, first-cap-esr, surge-test.
    ranked = rank.rank_investigations(kb, "supply.low-b-suspects", "dead-lights-on", FAM, counts={})
    assert [r.target for r in ranked] == ["supply.rectifier-test", "supply.first-cap-esr",
                                          "supply.surge-test"]
    assert [r.p for r in ranked] == pytest.approx([1 / 3, 1 / 2, 1 / 6])
    assert [r.cost for r in ranked] == [2.0, 4.0, 3.0]
    assert [r.ratio for r in ranked] == pytest.approx([1 / 6, 1 / 8, 1 / 18])
    assert ranked[0].faults == frozenset({"supply.weak-rectifier"})


def test_expected_cost_by_hand_and_optimal_order(kb):
    ranked = rank.rank_investigations(kb, "supply.low-b-suspects", "dead-lights-on", FAM, counts={})
    pairs = [(r.p, r.cost) for r in ranked]
    # By hand: 2 + 4 * (1 - 1/3) + 3 * (1 - 1/3 - 1/2) = 2 + 2.6667 + 0.5 = 5.1667 minutes.
    assert rank.expected_cost(pairs) == pytest.approx(2 + 4 * 2 / 3 + 3 / 6)
    # Written order: 4 + 2 * (1 - 1/2) + 3 * (1/6) = 5.5 minutes.
    by_target = {r.target: (r.p, r.cost) for r in ranked}
    written = [by_target[t] for t in ("supply.first-cap-esr", "supply.rectifier-test",
                                      "supply.surge-test")]
    assert rank.expected_cost(written) == pytest.approx(5.5)
    # Heckerman et al. 1995: the p/c order is optimal -- check every permutation.
    best = min(rank.expected_cost(list(perm)) for perm in itertools.permutations(pairs))
    assert rank.expected_cost(pairs) == pytest.approx(best)


def test_closed_case_counts_change_the_order(kb):
    # 20 closed cases found the surge resistor: p (before renormalising) = dry .125,
    # weak 2.5/30 = .0833, surge .7083; sum .9167 -> .1364, .0909, .7727.
    # p/c: dry .0341, weak .0455, surge .2576 -> surge-test moves from last to first.
    ranked = rank.rank_investigations(kb, "supply.low-b-suspects", "dead-lights-on", FAM,
                                      counts={"supply.open-surge": 20})
    assert [r.target for r in ranked] == ["supply.surge-test", "supply.rectifier-test",
                                          "supply.first-cap-esr"]
    assert ranked[0].p == pytest.approx((21.25 / 30) / ((3.75 + 2.5 + 21.25) / 30))
    assert ranked[0].counts == {"supply.open-surge": 20}


def test_cleared_investigations_drop_and_the_rest_renormalise(kb):
    # With rectifier-test cleared: first-cap .375 and surge .125 -> .75 and .25.
    ranked = rank.rank_investigations(kb, "supply.low-b-suspects", "dead-lights-on", FAM,
                                      cleared=["supply.rectifier-test"], counts={})
    assert [(r.target, r.p) for r in ranked] == [("supply.first-cap-esr", pytest.approx(0.75)),
                                                 ("supply.surge-test", pytest.approx(0.25))]


def test_suspects_target_costs_the_sum_of_its_entries(kb):
    # hum-suspects -> hum-b-suspects (a list): rectifier-test 2 min + first-cap-esr 4 min = 6.
    ranked = rank.rank_investigations(kb, "supply.hum-suspects", "hum-loud", FAM, counts={})
    costs = {r.target: r.cost for r in ranked}
    assert costs == {"supply.first-cap-esr": 4.0, "supply.hum-b-suspects": 6.0}
    # p: first-cap {dry} = 60/70, hum-b {weak, dry} = 1; renormalised 6/13 and 7/13.
    assert {r.target: r.p for r in ranked} == pytest.approx(
        {"supply.first-cap-esr": 6 / 13, "supply.hum-b-suspects": 7 / 13})


def test_audio_order_by_hand(kb):
    # audio.output-suspects: plate-v -> {open-primary} w 15, speaker-click -> {open-voice-coil}
    # w 5; renormalised .75 / .25, costs 2 / 1 min -> ratios .375 and .25.
    ranked = rank.rank_investigations(kb, "audio.output-suspects", "dead-lights-on", FAM, counts={})
    assert [r.target for r in ranked] == ["audio.plate-v", "audio.speaker-click"]
    assert [r.ratio for r in ranked] == pytest.approx([0.75 / 2, 0.25 / 1])


def _tie_knowledge(order):
    """Two checks of equal cost over two faults of equal weight: a true p/c tie."""
    from types import MappingProxyType as M

    from faultwise.graph.knowledge import Knowledge
    from faultwise.graph.nodes import Check, Fault, Investigation, Signature, Suspects, Symptom

    fams = ("series-string",)
    nodes = {"supply.list": Suspects("supply.list", "List", "supply", fams,
                                     tuple(Investigation(t) for t in order))}
    for name in ("supply.a", "supply.b"):
        nodes[name] = Check(name, name, "supply", fams, "", "", 2.0,
                            M({"bad": name + "-fault", "ok": "cleared"}), "ok",
                            choices=M({"bad": "Bad", "ok": "OK"}))
        nodes[name + "-fault"] = Fault(name + "-fault", name, "supply", fams, (), (), (),
                                       Signature(), M({"hum-loud": 10.0}))
    symptoms = {"hum-loud": Symptom("hum-loud", "Hum", fams, M({"series-string": "supply.list"}))}
    return Knowledge(root=KB, nodes=nodes, symptoms=symptoms, cautions={})


def test_ties_keep_written_order():
    # Equal p (.5 each) and equal cost (2 min): the written order decides, both ways round.
    for order in (("supply.a", "supply.b"), ("supply.b", "supply.a")):
        ranked = rank.rank_investigations(_tie_knowledge(order), "supply.list", "hum-loud", FAM,
                                          counts={})
        assert [r.target for r in ranked] == list(order)
        assert ranked[0].ratio == ranked[1].ratio == pytest.approx(0.25)


def test_investigations_for_other_families_are_dropped(kb):
    # audio.output-suspects is a series-string list; its speaker-click check applies to all
    # families, plate-v only to series-string: ranking it for a transistor set keeps one.
    ranked = rank.rank_investigations(kb, "audio.output-suspects", "dead-lights-on",
                                      "transistor", counts={})
    assert [r.target for r in ranked] == ["audio.speaker-click"]


def test_expected_cost_edge_cases():
    assert rank.expected_cost([]) == 0.0
    # A certain first step: the rest is never paid for.
    assert rank.expected_cost([(1.0, 5.0), (0.0, 100.0)]) == pytest.approx(5.0)


def test_dirichlet_means_match_scipy():
    # scipy.stats.dirichlet.mean(alpha) = alpha / sum(alpha): the posterior Dirichlet(alpha + n).
    from scipy.stats import dirichlet

    weights = {"a": 3.0, "b": 1.0, "c": 6.0}
    counts = {"a": 4, "c": 1}
    strength = 5.0
    alpha = [strength * w / 10.0 + counts.get(f, 0) for f, w in weights.items()]
    expected = dirichlet.mean(alpha)
    got = rank.dirichlet_means(weights, counts, strength)
    assert [got[f] for f in weights] == pytest.approx(list(expected))
    assert not math.isnan(sum(got.values()))
