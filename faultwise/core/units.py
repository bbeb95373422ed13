"""Reading parser and formatter: what a technician types -> a number in a known unit.

Accepted: SI prefixes (p n u µ μ m k K M G; "m" is milli, "M" is mega), unit symbols and
words (V, volt, A, amp, ohm, Ω, R, F, H, Hz, W, s, m ...), the old trade markings "mfd"
(microfarad) and "mmfd" (picofarad), an optional space, a leading sign, a decimal comma
("12,6"), exponent notation ("4.7e3"), the IEC 60062 letter code ("4k7", "2R2", "1M0",
"4n7", "100n": the letter is the decimal point and the multiplier) and a bare number,
which is taken as already in the target unit. Every failure is an :class:`InputError`.

Arithmetic is done in :mod:`decimal`, so "4.7 uF" read as farads is the float nearest to
4.7e-6, not 4.7 * 1e-6 with its rounding error.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from decimal import Decimal, InvalidOperation

from faultwise.core.errors import InputError

MAX_TEXT = 64

# dimension -> (what it is called, the symbols to show, examples of accepted input)
DIMENSIONS: dict[str, tuple[str, str, str]] = {
    "voltage": ("a voltage", "V, mV, kV", "'12.6 V', '120', '90 mV'"),
    "current": ("a current", "A, mA, uA", "'0.15 A', '45 mA'"),
    "resistance": ("a resistance", "ohm, kohm, Mohm", "'4k7', '2R2', '470 ohm', '1 Mohm'"),
    "capacitance": ("a capacitance", "F, uF, nF, pF", "'47 uF', '4n7', '100n', '470p'"),
    "inductance": ("an inductance", "H, mH, uH", "'230 uH', '2.5 mH'"),
    "frequency": ("a frequency", "Hz, kHz, MHz", "'455 kHz', '1.6 MHz'"),
    "power": ("a power", "W, mW", "'2 W', '500 mW'"),
    "time": ("a time", "s, ms, us", "'10 ms', '47 us'"),
    "length": ("a length", "m", "'2.5 m'"),
    "ratio": ("a plain number or ratio", "28, 28:1", "'28', '28:1'"),
}

# symbol (lower case) -> (dimension, power of ten, qualifier). Qualifier tells DC/RMS volts
# from peak-to-peak volts: the two cannot be mixed without a waveform factor.
_SYMBOLS: dict[str, tuple[str, int, str]] = {}
for _names, _dim, _exp, _qual in (
    (("v", "volt", "volts"), "voltage", 0, ""),
    (("vrms", "vac", "vdc"), "voltage", 0, "rms"),
    (("vpp", "vp-p"), "voltage", 0, "pp"),
    (("a", "amp", "amps", "ampere", "amperes"), "current", 0, ""),
    (("ohm", "ohms", "r"), "resistance", 0, ""),
    (("kilohm", "kilohms"), "resistance", 3, ""),
    (("f", "farad", "farads"), "capacitance", 0, ""),
    (("mfd",), "capacitance", -6, ""),      # old trade marking: microfarads
    (("mmfd",), "capacitance", -12, ""),    # old trade marking: micro-microfarads = pF
    (("h", "henry", "henries", "henrys"), "inductance", 0, ""),
    (("hz", "hertz"), "frequency", 0, ""),
    (("w", "watt", "watts"), "power", 0, ""),
    (("s", "sec", "second", "seconds"), "time", 0, ""),
    (("m", "metre", "metres", "meter", "meters"), "length", 0, ""),
):
    for _n in _names:
        _SYMBOLS[_n] = (_dim, _exp, _qual)

# prefixes are case-sensitive ("m" milli, "M" mega); "K" is accepted as kilo (KHz, 4K7)
_PREFIXES: dict[str, int] = {
    "": 0, "p": -12, "n": -9, "u": -6, "m": -3, "k": 3, "K": 3, "M": 6, "G": 9,
    "pico": -12, "nano": -9, "micro": -6, "milli": -3, "kilo": 3, "meg": 6, "mega": 6,
    "giga": 9,
}

# IEC 60062 letter code: the letter is the decimal point and the multiplier
RKM_LETTERS: dict[str, tuple[int, str | None]] = {
    "R": (0, "resistance"), "r": (0, "resistance"),
    "k": (3, None), "K": (3, None), "M": (6, None), "G": (9, None), "T": (12, None),
    "m": (-3, None), "u": (-6, None), "n": (-9, None), "p": (-12, None),
}

_NUMBER = re.compile(
    r"^([+-]?)((?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]{1,4})?)(?![0-9eE.])\s*(.*)$",
    re.S)
_RKM = re.compile(r"^([+-]?)([0-9]*)([RrkKMGTmunp])([0-9]*)\s*(.*)$", re.S)
_RATIO = re.compile(r"^([0-9]+(?:\.[0-9]*)?)\s*:\s*([0-9]+(?:\.[0-9]*)?)$")
_AMBIGUOUS_COMMA = re.compile(r"^[+-]?[1-9][0-9]{0,2},[0-9]{3}(?![0-9])")


@dataclass(frozen=True)
class Unit:
    """A resolved unit: its dimension, its power of ten from the SI unit, its qualifier."""

    dimension: str
    exponent: int
    qualifier: str = ""


def _lookup_unit(text: str) -> list[Unit]:
    """Every (prefix, symbol) reading of ``text``; symbol case-insensitive, prefix exact."""
    if text.lower() == "ratio" or text in ("x", ""):
        return [Unit("ratio", 0)]
    found: list[Unit] = []
    for i in range(len(text)):
        prefix, symbol = text[:i], text[i:].lower()
        if symbol in _SYMBOLS:
            p = _PREFIXES.get(prefix, _PREFIXES.get(prefix.lower()) if len(prefix) > 1 else None)
            if p is not None:
                dim, exp, qual = _SYMBOLS[symbol]
                found.append(Unit(dim, exp + p, qual))
    return found


def resolve_unit(unit: str) -> Unit:
    """The target unit named by ``unit`` ("V", "mA", "kohm", "uF", "Vpp", "ratio" ...)."""
    text = _normalise(unit).replace(" ", "")
    found = _lookup_unit(text)
    if not found:
        raise ValueError(f"unknown unit {unit!r}")
    return found[0]


def dimension_of(unit: str) -> str:
    """The dimension of a unit: 'voltage', 'current', 'resistance', ... or 'ratio'."""
    return resolve_unit(unit).dimension


def convert(value: float, from_unit: str, to_unit: str) -> float:
    """``value`` in ``from_unit`` expressed in ``to_unit`` (same dimension, else InputError)."""
    src, dst = resolve_unit(from_unit), resolve_unit(to_unit)
    if src.dimension != dst.dimension:
        raise InputError(f"cannot convert {DIMENSIONS[src.dimension][0]} ({from_unit}) "
                         f"into {DIMENSIONS[dst.dimension][0]} ({to_unit})")
    return float(Decimal(repr(float(value))).scaleb(src.exponent - dst.exponent))


def _normalise(text: str) -> str:
    return (text.replace("µ", "u").replace("μ", "u").replace("Ω", "ohm").replace("Ω", "ohm")
            .replace("×", "x"))


def _fail_unknown(raw: str, target: Unit) -> InputError:
    what, _, examples = DIMENSIONS[target.dimension]
    return InputError(f"cannot read {raw!r} as {what}",
                      hint=f"type a number with an optional unit, for example {examples}")


def _fail_dimension(raw: str, target: Unit, seen: Unit) -> InputError:
    what, symbols, examples = DIMENSIONS[target.dimension]
    if seen.dimension == target.dimension:  # same dimension, other qualifier
        wanted = "a peak-to-peak voltage (Vpp)" if target.qualifier == "pp" else \
            "a DC or RMS voltage (V)"
        got = "a peak-to-peak reading" if seen.qualifier == "pp" else "an RMS or DC reading"
        return InputError(f"expected {wanted}, got {got}: {raw!r}",
                          hint="read ripple peak-to-peak on a scope; an RMS reading of a sine "
                               "is 2.83 times smaller than peak-to-peak")
    return InputError(f"expected {what} ({symbols}), got {DIMENSIONS[seen.dimension][0]}: "
                      f"{raw!r}", hint=f"for example {examples}")


def _finish(raw: str, number: Decimal, seen: Unit, target: Unit) -> float:
    # "V" means DC or RMS volts; "Vpp" peak-to-peak: a plain "V" suffix suits either
    clash = (target.qualifier == "pp" and seen.qualifier == "rms") or \
        (target.qualifier != "pp" and seen.qualifier == "pp")
    if seen.dimension != target.dimension or clash:
        raise _fail_dimension(raw, target, seen)
    try:
        value = float(number.scaleb(seen.exponent - target.exponent))
    except (InvalidOperation, OverflowError):
        value = math.inf
    if not math.isfinite(value):
        raise InputError(f"{raw!r} is too large to be a reading",
                         hint="check the number and its prefix")
    return value


def _suffix_unit(raw: str, suffix: str, target: Unit) -> Unit:
    """The unit a typed suffix names, preferring the target's dimension."""
    suffix = "".join(suffix.split())
    if suffix == "":
        return target
    if suffix.lower() == "mhz" and suffix.startswith("m"):
        raise InputError(f"{raw!r} would be millihertz",
                         hint="write MHz (capital M) for megahertz, or kHz")
    found = _lookup_unit(suffix)
    for unit in found:
        if unit.dimension == target.dimension:
            return unit
    if target.dimension != "ratio" and suffix in _PREFIXES:
        # prefix only ("100n", "4k"): the SI unit of the target's dimension with that prefix
        return Unit(target.dimension, _PREFIXES[suffix], target.qualifier)
    if found:
        raise _fail_dimension(raw, target, found[0])
    raise _fail_unknown(raw, target)


def _parse_rkm(raw: str, text: str, target: Unit) -> float | None:
    m = _RKM.match(text)
    if not m:
        return None
    sign, whole, letter, frac, tail = m.groups()
    if not whole and not frac:
        return None
    if not frac and letter not in "Rr":
        return None          # "100n" is a number with a prefix: the general path reads it
    exp, dim = RKM_LETTERS[letter]
    number = Decimal(f"{sign}{whole or '0'}.{frac or '0'}")
    if dim is not None:
        seen = Unit(dim, exp)
        if "".join(tail.split()) and not any(
                u.dimension == dim and u.exponent == 0 for u in _lookup_unit("".join(tail.split()))):
            raise _fail_unknown(raw, target)
        return _finish(raw, number, seen, target)
    tail = "".join(tail.split())
    if tail:
        units = [u for u in _lookup_unit(tail) if u.exponent == 0]
        if not units:
            raise _fail_unknown(raw, target)
        match = next((u for u in units if u.dimension == target.dimension), units[0])
        return _finish(raw, number, Unit(match.dimension, exp, match.qualifier), target)
    if target.dimension == "ratio":
        raise _fail_unknown(raw, target)
    return _finish(raw, number, Unit(target.dimension, exp, target.qualifier), target)


def _decimal_comma(raw: str, text: str) -> str:
    if "," not in text:
        return text
    if text.count(",") > 1 or "." in text:
        raise InputError(f"cannot read {raw!r}: use one decimal mark",
                         hint="write 1200 or 12.6 (or 12,6), without thousands separators")
    if _AMBIGUOUS_COMMA.match(text):
        raise InputError(f"{raw!r} is ambiguous: the comma could be a decimal mark or a "
                         "thousands separator", hint="write the number without the comma, "
                         "or with a decimal point")
    return text.replace(",", ".")


OVER_RANGE_WORDS = frozenset({"ol", "o.l", "o.l.", "open", "inf", "infinite", "infinity", "\u221e",
                              "over range", "over-range", "overrange"})
"""What a technician types for an ohmmeter past its top range: a digital meter's "OL", a
needle resting at infinity, or simply "open" (trade usage)."""


def reads_open(unit: str) -> bool:
    """Whether a reading in ``unit`` can be an open circuit typed as a word: resistances only
    (an over-range volts reading means the meter needs a higher range, not an answer)."""
    try:
        return resolve_unit(unit).dimension == "resistance"
    except ValueError:
        return False


def over_range(text: str, unit: str) -> bool:
    """True when ``text`` is an over-range word (:data:`OVER_RANGE_WORDS`) on a reading that
    :func:`reads_open`: an open circuit, above any band."""
    return reads_open(unit) and str(text or "").strip().lower() in OVER_RANGE_WORDS


def parse_reading(text: str, unit: str) -> float:
    """Parse what a technician typed into a float in ``unit``; InputError when it cannot."""
    target = resolve_unit(unit)
    if not isinstance(text, str):
        raise InputError("a reading must be text", hint="type a number with an optional unit")
    raw = text.strip()
    if not raw:
        raise InputError("no reading was typed", hint=f"for example {DIMENSIONS[target.dimension][2]}")
    if len(raw) > MAX_TEXT:
        raise InputError(f"a reading of {len(raw)} characters is too long",
                         hint=f"for example {DIMENSIONS[target.dimension][2]}")
    shown = raw if raw.isprintable() else raw.encode("unicode_escape").decode("ascii")
    text = _decimal_comma(shown, _normalise(raw))
    if target.dimension == "ratio":
        text = text[:-1].rstrip() if text.endswith("x") else text     # "28x"
        m = _RATIO.match(text)
        if m:
            den = Decimal(m.group(2))
            if den == 0:
                raise InputError(f"{shown!r} divides by zero", hint="write a ratio such as 28:1")
            return _finish(shown, Decimal(m.group(1)) / den, target, target)
        if text.endswith("%"):
            m = _NUMBER.match(text[:-1].rstrip())
            if m and not m.group(3):
                return _finish(shown, Decimal(m.group(1) + m.group(2)).scaleb(-2), target, target)
            raise _fail_unknown(shown, target)
    value = _parse_rkm(shown, text, target)
    if value is not None:
        return value
    m = _NUMBER.match(text)
    if not m:
        raise _fail_unknown(shown, target)
    sign, number, suffix = m.groups()
    seen = _suffix_unit(shown, suffix, target)
    return _finish(shown, Decimal(sign + number), seen, target)


# --- formatting ---------------------------------------------------------------------

_DISPLAY: dict[str, tuple[str, tuple[tuple[str, int], ...]]] = {
    "voltage": ("V", (("µ", -6), ("m", -3), ("", 0), ("k", 3))),
    "current": ("A", (("µ", -6), ("m", -3), ("", 0))),
    "resistance": ("Ω", (("", 0), ("k", 3), ("M", 6))),
    "capacitance": ("F", (("p", -12), ("n", -9), ("µ", -6))),
    "inductance": ("H", (("µ", -6), ("m", -3), ("", 0))),
    "frequency": ("Hz", (("", 0), ("k", 3), ("M", 6), ("G", 9))),
    "power": ("W", (("m", -3), ("", 0))),
    "time": ("s", (("µ", -6), ("m", -3), ("", 0))),
    "length": ("m", (("", 0),)),
    "ratio": ("", (("", 0),)),
}


def _significant(value: float, digits: int) -> str:
    """``value`` rounded to ``digits`` significant digits, in plain notation where sensible."""
    text = f"{value:.{digits}g}"
    if "e" in text and 1e-4 <= abs(value) < 1e6:
        text = f"{float(text):f}".rstrip("0").rstrip(".")
    return text


def format_reading(value: float, unit: str, digits: int = 3) -> str:
    """Human display of ``value`` (in ``unit``): 4700 ohm -> '4.7 kΩ', 4.7e-5 F -> '47 µF'."""
    target = resolve_unit(unit)
    digits = max(1, int(digits))
    if not math.isfinite(value):
        return "not a number" if math.isnan(value) else ("-" if value < 0 else "") + "infinite"
    symbol, prefixes = _DISPLAY[target.dimension]
    if target.qualifier == "pp":
        symbol = "Vpp"
    base = float(Decimal(repr(float(value))).scaleb(target.exponent))
    if base == 0:
        return f"0 {symbol}".rstrip()
    chosen = 0
    for i, (_, exp) in enumerate(prefixes):
        if abs(base) >= 10.0 ** exp:
            chosen = i
    name, exp = prefixes[chosen]
    mantissa = float(Decimal(repr(base)).scaleb(-exp))
    if abs(float(_significant(mantissa, digits))) >= 1000 and chosen + 1 < len(prefixes):
        name, exp = prefixes[chosen + 1]
        mantissa = float(Decimal(repr(base)).scaleb(-exp))
    return f"{_significant(mantissa, digits)} {name}{symbol}".rstrip()
