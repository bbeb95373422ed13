"""Expectations along the signal path: detector, IF strip, oscillator activity."""

from __future__ import annotations

from faultwise.expect.context import Context, basis_num as _n


def add_detector(ctx: Context) -> None:
    from faultwise.calc import detector as d
    from faultwise.calc.tolerance import relative, worst_case

    tube = ctx.p.line_powered
    r_ohm, c_pf = (d.TUBE_LOAD_OHM, d.TUBE_LOAD_PF) if tube else (d.TRANSISTOR_LOAD_OHM,
                                                                  d.TRANSISTOR_LOAD_PF)
    b = worst_case(d.time_constant_us, {"r_ohm": relative(r_ohm, d.LOAD_R_TOL),
                                        "c_pf": relative(c_pf, d.LOAD_C_TOL)})
    floor = d.carrier_limit_us(ctx.p.if_khz)
    m = d.MODULATION_CHECK
    f_max = d.max_audio_hz(b.nominal, m)
    m_top = d.max_modulation(b.nominal, d.AUDIO_TOP_HZ)
    ctx.add("detector.time_constant_us", "Detector load time constant", "detector", b.nominal,
            b.low, b.high, "us",
            f"RC = {_n(r_ohm / 1000)} kohm x {_n(c_pf)} pF = {_n(b.nominal)} us (typical values); "
            f">> 1/(2 pi {_n(ctx.p.if_khz)} kHz) = {_n(floor)} us, so the IF is filtered; follows "
            f"m = {_n(m)} up to sqrt(1-m^2)/(2 pi m RC) = {_n(f_max)} Hz and {_n(d.AUDIO_TOP_HZ)} Hz "
            f"up to m = {_n(m_top)} (communication textbooks); band: volume control +-20 %, "
            "capacitor +-10 % (trade)", typical=True, absent=0.0)
    lo, nom, hi = d.AVC_TUBE_V if tube else d.AVC_TRANSISTOR_V
    what = ("negative to chassis on the AVC line, shown as a magnitude" if tube else
            "DC at the detector load, fed back to the first IF stage")
    ctx.add("detector.avc_v", "AVC voltage on a strong local station", "detector", nom, lo, hi, "V",
            f"about {_n(nom)} V, {what}; band: {_n(lo)}-{_n(hi)} V with signal strength (trade); "
            "near zero on a strong station means no IF signal reaches the detector",
            typical=True)


def add_if_strip(ctx: Context) -> None:
    from faultwise.calc import detector as d

    f = ctx.p.if_khz
    tol = d.IF_ALIGN_TOL
    ctx.add("if.peak_khz", "IF the strip peaks at", "if", f, f * (1 - tol), f * (1 + tol), "kHz",
            f"the set's IF, {_n(f)} kHz; band: +-{tol * 100:g} % alignment tolerance (trade)",
            keys=("if_khz",), absent=0.0)
    q_lo, q_nom, q_hi = d.IF_Q
    bw = d.if_bandwidth_khz(f, q_nom)
    ctx.add("if.bandwidth_khz", "IF bandwidth (-3 dB)", "if", bw, d.if_bandwidth_khz(f, q_hi),
            d.if_bandwidth_khz(f, q_lo), "kHz",
            f"B = f0/Q = {_n(f)} kHz / {_n(q_nom)} = {_n(bw)} kHz; band: loaded Q {_n(q_lo)}-"
            f"{_n(q_hi)} (trade; broadcast IF strips pass about 6-10 kHz overall)",
            keys=("if_khz",), absent=0.0)


def add_oscillator(ctx: Context) -> None:
    from faultwise.calc import oscillator as o

    p = ctx.p
    if p.line_powered:
        t = p.tube("converter") or p.tube("oscillator")
        if t is None:
            return
        lo, nom, hi = o.GRID_BIAS_V
        ctx.add("oscillator.grid_v", f"Oscillator grid bias, oscillating ({t.type})", "oscillator",
                nom, lo, hi, "V",
                f"grid-leak bias, negative to chassis, shown as a magnitude: about {_n(nom)} V; band "
                f"{_n(lo)}-{_n(hi)} V (trade); near 0 V means the oscillator is dead (measure with "
                "a high-impedance meter, through a 1 Mohm probe resistor if possible)", typical=True)
        return
    tr = p.transistor("converter") or p.transistor("oscillator")
    if tr is None:
        return
    lo, nom, hi = o.EMITTER_SHIFT_V
    ctx.add("oscillator.emitter_shift_v", "Converter emitter change when the oscillator is stopped",
            "oscillator", nom, lo, hi, "V",
            f"short the oscillator section of the gang and watch the emitter: it moves about "
            f"{_n(nom)} V; band {_n(lo)}-{_n(hi)} V (trade); no change (below "
            f"{_n(o.EMITTER_SHIFT_ABSENT_V * 1000)} mV) means it was not oscillating",
            typical=True, absent=o.EMITTER_SHIFT_ABSENT_V)

