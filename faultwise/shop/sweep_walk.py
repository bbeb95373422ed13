"""One fault signature walked on one demo set, and which (symptom, family, fault) to walk.

The signature becomes readings for the set (a class becomes a number from the set's band
through ``expect.classify.representative_value``; numbers are used as written; a name the
set has no expectation for keeps its class word), every other reading is nominal and every
other observation normal, as ``walk.scripted.auto_walk`` does. A fault is walked on the
first demo set of the family (file order) on which it applies (family and ``when``, see
:mod:`faultwise.graph.applicability`), or on all of them. A ``FaultwiseError`` raised while
walking is recorded in the walk (``SweepWalk.error``), not raised.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from typing import TYPE_CHECKING

from faultwise.core.errors import FaultwiseError
from faultwise.graph.nodes import FAMILIES, MEASURE_OUTCOMES, Fault, Signature
from faultwise.shop.sweep_orders import OrderFn
from faultwise.shop.sweep_results import DemoSet, PathStep, SweepWalk, Unreachable

if TYPE_CHECKING:
    from faultwise.expect.context import Expected
    from faultwise.graph.knowledge import Knowledge
    from faultwise.walk.evidence import Evidence


def synthesise_readings(signature: Signature,
                        expectations: Mapping[str, Expected]) -> dict[str, object]:
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


def swept_faults(knowledge: Knowledge, symptom: str, family: str) -> list[str]:
    """Faults swept for a pair: reachable, with a signature, and a prior above zero for the
    symptom (a zero prior says the walk can reach the fault but it does not cause this
    complaint, so no walk of the complaint is expected to end at it)."""
    return sorted(f for f in knowledge.faults_for(symptom, family)
                  if has_signature(knowledge.nodes[f]) and symptom in knowledge.nodes[f].causes)


def has_signature(fault: Fault) -> bool:
    return bool(fault.signature.readings) or bool(fault.signature.observations)


def pair_applies(knowledge: Knowledge, symptom: str, family: str) -> bool:
    sym = knowledge.symptoms.get(symptom)
    return sym is not None and family in sym.families and family in sym.entry


def sweep_targets(knowledge: Knowledge, *, families: Iterable[str] = FAMILIES,
                  symptom: str | None = None) -> tuple[list[tuple[str, str, str]], list[Unreachable]]:
    """(symptom, family, fault) triples to walk, in a stable order, and the unreachable priors."""
    targets, unreachable = [], []
    wanted = tuple(families)
    for node in knowledge.nodes.values():
        if not isinstance(node, Fault) or not has_signature(node):
            continue
        for sym in node.causes:
            if symptom is not None and sym != symptom:
                continue
            for fam in node.families:
                if fam not in wanted or not pair_applies(knowledge, sym, fam):
                    continue
                if node.id in knowledge.faults_for(sym, fam):
                    targets.append((sym, fam, node.id))
                else:
                    unreachable.append(Unreachable(node.id, sym, fam))
    targets.sort()
    unreachable.sort(key=lambda u: (u.symptom, u.family, u.fault))
    return targets, unreachable


def pair_faults(knowledge: Knowledge, symptom: str, demo: DemoSet) -> list[str]:
    """Every fault the complaint's walk weighs on this set: swept for the pair and applying to
    the set (family and ``when``)."""
    return [f for f in swept_faults(knowledge, symptom, demo.family)
            if fault_applies_on(knowledge, f, demo)]


def fault_applies_on(knowledge: Knowledge, fault_id: str, demo: DemoSet) -> bool:
    """Whether the fault applies on this demo set (family and ``when``)."""
    from faultwise.graph.applicability import node_applies

    return node_applies(knowledge.node(fault_id), demo.profile, demo.expectations)


def sets_for_fault(knowledge: Knowledge, fault_id: str, demos: Sequence[DemoSet], *,
                   all_sets: bool = False) -> tuple[DemoSet, ...]:
    """The demo sets (in file order) a fault is walked on: the first it applies on, or all."""
    fitting = tuple(d for d in demos if fault_applies_on(knowledge, fault_id, d))
    return fitting if all_sets else fitting[:1]


_EVIDENCE: dict[tuple[int, int], tuple] = {}


def set_evidence(knowledge: Knowledge, demo: DemoSet) -> Evidence:
    """One :class:`~faultwise.walk.evidence.Evidence` per knowledge and set, shared by every
    walk the sweeps make of that set (its predictions do not depend on the complaint)."""
    from faultwise.walk.evidence import Evidence

    key = (id(knowledge), id(demo.profile))
    hit = _EVIDENCE.get(key)
    if hit is not None and hit[0] is knowledge and hit[1] is demo.profile:
        return hit[2]
    if len(_EVIDENCE) > 64:
        _EVIDENCE.clear()
    evidence = Evidence(knowledge, demo.profile, demo.expectations)
    _EVIDENCE[key] = (knowledge, demo.profile, evidence)
    return evidence


def walk_signature(knowledge: Knowledge, fault_id: str, symptom: str, demo: DemoSet, *,
                   order: OrderFn | None = None,
                   counts: Mapping[str, int] | None = None) -> SweepWalk:
    """Walk one fault's signature for one symptom on one demo set."""
    from faultwise.walk.scripted import auto_walk

    fault = knowledge.node(fault_id)
    readings = synthesise_readings(fault.signature, demo.expectations)
    evidence = set_evidence(knowledge, demo)
    kwargs = {"expectations": demo.expectations, "counts": counts, "evidence": evidence}
    if order is not None:
        kwargs["order"] = order
    try:
        # A listening check is silent where the signature's own readings leave a stage
        # unfed, as in the injected sweep and the walk's predictions.
        result = auto_walk(knowledge, demo.profile, symptom, readings,
                           evidence.observations(fault, readings), **kwargs)
    except FaultwiseError as exc:
        return SweepWalk(fault_id, symptom, demo.family, demo.name, None, None, 0, 0.0, 0.0,
                         error=str(exc))
    steps = [s for s in result.steps if s.phase == "diagnose" and s.outcome != "skipped"]
    path = tuple(PathStep(s.node, s.outcome, s.value, s.minutes) for s in steps)
    last = path[-1].minutes if path else 0.0
    return SweepWalk(fault_id, symptom, demo.family, demo.name,
                     result.conclusion.id if result.conclusion else None, result.escalate,
                     result.checks, float(result.minutes), float(last), path)
