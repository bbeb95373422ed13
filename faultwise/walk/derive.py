"""Deriving a walk's state from its events: the reducer and the graph routing.

The walk (:mod:`faultwise.walk.state`) is the public API; this base class replays events
into a :class:`_State` and routes through checks, suspects lists and faults, and knows which
verify and closing checks apply to the set. :class:`~faultwise.walk.view.WalkView` and then
``Walk`` build on it; the attributes it reads (knowledge, family, symptom, counts, order and
the applicability predicate) are set by ``Walk.__init__``.
"""

from __future__ import annotations

import copy
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field, replace
from functools import partial
from typing import TYPE_CHECKING

from faultwise.core.errors import InputError, KnowledgeError, WalkError
from faultwise.graph.nodes import (CLEARED, Check, Fault,
                                   Suspects)

from faultwise.walk.results import OUTCOMES, Step

if TYPE_CHECKING:
    from faultwise.expect.context import Expected
    from faultwise.graph.knowledge import Knowledge
    from faultwise.graph.nodes import Suspects
    from faultwise.profile.model import Profile
    from faultwise.walk.rank import Ranked

_MOVE_LIMIT = 10_000          # routing steps in one move; the graph has no cycles (lint)


# ------------------------------------------------------------------------------- state

@dataclass
class _MFrame:
    suspects: str
    cleared: list[str] = field(default_factory=list)
    current: str | None = None


def _copied(frames: list[_MFrame]) -> list[_MFrame]:
    """Suspects frames the copy owns (their cleared lists change as the walk goes on)."""
    return [_MFrame(f.suspects, list(f.cleared), f.current) for f in frames]


@dataclass
class _State:
    phase: str = "diagnose"
    node: str | None = None           # current check / escalate / fault (repair) / None
    ran_out: bool = False             # diagnosis ended in 'cleared' with nothing left
    stack: list[_MFrame] = field(default_factory=list)
    memory: dict[str, str] = field(default_factory=dict)
    came_from: tuple[str, str] | None = None
    conclusion: str | None = None
    conclusion_stack: list[_MFrame] = field(default_factory=list)
    off_graph: str | None = None
    off_graph_node: str | None = None
    parts: list[str] = field(default_factory=list)
    queue: list[str] = field(default_factory=list)   # verify or closing check ids
    index: int = 0
    verify_bad: list[str] = field(default_factory=list)
    closing_answers: dict[str, str] = field(default_factory=dict)
    steps: list[Step] = field(default_factory=list)
    acknowledged: list[str] = field(default_factory=list)
    resumed: list[str] = field(default_factory=list)
    before_close: str | None = None
    close: dict | None = None

    def copy(self) -> _State:
        """A copy whose containers are the copy's own (steps are frozen, so shared); the
        walk derives every event on a copy, so a refused event leaves the state as it was."""
        return replace(
            self, stack=_copied(self.stack), memory=dict(self.memory),
            conclusion_stack=_copied(self.conclusion_stack), parts=list(self.parts),
            queue=list(self.queue), verify_bad=list(self.verify_bad),
            closing_answers=dict(self.closing_answers), steps=list(self.steps),
            acknowledged=list(self.acknowledged), resumed=list(self.resumed),
            close=copy.deepcopy(self.close))


class WalkDerivation:
    """The event reducer and router that :class:`~faultwise.walk.state.Walk` builds on."""

    # set by Walk.__init__
    knowledge: Knowledge
    profile: Profile
    family: str
    symptom: str
    expectations: dict[str, Expected]
    counts: dict[str, int]
    order: Callable[[list[Ranked], Suspects], list[Ranked]] | None
    _applies: Callable[[str], bool]
    _rank_memo: tuple | None = None   # (key, ranking) of the last ranking (see _ranked)

    def _derive(self, events: list[dict]) -> _State:
        st = _State()
        self._go(st, self.knowledge.entry(self.symptom, self.family))
        for i, event in enumerate(events):
            try:
                self._apply(st, event)
            except (WalkError, InputError) as exc:
                raise WalkError(f"event {event.get('n', i + 1)} ({event.get('type')}"
                                f"{', ' + str(event.get('node')) if event.get('node') else ''}) "
                                f"does not fit the walk: {exc.message}",
                                node=event.get("node"), key=f"events[{i}]",
                                hint="the knowledge may have changed since the case was recorded"
                                ) from None
        return st

    def _apply(self, st: _State, event: Mapping) -> None:
        kind = event.get("type")
        handler = {
            "answer": self._apply_answer, "skip": self._apply_answer,
            "note": lambda s, e: None, "acknowledge": self._apply_ack,
            "off-graph": self._apply_off_graph, "parts": self._apply_parts,
            "resume": self._apply_resume, "to-closing": self._apply_to_closing,
            "close": self._apply_close, "reopen": self._apply_reopen,
        }.get(kind)
        if handler is None:
            raise WalkError(f"unknown event type '{kind}'")
        handler(st, event)

    def _apply_ack(self, st: _State, event: Mapping) -> None:
        cid = event.get("caution")
        if cid and cid not in st.acknowledged:
            st.acknowledged.append(cid)

    def _apply_answer(self, st: _State, event: Mapping) -> None:
        node_id = event.get("node")
        if st.phase not in ("diagnose", "verify", "closing") or st.node is None:
            raise WalkError("no check is being asked")
        if node_id != st.node:
            raise WalkError(f"the walk asks '{st.node}' here")
        check = self.knowledge.node(node_id)
        if not isinstance(check, Check):
            raise WalkError(f"'{node_id}' is not a check")
        skipped = event.get("type") == "skip"
        outcome = "skipped" if skipped else event.get("outcome")
        if not skipped and outcome not in check.outcome_names():
            raise WalkError(f"'{outcome}' is not an outcome of '{node_id}'")
        normal = skipped or outcome == check.normal
        value = event.get("value")
        st.steps.append(Step(n=int(event.get("n") or len(st.steps) + 1), phase=st.phase,
                             node=node_id, title=check.title, expect=event.get("expect"),
                             band=event.get("band"), raw=str(event.get("raw", "")),
                             value=float(value) if isinstance(value, (int, float)) else None,
                             outcome=outcome, reason=str(event.get("reason", "") or ""),
                             normal=normal, minutes=float(check.minutes),
                             meter=event.get("meter") if isinstance(event.get("meter"), dict)
                             else None, assumed=event.get("assumed") is True))
        if st.phase == "diagnose":
            st.memory[node_id] = outcome
            st.came_from = (node_id, outcome)
            target = (check.unable or CLEARED) if skipped else check.outcomes.get(outcome, CLEARED)
            self._go(st, target)
            return
        if st.phase == "verify":
            if not normal and not skipped and node_id not in st.verify_bad:
                st.verify_bad.append(node_id)
        else:
            if skipped:
                raise WalkError("a closing check cannot be skipped")
            st.closing_answers[node_id] = outcome
        st.index += 1
        self._next_queued(st)

    def _next_queued(self, st: _State) -> None:
        if st.index < len(st.queue):
            st.node = st.queue[st.index]
            return
        if st.phase == "verify":
            self._enter_closing(st)
        else:
            st.node = None

    def _enter_closing(self, st: _State) -> None:
        st.phase = "closing"
        st.queue = self._closing_ids()
        st.index = 0
        st.closing_answers = {}
        self._next_queued(st)

    def _apply_off_graph(self, st: _State, event: Mapping) -> None:
        if st.phase != "diagnose":
            raise WalkError("an off-graph finding ends the diagnosis; the walk is past it",
                            hint="use a note to record it")
        st.off_graph = str(event.get("finding", ""))
        st.off_graph_node = event.get("node")
        st.conclusion = None
        st.phase = "repair"
        st.node = None
        st.stack = []

    def _apply_parts(self, st: _State, event: Mapping) -> None:
        if st.phase in ("diagnose", "done"):
            raise WalkError("parts are recorded after a conclusion or an off-graph finding"
                            if st.phase == "diagnose" else "the case is closed")
        st.parts.extend(str(p) for p in event.get("parts") or ())
        if st.phase == "repair":
            st.phase = "verify"
            st.queue = self._verify_ids(st.conclusion)
            st.index = 0
            st.verify_bad = []
            self._next_queued(st)

    def _apply_resume(self, st: _State, event: Mapping) -> None:
        if st.phase not in ("repair", "verify", "closing") or st.conclusion is None:
            raise WalkError("there is no conclusion to take back",
                            hint="resume works after the walk reached a fault")
        st.resumed.append(st.conclusion)
        st.came_from = (st.conclusion, "resumed")
        st.stack = _copied(st.conclusion_stack)
        st.conclusion = None
        st.conclusion_stack = []
        st.memory = {}
        st.queue, st.index, st.verify_bad, st.closing_answers = [], 0, [], {}
        st.phase = "diagnose"
        self._go(st, CLEARED)

    def _apply_to_closing(self, st: _State, event: Mapping) -> None:
        if st.phase not in ("diagnose", "repair", "verify"):
            raise WalkError("the walk is already at the closing checks" if st.phase == "closing"
                            else "the case is closed")
        self._enter_closing(st)

    def _apply_close(self, st: _State, event: Mapping) -> None:
        if st.phase == "done":
            raise WalkError("the case is already closed")
        if event.get("outcome") not in OUTCOMES:
            raise WalkError(f"unknown outcome '{event.get('outcome')}'")
        st.before_close = st.phase
        st.phase = "done"
        st.close = dict(event)

    def _apply_reopen(self, st: _State, event: Mapping) -> None:
        if st.phase != "done":
            raise WalkError("the case is not closed")
        st.phase = st.before_close or "closing"
        st.close = None

    # ----- routing

    def _go(self, st: _State, target: str) -> None:
        """Follow routes from ``target`` until a node that needs the tech (or a conclusion)."""
        kn = self.knowledge
        st.ran_out = False
        for _ in range(_MOVE_LIMIT):
            if target == CLEARED:
                if not st.stack:
                    st.node, st.ran_out = None, True
                    return
                frame = st.stack[-1]
                if frame.current is not None:
                    frame.cleared.append(frame.current)
                    frame.current = None
                target = self._next_in_frame(st)
                continue
            node = kn.nodes.get(target)
            if node is None:
                raise KnowledgeError(f"the graph routes to '{target}', which does not exist",
                                     node=st.node, hint="run 'faultwise lint'")
            if self.family not in node.families:
                target = CLEARED
                continue
            if isinstance(node, (Check, Fault)) and not self._applies(target):
                # not for this set: a check is passed by its `unable` route, a fault cleared
                target = (node.unable or CLEARED) if isinstance(node, Check) else CLEARED
                continue
            if isinstance(node, Check):
                if target in st.memory:
                    outcome = st.memory[target]
                    st.came_from = (target, outcome)
                    target = (node.unable or CLEARED) if outcome == "skipped" \
                        else node.outcomes.get(outcome, CLEARED)
                    continue
                st.node = target
                return
            if isinstance(node, Suspects):
                if any(f.suspects == target for f in st.stack):
                    raise KnowledgeError(f"the suspects list '{target}' is reached from inside "
                                         "itself", node=target, hint="run 'faultwise lint'")
                st.stack.append(_MFrame(target))
                target = self._next_in_frame(st)
                continue
            if isinstance(node, Fault):
                st.conclusion = target
                st.conclusion_stack = _copied(st.stack)
                st.phase = "repair"
                st.node = None
                return
            st.node = target           # Escalate
            return
        raise KnowledgeError("the walk went round more than "
                             f"{_MOVE_LIMIT} routes without asking anything",
                             node=st.node, hint="run 'faultwise lint' to find the loop")

    def _ranked(self, frame: _MFrame, answers: Mapping[str, str]) -> list[Ranked]:
        """The frame's not-cleared investigations, best first (p/c weighted by what the
        ``answers`` so far say of each fault, :mod:`faultwise.walk.evidence`; or the
        ``order`` hook). The last ranking is kept: routing and the prompt's explanation ask for
        the same one in turn, and everything else it reads is fixed for the walk."""
        from faultwise.walk.rank import rank_investigations

        key = (frame.suspects, tuple(frame.cleared), frozenset(answers.items()))
        if self._rank_memo is not None and self._rank_memo[0] == key:
            return list(self._rank_memo[1])
        likelihood = None
        if answers and self.evidence is not None:
            faults = self.knowledge.faults_under(frame.suspects, self.family)
            likelihood = self.evidence.weights(faults, answers)
        reach = None
        if self.evidence is not None:
            reach = partial(self.evidence.reach, family=self.family)
        ranked = rank_investigations(self.knowledge, frame.suspects, self.symptom, self.family,
                                     frame.cleared, self.counts, applies=self._applies,
                                     likelihood=likelihood, reach=reach)
        if self.order is not None:
            ranked = list(self.order(ranked, self.knowledge.node(frame.suspects)))
        self._rank_memo = (key, tuple(ranked))
        return ranked

    def _next_in_frame(self, st: _State) -> str:
        """The best not-cleared investigation of the top frame, or its exhausted route."""
        frame = st.stack[-1]
        ranked = self._ranked(frame, st.memory)
        if ranked:
            frame.current = ranked[0].target
            return frame.current
        st.stack.pop()
        return self.knowledge.node(frame.suspects).exhausted

    def _closing_ids(self) -> list[str]:
        return [c.id for c in self.knowledge.closing_checks(self.family) if self._applies(c.id)]

    def _verify_ids(self, fault_id: str | None) -> list[str]:
        fault = self.knowledge.nodes.get(fault_id) if fault_id else None
        out = []
        for cid in getattr(fault, "verify", ()):
            node = self.knowledge.nodes.get(cid)
            if (isinstance(node, Check) and self.family in node.families and self._applies(cid)
                    and cid not in out):
                out.append(cid)
        return out
