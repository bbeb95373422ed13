"""Knowledge checks: ``lint(path) -> LintReport`` (what ``faultwise lint`` prints).

Every problem is a :class:`Finding` naming file, line and node, with a hint. Structural
problems found while loading (YAML syntax, unknown keys, wrong types) come first; when there
are any, the graph checks are skipped, since they would only repeat them. The graph checks
use networkx (cycles, reachability). The list of checks is in knowledge/README.md, "What lint
checks".
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable, Iterable

from faultwise.graph.knowledge import Knowledge, LoadResult, edges_of, load_all
from faultwise.graph.nodes import CLEARED, FAMILIES, STAGES, Check, Fault, Suspects

# DESIGN section 6: the symptom ids are a contract.
SYMPTOM_IDS = ("dead-nothing-lights", "dead-lights-on", "hum-loud", "noise-no-stations",
               "weak-reception", "low-volume", "distorted-audio", "intermittent",
               "squeal-or-motorboat", "dial-off-calibration", "fades-after-warmup",
               "scratchy-controls", "smoke-or-overheat", "dead-after-repair")

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


def _name_matcher(names: Iterable[str]) -> Callable[[str], bool]:
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


def _plain(text: str) -> str:
    """Lower case, punctuation to spaces, single spaces: how phrasings are compared."""
    return " ".join(re.sub(r"[^\w\s]", " ", text.lower()).split())


class _Lint:
    """One lint run: the knowledge, the findings so far, and the checks as methods."""

    def __init__(self, k: Knowledge, names: NamesFn | None) -> None:
        self.k = k
        self.errors: list[Finding] = []
        self.warnings: list[Finding] = []
        self._seen: set = set()
        self.known = self._matchers(names)

    def _matchers(self, names: NamesFn | None) -> dict[str, Callable[[str], bool]] | None:
        if names is None:
            from faultwise.expect.expected import expectation_names as names
        out = {}
        try:
            for family in FAMILIES:
                out[family] = _name_matcher(names(family))
        except NotImplementedError:
            self.warn(str(self.k.root), None, None, "expectation names are not available yet, "
                      "so 'expect' and signature names were not checked",
                      "run lint again once faultwise.expect.expected.expectation_names exists")
            return None
        return out

    # -- recording
    def _add(self, into: list, file, line, node, message, hint) -> None:
        key = (file, line, node, message)
        if key not in self._seen:
            self._seen.add(key)
            into.append(Finding(str(file), line, node, message, hint))

    def error(self, file, line, node, message, hint="") -> None:
        self._add(self.errors, file, line, node, message, hint)

    def warn(self, file, line, node, message, hint="") -> None:
        self._add(self.warnings, file, line, node, message, hint)

    def at(self, node, message, hint="", warning=False) -> None:
        where = node.where
        (self.warn if warning else self.error)(where.file if where else "", where.line
                                                if where else None, node.id, message, hint)

    # -- checks
    def targets(self) -> None:
        for node in self.k.nodes.values():
            for target, kind, outcome in edges_of(node):
                if target == CLEARED:
                    if kind == "verify":
                        self.at(node, "'verify' names 'cleared'", "list check ids to repeat")
                    continue
                if target not in self.k.nodes:
                    what = f"outcome '{outcome}'" if outcome else f"'{kind}'"
                    self.at(node, f"{what} routes to '{target}', which does not exist",
                            "fix the id, add the node, or route it to 'cleared'")

    def cycles(self, g) -> bool:
        import networkx as nx

        found = False
        for component in nx.strongly_connected_components(g):
            first = min(component)
            if len(component) == 1 and not g.has_edge(first, first):
                continue
            cycle = nx.find_cycle(g.subgraph(component), source=first)
            path = " -> ".join([u for u, _ in cycle] + [cycle[0][0]])
            self.at(self.k.nodes[first], f"the routes form a cycle: {path}",
                    "a walk must always move on; route one of these to a new node")
            found = True
        return found

    def reachability(self, g) -> None:
        import networkx as nx

        k = self.k
        entries = {t for s in k.symptoms.values() for t in s.entry.values() if t in k.nodes}
        closing = {c.id for c in k.nodes.values() if isinstance(c, Check) and c.closing}
        verify = {v for n in k.nodes.values() if isinstance(n, Fault) for v in n.verify
                  if v in k.nodes}
        diag = set()
        for root in entries | closing:
            diag |= nx.descendants(g, root) | {root}
        reached = set(diag)
        for root in verify - diag:
            reached |= nx.descendants(g, root) | {root}
        for node in k.nodes.values():
            if isinstance(node, Fault) and node.id not in diag:
                self.at(node, "no symptom reaches this fault",
                        "route an outcome or an investigation to it, or remove it")
            elif node.id not in reached:
                self.at(node, "no symptom entry reaches this node",
                        "route something to it, or remove it")

    def family_reach(self) -> None:
        k = self.k
        for family in FAMILIES:
            found = set()
            for s in k.symptoms.values():
                if family in s.families and s.entry.get(family) in k.nodes:
                    found |= k.faults_under(s.entry[family], family)
            for c in k.closing_checks(family):
                found |= k.faults_under(c.id, family)
            for node in k.nodes.values():
                if isinstance(node, Fault) and family in node.families and node.id not in found:
                    self.at(node, f"the fault applies to {family} sets but no {family} walk "
                            "reaches it", "narrow its 'families' or route a check of that "
                            "family to it", warning=True)

    def expectations(self) -> None:
        if self.known is None:
            return
        for node in self.k.nodes.values():
            if isinstance(node, Check) and node.expect:
                missing = [f for f in node.families if not self.known[f](node.expect)]
                if len(missing) == len(node.families):
                    self.at(node, f"unknown expectation name '{node.expect}'",
                            "use a name from knowledge/README.md, 'Expectation names'")
                elif missing:
                    self.at(node, f"the expectation '{node.expect}' does not exist for "
                            f"{', '.join(missing)} sets", "narrow the check's 'families' or "
                            "use a name those sets have")

    def cautions(self) -> None:
        """Every caution id is known; a node names only cautions that concern one of its
        families (else it is never shown); where one concern is worded per family (the
        cautions share a ``concern``), a node naming one names the wording of each of its
        families."""
        by_concern: dict[str, list] = {}
        for caution in self.k.cautions.values():
            if caution.concern:
                by_concern.setdefault(caution.concern, []).append(caution)
        for node in self.k.nodes.values():
            named = tuple(getattr(node, "cautions", ()))
            families = tuple(getattr(node, "families", ()) or ())
            for cid in named:
                caution = self.k.cautions.get(cid)
                if caution is None:
                    self.at(node, f"unknown caution '{cid}'",
                            "add it to cautions.yaml or fix the id")
                    continue
                if families and not set(caution.families) & set(families):
                    self.at(node, f"the caution '{cid}' concerns only "
                            f"{', '.join(caution.families)} sets and this node applies to "
                            f"{', '.join(families)} sets, so it is never shown",
                            "name the caution worded for this node's families")
                if not caution.concern:
                    continue
                for other in by_concern.get(caution.concern, ()):
                    wanted = set(other.families) & set(families) - set(caution.families)
                    if other.id not in named and wanted:
                        self.at(node, f"the caution '{cid}' has a wording for "
                                f"{', '.join(sorted(wanted))} sets, '{other.id}', that this "
                                "node does not name", f"add '{other.id}' to its cautions")

    def symptoms(self, path: Path) -> None:
        k = self.k
        file = str(path / "symptoms.yaml")
        for sid in SYMPTOM_IDS:
            if sid not in k.symptoms:
                self.error(file, None, None, f"the symptom '{sid}' is missing",
                           "every symptom id of DESIGN section 6 must be present")
        for s in k.symptoms.values():
            line = s.where.line if s.where else None
            if s.id not in SYMPTOM_IDS:
                self.warn(file, line, s.id, "this symptom id is not one of the 14 contract ids",
                          "the walk and review accept it, but outside tools may not")
            for family in s.families:
                target = s.entry.get(family)
                if target is None:
                    self.error(file, line, s.id, f"no entry for {family} sets",
                               "add it to 'entry', or drop the family")
                elif target not in k.nodes:
                    self.error(file, line, s.id, f"the {family} entry '{target}' does not exist",
                               "fix the node id")
                elif family not in k.nodes[target].families:
                    self.error(file, line, s.id, f"the {family} entry '{target}' does not apply "
                               f"to {family} sets", "use an entry node of that family")
            for family in s.entry:
                if family not in s.families:
                    self.warn(file, line, s.id, f"an entry for {family} sets, which the symptom "
                              "does not list in 'families'", "add the family or drop the entry")

    def walks(self) -> None:
        """Per symptom and family: every route applies to the family, no dead ``cleared``."""
        k = self.k
        for s in k.symptoms.values():
            for family in s.families:
                entry = s.entry.get(family)
                if entry not in k.nodes or family not in k.nodes[entry].families:
                    continue
                self._routes_apply(entry, family, s.id)
                self._escapes(entry, family, s.id, {})

    def _routes_apply(self, entry: str, family: str, symptom: str) -> None:
        k, todo, seen = self.k, [entry], {entry}
        while todo:
            node = k.nodes[todo.pop()]
            for target, kind, outcome in edges_of(node):
                if kind == "verify" or target == CLEARED or target not in k.nodes:
                    continue
                if family not in k.nodes[target].families:
                    if (node.id, target, family) in self._seen:
                        continue
                    self._seen.add((node.id, target, family))
                    what = f"outcome '{outcome}'" if outcome else f"'{kind}'"
                    self.at(node, f"{what} routes to '{target}', which does not apply to "
                            f"{family} sets (walk of '{symptom}')", "add the family to that "
                            "node, or route this family elsewhere")
                elif target not in seen:
                    seen.add(target)
                    todo.append(target)

    def _escapes(self, node_id: str, family: str, symptom: str, memo: dict) -> bool:
        """True when a walk from here can end in ``cleared`` outside every suspects list."""
        if node_id in memo:
            return memo[node_id]
        memo[node_id] = False          # guards against cycles (reported elsewhere)
        node = self.k.nodes[node_id]
        out = False
        if isinstance(node, Check):
            # A skipped check at top level ('unable' unset or 'cleared') lets the tech record
            # an off-graph finding; only outcomes must lead on.
            routes = list(node.outcomes.items()) + ([("unable", node.unable)]
                                                     if node.unable else [])
            for outcome, target in routes:
                if target == CLEARED and outcome == "unable":
                    continue
                if target == CLEARED:
                    out = True
                    self.at(node, f"'{outcome}' ends in 'cleared' outside any suspects list, "
                            f"so the walk of '{symptom}' ({family}) stops with nothing found",
                            "route it to a node or an escalate")
                elif self._follow(target, family):
                    out |= self._escapes(target, family, symptom, memo)
        elif isinstance(node, Suspects):
            if node.exhausted == CLEARED:
                out = True
                self.at(node, f"the list is exhausted into 'cleared' with no enclosing list "
                        f"(walk of '{symptom}', {family})", "set 'exhausted:' to an escalate "
                        "node")
            elif self._follow(node.exhausted, family):
                out = self._escapes(node.exhausted, family, symptom, memo)
        memo[node_id] = out
        return out

    def _follow(self, target: str, family: str) -> bool:
        node = self.k.nodes.get(target)
        return node is not None and family in node.families

    def checks(self, notes_by_node: dict) -> None:
        for node in self.k.nodes.values():
            if not isinstance(node, Check):
                continue
            names = node.outcome_names()
            if not node.is_measurement and len(names) < 2:
                self.at(node, "an observation needs at least two choices", "add a choice")
            for name in names:
                if name not in node.outcomes:
                    self.at(node, f"outcome '{name}' is not routed",
                            f"add '{name}: <target>' to 'outcomes', or 'otherwise: <target>'")
            if node.normal not in names:
                self.at(node, f"'normal: {node.normal}' is not one of its outcomes",
                        "use one of " + ", ".join(names))
            if not node.how:
                self.at(node, "the check has no 'how'", "say where the probes go and on what "
                        "range", warning=True)
            if not node.why:
                self.at(node, "the check has no 'why'", "say what the result tells",
                        warning=True)
            if "no-minutes" in notes_by_node.get(node.id, ()):
                self.at(node, "the check has no 'minutes'", "add its typical cost in minutes",
                        warning=True)

    def suspects(self) -> None:
        for node in self.k.nodes.values():
            if isinstance(node, Suspects) and len(node.investigations) == 1:
                self.at(node, "the suspects list has a single investigation",
                        "route straight to it, or add the other suspects", warning=True)

    def faults(self, notes_by_node: dict) -> None:
        k = self.k
        for node in k.nodes.values():
            if not isinstance(node, Fault):
                continue
            if not node.repair:
                self.at(node, "the fault has no 'repair' steps", "list what the tech does")
            if "no-parts" in notes_by_node.get(node.id, ()):
                self.at(node, "the fault has no 'parts'",
                        "list the parts, or write 'parts: []' when none are needed")
            self._verify(node)
            self._signature(node)
            self._model(node)
            for sid in node.priors:
                if sid not in k.symptoms:
                    self.at(node, f"'priors' names the unknown symptom '{sid}'",
                            "use a symptom id from symptoms.yaml")

    def _verify(self, node: Fault) -> None:
        k = self.k
        if not node.verify:
            self.at(node, "the fault has no 'verify' checks",
                    "list the checks to repeat after the repair")
            return
        covered = set()
        for cid in node.verify:
            check = k.nodes.get(cid)
            if check is None:
                continue                  # reported by targets()
            if not isinstance(check, Check):
                self.at(node, f"'verify' names '{cid}', which is a {check.kind}, not a check",
                        "list check ids")
                continue
            common = set(check.families) & set(node.families)
            if not common:
                self.at(node, f"the verify check '{cid}' does not apply to the fault's families",
                        "use a check of the same families")
            covered |= common
        for family in node.families:
            if covered and family not in covered:
                self.at(node, f"no verify check applies to {family} sets",
                        "add one, or narrow the fault's 'families'")

    def _model(self, node: Fault) -> None:
        """Every model entry names a target of the vocabulary with a change it takes."""
        from faultwise.expect.fault_models import model_problems

        for target, message, hint in model_problems(node.model, node.families):
            self.at(node, f"model '{target}': {message}", hint)

    def _signature(self, node: Fault) -> None:
        k = self.k
        sig = node.signature
        if not sig.readings and not sig.observations:
            self.at(node, "the fault has no 'signature'", "list the readings and observations "
                    "the fault causes; sweep uses them")
        if self.known is not None:
            for name in sig.readings:
                if not any(self.known[f](name) for f in node.families):
                    self.at(node, f"the signature reading '{name}' is not an expectation name "
                            "of the fault's families", "use a name from knowledge/README.md, "
                            "'Expectation names'")
        for cid, choice in sig.observations.items():
            check = k.nodes.get(cid)
            if not isinstance(check, Check) or check.is_measurement:
                self.at(node, f"the signature observation '{cid}' is not an observation check",
                        "name an observation check by its id")
            elif choice not in check.choices:
                self.at(node, f"'{choice}' is not a choice of '{cid}'",
                        "use one of " + ", ".join(check.choices))

    def priors(self) -> None:
        k = self.k
        for s in k.symptoms.values():
            for family in s.families:
                entry = s.entry.get(family)
                if entry not in k.nodes:
                    continue
                for fid in sorted(k.faults_under(entry, family)):
                    fault = k.nodes[fid]
                    if s.id not in fault.priors:
                        self.at(fault, f"no prior for '{s.id}', which reaches this fault",
                                f"add '{s.id}: <weight>' to 'priors' (the walk uses 1)",
                                warning=True)

    def phrasings(self) -> None:
        """Warn on a phrasing given twice, or shared by two symptoms (a title may recur)."""
        seen: dict[str, str] = {}
        for s in self.k.symptoms.values():
            mine: set[str] = set()
            for i, text in enumerate((s.title,) + s.phrasings):
                key = _plain(text)
                where = None
                if key in mine and i > 0:
                    where = "twice"
                elif seen.get(key, s.id) != s.id:
                    where = f"also under '{seen[key]}'"
                if where:
                    self.warn(s.where.file if s.where else "", s.where.line if s.where else None,
                              s.id, f"the phrasing '{text}' appears {where}", "keep one")
                if i > 0:
                    mine.add(key)
                seen.setdefault(key, s.id)

    def learned(self) -> None:
        k = self.k
        file = str(k.root / "learned.yaml")
        for sid, per_family in k.learned.counts.items():
            if sid not in k.symptoms:
                self.warn(file, None, None, f"learned counts for the unknown symptom '{sid}'",
                          "regenerate it with 'faultwise review --learn'")
            for counts in per_family.values():
                for fid in counts:
                    if not isinstance(k.nodes.get(fid), Fault):
                        self.warn(file, None, fid, "learned counts for a fault the graph does "
                                  "not have", "regenerate it with 'faultwise review --learn'")


def _summary(k: Knowledge | None, result: LoadResult) -> dict:
    if k is None:
        return {"loaded": False}
    kinds = [n.kind for n in k.nodes.values()]
    return {"loaded": True, "version": k.version, "nodes": len(kinds),
            "checks": kinds.count("check"), "suspects": kinds.count("suspects"),
            "faults": kinds.count("fault"), "escalations": kinds.count("escalate"),
            "symptoms": len(k.symptoms), "cautions": len(k.cautions),
            "files": sum(len(v) for v in result.stage_files.values())}


def _inject_known(k: Knowledge, path: Path, run) -> None:
    """inject_known.yaml (faults readings cannot find): every entry must check out."""
    from faultwise.core.errors import FaultwiseError
    from faultwise.graph.inject_known import load_known

    try:
        load_known(k, path)
    except FaultwiseError as e:
        run.errors.append(Finding(e.file or str(path), e.line, e.node, e.message, e.hint or ""))


def lint(path: str | Path, expectation_names: NamesFn | None = None) -> LintReport:
    """Check a knowledge folder; ``expectation_names`` defaults to faultwise.expect.expected's."""
    path = Path(path)
    result = load_all(path)
    load_errors = [Finding(e.file or str(path), e.line, e.node,
                           e.message + (f" (key '{e.key}')" if e.key and e.key not in e.message
                                        else ""), e.hint or "") for e in result.errors]
    missing_stage = [Finding(str(path / "graph"), None, None, f"no graph file for the stage "
                             f"'{stage}'", f"add graph/{stage}.yaml with 'stage: {stage}'")
                     for stage in STAGES if result.stage_files and not result.stage_files[stage]]
    k = result.knowledge
    if k is None:
        return LintReport(load_errors + missing_stage, [], _summary(None, result))
    run = _Lint(k, expectation_names)
    run.errors.extend(missing_stage)
    notes_by_node: dict[str, set] = {}
    for note in result.notes:
        notes_by_node.setdefault(note.node, set()).add(note.code)
    g = k.digraph()
    run.targets()
    walk_graph = g.edge_subgraph((u, v) for u, v, d in g.edges(data=True)
                                 if d["kinds"] != ("verify",)).copy()
    walk_graph.add_nodes_from(g.nodes)
    has_cycle = run.cycles(walk_graph)
    run.symptoms(path)
    run.reachability(walk_graph)
    run.expectations()
    run.cautions()
    run.checks(notes_by_node)
    run.suspects()
    run.faults(notes_by_node)
    if not has_cycle:
        run.walks()
        run.family_reach()
        run.priors()
    run.phrasings()
    run.learned()
    _inject_known(k, path, run)
    from faultwise.graph.lint_text import text_rules

    text_rules(run)
    summary = _summary(k, result)
    summary.update(errors=len(run.errors), warnings=len(run.warnings))
    return LintReport(run.errors, run.warnings, summary)
