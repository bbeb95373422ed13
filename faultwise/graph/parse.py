"""Graph files (``graph/<stage>.yaml``) -> nodes: per-node parsing and structural checks.

Each problem is reported located (file, line, node, key) into the loader's
:class:`faultwise.graph.reader.Problems`; graph-level checks (targets, cycles,
reachability, expectation names) are :mod:`faultwise.graph.lint`'s job.
"""

from __future__ import annotations

from pathlib import Path
from types import MappingProxyType
from typing import Mapping

from faultwise.graph.applicability import WHEN_KEYS
from faultwise.graph.reader import (ID_RE, KnowledgeReader, Problems, is_number, key_line,
                                    key_text, read_yaml)
from faultwise.graph.node_text import parse_variants
from faultwise.graph.nodes import (CLEARED, FAMILIES, MEASURE_OUTCOMES, STAGES, Check, Escalate,
                                   Fault, Investigation, Located, Node, Signature, Suspects,
                                   Unfed)

GRAPH_FORMAT = "faultwise-graph/1"
DEFAULT_MINUTES = 1.0        # cost of a check that does not say (lint warns)
OTHERWISE = "otherwise"      # outcome key that routes every outcome not listed

_COMMON = ("id", "kind", "title", "stage", "families", "text_by_family")
KEYS = {
    "check": frozenset(_COMMON + ("how", "why", "cautions", "minutes", "expect", "choices",
                                  "normal", "outcomes", OTHERWISE, "unable", "closing", "when",
                                  "unfed")),
    "suspects": frozenset(_COMMON + ("why", "investigations", "exhausted")),
    "fault": frozenset(_COMMON + ("repair", "parts", "verify", "signature", "priors",
                                  "cautions", "notes", "when", "plain", "model")),
    "escalate": frozenset(_COMMON + ("advice",)),
}
INVESTIGATION_KEYS = frozenset(("target", "label", "minutes"))
SIGNATURE_KEYS = frozenset(("readings", "observations"))
GRAPH_FILE_KEYS = frozenset(("format", "stage", "families", "nodes", "title", "notes"))


def _targets_map(r: KnowledgeReader, key: str, names: tuple[str, ...]) -> dict[str, str]:
    """Parse ``outcomes``: outcome -> target, expanding ``otherwise`` over the rest."""
    raw = r.mapping(key)
    out: dict[str, str] = {}
    otherwise = r.text(OTHERWISE) if r.has(OTHERWISE) else None
    if raw is not None:
        for name, target in raw.items():
            line = key_line(raw, name)
            if not isinstance(name, str):
                r.p.add(key_text(name), file=r.file, line=line, node=r.node, key=key,
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


def _choices(r: KnowledgeReader) -> dict[str, str]:
    raw = r.mapping("choices")
    out: dict[str, str] = {}
    if raw is None:
        return out
    for name, label in raw.items():
        line = key_line(raw, name)
        if not isinstance(name, str):
            r.p.add(key_text(name), file=r.file, line=line, node=r.node, key="choices",
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


def _when_values(r: KnowledgeReader, key: str, raw: object, line: int | None) -> tuple[str, ...]:
    """One ``when`` entry's values: a value or a list of them, each one WHEN_KEYS allows."""
    allowed = WHEN_KEYS[key]
    items = raw if isinstance(raw, list) else [raw]
    hint = f"'{key}' takes " + ", ".join(allowed) + " (one value, or a list of them: any will do)"
    if not items:
        r.p.add(f"'when' condition '{key}' has no value", file=r.file, line=line, node=r.node,
                key=f"when.{key}", hint=hint)
        return ()
    out: list[str] = []
    for item in items:
        if isinstance(item, bool) and allowed == ("yes", "no"):
            item = "yes" if item else "no"     # YAML 1.1 reads an unquoted yes/no as a boolean
        if not isinstance(item, str) or item.strip().lower() not in allowed:
            r.p.add(f"'when' condition '{key}' has the unknown value {item!r}", file=r.file,
                    line=line, node=r.node, key=f"when.{key}", hint=hint)
            continue
        value = item.strip().lower()
        if value not in out:
            out.append(value)
    return tuple(out)


def _when(r: KnowledgeReader) -> MappingProxyType:
    """Parse ``when``: {key: value or [values]} with keys and values from WHEN_KEYS."""
    raw = r.mapping("when")
    out: dict[str, tuple[str, ...]] = {}
    for key, value in (raw or {}).items():
        line = key_line(raw, key) or r.line("when")
        if not isinstance(key, str) or key not in WHEN_KEYS:
            name = key_text(key) if not isinstance(key, str) else f"unknown 'when' key '{key}'"
            r.p.add(name, file=r.file, line=line, node=r.node, key="when",
                    hint="use " + ", ".join(WHEN_KEYS) + " (for example 'when: {rectifier: "
                    "selenium}')")
            continue
        values = _when_values(r, key, value, line)
        if values:
            out[key] = values
    return MappingProxyType(out)


def _check(r: KnowledgeReader, base: dict) -> Check:
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
    base["variants"] = parse_variants(r, "check", base["families"], choices)
    return Check(**base, how=r.text("how"), why=r.text("why"), minutes=minutes,
                 outcomes=MappingProxyType(outcomes), normal=normal, expect=expect,
                 choices=MappingProxyType(choices), cautions=r.texts("cautions"),
                 unable=r.text("unable") or None, closing=closing, when=_when(r),
                 unfed=_unfed(r, choices))


UNFED_KEYS = frozenset(("choice", "readings"))


def _unfed(r: KnowledgeReader, choices: Mapping[str, str]) -> Unfed | None:
    """``unfed: {choice: <a choice>, readings: [<expectation name>, ...]}`` (observations)."""
    raw = r.raw.get("unfed")
    if raw is None:
        return None
    hint = "write 'unfed: {choice: nothing, readings: [stage.output.plate_v]}'"
    if not choices:
        r.bad("unfed", "'unfed' belongs on an observation (a check with 'choices')", hint)
        return None
    if not isinstance(raw, dict):
        r.bad("unfed", "'unfed' must be a mapping with 'choice' and 'readings'", hint)
        return None
    sub = KnowledgeReader(raw, r.file, r.node, r.p)
    sub.unknown_keys(UNFED_KEYS, "'unfed'")
    choice = sub.text("choice")
    names = raw.get("readings")
    if choice not in choices:
        r.bad("unfed", f"'unfed' choice '{choice}' is not one of the check's choices",
              "use one of " + ", ".join(choices))
        return None
    if (not isinstance(names, list) or not names
            or not all(isinstance(n, str) and n.strip() for n in names)):
        r.bad("unfed", "'unfed' needs 'readings': a list of expectation names", hint)
        return None
    return Unfed(choice=choice, readings=tuple(n.strip() for n in names))


def _investigations(r: KnowledgeReader) -> tuple[Investigation, ...]:
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
        sub = KnowledgeReader(item, r.file, r.node, r.p)
        sub.unknown_keys(INVESTIGATION_KEYS, "an investigation")
        target = sub.text("target")
        if not target:
            r.p.add(f"investigation {i + 1} has no 'target'", file=r.file, line=line,
                    node=r.node, key="investigations", hint="add 'target: node-id'")
            continue
        out.append(Investigation(target=target, label=sub.text("label"),
                                 minutes=sub.number("minutes")))
    return tuple(out)


def _signature(r: KnowledgeReader) -> Signature:
    raw = r.mapping("signature")
    if raw is None:
        return Signature()
    sub = KnowledgeReader(raw, r.file, r.node, r.p)
    sub.unknown_keys(SIGNATURE_KEYS, "a signature")
    readings: dict = {}
    for name, value in (sub.mapping("readings") or {}).items():
        line = key_line(raw.get("readings"), name)
        if not isinstance(name, str):
            r.p.add(key_text(name), file=r.file, line=line, node=r.node, key="readings",
                    hint="write the expectation name")
        elif is_number(value):
            readings[name] = float(value)
        elif isinstance(value, str) and value in MEASURE_OUTCOMES:
            readings[name] = value
        else:
            r.p.add(f"reading '{name}' must be one of {', '.join(MEASURE_OUTCOMES)} or a "
                    f"number, not {value!r}", file=r.file, line=line, node=r.node,
                    key="readings", hint="write e.g. 'supply.rectifier_out_v: low'")
    observations: dict = {}
    for name, value in (sub.mapping("observations") or {}).items():
        line = key_line(raw.get("observations"), name)
        if not isinstance(name, str) or not isinstance(value, str):
            r.p.add(f"observation '{name}' must map a check id to one of its choices",
                    file=r.file, line=line, node=r.node, key="observations",
                    hint="write 'check-id: choice' (quote yes/no)")
            continue
        observations[name] = value
    return Signature(readings=MappingProxyType(readings),
                     observations=MappingProxyType(observations))


def _model(r: KnowledgeReader) -> Mapping:
    """``model``: {target: change}; the vocabulary is checked by lint (fault_models)."""
    raw = r.mapping("model")
    out: dict[str, str] = {}
    for name, value in (raw or {}).items():
        if not isinstance(name, str) or isinstance(value, (dict, list)) or value is None:
            r.p.add(f"model entry '{name}' must map a target to a change", file=r.file,
                    line=key_line(raw, name), node=r.node, key="model",
                    hint="write e.g. 'supply.first_cap_uf: x0.1' or 'heater.output: open'")
            continue
        out[name] = str(value)
    return MappingProxyType(out)


def _priors(r: KnowledgeReader) -> dict[str, float]:
    out: dict[str, float] = {}
    raw = r.mapping("priors")
    for name, weight in (raw or {}).items():
        line = key_line(raw, name)
        if not isinstance(name, str) or not is_number(weight) or weight < 0:
            r.p.add(f"prior '{name}' must map a symptom id to a weight of zero or more",
                    file=r.file, line=line, node=r.node, key="priors",
                    hint="write 'symptom-id: 20'")
            continue
        out[name] = float(weight)
    return out


def _node(raw: object, file: str, stage: str, families: tuple[str, ...], problems: Problems,
          index: int, list_line: int | None) -> Node | None:
    if not isinstance(raw, dict):
        problems.add(f"node {index + 1} is not a mapping", file=file, line=list_line,
                     hint="write each node as '- id: ...' with its fields indented")
        return None
    node_id = raw.get("id")
    r = KnowledgeReader(raw, file, node_id if isinstance(node_id, str) else None, problems)
    if not isinstance(node_id, str) or not node_id:
        r.bad(None, f"node {index + 1} has no 'id'", "add 'id: <stage>.<name>'")
        return None
    if not ID_RE.match(node_id):
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
    base["variants"] = parse_variants(r, kind, base["families"])
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
                     notes=r.text("notes"), when=_when(r), plain=r.text("plain"),
                     model=_model(r))
    return Escalate(**base, advice=r.text("advice", required=True))


def read_graph_file(path: Path, problems: Problems) -> tuple[str | None, list[Node]]:
    file = str(path)
    data = read_yaml(path, problems)
    if data is None:
        return None, []
    if not isinstance(data, dict):
        problems.add("a graph file must be a mapping with format, stage and nodes", file=file,
                     line=1, hint=f"start it with 'format: {GRAPH_FORMAT}'")
        return None, []
    r = KnowledgeReader(data, file, None, problems)
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

