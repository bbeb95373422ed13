"""The corner evaluator and the tolerance rules."""

from __future__ import annotations

import itertools
from dataclasses import dataclass

import pytest

from faultwise.calc import tolerance as t


def test_corners_are_the_full_product_of_ends():
    spreads = {"a": t.relative(10, 0.1), "b": t.fixed(3), "c": t.electrolytic_uf(50)}
    cs = t.corners(spreads)
    assert len(cs) == 4          # fixed inputs add no corners
    assert {(c["a"], c["c"]) for c in cs} == set(itertools.product((9, 11), (40, 75)))
    assert all(c["b"] == 3 for c in cs)


def test_worst_case_of_a_monotone_formula_is_analytic():
    # Ohm's law I = V/R: lowest at low V and high R, highest at high V and low R
    b = t.worst_case(lambda v, r: v / r, {"v": t.relative(120, 0.05), "r": t.resistor_ohm(1000)})
    assert b.nominal == pytest.approx(0.12)
    assert b.low == pytest.approx(114 / 1100)
    assert b.high == pytest.approx(126 / 900)


def test_worst_case_fields():
    @dataclass(frozen=True)
    class R:
        s: float
        d: float
        flag: bool

    bands = t.worst_case_fields(lambda x, y: R(x + y, x - y, x > y),
                                {"x": t.relative(10, 0.1), "y": t.relative(4, 0.5)})
    assert set(bands) == {"s", "d"}     # booleans are not banded
    assert (bands["s"].low, bands["s"].high) == pytest.approx((11, 17))
    assert (bands["d"].low, bands["d"].high) == pytest.approx((3, 9))


def test_rules_follow_their_sources():
    # IEC 60062 silver band: +-10 % (old carbon composition, trade assumption)
    r = t.resistor_ohm(4700)
    assert (r.low, r.high) == pytest.approx((4230, 5170))
    # electrolytics -20/+50 % (trade)
    c = t.electrolytic_uf(50)
    assert (c.low, c.high) == pytest.approx((40, 75))
    # textbooks: Vbe silicon 0.6-0.7 V, germanium 0.2-0.3 V
    assert (t.vbe_v("silicon").low, t.vbe_v("silicon").high) == (0.6, 0.7)
    assert (t.vbe_v("germanium").low, t.vbe_v("germanium").high) == (0.2, 0.3)
    # trade: beta 0.5x-2x of the stated value; heaters +-10 % (tube handbooks)
    assert (t.beta(80).low, t.beta(80).high) == (40, 160)
    assert (t.heater(12.6).low, t.heater(12.6).high) == pytest.approx((11.34, 13.86))
