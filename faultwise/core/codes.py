"""Component markings and preferred values.

- IEC 60063 preferred-number series E6, E12, E24 (hard-coded: eight E24 values are not
  round(10^(k/24), 1), so the tables cannot be generated).
- IEC 60062 colour code for 3-, 4- and 5-band resistors.
- IEC 60062 letter code ("RKM" code): the letter is the decimal point and the multiplier
  (4k7, 2R2, 1M0, 4n7, 100n, 470p), and the tolerance letters F G J K M.
- EIA-198 three-digit capacitor code (104 = 10 x 10^4 pF; third digit 8 = x0.01, 9 = x0.1).

Values are exact decimals turned into floats once (4.7 kΩ is 4700.0, not 4699.999...).
Every bad code is an :class:`InputError` saying what was wrong and what is accepted.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from decimal import Decimal

from faultwise.core.errors import InputError

# IEC 60063 (secondary sources): mantissas of one decade
SERIES: dict[str, tuple[float, ...]] = {
    "E6": (1.0, 1.5, 2.2, 3.3, 4.7, 6.8),
    "E12": (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2),
    "E24": (1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
            3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1),
}

# IEC 60062 colour code (secondary sources)
DIGITS = {"black": 0, "brown": 1, "red": 2, "orange": 3, "yellow": 4, "green": 5,
          "blue": 6, "violet": 7, "grey": 8, "white": 9}
MULTIPLIER_EXP = {**DIGITS, "gold": -1, "silver": -2}
# grey is left out on purpose: sources disagree on its tolerance
BAND_TOLERANCE_PCT = {"brown": 1.0, "red": 2.0, "green": 0.5, "blue": 0.25, "violet": 0.1,
                      "gold": 5.0, "silver": 10.0, "none": 20.0}
_COLOUR_ALIASES = {"gray": "grey", "purple": "violet", "": "none", "no band": "none",
                   "blank": "none"}

# IEC 60062 tolerance letters (secondary sources; only the ones we could check)
TOLERANCE_LETTERS = {"F": 1.0, "G": 2.0, "J": 5.0, "K": 10.0, "M": 20.0}

# IEC 60062 letter code: letter -> power of ten, per kind of part. For resistors R is the
# decimal point alone; K (k is common), M, G, T multiply. For capacitors p, n, u (µ), m.
# Inductors are marked the same way as capacitors (n, u, m), by the same principle.
LETTER_EXP: dict[str, dict[str, int]] = {
    "resistance": {"R": 0, "K": 3, "k": 3, "M": 6, "G": 9, "T": 12},
    "capacitance": {"p": -12, "n": -9, "u": -6, "m": -3},
    "inductance": {"n": -9, "u": -6, "m": -3},
}
KIND_UNITS = {"resistance": "ohm", "capacitance": "F", "inductance": "H"}
_KIND_ALIASES = {"r": "resistance", "resistor": "resistance", "ohm": "resistance",
                 "c": "capacitance", "capacitor": "capacitance", "f": "capacitance",
                 "l": "inductance", "inductor": "inductance", "h": "inductance"}


def _exact(mantissa: float | int | str, exponent: int) -> float:
    """mantissa x 10^exponent computed in decimal, rounded once."""
    return float(Decimal(str(mantissa)).scaleb(exponent))


def series_values(series: str = "E12") -> tuple[float, ...]:
    """The mantissas of one decade of an IEC 60063 series (E6, E12, E24)."""
    key = str(series).upper()
    if key not in SERIES:
        raise InputError(f"unknown preferred-value series {series!r}",
                         hint="use E6, E12 or E24")
    return SERIES[key]


def nearest_preferred(value: float, series: str = "E12") -> float:
    """The IEC 60063 value nearest to ``value`` by ratio (log distance); ties go low."""
    mantissas = series_values(series)
    if isinstance(value, bool) or not isinstance(value, (int, float)) or \
            not math.isfinite(value) or value <= 0:
        raise InputError(f"a preferred value needs a positive number, not {value!r}")
    exp = math.floor(math.log10(value))
    candidates = [_exact(mantissas[-1], exp - 1)]
    candidates += [_exact(m, exp) for m in mantissas]
    candidates += [_exact(m, exp + 1) for m in mantissas[:1]]
    return min(candidates, key=lambda c: abs(math.log(c / value)))


def is_preferred(value: float, series: str = "E12") -> bool:
    """True when ``value`` is (within 1e-9 relative) a value of the series."""
    try:
        near = nearest_preferred(value, series)
    except InputError:
        if str(series).upper() not in SERIES:
            raise
        return False
    return math.isclose(near, value, rel_tol=1e-9)


@dataclass(frozen=True)
class ColourCode:
    ohm: float
    tolerance_pct: float


def _colour(name: object) -> str:
    if not isinstance(name, str):
        raise InputError(f"a colour band must be a colour name, not {name!r}")
    key = " ".join(name.strip().lower().split())
    key = _COLOUR_ALIASES.get(key, key)
    if key not in MULTIPLIER_EXP and key != "none":
        raise InputError(f"unknown band colour {name!r}",
                         hint="use black, brown, red, orange, yellow, green, blue, violet, "
                              "grey, white, gold, silver or none")
    return key


def decode_colour_bands(bands: list[str]) -> ColourCode:
    """IEC 60062: 3 bands (2 digits, multiplier; ±20 %), 4 bands (+ tolerance), 5 bands (3 digits)."""
    if isinstance(bands, str) or not isinstance(bands, (list, tuple)):
        raise InputError("give the bands as a list of colours",
                         hint="for example ['yellow', 'violet', 'red', 'gold']")
    colours = [_colour(b) for b in bands]
    if len(colours) not in (3, 4, 5):
        raise InputError(f"a resistor colour code has 3, 4 or 5 bands, not {len(colours)}",
                         hint="six-band resistors add a temperature band: leave it off")
    if len(colours) == 3:
        digits, mult, tol = colours[:2], colours[2], "none"
    else:
        digits, mult, tol = colours[:-2], colours[-2], colours[-1]
    if colours[0] in ("gold", "silver", "none", "black"):
        raise InputError(f"the first band cannot be {colours[0]}",
                         hint="read the bands from the other end (the tolerance band is last)")
    for i, c in enumerate(digits, start=1):
        if c not in DIGITS:
            raise InputError(f"band {i} is a digit band and cannot be {c}",
                             hint="digit bands are black to white")
    if mult not in MULTIPLIER_EXP:
        raise InputError(f"the multiplier band cannot be {mult}",
                         hint="multipliers are black to white, gold or silver")
    if tol not in BAND_TOLERANCE_PCT:
        raise InputError(f"{tol} is not a tolerance band in IEC 60062 as used here",
                         hint="tolerance bands are brown, red, green, blue, violet, gold, "
                              "silver or none")
    number = int("".join(str(DIGITS[c]) for c in digits))
    return ColourCode(ohm=_exact(number, MULTIPLIER_EXP[mult]),
                      tolerance_pct=BAND_TOLERANCE_PCT[tol])


def _kind(kind: str) -> str:
    key = str(kind).strip().lower()
    key = _KIND_ALIASES.get(key, key)
    if key not in LETTER_EXP:
        raise InputError(f"unknown kind of part {kind!r}",
                         hint="use resistance, capacitance or inductance")
    return key


_LETTER_CODE = re.compile(r"^([0-9]*)([A-Za-z])([0-9]*)$")


def decode_letter_code(text: str, kind: str = "resistance") -> float:
    """IEC 60062 letter code -> ohm, F or H: 4k7 = 4700 Ω, 2R2 = 2.2 Ω, 4n7 = 4.7e-9 F."""
    kind = _kind(kind)
    if not isinstance(text, str):
        raise InputError(f"a letter code must be text, not {text!r}")
    code = text.strip().replace("µ", "u").replace("μ", "u")
    m = _LETTER_CODE.match(code)
    letters = LETTER_EXP[kind]
    example = {"resistance": "4k7, 2R2, 1M0, R47", "capacitance": "4n7, 100n, 470p, 2u2",
               "inductance": "4u7, 100u, 2m2"}[kind]
    if not m or not (m.group(1) or m.group(3)):
        raise InputError(f"{text!r} is not a letter code", hint=f"for example {example}")
    whole, letter, frac = m.groups()
    if letter not in letters:
        raise InputError(f"{letter!r} is not a {kind} letter in the letter code",
                         hint=f"use one of {', '.join(letters)}; for example {example}")
    return float(Decimal(f"{whole or '0'}.{frac or '0'}").scaleb(letters[letter]))


def tolerance_letter(letter: str) -> float:
    """IEC 60062 tolerance letter -> percent: F 1, G 2, J 5, K 10, M 20."""
    key = letter.strip().upper() if isinstance(letter, str) else letter
    if key not in TOLERANCE_LETTERS:
        raise InputError(f"{letter!r} is not a tolerance letter",
                         hint="use F (1 %), G (2 %), J (5 %), K (10 %) or M (20 %)")
    return TOLERANCE_LETTERS[key]


_CAP_CODE = re.compile(r"^[0-9]{3}$")
# 6 and 7 (10 uF, 100 uF) are seen on tantalum capacitors (common practice, from memory)
_CAP_THIRD_EXP = {"0": 0, "1": 1, "2": 2, "3": 3, "4": 4, "5": 5, "6": 6, "7": 7, "8": -2,
                  "9": -1}


def decode_cap_code(text: str) -> float:
    """EIA-198 three-digit code -> pF: two significant digits x 10^third (8 = x0.01, 9 = x0.1)."""
    code = text.strip() if isinstance(text, str) else ""
    if not _CAP_CODE.match(code):
        raise InputError(f"{text!r} is not a three-digit capacitor code",
                         hint="for example 104 (100 nF), 472 (4.7 nF) or 109 (1.0 pF)")
    return _exact(int(code[:2]), _CAP_THIRD_EXP[code[2]])


@dataclass(frozen=True)
class Marking:
    """A decoded part marking: value in ``unit`` (ohm, F or H) and tolerance if marked."""

    value: float
    unit: str
    tolerance_pct: float | None = None


def decode_marking(text: str, kind: str = "resistance") -> Marking:
    """A printed marking: letter code or (capacitors) three-digit code, then a tolerance letter."""
    kind = _kind(kind)
    if not isinstance(text, str) or not text.strip():
        raise InputError("no marking was given", hint="for example 4k7J or 104K")
    code = "".join(text.split())
    tolerance = None
    body = code
    if len(code) > 1 and code[-1] in TOLERANCE_LETTERS:
        candidate = code[:-1]   # "4M" is 4 MΩ: the tolerance letter needs a whole code before it
        if kind == "capacitance" and _CAP_CODE.match(candidate) or \
                _LETTER_CODE.match(candidate) and not candidate.isdigit():
            body, tolerance = candidate, tolerance_letter(code[-1])
    if kind == "capacitance" and _CAP_CODE.match(body):
        return Marking(_exact(decode_cap_code(body), -12), "F", tolerance)
    return Marking(decode_letter_code(body, kind), KIND_UNITS[kind], tolerance)
