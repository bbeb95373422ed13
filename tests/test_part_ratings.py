"""Replacement filter-capacitor ratings computed from the set, and shown in the repair text.

Outside references: peak = sqrt(2) x RMS (any electrical text; REFERENCES "Mains"); the top
of the line band: 126 V for 120 V (ANSI C84.1 Range A, 2nd) and 253 V for 230 V (IEC 60038
+10 %, 2nd); the 5Y3GT allows at most 20 uF as first filter capacitor (tube data, 2nd, in
REFERENCES "Rectifier and filter"). The 20 % margin and the 10 % no-load rise of a small
power transformer are common practice, no source. The peak is recomputed here from the
profile, not read back from the code.
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from faultwise.calc.ratings import ELECTROLYTIC_RATINGS_V, filter_cap_rating, next_rating_v
from faultwise.expect.expected import expect
from faultwise.graph.knowledge import load_knowledge
from faultwise.graph.node_text import fill, for_set
from faultwise.profile.load import load_profile
from faultwise.walk.scripted import auto_walk
from faultwise.core.workspace import bundled_knowledge_dir

KNOWLEDGE = bundled_knowledge_dir()
SETS = sorted((KNOWLEDGE / "sets").glob("*.yaml"))
LINE_TOP = {120: 126.0, 230: 253.0}   # ANSI C84.1 Range A; IEC 60038 +10 %
MARGIN = 1.2                          # common practice, no source
NO_LOAD_RISE = 1.1                    # small power transformer, common practice, no source


def _no_load_peak(profile) -> float:
    top = LINE_TOP[int(profile.mains_v)]
    if profile.family == "series-string":
        return math.sqrt(2) * top
    return math.sqrt(2) * profile.supply.secondary_v * top / profile.mains_v * NO_LOAD_RISE


@pytest.mark.parametrize("path", SETS, ids=lambda p: p.stem)
def test_rating_for_each_demo_set_covers_its_no_load_peak_times_the_margin(path: Path):
    profile = load_profile(path)
    exp = expect(profile)
    if not profile.line_powered:
        assert "parts.filter_cap_v" not in exp
        return
    rating = exp["parts.filter_cap_v"]
    need = _no_load_peak(profile) * MARGIN
    assert rating.nominal >= need
    assert rating.nominal in ELECTROLYTIC_RATINGS_V
    # the next rating down would not do: the rounding is "up to the next", not a flat guess
    lower = [r for r in ELECTROLYTIC_RATINGS_V if r < rating.nominal]
    assert not lower or lower[-1] < need
    # the old advice of 160 V is not enough even on a 120 V series-string set (peak 178 V)
    assert rating.nominal > 160
    assert "no-load peak" in rating.basis


def test_transformer_console_needs_500_v_and_at_most_20_uf():
    """250 V each half, 126 V line: sqrt(2) x 262.5 x 1.1 = 408 V; x 1.2 = 490 V -> 500 V."""
    exp = expect(load_profile(KNOWLEDGE / "sets" / "demo-6v-console.yaml"))
    assert exp["parts.filter_cap_v"].nominal == 500
    assert exp["parts.first_cap_max_uf"].nominal == 20     # 5Y3GT, tube data (2nd)


def test_rating_calc_against_hand_arithmetic():
    r = filter_cap_rating(126.0)                 # 120 V series set at the top of Range A
    assert r.peak_v == pytest.approx(178.19, abs=0.01)
    assert r.required_v == pytest.approx(213.8, abs=0.1)
    assert r.rating_v == 250
    assert next_rating_v(160) == 160 and next_rating_v(160.1) == 200
    with pytest.raises(ValueError):
        next_rating_v(700)


def test_placeholder_fallback_when_the_profile_cannot_compute_it():
    assert fill("at least {parts.filter_cap_v|the original rating}", {}) == \
        "at least the original rating"


def test_repair_step_of_the_walk_shows_the_rating_for_this_set():
    """The shorted first filter capacitor, walked on the transformer console, says 500 V."""
    k = load_knowledge(KNOWLEDGE)
    fault = k.nodes["supply.shorted-first-filter-cap"]
    profile = load_profile(KNOWLEDGE / "sets" / "demo-6v-console.yaml")
    sig = fault.signature
    result = auto_walk(k, profile, "smoke-or-overheat", dict(sig.readings),
                       dict(sig.observations))
    assert result.conclusion is not None and result.conclusion.id == fault.id
    text = " ".join(result.conclusion.repair + result.conclusion.parts)
    assert "at least 500 V" in text and "at most 20 uF" in text
    assert "{" not in text
    series = for_set(fault, "series-string",
                     expect(load_profile(KNOWLEDGE / "sets" / "demo-5-tube-table.yaml")))
    assert "at least 250 V" in " ".join(series.parts)


def test_job_report_repair_steps_show_the_rating_for_the_case_set():
    from faultwise.profile.model import profile_to_dict
    from faultwise.report.job import job_report

    k = load_knowledge(KNOWLEDGE)
    profile = profile_to_dict(load_profile(KNOWLEDGE / "sets" / "demo-6v-console.yaml"))
    case = {"id": "20260101-B1-001", "family": "transformer", "symptom": "hum-loud",
            "set": {"profile": profile, "source": "demo-6v-console.yaml"},
            "conclusion": {"fault": "supply.open-first-filter-cap",
                           "title": "Dried-out first filter capacitor", "stage": "supply"},
            "events": []}
    report = job_report(case, k)
    text = " ".join(report.repair)
    assert "at least 500 V" in text and "at most 20 uF" in text
