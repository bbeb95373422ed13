"""What a walk shows: frames, explanations, steps and prompts (frozen data), and choice lookup.

The result of an automatic walk, ``WalkResult``, is in :mod:`faultwise.walk.scripted`.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from faultwise.core.errors import InputError
from faultwise.graph.nodes import Caution

PHASES = ("diagnose", "repair", "verify", "closing", "done")
OUTCOMES = ("repaired", "returned-unrepaired", "waiting-parts")

# ------------------------------------------------------------------------------- results

@dataclass(frozen=True)
class Frame:
    """One suspects list on the stack: which investigation is being followed, which are cleared."""

    suspects: str
    title: str
    current: str | None
    current_label: str
    cleared: tuple[str, ...]


@dataclass(frozen=True)
class Explanation:
    """Why the walk asks this now: the rank data of the innermost suspects list."""

    node: str | None
    suspects: str | None
    chosen: object | None            # rank.Ranked
    ranked: tuple = ()               # rank.Ranked, best first, not-cleared only
    cleared: tuple[str, ...] = ()
    came_from: tuple[str, str] | None = None
    text: str = ""


@dataclass(frozen=True)
class Step:
    """An answered or skipped check as recorded (band as shown to the tech)."""

    n: int
    phase: str
    node: str
    title: str
    expect: str | None
    band: Mapping | None
    raw: str
    value: float | None
    outcome: str                      # an outcome name, or "skipped"
    reason: str = ""
    normal: bool = True
    minutes: float = 0.0
    meter: Mapping | None = None      # the meter sample when the reading came from a meter
    assumed: bool = False             # no answer given: normal assumed (walk --assume-normal)


@dataclass(frozen=True)
class Prompt:
    """What the bench shows now."""

    kind: str                         # check | repair | escalate | close
    phase: str
    node: object | None               # Check, Fault, Escalate or None
    stage: str | None
    expected: object | None = None    # expect.Expected for a measurement
    choices: tuple[tuple[str, str], ...] = ()
    cautions: tuple[Caution, ...] = ()
    unacknowledged: tuple[str, ...] = ()
    context: tuple[Frame, ...] = ()
    position: tuple[int, int] | None = None
    warning: str | None = None
    explanation: Explanation | None = None

    @property
    def is_measurement(self) -> bool:
        return self.kind == "check" and self.expected is not None


# --------------------------------------------------------------------------- helpers

def resolve_choice(text: str, choices: tuple[tuple[str, str], ...], node: str | None = None) -> str:
    """A choice name from its name, its number 1..n, its label, or an unambiguous prefix."""
    typed = str(text or "").strip()
    listing = "; ".join(f"{i} {name} ({label})" for i, (name, label) in enumerate(choices, 1))
    if not typed:
        raise InputError("no choice given", node=node, hint=f"type one of: {listing}")
    low = typed.casefold()
    for name, label in choices:
        if low == name.casefold() or low == str(label).casefold():
            return name
    if typed.isdigit() and 1 <= int(typed) <= len(choices):
        return choices[int(typed) - 1][0]
    hits = [name for name, _ in choices if name.casefold().startswith(low)]
    if not hits:
        hits = [name for name, label in choices if str(label).casefold().startswith(low)]
    if len(hits) == 1:
        return hits[0]
    what = "matches several choices" if hits else "is not one of the choices"
    raise InputError(f"'{typed}' {what}", node=node, hint=f"type one of: {listing}")
