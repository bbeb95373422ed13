"""What a walk says of each stage of the receiver: the one rule for the bench map and the report.

A stage is ``suspect`` once any diagnose answer there was abnormal, and stays suspect even
if a later check there reads normal (that normal answer clears a suspect part, not the
stage); it is ``cleared`` when every answer there was normal. A skipped check says nothing
of its stage; verify and closing answers do not count. Once a fault is concluded its stage
is ``faulty`` and every other suspect stage is ``not-needed`` (the fault explains the
complaint); cleared stages stay cleared. A stage without answers is ``untested`` (absent
from the mapping).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Iterable

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge
    from faultwise.walk.state import Walk

__all__ = ["UNTESTED", "SUSPECT", "CLEARED", "FAULTY", "NOT_NEEDED", "STAGE_STATES",
           "StepView", "routes_on", "stage_states", "walk_stage_states"]

UNTESTED, SUSPECT, CLEARED, FAULTY = "untested", "suspect", "cleared", "faulty"
NOT_NEEDED = "not-needed"
STAGE_STATES = (UNTESTED, SUSPECT, CLEARED, FAULTY, NOT_NEEDED)


@dataclass(frozen=True)
class StepView:
    """What the rule needs of one recorded step."""

    stage: str
    outcome: str
    normal: bool
    phase: str = "diagnose"
    routes_on: bool = False       # the answer routes to a suspects list (see the module doc)


def stage_states(steps: Iterable[StepView], fault_stage: str | None) -> dict[str, str]:
    """Stage -> state by the rule in the module doc (``fault_stage``: the conclusion's)."""
    states: dict[str, str] = {}
    for step in steps:
        if step.phase != "diagnose" or step.outcome == "skipped" or not step.stage:
            continue
        if not step.normal:
            states[step.stage] = SUSPECT
        elif step.routes_on:
            continue
        elif states.get(step.stage) != SUSPECT:
            states[step.stage] = CLEARED
    if fault_stage:
        states = {stage: NOT_NEEDED if state == SUSPECT else state
                  for stage, state in states.items()}
        states[fault_stage] = FAULTY
    return states


def routes_on(node: object, outcome: str, knowledge: Knowledge | None) -> bool:
    """A check's answer whose route is a suspects list: it names the branch to search (False
    for anything else: ``cleared``, a next check in a chain, a fault)."""
    from faultwise.graph.nodes import Check, Suspects

    if not isinstance(node, Check) or knowledge is None:
        return False
    return isinstance(knowledge.nodes.get(node.outcomes.get(outcome, "")), Suspects)


def walk_stage_states(walk: Walk) -> dict[str, str]:
    """Stage states of a live :class:`faultwise.walk.state.Walk` (its steps and conclusion)."""
    nodes = walk.knowledge.nodes
    views = [StepView(stage=getattr(nodes.get(s.node), "stage", ""), outcome=s.outcome,
                      normal=s.normal, phase=s.phase,
                      routes_on=routes_on(nodes.get(s.node), s.outcome, walk.knowledge))
             for s in walk.steps]
    fault = walk.conclusion
    return stage_states(views, fault.stage if fault is not None else None)
