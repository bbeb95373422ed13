"""What the sweep records: one walk, one (symptom, family) pair's figures, the whole sweep.

Frozen dataclasses only; :mod:`faultwise.shop.sweep` fills them and
:mod:`faultwise.shop.sweep_report` formats them. ``SweepWalk.isolated`` is the sweep's pass
test: the walk concluded the fault it was given and raised no error.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

from faultwise.shop.sweep_orders import RANDOM_SEED

if TYPE_CHECKING:
    from faultwise.expect.context import Expected
    from faultwise.profile.model import Profile


@dataclass(frozen=True)
class DemoSet:
    """A demo set profile the sweep walks on, with its expectations computed once."""

    name: str                 # file name, e.g. demo-5-tube-table.yaml
    family: str
    profile: Profile
    expectations: Mapping[str, Expected]


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
