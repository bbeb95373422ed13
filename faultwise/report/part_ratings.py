"""Ratings read out of a part as the bench typed it: ``22 nF 630 V film`` -> ``22 nF, 630 V``.

A part's text is free text (the parts field records what was typed). A rating is shown
where it can be known: each number-with-unit in the text that :func:`faultwise.core.units.parse_reading`
accepts as a capacitance, voltage, resistance, power or current (RKM codes such as ``4k7``
included), shown in the unit module's display form; and for a tube named in the text, the
heater rating the set profile gives that tube. Anything else stays in the text untouched.
No UI imports.
"""

from __future__ import annotations

import re
from typing import Iterable, Mapping

from faultwise.core.errors import InputError

# number (decimal point or comma) then a unit word, or an RKM code (4k7, 2R2, 4u7, 470p)
_TOKEN = re.compile(
    r"(?<![\w.])(\d+(?:[.,]\d+)?\s*(?:[pnuµμmkKM]?F|[mk]?V|[kM]?(?:ohms?|Ω)|[m]?W|[m]?A)"
    r"|\d+[RKMkpnuµ]\d+)(?![\w])")
_UNITS = ("F", "V", "ohm", "W", "A")
_TUBE = re.compile(r"\b\d{1,2}[A-Z]{1,3}\d{1,2}[A-Z]{0,3}\b|\b[A-Z]{2,3}\d{2,3}\b")


def _reading(token: str) -> str | None:
    """``token`` in display form for the first dimension that reads it, else None."""
    from faultwise.core.units import format_reading, parse_reading

    rkm = re.fullmatch(r"\d+([RKMkpnuµ])\d+", token)
    units = _UNITS if rkm is None else ("F",) if rkm.group(1) in "pnuµ" else ("ohm",)
    for unit in units:
        try:
            return format_reading(parse_reading(token, unit), unit)
        except (InputError, ValueError):
            continue
    return None


def tube_heaters(profile: Mapping | None) -> dict[str, str]:
    """Tube type (upper case) -> ``heater 6.3 V 0.3 A`` from a case's copy of the set profile."""
    from faultwise.core.units import format_reading

    out: dict[str, str] = {}
    tubes = profile.get("tubes") if isinstance(profile, Mapping) else None
    for tube in tubes if isinstance(tubes, list) else ():
        if not isinstance(tube, Mapping) or not isinstance(tube.get("type"), str):
            continue
        v, a = tube.get("heater_v"), tube.get("heater_a")
        if all(isinstance(x, (int, float)) and not isinstance(x, bool) for x in (v, a)):
            out[tube["type"].upper()] = (f"heater {format_reading(float(v), 'V')}, "
                                         f"{format_reading(float(a), 'A')}")
    return out


def part_rating(text: str, heaters: Mapping[str, str] | None = None) -> str:
    """The ratings found in one part's text, joined by commas; empty when none is known."""
    found: list[str] = []
    for match in _TOKEN.finditer(str(text)):
        shown = _reading(match.group(1))
        if shown and shown not in found:
            found.append(shown)
    for name in _TUBE.findall(str(text).upper()):
        rating = (heaters or {}).get(name)
        if rating and rating not in found:
            found.append(rating)
    return ", ".join(found)


def part_ratings(parts: Iterable[str], profile: Mapping | None = None) -> tuple[tuple[str, str], ...]:
    """(text, rating) for each part, the rating empty where none is known."""
    heaters = tube_heaters(profile)
    return tuple((str(p), part_rating(str(p), heaters)) for p in parts)
