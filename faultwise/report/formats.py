"""The words and number formats every report shares: one rule each.

The safety and leakage statements printed on every job report; a reading with its unit
(:func:`faultwise.core.units.format_reading` where it knows the unit), a recorded band in
words, a time stamp without seconds, minutes as hours and minutes, a share as a whole
percent and a number with a fixed count of decimals (``"-"`` when unknown). The job report
(:mod:`faultwise.report.model`, :mod:`faultwise.report.render`), the review as text and as
HTML, and the review screen all use these.
"""

from __future__ import annotations

from collections.abc import Mapping

SAFETY_STATEMENT = (
    "This record was kept with faultwise, which supports trained people. It does not replace "
    "training, the set's service data, local electrical codes or licensed practice, and it "
    "defers to all of them.")
LEAKAGE_STATEMENT = (
    "A mains-powered set can put line voltage on its chassis and on any metal a person can "
    "touch (a series-string set by design, a transformer set through a fault). It goes back "
    "to its owner only after a leakage check: the AC voltage across 1500 ohm shunted by 0.15 uF, from each exposed metal part to a true earth, with the plug "
    "one way and then reversed, not through an isolation transformer, is at most 0.75 V "
    "(0.5 mA).")
NOT_LINE_CONNECTED = "Not mains-powered (battery set): no leakage check is needed."


def number(value: float, unit: str = "") -> str:
    """A value with its unit for display (units.format_reading where it knows the unit)."""
    if unit:
        try:
            from faultwise.core.units import format_reading

            return format_reading(float(value), unit)
        except Exception:  # an unknown unit recorded by an older version: show it plainly
            pass
    return f"{value:.4g} {unit}".strip()


def band_text(band: Mapping | None) -> str:
    """``low to high unit (nominal n)`` from a recorded band, or an empty string."""
    if not band:
        return ""
    unit = str(band.get("unit") or "")
    low, high, nom = band.get("low"), band.get("high"), band.get("nominal")
    nums = all(isinstance(v, (int, float)) for v in (low, high))
    text = f"{number(low, unit)} to {number(high, unit)}" if nums else ""
    if isinstance(nom, (int, float)):
        text += f" (nominal {number(nom, unit)})"
    if band.get("typical"):
        text += ", typical values"
    return text.strip()


def when_text(iso: str) -> str:
    """``2026-12-01T09:30:00+00:00`` -> ``2026-12-01 09:30 +00:00``; other text as it is."""
    from faultwise.cases.summary import parse_time

    t = parse_time(iso)
    if t is None:
        return iso
    zone = t.strftime(" %z") if t.tzinfo else ""
    if len(zone) == 6:
        zone = zone[:4] + ":" + zone[4:]
    return t.strftime("%Y-%m-%d %H:%M") + zone


def minutes_text(minutes: float | None) -> str:
    if minutes is None:
        return "not recorded"
    h, m = divmod(int(round(minutes)), 60)
    return f"{h} h {m:02d} min" if h else f"{m} min"


def pct(x: float | None) -> str:
    """A share 0..1 as a whole percent (``"-"`` when unknown): one rule for every report."""
    return "-" if x is None else f"{100 * x:.0f}%"


def num(x: float | None, digits: int = 1) -> str:
    """A number with ``digits`` decimals (``"-"`` when unknown): one rule for every report."""
    return "-" if x is None else f"{x:.{digits}f}"
