"""Typed, located field access for set profiles: the schema's keys and the profile reader.

:class:`ProfileReader` reads one profile mapping and raises ProfileError located by file,
line and key; it also records which dotted keys were filled with a typical value. Used by
:mod:`faultwise.profile.model` and the section readers (:mod:`faultwise.profile.sections`,
:mod:`faultwise.profile.lineup`).
"""

from __future__ import annotations

import math
from collections.abc import Collection, Iterable
from typing import TypeVar

from faultwise.core.errors import InputError, ProfileError
from faultwise.core.safe_text import one_line

T = TypeVar("T")

_UNIT_OF_SUFFIX = (("_khz", "kHz"), ("_ohm", "ohm"), ("_uf", "uF"), ("_pf", "pF"),
                   ("_uh", "uH"), ("_hz", "Hz"), ("_ma", "mA"), ("_v", "V"), ("_a", "A"))
TOP_KEYS = ("format", "label", "family", "mains", "battery", "band", "if_khz", "gang",
            "tubes", "heater_winding_v", "supply", "audio", "transistors", "output_stage",
            "typical")
SECTION_KEYS = {
    "mains": ("volts_v", "freq_hz"), "battery": ("volts_v",), "band": ("low_khz", "high_khz"),
    "gang": ("min_pf", "max_pf", "stray_pf"),
    "supply": ("rectifier", "circuit", "surge_ohm", "first_cap_uf", "filter_ohm",
               "second_cap_uf", "load_ma", "filter_load_ma", "secondary_v"),
    "audio": ("speaker_ohm", "output_turns_ratio"),
}
TUBE_KEYS = ("role", "type", "heater_v", "heater_a", "cathode_ohm", "cathode_ma", "plate_ohm",
             "screen_ohm", "grid_ohm", "supply")
TUBE_SUPPLY_POINTS = ("first", "second")
"""Where a tube's plate load returns: the first or the second filter capacitor."""
TRANSISTOR_KEYS = ("role", "material", "polarity", "beta", "bias")
BIAS_KEYS = ("top_ohm", "bottom_ohm", "emitter_ohm", "collector_ohm")


def unit_for(key: str) -> str:
    for suffix, unit in _UNIT_OF_SUFFIX:
        if key.endswith(suffix):
            return unit
    return "ratio"


def nearest(word: object, choices: Iterable[str], cutoff: float = 60) -> str | None:
    """The choice closest to ``word`` (rapidfuzz ratio of at least ``cutoff``), or None."""
    from rapidfuzz import fuzz, process

    found = process.extractOne(str(word), list(choices), scorer=fuzz.ratio, score_cutoff=cutoff)
    return found[0] if found else None


class ProfileReader:
    """Reads one profile mapping, raising ProfileError located by file, line and key."""

    def __init__(self, source: str) -> None:
        self.source = source
        self.typical: set[str] = set()

    # errors and lines
    def error(self, message: str, key: str | None, line: int | None, hint: str) -> ProfileError:
        return ProfileError(one_line(message), file=self.source, line=line,
                            key=one_line(key) if key else None, hint=one_line(hint))

    @staticmethod
    def line(container: object, key: object = None) -> int | None:
        from faultwise.core.yamlload import line_of

        if key is None:
            line = getattr(container, "line", 0)
            return line or None
        return line_of(container, key) or ProfileReader.line(container)

    # structure
    def mapping(self, data: object, path: str, line: int | None) -> dict:
        if data is None:
            return {}
        if not isinstance(data, dict):
            raise self.error(f"{path or 'the profile'} must be a mapping, not {what_of(data)}",
                             path or None, line,
                             "write key: value pairs (see the contract in DESIGN section 4)")
        return data

    def sequence(self, data: object, path: str, line: int | None) -> list:
        if data is None:
            return []
        if not isinstance(data, list):
            raise self.error(f"{path} must be a list, not {what_of(data)}", path, line,
                             "write one '- {role: ..., ...}' item per stage")
        return data

    def keys(self, data: dict, allowed: Collection[str], path: str) -> None:
        for key in data:
            if key not in allowed:
                near = nearest(key, allowed)
                hint = f"the nearest valid key is '{near}'" if near else \
                    "valid keys here: " + ", ".join(allowed)
                raise self.error(f"unknown key '{key}'", join_key(path, str(key)),
                                 self.line(data, key), hint)

    def forbid(self, data: dict, key: str, path: str, why: str, hint: str) -> None:
        if data.get(key) is not None:
            raise self.error(f"'{key}' does not apply: {why}", join_key(path, key),
                             self.line(data, key), hint)

    # values
    def number(self, data: dict, key: str, path: str, *, minimum: float = 0.0,
               strict: bool = True) -> float | None:
        """A number in the key's unit; ``strict``: must be above ``minimum``, else at least."""
        value = data.get(key)
        dotted = join_key(path, key)
        line = self.line(data, key)
        unit = unit_for(key)
        if value is None:
            return None
        if isinstance(value, bool) or isinstance(value, (list, dict)):
            raise self.error(f"{key} must be a number, not {what_of(value)}", dotted, line,
                             f"write a number in {unit}" + (" or text with a unit"
                                                            if unit != "ratio" else ""))
        if isinstance(value, str):
            from faultwise.core.units import parse_reading

            try:
                number = parse_reading(value, unit)
            except InputError as exc:
                raise self.error(exc.message, dotted, line,
                                 exc.hint or f"write a number in {unit}") from None
        elif isinstance(value, (int, float)):
            try:
                number = float(value)
            except OverflowError:
                number = math.inf
        else:
            raise self.error(f"{key} must be a number, not {what_of(value)}", dotted, line,
                             f"write a number in {unit}")
        if not math.isfinite(number):
            raise self.error(f"{key} must be a finite number", dotted, line,
                             f"write a number in {unit}")
        if strict and number <= minimum or not strict and number < minimum:
            bound = "above" if strict else "at least"
            raise self.error(f"{key} must be {bound} {minimum:g}, not {number:g}", dotted, line,
                             "check the value and its unit")
        return number

    def text(self, data: dict, key: str, path: str, required: bool = False) -> str | None:
        value = data.get(key)
        dotted = join_key(path, key)
        if value is None:
            if required:
                raise self.error(f"missing '{key}'", dotted, self.line(data),
                                 f"give {key} (it is required)")
            return None
        if isinstance(value, bool) or not isinstance(value, (str, int, float)):
            raise self.error(f"{key} must be text, not {what_of(value)}", dotted,
                             self.line(data, key), f"write {key} as plain text")
        text = str(value).strip()
        if not text:
            raise self.error(f"{key} is empty", dotted, self.line(data, key), f"write {key}")
        return text

    def choice(self, data: dict, key: str, path: str, choices: Collection[str],
               required: bool = False) -> str | None:
        value = data.get(key)
        if value is None and not required:
            return None
        text = self.text(data, key, path, required=required)
        low = text.lower()
        if low not in choices:
            near = nearest(low, choices)
            hint = "use one of " + ", ".join(choices) + (f" (the nearest is '{near}')"
                                                         if near else "")
            raise self.error(f"unknown {key} '{text}'", join_key(path, key), self.line(data, key),
                             hint)
        return low

    def fill(self, value: T | None, typical_value: T, dotted: str) -> T:
        """``value`` if given, else ``typical_value`` with ``dotted`` marked typical."""
        if value is not None:
            return value
        self.typical.add(dotted)
        return typical_value


def what_of(value: object) -> str:
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, dict):
        return "a mapping"
    if isinstance(value, str):
        return f"the text '{value[:40]}'"
    return repr(value)[:40]


def join_key(path: str, key: str) -> str:
    return f"{path}.{key}" if path else key


def item_line(rows: object, i: int) -> int | None:
    from faultwise.core.yamlload import line_of

    return line_of(rows, i)
