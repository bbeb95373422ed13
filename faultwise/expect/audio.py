"""Expectations for the output stage and the speaker."""

from __future__ import annotations

from faultwise.expect.context import Context, basis_num as _n
from faultwise.expect.supply import simulate_supply

PLATE_FRACTION = 0.9
"""Share of a beam/pentode output tube's cathode current that flows to the plate when the
tube table gives no operating point: about 0.9, the screen taking the rest (trade)."""


def add_output_tube(ctx: Context) -> None:
    from faultwise.calc import audio
    from faultwise.calc.tolerance import (
        TUBE_CURRENT_TOL,
        relative,
        resistor_ohm,
        worst_case,
    )

    t = ctx.p.tube("output")
    if t is None:
        return
    keys = ("tubes.output.cathode_ohm", "tubes.output.cathode_ma")
    ik = relative(t.cathode_ma, TUBE_CURRENT_TOL) if t.cathode_ma is not None else None
    if t.cathode_ohm is not None and ik is not None:
        b = worst_case(lambda ma, ohm: audio.cathode_v(ma, ohm),
                       {"ma": ik, "ohm": resistor_ohm(t.cathode_ohm)})
        ctx.add("output.cathode_v", f"Output tube cathode bias ({t.type})", "audio", b.nominal,
                b.low, b.high, "V",
                f"{_n(t.cathode_ma)} mA x {_n(t.cathode_ohm)} ohm = {_n(b.nominal)} V; band: "
                "cathode current +-20 % tube to tube (trade), resistor +-10 % (trade); 0 V means "
                "no cathode current (or a shorted resistor)", keys=keys)
    a = ctx.p.audio
    rect = simulate_supply(ctx)
    if a.output_turns_ratio is None or a.speaker_ohm is None or ik is None:
        return
    zp = audio.reflected_ohm(a.output_turns_ratio, a.speaker_ohm)
    rp = relative(zp * audio.PRIMARY_DC, 0.5)
    ctx.add("output.primary_ohm", "Output transformer primary, DC resistance (power off)", "audio",
            rp.nominal, rp.low, rp.high, "ohm",
            f"about {audio.PRIMARY_DC * 100:.0f} % of the {_n(zp)} ohm reflected load = "
            f"{_n(rp.nominal)} ohm; band: {audio.PRIMARY_DC_LOW * 100:.0f}-"
            f"{audio.PRIMARY_DC_HIGH * 100:.0f} % (small single-ended output transformers, "
            "common practice, no source); an open primary reads infinite and leaves the plate at 0 V",
            keys=("audio",), absent=0.0)
    if rect is None:
        return
    data = ctx.tube_type(t.type)
    op = getattr(data, "operation", None)
    frac = op.plate_ma / op.cathode_ma if op is not None and op.cathode_ma else PLATE_FRACTION
    frac_text = (f"plate {_n(op.plate_ma)} of {_n(op.cathode_ma)} mA in the tube data"
                 if op is not None else
                 f"plate about {_n(PLATE_FRACTION)} of the cathode current (trade)")
    drop = audio.primary_drop_v(t.cathode_ma * frac, rp.nominal)
    bplus = rect.bands["rectifier_out_v"]
    nom = bplus.nominal - drop
    low = bplus.low - audio.primary_drop_v(ik.high * frac, rp.high)
    high = bplus.high - audio.primary_drop_v(ik.low * frac, rp.low)
    ctx.add("output.plate_v", f"Output tube plate to chassis ({t.type})", "audio", nom, low, high,
            "V",
            f"B+ {_n(bplus.nominal)} V - {_n(t.cathode_ma * frac)} mA x "
            f"{_n(rp.nominal)} ohm primary = {_n(nom)} V ({frac_text}); band: the B+ corners with "
            "the cathode current +-20 % (trade) and the primary 5-15 % of the reflected load",
            typical=ctx.typical(*rect.keys, "audio", *keys) or rect.diode_typical)


def add_speaker(ctx: Context) -> None:
    from faultwise.calc import audio
    from faultwise.calc.tolerance import relative

    a = ctx.p.audio
    if a.speaker_ohm is None:
        return
    if a.output_turns_ratio is not None:
        zp = audio.reflected_ohm(a.output_turns_ratio, a.speaker_ohm)
        ctx.add("output.reflected_ohm", "Load the output stage sees", "audio", zp,
                zp * audio.SPEAKER_MIN_FRACTION, zp * audio.SPEAKER_MAX_FRACTION, "ohm",
                f"{_n(a.output_turns_ratio)}^2 x {_n(a.speaker_ohm)} ohm = {_n(zp)} ohm; band: the "
                "speaker's impedance is at least 80 % of rated in its working band (IEC 60268-5) "
                "and about 1.25 x rated just above that minimum (common practice, no source)",
                keys=("audio",), absent=0.0)
    vc = relative(audio.voice_coil_ohm(a.speaker_ohm), 0.0)
    low, high = a.speaker_ohm * audio.VOICE_COIL_DC_LOW, a.speaker_ohm * audio.VOICE_COIL_DC_HIGH
    ctx.add("output.voice_coil_ohm", "Voice-coil DC resistance (speaker disconnected)", "audio",
            vc.nominal, low, high, "ohm",
            f"{_n(audio.VOICE_COIL_DC)} x {_n(a.speaker_ohm)} ohm rated = {_n(vc.nominal)} ohm; band: "
            "0.7-0.8 x rated (trade); an open voice coil reads infinite",
            keys=("audio.speaker_ohm",), absent=0.0)

