"""Which checks and faults apply to the set on the bench (the rule: knowledge/README.md, "Knowledge schema", ``when``).

A node applies to a walk when (a) the set's family is in its ``families``, (b) for a
measurement check, the set's expectations hold its ``expect`` name, and (c) every condition
of its ``when`` holds. ``when`` is data: a mapping from a key of :data:`WHEN_KEYS` to one
or more values (any of them will do); the set's facts come from its profile:

- ``rectifier``: ``profile.supply.rectifier`` (tube, silicon, selenium);
- ``circuit``: ``profile.supply.circuit`` (half-wave, full-wave, bridge);
- ``tube-role``: the lineup has a tube in one of these roles;
- ``transistor-role``: the set has a transistor in one of these roles;
- ``polarity`` and ``material``: any transistor of that polarity / material;
- ``dropping-resistor``: ``yes`` when the expectation ``heaters.dropping_ohm`` has a
  nominal above zero, else ``no``.

A suspects list applies when at least one of its investigations applies (recursively); an
escalation applies to its families. Pure: no UI imports, nothing printed.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from types import MappingProxyType
from typing import TYPE_CHECKING

from faultwise.graph.nodes import Check, Fault, Suspects
from faultwise.profile.model import (CIRCUITS, MATERIALS, POLARITIES, RECTIFIERS, TRANSISTOR_ROLES,
                                     TUBE_ROLES)

if TYPE_CHECKING:
    from faultwise.expect.context import Expected
    from faultwise.graph.knowledge import Knowledge
    from faultwise.graph.nodes import Node
    from faultwise.profile.model import Profile

YES_NO = ("yes", "no")

#: the keys a node's ``when`` may use, and the values each may take
WHEN_KEYS: Mapping[str, tuple[str, ...]] = MappingProxyType({
    "rectifier": RECTIFIERS,
    "circuit": CIRCUITS,
    "tube-role": TUBE_ROLES,
    "transistor-role": TRANSISTOR_ROLES,
    "polarity": POLARITIES,
    "material": MATERIALS,
    "dropping-resistor": YES_NO,
})

DROPPING_NAME = "heaters.dropping_ohm"


def set_facts(profile: Profile, expectations: Mapping[str, Expected]) -> dict[str, frozenset[str]]:
    """The set's value(s) for every key of WHEN_KEYS (an empty set when it has none)."""
    supply = profile.supply
    dropper = expectations.get(DROPPING_NAME)
    has_dropper = dropper is not None and float(dropper.nominal) > 0
    return {
        "rectifier": frozenset({supply.rectifier} - {None}),
        "circuit": frozenset({supply.circuit} - {None}),
        "tube-role": frozenset(t.role for t in profile.tubes),
        "transistor-role": frozenset(t.role for t in profile.transistors),
        "polarity": frozenset(t.polarity for t in profile.transistors),
        "material": frozenset(t.material for t in profile.transistors),
        "dropping-resistor": frozenset({"yes" if has_dropper else "no"}),
    }


def when_holds(when: Mapping[str, tuple[str, ...]], facts: Mapping[str, frozenset[str]]) -> bool:
    """Every key's values meet the set's facts (any of a key's values will do)."""
    return all(facts.get(key, frozenset()) & set(values) for key, values in when.items())


def node_applies(node: Node, profile: Profile, expectations: Mapping[str, Expected],
                 facts: Mapping[str, frozenset[str]] | None = None) -> bool:
    """Family, expectation name (measurements) and ``when`` of one check, fault or escalation.

    A suspects list is judged by family here; :func:`applies_predicate` adds the rule that
    one of its investigations must apply.
    """
    if profile.family not in node.families:
        return False
    if isinstance(node, Check) and node.is_measurement and node.expect not in expectations:
        return False
    when = getattr(node, "when", None)
    if not when:
        return True
    return when_holds(when, facts if facts is not None else set_facts(profile, expectations))


def applies_predicate(knowledge: Knowledge, profile: Profile,
                      expectations: Mapping[str, Expected]) -> Callable[[str], bool]:
    """``applies(node_id) -> bool`` for one walk, cached per node id (unknown ids: False)."""
    facts = set_facts(profile, expectations)
    cache: dict[str, bool] = {}

    def applies(node_id: str) -> bool:
        if node_id in cache:
            return cache[node_id]
        node = knowledge.nodes.get(node_id)
        if node is None:
            return False
        cache[node_id] = False            # a list reached from inside itself does not apply
        result = node_applies(node, profile, expectations, facts)
        if result and isinstance(node, Suspects):
            result = any(applies(inv.target) for inv in node.investigations)
        cache[node_id] = result
        return result

    return applies


def applying_faults(knowledge: Knowledge, profile: Profile,
                    expectations: Mapping[str, Expected]) -> frozenset[str]:
    """The fault ids of the knowledge that apply to this set."""
    facts = set_facts(profile, expectations)
    return frozenset(n.id for n in knowledge.nodes.values()
                     if isinstance(n, Fault) and node_applies(n, profile, expectations, facts))
