"""Tuned circuits, superhet frequencies and padder tracking against worked examples
(REFERENCES.md: amateur handbooks, a school physics textbook, receiver and
communication-engineering textbooks)."""

from __future__ import annotations

import pytest

from faultwise.calc import tuning as tu


def test_lc_resonance_worked_examples():
    # school physics textbook exercise: 200 uH tunes 800-1200 kHz with 198 pF to 88.0 pF
    assert tu.resonant_khz(200, 198) == pytest.approx(800, rel=2e-3)
    assert tu.resonant_khz(200, 88.0) == pytest.approx(1200, rel=2e-3)
    assert tu.capacitance_pf(800, 200) == pytest.approx(198, rel=2e-3)
    assert tu.capacitance_pf(1200, 200) == pytest.approx(88.0, rel=2e-3)
    # amateur exam pool: 50 uH with 40 pF -> 3.56 MHz
    assert tu.resonant_khz(50, 40) == pytest.approx(3560, rel=1e-3)
    # 10 mH with 0.005 uF -> 22.5 kHz
    assert tu.resonant_khz(10_000, 5000) == pytest.approx(22.5, rel=1e-3)
    # f0 = 2 MHz with 50 pF needs 126.7 uH
    assert tu.inductance_uh(2000, 50) == pytest.approx(126.7, rel=1e-3)


def test_handbook_form_of_the_inductance_formula():
    # amateur handbooks: L(uH) C(pF) = 25330 / f(MHz)^2
    for f_khz, c_pf in ((540, 380), (1000, 100), (2105, 95)):
        assert tu.inductance_uh(f_khz, c_pf) == pytest.approx(25330 / ((f_khz / 1000) ** 2 * c_pf),
                                                              rel=1e-4)


def test_capacitance_ratio_examples():
    # (f_hi/f_lo)^2: 530-1600 kHz -> 9.12 (secondary source, which rounds 9.114 up); 540-1600 -> 8.78
    assert tu.cap_ratio(530, 1600) == pytest.approx(9.12, abs=0.01)
    assert tu.cap_ratio(540, 1600) == pytest.approx(8.78, abs=0.005)


def test_lo_and_image_examples():
    # receiver textbooks: 1000 kHz with a 455 kHz IF -> LO 1455, image 1910; 555 -> image 1465
    assert tu.lo_khz(1000, 455) == 1455
    assert tu.image_khz(1000, 455) == 1910
    assert tu.image_khz(555, 455) == 1465


def test_image_rejection_example():
    # communication-engineering textbook: 1000 kHz, IF 455, Q 80 -> rho = 1.386, alpha ~ 111
    r = tu.image_rejection(1000, 455, 80)
    assert r.image_khz == 1910
    assert r.rho == pytest.approx(1.386, abs=5e-4)
    assert r.alpha == pytest.approx(111, abs=0.5)


def test_two_point_padder_example():
    # textbook example: signal 400-1650 kHz, IF 455, gang max 300 pF
    # -> oscillator 855-2105 kHz, padder 138.6 pF, oscillator coil 365.5 uH
    d = tu.padder_design(400, 1650, 455, 300)
    assert (d.osc_low_khz, d.osc_high_khz) == (855, 2105)
    assert d.padder_pf == pytest.approx(138.6, abs=0.05)
    assert d.osc_uh == pytest.approx(365.5, abs=0.05)


def test_two_point_design_tracks_exactly_at_the_band_ends():
    # definition of two-point tracking: zero error at both ends, nonzero between
    d = tu.padder_design(540, 1600, 455, 380)
    curve = tu.tracking_error_curve(d.antenna_uh, d.osc_uh, d.padder_pf, 455, d.c_min_pf, d.c_max_pf)
    assert curve[0].signal_khz == pytest.approx(540)
    assert curve[-1].signal_khz == pytest.approx(1600)
    assert abs(curve[0].error_khz) < 0.01 and abs(curve[-1].error_khz) < 0.01
    assert tu.max_tracking_error_khz(curve) > 1.0


def test_three_point_design_is_exact_at_its_three_points_and_better_inside():
    # classic designers' handbooks (memory): padder + trimmer track exactly at three points
    three = tu.three_point_design(540, 1600, 455, 380)
    two = tu.padder_design(540, 1600, 455, 380)
    for f in three.points_khz:
        c = tu.capacitance_pf(f, three.antenna_uh)
        fo = tu.resonant_khz(three.osc_uh, tu.series_pf(c + three.trimmer_pf, three.padder_pf))
        assert fo - f - 455 == pytest.approx(0, abs=1e-3)
    inner = lambda curve: max(abs(p.error_khz) for p in curve
                              if three.points_khz[0] <= p.signal_khz <= three.points_khz[-1])
    c3 = tu.tracking_error_curve(three.antenna_uh, three.osc_uh, three.padder_pf, 455,
                                 two.c_min_pf, two.c_max_pf, three.trimmer_pf)
    c2 = tu.tracking_error_curve(two.antenna_uh, two.osc_uh, two.padder_pf, 455,
                                 two.c_min_pf, two.c_max_pf)
    assert inner(c3) < inner(c2) / 3


def test_alignment_points_rule():
    # common practice, no source: 600 and 1400 kHz for the 540-1600 kHz band
    assert tu.alignment_points_khz(540, 1600) == (600, 1400)
    assert tu.alignment_points_khz(530, 1600) == (600, 1400)
    lo, hi = tu.alignment_points_khz(150, 350)
    assert 150 < lo < hi < 350
