"""What a walk shows: its read-only view, the prompt, why this check now, and closing.

:class:`WalkView` is the part of :class:`~faultwise.walk.state.Walk` that reads the derived
state and never changes it: the phase, steps, conclusion, parts and acknowledged cautions;
the prompt for the tech (a check with its expected band and choices, the repair, an
escalation, or "close"), each with the cautions that concern the set's family and those
not yet acknowledged; the explanation of the p/c choice (:mod:`faultwise.walk.rank`) and
the route that led here; whether the case may close with an outcome (the closing checks of
line-powered sets must be answered, and normal for "repaired"); and the fields the case
file stores. Nodes are shown as this set sees them (:func:`faultwise.graph.node_text.for_set`:
the family's text, the set's values filled in).
"""

from __future__ import annotations

import copy
from collections.abc import Iterable

from faultwise.graph.nodes import CLEARED, MEASURE_OUTCOMES, Caution, Escalate, Fault, Node
from faultwise.walk.derive import WalkDerivation, _State
from faultwise.walk.results import OUTCOMES, Explanation, Frame, Prompt, Step


class WalkView(WalkDerivation):
    """The read-only side of a walk (see the module doc)."""

    @property
    def phase(self) -> str:
        return self._state.phase

    @property
    def events(self) -> list[dict]:
        """The record: JSON-ready event dicts (copies)."""
        return copy.deepcopy(self._events)

    @property
    def steps(self) -> tuple[Step, ...]:
        return tuple(self._state.steps)

    @property
    def conclusion(self) -> Fault | None:
        fid = self._state.conclusion
        return None if fid is None else self._view(self.knowledge.nodes.get(fid))

    @property
    def off_graph_finding(self) -> str | None:
        return self._state.off_graph

    @property
    def parts(self) -> tuple[str, ...]:
        return tuple(self._state.parts)

    @property
    def acknowledged(self) -> tuple[str, ...]:
        return tuple(self._state.acknowledged)

    @property
    def verify_failed(self) -> bool:
        return bool(self._state.verify_bad)

    @property
    def current_node(self) -> str | None:
        return self._state.node

    def diagnosis_minutes(self) -> float:
        """Sum of the minutes of the checks answered in the diagnose phase."""
        return sum(s.minutes for s in self._state.steps
                   if s.phase == "diagnose" and s.outcome != "skipped")

    def prompt(self) -> Prompt | None:
        """The current prompt, or None when the case is closed."""
        st = self._state
        if st.phase == "done":
            return None
        context = self._context(st)
        if st.phase == "repair":
            fault = self.conclusion
            cautions = self._cautions(fault.cautions if fault else ())
            return Prompt("repair", "repair", fault, fault.stage if fault else None,
                          cautions=cautions, unacknowledged=self._unacked(cautions),
                          context=context, explanation=self.explain())
        if st.phase == "diagnose" and (st.ran_out or st.node is None or
                                       isinstance(self.knowledge.nodes.get(st.node), Escalate)):
            node = self._view(self.knowledge.nodes.get(st.node)) if st.node else None
            cautions = self._cautions(getattr(node, "cautions", ()) or ())
            return Prompt("escalate", "diagnose", node, node.stage if node else None,
                          cautions=cautions, unacknowledged=self._unacked(cautions),
                          context=context, explanation=self.explain(),
                          warning=None if node else
                          "every suspect for this complaint was cleared: record what you found")
        if st.node is None:   # verify/closing with nothing left to ask
            return Prompt("close", st.phase, None, None, context=context,
                          warning=self._verify_warning(st))
        check = self._view(self.knowledge.node(st.node))
        expected = self.expectations.get(check.expect) if check.is_measurement else None
        if check.is_measurement:
            choices = () if expected is not None else tuple((o, o) for o in MEASURE_OUTCOMES)
        else:
            choices = tuple(check.choices.items())
        cautions = self._cautions(check.cautions)
        position = (st.index + 1, len(st.queue)) if st.phase in ("verify", "closing") else None
        return Prompt("check", st.phase, check, check.stage, expected=expected, choices=choices,
                      cautions=cautions, unacknowledged=self._unacked(cautions),
                      context=context, position=position, warning=self._verify_warning(st),
                      explanation=self.explain())

    def _view(self, node: Node | None) -> Node | None:
        """The node as this set sees it: its family's text, this set's values filled in."""
        from faultwise.graph.node_text import for_set

        return for_set(node, self.family, self.expectations)

    def explain(self) -> Explanation | None:
        """Why this check now: the p/c ranking of the innermost suspects list, and the route here."""
        st = self._state
        if st.phase != "diagnose":
            return None
        came = st.came_from
        route = f"'{self._title(came[0])}' gave '{came[1]}'" if came else ""
        if not st.stack:
            sym = self.knowledge.symptoms[self.symptom].title
            text = (f"The reading before ({route}) routes here." if came
                    else f"The first check for '{sym}' on {self.family} sets.")
            return Explanation(st.node, None, None, (), (), came, text)
        frame = st.stack[-1]
        suspects = self.knowledge.node(frame.suspects)
        ranked = tuple(self._ranked(frame, st.memory))
        chosen = next((r for r in ranked if r.target == frame.current), None)
        if chosen is None:
            text = f"Every suspect in '{suspects.title}' is cleared."
        else:
            label = chosen.investigation.label or chosen.target
            closed = sum(chosen.counts.values())
            text = (f"'{label}' is taken first of {len(ranked)} open suspect"
                    f"{'s' if len(ranked) != 1 else ''} in '{suspects.title}': "
                    f"p = {chosen.p:.2f}, {chosen.cost:g} min, p/c = {chosen.ratio:.3g}")
            text += f"; {closed} closed case{'s' if closed != 1 else ''} found a fault under it."
            if frame.cleared:
                text += f" Cleared already: {', '.join(self._title(c) for c in frame.cleared)}."
        return Explanation(st.node, frame.suspects, chosen, ranked, tuple(frame.cleared), came, text)

    def can_close(self, outcome: str) -> str | None:
        """None when close(outcome) is allowed now, else the sentence it would raise."""
        st = self._state
        if outcome not in OUTCOMES:
            return f"the outcome must be one of {', '.join(OUTCOMES)}, not '{outcome}'"
        if st.phase == "done":
            return "the case is already closed; reopen it first"
        if outcome == "waiting-parts":
            return None
        closing = self._closing_ids()
        if closing and (st.phase != "closing" or any(c not in st.closing_answers for c in closing)):
            names = ", ".join(self.knowledge.node(c).title for c in closing)
            return (f"answer the closing check ({names}) before a {self.family} set goes back; "
                    "close as waiting-parts if it stays in the shop")
        if outcome == "repaired":
            if st.conclusion is None and st.off_graph is None:
                return "a case closed as repaired needs a conclusion or an off-graph finding"
            if st.phase != "closing":
                return "finish the verify checks before closing as repaired"
            bad = [c for c in closing if st.closing_answers.get(c) != self.knowledge.node(c).normal]
            if bad:
                return (f"the closing check '{self._title(bad[0])}' was not normal: "
                        "find the cause before the "
                        "set goes back")
        return None

    def to_case_fields(self) -> dict:
        """Events and the fields derived from them, for the case file."""
        st = self._state
        fault = self.conclusion
        close = st.close
        return {
            "status": "closed" if st.phase == "done" else "open",
            "closed": close.get("at") if close else None,
            "acknowledged": list(st.acknowledged),
            "events": self.events,
            "conclusion": None if fault is None else
            {"fault": fault.id, "title": fault.title, "stage": fault.stage},
            "off_graph": st.off_graph,
            "parts": list(st.parts),
            "outcome": close.get("outcome") if close else None,
            "minutes": close.get("minutes") if close else None,
        }

    # ---------------------------------------------------------------- helpers

    def _cautions(self, ids: Iterable[str]) -> tuple[Caution, ...]:
        out = []
        for cid in ids:
            c = self.knowledge.cautions.get(cid)
            if c is not None and self.family in c.families:
                out.append(c)
        return tuple(out)

    def _unacked(self, cautions: tuple[Caution, ...]) -> tuple[str, ...]:
        return tuple(c.id for c in cautions if c.id not in self._state.acknowledged)

    def _context(self, st: _State) -> tuple[Frame, ...]:
        frames = []
        for f in st.stack:
            node = self.knowledge.nodes.get(f.suspects)
            label = ""
            for inv in getattr(node, "investigations", ()):
                if inv.target == f.current:
                    label = inv.label or inv.target
            frames.append(Frame(f.suspects, getattr(node, "title", f.suspects), f.current,
                                label, tuple(f.cleared)))
        return tuple(frames)

    def _title(self, node_id: str) -> str:
        """A node's title for a sentence a tech reads (the id when it has none)."""
        node = self.knowledge.nodes.get(node_id)
        return getattr(node, "title", "") or node_id

    def _verify_warning(self, st: _State) -> str | None:
        """What the tech must know now: a verify reading not normal, a closing check failed."""
        notes = []
        if st.verify_bad:
            titles = ", ".join(self._title(c) for c in st.verify_bad)
            notes.append(f"verify reading not normal ({titles}): the repair "
                         "may not have cured the fault; resume the diagnosis to try the next "
                         "suspect")
        for cid, outcome in st.closing_answers.items():
            check = self.knowledge.nodes.get(cid)
            if check is None or outcome == check.normal:
                continue
            text = f"the closing check '{check.title}' read {outcome}: the set must not go back"
            target = self.knowledge.nodes.get(check.outcomes.get(outcome, CLEARED))
            if isinstance(target, Escalate):
                text += f". {target.title}: {target.advice}"
            notes.append(text)
        return "; ".join(notes) or None
