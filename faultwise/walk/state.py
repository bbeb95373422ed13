"""The walk: a pure state machine from a complaint to a fault, a repair and a closed case.

The record of a walk is its list of events (their format: :mod:`faultwise.cases.schema`);
the state is derived by replaying them from the start. Undo drops the last event
that moved the walk and re-derives; reopening a case replays its events; replay of a case
against a changed graph uses the same code. Same graph, same priors and same answers give
the same walk: the only thing that varies is the time stamp of each event.

Phases: ``diagnose`` (checks routed by the graph; suspects ordered by p/c, see
:mod:`faultwise.walk.rank`) -> ``repair`` (a fault was concluded, or an off-graph finding
recorded) -> ``verify`` (the fault's verify checks, classified, not routed) -> ``closing``
(the knowledge's closing checks for the family: the leakage check of line-powered sets)
-> ``done`` (closed with an outcome).

Applicability: a node applies to this walk when the set's family is
in its families, a measurement's expectation name is among the walk's expectations, and
its ``when`` holds for the profile (:mod:`faultwise.graph.applicability`). Ranking drops the
suspects that do not apply and counts only the faults that do. When an outcome (or an
``unable`` or ``exhausted`` route) leads into a check that does not apply, the walk follows
that check's ``unable`` route (default ``cleared``) without recording any event; a route
into a fault that does not apply goes to ``cleared``. The profile is part of the case, so
this is as deterministic as the rest of the walk. Verify and closing queues leave out the
checks that do not apply.

The walk is built in three layers of one class: :class:`Walk` here (construction and the
actions, each one event appended and applied), :class:`~faultwise.walk.view.WalkView`
(the read-only side: prompt, explanation, closing rules, case fields) and
:class:`~faultwise.walk.derive.WalkDerivation` (events replayed into the state, and the
routing). No UI imports; nothing here prints.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Mapping
from datetime import UTC, datetime
from typing import TYPE_CHECKING, Any

from faultwise.core.errors import InputError, WalkError
from faultwise.core.vocabulary import UNDOABLE
from faultwise.graph.nodes import MEASURE_OUTCOMES, Check
from faultwise.expect.classify import band_of, classify
from faultwise.walk.results import resolve_choice
from faultwise.walk.view import WalkView

if TYPE_CHECKING:
    from faultwise.expect.context import Expected
    from faultwise.graph.knowledge import Knowledge
    from faultwise.graph.nodes import Suspects
    from faultwise.profile.model import Profile
    from faultwise.walk.evidence import Evidence
    from faultwise.walk.rank import Ranked


def _utc_now() -> datetime:
    return datetime.now(UTC).astimezone()


# -------------------------------------------------------------------------------- walk

class Walk(WalkView):
    """One walk through the knowledge for one set and one complaint (see the module doc)."""

    def __init__(self, knowledge: Knowledge, profile: Profile, symptom: str, *,
                 expectations: Mapping[str, Expected] | None = None,
                 counts: Mapping[str, int] | None = None,
                 clock: Callable[[], datetime] | None = None,
                 order: Callable[[list[Ranked], Suspects], list[Ranked]] | None = None,
                 evidence: Evidence | None = None) -> None:
        """``order(ranked, suspects) -> ranked`` re-orders a suspects list (None: p/c order).

        Only the sweep's baselines pass it (written order, speaker back, random), to measure
        what the p/c ordering is worth. ``evidence``: the set's fault predictions, shared by
        the sweeps' many walks of one set (None: this walk computes its own).
        """
        self.knowledge = knowledge
        self.order = order
        self.profile = profile
        self.family = profile.family
        self.symptom = symptom
        if symptom not in knowledge.symptoms:
            raise InputError(f"unknown symptom '{symptom}'", key="symptom",
                             hint="use one of " + ", ".join(sorted(knowledge.symptoms)))
        sym = knowledge.symptoms[symptom]
        if self.family not in sym.families or self.family not in sym.entry:
            raise InputError(f"the symptom '{symptom}' does not apply to {self.family} sets",
                             key="symptom", hint="pick a symptom listed for this family")
        if expectations is None:
            from faultwise.expect.expected import expect

            expectations = expect(profile)
        self.expectations = dict(expectations)
        from faultwise.graph.applicability import applies_predicate

        self._applies = applies_predicate(knowledge, profile, self.expectations)
        if evidence is None:
            from faultwise.walk.evidence import Evidence

            evidence = Evidence(knowledge, profile, self.expectations)
        self.evidence = evidence
        self.counts = dict(counts if counts is not None
                           else knowledge.learned.pair(symptom, self.family))
        self.clock = clock or _utc_now
        self._events: list[dict] = []
        self._state = self._derive(self._events)

    # ---------------------------------------------------------------- construction

    @classmethod
    def from_events(cls, knowledge: Knowledge, profile: Profile, symptom: str,
                    events: Iterable[Mapping[str, Any]], **kwargs: Any) -> Walk:
        """Rebuild a walk by replaying recorded events; WalkError names an event that does not fit."""
        walk = cls(knowledge, profile, symptom, **kwargs)
        recorded = [dict(e) for e in events]
        walk._state = walk._derive(recorded)
        walk._events = recorded
        return walk

    # ---------------------------------------------------------------- actions

    def answer(self, text: str, *, assumed: bool = False) -> dict:
        """Answer the current check with what the tech typed; InputError leaves nothing recorded.

        ``assumed`` marks an answer nobody gave (``walk --assume-normal``) in the event."""
        check, expected = self._asked_check()
        text = "" if text is None else str(text)
        if check.is_measurement and expected is not None:
            from faultwise.core.units import over_range, parse_reading

            if over_range(text, expected.unit):
                # an open circuit: above every band; JSON has no infinity, so no value
                typed = text.strip()
                said = "over range" if typed.lower() == "open" else "over range: open"
                return self._push_reading(check, expected, f"{typed} ({said})", None, "high",
                                          assumed=assumed)
            try:
                value = parse_reading(text, expected.unit)
            except InputError as exc:
                raise InputError(exc.message, node=check.id, key=check.expect,
                                 hint=exc.hint or f"type a reading in {expected.unit}") from None
            return self.answer_value(value, raw=text.strip(), assumed=assumed)
        choices = tuple((o, o) for o in MEASURE_OUTCOMES) if check.is_measurement \
            else tuple(check.choices.items())
        choice = resolve_choice(text, choices, check.id)
        mark = {"assumed": True} if assumed else {}
        return self._push(self._event("answer", node=check.id, raw=text.strip(), outcome=choice,
                                      **mark))

    def answer_value(self, value: float, raw: str | None = None,
                     meter: Mapping | None = None, *, assumed: bool = False) -> dict:
        """Answer the current measurement with a number in its unit.

        ``meter`` is the sample a bench meter gave (:func:`faultwise.meter.fit.answer_from_meter`:
        value, unit as reported, mode, meter identity, time); it is kept in the event.
        ``assumed`` marks an answer nobody gave (``walk --assume-normal``).
        """
        check, expected = self._asked_check()
        if not check.is_measurement or expected is None:
            raise WalkError(f"'{check.id}' does not take a number", node=check.id,
                            hint="answer with one of its choices")
        value = float(value)
        if not math.isfinite(value):
            raise InputError("the reading must be a finite number", node=check.id)
        raw = f"{value:g} {expected.unit}" if raw is None else raw
        return self._push_reading(check, expected, raw, value, classify(value, expected),
                                  meter=meter, assumed=assumed)

    def _push_reading(self, check: Check, expected: Expected, raw: str, value: float | None,
                      outcome: str, *, meter: Mapping | None = None,
                      assumed: bool = False) -> dict:
        """Record a measurement's answer: its band as shown, what was typed, the number (None
        for an open circuit) and its class."""
        extra = {"meter": dict(meter)} if meter else {}
        if assumed:
            extra["assumed"] = True
        return self._push(self._event("answer", node=check.id, expect=check.expect,
                                      band=band_of(expected), raw=raw, value=value,
                                      outcome=outcome, **extra))

    def skip(self, reason: str = "") -> dict:
        """Record that the check could not be made; follow its `unable` route (default cleared)."""
        check, _ = self._asked_check()
        if self._state.phase == "closing":
            raise WalkError(f"the closing check '{check.title}' cannot be skipped", node=check.id,
                            hint="make it, or close as waiting-parts if the set stays in the shop")
        return self._push(self._event("skip", node=check.id, reason=str(reason or "").strip()))

    def undo(self) -> dict:
        """Drop the last event that moved the walk (notes stay) and re-derive; returns it."""
        if self._state.phase == "done":
            raise WalkError("the case is closed", hint="reopen it before undoing a step")
        start = max((i + 1 for i, e in enumerate(self._events) if e.get("type") == "reopen"),
                    default=0)
        index = next((i for i in range(len(self._events) - 1, start - 1, -1)
                      if self._events[i].get("type") in UNDOABLE), None)
        if index is None:
            raise WalkError("there is nothing to undo")
        events = [dict(e) for e in self._events]
        dropped = events.pop(index)
        for i, e in enumerate(events):
            e["n"] = i + 1
        self._state = self._derive(events)
        self._events = events
        if dropped.get("type") == "answer" and dropped.get("phase") == "closing":
            # a safety reading taken back stays on record: the set was measured so
            self._events.append(self._event("note", text=self._undone_text(dropped)))
        return dropped

    def _undone_text(self, event: Mapping[str, Any]) -> str:
        node = self.knowledge.nodes.get(str(event.get("node")))
        title = getattr(node, "title", None) or event.get("node")
        band = event.get("band")
        read = str(event.get("raw") or event.get("outcome"))
        unit = band.get("unit") if isinstance(band, Mapping) else None
        if unit and not any(ch.isalpha() for ch in read):      # typed bare: '1.2' -> '1.2 V'
            read = f"{read} {unit}"
        return f"Taken back: '{title}' read {read} ({event.get('outcome')}) at {event.get('at')}."

    def note(self, text: str) -> dict:
        text = str(text or "").strip()
        if not text:
            raise InputError("the note is empty", hint="type what you want to keep")
        return self._push(self._event("note", text=text))

    def acknowledge(self, caution_id: str, *, shown: str | None = None,
                    read_s: float | None = None) -> dict:
        """Record a caution as read; ``shown`` is when it was put before the tech and
        ``read_s`` how long it was open (the event's ``at`` is the acknowledgement time)."""
        if caution_id not in self.knowledge.cautions:
            raise InputError(f"unknown caution '{caution_id}'", key="caution")
        extra: dict = {}
        if shown is not None:
            extra["shown"] = str(shown)
        if read_s is not None:
            extra["read_s"] = float(read_s)
        return self._push(self._event("acknowledge", caution=caution_id, **extra))

    def off_graph(self, finding: str) -> dict:
        """Record a fault the graph does not know; diagnosis ends with no conclusion."""
        finding = str(finding or "").strip()
        if not finding:
            raise InputError("the finding is empty", hint="describe what you found")
        return self._push(self._event("off-graph", node=self._state.node, finding=finding))

    def record_parts(self, parts: Iterable[str]) -> dict:
        """Parts replaced; in the repair phase this also ends the repair and starts verification."""
        if isinstance(parts, str):
            parts = [parts]
        clean = [str(p).strip() for p in parts if str(p).strip()]
        return self._push(self._event("parts", parts=clean))

    def resume_diagnosis(self) -> dict:
        """The conclusion was wrong: clear its investigation and go on with the next suspect."""
        return self._push(self._event("resume", fault=self._state.conclusion))

    def to_closing(self) -> dict:
        """Go straight to the closing checks (a set going back unrepaired)."""
        return self._push(self._event("to-closing"))

    def close(self, outcome: str, minutes: float | None = None) -> dict:
        """Close with repaired | returned-unrepaired | waiting-parts; WalkError says what is missing."""
        reason = self.can_close(outcome)
        if reason:
            raise WalkError(reason, hint=None)
        if minutes is not None:
            try:
                minutes = float(minutes)
            except (TypeError, ValueError):
                raise InputError(f"minutes must be a number, not {minutes!r}", key="minutes") from None
            if minutes < 0 or math.isnan(minutes):
                raise InputError("minutes must be zero or more", key="minutes")
            minutes = int(minutes) if minutes == int(minutes) else minutes
        return self._push(self._event("close", outcome=outcome, minutes=minutes))

    def reopen(self) -> dict:
        return self._push(self._event("reopen"))

    # ---------------------------------------------------------------- internals

    def _event(self, kind: str, **fields) -> dict:
        event = {"n": len(self._events) + 1, "at": self.clock().isoformat(timespec="seconds"),
                 "type": kind}
        if kind in ("answer", "skip", "off-graph", "to-closing", "parts", "resume"):
            event["phase"] = self._state.phase
        event.update(fields)
        return event

    def _push(self, event: dict) -> dict:
        state = self._state.copy()
        self._apply(state, event)
        self._state = state
        self._events.append(event)
        return dict(event)

    def _asked_check(self) -> tuple[Check, object | None]:
        st = self._state
        node = self._view(self.knowledge.nodes.get(st.node)) if st.node else None
        if st.phase not in ("diagnose", "verify", "closing") or not isinstance(node, Check):
            raise WalkError("no check is being asked now", hint="look at the current prompt")
        expected = self.expectations.get(node.expect) if node.is_measurement else None
        return node, expected

