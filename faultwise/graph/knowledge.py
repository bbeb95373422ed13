"""Knowledge folder (YAML) -> :class:`Knowledge`: frozen nodes plus a networkx view on demand.

Reads ``symptoms.yaml``, ``cautions.yaml``, ``graph/*.yaml`` and the optional ``learned.yaml``
through :mod:`faultwise.core.yamlload` (safe, line numbers kept) and builds the model of
:mod:`faultwise.graph.nodes` (schema: knowledge/README.md, "Knowledge schema"). Nothing in the files is
evaluated. Structural problems raise :class:`KnowledgeError` naming file, line and node;
the loader collects every structural problem it can before raising the first one, and
``err.problems`` lists them all (``faultwise lint`` shows them). Graph-level checks
(targets, cycles, reachability, expectation names) are :mod:`faultwise.graph.lint`'s job.

networkx is imported only by :meth:`Knowledge.digraph` and :meth:`Knowledge.faults_under`.

The per-file parsing lives beside this module: :mod:`faultwise.graph.parse` (graph files
into nodes), :mod:`faultwise.graph.knowledge_parse` (symptoms, cautions, learned counts) and
:mod:`faultwise.graph.reader` (the located field reader and problem list they share);
their schema constants are re-exported here.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Iterable

from faultwise.core.errors import KnowledgeError
from faultwise.graph.parse import (DEFAULT_MINUTES, GRAPH_FILE_KEYS, GRAPH_FORMAT,  # the graph-file schema, re-exported
                                   INVESTIGATION_KEYS, KEYS, OTHERWISE, SIGNATURE_KEYS,
                                   read_graph_file)
from faultwise.graph.knowledge_parse import (CAUTION_KEYS, CAUTIONS_FORMAT, DEFAULT_PRIOR_STRENGTH,  # the other files' schema, re-exported
                                             LEARNED_FORMAT, SETTINGS_KEYS, SYMPTOM_KEYS,
                                             SYMPTOMS_FORMAT, read_cautions, read_learned,
                                             read_symptoms)
from faultwise.graph.reader import LoadNote, Problems
from faultwise.core.knowledge_version import content_version, knowledge_files  # re-exported
from faultwise.graph.nodes import (CLEARED, STAGES, Caution, Check, Fault, Learned, Located, Node,
                                   Suspects, Symptom)

if TYPE_CHECKING:
    import networkx as nx

__all__ = [
    "GRAPH_FORMAT", "SYMPTOMS_FORMAT", "CAUTIONS_FORMAT", "LEARNED_FORMAT",
    "DEFAULT_PRIOR_STRENGTH", "DEFAULT_MINUTES", "OTHERWISE", "KEYS", "INVESTIGATION_KEYS",
    "SIGNATURE_KEYS", "GRAPH_FILE_KEYS", "SYMPTOM_KEYS", "CAUTION_KEYS", "SETTINGS_KEYS",
    "LoadNote", "LoadResult", "knowledge_files", "content_version", "load_all",
    "load_knowledge", "load_symptoms", "edges_of", "Knowledge",
]


# ------------------------------------------------------------------------------ loading

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
    problems = Problems()
    if not root.is_dir():
        problems.add("the knowledge folder does not exist", file=str(root),
                     hint="pass --knowledge with a folder that holds symptoms.yaml and graph/")
        return LoadResult(None, problems.errors, problems.notes, {})
    symptoms, strength = read_symptoms(root / "symptoms.yaml", problems)
    cautions = read_cautions(root / "cautions.yaml", problems)
    nodes: dict[str, Node] = {}
    stage_files: dict[str, list[str]] = {s: [] for s in STAGES}
    graph_dir = root / "graph"
    if not graph_dir.is_dir():
        problems.add("the knowledge folder has no graph/ folder", file=str(graph_dir),
                     hint="create graph/<stage>.yaml for each of " + ", ".join(STAGES))
    for file in sorted(graph_dir.glob("*.yaml")) if graph_dir.is_dir() else []:
        stage, file_nodes = read_graph_file(file, problems)
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
    learned = read_learned(root / "learned.yaml", problems)
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
    problems = Problems()
    symptoms, _ = read_symptoms(Path(path) / "symptoms.yaml", problems)
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

    def digraph(self) -> nx.DiGraph:
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

    def family_graph(self, family: str) -> nx.DiGraph:
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
