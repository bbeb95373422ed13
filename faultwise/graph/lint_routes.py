"""Lint rules on the routes: targets, cycles, reachability, and each symptom's walk per family.

``targets``: every route names a node (or ``cleared``). ``cycles``: the walk graph (verify
routes left out) has none, named node by node. ``reachability``: every fault is reached from
a symptom entry or a closing check, every other node from those or a fault's verify checks.
``family_reach``: a fault is reached by a walk of every family it claims. ``walks``: per
symptom and family, every route from the entry leads to a node of that family (each
(node, target, family) reported once; a suspects list may name an investigation of fewer
families when another serves the family), and no walk ends in ``cleared`` outside every
suspects list (a skipped check may). ``priors``: every fault a symptom's walk reaches has
a prior for it. ``walks``, ``family_reach`` and ``priors`` run only on a graph without
cycles.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from faultwise.graph.knowledge import edges_of
from faultwise.graph.lint_run import LintRun
from faultwise.graph.nodes import CLEARED, FAMILIES, Check, Fault, Suspects

if TYPE_CHECKING:
    import networkx as nx

    from faultwise.graph.knowledge import Knowledge


def targets(run: LintRun) -> None:
    """Every route names a node, or ``cleared`` (never from ``verify``)."""
    for node in run.k.nodes.values():
        for target, kind, outcome in edges_of(node):
            if target == CLEARED:
                if kind == "verify":
                    run.at(node, "'verify' names 'cleared'", "list check ids to repeat")
                continue
            if target not in run.k.nodes:
                what = f"outcome '{outcome}'" if outcome else f"'{kind}'"
                run.at(node, f"{what} routes to '{target}', which does not exist",
                       "fix the id, add the node, or route it to 'cleared'")


def cycles(run: LintRun, g: nx.DiGraph) -> bool:
    """Report every cycle of the walk graph ``g`` (networkx SCCs); True when there is one."""
    import networkx as nx

    found = False
    for component in nx.strongly_connected_components(g):
        first = min(component)
        if len(component) == 1 and not g.has_edge(first, first):
            continue
        cycle = nx.find_cycle(g.subgraph(component), source=first)
        path = " -> ".join([u for u, _ in cycle] + [cycle[0][0]])
        run.at(run.k.nodes[first], f"the routes form a cycle: {path}",
               "a walk must always move on; route one of these to a new node")
        found = True
    return found


def reachability(run: LintRun, g: nx.DiGraph) -> None:
    """Every fault is reached from an entry or closing check; every node from those or a verify."""
    import networkx as nx

    k = run.k
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
            run.at(node, "no symptom reaches this fault",
                   "route an outcome or an investigation to it, or remove it")
        elif node.id not in reached:
            run.at(node, "no symptom entry reaches this node",
                   "route something to it, or remove it")


def family_reach(run: LintRun) -> None:
    """A fault is reached by a walk of every family it applies to (a warning)."""
    k = run.k
    for family in FAMILIES:
        found = set()
        for s in k.symptoms.values():
            if family in s.families and s.entry.get(family) in k.nodes:
                found |= k.faults_under(s.entry[family], family)
        for c in k.closing_checks(family):
            found |= k.faults_under(c.id, family)
        for node in k.nodes.values():
            if isinstance(node, Fault) and family in node.families and node.id not in found:
                run.at(node, f"the fault applies to {family} sets but no {family} walk "
                       "reaches it", "narrow its 'families' or route a check of that "
                       "family to it", warning=True)


def walks(run: LintRun) -> None:
    """Per symptom and family: every route applies to the family, no dead ``cleared``."""
    k = run.k
    reported: set[tuple[str, str, str]] = set()
    for s in k.symptoms.values():
        for family in s.families:
            entry = s.entry.get(family)
            if entry not in k.nodes or family not in k.nodes[entry].families:
                continue
            _routes_apply(run, entry, family, s.id, reported)
            _escapes(run, entry, family, s.id, {})


def _routes_apply(run: LintRun, entry: str, family: str, symptom: str,
                  reported: set[tuple[str, str, str]]) -> None:
    """Every route a walk from ``entry`` can take leads to a node of ``family``. A suspects
    list may name an investigation of fewer families when another of its investigations
    serves this one: the ranking leaves out what does not apply to the set
    (:func:`faultwise.walk.rank.target_applies`)."""
    k, todo, seen = run.k, [entry], {entry}
    while todo:
        node = k.nodes[todo.pop()]
        for target, kind, outcome in edges_of(node):
            if kind == "verify" or target == CLEARED or target not in k.nodes:
                continue
            if kind == "suspect" and isinstance(node, Suspects) \
                    and family not in k.nodes[target].families and _list_serves(k, node, family):
                continue
            if family not in k.nodes[target].families:
                if (node.id, target, family) in reported:
                    continue
                reported.add((node.id, target, family))
                what = f"outcome '{outcome}'" if outcome else f"'{kind}'"
                run.at(node, f"{what} routes to '{target}', which does not apply to "
                       f"{family} sets (walk of '{symptom}')", "add the family to that "
                       "node, or route this family elsewhere")
            elif target not in seen:
                seen.add(target)
                todo.append(target)


def _list_serves(k: Knowledge, node: Suspects, family: str) -> bool:
    """Whether one of the list's investigations applies to the family."""
    return any(inv.target in k.nodes and family in k.nodes[inv.target].families
               for inv in node.investigations)


def _escapes(run: LintRun, node_id: str, family: str, symptom: str,
             memo: dict[str, bool]) -> bool:
    """True when a walk from here can end in ``cleared`` outside every suspects list."""
    if node_id in memo:
        return memo[node_id]
    memo[node_id] = False          # guards against cycles (reported elsewhere)
    node = run.k.nodes[node_id]
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
                run.at(node, f"'{outcome}' ends in 'cleared' outside any suspects list, "
                       f"so the walk of '{symptom}' ({family}) stops with nothing found",
                       "route it to a node or an escalate")
            elif _follow(run, target, family):
                out |= _escapes(run, target, family, symptom, memo)
    elif isinstance(node, Suspects):
        if node.exhausted == CLEARED:
            out = True
            run.at(node, f"the list is exhausted into 'cleared' with no enclosing list "
                   f"(walk of '{symptom}', {family})", "set 'exhausted:' to an escalate "
                   "node")
        elif _follow(run, node.exhausted, family):
            out = _escapes(run, node.exhausted, family, symptom, memo)
    memo[node_id] = out
    return out


def _follow(run: LintRun, target: str, family: str) -> bool:
    node = run.k.nodes.get(target)
    return node is not None and family in node.families


def priors(run: LintRun) -> None:
    """Every fault a symptom's walk reaches has a prior for that symptom (a warning)."""
    k = run.k
    for s in k.symptoms.values():
        for family in s.families:
            entry = s.entry.get(family)
            if entry not in k.nodes:
                continue
            for fid in sorted(k.faults_under(entry, family)):
                fault = k.nodes[fid]
                if s.id not in fault.priors:
                    run.at(fault, f"no prior for '{s.id}', which reaches this fault",
                           f"add '{s.id}: <weight>' to 'priors' (the walk uses 1)",
                           warning=True)
