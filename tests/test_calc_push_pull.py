"""Push-pull output pairs (faultwise.calc.push_pull, faultwise.expect.output_pair).

Hand-worked examples from the diode law and the Thevenin divider (textbooks), and the rule
the issue sets: a pair with its bias network opened reads absent or low on idle current and
base voltage, a healthy pair reads normal (through the walk's own classify()).
"""

from __future__ import annotations

import math
from dataclasses import replace
from pathlib import Path

import pytest

from faultwise.calc import push_pull as pp
from faultwise.expect import expect
from faultwise.profile import load_profile
from faultwise.walk import classify

SETS = Path(__file__).resolve().parents[1] / "knowledge" / "sets"


def test_junction_law_60_mv_per_decade():
    # Shockley: n Vt ln(10) = 59.6 mV per decade at 27 degC (textbooks)
    assert pp.junction_v(10.0, 0.6) - pp.junction_v(1.0, 0.6) == pytest.approx(0.0596, abs=5e-4)


def test_transformer_pair_hand_worked():
    # hand-worked: 9 V, 3.3k / 100 ohm -> Vth = 0.2647 V, Rth = 97.06 ohm; beta 60, Re 10 ohm,
    # Vbe(1 mA) = 0.25 V. Try Ic = 1.035 mA: 0.25 + 0.025865 ln 1.035 = 0.2509; Ie Re =
    # 1.035 x 61/60 x 0.01 = 0.0105; 2 Ib Rth = 2 x 1.035/60 x 0.09706 = 0.0033; sum 0.2647.
    r = pp.transformer_pair(9.0, 3300.0, 100.0, 10.0, 60.0, 0.25)
    assert r.ic_ma == pytest.approx(1.035, rel=0.01)
    assert r.idle_ma == pytest.approx(2 * r.ic_ma)
    assert r.bases_v == pytest.approx(9.0 * 100 / 3400 - 2 * r.ic_ma / 60 * 0.09706, rel=1e-3)


def test_transformer_pair_bias_open_or_shorted_has_no_idle():
    assert pp.transformer_pair(9.0, math.inf, 100.0, 10.0, 60.0, 0.25).idle_ma == 0.0
    assert pp.transformer_pair(9.0, 3300.0, 0.0, 10.0, 60.0, 0.25).idle_ma == 0.0


def test_complementary_pair_hand_worked():
    # hand-worked: 6 V, load 1.2k: Id = (3 - 0.65)/1.2k = 1.958 mA; each diode 0.65 + Vt ln 4
    # + Vt ln 1.958 = 0.7032 V, base to base 1.4064 V; with Re = 0 each transistor sits at
    # 0.7032 V, i.e. Ic = 4 x Id = 7.83 mA (the junction area ratio)
    r = pp.complementary_pair(6.0, 1200.0, 2, 0.0, 100.0, 0.65, 0.65 + pp.THERMAL_V * math.log(4))
    assert r.driver_ma == pytest.approx(2.35 / 1.2, rel=1e-3)
    assert r.bases_v == pytest.approx(1.4064, abs=2e-3)
    assert r.ic_ma == pytest.approx(4 * r.driver_ma, rel=1e-3)
    assert r.midpoint_v == 3.0
    # emitter resistors take part of the bias: less idle current
    assert pp.complementary_pair(6.0, 1200.0, 2, 2.2, 100.0, 0.65, 0.686).ic_ma < r.ic_ma
    # bias diodes shorted: no base-to-base voltage, no idle current
    assert pp.complementary_pair(6.0, 1200.0, 0, 2.2, 100.0, 0.65, 0.686).idle_ma == 0.0


@pytest.mark.parametrize("stage", ["push-pull-transformer", "complementary"])
def test_open_bias_reads_absent_healthy_reads_normal(stage):
    from faultwise.expect.context import Context
    from faultwise.expect.output_pair import pair_model

    for name in ("demo-ge-pnp-portable.yaml", "demo-si-npn-portable.yaml"):
        p = replace(load_profile(SETS / name), output_stage=stage)
        exp = expect(p)
        fn, sp, _, _ = pair_model(Context(p, None))
        healthy = fn(**{k: s.nominal for k, s in sp.items()})
        if stage == "push-pull-transformer":
            opened = fn(**{k: s.nominal for k, s in sp.items()} | {"top_ohm": math.inf})
        else:
            opened = fn(**{k: s.nominal for k, s in sp.items()} | {"load_ohm": math.inf})
        assert classify(healthy.idle_ma, exp["bias.output.idle_ma"]) == "normal"
        assert classify(healthy.bases_v, exp["bias.output.bases_v"]) == "normal"
        assert classify(opened.idle_ma, exp["bias.output.idle_ma"]) in ("absent", "low")
        assert classify(opened.bases_v, exp["bias.output.bases_v"]) in ("absent", "low")
        assert exp["bias.output.idle_ma"].low > 0.0     # the band excludes zero
        if stage == "complementary":
            mid = exp["bias.output.midpoint_v"]
            assert mid.low < p.battery_v / 2 < mid.high


@pytest.mark.parametrize("stage", ["push-pull-transformer", "complementary"])
def test_an_underbiased_pair_reads_low_not_normal(stage):
    """A pair idling at a tenth of its design current crosses over with a notch (Oliver's
    condition, about Vt across each emitter resistor, HP Journal 1971, from memory): the
    worst-case corners of a plain divider reach near zero, but the band must not call that
    normal. The floor is Vt / 4 across the emitter resistor, at most half the nominal."""
    from faultwise.calc.push_pull import THERMAL_V
    from faultwise.expect.output_pair import UNDERBIAS_FRACTION

    for name in ("demo-ge-pnp-portable.yaml", "demo-si-npn-portable.yaml"):
        p = replace(load_profile(SETS / name), output_stage=stage)
        exp = expect(p)
        idle, ic = exp["bias.output.idle_ma"], exp["bias.output.ic_ma"]
        assert classify(idle.nominal / 10.0, idle) in ("low", "absent")
        assert classify(ic.nominal / 10.0, ic) in ("low", "absent")
        re = p.transistor("output").bias.emitter_ohm
        floor = min(UNDERBIAS_FRACTION * THERMAL_V / re * 1000.0, ic.nominal / 2.0)
        assert ic.low >= floor * (1 - 1e-9)
        if ic.low == pytest.approx(floor):          # the floor, not the corners, set it
            assert "crossover" in idle.basis and "Vt / 4" in idle.basis


def test_the_standby_current_floor_counts_the_pair_idling_at_least_its_floor(monkeypatch):
    # The set's no-signal current sums each stage's collector current (common practice, no
    # source); a working pair idles at least the underbias floor, so the standby band's low end
    # counts the pair at that floor, not at the near-zero worst-case corner. Without the floor
    # (fraction 0) the same sum is taken with the corner: the two low ends differ by exactly
    # floor - corner.
    from faultwise.expect import output_pair

    for name in ("demo-ge-pnp-portable.yaml", "demo-si-npn-portable.yaml"):
        profile = load_profile(SETS / name)
        floored = expect(profile)
        with monkeypatch.context() as m:
            m.setattr(output_pair, "UNDERBIAS_FRACTION", 0.0)
            corner = expect(profile)
        floor, low = floored["bias.output.idle_ma"].low, corner["bias.output.idle_ma"].low
        assert floor > low
        assert floored["supply.standby_ma"].low == pytest.approx(
            corner["supply.standby_ma"].low - low + floor)
