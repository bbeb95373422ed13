"""Expectations for tuning and the antenna: oscillator and image frequencies, coils, tracking."""

from __future__ import annotations

from faultwise.expect.context import Context, basis_num as _n


def add_tuning(ctx: Context) -> None:
    from faultwise.calc import tuning as tu
    from faultwise.calc.detector import IF_ALIGN_TOL
    from faultwise.calc.tolerance import GANG_TOL, STRAY_TOL, relative, worst_case

    p = ctx.p
    lo_f, hi_f, iff = p.band_low_khz, p.band_high_khz, p.if_khz
    dial = lambda f: relative(f, tu.DIAL_TOL)
    ifs = relative(iff, IF_ALIGN_TOL)
    tol_text = (f"dial +-{tu.DIAL_TOL * 100:g} % (common practice, no source), "
                f"IF +-{IF_ALIGN_TOL * 100:g} % (trade)")
    for end, f in (("low", lo_f), ("high", hi_f)):
        b = worst_case(tu.lo_khz, {"signal_khz": dial(f), "if_khz": ifs})
        ctx.add(f"tuning.lo_{end}_khz", f"Local oscillator, dial at the {end} end", "oscillator",
                b.nominal, b.low, b.high, "kHz",
                f"f + IF = {_n(f)} + {_n(iff)} = {_n(b.nominal)} kHz (high-side oscillator); band: "
                f"{tol_text}", keys=("band", "if_khz"), absent=0.0)
        im = worst_case(tu.image_khz, {"signal_khz": dial(f), "if_khz": ifs})
        ctx.add(f"tuning.image_{end}_khz", f"Image frequency, dial at the {end} end", "antenna",
                im.nominal, im.low, im.high, "kHz",
                f"f + 2 IF = {_n(f)} + 2 x {_n(iff)} = {_n(im.nominal)} kHz; band: {tol_text}",
                keys=("band", "if_khz"), absent=0.0)
    cr = worst_case(tu.cap_ratio, {"low_khz": dial(lo_f), "high_khz": dial(hi_f)})
    c_max, c_min = p.gang_max_pf + p.gang_stray_pf, p.gang_min_pf + p.gang_stray_pf
    covers = ("enough" if c_max / c_min >= cr.nominal else "NOT enough: check the gang figures")
    ctx.add("tuning.cap_ratio", "Capacitance ratio the antenna section must cover", "antenna",
            cr.nominal, cr.low, cr.high, "ratio",
            f"({_n(hi_f)}/{_n(lo_f)})^2 = {_n(cr.nominal)}; the gang with strays gives "
            f"({_n(p.gang_max_pf)}+{_n(p.gang_stray_pf)})/({_n(p.gang_min_pf)}+{_n(p.gang_stray_pf)}) "
            f"= {_n(c_max / c_min)} ({covers}); band: dial +-{tu.DIAL_TOL * 100:g} % at both ends",
            keys=("band", "gang"), absent=0.0)
    gang = {"f_khz": dial(lo_f), "gmax": relative(p.gang_max_pf, GANG_TOL),
            "stray": relative(p.gang_stray_pf, STRAY_TOL)}
    ant = worst_case(lambda f_khz, gmax, stray: tu.inductance_uh(f_khz, gmax + stray), gang)
    ctx.add("tuning.antenna_uh", "Antenna coil inductance", "antenna", ant.nominal, ant.low,
            ant.high, "uH",
            f"L = 25330 / (f^2 C) = 25330 / ({_n(lo_f / 1000)}^2 x {_n(c_max)}) = {_n(ant.nominal)} "
            f"uH (band's low end with gang maximum plus stray); band: gang +-{GANG_TOL * 100:g} %, "
            f"stray +-{STRAY_TOL * 100:g} % (trade), dial +-{tu.DIAL_TOL * 100:g} %",
            keys=("band", "gang"), absent=0.0)
    _oscillator_coil(ctx, gang, c_max)
    for end, f in zip(("low", "high"), tu.alignment_points_khz(lo_f, hi_f)):
        d = dial(f)
        where = "padder" if end == "low" else "trimmer"
        rule = ("about a tenth above the band's low end" if end == "low" else
                "about an eighth below the band's top")
        ctx.add(f"tuning.align_{end}_khz", f"Alignment point for the oscillator {where}",
                "oscillator", f, d.low, d.high, "kHz",
                f"{_n(f)} kHz: {rule}, rounded (50 kHz steps on the broadcast band; common "
                f"practice: 600 and 1400 kHz on 540-1600); band: dial +-{tu.DIAL_TOL * 100:g} %",
                keys=("band",), absent=0.0)


def _oscillator_coil(ctx: Context, gang: dict, c_max: float) -> None:
    from faultwise.calc import tuning as tu
    from faultwise.calc.tolerance import worst_case

    p = ctx.p
    lo_f, hi_f, iff = p.band_low_khz, p.band_high_khz, p.if_khz
    two = tu.padder_design(lo_f, hi_f, iff, c_max)
    three = tu.three_point_design(lo_f, hi_f, iff, c_max)
    b = worst_case(lambda f_khz, gmax, stray: tu.padder_design(f_khz, hi_f * f_khz / lo_f, iff,
                                                                gmax + stray).osc_uh, gang)
    low, high = min(b.low, three.osc_uh), max(b.high, three.osc_uh)
    ctx.add("tuning.osc_uh", "Oscillator coil inductance", "oscillator", two.osc_uh, low, high, "uH",
            f"two-point padder design (exact at {_n(lo_f)} and {_n(hi_f)} kHz): padder Cp = C (q-1)/"
            f"(r-q) = {_n(two.padder_pf)} pF with r = {_n(tu.cap_ratio(lo_f, hi_f))}, q = "
            f"(({_n(hi_f)}+{_n(iff)})/({_n(lo_f)}+{_n(iff)}))^2 = "
            f"{_n(tu.cap_ratio(two.osc_low_khz, two.osc_high_khz))}; L = 25330 / "
            f"({_n(two.osc_low_khz / 1000)}^2 x {_n(tu.series_pf(c_max, two.padder_pf))}) = "
            f"{_n(two.osc_uh)} uH; band: gang and stray tolerances, and it takes in the three-point "
            f"design's {_n(three.osc_uh)} uH (padder {_n(three.padder_pf)} pF, trimmer "
            f"{_n(three.trimmer_pf)} pF)", keys=("band", "gang", "if_khz"), absent=0.0)
    curve = tu.tracking_error_curve(three.antenna_uh, three.osc_uh, three.padder_pf, iff,
                                    two.c_min_pf, two.c_max_pf, three.trimmer_pf)
    worst = max(curve, key=lambda pt: abs(pt.error_khz))
    err = abs(worst.error_khz)
    mid = (lo_f + hi_f) / 2.0
    slack = mid / (2.0 * tu.ANTENNA_Q)
    pts = "/".join(_n(f) for f in three.points_khz)
    ctx.add("tuning.tracking_error_khz", "Oscillator tracking error (worst across the band)",
            "oscillator", err, 0.0, err + slack, "kHz",
            f"three-point tracking exact at {pts} kHz (padder {_n(three.padder_pf)} pF, trimmer "
            f"{_n(three.trimmer_pf)} pF, L {_n(three.osc_uh)} uH): worst |f_osc - f - IF| = "
            f"{_n(err)} kHz at {_n(worst.signal_khz)} kHz; band: up to that plus half the antenna "
            f"circuit's bandwidth at mid-band, {_n(mid)}/(2 x {_n(tu.ANTENNA_Q)}) = {_n(slack)} kHz "
            "(loaded Q about 100, trade)", keys=("band", "gang", "if_khz"), absent=0.0)


def add_antenna(ctx: Context) -> None:
    from faultwise.calc import antenna

    mid_khz = (ctx.p.band_low_khz + ctx.p.band_high_khz) / 2.0
    f = mid_khz / 1000.0
    full, practical = antenna.half_wave_m(f), antenna.practical_half_wave_m(f)
    ctx.add("antenna.half_wave_m", "Half-wave antenna length at mid-band", "antenna", full,
            practical, full, "m",
            f"150 / {_n(f)} MHz = {_n(full)} m; a practical half-wave wire is 143 / {_n(f)} = "
            f"{_n(practical)} m (amateur handbooks); far longer than any set's aerial, which is why "
            "broadcast sets use loops and ferrite rods", keys=("band",), absent=0.0)
