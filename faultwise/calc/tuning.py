"""Tuned circuits, the superhet's oscillator and image, and padder tracking."""

from __future__ import annotations

import math
from dataclasses import dataclass

TWO_PI = 2.0 * math.pi


def resonant_khz(l_uh: float, c_pf: float) -> float:
    """f = 1 / (2 pi sqrt(L C)) (any circuits text)."""
    return 1.0 / (TWO_PI * math.sqrt(l_uh * 1e-6 * c_pf * 1e-12)) / 1e3


def inductance_uh(f_khz: float, c_pf: float) -> float:
    """L = 1 / ((2 pi f)^2 C); in handbook units L(uH) = 25330 / (f(MHz)^2 C(pF))."""
    return 1.0 / ((TWO_PI * f_khz * 1e3) ** 2 * c_pf * 1e-12) * 1e6


def capacitance_pf(f_khz: float, l_uh: float) -> float:
    """C = 1 / ((2 pi f)^2 L)."""
    return 1.0 / ((TWO_PI * f_khz * 1e3) ** 2 * l_uh * 1e-6) * 1e12


def cap_ratio(low_khz: float, high_khz: float) -> float:
    """Capacitance ratio a tuned circuit must cover: (f_high / f_low)^2 (f ~ 1/sqrt(C))."""
    return (high_khz / low_khz) ** 2


def lo_khz(signal_khz: float, if_khz: float) -> float:
    """High-side local oscillator: f_LO = f_s + f_IF (receiver textbooks)."""
    return signal_khz + if_khz


def image_khz(signal_khz: float, if_khz: float) -> float:
    """Image with a high-side oscillator: f_s + 2 f_IF (receiver textbooks)."""
    return signal_khz + 2.0 * if_khz


@dataclass(frozen=True)
class ImageRejection:
    """rho = f_i/f_s - f_s/f_i and alpha = sqrt(1 + Q^2 rho^2) for one tuned circuit."""

    image_khz: float
    rho: float
    alpha: float


def image_rejection(signal_khz: float, if_khz: float, q: float) -> ImageRejection:
    """alpha = sqrt(1 + Q^2 rho^2), rho = f_i/f_s - f_s/f_i (communication-engineering textbooks)."""
    fi = image_khz(signal_khz, if_khz)
    rho = fi / signal_khz - signal_khz / fi
    return ImageRejection(fi, rho, math.sqrt(1.0 + (q * rho) ** 2))


def series_pf(a_pf: float, b_pf: float) -> float:
    """Two capacitors in series: a b / (a + b)."""
    return a_pf * b_pf / (a_pf + b_pf)


@dataclass(frozen=True)
class PadderDesign:
    """Two-point tracking with a series padder: exact at both band ends."""

    band_low_khz: float
    band_high_khz: float
    if_khz: float
    c_max_pf: float         # gang maximum plus stray, same on both sections
    c_min_pf: float         # effective minimum (trimmed) that makes the signal circuit cover the band
    antenna_uh: float
    padder_pf: float
    osc_uh: float
    osc_low_khz: float
    osc_high_khz: float


def padder_design(band_low_khz: float, band_high_khz: float, if_khz: float,
                  c_max_pf: float) -> PadderDesign:
    """Two-point padder design (radio designers' textbooks).

    Signal circuit: C_min = C_max / (f_hi/f_lo)^2 (trimmed so the gang covers the band),
    L_ant from f_lo with C_max. Oscillator (same gang, series padder Cp): its capacitance ratio
    must be q = ((f_hi+IF)/(f_lo+IF))^2 while the gang gives r = C_max/C_min, so
    r (C_min + Cp)/(C_max + Cp) = q gives Cp = C_max (q - 1)/(r - q); L_osc from f_lo + IF
    with C_max in series with Cp.
    """
    r = cap_ratio(band_low_khz, band_high_khz)
    osc_lo, osc_hi = lo_khz(band_low_khz, if_khz), lo_khz(band_high_khz, if_khz)
    q = cap_ratio(osc_lo, osc_hi)
    c_min = c_max_pf / r
    padder = c_max_pf * (q - 1.0) / (r - q)
    l_osc = inductance_uh(osc_lo, series_pf(c_max_pf, padder))
    return PadderDesign(band_low_khz, band_high_khz, if_khz, c_max_pf, c_min,
                        inductance_uh(band_low_khz, c_max_pf), padder, l_osc, osc_lo, osc_hi)


@dataclass(frozen=True)
class TrackingPoint:
    """At one gang setting: signal frequency, oscillator frequency, error = osc - signal - IF."""

    gang_pf: float
    signal_khz: float
    osc_khz: float
    error_khz: float


def tracking_error_curve(antenna_uh: float, osc_uh: float, padder_pf: float, if_khz: float,
                         c_min_pf: float, c_max_pf: float, trimmer_pf: float = 0.0,
                         points: int = 41) -> tuple[TrackingPoint, ...]:
    """Oscillator tracking error across the gang's travel: f_osc - f_signal - IF.

    Both sections swing C from c_min to c_max; the oscillator section adds ``trimmer_pf``
    and has ``padder_pf`` in series. Points are spaced evenly in signal frequency.
    """
    f_lo, f_hi = resonant_khz(antenna_uh, c_max_pf), resonant_khz(antenna_uh, c_min_pf)
    out = []
    for k in range(points):
        fs = f_lo + (f_hi - f_lo) * k / (points - 1)
        c = capacitance_pf(fs, antenna_uh)
        fo = resonant_khz(osc_uh, series_pf(c + trimmer_pf, padder_pf))
        out.append(TrackingPoint(c, fs, fo, fo - fs - if_khz))
    return tuple(out)


def max_tracking_error_khz(curve: tuple[TrackingPoint, ...]) -> float:
    """Largest |error| along a tracking curve."""
    return max(abs(p.error_khz) for p in curve)


def alignment_points_khz(band_low_khz: float, band_high_khz: float) -> tuple[float, float]:
    """Padder and trimmer points: a tenth above the low end and an eighth below the top, rounded.

    The step is 5 x 10^(n-2) for a top frequency of n digits (50 kHz for a broadcast band).
    The trade's rule of thumb: for 540-1600 kHz this gives 600 and 1400 kHz (common practice).
    """
    step = 5.0 * 10.0 ** (math.floor(math.log10(band_high_khz)) - 2)

    def rounded(x: float) -> float:
        return step * math.floor(x / step + 0.5)

    return rounded(band_low_khz * 1.1), rounded(band_high_khz * 0.875)


@dataclass(frozen=True)
class ThreePointDesign:
    """Padder plus oscillator trimmer chosen so the oscillator tracks exactly at three points."""

    points_khz: tuple[float, float, float]
    antenna_uh: float
    padder_pf: float
    trimmer_pf: float
    osc_uh: float


def _osc_mismatch(cp: float, ct: float, cs: tuple[float, ...],
                  fos: tuple[float, ...]) -> tuple[float, float]:
    """Relative mismatch of L_osc implied at the outer points against the middle one."""
    ls = [1.0 / (series_pf(c + ct, cp) * f * f) for c, f in zip(cs, fos)]
    return ls[0] / ls[1] - 1.0, ls[2] / ls[1] - 1.0


def three_point_design(band_low_khz: float, band_high_khz: float, if_khz: float, c_max_pf: float,
                       points_khz: tuple[float, float, float] | None = None) -> ThreePointDesign:
    """Three-point tracking (classic designers' handbooks, from memory): padder, trimmer, L_osc
    such that f_osc = f_s + IF exactly at three points (default: the alignment points and their
    mean). Solved by Newton's method on (padder, trimmer), started from the two-point padder."""
    two = padder_design(band_low_khz, band_high_khz, if_khz, c_max_pf)
    if points_khz is None:
        lo, hi = alignment_points_khz(band_low_khz, band_high_khz)
        points_khz = (lo, (lo + hi) / 2.0, hi)
    cs = tuple(capacitance_pf(f, two.antenna_uh) for f in points_khz)
    fos = tuple(f + if_khz for f in points_khz)
    cp, ct = two.padder_pf, 0.0
    for _ in range(50):
        e1, e2 = _osc_mismatch(cp, ct, cs, fos)
        if abs(e1) < 1e-12 and abs(e2) < 1e-12:
            break
        hp, ht = 1e-6 * cp, 1e-6 * max(abs(ct), 1.0)
        a1, a2 = _osc_mismatch(cp + hp, ct, cs, fos)
        b1, b2 = _osc_mismatch(cp, ct + ht, cs, fos)
        j11, j21, j12, j22 = (a1 - e1) / hp, (a2 - e2) / hp, (b1 - e1) / ht, (b2 - e2) / ht
        det = j11 * j22 - j12 * j21
        cp -= (e1 * j22 - e2 * j12) / det
        ct -= (j11 * e2 - j21 * e1) / det
    l_osc = inductance_uh(fos[1], series_pf(cs[1] + ct, cp))
    return ThreePointDesign(tuple(points_khz), two.antenna_uh, cp, ct, l_osc)


DIAL_TOL = 0.02
"""A dial reading counts as calibrated within +-2 % of the frequency (common practice, no source)."""
ANTENNA_Q = 100.0
"""Loaded Q of a broadcast antenna circuit (loop or ferrite rod): about 100 (trade)."""
