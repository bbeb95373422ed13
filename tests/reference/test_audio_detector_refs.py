"""Output stage, speaker, IF and detector formulas against worked examples (REFERENCES.md)."""

from __future__ import annotations

import math

import pytest

from faultwise.calc import audio, detector


def test_reflected_impedance_examples():
    # Zp = (Np/Ns)^2 Zs (amateur exam pool): 600 ohm to 4 ohm needs 12.2:1
    assert audio.turns_ratio_for(600, 4) == pytest.approx(12.2, abs=0.05)
    # 20:1 with 8 ohm reflects 3.2 kohm
    assert audio.reflected_ohm(20, 8) == pytest.approx(3200)


def test_cathode_bias_example():
    # textbook: Vk = Ik Rk, 68 ohm x 13 mA = 0.884 V
    assert audio.cathode_v(13, 68) == pytest.approx(0.884)


def test_voice_coil_and_speaker_fractions():
    # trade (common practice, no source): voice-coil DC resistance 0.7-0.8 x rated
    assert audio.VOICE_COIL_DC_LOW == 0.7 and audio.VOICE_COIL_DC_HIGH == 0.8
    assert 0.7 * 8 <= audio.voice_coil_ohm(8) <= 0.8 * 8
    # IEC 60268-5: impedance in the working band not below 80 % of rated
    assert audio.SPEAKER_MIN_FRACTION == 0.8


def test_if_bandwidth_example():
    # B = f0/Q (secondary source): 5 MHz at Q 18.85 -> 265 kHz
    assert detector.if_bandwidth_khz(5000, 18.85) == pytest.approx(265, abs=0.5)


def test_if_q_range_gives_the_trade_bandwidth():
    # trade: broadcast IF strips pass about 6-10 kHz overall; our loaded-Q range at 455 kHz
    lo, _, hi = detector.IF_Q
    assert 6 <= detector.if_bandwidth_khz(455, hi) < detector.if_bandwidth_khz(455, lo) <= 10.2


def test_detector_modulation_examples():
    # communication textbooks: RC <= sqrt(1 - m^2)/(omega_m m)
    # R = 1 kohm, C = 10 nF, f_m = 10 kHz -> m_max = 0.847
    tau = detector.time_constant_us(1e3, 10e3)
    assert tau == pytest.approx(10.0)
    assert detector.max_modulation(tau, 10e3) == pytest.approx(0.847, abs=5e-4)
    # C = 1 nF, R = 50 kohm: f_m = 1 kHz -> 0.954, 5 kHz -> 0.537
    tau = detector.time_constant_us(50e3, 1e3)
    assert detector.max_modulation(tau, 1e3) == pytest.approx(0.954, abs=5e-4)
    assert detector.max_modulation(tau, 5e3) == pytest.approx(0.537, abs=5e-4)


def test_detector_limits_are_consistent():
    # the same inequality read three ways must agree
    tau = 47.0
    m = detector.max_modulation(tau, 3000)
    assert detector.rc_limit_us(3000, m) == pytest.approx(tau, rel=1e-9)
    assert detector.max_audio_hz(tau, m) == pytest.approx(3000, rel=1e-9)
    # lower limit: RC >> 1/omega_c; at 455 kHz 1/(2 pi f) = 0.35 us
    assert detector.carrier_limit_us(455) == pytest.approx(1e6 / (2 * math.pi * 455e3))
    assert detector.time_constant_us(detector.TUBE_LOAD_OHM, detector.TUBE_LOAD_PF) > \
        20 * detector.carrier_limit_us(455)
