"""One lint run's record: the findings, the report, and the recorder the rules write to.

A :class:`Finding` names file, line and node, with a hint; :class:`LintReport` is what
``faultwise lint`` prints (``text()`` and ``to_json()`` forms). :class:`LintRun` holds the
knowledge, the findings so far (each reported once) and, per family, a matcher of the
expectation names the sets of that family have (``heater.<role>.v`` stands for one name per
part), or None when the names are not available. The rules live in
:mod:`faultwise.graph.lint` (node content), :mod:`faultwise.graph.lint_routes` (routes and
walks) and :mod:`faultwise.graph.lint_text` (what nodes say).
"""

from __future__ import annotations

import re
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field
from pathlib import Path

from faultwise.graph.knowledge import Knowledge
from faultwise.graph.nodes import FAMILIES, Node

NamesFn = Callable[[str], Iterable[str]]


@dataclass(frozen=True)
class Finding:
    """One problem in the knowledge, located."""

    file: str
    line: int | None
    node: str | None
    message: str
    hint: str = ""

    def text(self) -> str:
        """``file:line: node 'id': message. Hint.``"""
        where = self.file + (f":{self.line}" if self.line else "")
        out = f"{where}: " + (f"node '{self.node}': " if self.node else "")
        out += self.message.rstrip(".") + "."
        if self.hint:
            hint = self.hint.rstrip(".")
            out += " " + hint[:1].upper() + hint[1:] + "."
        return out

    def to_json(self) -> dict:
        return {"file": self.file, "line": self.line, "node": self.node,
                "message": self.message, "hint": self.hint}


@dataclass(frozen=True)
class LintReport:
    errors: list[Finding]
    warnings: list[Finding]
    summary: dict = field(default_factory=dict)

    @property
    def ok(self) -> bool:
        return not self.errors

    def summary_line(self) -> str:
        s = self.summary
        n = len(self.warnings)
        return (f"knowledge OK: {s.get('nodes', 0)} nodes ({s.get('checks', 0)} checks, "
                f"{s.get('suspects', 0)} suspect lists, {s.get('faults', 0)} faults, "
                f"{s.get('escalations', 0)} escalations), {s.get('symptoms', 0)} symptoms, "
                f"{s.get('cautions', 0)} cautions; {n} warning{'' if n == 1 else 's'}")

    def to_json(self) -> dict:
        return {"errors": [f.to_json() for f in self.errors],
                "warnings": [f.to_json() for f in self.warnings],
                "summary": dict(self.summary)}


def name_matcher(names: Iterable[str]) -> Callable[[str], bool]:
    """Exact names, plus ``heater.<role>.v``-style names where ``<...>`` stands for one part."""
    exact = set()
    patterns = []
    for name in names:
        if "<" in name:
            parts = re.split(r"<[^>]*>", name)
            patterns.append(re.compile("^" + "[a-z0-9_-]+".join(map(re.escape, parts)) + "$"))
        else:
            exact.add(name)
    return lambda n: n in exact or any(p.match(n) for p in patterns)


class LintRun:
    """One lint run: the knowledge, the findings so far, and how a rule records one."""

    def __init__(self, k: Knowledge, names: NamesFn | None) -> None:
        self.k = k
        self.errors: list[Finding] = []
        self.warnings: list[Finding] = []
        self._seen: set[tuple[str | Path, int | None, str | None, str]] = set()
        self.known = self._matchers(names)

    def _matchers(self, names: NamesFn | None) -> dict[str, Callable[[str], bool]] | None:
        if names is None:
            from faultwise.expect.expected import expectation_names as names
        out = {}
        try:
            for family in FAMILIES:
                out[family] = name_matcher(names(family))
        except NotImplementedError:
            self.warn(str(self.k.root), None, None, "expectation names are not available yet, "
                      "so 'expect' and signature names were not checked",
                      "run lint again once faultwise.expect.expected.expectation_names exists")
            return None
        return out

    # -- recording
    def _add(self, into: list[Finding], file: str | Path, line: int | None, node: str | None,
             message: str, hint: str) -> None:
        key = (file, line, node, message)
        if key not in self._seen:
            self._seen.add(key)
            into.append(Finding(str(file), line, node, message, hint))

    def error(self, file: str | Path, line: int | None, node: str | None, message: str,
              hint: str = "") -> None:
        """Record an error (once per file, line, node and message)."""
        self._add(self.errors, file, line, node, message, hint)

    def warn(self, file: str | Path, line: int | None, node: str | None, message: str,
             hint: str = "") -> None:
        """Record a warning (once per file, line, node and message)."""
        self._add(self.warnings, file, line, node, message, hint)

    def at(self, node: Node, message: str, hint: str = "",
           warning: bool = False) -> None:
        """Record a finding located at a node's file and line."""
        where = node.where
        (self.warn if warning else self.error)(where.file if where else "", where.line
                                                if where else None, node.id, message, hint)
