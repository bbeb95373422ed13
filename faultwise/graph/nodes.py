"""In-memory model of the knowledge: symptoms, cautions and graph nodes.

``graph.py`` builds these from the YAML (format: knowledge/README.md, "Knowledge schema"); the walk,
ranking, lint, sweep and review read them. Everything here is plain frozen data.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Mapping, Union

from faultwise.core.vocabulary import FAMILIES, STAGES as STAGES  # re-exported

from faultwise.core.vocabulary import MEASURE_OUTCOMES as MEASURE_OUTCOMES  # re-exported
CLEARED = "cleared"          # route target: this investigation found nothing, try the next
SPECIAL_TARGETS = (CLEARED,)


def _frozen(d: Mapping | None) -> Mapping:
    return MappingProxyType(dict(d or {}))


@dataclass(frozen=True)
class Located:
    """Where a piece of knowledge was written."""

    file: str
    line: int


@dataclass(frozen=True)
class Check:
    """A measurement (``expect`` set) or an observation (``choices`` set).

    ``outcomes`` maps every outcome (measurement: normal/low/high/absent; observation: each
    choice) to a target node id or ``cleared``. ``normal`` is the outcome a healthy set
    gives. ``unable`` is where a skipped check goes (default: ``cleared``, the next suspect).
    ``closing``: done before any case of these families is closed (the leakage check).
    ``variants``: family -> {field: text} read from ``text_by_family`` (every node kind has
    it): the text a walk of that family shows instead (see :mod:`faultwise.graph.node_text`).
    ``when``: conditions on the set (key -> any of these values) for the check to apply;
    empty: it applies to every set of its families (see :mod:`faultwise.graph.applicability`).
    ``unfed``: an observation that listens through stages (a signal injection, a click test)
    names the readings that show those stages powered, and the choice the set gives when one
    of them reads absent (see :func:`faultwise.walk.evidence.unfed_choice`).
    """

    id: str
    title: str
    stage: str
    families: tuple[str, ...]
    how: str
    why: str
    minutes: float
    outcomes: Mapping[str, str]
    normal: str
    expect: str | None = None
    choices: Mapping[str, str] = field(default_factory=lambda: _frozen({}))
    cautions: tuple[str, ...] = ()
    unable: str | None = None
    closing: bool = False
    unfed: Unfed | None = None
    when: Mapping[str, tuple[str, ...]] = field(default_factory=lambda: _frozen({}))
    variants: Mapping[str, Mapping[str, object]] = field(default_factory=lambda: _frozen({}))
    where: Located | None = None
    kind: str = "check"

    @property
    def is_measurement(self) -> bool:
        return self.expect is not None

    def outcome_names(self) -> tuple[str, ...]:
        return MEASURE_OUTCOMES if self.is_measurement else tuple(self.choices)


@dataclass(frozen=True)
class Investigation:
    """One entry of a suspects list: go to ``target``; ``minutes`` overrides its cost."""

    target: str
    label: str = ""
    minutes: float | None = None


@dataclass(frozen=True)
class Suspects:
    """An ordered list of investigations; the walk re-orders them by p/c.

    When every investigation has ended in ``cleared``, the walk goes to ``exhausted``
    (``cleared`` hands over to the enclosing suspects list).
    """

    id: str
    title: str
    stage: str
    families: tuple[str, ...]
    investigations: tuple[Investigation, ...]
    exhausted: str = CLEARED
    why: str = ""
    variants: Mapping[str, Mapping[str, object]] = field(default_factory=lambda: _frozen({}))
    where: Located | None = None
    kind: str = "suspects"


@dataclass(frozen=True)
class Unfed:
    """An observation's answer on a set that has lost a stage's supply: ``choice`` when any
    of ``readings`` (expectation names: a plate, screen or collector voltage, a stage's
    current) reads absent. A tone injected ahead of a stage with no plate volts is not heard,
    whatever a fault's signature leaves unsaid."""

    choice: str
    readings: tuple[str, ...]


@dataclass(frozen=True)
class Signature:
    """What a fault does to the set: readings by expectation name and observations by check id.

    A reading is an outcome class (``absent``, ``low``, ``high``, ``normal``) or a number in
    the expectation's unit.
    """

    readings: Mapping[str, Union[str, float]] = field(default_factory=lambda: _frozen({}))
    observations: Mapping[str, str] = field(default_factory=lambda: _frozen({}))


@dataclass(frozen=True)
class Fault:
    """A conclusion: what is wrong, how to repair it, and how to prove the repair.

    ``when``: conditions on the set for the fault to apply, as on :class:`Check`.
    ``plain``: one sentence for the owner of the set, in plain words, of how this fault
    caused the complaint (the customer copy of the job report prints it).
    ``model``: the change the fault makes to the set's profile or calc model, target ->
    change (:mod:`faultwise.fault_models`); empty when the calc engine cannot compute it.
    """

    id: str
    title: str
    stage: str
    families: tuple[str, ...]
    repair: tuple[str, ...]
    parts: tuple[str, ...]
    verify: tuple[str, ...]             # check ids to repeat after the repair
    signature: Signature
    priors: Mapping[str, float]          # symptom id -> weight (jobs per 100 with that complaint)
    cautions: tuple[str, ...] = ()
    notes: str = ""
    when: Mapping[str, tuple[str, ...]] = field(default_factory=lambda: _frozen({}))
    variants: Mapping[str, Mapping[str, object]] = field(default_factory=lambda: _frozen({}))
    where: Located | None = None
    kind: str = "fault"
    plain: str = ""
    model: Mapping[str, str] = field(default_factory=lambda: _frozen({}))   # fault_models

    @property
    def causes(self) -> tuple[str, ...]:
        """The complaints this fault causes: its priors above zero. A zero prior marks a
        complaint whose walk can reach the fault without the fault causing it (not swept,
        weighted 0)."""
        return tuple(sorted(s for s, weight in self.priors.items() if weight > 0))


@dataclass(frozen=True)
class Escalate:
    """Where the graph runs out: advice, and the tech records an off-graph finding."""

    id: str
    title: str
    stage: str
    families: tuple[str, ...]
    advice: str
    variants: Mapping[str, Mapping[str, object]] = field(default_factory=lambda: _frozen({}))
    where: Located | None = None
    kind: str = "escalate"


Node = Union[Check, Suspects, Fault, Escalate]


@dataclass(frozen=True)
class Symptom:
    id: str
    title: str
    families: tuple[str, ...]
    entry: Mapping[str, str]            # family -> first node id
    phrasings: tuple[str, ...] = ()
    where: Located | None = None


@dataclass(frozen=True)
class Caution:
    id: str
    title: str
    text: str
    families: tuple[str, ...] = FAMILIES
    where: Located | None = None
    concern: str = ""       # one risk worded per family: cautions sharing it are one set


@dataclass(frozen=True)
class Learned:
    """Closed-case counts: counts[symptom][family][fault id] = n (written by review --learn)."""

    counts: Mapping[str, Mapping[str, Mapping[str, int]]] = field(default_factory=lambda: _frozen({}))
    cases: int = 0
    written: str = ""

    def count(self, symptom: str, family: str, fault: str) -> int:
        return int(self.counts.get(symptom, {}).get(family, {}).get(fault, 0))

    def pair(self, symptom: str, family: str) -> Mapping[str, int]:
        return self.counts.get(symptom, {}).get(family, {})
