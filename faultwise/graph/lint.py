"""Knowledge checks: ``lint(path) -> LintReport`` (what ``faultwise lint`` prints).

Every problem is a :class:`~faultwise.graph.lint_run.Finding` naming file, line and node,
with a hint. Structural problems found while loading (YAML syntax, unknown keys, wrong
types) come first; when there are any, the graph checks are skipped, since they would only
repeat them. This module holds ``lint`` and the rules on node content (expectation names,
cautions, symptoms, checks, suspects lists, faults, phrasings, learned counts); the rules on
routes and walks (networkx: cycles, reachability) are in :mod:`faultwise.graph.lint_routes`,
the rules on what nodes say in :mod:`faultwise.graph.lint_text`, the findings and the
recorder in :mod:`faultwise.graph.lint_run`. The list of checks is in knowledge/README.md,
"What lint checks".
"""

from __future__ import annotations

import re
from pathlib import Path

from faultwise.graph import lint_routes
from faultwise.graph.knowledge import Knowledge, LoadResult, load_all
from faultwise.graph.lint_run import Finding, LintReport, LintRun, NamesFn
from faultwise.graph.lint_text import text_rules
from faultwise.graph.nodes import STAGES, Check, Fault, Suspects

# DESIGN section 6: the symptom ids are a contract.
SYMPTOM_IDS = ("dead-nothing-lights", "dead-lights-on", "hum-loud", "noise-no-stations",
               "weak-reception", "low-volume", "distorted-audio", "intermittent",
               "squeal-or-motorboat", "dial-off-calibration", "fades-after-warmup",
               "scratchy-controls", "smoke-or-overheat", "dead-after-repair")

def _plain(text: str) -> str:
    """Lower case, punctuation to spaces, single spaces: how phrasings are compared."""
    return " ".join(re.sub(r"[^\w\s]", " ", text.lower()).split())


class _Lint(LintRun):
    """One lint run with the rules on node content as methods."""

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
            if node.unfed is not None and self.known is not None:
                for name in node.unfed.readings:
                    if not any(self.known[f](name) for f in node.families):
                        self.at(node, f"the 'unfed' reading '{name}' is not an expectation "
                                "name of the check's families", "use a name from "
                                "knowledge/README.md, 'Expectation names'")
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
            self._parts(node)
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

    def _parts(self, node: Fault) -> None:
        """Each suggested part comes back whole from the bench's parts field."""
        from faultwise.core.parts_list import part_problem

        for part in node.parts:
            why = part_problem(part)
            if why:
                self.at(node, f"the part '{part}' would not be recorded as one part: {why}",
                        "quote the item and put its details in brackets: "
                        "\"resistor of the marked value (for example 22 ohm 2 W)\"")

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


def _inject_known(k: Knowledge, path: Path, run: LintRun) -> None:
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
    lint_routes.targets(run)
    walk_graph = g.edge_subgraph((u, v) for u, v, d in g.edges(data=True)
                                 if d["kinds"] != ("verify",)).copy()
    walk_graph.add_nodes_from(g.nodes)
    has_cycle = lint_routes.cycles(run, walk_graph)
    run.symptoms(path)
    lint_routes.reachability(run, walk_graph)
    run.expectations()
    run.cautions()
    run.checks(notes_by_node)
    run.suspects()
    run.faults(notes_by_node)
    if not has_cycle:
        lint_routes.walks(run)
        lint_routes.family_reach(run)
        lint_routes.priors(run)
    run.phrasings()
    run.learned()
    _inject_known(k, path, run)
    text_rules(run)
    summary = _summary(k, result)
    summary.update(errors=len(run.errors), warnings=len(run.warnings))
    return LintReport(run.errors, run.warnings, summary)
