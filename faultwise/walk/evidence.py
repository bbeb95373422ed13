"""What the answers so far say about each fault: the weights the p/c ranking multiplies in.

A suspects list's investigations overlap: one fault can sit under several of them (the IF
plate reading and the filter-resistor check both reach a drifted filter resistor). Ranked on
the priors alone, such a fault keeps its whole weight under the second investigation after
the first has already read it away, and the walk spends a check on it again. So every
answered check is compared with what each fault predicts for it, and a fault the answers
contradict keeps only a small part of its weight:

- a reading check (``expect:``): a fault that carries a ``model:`` fitting the set predicts
  what the set's own physics gives (:func:`faultwise.expect.fault_physics.inject`, classified
  against the healthy band, the same classification the walk uses): the set on the bench,
  not a general signature, is the oracle; otherwise its signature gives the class (or a
  number, classified against the set's band);
- an observation check: the fault's signature gives the choice; silent means no prediction.
  Physics comes first here too: a check that listens through stages (``unfed:``, a signal
  injection or a click test) is silent on a broken set that reads one of those stages'
  supplies absent, whatever the signature says (:func:`unfed_choice`).

The likelihood of the answers given a fault is the product over answered checks of
``AGREE`` (prediction met), ``CONTRADICTED`` (prediction missed), or, with no prediction,
1 for a normal answer and ``UNEXPLAINED`` for an abnormal one (signatures list what a fault
changes, but not always everything: a weak converter need not pull the AVC line down). No
fault is ever ruled out: a contradicted one only moves back in the order, because nominal
predictions meet real parts with tolerances, and the graph's routes, not the weights,
decide every conclusion. Physics uses the tube table of the knowledge's workspace, the one
the set's bands were computed with.

The same predictions say where a fault would be found: an investigation's check, asked of a
set with this fault, gives the predicted outcome, and that outcome routes somewhere. A fault
the check is predicted to clear (or to route away from it) is not found by that
investigation, whatever sits under its routes (:meth:`Evidence.reach`): the leaky coupling
capacitor sits under the output cathode reading's "high" route, but moves the cathode only
within its band, so that reading's weight in the order is the faults it does move. With no
prediction the investigation keeps the fault's whole weight.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from typing import TYPE_CHECKING

from faultwise.expect.classify import classify
from faultwise.graph.nodes import CLEARED, Check, Fault, Node

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
        self._physics: dict[str, Mapping | None] = {}
        self._predicted: dict[tuple[str, str], str | None] = {}
        self._reach: dict[tuple[str, str, str], float] = {}
        self._tubes: tuple = ()          # (the workspace's tube table or None,) once looked up
        self._unfed_checks: tuple[Check, ...] | None = None

    def physics(self, fault_id: str) -> Mapping | None:
        """The set's expectations with the fault's model injected (its readings as the broken
        set gives them), or None: no model, or one that does not fit this set. Computed with
        the tube table of the knowledge's workspace, as the set's own bands were."""
        node = self.knowledge.nodes.get(fault_id)
        return self._faulty(node) if isinstance(node, Fault) else None

    def _faulty(self, fault: Fault) -> Mapping | None:
        if fault.id not in self._physics:
            faulty = None
            if fault.model:
                from faultwise.expect.fault_physics import inject

                if not self._tubes:
                    from faultwise.profile.tubes import workspace_tube_table

                    self._tubes = (workspace_tube_table(self.knowledge.root),)
                try:
                    faulty = inject(self.profile, fault.model, self.expectations,
                                    tube_table=self._tubes[0])
                except (ValueError, KeyError, ArithmeticError):
                    faulty = None      # a model that does not fit this set predicts nothing
            self._physics[fault.id] = faulty
        return self._physics[fault.id]

    def warm(self, faults: Iterable[str]) -> None:
        """Compute these faults' physics now (the bench does it in a worker as a walk opens,
        so no key press waits for it: about 1 ms a fault). Each result is stored by one
        assignment, so a walk reading meanwhile at worst computes one a second time."""
        for fault_id in faults:
            node = self.knowledge.nodes.get(fault_id)
            if isinstance(node, Fault):
                self._faulty(node)

    def predicted(self, fault_id: str, check_id: str) -> str | None:
        """The outcome the fault predicts for the check on this set, or None (no prediction)."""
        key = (fault_id, check_id)
        if key not in self._predicted:
            self._predicted[key] = self._predict(self.knowledge.nodes.get(fault_id),
                                                 self.knowledge.nodes.get(check_id))
        return self._predicted[key]

    def _predict(self, fault: Node | None, check: Node | None) -> str | None:
        if not isinstance(fault, Fault) or not isinstance(check, Check):
            return None
        sig = fault.signature
        if not check.is_measurement:
            if check.unfed is not None:            # physics only where the check listens
                faulty = self._faulty(fault)
                said = unfed_choice(check, faulty if faulty is not None else sig.readings,
                                    self.expectations)
                if said is not None:
                    return said
            return sig.observations.get(check.id)
        name = check.expect
        band = self.expectations.get(name)
        faulty = self._faulty(fault)
        if faulty is not None and band is not None and name in faulty:
            return classify(faulty[name].nominal, band)
        spec = sig.readings.get(name)
        if isinstance(spec, str):
            return spec if spec in _CLASSES else None
        if isinstance(spec, (int, float)) and not isinstance(spec, bool) and band is not None:
            return classify(float(spec), band)
        return None

    def observations(self, fault: Fault, readings: Mapping | None = None) -> dict[str, str]:
        """The observation answers of a set with this fault: its signature's, with each
        listening check whose stages the broken set leaves unfed giving its unfed choice.
        ``readings``: the broken set's readings (default: its physics, or its signature's
        readings when it has no model that fits)."""
        if readings is None:
            faulty = self._faulty(fault)
            readings = faulty if faulty is not None else fault.signature.readings
        out = dict(fault.signature.observations)
        for check in self._listening():
            said = unfed_choice(check, readings, self.expectations)
            if said is not None:
                out[check.id] = said
        return out

    def _listening(self) -> tuple[Check, ...]:
        if self._unfed_checks is None:
            self._unfed_checks = tuple(n for n in self.knowledge.nodes.values()
                                       if isinstance(n, Check) and n.unfed is not None)
        return self._unfed_checks

    def reach(self, fault_id: str, target: str, family: str) -> float:
        """How much of a fault's weight an investigation of ``target`` carries: 1 when the
        target's predicted outcome for the fault routes toward it (or there is no
        prediction, or the target is not a check), ``CONTRADICTED`` when it routes away."""
        key = (fault_id, target, family)
        if key not in self._reach:
            self._reach[key] = self._reach_of(fault_id, target, family)
        return self._reach[key]

    def _reach_of(self, fault_id: str, target: str, family: str) -> float:
        check = self.knowledge.nodes.get(target)
        if not isinstance(check, Check):
            return 1.0
        said = self.predicted(fault_id, target)
        if said is None:
            return 1.0
        route = check.outcomes.get(said, CLEARED)
        if route == fault_id or (route in self.knowledge.nodes
                                 and fault_id in self.knowledge.faults_under(route, family)):
            return AGREE
        return CONTRADICTED

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
                    w *= AGREE if said == outcome else CONTRADICTED
            out[f] = w
        return out


def unfed_choice(check: Check, readings: Mapping | None, healthy: Mapping) -> str | None:
    """The choice an observation gives on a broken set that has lost the supply of a stage it
    listens through (any of its ``unfed`` readings absent), or None: fed, or the check lists
    none. ``readings``: the broken set's, by expectation name: an expectation (its nominal
    is used) or a number, classified against the healthy band, or an outcome class word."""
    if check.unfed is None or not readings:
        return None
    for name in check.unfed.readings:
        value = readings.get(name)
        if value is None or isinstance(value, bool):
            continue
        if isinstance(value, str):
            outcome = value
        else:
            band = healthy.get(name)
            if band is None:
                continue
            outcome = classify(float(getattr(value, "nominal", value)), band)
        if outcome == "absent":
            return check.unfed.choice
    return None
