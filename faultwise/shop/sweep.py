"""The sweep: every fault signature walked through the graph, and how fast the walk finds it.

For every fault with a signature, every symptom in its ``priors`` whose walk can reach it
(``Knowledge.faults_for``) and every family it applies to, the sweep picks the first demo
set of that family (file order) on which the fault applies (its ``when`` holds, see
:mod:`faultwise.graph.applicability`; a fault that applies on none of them is listed under
``no_set`` for that family, not walked), turns the signature into readings for that set
(a class becomes a number from the set's band through ``walk.representative_value``;
numbers are used as written; every other reading is nominal and every other observation
normal, as ``auto_walk`` does), walks automatically and records whether the walk
concluded that fault, after how many checks and minutes (DESIGN section 12).

Figures per (symptom, family) pair are prior-weighted: the weights are
``rank.fault_probabilities`` for the pair (the knowledge's learned counts included, as the
walk uses them), renormalised over the faults swept in the pair. The overall figures are
plain means over the pairs. Baseline orders re-walk every signature with the suspects
taken in another order (through the walk's ``order`` hook), to show what p/c ranking buys.

No printing, no UI imports; ``faultwise.shop.sweep_report`` formats the result.
"""

from __future__ import annotations

import inspect
import math
import random
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from datetime import datetime
from pathlib import Path

from faultwise.core.errors import FaultwiseError
from faultwise.graph.nodes import FAMILIES, MEASURE_OUTCOMES, Fault

#: stage order of the speaker-back baseline: signal tracing from the speaker towards the aerial,
#: then the supply last (common practice, no source).
SPEAKER_BACK = ("audio", "detector", "if", "oscillator", "antenna", "supply")
BASELINES = ("written", "speaker-back", "random")
RANDOM_SEED = 1955          # fixed so that the random baseline is the same on every run


# ------------------------------------------------------------------------------ results

@dataclass(frozen=True)
class DemoSet:
    """A demo set profile the sweep walks on, with its expectations computed once."""

    name: str                 # file name, e.g. demo-5-tube-table.yaml
    family: str
    profile: object
    expectations: Mapping


@dataclass(frozen=True)
class PathStep:
    """One answered check of a sweep walk."""

    node: str
    outcome: str
    value: float | None = None
    minutes: float = 0.0


@dataclass(frozen=True)
class SweepWalk:
    """One signature walked: which fault, where, and what the walk concluded."""

    fault: str
    symptom: str
    family: str
    set_name: str
    concluded: str | None     # fault id the walk concluded, or None
    escalate: str | None      # escalate node (or "cleared") where the walk ran out
    checks: int
    minutes: float
    known_cause_minutes: float   # minutes of the last check before the conclusion
    path: tuple[PathStep, ...] = ()
    error: str = ""           # a FaultwiseError raised while walking (the walk failed)

    @property
    def isolated(self) -> bool:
        return self.concluded == self.fault and not self.error

    def ended_at(self) -> str:
        """Where the walk ended, in words."""
        if self.error:
            return f"an error ({self.error})"
        if self.concluded:
            return f"the fault '{self.concluded}'"
        if self.escalate and self.escalate != "cleared":
            return f"the escalation '{self.escalate}'"
        return "no conclusion (every suspect cleared)"


@dataclass(frozen=True)
class PairFigures:
    """Prior-weighted figures for one (symptom, family) pair."""

    symptom: str
    family: str
    weights: Mapping[str, float]       # fault -> renormalised probability (swept faults)
    walks: int
    isolated: int
    mean_checks: float
    mean_minutes: float
    known_cause_minutes: float
    entropy_bits: float
    baselines: Mapping[str, float]     # baseline name -> prior-weighted mean checks
    unswept: tuple[str, ...] = ()      # faults the walk can reach that carry no prior/signature

    @property
    def ratio(self) -> float | None:
        """mean checks / entropy bits; None when the entropy is zero (one fault)."""
        return self.mean_checks / self.entropy_bits if self.entropy_bits > 0 else None


@dataclass(frozen=True)
class Unreachable:
    """A fault whose priors name a symptom whose walk (for this family) cannot reach it."""

    fault: str
    symptom: str
    family: str


@dataclass(frozen=True)
class NoSet:
    """Faults of a family that apply on none of its demo sets (or the family has none)."""

    family: str
    faults: tuple[str, ...]


@dataclass(frozen=True)
class LearningCheck:
    """Expected checks on the later half of the closed cases, with and without learned counts.

    Method: each later case's fault signature is re-walked for its symptom and family on the
    family's sweep set, once with ``counts`` = the counts learned from the earlier half for
    that pair, once with ``counts = {}`` (the graph's priors only); the means are over the
    later cases that could be walked.
    """

    cases: int                 # closed cases with a conclusion
    earlier: int
    later: int
    split: str                 # the opened time of the first later case
    walked: int
    skipped: tuple[tuple[str, str], ...]     # (case id, reason)
    counts: Mapping            # {symptom: {family: {fault: n}}} from the earlier part
    mean_checks_prior: float | None
    mean_checks_learned: float | None
    mean_minutes_prior: float | None
    mean_minutes_learned: float | None
    isolated_prior: int = 0
    isolated_learned: int = 0
    method: str = "signature re-walk"


@dataclass(frozen=True)
class SweepReport:
    """The whole sweep: every walk, per-pair figures, overall figures and baselines."""

    walks: tuple[SweepWalk, ...]
    pairs: tuple[PairFigures, ...]
    sets: Mapping[str, tuple[str, ...]]          # family -> set file names walked
    no_set: tuple[NoSet, ...]                    # per family: faults with no demo set to walk on
    unreachable: tuple[Unreachable, ...]
    mean_checks: float
    entropy_bits: float
    mean_minutes: float
    known_cause_minutes: float
    baselines: Mapping[str, float] | None        # None when the walk has no order hook
    baseline_walks: Mapping[str, tuple[SweepWalk, ...]] = field(default_factory=dict)
    random_seed: int = RANDOM_SEED
    learning: LearningCheck | None = None

    @property
    def signatures(self) -> int:
        return len(self.walks)

    @property
    def isolated(self) -> int:
        return sum(1 for w in self.walks if w.isolated)

    @property
    def failures(self) -> tuple[SweepWalk, ...]:
        return tuple(w for w in self.walks if not w.isolated)

    @property
    def ratio(self) -> float | None:
        return self.mean_checks / self.entropy_bits if self.entropy_bits > 0 else None


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


# ----------------------------------------------------------------------- baseline orders

OrderFn = Callable[[list, object], list]


def _written_index(suspects) -> dict[str, int]:
    index: dict[str, int] = {}
    for i, inv in enumerate(suspects.investigations):
        index.setdefault(inv.target, i)
    return index


def written_order(ranked: list, suspects) -> list:
    """The investigations as the graph writes them, ignoring p/c."""
    index = _written_index(suspects)
    return sorted(ranked, key=lambda r: index.get(r.target, len(index)))


def speaker_back_order(knowledge) -> OrderFn:
    """Investigations by the stage of their target (SPEAKER_BACK), written order within a stage."""
    def order(ranked: list, suspects) -> list:
        index = _written_index(suspects)

        def key(r):
            node = knowledge.nodes.get(r.target)
            stage = getattr(node, "stage", "supply")
            rank = SPEAKER_BACK.index(stage) if stage in SPEAKER_BACK else len(SPEAKER_BACK)
            return rank, index.get(r.target, len(index))
        return sorted(ranked, key=key)
    return order


def random_order(seed: int = RANDOM_SEED) -> OrderFn:
    """Each suspects list shuffled once by random.Random(f"{seed}:{suspects id}"): fixed per seed."""
    def order(ranked: list, suspects) -> list:
        targets = list(_written_index(suspects))
        random.Random(f"{seed}:{suspects.id}").shuffle(targets)
        position = {t: i for i, t in enumerate(targets)}
        return sorted(ranked, key=lambda r: position.get(r.target, len(position)))
    return order


def baseline_orders(knowledge, seed: int = RANDOM_SEED) -> dict[str, OrderFn]:
    """The simple orders the p/c walk is measured against, by name (BASELINES)."""
    return {"written": written_order, "speaker-back": speaker_back_order(knowledge),
            "random": random_order(seed)}


def walk_has_order_hook() -> bool:
    """Whether ``walk.auto_walk`` takes ``order=`` (needed for the baselines)."""
    from faultwise.walk import scripted as walk

    return "order" in inspect.signature(walk.auto_walk).parameters


# ------------------------------------------------------------------------------- sets

def load_demo_sets(sets_dir, knowledge_dir=None) -> dict[str, list[DemoSet]]:
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


# ------------------------------------------------------------------------------ walking

def synthesise_readings(signature, expectations: Mapping) -> dict:
    """Signature readings as numbers for this set: a class -> representative_value, numbers kept.

    A name the set has no expectation for keeps its class word (the walk then takes the
    word as the outcome).
    """
    from faultwise.expect.classify import representative_value

    out: dict = {}
    for name, spec in signature.readings.items():
        if isinstance(spec, str) and spec in MEASURE_OUTCOMES and name in expectations:
            out[name] = representative_value(expectations[name], spec)
        else:
            out[name] = spec
    return out


def swept_faults(knowledge, symptom: str, family: str) -> list[str]:
    """Faults swept for a pair: reachable, with a signature, naming the symptom in their priors."""
    return sorted(f for f in knowledge.faults_for(symptom, family)
                  if _has_signature(knowledge.nodes[f]) and symptom in knowledge.nodes[f].priors)


def _has_signature(fault: Fault) -> bool:
    return bool(fault.signature.readings) or bool(fault.signature.observations)


def _pair_applies(knowledge, symptom: str, family: str) -> bool:
    sym = knowledge.symptoms.get(symptom)
    return sym is not None and family in sym.families and family in sym.entry


def sweep_targets(knowledge, *, families: Iterable[str] = FAMILIES,
                  symptom: str | None = None) -> tuple[list[tuple[str, str, str]], list[Unreachable]]:
    """(symptom, family, fault) triples to walk, in a stable order, and the unreachable priors."""
    targets, unreachable = [], []
    wanted = tuple(families)
    for node in knowledge.nodes.values():
        if not isinstance(node, Fault) or not _has_signature(node):
            continue
        for sym in node.priors:
            if symptom is not None and sym != symptom:
                continue
            for fam in node.families:
                if fam not in wanted or not _pair_applies(knowledge, sym, fam):
                    continue
                if node.id in knowledge.faults_for(sym, fam):
                    targets.append((sym, fam, node.id))
                else:
                    unreachable.append(Unreachable(node.id, sym, fam))
    targets.sort()
    unreachable.sort(key=lambda u: (u.symptom, u.family, u.fault))
    return targets, unreachable


def fault_applies_on(knowledge, fault_id: str, demo: DemoSet) -> bool:
    """Whether the fault applies on this demo set (family and ``when``)."""
    from faultwise.graph.applicability import node_applies

    return node_applies(knowledge.node(fault_id), demo.profile, demo.expectations)


def sets_for_fault(knowledge, fault_id: str, demos: Sequence[DemoSet], *,
                   all_sets: bool = False) -> tuple[DemoSet, ...]:
    """The demo sets (in file order) a fault is walked on: the first it applies on, or all."""
    fitting = tuple(d for d in demos if fault_applies_on(knowledge, fault_id, d))
    return fitting if all_sets else fitting[:1]


def walk_signature(knowledge, fault_id: str, symptom: str, demo: DemoSet, *,
                   order: OrderFn | None = None, counts: Mapping | None = None) -> SweepWalk:
    """Walk one fault's signature for one symptom on one demo set."""
    from faultwise.walk.scripted import auto_walk

    fault = knowledge.node(fault_id)
    readings = synthesise_readings(fault.signature, demo.expectations)
    kwargs = {"expectations": demo.expectations, "counts": counts}
    if order is not None:
        kwargs["order"] = order
    try:
        result = auto_walk(knowledge, demo.profile, symptom, readings,
                           dict(fault.signature.observations), **kwargs)
    except FaultwiseError as exc:
        return SweepWalk(fault_id, symptom, demo.family, demo.name, None, None, 0, 0.0, 0.0,
                         error=str(exc))
    steps = [s for s in result.steps if s.phase == "diagnose" and s.outcome != "skipped"]
    path = tuple(PathStep(s.node, s.outcome, s.value, s.minutes) for s in steps)
    last = path[-1].minutes if path else 0.0
    return SweepWalk(fault_id, symptom, demo.family, demo.name,
                     result.conclusion.id if result.conclusion else None, result.escalate,
                     result.checks, float(result.minutes), float(last), path)


# ------------------------------------------------------------------------------ sweeping

def _per_fault(walks: Iterable[SweepWalk], attr: str) -> dict[str, float]:
    """Mean of one figure per fault (over the sets it was walked on)."""
    acc: dict[str, list[float]] = {}
    for w in walks:
        acc.setdefault(w.fault, []).append(float(getattr(w, attr)))
    return {f: _mean(v) for f, v in acc.items()}


def pair_figures(knowledge, symptom: str, family: str, walks: Sequence[SweepWalk],
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


def run_sweep(knowledge, sets: Mapping[str, Sequence[DemoSet]], *, family: str | None = None,
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

def _opened_key(summary) -> tuple:
    try:
        stamp = datetime.fromisoformat(str(summary.opened)).timestamp()
    except ValueError:
        stamp = math.inf
    return stamp, str(summary.opened), summary.id


def learned_counts(summaries: Iterable, knowledge) -> dict:
    """{symptom: {family: {fault: n}}} over closed cases whose conclusion the knowledge knows."""
    counts: dict = {}
    for s in summaries:
        node = knowledge.nodes.get(s.fault or "")
        if not isinstance(node, Fault):
            continue
        pair = counts.setdefault(s.symptom, {}).setdefault(s.family, {})
        pair[s.fault] = pair.get(s.fault, 0) + 1
    return counts


def learning_check(knowledge, cases_dir, sets: Mapping[str, Sequence[DemoSet]],
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

    def mean_of(ws, attr):
        return _mean([float(getattr(w, attr)) for w in ws]) if ws else None
    return LearningCheck(
        len(closed), len(earlier), len(later), later[0].opened, len(prior), tuple(skipped),
        counts, mean_of(prior, "checks"), mean_of(learned, "checks"),
        mean_of(prior, "minutes"), mean_of(learned, "minutes"),
        sum(1 for w in prior if w.isolated), sum(1 for w in learned if w.isolated))


def _unwalkable(knowledge, case, sets) -> str:
    """Why a later case cannot be re-walked, or ''."""
    node = knowledge.nodes.get(case.fault or "")
    if not isinstance(node, Fault):
        return f"the fault '{case.fault}' is not in the knowledge"
    if not _has_signature(node):
        return f"the fault '{case.fault}' has no signature"
    if not _pair_applies(knowledge, case.symptom, case.family):
        return f"the symptom '{case.symptom}' has no walk for {case.family} sets"
    if case.fault not in knowledge.faults_for(case.symptom, case.family):
        return f"the walk for '{case.symptom}' cannot reach '{case.fault}'"
    if not sets.get(case.family):
        return f"no demo set of the {case.family} family"
    if not sets_for_fault(knowledge, case.fault, sets[case.family]):
        return f"no demo set of the {case.family} family on which '{case.fault}' applies"
    return ""
