"""The sweep: every fault signature walked through the graph, and how fast the walk finds it.

For every fault with a signature, every symptom in its ``priors`` whose walk can reach it
(``Knowledge.faults_for``) and every family it applies to, the sweep picks the first demo
set of that family (file order) on which the fault applies (its ``when`` holds, see
:mod:`faultwise.graph.applicability`; a fault that applies on none of them is listed under
``no_set`` for that family, not walked), turns the signature into readings for that set
(a class becomes a number from the set's band through ``expect.classify.representative_value``;
numbers are used as written; every other reading is nominal and every other observation
normal, as ``auto_walk`` does), walks automatically and records whether the walk
concluded that fault, after how many checks and minutes (DESIGN section 12).

Figures per (symptom, family) pair are prior-weighted: the weights are
``rank.fault_probabilities`` for the pair (the knowledge's learned counts included, as the
walk uses them), renormalised over the faults swept in the pair. The overall figures are
plain means over the pairs. Baseline orders re-walk every signature with the suspects
taken in another order (through the walk's ``order`` hook), to show what p/c ranking buys.

This module holds the figures and the two entry points (``run_sweep``, ``learning_check``);
the result types are in ``sweep_results``, the baseline orders in ``sweep_orders``, one
signature's walk and the choice of what to walk in ``sweep_walk``. No printing, no UI
imports; ``faultwise.shop.sweep_report`` formats the result.
"""

from __future__ import annotations

import math
import os
from collections.abc import Iterable, Mapping, Sequence
from datetime import datetime
from pathlib import Path
from typing import TYPE_CHECKING

from faultwise.core.errors import FaultwiseError
from faultwise.graph.nodes import FAMILIES, Fault
from faultwise.shop.sweep_orders import RANDOM_SEED, baseline_orders, walk_has_order_hook
from faultwise.shop.sweep_results import (DemoSet, LearningCheck, NoSet, PairFigures,
                                          SweepReport, SweepWalk)
from faultwise.shop.sweep_walk import (has_signature, pair_applies, sets_for_fault,
                                       sweep_targets, walk_signature)

if TYPE_CHECKING:
    from faultwise.cases.listing import CaseSummary
    from faultwise.graph.knowledge import Knowledge


# ------------------------------------------------------------------------- arithmetic

def entropy_bits(probabilities: Iterable[float]) -> float:
    """H = -sum p_i log2 p_i over the normalised p (Shannon 1948); zero terms contribute 0."""
    ps = [float(p) for p in probabilities]
    total = sum(ps)
    if total <= 0:
        return 0.0
    qs = [p / total for p in ps]
    h = -sum(q * math.log2(q) for q in qs if q > 0)
    return h if h > 0 else 0.0           # one certain fault: 0 bits, not -0.0


def renormalised(weights: Mapping[str, float], keep: Iterable[str]) -> dict[str, float]:
    """The weights of ``keep`` scaled to sum to 1 (equal shares when they sum to 0)."""
    kept = {k: float(weights.get(k, 0.0)) for k in keep}
    total = sum(kept.values())
    if not kept:
        return {}
    if total <= 0:
        return {k: 1.0 / len(kept) for k in kept}
    return {k: w / total for k, w in kept.items()}


def weighted_mean(values: Mapping[str, float], weights: Mapping[str, float]) -> float:
    """sum_f w_f v_f / sum_f w_f over the keys of ``values``."""
    total = sum(weights.get(k, 0.0) for k in values)
    if total <= 0:
        return sum(values.values()) / len(values) if values else 0.0
    return sum(weights.get(k, 0.0) * v for k, v in values.items()) / total


def _mean(xs: Sequence[float]) -> float:
    return sum(xs) / len(xs) if xs else 0.0


# ------------------------------------------------------------------------------- sets

def load_demo_sets(sets_dir: str | os.PathLike[str],
                   knowledge_dir: str | os.PathLike[str] | None = None
                   ) -> dict[str, list[DemoSet]]:
    """Every set profile in ``sets_dir`` (sorted by file name), by family, with its expectations."""
    from faultwise.expect.expected import expect
    from faultwise.profile.load import load_profile
    from faultwise.profile.tubes import workspace_tube_dir, workspace_tube_table

    tubes = workspace_tube_dir(knowledge_dir)
    table = workspace_tube_table(knowledge_dir)
    out: dict[str, list[DemoSet]] = {}
    for path in sorted(Path(sets_dir).glob("*.yaml")):
        profile = load_profile(path, knowledge_dir=tubes)
        out.setdefault(profile.family, []).append(
            DemoSet(path.name, profile.family, profile, expect(profile, tube_table=table)))
    return out


# ------------------------------------------------------------------------------ sweeping

def _per_fault(walks: Iterable[SweepWalk], attr: str) -> dict[str, float]:
    """Mean of one figure per fault (over the sets it was walked on)."""
    acc: dict[str, list[float]] = {}
    for w in walks:
        acc.setdefault(w.fault, []).append(float(getattr(w, attr)))
    return {f: _mean(v) for f, v in acc.items()}


def pair_figures(knowledge: Knowledge, symptom: str, family: str, walks: Sequence[SweepWalk],
                 baseline_walks: Mapping[str, Sequence[SweepWalk]]) -> PairFigures:
    """Prior-weighted means of one pair's walks (weights: fault_probabilities, renormalised)."""
    from faultwise.walk.rank import fault_probabilities

    probs = fault_probabilities(knowledge, symptom, family)
    swept = sorted({w.fault for w in walks})
    weights = renormalised(probs, swept)
    base = {name: weighted_mean(_per_fault(bw, "checks"), weights)
            for name, bw in baseline_walks.items()}
    unswept = tuple(sorted(set(probs) - set(swept)))
    return PairFigures(
        symptom, family, weights, len(walks), sum(1 for w in walks if w.isolated),
        weighted_mean(_per_fault(walks, "checks"), weights),
        weighted_mean(_per_fault(walks, "minutes"), weights),
        weighted_mean(_per_fault(walks, "known_cause_minutes"), weights),
        entropy_bits(weights.values()), base, unswept)


def run_sweep(knowledge: Knowledge, sets: Mapping[str, Sequence[DemoSet]], *, family: str | None = None,
              symptom: str | None = None, all_sets: bool = False, baselines: bool = True,
              seed: int = RANDOM_SEED) -> SweepReport:
    """Walk every signature (see the module doc); baselines need the walk's ``order`` hook."""
    if family is not None and family not in FAMILIES:
        raise FaultwiseError(f"unknown family '{family}'", key="--family",
                             hint="use one of " + ", ".join(FAMILIES))
    if symptom is not None and symptom not in knowledge.symptoms:
        raise FaultwiseError(f"unknown symptom '{symptom}'", key="--symptom",
                             hint="use one of " + ", ".join(sorted(knowledge.symptoms)))
    families = (family,) if family else FAMILIES
    targets, unreachable = sweep_targets(knowledge, families=families, symptom=symptom)
    orders = baseline_orders(knowledge, seed) if baselines and walk_has_order_hook() else None
    walks: list[SweepWalk] = []
    base_walks: dict[str, list[SweepWalk]] = {name: [] for name in (orders or {})}
    used: dict[str, set[str]] = {}
    missing: dict[str, set[str]] = {}
    placed: dict[tuple[str, str], tuple[DemoSet, ...]] = {}
    for sym, fam, fault in targets:
        if (fam, fault) not in placed:
            placed[fam, fault] = sets_for_fault(knowledge, fault, sets.get(fam, ()),
                                                all_sets=all_sets)
        demos = placed[fam, fault]
        if not demos:
            missing.setdefault(fam, set()).add(fault)
        for demo in demos:
            used.setdefault(fam, set()).add(demo.name)
            walks.append(walk_signature(knowledge, fault, sym, demo))
            for name, fn in (orders or {}).items():
                base_walks[name].append(walk_signature(knowledge, fault, sym, demo, order=fn))
    pairs = []
    for key in sorted({(w.symptom, w.family) for w in walks}):
        mine = [w for w in walks if (w.symptom, w.family) == key]
        theirs = {n: [w for w in bw if (w.symptom, w.family) == key]
                  for n, bw in base_walks.items()}
        pairs.append(pair_figures(knowledge, key[0], key[1], mine, theirs))
    overall_base = ({n: _mean([p.baselines[n] for p in pairs]) for n in orders}
                    if orders is not None else None)
    walked_sets = {fam: tuple(d.name for d in sets.get(fam, ()) if d.name in used[fam])
                   for fam in FAMILIES if fam in used}
    no_set = tuple(NoSet(fam, tuple(sorted(missing[fam]))) for fam in FAMILIES if fam in missing)
    return SweepReport(
        tuple(walks), tuple(pairs), walked_sets, no_set, tuple(unreachable),
        _mean([p.mean_checks for p in pairs]), _mean([p.entropy_bits for p in pairs]),
        _mean([p.mean_minutes for p in pairs]), _mean([p.known_cause_minutes for p in pairs]),
        overall_base, {n: tuple(bw) for n, bw in base_walks.items()}, seed)


# ------------------------------------------------------------------------------ learning

def _opened_key(summary: CaseSummary) -> tuple[float, str, str]:
    try:
        stamp = datetime.fromisoformat(str(summary.opened)).timestamp()
    except ValueError:
        stamp = math.inf
    return stamp, str(summary.opened), summary.id


def learned_counts(summaries: Iterable[CaseSummary],
                   knowledge: Knowledge) -> dict[str, dict[str, dict[str, int]]]:
    """{symptom: {family: {fault: n}}} over closed cases whose conclusion the knowledge knows."""
    counts: dict = {}
    for s in summaries:
        node = knowledge.nodes.get(s.fault or "")
        if not isinstance(node, Fault):
            continue
        pair = counts.setdefault(s.symptom, {}).setdefault(s.family, {})
        pair[s.fault] = pair.get(s.fault, 0) + 1
    return counts


def learning_check(knowledge: Knowledge, cases_dir: str | os.PathLike[str], sets: Mapping[str, Sequence[DemoSet]],
                   bench: str = "B1") -> LearningCheck | None:
    """Split the closed, concluded cases at the median opened date; learn on the earlier half.

    The earlier part is the first floor(n/2) cases by opened time (id breaks ties), the later
    part the rest. None when fewer than two such cases exist.
    """
    from faultwise.cases.store import CaseStore

    folder = Path(cases_dir)
    if not folder.is_dir():
        return None
    listing = CaseStore(folder, bench).list()
    closed = sorted((s for s in listing.closed if s.fault), key=_opened_key)
    if len(closed) < 2:
        return None
    half = len(closed) // 2
    earlier, later = closed[:half], closed[half:]
    counts = learned_counts(earlier, knowledge)
    skipped: list[tuple[str, str]] = []
    prior, learned = [], []
    for case in later:
        reason = _unwalkable(knowledge, case, sets)
        if reason:
            skipped.append((case.id, reason))
            continue
        demo = sets_for_fault(knowledge, case.fault, sets[case.family])[0]
        pair = counts.get(case.symptom, {}).get(case.family, {})
        prior.append(walk_signature(knowledge, case.fault, case.symptom, demo, counts={}))
        learned.append(walk_signature(knowledge, case.fault, case.symptom, demo, counts=pair))

    def mean_of(ws: Sequence[SweepWalk], attr: str) -> float | None:
        return _mean([float(getattr(w, attr)) for w in ws]) if ws else None
    return LearningCheck(
        len(closed), len(earlier), len(later), later[0].opened, len(prior), tuple(skipped),
        counts, mean_of(prior, "checks"), mean_of(learned, "checks"),
        mean_of(prior, "minutes"), mean_of(learned, "minutes"),
        sum(1 for w in prior if w.isolated), sum(1 for w in learned if w.isolated))


def _unwalkable(knowledge: Knowledge, case: CaseSummary,
                sets: Mapping[str, Sequence[DemoSet]]) -> str:
    """Why a later case cannot be re-walked, or ''."""
    node = knowledge.nodes.get(case.fault or "")
    if not isinstance(node, Fault):
        return f"the fault '{case.fault}' is not in the knowledge"
    if not has_signature(node):
        return f"the fault '{case.fault}' has no signature"
    if not pair_applies(knowledge, case.symptom, case.family):
        return f"the symptom '{case.symptom}' has no walk for {case.family} sets"
    if case.fault not in knowledge.faults_for(case.symptom, case.family):
        return f"the walk for '{case.symptom}' cannot reach '{case.fault}'"
    if not sets.get(case.family):
        return f"no demo set of the {case.family} family"
    if not sets_for_fault(knowledge, case.fault, sets[case.family]):
        return f"no demo set of the {case.family} family on which '{case.fault}' applies"
    return ""
