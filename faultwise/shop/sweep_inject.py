"""The injected sweep: every modelled fault broken in every set's calc model, and walked.

For every demo set (or every profile of ``--sets``) and every fault that carries a
``model`` (:mod:`faultwise.expect.fault_models`) and applies to the set (family, ``when``, and the
roles the model names), the faulty set's readings are computed with the same engine
(:func:`faultwise.expect.fault_physics.inject` on the set's expectations). Every symptom in the
fault's priors whose walk for the family can reach the fault is walked: reading checks are
answered with the faulty nominal value, observation checks from the fault's signature
(missing: the normal choice), exactly as the sweep's walk does (``walk.auto_walk``). The
walk is then *found* (concluded this fault), *wrong* (concluded another) or *missed* (ran
out: escalated or every suspect cleared). A miss listed in ``inject_known.yaml``
(:mod:`faultwise.graph.inject_known`: the physical reason and the check that finds the fault) is
*explained*, reported but not a failure.

A second pass answers every reading with a value drawn uniformly within the faulty band
(``random.Random(f"{seed}:{set}:{fault}")``): it shows which faults a real part's spread
can hide; it is reported, not failed on.

The healthy set: every complaint of the set's family walked with nominal readings and normal
observations must end without blaming a part.

The optimal-order bound per complaint and set (:mod:`faultwise.shop.optimal_order`): hypotheses
are the faults walked (weights ``rank.fault_probabilities``, renormalised) plus the healthy
set; checks are those the complaint's walk can reach on this set, with the outcomes the
walk saw (the same classification) and the checks' minutes. The walk's prior-weighted mean
minutes are compared with it; per family, the means over the family's sets.
"""

from __future__ import annotations

import random
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

from faultwise.core.errors import FaultwiseError
from typing import TYPE_CHECKING

from faultwise.graph.nodes import Check, Fault

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge
    from faultwise.shop.optimal_order import Problem
    from faultwise.shop.sweep_results import DemoSet
    from faultwise.walk.scripted import WalkResult

SEED = 1962


@dataclass(frozen=True)
class InjectWalk:
    set_name: str
    family: str
    fault: str
    symptom: str
    concluded: str | None
    escalate: str | None
    checks: int
    minutes: float
    error: str = ""
    path: tuple = ()

    @property
    def found(self) -> bool:
        return self.concluded == self.fault and not self.error

    @property
    def wrong(self) -> bool:
        return self.concluded is not None and self.concluded != self.fault


@dataclass(frozen=True)
class HealthyWalk:
    set_name: str
    family: str
    symptom: str
    concluded: str | None
    escalate: str | None
    checks: int
    minutes: float


@dataclass(frozen=True)
class OptimalRow:
    symptom: str
    family: str
    sets: int
    faults: int
    minutes: float               # p/c walk, prior-weighted mean
    optimal_minutes: float       # the best order that opens as the complaint does
    entropy_bits: float
    known_cause_minutes: float
    found: float                 # share of the walks found
    exact: bool = True           # every set's optimum from the exhaustive search
    free_minutes: float | None = None   # the best order that may open anywhere

    @property
    def ratio(self) -> float | None:
        return self.minutes / self.optimal_minutes if self.optimal_minutes > 0 else None


@dataclass(frozen=True)
class InjectReport:
    sets: tuple[str, ...]
    modelled_faults: int
    faults: int
    walks: tuple[InjectWalk, ...]
    band_walks: tuple[InjectWalk, ...]
    healthy: tuple[HealthyWalk, ...]
    skipped: tuple[tuple[str, str, str], ...]     # (set, fault, reason)
    optimal: tuple[OptimalRow, ...]
    seed: int = SEED
    known: Mapping = field(default_factory=dict)   # (set, fault) -> inject_known.Known

    def is_known(self, w: InjectWalk) -> bool:
        return (w.set_name, w.fault) in self.known and w.concluded is None and not w.error

    @property
    def found(self) -> int:
        return sum(1 for w in self.walks if w.found)

    @property
    def wrong(self) -> tuple[InjectWalk, ...]:
        return tuple(w for w in self.walks if w.wrong or w.error)

    @property
    def missed(self) -> tuple[InjectWalk, ...]:
        return tuple(w for w in self.walks if w.concluded is None and not w.error
                     and not self.is_known(w))

    @property
    def explained(self) -> tuple[InjectWalk, ...]:
        """Misses listed in inject_known.yaml (physical reason, the check that finds them)."""
        return tuple(w for w in self.walks if self.is_known(w))

    @property
    def healthy_blamed(self) -> tuple[HealthyWalk, ...]:
        return tuple(h for h in self.healthy if h.concluded)

    @property
    def ok(self) -> bool:
        return not (self.wrong or self.missed or self.healthy_blamed)


# ------------------------------------------------------------------------------- walking

def _walk(knowledge: Knowledge, demo: DemoSet, symptom: str, readings: Mapping,
          observations: Mapping) -> WalkResult:
    from faultwise.shop.sweep_walk import set_evidence
    from faultwise.walk.scripted import auto_walk

    return auto_walk(knowledge, demo.profile, symptom, readings, observations,
                     expectations=demo.expectations, evidence=set_evidence(knowledge, demo))


def _diag_path(result: WalkResult) -> tuple:
    return tuple((s.node, s.outcome, s.minutes) for s in result.steps
                 if s.phase == "diagnose" and s.outcome != "skipped")


def walk_fault(knowledge: Knowledge, demo: DemoSet, fault: Fault, symptom: str, readings: Mapping) -> InjectWalk:
    """Walk one broken set: its readings, and the observations they and its signature give
    (a listening check whose stages the readings leave unfed is silent)."""
    from faultwise.shop.sweep_walk import set_evidence

    observations = set_evidence(knowledge, demo).observations(fault, readings)
    try:
        r = _walk(knowledge, demo, symptom, readings, observations)
    except FaultwiseError as exc:
        return InjectWalk(demo.name, demo.family, fault.id, symptom, None, None, 0, 0.0,
                          error=str(exc))
    return InjectWalk(demo.name, demo.family, fault.id, symptom,
                      r.conclusion.id if r.conclusion else None, r.escalate, r.checks,
                      float(r.minutes), path=_diag_path(r))


def band_readings(faulty: Mapping, rng: random.Random) -> dict[str, float]:
    """A value drawn uniformly within each faulty band (sorted names: reproducible)."""
    return {n: rng.uniform(faulty[n].low, faulty[n].high) for n in sorted(faulty)}


def complaints(knowledge: Knowledge, family: str) -> list[str]:
    return sorted(s.id for s in knowledge.symptoms.values()
                  if family in s.families and family in s.entry)


def modelled_faults(knowledge: Knowledge) -> list[Fault]:
    return [n for n in knowledge.nodes.values() if isinstance(n, Fault) and n.model]


# ------------------------------------------------------------------------------ sweeping

def run_inject(knowledge: Knowledge, sets: Mapping[str, Sequence], *, seed: int = SEED,
               band_pass: bool = True, optimal: bool = True,
               known: Mapping | None = None) -> InjectReport:
    """Inject, walk and bound (see the module doc). The broken sets' readings are the ones
    the walks weigh their answers with (:meth:`faultwise.walk.evidence.Evidence.physics`, the
    workspace's tube table): each fault is computed once per set."""
    from faultwise.graph.applicability import node_applies
    from faultwise.expect.fault_models import applies_to, parse_model
    from faultwise.shop.sweep_walk import set_evidence

    faults = modelled_faults(knowledge)
    parsed = {}
    for f in faults:
        try:
            parsed[f.id] = parse_model(f.model)
        except ValueError as exc:
            raise FaultwiseError(f"the fault model of '{f.id}' is not valid: {exc}",
                                 file=f.where.file if f.where else None, node=f.id,
                                 hint="run 'faultwise lint'") from None
    walks, band_walks, healthy, skipped = [], [], [], []
    outcomes_by: dict = {}
    demos = [d for fam in sets for d in sets[fam]]
    for demo in demos:
        fam = demo.family
        evidence = set_evidence(knowledge, demo)
        per_fault: dict[str, dict] = {}
        for f in faults:
            if fam not in f.families:
                continue
            if not node_applies(f, demo.profile, demo.expectations):
                continue
            why = applies_to(parsed[f.id], demo.profile)
            if why:
                skipped.append((demo.name, f.id, why))
                continue
            faulty = evidence.physics(f.id)     # the walks weigh answers with the same
            if faulty is None:
                raise FaultwiseError(f"the fault model of '{f.id}' cannot be computed on "
                                     f"{demo.name}", file=f.where.file if f.where else None,
                                     node=f.id, hint="run 'faultwise lint'")
            per_fault[f.id] = faulty
            nominal = {n: e.nominal for n, e in faulty.items()}
            rng = random.Random(f"{seed}:{demo.name}:{f.id}")
            drawn = band_readings(faulty, rng) if band_pass else None
            for sym in f.causes:
                s = knowledge.symptoms.get(sym)
                if s is None or fam not in s.families or fam not in s.entry:
                    continue
                if f.id not in knowledge.faults_for(sym, fam):
                    continue
                walks.append(walk_fault(knowledge, demo, f, sym, nominal))
                if drawn is not None:
                    band_walks.append(walk_fault(knowledge, demo, f, sym, drawn))
        for sym in complaints(knowledge, fam):
            healthy.append(_healthy_walk(knowledge, demo, sym))
        outcomes_by[demo.name] = per_fault
    rows = optimal_rows(knowledge, demos, walks, outcomes_by) if optimal else ()
    faults_walked = len({w.fault for w in walks})
    return InjectReport(tuple(d.name for d in demos), len(faults), faults_walked, tuple(walks),
                        tuple(band_walks), tuple(healthy), tuple(skipped), tuple(rows), seed,
                        dict(known or {}))


def _healthy_walk(knowledge: Knowledge, demo: DemoSet, sym: str) -> HealthyWalk:
    readings = {n: e.nominal for n, e in demo.expectations.items()}
    try:
        r = _walk(knowledge, demo, sym, readings, {})
    except FaultwiseError as exc:
        return HealthyWalk(demo.name, demo.family, sym, f"(error: {exc})", None, 0, 0.0)
    return HealthyWalk(demo.name, demo.family, sym, r.conclusion.id if r.conclusion else None,
                       r.escalate, r.checks, float(r.minutes))


# --------------------------------------------------------------------------- the bound

def reachable_checks(knowledge: Knowledge, symptom: str, family: str) -> list[str]:
    import networkx as nx

    entry = knowledge.entry(symptom, family)
    g = knowledge.family_graph(family)
    if entry not in g:
        return []
    reach = nx.descendants(g, entry) | {entry}
    return sorted(n for n in reach if isinstance(knowledge.nodes[n], Check))


def check_outcome(check: Check, fault: Fault | None, readings: Mapping | None,
                  healthy: Mapping) -> str:
    """The outcome a check gives on the broken set (fault None: the healthy set).

    ``readings``: the broken set's readings by expectation name, numbers (classified against
    the healthy band) or class words; a name it lacks reads normal.
    """
    from faultwise.expect.classify import classify

    if check.is_measurement:
        value = (readings or {}).get(check.expect) if fault is not None else None
        if value is None or check.expect not in healthy:
            return "normal"
        return value if isinstance(value, str) else classify(float(value), healthy[check.expect])
    if fault is None:
        return check.normal
    from faultwise.walk.evidence import unfed_choice

    said = unfed_choice(check, readings, healthy)
    return said if said is not None else fault.signature.observations.get(check.id, check.normal)


def set_problem(knowledge: Knowledge, demo: DemoSet, symptom: str, fault_ids: Sequence[str],
                readings_by: Mapping) -> tuple[Problem, dict]:
    """The optimal-order problem of one complaint on one set (weights from the walk's ranking).

    ``readings_by``: per fault, its readings (the injected physics for a modelled fault, the
    signature's for the others). A check confirms a fault when the outcome the fault gives
    routes straight to it (see :mod:`faultwise.shop.optimal_order`).
    """
    from faultwise.graph.applicability import applies_predicate
    from faultwise.shop.optimal_order import HEALTHY, Problem
    from faultwise.walk.rank import fault_probabilities
    from faultwise.shop.sweep import renormalised

    probs = fault_probabilities(knowledge, symptom, demo.family)
    weights = renormalised(probs, fault_ids)
    applies = applies_predicate(knowledge, demo.profile, demo.expectations)
    minutes, outcomes = {}, {}
    confirms: dict[str, set] = {f: set() for f in fault_ids}
    for cid in reachable_checks(knowledge, symptom, demo.family):
        check = knowledge.nodes[cid]
        if check.closing or not applies(cid):
            continue
        row = {f: check_outcome(check, knowledge.nodes[f], readings_by.get(f), demo.expectations)
               for f in fault_ids}
        for f, outcome in row.items():
            if check.outcomes.get(outcome) == f:
                confirms[f].add(cid)
        row[HEALTHY] = check_outcome(check, None, None, demo.expectations)
        minutes[cid] = float(check.minutes)
        outcomes[cid] = row
    entry = knowledge.entry(symptom, demo.family)
    opening = entry if entry in minutes else None
    return Problem({**weights, HEALTHY: 0.0}, minutes, outcomes,
                   {f: frozenset(c) for f, c in confirms.items()}, opening), weights


def optimal_rows(knowledge: Knowledge, demos: Sequence[DemoSet], walks: Sequence[InjectWalk],
                 faulty_by_set: Mapping) -> list[OptimalRow]:
    """Per complaint and family: the p/c walk's mean minutes against the bound, over every
    fault the walk weighs (a fault without a model, or whose model does not fit the set, is
    walked and judged on its signature, as the plain sweep does)."""
    from faultwise.shop.sweep import entropy_bits, weighted_mean
    from faultwise.shop.sweep_walk import pair_faults, synthesise_readings

    by_set = {d.name: d for d in demos}
    groups: dict = {}
    for w in walks:
        groups.setdefault((w.symptom, w.family), {}).setdefault(w.set_name, []).append(w)
    jobs = []           # (pair, set's walks by fault, injected walks, weights, problem)
    for (sym, fam), per_set in sorted(groups.items()):
        for set_name, injected in sorted(per_set.items()):
            demo = by_set[set_name]
            physics = faulty_by_set[set_name]
            ws = {w.fault: w for w in injected}
            readings_by = {}
            for f in pair_faults(knowledge, sym, demo):
                node = knowledge.nodes[f]
                if f in physics:
                    readings_by[f] = {n: e.nominal for n, e in physics[f].items()}
                else:
                    readings_by[f] = synthesise_readings(node.signature, demo.expectations)
                if f not in ws:
                    ws[f] = walk_fault(knowledge, demo, node, sym, readings_by[f])
            problem, weights = set_problem(knowledge, demo, sym, sorted(readings_by), readings_by)
            jobs.append(((sym, fam), ws, injected, weights, problem))
    solutions = solve_bounds([job[4] for job in jobs])
    acc: dict = {}
    for ((sym, fam), ws, injected, weights, _), sol in zip(jobs, solutions):
        a = acc.setdefault((sym, fam), {"m": [], "o": [], "h": [], "k": [], "f": [], "x": [],
                                         "free": [], "n": 0, "sets": 0})
        ids = sorted(weights)
        a["sets"] += 1
        a["x"].append(sol.exact)
        a["m"].append(weighted_mean({f: ws[f].minutes for f in ids}, weights))
        a["o"].append(sol.minutes)
        a["free"].append(sol.minutes if sol.free_minutes is None else sol.free_minutes)
        a["h"].append(entropy_bits(weights.values()))
        a["k"].append(weighted_mean({f: (ws[f].path[-1][2] if ws[f].path else 0.0)
                                     for f in ids}, weights))
        a["f"].append(sum(1 for w in injected if w.found) / len(injected))
        a["n"] = max(a["n"], len(ids))
    mean = lambda xs: sum(xs) / len(xs)
    return [OptimalRow(sym, fam, a["sets"], a["n"], mean(a["m"]), mean(a["o"]), mean(a["h"]),
                       mean(a["k"]), mean(a["f"]), all(a["x"]), mean(a["free"]))
            for (sym, fam), a in sorted(acc.items())]


PARALLEL_FROM = 16
"""Bounds to solve before they are spread over the machine's cores (fewer: not worth a pool)."""


def solve_bounds(problems: Sequence[Problem]) -> list:
    """:func:`faultwise.shop.optimal_order.bound` of every problem, on every core when there
    are many (each is independent; the results come back in order)."""
    import os

    from faultwise.shop.optimal_order import bound

    cores = os.cpu_count() or 1
    if cores < 2 or len(problems) < PARALLEL_FROM:
        return [bound(p) for p in problems]
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor

    # forkserver, not fork: a forked child of a process with threads (the bench, a test run)
    # can inherit a lock held mid-operation and hang
    context = multiprocessing.get_context("forkserver")
    with ProcessPoolExecutor(max_workers=cores, mp_context=context) as pool:
        return list(pool.map(bound, problems, chunksize=1))
