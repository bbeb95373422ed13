"""What the answers so far say about each fault: the weights the p/c ranking multiplies in.

A suspects list's investigations overlap: one fault can sit under several of them (the IF
plate reading and the filter-resistor check both reach a drifted filter resistor). Ranked on
the priors alone, such a fault keeps its whole weight under the second investigation after
the first has already read it away, and the walk spends a check on it again. So every
answered check is compared with what each fault predicts for it, and a fault the answers
contradict keeps only a small part of its weight:

- a reading check (``expect:``): the fault's signature gives a class (or a number,
  classified against the set's band), and a fault that carries a ``model:`` fitting the set
  gets the class its injected physics reads (:func:`faultwise.expect.fault_physics.inject`,
  against the healthy band, the walk's own classification). Where the two differ both count
  as predicted: the signature is written for a typical bench case, the model for one
  severity (a leaky coupling capacitor at +2 V on the grid keeps the cathode in its band;
  a worse leak takes it high);
- an observation check: the fault's signature gives the choice; silent means no prediction.

The likelihood of the answers given a fault is the product over answered checks of
``AGREE`` (prediction met), ``CONTRADICTED`` (prediction missed), or, with no prediction,
1 for a normal answer and ``UNEXPLAINED`` for an abnormal one (signatures list what a fault
changes, but not always everything: a weak converter need not pull the AVC line down). No
fault is ever ruled out: a contradicted one only moves back in the order, because nominal
predictions meet real parts with tolerances, and the graph's routes, not the weights,
decide every conclusion. Physics uses the bundled tube table (only the class matters here).
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from typing import TYPE_CHECKING

from faultwise.expect.classify import classify
from faultwise.graph.nodes import Check, Fault, Node

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge
    from faultwise.profile.model import Profile

AGREE = 1.0
CONTRADICTED = 0.1
UNEXPLAINED = 0.5
_CLASSES = ("absent", "low", "normal", "high")


class Evidence:
    """Predictions of one set's faults for its checks, computed lazily and kept."""

    def __init__(self, knowledge: Knowledge, profile: Profile, expectations: Mapping) -> None:
        self.knowledge = knowledge
        self.profile = profile
        self.expectations = expectations
        self._predicted: dict[tuple[str, str], frozenset[str] | None] = {}

    def _faulty(self, fault: Fault) -> Mapping | None:
        return injected(self.profile, fault, self.expectations)

    def predicted(self, fault_id: str, check_id: str) -> frozenset[str] | None:
        """The outcomes the fault predicts for the check on this set, or None (no prediction)."""
        key = (fault_id, check_id)
        if key not in self._predicted:
            self._predicted[key] = self._predict(self.knowledge.nodes.get(fault_id),
                                                 self.knowledge.nodes.get(check_id))
        return self._predicted[key]

    def _predict(self, fault: Node | None, check: Node | None) -> frozenset[str] | None:
        if not isinstance(fault, Fault) or not isinstance(check, Check):
            return None
        sig = fault.signature
        if not check.is_measurement:
            said = sig.observations.get(check.id)
            return frozenset({said}) if said is not None else None
        name = check.expect
        band = self.expectations.get(name)
        said = set()
        spec = sig.readings.get(name)
        if isinstance(spec, str) and spec in _CLASSES:
            said.add(spec)
        elif isinstance(spec, (int, float)) and not isinstance(spec, bool) and band is not None:
            said.add(classify(float(spec), band))
        faulty = self._faulty(fault)
        if faulty is not None and band is not None and name in faulty:
            said.add(classify(faulty[name].nominal, band))
        return frozenset(said) or None

    def weights(self, faults: Iterable[str], answers: Mapping[str, str]) -> dict[str, float]:
        """Likelihood of the answers (check id -> outcome) for each fault (see the module doc)."""
        out = {}
        for f in faults:
            w = 1.0
            for check_id, outcome in answers.items():
                if outcome == "skipped":
                    continue
                said = self.predicted(f, check_id)
                if said is None:
                    check = self.knowledge.nodes.get(check_id)
                    normal = "normal" if getattr(check, "is_measurement", True) \
                        else getattr(check, "normal", "normal")
                    w *= 1.0 if outcome == normal else UNEXPLAINED
                else:
                    w *= AGREE if outcome in said else CONTRADICTED
            out[f] = w
        return out


_INJECTED: dict[tuple, tuple] = {}


def injected(profile: Profile, fault: Fault, expectations: Mapping) -> Mapping | None:
    """The set's expectations with the fault's model injected, or None (no model, or one
    that does not fit the set); kept per profile object (a sweep or a bench walk holds one
    for its whole life; the entry keeps it, so its identity is not reused). A profile is read
    once per case or sweep, with one tube table, so one object has one set of bands."""
    if not fault.model:
        return None
    key = (id(profile), len(expectations), fault.id, repr(fault.model))
    if key not in _INJECTED:
        from faultwise.expect.fault_physics import inject

        if len(_INJECTED) > 20_000:
            _INJECTED.clear()
        try:
            faulty = inject(profile, fault.model, expectations)
        except (ValueError, KeyError, ArithmeticError):
            faulty = None      # a model that does not fit this set predicts nothing
        _INJECTED[key] = (profile, faulty)
    return _INJECTED[key][1]
