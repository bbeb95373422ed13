"""Expectations for the heaters of line sets: series string or heater winding, cold ohms."""

from __future__ import annotations

from typing import TYPE_CHECKING

from faultwise.expect.context import Context, basis_num as _n

if TYPE_CHECKING:
    from faultwise.profile.model import Profile, Tube


def add_heaters(ctx: Context) -> None:
    if not ctx.p.tubes:
        return
    if ctx.p.family == "series-string":
        _series_string(ctx)
    else:
        _heater_winding(ctx)


def _string_current_a(p: Profile) -> float:
    """The string's rated current: the heater current most of its tubes share."""
    currents = [t.heater_a for t in p.tubes]
    return max(set(currents), key=lambda a: (currents.count(a), a))


def _series_string(ctx: Context) -> None:
    from faultwise.calc import heaters as h
    from faultwise.calc.tolerance import (
        HEATER_TOL,
        RESISTOR_TOL,
        heater,
        relative,
        resistor_ohm,
        worst_case,
    )

    p, line = ctx.p, ctx.line()
    tubes = p.tubes
    rated_a = _string_current_a(p)
    total = h.string_v(t.heater_v for t in tubes)
    sum_text = "+".join(_n(t.heater_v) for t in tubes)
    odd = [t for t in tubes if abs(t.heater_a - rated_a) > 1e-9]
    odd_text = ("; " + ", ".join(f"{t.type} is rated {_n(t.heater_a * 1000)} mA" for t in odd)
                + f", not the string's {_n(rated_a * 1000)} mA: check the lineup") if odd else ""
    keys = tuple(f"tubes.{t.role}.{k}" for t in tubes for k in ("heater_v", "heater_a"))
    tol = heater(total)
    ctx.add("heaters.string_v", "Sum of the heater voltages in the string", "supply", total,
            tol.low, tol.high, "V",
            f"{sum_text} = {_n(total)} V; band: {tol.rule}, the line the string runs on at rated "
            f"current{odd_text}", keys=keys)
    r_drop = h.dropping_ohm(line.nominal, total, rated_a)
    drop = resistor_ohm(r_drop)
    if r_drop > 0:
        drop_text = (f"({_n(line.nominal)} - {_n(total)}) V / {_n(rated_a)} A = {_n(r_drop)} ohm; "
                     f"band: {drop.rule}")
    else:
        drop_text = (f"the string sums to {_n(total)} V, at or above the {_n(line.nominal)} V line: "
                     "no dropping resistor (0 ohm)")
    ctx.add("heaters.dropping_ohm", "Heater dropping resistor needed", "supply", r_drop,
            drop.low, drop.high, "ohm", drop_text, keys=keys + ("mains",), absent=0.0)
    hot_total = sum(h.hot_ohm(t.heater_v, t.heater_a) for t in tubes)

    def current_ma(line_v: float, rd: float) -> float:
        return h.string_current_a(line_v, hot_total, rd) * 1000.0

    band = worst_case(current_ma, {"line_v": line, "rd": drop})
    rated = heater(rated_a * 1000.0)
    window = (f"widened to the rating +-{HEATER_TOL * 100:.0f} % (tube handbooks: heaters within "
              "+-10 % of rating)")
    ctx.add("heaters.string_ma", "Heater string current", "supply", band.nominal,
            min(band.low, rated.low), max(band.high, rated.high), "mA",
            f"rated {_n(rated_a * 1000)} mA; the line drives {_n(line.nominal)} V / "
            f"({_n(hot_total)} + {_n(r_drop)}) ohm = {_n(band.nominal)} mA; band: {line.rule}"
            + (f", dropper +-{RESISTOR_TOL * 100:.0f} %" if r_drop else "")
            + f", {window}; hot resistance taken constant (a tungsten heater's rises with "
            "temperature, so the real current moves less than this); 0 mA: the string is open",
            keys=keys + ("mains",))
    drop_v = r_drop * rated_a
    design = h.design_line_v(total, r_drop, rated_a)
    for t in tubes:
        def heater_v(line_v: float, dv: float, t: Tube = t) -> float:
            return h.series_heater_v(line_v, t.heater_v, 1.0, total, 1.0, dv)

        b = worst_case(heater_v, {"line_v": line, "dv": relative(drop_v, RESISTOR_TOL)})
        own = heater(t.heater_v)
        ctx.add(f"heater.{t.role}.v", f"Heater voltage, {t.role} ({t.type})", "supply", b.nominal,
                min(b.low, own.low), max(b.high, own.high), "V",
                f"{_n(t.heater_v)} V x {_n(line.nominal)} / {_n(design)} = {_n(b.nominal)} V "
                f"(series string: rated volts scaled by line over the string's design voltage); "
                f"band: {line.rule}, {window}; an open heater reads the whole line, about "
                f"{_n(line.nominal)} V (high), and then every other heater reads 0",
                keys=(f"tubes.{t.role}.heater_v", f"tubes.{t.role}.heater_a", "mains"))
        _cold_ohm(ctx, t)


def _cold_ohm(ctx: Context, t: Tube) -> None:
    from faultwise.calc import heaters as h
    from faultwise.calc.tolerance import heater

    hot = h.hot_ohm(t.heater_v, t.heater_a)
    spread = heater(hot)
    nominal = h.cold_ohm(t.heater_v, t.heater_a)
    ctx.add(f"heater.{t.role}.cold_ohm", f"Cold heater resistance, {t.role} ({t.type}), power off",
            "supply", nominal, spread.low * h.COLD_TO_HOT_LOW, spread.high * h.COLD_TO_HOT_HIGH,
            "ohm",
            f"hot {_n(t.heater_v)} V / {_n(t.heater_a)} A = {_n(hot)} ohm; cold about 1/10 of hot "
            f"= {_n(nominal)} ohm (tungsten heater, trade); band: 1/14 to 1/7 of hot (trade) "
            "with heaters +-10 % (tube handbooks); an open heater reads infinite (high)",
            keys=(f"tubes.{t.role}.heater_v", f"tubes.{t.role}.heater_a"), absent=0.0)


def _heater_winding(ctx: Context) -> None:
    from faultwise.calc import heaters as h
    from faultwise.calc.tolerance import heater, worst_case

    p, line = ctx.p, ctx.line()
    wv = p.heater_winding_v
    if wv is None:
        return
    on = [t for t in p.tubes if abs(t.heater_v - wv) <= 0.05 * wv]
    off = [t for t in p.tubes if t not in on]
    b = worst_case(lambda line_v: h.winding_v(line_v, line.nominal, wv), {"line_v": line})
    ctx.add("heaters.winding_v", "Heater winding voltage", "supply", b.nominal, b.low, b.high, "V",
            f"{_n(wv)} V rated at {_n(line.nominal)} V line; the winding follows the line; band: "
            f"{line.rule}", keys=("heater_winding_v", "mains"))
    total = h.winding_total_a(t.heater_a for t in on)
    tb = worst_case(lambda line_v, f: f * total * line_v / line.nominal,
                    {"line_v": line, "f": heater(1.0)})
    others = ("; on their own winding: " + ", ".join(f"{t.type} ({_n(t.heater_v)} V)" for t in off)
              if off else "")
    ctx.add("heaters.total_a", "Current of the heater winding", "supply", tb.nominal, tb.low, tb.high,
            "A", "+".join(_n(t.heater_a) for t in on) + f" = {_n(total)} A (parallel heaters)"
            f"{others}; band: {line.rule}, heaters +-10 % (tube handbooks)",
            keys=tuple(f"tubes.{t.role}.heater_a" for t in on) + ("mains",))
    for t in p.tubes:
        rated = wv if t in on else t.heater_v
        vb = worst_case(lambda line_v, rated=rated: h.winding_v(line_v, line.nominal, rated),
                        {"line_v": line})
        ctx.add(f"heater.{t.role}.v", f"Heater voltage, {t.role} ({t.type})", "supply", vb.nominal,
                vb.low, vb.high, "V",
                f"{_n(rated)} V winding x line / {_n(line.nominal)} V (parallel heaters); band: "
                f"{line.rule}; a handbook heater is good within +-10 % of {_n(t.heater_v)} V",
                keys=(f"tubes.{t.role}.heater_v", "heater_winding_v", "mains"))
        _cold_ohm(ctx, t)

