"""The built-in receiving-tube table (``<knowledge>/tubes.yaml``): heater ratings and more.

``load_tube_table()`` reads and validates the table (cached per file), ``lookup()`` finds a
type by name, forgiving case, spaces and hyphens, the other designations an entry lists
under ``also``, and the G / GT / GTA envelope variants of a type (50L6 -> 50L6GT), which
share the heater of the type they vary.
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Any

from faultwise.core.errors import FaultwiseError, KnowledgeError

FORMAT = "faultwise-tubes/1"
BASES = ("7-pin miniature", "9-pin miniature", "octal", "loctal", "4-pin", "6-pin")
RECTIFIER_CIRCUITS = ("half-wave", "full-wave", "doubler")
ROLE_HINTS = ("rf", "converter", "mixer", "oscillator", "if", "detector", "audio", "output",
              "rectifier")

_ENTRY_KEYS = {"type", "also", "heater_v", "heater_a", "series_ma", "dial_tap_v", "base",
               "kind", "roles", "source", "note", "rectifier", "operation", "pins", "pins_source"}
ELECTRODES = ("heater", "cathode", "cathode2", "grid", "screen", "suppressor", "plate", "plate2",
              "osc_grid", "osc_plate", "signal_grid", "diode1", "diode2", "diode3")
"""Electrode names of a pin map (``pins:``): a pin number, ``cap`` (top cap) or a list."""
BASE_PINS = {"7-pin miniature": 7, "9-pin miniature": 9, "octal": 8, "loctal": 8, "4-pin": 4,
             "6-pin": 6}
_RECT_KEYS = {"circuit", "drop_v", "drop_at_ma", "max_dc_ma", "max_first_cap_uf",
              "min_surge_ohm", "source"}
_OP_KEYS = {"plate_v", "screen_v", "grid_v", "plate_ma", "screen_ma", "load_ohm", "power_w",
            "cathode_ohm", "cathode_ma", "source"}
_VARIANT = re.compile(r"^([0-9]+[A-Z]+[0-9]+)(G|GT|GTA)?$")


@dataclass(frozen=True)
class RectifierData:
    """What the rectifier model needs: drop_v at drop_at_ma, limits where known."""

    circuit: str
    source: str
    drop_v: float | None = None
    drop_at_ma: float | None = None
    max_dc_ma: float | None = None
    max_first_cap_uf: float | None = None
    min_surge_ohm: float | None = None


@dataclass(frozen=True)
class Operation:
    """One typical class-A operating point with cathode bias (output types)."""

    plate_v: float
    screen_v: float
    grid_v: float
    plate_ma: float
    screen_ma: float
    load_ohm: float
    power_w: float
    cathode_ohm: float
    cathode_ma: float
    source: str


@dataclass(frozen=True)
class TubeType:
    name: str
    heater_v: float
    heater_a: float
    base: str
    kind: str
    roles: tuple[str, ...]
    source: str
    also: tuple[str, ...] = ()
    series_ma: float | None = None
    dial_tap_v: float | None = None
    note: str | None = None
    rectifier: RectifierData | None = None
    operation: Operation | None = None
    pins: tuple[tuple[str, tuple], ...] = ()      # (electrode, (pin, ...)) in table order
    pins_source: str | None = None

    def pin(self, electrode: str) -> tuple:
        """The pins of an electrode (numbers or 'cap'), () when the map has none."""
        return dict(self.pins).get(electrode, ())

    @property
    def is_rectifier(self) -> bool:
        return self.rectifier is not None


def normalise_name(name: str) -> str:
    """Upper case, without spaces, hyphens or slashes: '50l6-gt' -> '50L6GT'."""
    return re.sub(r"[\s\-/]+", "", str(name)).upper()


def _stem(name: str) -> str:
    m = _VARIANT.match(name)
    return m.group(1) if m else name


class TubeTable(dict):
    """``{canonical name: TubeType}`` with an index of every accepted spelling."""

    def __init__(self, entries: dict[str, TubeType]) -> None:
        super().__init__(entries)
        self.index: dict[str, str] = {}
        self.stems: dict[str, list[str]] = {}
        for name, tube in entries.items():
            for alias in (name, *tube.also):
                self.index[normalise_name(alias)] = name
                self.stems.setdefault(_stem(normalise_name(alias)), []).append(name)


def lookup(name: str, table: dict[str, TubeType]) -> TubeType | None:
    """The table's entry for ``name`` (case, spaces, ``also`` and G/GT/GTA variants), else None."""
    if not isinstance(name, str) or not name.strip():
        return None
    if not isinstance(table, TubeTable):
        table = TubeTable(dict(table))
    key = normalise_name(name)
    if key in table.index:
        return table[table.index[key]]
    stem = _stem(key)
    if stem == key and not _VARIANT.match(key):
        return None
    names = sorted(set(table.stems.get(stem, [])))
    heaters = {(table[n].heater_v, table[n].heater_a) for n in names}
    if len(heaters) != 1:
        return None          # unknown, or variants that differ in heater: do not guess
    return table[names[0]]


def _bad(message: str, source: str, line: int | None, key: str, hint: str) -> KnowledgeError:
    return KnowledgeError(message, file=source, line=line, key=key, hint=hint)


def _line(container: object, key: object) -> int | None:
    from faultwise.core.yamlload import line_of

    return line_of(container, key)


def _number(entry: Mapping[str, Any], key: str, where: str, source: str, *, positive: bool = True,
            required: bool = True) -> float | None:
    value = entry.get(key)
    if value is None:
        if required:
            raise _bad(f"missing {key}", source, getattr(entry, "line", None), f"{where}.{key}",
                       f"give {key} as a number")
        return None
    if isinstance(value, bool) or not isinstance(value, (int, float)) or \
            not math.isfinite(float(value)):
        raise _bad(f"{key} must be a number, not {value!r}", source, _line(entry, key),
                   f"{where}.{key}", "write a plain number in the unit that ends the key")
    if positive and value <= 0:
        raise _bad(f"{key} must be positive, not {value}", source, _line(entry, key),
                   f"{where}.{key}", "check the figure in the tube data")
    return float(value)


def _text(entry: Mapping[str, Any], key: str, where: str, source: str, required: bool = True) -> str | None:
    value = entry.get(key)
    if value is None and not required:
        return None
    if isinstance(value, int) and not isinstance(value, bool):
        value = str(value)           # the type 80 is a plain number in YAML
    if not isinstance(value, str) or not value.strip():
        raise _bad(f"{key} must be text", source, _line(entry, key) or getattr(entry, "line", None),
                   f"{where}.{key}", f"give {key} as text")
    return value.strip()


def _unknown_keys(entry: Mapping[str, Any], allowed: set[str], where: str, source: str) -> None:
    for key in entry:
        if key not in allowed:
            raise _bad(f"unknown key {key!r}", source, _line(entry, key), f"{where}.{key}",
                       "use only " + ", ".join(sorted(allowed)))


def _rectifier(data: object, where: str, source: str) -> RectifierData:
    if not isinstance(data, dict):
        raise _bad("rectifier must be a mapping", source, None, where, "see the file's header")
    _unknown_keys(data, _RECT_KEYS, where, source)
    circuit = _text(data, "circuit", where, source)
    if circuit not in RECTIFIER_CIRCUITS:
        raise _bad(f"unknown rectifier circuit {circuit!r}", source, _line(data, "circuit"),
                   f"{where}.circuit", "use " + ", ".join(RECTIFIER_CIRCUITS))
    nums = {k: _number(data, k, where, source, required=False)
            for k in ("drop_v", "drop_at_ma", "max_dc_ma", "max_first_cap_uf", "min_surge_ohm")}
    if (nums["drop_v"] is None) != (nums["drop_at_ma"] is None):
        raise _bad("drop_v and drop_at_ma go together", source, getattr(data, "line", None),
                   where, "give the drop with the current it was measured at")
    return RectifierData(circuit=circuit, source=_text(data, "source", where, source), **nums)


def _operation(data: object, where: str, source: str) -> Operation:
    if not isinstance(data, dict):
        raise _bad("operation must be a mapping", source, None, where, "see the file's header")
    _unknown_keys(data, _OP_KEYS, where, source)
    nums = {k: _number(data, k, where, source, positive=(k != "grid_v"))
            for k in sorted(_OP_KEYS - {"source"})}
    return Operation(source=_text(data, "source", where, source), **nums)


def required_electrodes(kind: str, rectifier: RectifierData | None) -> tuple[str, ...]:
    """The electrodes a complete pin map of this kind names (the handbooks' base diagrams)."""
    need = ["heater", "cathode"]
    if rectifier is not None:
        return tuple(need + ["plate"] + (["plate2"] if rectifier.circuit != "half-wave" else []))
    if "twin diode" in kind:
        return tuple(need + ["cathode2", "diode1", "diode2"])
    if "converter" in kind:
        return tuple(need + ["plate", "screen", "osc_grid"]
                     + (["signal_grid"] if "pentagrid" in kind else ["grid", "osc_plate"]
                        if "triode" in kind else []))
    need += ["grid", "plate"]
    if "pentode" in kind or "beam" in kind:
        need.append("screen")
    if "duplex-diode" in kind or "triple-diode" in kind:
        need += ["diode1", "diode2"]
    if "triple-diode" in kind:
        need.append("diode3")
    return tuple(need)


def missing_electrodes(tube: TubeType) -> list[str]:
    """Electrodes a complete pin map of the type would name that its map lacks."""
    have = dict(tube.pins)
    return [e for e in required_electrodes(tube.kind, tube.rectifier) if e not in have]


def _pins(data: object, base: str, where: str, source: str) -> tuple:
    if not isinstance(data, dict):
        raise _bad("pins must be a mapping of electrode to pin", source, None, where,
                   "for example pins: {heater: [3, 4], cathode: 7, plate: 5}")
    top = BASE_PINS[base]
    out = []
    for name, value in data.items():
        if name not in ELECTRODES:
            raise _bad(f"unknown electrode {name!r}", source, _line(data, name), f"{where}.{name}",
                       "use " + ", ".join(ELECTRODES))
        values = value if isinstance(value, list) else [value]
        for v in values:
            ok = v == "cap" or (isinstance(v, int) and not isinstance(v, bool) and 1 <= v <= top)
            if not ok:
                raise _bad(f"pin {v!r} of {name} is not a pin of a {base} base", source,
                           _line(data, name), f"{where}.{name}",
                           f"give a pin number 1-{top} or cap (top cap)")
        out.append((name, tuple(values)))
    return tuple(out)


def _entry(entry: object, i: int, source: str) -> TubeType:
    where = f"tubes[{i}]"
    if not isinstance(entry, dict):
        raise _bad("each tube entry must be a mapping", source, None, where,
                   "write type, heater_v, heater_a, base, kind, roles and source")
    _unknown_keys(entry, _ENTRY_KEYS, where, source)
    name = _text(entry, "type", where, source)
    also = entry.get("also") or []
    roles = entry.get("roles")
    if not isinstance(also, list) or not all(isinstance(a, str) and a.strip() for a in also):
        raise _bad("also must be a list of type names", source, _line(entry, "also"),
                   f"{where}.also", "for example also: [6BQ5]")
    if not isinstance(roles, list) or not roles or any(r not in ROLE_HINTS for r in roles):
        raise _bad("roles must be a list of role hints", source, _line(entry, "roles"),
                   f"{where}.roles", "use " + ", ".join(ROLE_HINTS))
    base = _text(entry, "base", where, source)
    if base not in BASES:
        raise _bad(f"unknown base {base!r}", source, _line(entry, "base"), f"{where}.base",
                   "use " + ", ".join(BASES))
    rect = entry.get("rectifier")
    op = entry.get("operation")
    return TubeType(
        name=normalise_name(name), heater_v=_number(entry, "heater_v", where, source),
        heater_a=_number(entry, "heater_a", where, source), base=base,
        kind=_text(entry, "kind", where, source), roles=tuple(roles),
        source=_text(entry, "source", where, source),
        also=tuple(normalise_name(a) for a in also),
        series_ma=_number(entry, "series_ma", where, source, required=False),
        dial_tap_v=_number(entry, "dial_tap_v", where, source, required=False),
        note=_text(entry, "note", where, source, required=False),
        rectifier=None if rect is None else _rectifier(rect, f"{where}.rectifier", source),
        operation=None if op is None else _operation(op, f"{where}.operation", source),
        pins=() if entry.get("pins") is None else _pins(entry.get("pins"), base,
                                                          f"{where}.pins", source),
        pins_source=_text(entry, "pins_source", where, source, required=False))


def parse_tube_table(data: object, source: str = "<tubes>") -> TubeTable:
    """Validate loaded tube-table data; KnowledgeError with file, line and key on a fault."""
    if not isinstance(data, dict):
        raise _bad("the tube table must be a mapping", source, None, "", "write format and tubes")
    _unknown_keys(data, {"format", "tubes"}, "", source)
    if data.get("format", FORMAT) != FORMAT:
        raise _bad(f"unknown format {data.get('format')!r}", source, _line(data, "format"),
                   "format", f"write format: {FORMAT}")
    rows = data.get("tubes")
    if not isinstance(rows, list) or not rows:
        raise _bad("tubes must be a non-empty list", source, _line(data, "tubes"), "tubes",
                   "list one mapping per tube type")
    entries: dict[str, TubeType] = {}
    seen: dict[str, int] = {}
    for i, raw in enumerate(rows):
        tube = _entry(raw, i, source)
        for alias in (tube.name, *tube.also):
            if alias in seen:
                raise _bad(f"type {alias} is listed twice (also in tubes[{seen[alias]}])", source,
                           _line(rows, i), f"tubes[{i}].type", "keep one entry per type")
            seen[alias] = i
        entries[tube.name] = tube
    return TubeTable(entries)


@lru_cache(maxsize=16)
def _load_cached(path: str, mtime_ns: int, size: int) -> TubeTable:
    from faultwise.core.yamlload import load_yaml_file

    try:
        data = load_yaml_file(path)
    except KnowledgeError:
        raise
    except FaultwiseError as exc:
        raise KnowledgeError(exc.message, file=exc.file, line=exc.line, key=exc.key,
                             hint=exc.hint) from None
    return parse_tube_table(data, path)


def load_tube_table(knowledge_dir: str | Path | None = None) -> TubeTable:
    """Read ``<knowledge_dir>/tubes.yaml`` (default: the bundled knowledge), cached per file."""
    if knowledge_dir is None:
        from faultwise.core.workspace import bundled_knowledge_dir

        knowledge_dir = bundled_knowledge_dir()
    path = Path(knowledge_dir) / "tubes.yaml"
    try:
        stat = path.stat()
    except OSError:
        raise KnowledgeError("the tube table is missing", file=str(path),
                             hint="put a tubes.yaml in the knowledge folder") from None
    return _load_cached(str(path.resolve()), stat.st_mtime_ns, stat.st_size)


def workspace_tube_dir(knowledge_dir: str | Path | None) -> Path | None:
    """The knowledge folder when it carries its own ``tubes.yaml``, else None (the bundled table).

    The one rule for "which tube table does this workspace use": the walk command, the
    sweep, the expect command and every TUI screen ask here.
    """
    if knowledge_dir is None:
        return None
    folder = Path(knowledge_dir)
    return folder if (folder / "tubes.yaml").is_file() else None


def workspace_tube_table(knowledge_dir: str | Path | None) -> TubeTable | None:
    """The workspace's own tube table, or None when it has none (the bundled one applies)."""
    folder = workspace_tube_dir(knowledge_dir)
    return load_tube_table(folder) if folder is not None else None
