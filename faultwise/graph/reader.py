"""Typed, located field access for knowledge files, collecting problems instead of stopping.

:class:`KnowledgeReader` reads one raw mapping and reports each problem located at its key
into :class:`Problems`, so that one run of the loader reports them all; :class:`LoadNote`
is what the loader noticed that is not an error. Used by :mod:`faultwise.graph.parse`
(graph files) and :mod:`faultwise.graph.knowledge_parse` (symptoms, cautions, learned counts).
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Mapping

from faultwise.core.errors import FaultwiseError, KnowledgeError
from faultwise.graph.nodes import FAMILIES
from faultwise.core.yamlload import load_yaml_file

ID_RE = re.compile(r"^[a-z0-9][a-z0-9_.-]*$")


@dataclass(frozen=True)
class LoadNote:
    """Something the loader noticed that is not an error (lint shows it as a warning)."""

    file: str
    line: int | None
    node: str | None
    message: str
    hint: str = ""
    code: str = ""           # what lint keys on: "no-minutes", "no-parts"


class Problems:
    """Collects structural problems so that one run reports them all."""

    def __init__(self) -> None:
        self.errors: list[KnowledgeError] = []
        self.notes: list[LoadNote] = []

    def add(self, message: str, *, file: str, line: int | None = None, node: str | None = None,
            key: str | None = None, hint: str | None = None) -> None:
        self.errors.append(KnowledgeError(message, file=file, line=line, node=node, key=key,
                                          hint=hint))

    def note(self, message: str, *, file: str, line: int | None, node: str | None,
             hint: str = "", code: str = "") -> None:
        self.notes.append(LoadNote(file, line, node, message, hint, code))


def key_line(container: object, key: object) -> int | None:
    try:
        return container.line_of(key) or None
    except AttributeError:
        return None


def own_line(container: object) -> int | None:
    return getattr(container, "line", None) or None


def is_number(value: object) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def kind_name(value: object) -> str:
    """What a YAML value is, in words: 'a mapping', 'a list', 'a number', 'true/false'."""
    if isinstance(value, dict):
        return "a mapping"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, bool):
        return "true/false"
    if is_number(value):
        return "a number"
    return "text" if isinstance(value, str) else "empty"


def key_text(key: object) -> str:
    """Why a mapping key is not text: YAML 1.1 reads yes/no/on/off as booleans."""
    if isinstance(key, bool):
        return (f"the key '{key}' was read as {str(key).lower()} "
                "(yes/no/on/off are booleans in YAML)")
    return f"the key '{key}' is not text"


class KnowledgeReader:
    """Typed field access on one raw mapping, reporting problems located at the key."""

    def __init__(self, raw: Mapping, file: str, node: str | None, problems: Problems) -> None:
        self.raw, self.file, self.node, self.p = raw, file, node, problems

    def line(self, key: str | None = None) -> int | None:
        return key_line(self.raw, key) if key is not None else own_line(self.raw)

    def bad(self, key: str | None, message: str, hint: str) -> None:
        self.p.add(message, file=self.file, line=self.line(key), node=self.node, key=key,
                   hint=hint)

    def has(self, key: str) -> bool:
        return key in self.raw and self.raw[key] is not None

    def text(self, key: str, *, required: bool = False, default: str = "") -> str:
        value = self.raw.get(key)
        if value is None:
            if required:
                self.bad(None, f"the required field '{key}' is missing",
                         f"add '{key}:' with a short text")
            return default
        if isinstance(value, bool) or not isinstance(value, (str, int, float)):
            self.bad(key, f"'{key}' must be text, not {kind_name(value)}",
                     "write it as plain text; quote it if it holds ': ' or starts with "
                     "a special character")
            return default
        return str(value).strip()

    def texts(self, key: str) -> tuple[str, ...]:
        value = self.raw.get(key)
        if value is None:
            return ()
        if not isinstance(value, list):
            self.bad(key, f"'{key}' must be a list, not {kind_name(value)}",
                     f"write '{key}: [first, second]' or one '- item' per line")
            return ()
        out = []
        for i, item in enumerate(value):
            if isinstance(item, bool) or not isinstance(item, (str, int, float)):
                line = value.line_of(i) if hasattr(value, "line_of") else self.line(key)
                hint = ("YAML read it as a mapping because it holds ': '; put the whole item in "
                        "quotes" if isinstance(item, dict) else "write each item as plain text")
                self.p.add(f"item {i + 1} of '{key}' must be text", file=self.file, line=line,
                           node=self.node, key=key, hint=hint)
                continue
            out.append(str(item).strip())
        return tuple(out)

    def number(self, key: str, default: float | None = None) -> float | None:
        value = self.raw.get(key)
        if value is None:
            return default
        if not is_number(value) or value < 0 or value != value:
            self.bad(key, f"'{key}' must be a number of zero or more, not {value!r}",
                     "write a plain number such as 2 or 0.5")
            return default
        return float(value)

    def mapping(self, key: str) -> Mapping | None:
        value = self.raw.get(key)
        if value is None:
            return None
        if not isinstance(value, dict):
            self.bad(key, f"'{key}' must be a mapping, not {kind_name(value)}",
                     f"write '{key}: {{name: value, ...}}'")
            return None
        return value

    def families(self, default: tuple[str, ...]) -> tuple[str, ...]:
        if "families" not in self.raw:
            return default
        names = self.texts("families")
        if not names and isinstance(self.raw.get("families"), list):
            self.bad("families", "'families' is empty", "list at least one family or leave it out")
            return default
        for name in names:
            if name not in FAMILIES:
                self.bad("families", f"unknown family '{name}'",
                         "use " + ", ".join(FAMILIES))
        good = tuple(f for f in FAMILIES if f in names)
        return good or default

    def unknown_keys(self, allowed: frozenset[str], what: str) -> None:
        for key in self.raw:
            if not isinstance(key, str):
                self.p.add(key_text(key), file=self.file, line=key_line(self.raw, key),
                           node=self.node, hint="quote the key")
            elif key not in allowed:
                self.bad(key, f"unknown key '{key}' in {what}",
                         "use only " + ", ".join(sorted(allowed)))


def read_yaml(path: Path, problems: Problems) -> Any:
    """The parsed file, or None with its located problem recorded."""
    try:
        return load_yaml_file(path)
    except FaultwiseError as exc:
        problems.add(exc.message, file=exc.file or str(path), line=exc.line, key=exc.key,
                     hint=exc.hint)
        return None

