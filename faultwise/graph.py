"""Knowledge folder (YAML) -> :class:`Knowledge`: frozen nodes plus a networkx view on demand.

Reads ``symptoms.yaml``, ``cautions.yaml``, ``graph/*.yaml`` and the optional ``learned.yaml``
through :mod:`faultwise.yamlload` (safe, line numbers kept) and builds the model of
:mod:`faultwise.nodes` (schema: DEVELOPERS.md, "Knowledge schema"). Nothing in the files is
evaluated. Structural problems raise :class:`KnowledgeError` naming file, line and node;
the loader collects every structural problem it can before raising the first one, and
``err.problems`` lists them all (``faultwise lint`` shows them). Graph-level checks
(targets, cycles, reachability, expectation names) are :mod:`faultwise.lint`'s job.

networkx is imported only by :meth:`Knowledge.digraph` and :meth:`Knowledge.faults_under`.
"""

from __future__ import annotations

import hashlib
import re
from dataclasses import dataclass
from pathlib import Path
from types import MappingProxyType
from typing import Iterable, Mapping

from faultwise.errors import FaultwiseError, KnowledgeError
from faultwise.nodes import (CLEARED, FAMILIES, MEASURE_OUTCOMES, STAGES, Caution, Check,
                             Escalate, Fault, Investigation, Learned, Located, Node, Signature,
                             Suspects, Symptom)
from faultwise.yamlload import load_yaml_file

GRAPH_FORMAT = "faultwise-graph/1"
SYMPTOMS_FORMAT = "faultwise-symptoms/1"
CAUTIONS_FORMAT = "faultwise-cautions/1"
LEARNED_FORMAT = "faultwise-learned/1"
DEFAULT_PRIOR_STRENGTH = 10.0
DEFAULT_MINUTES = 1.0        # cost of a check that does not say (lint warns)
OTHERWISE = "otherwise"      # outcome key that routes every outcome not listed

_ID_RE = re.compile(r"^[a-z0-9][a-z0-9_.-]*$")
_COMMON = ("id", "kind", "title", "stage", "families")
KEYS = {
    "check": frozenset(_COMMON + ("how", "why", "cautions", "minutes", "expect", "choices",
                                  "normal", "outcomes", OTHERWISE, "unable", "closing")),
    "suspects": frozenset(_COMMON + ("why", "investigations", "exhausted")),
    "fault": frozenset(_COMMON + ("repair", "parts", "verify", "signature", "priors",
                                  "cautions", "notes")),
    "escalate": frozenset(_COMMON + ("advice",)),
}
INVESTIGATION_KEYS = frozenset(("target", "label", "minutes"))
SIGNATURE_KEYS = frozenset(("readings", "observations"))
GRAPH_FILE_KEYS = frozenset(("format", "stage", "families", "nodes", "title", "notes"))
SYMPTOM_KEYS = frozenset(("id", "title", "families", "entry", "phrasings"))
CAUTION_KEYS = frozenset(("id", "title", "text", "families"))
SETTINGS_KEYS = frozenset(("prior_strength",))


@dataclass(frozen=True)
class LoadNote:
    """Something the loader noticed that is not an error (lint shows it as a warning)."""

    file: str
    line: int | None
    node: str | None
    message: str
    hint: str = ""
    code: str = ""           # what lint keys on: "no-minutes", "no-parts"


class _Problems:
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


def _line(container, key) -> int | None:
    try:
        return container.line_of(key) or None
    except AttributeError:
        return None


def _own_line(container) -> int | None:
    return getattr(container, "line", None) or None


def _is_number(value) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _kind_name(value) -> str:
    """What a YAML value is, in words: 'a mapping', 'a list', 'a number', 'true/false'."""
    if isinstance(value, dict):
        return "a mapping"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, bool):
        return "true/false"
    if _is_number(value):
        return "a number"
    return "text" if isinstance(value, str) else "empty"


def _key_text(key) -> str:
    """Why a mapping key is not text: YAML 1.1 reads yes/no/on/off as booleans."""
    if isinstance(key, bool):
        return (f"the key '{key}' was read as {str(key).lower()} "
                "(yes/no/on/off are booleans in YAML)")
    return f"the key '{key}' is not text"


class _Reader:
    """Typed field access on one raw mapping, reporting problems located at the key."""

    def __init__(self, raw: Mapping, file: str, node: str | None, problems: _Problems) -> None:
        self.raw, self.file, self.node, self.p = raw, file, node, problems

    def line(self, key: str | None = None) -> int | None:
        return _line(self.raw, key) if key is not None else _own_line(self.raw)

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
            self.bad(key, f"'{key}' must be text, not {_kind_name(value)}",
                     "write it as plain text; quote it if it holds ': ' or starts with "
                     "a special character")
            return default
        return str(value).strip()

    def texts(self, key: str) -> tuple[str, ...]:
        value = self.raw.get(key)
        if value is None:
            return ()
        if not isinstance(value, list):
            self.bad(key, f"'{key}' must be a list, not {_kind_name(value)}",
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
        if not _is_number(value) or value < 0 or value != value:
            self.bad(key, f"'{key}' must be a number of zero or more, not {value!r}",
                     "write a plain number such as 2 or 0.5")
            return default
        return float(value)

    def mapping(self, key: str) -> Mapping | None:
        value = self.raw.get(key)
        if value is None:
            return None
        if not isinstance(value, dict):
            self.bad(key, f"'{key}' must be a mapping, not {_kind_name(value)}",
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
                self.p.add(_key_text(key), file=self.file, line=_line(self.raw, key),
                           node=self.node, hint="quote the key")
            elif key not in allowed:
                self.bad(key, f"unknown key '{key}' in {what}",
                         "use only " + ", ".join(sorted(allowed)))


# ---------------------------------------------------------------------------- graph nodes

def _targets_map(r: _Reader, key: str, names: tuple[str, ...]) -> dict[str, str]:
    """Parse ``outcomes``: outcome -> target, expanding ``otherwise`` over the rest."""
    raw = r.mapping(key)
    out: dict[str, str] = {}
    otherwise = r.text(OTHERWISE) if r.has(OTHERWISE) else None
    if raw is not None:
        for name, target in raw.items():
            line = _line(raw, name)
            if not isinstance(name, str):
                r.p.add(_key_text(name), file=r.file, line=line, node=r.node, key=key,
                        hint="quote the outcome name")
                continue
            if not isinstance(target, str) or not target.strip():
                r.p.add(f"outcome '{name}' must route to a node id or 'cleared'", file=r.file,
                        line=line, node=r.node, key=key, hint="write 'name: node-id'")
                continue
            if name == OTHERWISE:
                otherwise = target.strip()
            elif name not in names:
                r.p.add(f"unknown outcome '{name}'", file=r.file, line=line, node=r.node,
                        key=key, hint="the outcomes here are " + ", ".join(names) +
                        " (or 'otherwise')")
            else:
                out[name] = target.strip()
    if otherwise:
        for name in names:
            out.setdefault(name, otherwise)
    return {name: out[name] for name in names if name in out}


def _choices(r: _Reader) -> dict[str, str]:
    raw = r.mapping("choices")
    out: dict[str, str] = {}
    if raw is None:
        return out
    for name, label in raw.items():
        line = _line(raw, name)
        if not isinstance(name, str):
            r.p.add(_key_text(name), file=r.file, line=line, node=r.node, key="choices",
                    hint="quote the choice name")
            continue
        if isinstance(label, bool) or not isinstance(label, (str, int, float)):
            r.p.add(f"choice '{name}' needs a label text", file=r.file, line=line, node=r.node,
                    key="choices", hint="write 'name: what the tech sees'")
            continue
        out[name] = str(label)
    if not out:
        r.bad("choices", "an observation needs at least two choices",
              "write 'choices: {name: label, ...}'")
    return out


def _check(r: _Reader, base: dict) -> Check:
    expect = r.text("expect") or None
    has_choices = r.has("choices")
    if expect and has_choices:
        r.bad("choices", "a check is a measurement ('expect') or an observation ('choices'), "
              "not both", "keep one of them")
    if not expect and not has_choices:
        r.bad(None, "a check needs 'expect' (a measurement) or 'choices' (an observation)",
              "add 'expect: <expectation name>' or 'choices: {name: label}'")
    choices = {} if expect else _choices(r)
    names = MEASURE_OUTCOMES if expect else tuple(choices)
    if not r.has("outcomes") and not r.has(OTHERWISE):
        r.bad(None, "the required field 'outcomes' is missing",
              "add 'outcomes: {outcome: target, ...}'")
    outcomes = _targets_map(r, "outcomes", names)
    if expect:
        normal = r.text("normal", default="normal")
    else:
        normal = r.text("normal", required=True)
    minutes = r.number("minutes")
    if minutes is None:
        r.p.note("the check has no 'minutes'", file=r.file, line=r.line(), node=r.node,
                 hint=f"add 'minutes:' (the walk assumes {DEFAULT_MINUTES:g})", code="no-minutes")
        minutes = DEFAULT_MINUTES
    closing = r.raw.get("closing", False)
    if not isinstance(closing, bool):
        r.bad("closing", "'closing' must be true or false", "write 'closing: true'")
        closing = False
    return Check(**base, how=r.text("how"), why=r.text("why"), minutes=minutes,
                 outcomes=MappingProxyType(outcomes), normal=normal, expect=expect,
                 choices=MappingProxyType(choices), cautions=r.texts("cautions"),
                 unable=r.text("unable") or None, closing=closing)


def _investigations(r: _Reader) -> tuple[Investigation, ...]:
    raw = r.raw.get("investigations")
    if raw is None:
        r.bad(None, "the required field 'investigations' is missing",
              "add 'investigations:' with one '- {target: node-id}' per suspect")
        return ()
    if not isinstance(raw, list) or not raw:
        r.bad("investigations", "'investigations' must be a non-empty list",
              "write one '- {target: node-id, label: ...}' per suspect")
        return ()
    out = []
    for i, item in enumerate(raw):
        line = raw.line_of(i) if hasattr(raw, "line_of") else r.line("investigations")
        if isinstance(item, str) and item.strip():
            out.append(Investigation(target=item.strip()))
            continue
        if not isinstance(item, dict):
            r.p.add(f"investigation {i + 1} must be a mapping with 'target'", file=r.file,
                    line=line, node=r.node, key="investigations",
                    hint="write '- {target: node-id, label: ...}'")
            continue
        sub = _Reader(item, r.file, r.node, r.p)
        sub.unknown_keys(INVESTIGATION_KEYS, "an investigation")
        target = sub.text("target")
        if not target:
            r.p.add(f"investigation {i + 1} has no 'target'", file=r.file, line=line,
                    node=r.node, key="investigations", hint="add 'target: node-id'")
            continue
        out.append(Investigation(target=target, label=sub.text("label"),
                                 minutes=sub.number("minutes")))
    return tuple(out)


def _signature(r: _Reader) -> Signature:
    raw = r.mapping("signature")
    if raw is None:
        return Signature()
    sub = _Reader(raw, r.file, r.node, r.p)
    sub.unknown_keys(SIGNATURE_KEYS, "a signature")
    readings: dict = {}
    for name, value in (sub.mapping("readings") or {}).items():
        line = _line(raw.get("readings"), name)
        if not isinstance(name, str):
            r.p.add(_key_text(name), file=r.file, line=line, node=r.node, key="readings",
                    hint="write the expectation name")
        elif _is_number(value):
            readings[name] = float(value)
        elif isinstance(value, str) and value in MEASURE_OUTCOMES:
            readings[name] = value
        else:
            r.p.add(f"reading '{name}' must be one of {', '.join(MEASURE_OUTCOMES)} or a "
                    f"number, not {value!r}", file=r.file, line=line, node=r.node,
                    key="readings", hint="write e.g. 'supply.rectifier_out_v: low'")
    observations: dict = {}
    for name, value in (sub.mapping("observations") or {}).items():
        line = _line(raw.get("observations"), name)
        if not isinstance(name, str) or not isinstance(value, str):
            r.p.add(f"observation '{name}' must map a check id to one of its choices",
                    file=r.file, line=line, node=r.node, key="observations",
                    hint="write 'check-id: choice' (quote yes/no)")
            continue
        observations[name] = value
    return Signature(readings=MappingProxyType(readings),
                     observations=MappingProxyType(observations))


def _priors(r: _Reader) -> dict[str, float]:
    out: dict[str, float] = {}
    raw = r.mapping("priors")
    for name, weight in (raw or {}).items():
        line = _line(raw, name)
        if not isinstance(name, str) or not _is_number(weight) or weight < 0:
            r.p.add(f"prior '{name}' must map a symptom id to a weight of zero or more",
                    file=r.file, line=line, node=r.node, key="priors",
                    hint="write 'symptom-id: 20'")
            continue
        out[name] = float(weight)
    return out


def _node(raw, file: str, stage: str, families: tuple[str, ...], problems: _Problems,
          index: int, list_line: int | None) -> Node | None:
    if not isinstance(raw, dict):
        problems.add(f"node {index + 1} is not a mapping", file=file, line=list_line,
                     hint="write each node as '- id: ...' with its fields indented")
        return None
    node_id = raw.get("id")
    r = _Reader(raw, file, node_id if isinstance(node_id, str) else None, problems)
    if not isinstance(node_id, str) or not node_id:
        r.bad(None, f"node {index + 1} has no 'id'", "add 'id: <stage>.<name>'")
        return None
    if not _ID_RE.match(node_id):
        r.bad("id", "a node id may hold only lower-case letters, digits, '.', '-' and '_'",
              "rename it, e.g. 'supply.open-surge-resistor'")
    if not node_id.startswith(stage + "."):
        r.bad("id", f"the id does not start with its stage '{stage}.'",
              f"rename it '{stage}.{node_id.split('.', 1)[-1]}'")
    kind = raw.get("kind")
    if not isinstance(kind, str) or kind not in KEYS:
        r.bad("kind" if "kind" in raw else None,
              f"unknown kind {kind!r}" if kind is not None else "the node has no 'kind'",
              "use kind: check, suspects, fault or escalate")
        return None
    r.unknown_keys(KEYS[kind], f"a {kind} node")
    if r.has("stage") and raw.get("stage") != stage:
        r.bad("stage", f"the node says stage {raw.get('stage')!r} but its file is stage '{stage}'",
              "move the node to a file of its stage, or drop 'stage:'")
    base = dict(id=node_id, title=r.text("title", required=True), stage=stage,
                families=r.families(families), where=Located(file, r.line() or 0))
    if kind == "check":
        return _check(r, base)
    if kind == "suspects":
        return Suspects(**base, investigations=_investigations(r),
                        exhausted=r.text("exhausted") or CLEARED, why=r.text("why"))
    if kind == "fault":
        if "parts" not in raw:
            problems.note("the fault has no 'parts'", file=file, line=r.line(), node=node_id,
                          hint="list the parts, or write 'parts: []' when none are needed",
                          code="no-parts")
        return Fault(**base, repair=r.texts("repair"), parts=r.texts("parts"),
                     verify=r.texts("verify"), signature=_signature(r),
                     priors=MappingProxyType(_priors(r)), cautions=r.texts("cautions"),
                     notes=r.text("notes"))
    return Escalate(**base, advice=r.text("advice", required=True))


def _graph_file(path: Path, problems: _Problems) -> tuple[str | None, list[Node]]:
    file = str(path)
    data = _yaml(path, problems)
    if data is None:
        return None, []
    if not isinstance(data, dict):
        problems.add("a graph file must be a mapping with format, stage and nodes", file=file,
                     line=1, hint=f"start it with 'format: {GRAPH_FORMAT}'")
        return None, []
    r = _Reader(data, file, None, problems)
    r.unknown_keys(GRAPH_FILE_KEYS, "a graph file")
    if data.get("format") != GRAPH_FORMAT:
        r.bad("format" if "format" in data else None,
              f"the file does not declare 'format: {GRAPH_FORMAT}'",
              f"write 'format: {GRAPH_FORMAT}' at the top")
    stage = data.get("stage")
    if stage not in STAGES:
        r.bad("stage" if "stage" in data else None,
              f"unknown or missing stage {stage!r}", "use stage: " + ", ".join(STAGES))
        return None, []
    families = r.families(FAMILIES)
    raw_nodes = data.get("nodes")
    if raw_nodes is None:
        raw_nodes = []
    if not isinstance(raw_nodes, list):
        r.bad("nodes", "'nodes' must be a list", "write one '- id: ...' per node")
        return stage, []
    nodes = []
    for i, raw in enumerate(raw_nodes):
        node = _node(raw, file, stage, families, problems, i, raw_nodes.line_of(i)
                     if hasattr(raw_nodes, "line_of") else None)
        if node is not None:
            nodes.append(node)
    return stage, nodes


# ------------------------------------------------------------------- symptoms, cautions

def _yaml(path: Path, problems: _Problems):
    try:
        return load_yaml_file(path)
    except FaultwiseError as exc:
        problems.add(exc.message, file=exc.file or str(path), line=exc.line, key=exc.key,
                     hint=exc.hint)
        return None


def _top(path: Path, fmt: str, list_key: str, problems: _Problems, required: bool = True):
    """The list under ``list_key`` of a top-level file, checked for its format line."""
    file = str(path)
    if not path.is_file():
        if required:
            problems.add(f"the knowledge folder has no {path.name}", file=file,
                         hint=f"create it with 'format: {fmt}' and '{list_key}:'")
        return None, []
    data = _yaml(path, problems)
    if data is None:
        return None, []
    if not isinstance(data, dict):
        problems.add(f"{path.name} must be a mapping", file=file, line=1,
                     hint=f"start it with 'format: {fmt}'")
        return None, []
    if data.get("format") != fmt:
        problems.add(f"the file does not declare 'format: {fmt}'", file=file,
                     line=_line(data, "format") or 1, hint=f"write 'format: {fmt}' at the top")
    items = data.get(list_key)
    if items is None:
        items = []
    if not isinstance(items, list):
        problems.add(f"'{list_key}' must be a list", file=file, line=_line(data, list_key),
                     hint="write one '- id: ...' per entry")
        items = []
    return data, items


def _item_reader(raw, file: str, what: str, index: int, line, problems: _Problems):
    if not isinstance(raw, dict):
        problems.add(f"{what} {index + 1} is not a mapping", file=file, line=line,
                     hint="write '- id: ...' with its fields indented")
        return None, None
    item_id = raw.get("id")
    r = _Reader(raw, file, item_id if isinstance(item_id, str) else None, problems)
    if not isinstance(item_id, str) or not _ID_RE.match(item_id):
        r.bad("id" if "id" in raw else None, f"{what} {index + 1} needs an 'id' of lower-case "
              "letters, digits and '-'", "add 'id: some-name'")
        return None, None
    return r, item_id


def _entry(r: _Reader, families: tuple[str, ...]) -> dict[str, str]:
    raw = r.raw.get("entry")
    if isinstance(raw, str) and raw.strip():
        return {f: raw.strip() for f in families}
    if isinstance(raw, dict):
        out = {}
        for family, target in raw.items():
            line = _line(raw, family)
            if family not in FAMILIES:
                r.p.add(f"unknown family {family!r} in 'entry'", file=r.file, line=line,
                        node=r.node, key="entry", hint="use " + ", ".join(FAMILIES))
            elif not isinstance(target, str) or not target.strip():
                r.p.add(f"the entry for {family} must be a node id", file=r.file, line=line,
                        node=r.node, key="entry", hint="write 'family: node-id'")
            else:
                out[family] = target.strip()
        return out
    r.bad("entry" if "entry" in r.raw else None,
          "the symptom needs an 'entry': a node id, or a mapping family -> node id",
          "add 'entry: supply.some-check'")
    return {}


def _symptoms(path: Path, problems: _Problems) -> tuple[dict[str, Symptom], float]:
    file = str(path)
    data, items = _top(path, SYMPTOMS_FORMAT, "symptoms", problems)
    strength = DEFAULT_PRIOR_STRENGTH
    if data is not None:
        r = _Reader(data, file, None, problems)
        r.unknown_keys(frozenset(("format", "symptoms", "settings")), "symptoms.yaml")
        settings = r.mapping("settings")
        if settings is not None:
            s = _Reader(settings, file, None, problems)
            s.unknown_keys(SETTINGS_KEYS, "settings")
            value = s.number("prior_strength", DEFAULT_PRIOR_STRENGTH)
            if value is not None and value > 0:
                strength = value
            else:
                s.bad("prior_strength", "'prior_strength' must be above zero",
                      "write e.g. 'prior_strength: 10'")
    out: dict[str, Symptom] = {}
    for i, raw in enumerate(items):
        r, sid = _item_reader(raw, file, "symptom", i, _line(items, i), problems)
        if r is None:
            continue
        r.unknown_keys(SYMPTOM_KEYS, "a symptom")
        entry_raw = raw.get("entry")
        default = tuple(f for f in FAMILIES if f in entry_raw) \
            if isinstance(entry_raw, dict) and entry_raw else FAMILIES
        families = r.families(default)
        symptom = Symptom(id=sid, title=r.text("title", required=True), families=families,
                          entry=MappingProxyType(_entry(r, families)),
                          phrasings=r.texts("phrasings"), where=Located(file, r.line() or 0))
        if sid in out:
            r.bad("id", f"the symptom id '{sid}' appears twice",
                  f"the first is at line {out[sid].where.line}; keep one")
            continue
        out[sid] = symptom
    return out, strength


def _cautions(path: Path, problems: _Problems) -> dict[str, Caution]:
    file = str(path)
    data, items = _top(path, CAUTIONS_FORMAT, "cautions", problems)
    if data is not None:
        _Reader(data, file, None, problems).unknown_keys(frozenset(("format", "cautions")),
                                                         "cautions.yaml")
    out: dict[str, Caution] = {}
    for i, raw in enumerate(items):
        r, cid = _item_reader(raw, file, "caution", i, _line(items, i), problems)
        if r is None:
            continue
        r.unknown_keys(CAUTION_KEYS, "a caution")
        caution = Caution(id=cid, title=r.text("title", required=True),
                          text=r.text("text", required=True), families=r.families(FAMILIES),
                          where=Located(file, r.line() or 0))
        if cid in out:
            r.bad("id", f"the caution id '{cid}' appears twice",
                  f"the first is at line {out[cid].where.line}; keep one")
            continue
        out[cid] = caution
    return out


def _learned(path: Path, problems: _Problems) -> Learned:
    if not path.is_file():
        return Learned()
    file = str(path)
    data = _yaml(path, problems)
    if data is None:
        return Learned()
    if not isinstance(data, dict) or data.get("format") != LEARNED_FORMAT:
        problems.add(f"learned.yaml does not declare 'format: {LEARNED_FORMAT}'", file=file,
                     line=1, hint="regenerate it with 'faultwise review --learn'")
        return Learned()
    r = _Reader(data, file, None, problems)
    r.unknown_keys(frozenset(("format", "written", "cases", "counts")), "learned.yaml")
    counts: dict = {}
    for symptom, per_family in (r.mapping("counts") or {}).items():
        if not isinstance(per_family, dict):
            problems.add(f"counts for '{symptom}' must be a mapping family -> counts",
                         file=file, line=_line(data["counts"], symptom),
                         hint="regenerate it with 'faultwise review --learn'")
            continue
        fam_out = {}
        for family, per_fault in per_family.items():
            if family not in FAMILIES or not isinstance(per_fault, dict):
                problems.add(f"bad family entry {family!r} under '{symptom}'", file=file,
                             line=_line(per_family, family),
                             hint="regenerate it with 'faultwise review --learn'")
                continue
            good = {}
            for fault, n in per_fault.items():
                if not isinstance(fault, str) or not isinstance(n, int) or isinstance(n, bool) \
                        or n < 0:
                    problems.add(f"count for {fault!r} must be a whole number", file=file,
                                 line=_line(per_fault, fault),
                                 hint="regenerate it with 'faultwise review --learn'")
                    continue
                good[fault] = n
            fam_out[family] = MappingProxyType(good)
        counts[str(symptom)] = MappingProxyType(fam_out)
    cases = data.get("cases", 0)
    return Learned(counts=MappingProxyType(counts),
                   cases=cases if isinstance(cases, int) and not isinstance(cases, bool) else 0,
                   written=str(data.get("written") or ""))


# ------------------------------------------------------------------------------ loading

def knowledge_files(root: str | Path) -> list[Path]:
    """The files that make up a knowledge folder's content, in sorted order (graph sorted)."""
    root = Path(root)
    files = [root / "symptoms.yaml", root / "cautions.yaml"]
    files += sorted((root / "graph").glob("*.yaml"))
    files.append(root / "learned.yaml")
    return [f for f in files if f.is_file()]


def content_version(root: str | Path) -> str:
    """``sha256:<hex>`` over each file's path (relative to the folder) and bytes, sorted."""
    root = Path(root)
    digest = hashlib.sha256()
    for path in sorted(knowledge_files(root), key=lambda p: p.relative_to(root).as_posix()):
        digest.update(path.relative_to(root).as_posix().encode() + b"\0")
        digest.update(path.read_bytes())
        digest.update(b"\0")
    return "sha256:" + digest.hexdigest()


@dataclass
class LoadResult:
    """What one pass over a folder produced: the knowledge (None on errors) and problems."""

    knowledge: "Knowledge | None"
    errors: list[KnowledgeError]
    notes: list[LoadNote]
    stage_files: dict[str, list[str]]


def load_all(path: str | Path) -> LoadResult:
    """Read a knowledge folder, collecting every structural problem instead of stopping."""
    root = Path(path)
    problems = _Problems()
    if not root.is_dir():
        problems.add("the knowledge folder does not exist", file=str(root),
                     hint="pass --knowledge with a folder that holds symptoms.yaml and graph/")
        return LoadResult(None, problems.errors, problems.notes, {})
    symptoms, strength = _symptoms(root / "symptoms.yaml", problems)
    cautions = _cautions(root / "cautions.yaml", problems)
    nodes: dict[str, Node] = {}
    stage_files: dict[str, list[str]] = {s: [] for s in STAGES}
    graph_dir = root / "graph"
    if not graph_dir.is_dir():
        problems.add("the knowledge folder has no graph/ folder", file=str(graph_dir),
                     hint="create graph/<stage>.yaml for each of " + ", ".join(STAGES))
    for file in sorted(graph_dir.glob("*.yaml")) if graph_dir.is_dir() else []:
        stage, file_nodes = _graph_file(file, problems)
        if stage is not None:
            stage_files[stage].append(str(file))
        for node in file_nodes:
            if node.id in nodes:
                first = nodes[node.id].where
                problems.add(f"the node id '{node.id}' appears twice", file=node.where.file,
                             line=node.where.line, node=node.id,
                             hint=f"the first is at {first.file}:{first.line}; rename one")
                continue
            nodes[node.id] = node
    learned = _learned(root / "learned.yaml", problems)
    if problems.errors:
        return LoadResult(None, problems.errors, problems.notes, stage_files)
    knowledge = Knowledge(root=root, nodes=nodes, symptoms=symptoms, cautions=cautions,
                          learned=learned, version=content_version(root),
                          prior_strength=strength, notes=tuple(problems.notes))
    return LoadResult(knowledge, [], problems.notes, stage_files)


def load_knowledge(path: str | Path) -> "Knowledge":
    """Load a knowledge folder; raise the first structural problem (``err.problems``: all)."""
    result = load_all(path)
    if result.errors:
        first = result.errors[0]
        more = len(result.errors) - 1
        if more:
            hint = (first.hint.rstrip(".") + "; " if first.hint else "") + \
                f"{more} more problem{'s' if more > 1 else ''}: run 'faultwise lint' to list them"
            first = KnowledgeError(first.message, file=first.file, line=first.line,
                                   key=first.key, node=first.node, hint=hint)
        first.problems = result.errors
        raise first
    return result.knowledge


def load_symptoms(path: str | Path) -> dict[str, Symptom]:
    """Only ``symptoms.yaml`` of a knowledge folder (what ``match`` needs), located errors."""
    problems = _Problems()
    symptoms, _ = _symptoms(Path(path) / "symptoms.yaml", problems)
    if problems.errors:
        raise problems.errors[0]
    return symptoms


# ----------------------------------------------------------------------------- the model

def edges_of(node: Node) -> Iterable[tuple[str, str, str | None]]:
    """(target, edge kind, outcome name) for every route out of a node, ``cleared`` included."""
    if isinstance(node, Check):
        for outcome, target in node.outcomes.items():
            yield target, "outcome", outcome
        if node.unable:
            yield node.unable, "unable", None
    elif isinstance(node, Suspects):
        for inv in node.investigations:
            yield inv.target, "suspect", None
        yield node.exhausted, "exhausted", None
    elif isinstance(node, Fault):
        for check_id in node.verify:
            yield check_id, "verify", None


class Knowledge:
    """The loaded knowledge: nodes, symptoms, cautions, learned counts, and graph queries."""

    def __init__(self, *, root: Path, nodes: dict[str, Node], symptoms: dict[str, Symptom],
                 cautions: dict[str, Caution], learned: Learned | None = None,
                 version: str = "", prior_strength: float = DEFAULT_PRIOR_STRENGTH,
                 notes: tuple[LoadNote, ...] = ()) -> None:
        self.root = Path(root)
        self.nodes = nodes
        self.symptoms = symptoms
        self.cautions = cautions
        self.learned = learned or Learned()
        self.version = version
        self.prior_strength = prior_strength
        self.notes = notes
        self._digraph = None
        self._family_graphs: dict = {}
        self._under: dict[tuple[str, str], frozenset[str]] = {}

    def __repr__(self) -> str:
        return f"Knowledge({str(self.root)!r}, {len(self.nodes)} nodes, {self.version[:15]})"

    def node(self, node_id: str) -> Node:
        """The node with this id; KnowledgeError when there is none."""
        try:
            return self.nodes[node_id]
        except KeyError:
            raise KnowledgeError(f"no node '{node_id}' in the knowledge", node=node_id,
                                 file=str(self.root),
                                 hint="check the id, or run 'faultwise lint'") from None

    def applies(self, node_or_id: Node | str, family: str) -> bool:
        """Whether the node is part of the graph for this family."""
        node = self.node(node_or_id) if isinstance(node_or_id, str) else node_or_id
        return family in node.families

    def entry(self, symptom_id: str, family: str) -> str:
        """The first node of the walk for this symptom and family."""
        symptom = self.symptoms.get(symptom_id)
        if symptom is None:
            raise KnowledgeError(f"unknown symptom '{symptom_id}'", file=str(self.root),
                                 hint="use one of " + ", ".join(self.symptoms))
        target = symptom.entry.get(family)
        if target is None or family not in symptom.families:
            raise KnowledgeError(f"the symptom '{symptom_id}' has no entry for {family} sets",
                                 file=symptom.where.file if symptom.where else None,
                                 line=symptom.where.line if symptom.where else None,
                                 hint="add it to 'entry' in symptoms.yaml")
        return target

    def closing_checks(self, family: str) -> list[Check]:
        """Checks asked before any case of this family is closed, in file order."""
        return [n for n in self.nodes.values()
                if isinstance(n, Check) and n.closing and family in n.families]

    def fault_weight(self, fault_id: str, symptom_id: str) -> float:
        """The fault's prior weight for a symptom; 1.0 when it gives none (DEVELOPERS)."""
        node = self.node(fault_id)
        return float(getattr(node, "priors", {}).get(symptom_id, 1.0))

    def digraph(self):
        """networkx.DiGraph of every node and route (``cleared`` is not a node); cached."""
        if self._digraph is None:
            import networkx as nx

            g = nx.DiGraph()
            for node in self.nodes.values():
                where = node.where or Located("", 0)
                g.add_node(node.id, kind=node.kind, stage=node.stage, file=where.file,
                           line=where.line, title=node.title, families=node.families)
            for node in self.nodes.values():
                for target, kind, outcome in edges_of(node):
                    if target == CLEARED or target not in self.nodes:
                        continue
                    if g.has_edge(node.id, target):
                        data = g.edges[node.id, target]
                        data["kinds"] = tuple(dict.fromkeys(data["kinds"] + (kind,)))
                        if outcome is not None:
                            data["outcomes"] = data["outcomes"] + (outcome,)
                            data.setdefault("outcome", outcome)
                        continue
                    attrs = dict(kind=kind, kinds=(kind,),
                                 outcomes=(outcome,) if outcome else ())
                    if outcome is not None:
                        attrs["outcome"] = outcome
                    g.add_edge(node.id, target, **attrs)
            self._digraph = g
        return self._digraph

    def family_graph(self, family: str):
        """The walk's graph for one family: its nodes, and routes other than ``verify``."""
        if family not in self._family_graphs:
            import networkx as nx

            g = self.digraph()
            sub = nx.DiGraph()
            sub.add_nodes_from(n for n, d in g.nodes(data=True) if family in d["families"])
            sub.add_edges_from((u, v) for u, v, d in g.edges(data=True)
                               if u in sub and v in sub and d["kinds"] != ("verify",))
            self._family_graphs[family] = sub
        return self._family_graphs[family]

    def faults_under(self, node_id: str, family: str) -> frozenset[str]:
        """Faults reachable from a node for a family (the node itself if it is a fault)."""
        key = (node_id, family)
        if key not in self._under:
            import networkx as nx

            self.node(node_id)
            g = self.family_graph(family)
            if node_id not in g:
                found: frozenset[str] = frozenset()
            else:
                reach = nx.descendants(g, node_id) | {node_id}
                found = frozenset(n for n in reach if self.nodes[n].kind == "fault")
            self._under[key] = found
        return self._under[key]

    def faults_for(self, symptom_id: str, family: str) -> frozenset[str]:
        """Faults a walk for this symptom and family can reach."""
        return self.faults_under(self.entry(symptom_id, family), family)
