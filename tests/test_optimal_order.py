"""The optimal-order solver against hand-worked cases and brute force.

Sources: for independent single-outcome actions (each check confirms one fault, single fault,
one of them certainly present) ordering by probability over cost is optimal -- the
sequential-search result (Kadane and Simon 1977; the ratio rule of troubleshooting texts,
from memory); the expected cost of an order is sum_k c_k P(no fault found before k).
Random small cases are checked against two independent brute forces: every fixed order of the
checks (an adaptive optimum can only be lower or equal) and a plain recursive search over every
adaptive decision tree (no memo, no pruning: must be equal).
"""

from __future__ import annotations

import itertools
import math

from hypothesis import given, settings
from hypothesis import strategies as st

from faultwise.shop.optimal_order import HEALTHY, Problem, bound, optimal_minutes, policy_minutes


def single_outcome_problem(weights, costs):
    """Check i reads 'found' only when fault i is present; the healthy set reads 'clear' everywhere."""
    faults = [f"f{i}" for i in range(len(weights))]
    ws = {f: float(w) for f, w in zip(faults, weights)}
    ws[HEALTHY] = 0.0
    outcomes = {f"c{i}": {h: ("found" if h == f else "clear") for h in ws}
                for i, f in enumerate(faults)}
    minutes = {f"c{i}": float(c) for i, c in enumerate(costs)}
    return Problem(ws, minutes, outcomes)


def ratio_order_minutes(weights, costs) -> float:
    """sum_k c_k P(not found before k) with the checks in decreasing p/c (the textbook rule)."""
    total = sum(weights)
    order = sorted(range(len(weights)), key=lambda i: -weights[i] / costs[i])
    left, out = 1.0, 0.0
    for i in order:
        out += costs[i] * left
        left -= weights[i] / total
    return out


def test_hand_worked_three_faults():
    # p = 0.5, 0.3, 0.2; c = 4, 1, 2 -> p/c = 0.125, 0.3, 0.1 -> order c1, c0, c2
    # expected minutes = 1 + (1 - 0.3) x 4 + (1 - 0.3 - 0.5) x 2 = 1 + 2.8 + 0.4 = 4.2 (by hand)
    sol = optimal_minutes(single_outcome_problem([5, 3, 2], [4, 1, 2]))
    assert math.isclose(sol.minutes, 4.2)
    assert sol.first == "c1"


@settings(max_examples=60, deadline=None)
@given(st.lists(st.tuples(st.integers(1, 20), st.integers(1, 9)), min_size=1, max_size=6))
def test_single_outcome_actions_ratio_rule_is_optimal(pairs):
    weights, costs = [p for p, _ in pairs], [c for _, c in pairs]
    problem = single_outcome_problem(weights, costs)
    expected = ratio_order_minutes(weights, costs)
    assert math.isclose(optimal_minutes(problem).minutes, expected, rel_tol=1e-9)
    assert math.isclose(optimal_minutes(problem, restrict_singles=True).minutes, expected,
                        rel_tol=1e-9)
    brute = min(policy_minutes(problem, order) for order in itertools.permutations(problem.minutes))
    assert math.isclose(brute, expected, rel_tol=1e-9)


def naive_adaptive(problem: Problem, state: frozenset) -> float:
    """Every adaptive decision tree, recursively, no memo (the brute force)."""
    w = problem.weights
    total = sum(w[h] for h in state)
    if len(state) <= 1 or total <= 0:
        return 0.0
    best = math.inf
    for c, outs in problem.outcomes.items():
        groups: dict = {}
        for h in state:
            groups.setdefault(outs[h], set()).add(h)
        if len(groups) < 2:
            continue
        value = problem.minutes[c] + sum(
            sum(w[h] for h in g) / total * naive_adaptive(problem, frozenset(g))
            for g in groups.values())
        best = min(best, value)
    return 0.0 if best == math.inf else best


@st.composite
def small_problems(draw):
    n = draw(st.integers(2, 5))
    m = draw(st.integers(1, 5))
    hyps = [f"f{i}" for i in range(n)] + [HEALTHY]
    weights = {h: float(draw(st.integers(1, 10))) for h in hyps[:-1]}
    weights[HEALTHY] = 0.0
    outcomes, minutes = {}, {}
    for j in range(m):
        row = {h: draw(st.sampled_from(["normal", "low", "high"])) for h in hyps[:-1]}
        row[HEALTHY] = "normal"
        outcomes[f"c{j}"] = row
        minutes[f"c{j}"] = float(draw(st.integers(1, 6)))
    return Problem(weights, minutes, outcomes)


@settings(max_examples=150, deadline=None)
@given(small_problems())
def test_random_cases_against_brute_force(problem):
    exact = optimal_minutes(problem).minutes
    assert math.isclose(exact, naive_adaptive(problem, frozenset(problem.weights)),
                        rel_tol=1e-9, abs_tol=1e-12)
    fixed = min(policy_minutes(problem, o) for o in itertools.permutations(problem.minutes))
    assert exact <= fixed + 1e-9
    # the restricted search is a real policy: never below the optimum
    assert optimal_minutes(problem, restrict_singles=True).minutes >= exact - 1e-9


def test_bound_falls_back_and_says_so():
    problem = single_outcome_problem(list(range(1, 15)), [1] * 14)
    sol = bound(problem, budget=5)
    assert not sol.exact
    assert math.isclose(sol.minutes, ratio_order_minutes(list(range(1, 15)), [1] * 14))
    small = single_outcome_problem(list(range(1, 8)), [1] * 7)
    assert bound(small).exact


def test_inseparable_faults_are_reported_not_counted():
    ws = {"a": 1.0, "b": 1.0, HEALTHY: 0.0}
    outs = {"c": {"a": "low", "b": "low", HEALTHY: "normal"}}
    sol = optimal_minutes(Problem(ws, {"c": 2.0}, outs))
    assert math.isclose(sol.minutes, 2.0)
    assert sol.inseparable == (("a", "b"),)


def test_a_fault_left_alone_still_needs_its_confirming_check():
    # By hand: faults f1, f2 (weight 1 each) and the healthy set. Check t (1 min) tells all
    # three apart but routes to neither fault; c1 and c2 (3 min each) each route to one.
    # Without confirming checks the optimum is t alone: 1 min. With them, t then the
    # confirming check of whichever fault is left: 1 + 3 = 4 min; c1 first costs
    # 3 + 1/2 x 3 (c2 for f2 or the healthy set) = 4.5. So 4.0, first t.
    ws = {"f1": 1.0, "f2": 1.0, HEALTHY: 0.0}
    outs = {"t": {"f1": "x", "f2": "y", HEALTHY: "n"},
            "c1": {"f1": "bad", "f2": "ok", HEALTHY: "ok"},
            "c2": {"f1": "ok", "f2": "bad", HEALTHY: "ok"}}
    minutes = {"t": 1.0, "c1": 3.0, "c2": 3.0}
    assert math.isclose(optimal_minutes(Problem(ws, minutes, outs)).minutes, 1.0)
    sol = optimal_minutes(Problem(ws, minutes, outs, {"f1": frozenset({"c1"}),
                                                      "f2": frozenset({"c2"})}))
    assert math.isclose(sol.minutes, 4.0)
    assert sol.first == "t"


def test_the_complaint_opening_is_asked_first_and_the_free_optimum_kept():
    # Same three faults as the hand-worked case (free optimum 4.2, by hand). An opening that
    # splits nothing (a listening test every fault answers alike) costs its 3 minutes on top:
    # 3 + 4.2 = 7.2. An opening of 1 minute that names fault 0 apart from the others: 1 +
    # (0.5 x 0 + 0.5 x V({f1, f2})), V({f1, f2}) = p/c over c1 (0.6/1) then c2: 1 + 0.4 x 2 = 1.8,
    # so 1 + 0.5 x 1.8 = 1.9, while the free optimum stays 4.2 (by hand).
    from dataclasses import replace

    base = single_outcome_problem([5, 3, 2], [4, 1, 2])
    flat = replace(base, minutes={**base.minutes, "open": 3.0},
                   outcomes={**base.outcomes, "open": {h: "same" for h in base.weights}},
                   opening="open")
    sol = bound(flat)
    assert math.isclose(sol.minutes, 7.2) and sol.first == "open"
    assert math.isclose(sol.free_minutes, 4.2)
    split = replace(base, minutes={**base.minutes, "open": 1.0},
                    outcomes={**base.outcomes,
                              "open": {h: ("a" if h == "f0" else "b") for h in base.weights}},
                    opening="open")
    sol = bound(split)
    assert math.isclose(sol.minutes, 1.9) and sol.first == "open"
