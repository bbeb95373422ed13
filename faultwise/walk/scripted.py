"""Walks without a person: rebuild a recorded walk, answer from readings, walk to the end."""

from __future__ import annotations

import os
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from datetime import datetime
from typing import TYPE_CHECKING, Any

from faultwise.core.errors import InputError
from faultwise.graph.nodes import CLEARED, MEASURE_OUTCOMES, Fault

from faultwise.expect.classify import representative_value
from faultwise.walk.results import Step
from faultwise.walk.state import Walk

if TYPE_CHECKING:
    from faultwise.expect.context import Expected
    from faultwise.graph.knowledge import Knowledge
    from faultwise.graph.nodes import Suspects
    from faultwise.profile.model import Profile
    from faultwise.walk.evidence import Evidence
    from faultwise.walk.rank import Ranked


@dataclass(frozen=True)
class WalkResult:
    """An automatic walk (``walk --answers``, replay, sweep)."""

    conclusion: Fault | None
    escalate: str | None
    steps: tuple[Step, ...]
    checks: int
    minutes: float
    walk: Walk
    missing: object | None = None     # errors.MissingAnswerError where an answer was missing


def walk_from_case(knowledge: Knowledge, data: Mapping[str, Any], *,
                   knowledge_dir: str | os.PathLike[str] | None = None, **kwargs: Any) -> Walk:
    """Rebuild the walk recorded in a case file's data (profile copied into the case).

    ``knowledge_dir``: the workspace's knowledge, whose own tube table (if any) the
    expectations use, as when the case was started.
    """
    from faultwise.expect.expected import expect_in_workspace
    from faultwise.profile.load import profile_from_dict
    from faultwise.profile.tubes import workspace_tube_dir

    s = data.get("set") or {}
    profile = profile_from_dict(s.get("profile") or {}, s.get("source") or str(data.get("id")),
                                knowledge_dir=workspace_tube_dir(knowledge_dir))
    if "expectations" not in kwargs:
        kwargs["expectations"] = expect_in_workspace(profile, knowledge_dir)
    return Walk.from_events(knowledge, profile, data.get("symptom"), data.get("events") or [],
                            **kwargs)


def auto_answer(walk: Walk, readings: Mapping | None = None,
                observations: Mapping | None = None, *, missing: str = "normal") -> dict:
    """Answer the asked check the way ``walk --answers`` does; returns the event.

    A check the answers leave out: ``missing="normal"`` answers normal silently (sweep's
    signatures list only what a fault changes), ``"mark"`` answers normal and marks the
    event ``assumed``, ``"stop"`` raises :class:`MissingAnswerError` naming the check and
    what it accepts.
    """
    from faultwise.core.errors import MissingAnswerError
    from faultwise.core.units import format_reading, parse_reading

    readings = readings or {}
    observations = observations or {}
    check, expected = walk._asked_check()
    given = (check.expect in readings) if check.is_measurement else (check.id in observations)
    if not given and missing == "stop":
        if check.is_measurement:
            unit = expected.unit if expected is not None else ""
            accepts = ((f"a reading in {unit}",) if expected is not None else ()) + \
                MEASURE_OUTCOMES
            raise MissingAnswerError(
                f"the answers file gives no reading for the check '{check.title}'",
                node=check.id, key=check.expect, section="readings", accepts=accepts,
                title=check.title,
                hint=f"add '{check.expect}: <answer>' under 'readings:' (it accepts "
                     f"{' or '.join(accepts)}), or run with --assume-normal")
        raise MissingAnswerError(
            f"the answers file gives no observation for the check '{check.title}'",
            node=check.id, key=check.id, section="observations",
            accepts=tuple(check.choices), title=check.title,
            hint=f"add '{check.id}: <choice>' under 'observations:' (it accepts "
                 f"{' or '.join(check.choices)}), or run with --assume-normal")
    mark = not given and missing == "mark"
    if check.is_measurement:
        spec = readings.get(check.expect)
        if expected is None:
            word = spec if isinstance(spec, str) and spec in MEASURE_OUTCOMES else "normal"
            return walk.answer(word, assumed=mark)
        if spec is None:
            value = representative_value(expected, "normal")
            return walk.answer_value(value, raw=f"{format_reading(value, expected.unit, 4)} "
                                                "(nominal)", assumed=mark)
        if isinstance(spec, bool):
            raise InputError(f"the reading for '{check.expect}' must be a number",
                             key=check.expect)
        if isinstance(spec, (int, float)):
            return walk.answer_value(float(spec), raw=f"{spec:g} {expected.unit}")
        if isinstance(spec, str) and spec.strip() in MEASURE_OUTCOMES:
            value = representative_value(expected, spec.strip())
            return walk.answer_value(value, raw=f"{format_reading(value, expected.unit, 4)} "
                                                f"({spec.strip()})")
        try:
            value = parse_reading(str(spec), expected.unit)
        except InputError as exc:
            raise InputError(exc.message, key=check.expect, hint=exc.hint) from None
        return walk.answer_value(value, raw=str(spec).strip())
    choice = observations.get(check.id, check.normal)
    if choice not in check.choices:
        raise InputError(f"'{choice}' is not a choice of '{check.id}'", key=check.id,
                         hint="use one of " + ", ".join(check.choices))
    return walk.answer(choice, assumed=mark)


def auto_walk(knowledge: Knowledge, profile: Profile, symptom: str,
              readings: Mapping[str, Any] | None = None,
              observations: Mapping[str, str] | None = None, *,
              expectations: Mapping[str, Expected] | None = None,
              counts: Mapping[str, int] | None = None, through: bool = False,
              clock: Callable[[], datetime] | None = None,
              order: Callable[[list[Ranked], Suspects], list[Ranked]] | None = None,
              missing: str = "normal", evidence: Evidence | None = None) -> WalkResult:
    """Walk with readings by expectation name and observations by check id.

    ``missing`` says what a check without an answer gets (see :func:`auto_answer`); with
    ``"stop"`` the result's ``missing`` holds the MissingAnswerError and the walk stands
    at that check. ``evidence``: the set's fault predictions, shared by many walks of one set
    (see :class:`~faultwise.walk.state.Walk`)."""
    from faultwise.core.errors import MissingAnswerError

    stopped = None
    walk = Walk(knowledge, profile, symptom, expectations=expectations, counts=counts,
                clock=clock, order=order, evidence=evidence)
    limit = 4 * len(knowledge.nodes) + 10
    for _ in range(limit):
        prompt = walk.prompt()
        if prompt is None or prompt.kind in ("escalate", "close"):
            break
        if prompt.kind == "repair":
            if not through:
                break
            walk.record_parts(list(prompt.node.parts) if prompt.node else [])
            continue
        if prompt.phase != "diagnose" and not through:
            break
        try:
            auto_answer(walk, readings, observations, missing=missing)
        except MissingAnswerError as exc:
            stopped = exc
            break
    prompt = walk.prompt()
    escalate = None
    if walk.phase == "diagnose" and prompt is not None and prompt.kind == "escalate":
        escalate = walk.current_node or CLEARED
    diag = tuple(s for s in walk.steps if s.phase == "diagnose")
    return WalkResult(walk.conclusion, escalate, walk.steps,
                      sum(1 for s in diag if s.outcome != "skipped"),
                      walk.diagnosis_minutes(), walk, missing=stopped)
