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

No UI imports; nothing here prints.
"""

from __future__ import annotations

import copy
import math
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, field
from datetime import UTC, datetime

from faultwise.core.errors import InputError, KnowledgeError, WalkError
from faultwise.core.vocabulary import EVENT_TYPES as EVENT_TYPES, UNDOABLE  # re-exported
from faultwise.graph.nodes import (CLEARED, MEASURE_OUTCOMES, Caution, Check, Escalate, Fault,
                                   Suspects)

PHASES = ("diagnose", "repair", "verify", "closing", "done")
OUTCOMES = ("repaired", "returned-unrepaired", "waiting-parts")
_MOVE_LIMIT = 10_000          # routing steps in one move; the graph has no cycles (lint)


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


# -------------------------------------------------------------------------- classifying

def classify(value: float, expected) -> str:
    """|v| <= absent_below (when > 0) -> absent; |v| < low -> low; |v| > high -> high; else normal."""
    magnitude = abs(value)
    if expected.absent_below > 0 and magnitude <= expected.absent_below:
        return "absent"
    if magnitude < expected.low:
        return "low"
    if magnitude > expected.high:
        return "high"
    return "normal"


def representative_value(expected, outcome: str) -> float:
    """A value (in the expectation's unit) that classifies as ``outcome``: used by automatic walks."""
    floor = max(expected.absent_below, 0.0)
    if outcome == "normal":
        if classify(expected.nominal, expected) == "normal":
            return float(expected.nominal)
        return (expected.low + expected.high) / 2.0
    if outcome == "absent":
        return 0.0
    if outcome == "low":
        return (floor + expected.low) / 2.0 if expected.low > floor else float(expected.low)
    if outcome == "high":
        return expected.high + max(0.25 * abs(expected.high - expected.low),
                                   0.1 * abs(expected.high), 1e-6)
    raise InputError(f"'{outcome}' is not a reading class", hint="use " + ", ".join(MEASURE_OUTCOMES))


def band_of(expected) -> dict:
    """The band as recorded in an answer event."""
    band = expected.to_json()
    band["absent_below"] = expected.absent_below
    return band


def _utc_now() -> datetime:
    return datetime.now(UTC).astimezone()


# ------------------------------------------------------------------------------- state

@dataclass
class _MFrame:
    suspects: str
    cleared: list[str] = field(default_factory=list)
    current: str | None = None


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
        return copy.deepcopy(self)


# -------------------------------------------------------------------------------- walk

class Walk:
    """One walk through the knowledge for one set and one complaint (see the module doc)."""

    def __init__(self, knowledge, profile, symptom: str, *, expectations: Mapping | None = None,
                 counts: Mapping[str, int] | None = None,
                 clock: Callable[[], datetime] | None = None,
                 order: Callable | None = None) -> None:
        """``order(ranked, suspects) -> ranked`` re-orders a suspects list (None: p/c order).

        Only the sweep's baselines pass it (written order, speaker back, random), to measure
        what the p/c ordering is worth.
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
        self.counts = dict(counts if counts is not None
                           else knowledge.learned.pair(symptom, self.family))
        self.clock = clock or _utc_now
        self._events: list[dict] = []
        self._state = self._derive(self._events)

    # ---------------------------------------------------------------- construction

    @classmethod
    def from_events(cls, knowledge, profile, symptom: str, events: Iterable[Mapping],
                    **kwargs) -> Walk:
        """Rebuild a walk by replaying recorded events; WalkError names an event that does not fit."""
        walk = cls(knowledge, profile, symptom, **kwargs)
        recorded = [dict(e) for e in events]
        walk._state = walk._derive(recorded)
        walk._events = recorded
        return walk

    # ---------------------------------------------------------------- read-only view

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

    def _view(self, node):
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
        ranked = tuple(self._ranked(frame))
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

    # ---------------------------------------------------------------- actions

    def answer(self, text: str, *, assumed: bool = False) -> dict:
        """Answer the current check with what the tech typed; InputError leaves nothing recorded.

        ``assumed`` marks an answer nobody gave (``walk --assume-normal``) in the event."""
        check, expected = self._asked_check()
        text = "" if text is None else str(text)
        if check.is_measurement and expected is not None:
            from faultwise.core.units import parse_reading

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
        extra = {"meter": dict(meter)} if meter else {}
        if assumed:
            extra["assumed"] = True
        return self._push(self._event("answer", node=check.id, expect=check.expect,
                                      band=band_of(expected), raw=raw, value=value,
                                      outcome=classify(value, expected), **extra))

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
        return dropped

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

    # ----- derivation

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
        st.stack = copy.deepcopy(st.conclusion_stack)
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
                st.conclusion_stack = copy.deepcopy(st.stack)
                st.phase = "repair"
                st.node = None
                return
            st.node = target           # Escalate
            return
        raise KnowledgeError("the walk went round more than "
                             f"{_MOVE_LIMIT} routes without asking anything",
                             node=st.node, hint="run 'faultwise lint' to find the loop")

    def _ranked(self, frame) -> list:
        """The frame's not-cleared investigations, best first (p/c, or the ``order`` hook)."""
        from faultwise.walk.rank import rank_investigations

        ranked = rank_investigations(self.knowledge, frame.suspects, self.symptom, self.family,
                                     frame.cleared, self.counts, applies=self._applies)
        if self.order is not None:
            ranked = list(self.order(ranked, self.knowledge.node(frame.suspects)))
        return ranked

    def _next_in_frame(self, st: _State) -> str:
        """The best not-cleared investigation of the top frame, or its exhausted route."""
        frame = st.stack[-1]
        ranked = self._ranked(frame)
        if ranked:
            frame.current = ranked[0].target
            return frame.current
        st.stack.pop()
        return self.knowledge.node(frame.suspects).exhausted


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


def walk_from_case(knowledge, data: Mapping, *, knowledge_dir=None, **kwargs) -> Walk:
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


def auto_walk(knowledge, profile, symptom: str, readings: Mapping | None = None,
              observations: Mapping | None = None, *, expectations: Mapping | None = None,
              counts: Mapping[str, int] | None = None, through: bool = False,
              clock: Callable[[], datetime] | None = None,
              order: Callable | None = None, missing: str = "normal") -> WalkResult:
    """Walk with readings by expectation name and observations by check id.

    ``missing`` says what a check without an answer gets (see :func:`auto_answer`); with
    ``"stop"`` the result's ``missing`` holds the MissingAnswerError and the walk stands
    at that check."""
    from faultwise.core.errors import MissingAnswerError

    stopped = None
    walk = Walk(knowledge, profile, symptom, expectations=expectations, counts=counts,
                clock=clock, order=order)
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
