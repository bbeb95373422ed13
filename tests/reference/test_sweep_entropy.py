"""The sweep's entropy in bits against SciPy's ``scipy.stats.entropy(p, base=2)`` (the oracle).

scipy.stats.entropy normalises p to sum 1 and computes -sum p log(p) in the given base
(SciPy reference documentation, scipy.stats.entropy).
"""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.stats import entropy as scipy_entropy

from faultwise.graph.knowledge import load_knowledge
from faultwise.walk.rank import fault_probabilities
from faultwise.shop.sweep import entropy_bits, load_demo_sets, renormalised, run_sweep

FIXTURE = Path(__file__).resolve().parents[1] / "fixtures" / "kb_sweep"


@pytest.mark.parametrize("p", [
    [0.5, 0.5],                      # 1 bit
    [0.25] * 4,                      # 2 bits
    [0.5, 0.3, 0.2],
    [50, 30, 20],                    # unnormalised weights: both normalise
    [0.9, 0.05, 0.03, 0.02],
    [1.0],                           # certain: 0 bits
    [0.7, 0.0, 0.3],                 # a zero term contributes nothing
])
def test_entropy_matches_scipy(p):
    assert entropy_bits(p) == pytest.approx(float(scipy_entropy(p, base=2)), abs=1e-12)


@settings(max_examples=200, deadline=None)
@given(st.lists(st.floats(min_value=0.0, max_value=1e6, allow_nan=False), min_size=1,
                max_size=30).filter(lambda xs: sum(xs) > 1e-9))
def test_entropy_matches_scipy_on_any_weights(weights):
    assert entropy_bits(weights) == pytest.approx(float(scipy_entropy(weights, base=2)),
                                                  rel=1e-9, abs=1e-9)


def test_pair_entropy_is_scipy_over_the_renormalised_priors():
    kb = load_knowledge(FIXTURE)
    report = run_sweep(kb, load_demo_sets(FIXTURE / "sets", FIXTURE), baselines=False)
    assert report.pairs
    for pair in report.pairs:
        probs = fault_probabilities(kb, pair.symptom, pair.family)
        swept = sorted({w.fault for w in report.walks if w.symptom == pair.symptom})
        p = list(renormalised(probs, swept).values())
        assert pair.entropy_bits == pytest.approx(float(scipy_entropy(p, base=2)), abs=1e-12)
