"""The walk state machine on tests/fixtures/kb_walk: every transition.

Bands are fixture data (helpers_walk_proc.expectations); the order in which suspects are
offered is the p/c order worked by hand in test_rank.py (Heckerman, Breese and Rommelse,
1995). Trade facts used: a series-string set is line-connected and gets a leakage check
before it goes back (ANSI C39.5 network, REFERENCES.md); a transistor portable does not.
"""

from __future__ import annotations

import json
from datetime import UTC, datetime, timedelta
from itertools import count

import helpers_walk_proc as H
import pytest

from faultwise.core.errors import InputError, WalkError
from faultwise.walk.state import Walk
from faultwise.walk.scripted import auto_walk
from faultwise.expect.classify import classify, representative_value
from faultwise.walk.results import resolve_choice


@pytest.fixture(scope="module")
def kb():
    return H.knowledge()


@pytest.fixture(scope="module")
def ex():
    return H.expectations()


def fixed_clock():
    ticks = count()
    start = datetime(2026, 12, 1, 9, 30, tzinfo=UTC)
    return lambda: start + timedelta(seconds=next(ticks))


def new_walk(kb, ex, symptom="dead-lights-on", profile=None, **kw):
    return Walk(kb, profile or H.series_profile(), symptom, expectations=ex,
                clock=kw.pop("clock", fixed_clock()), **kw)


def node_of(walk):
    p = walk.prompt()
    return None if p is None or p.node is None else p.node.id


# ---------------------------------------------------------------- classification

@pytest.mark.parametrize("value,outcome", [
    (0.0, "absent"), (5.0, "absent"),          # at or below absent_below (5 V)
    (5.1, "low"), (130.9, "low"), (131.0, "normal"), (146, "normal"), (160.0, "normal"),
    (160.1, "high"), (-146.0, "normal"),       # a negative reading compares by magnitude
])
def test_classify_rule(ex, value, outcome):
    # DEVELOPERS "Walk": <= absent_below absent, < low low, > high high, else normal.
    assert classify(value, ex["supply.rectifier_out_v"]) == outcome


def test_zero_absent_below_has_no_absent_class(ex):
    # Leakage: zero volts is the best reading, never "absent" (expect.Expected docstring).
    assert classify(0.0, ex["safety.leakage_v"]) == "normal"
    assert classify(0.9, ex["safety.leakage_v"]) == "high"


@pytest.mark.parametrize("outcome", ["absent", "low", "normal", "high"])
def test_representative_value_classifies_back(ex, outcome):
    e = ex["supply.rectifier_out_v"]
    assert classify(representative_value(e, outcome), e) == outcome


# ---------------------------------------------------------------- diagnose

def test_first_prompt_is_the_entry_with_cautions_and_band(kb, ex):
    w = new_walk(kb, ex)
    p = w.prompt()
    assert (p.kind, p.phase, p.node.id, p.stage) == ("check", "diagnose", "supply.rect-out", "supply")
    assert p.expected is ex["supply.rectifier_out_v"]
    assert [c.id for c in p.cautions] == ["live-chassis", "charged-caps"]
    assert p.unacknowledged == ("live-chassis", "charged-caps")
    assert p.context == ()


def test_transistor_prompt_hides_line_cautions(kb, ex):
    w = new_walk(kb, ex, profile=H.transistor_profile())
    assert node_of(w) == "supply.tr-battery"


def test_low_reading_enters_suspects_in_pc_order_and_hands_over(kb, ex):
    w = new_walk(kb, ex)
    ev = w.answer("58 V")
    assert (ev["outcome"], ev["value"], ev["raw"], ev["band"]["low"]) == ("low", 58.0, "58 V", 131.0)
    # p/c order worked in test_rank: rectifier-test (1/6) before first-cap-esr (1/8).
    assert node_of(w) == "supply.rectifier-test"
    ctx = w.prompt().context
    assert [(f.suspects, f.current, f.cleared) for f in ctx] == \
        [("supply.low-b-suspects", "supply.rectifier-test", ())]
    exp = w.explain()
    assert exp.chosen.target == "supply.rectifier-test"
    assert exp.chosen.p == pytest.approx(1 / 3) and exp.chosen.cost == 2
    assert [r.target for r in exp.ranked] == ["supply.rectifier-test", "supply.first-cap-esr",
                                              "supply.surge-test"]
    assert "p/c" in exp.text
    w.answer("good")                   # cleared: hand over to the next suspect
    assert node_of(w) == "supply.first-cap-esr"
    assert w.prompt().context[0].cleared == ("supply.rectifier-test",)
    assert w.explain().chosen.p == pytest.approx(0.75)
    w.answer("high-esr")
    assert w.phase == "repair" and w.conclusion.id == "supply.dry-first-cap"
    p = w.prompt()
    assert p.kind == "repair" and p.node.id == "supply.dry-first-cap"
    assert [c.id for c in p.cautions] == ["charged-caps"]


def test_bad_reading_records_nothing(kb, ex):
    w = new_walk(kb, ex)
    with pytest.raises(InputError) as info:
        w.answer("fifty-eight")
    assert info.value.node == "supply.rect-out"
    with pytest.raises(InputError):
        w.answer("")
    assert w.events == [] and node_of(w) == "supply.rect-out"


@pytest.mark.parametrize("typed", ["high-esr", "1", "high", "HIGH-ESR", "ESR well above the chart"])
def test_observation_accepts_name_number_prefix_label(kb, ex, typed):
    w = new_walk(kb, ex)
    w.answer("58")
    w.answer("good")
    assert w.answer(typed)["outcome"] == "high-esr"


def test_observation_rejects_unknown_and_ambiguous():
    choices = (("glow", "All glow"), ("dark", "None glow"), ("dim", "Dim"))
    with pytest.raises(InputError):
        resolve_choice("x", choices)
    with pytest.raises(InputError):
        resolve_choice("d", choices)       # dark or dim
    with pytest.raises(InputError):
        resolve_choice("4", choices)
    assert resolve_choice("3", choices) == "dim"


def test_skip_default_route_is_cleared(kb, ex):
    w = new_walk(kb, ex)
    w.answer("58")
    w.answer("good")                   # rectifier cleared
    ev = w.skip("no ESR meter")        # first-cap-esr has no unable: cleared
    assert ev["type"] == "skip" and ev["reason"] == "no ESR meter"
    assert node_of(w) == "supply.surge-test"
    assert w.steps[-1].outcome == "skipped" and w.steps[-1].reason == "no ESR meter"


def test_skip_follows_unable_route(kb, ex):
    w = new_walk(kb, ex)
    w.answer("58")
    w.skip("no tube tester")           # rectifier-test: unable -> supply.rect-swap
    assert node_of(w) == "supply.rect-swap"
    w.answer("yes")
    assert w.conclusion.id == "supply.weak-rectifier"


def test_exhausted_suspects_go_to_escalate_then_off_graph(kb, ex):
    w = new_walk(kb, ex)
    w.answer("58")
    for answer in ("good", "ok", "ok"):
        w.answer(answer)
    p = w.prompt()
    assert p.kind == "escalate" and p.node.id == "supply.esc-low-b" and w.phase == "diagnose"
    with pytest.raises(WalkError):
        w.answer("1")
    w.off_graph("cracked solder joint on the rectifier socket")
    assert w.phase == "repair" and w.conclusion is None
    assert w.off_graph_finding.startswith("cracked")
    w.record_parts([])                 # nothing to verify for an off-graph finding
    assert w.phase == "closing" and node_of(w) == "supply.leakage"
    w.answer("0.1")
    w.close("repaired", 50)
    f = w.to_case_fields()
    assert f["conclusion"] is None and f["off_graph"].startswith("cracked")
    assert f["outcome"] == "repaired" and f["status"] == "closed"


def test_nested_suspects_and_answered_check_not_asked_twice(kb, ex):
    # hum-loud: hum-suspects = [first-cap-esr (4 min), hum-b-suspects (a nested list)].
    # Weights dry 60, weak 10 -> p 6/7, 1/7.  first-cap {dry} 6/7, hum-b {weak, dry} 1;
    # renormalised 6/13, 7/13; hum-b costs 2 + 4 = 6 min (the sum of its entries' costs);
    # ratios .115 and .090 -> first-cap-esr first.
    w = new_walk(kb, ex, symptom="hum-loud")
    assert node_of(w) == "supply.first-cap-esr"
    assert w.explain().chosen.p == pytest.approx(6 / 13)
    w.answer("ok")
    # Inside hum-b: first-cap-esr {dry} 6/7 at 4 min beats rectifier-test {weak} 1/7 at
    # 2 min, but it was answered already: its 'ok' routes again without asking.
    assert node_of(w) == "supply.rectifier-test"
    assert [f.suspects for f in w.prompt().context] == ["supply.hum-suspects",
                                                         "supply.hum-b-suspects"]
    assert w.prompt().context[1].cleared == ("supply.first-cap-esr",)
    assert len(w.events) == 1
    w.answer("good")
    # hum-b is exhausted (cleared) and hands back; hum-suspects has nothing left.
    assert node_of(w) == "supply.esc-low-b" and w.prompt().context == ()
    assert len(w.steps) == 2


def test_entry_absent_route(kb, ex):
    w = new_walk(kb, ex)
    w.answer("0")                      # absent -> no-b-suspects -> surge-test
    assert node_of(w) == "supply.surge-test"
    w.answer("ok")
    assert node_of(w) == "supply.esc-no-b"


def test_undo_across_suspect_hand_over(kb, ex):
    w = new_walk(kb, ex)
    w.answer("58")
    w.answer("good")
    assert node_of(w) == "supply.first-cap-esr"
    w.note("owner says it was dropped")
    dropped = w.undo()
    assert dropped["node"] == "supply.rectifier-test"
    assert node_of(w) == "supply.rectifier-test"
    assert w.prompt().context[0].cleared == ()
    assert [e["type"] for e in w.events] == ["answer", "note"]
    assert [e["n"] for e in w.events] == [1, 2]
    w.undo()
    assert node_of(w) == "supply.rect-out" and w.prompt().context == ()
    with pytest.raises(WalkError):
        w.undo()


def test_undo_back_out_of_verify(kb, ex):
    w = new_walk(kb, ex)
    for a in ("58", "good", "high-esr"):
        w.answer(a)
    w.record_parts(["50 uF 160 V electrolytic"])
    assert w.phase == "verify" and node_of(w) == "supply.rect-out"
    assert w.prompt().position == (1, 1)
    w.answer("150")
    assert w.phase == "closing"
    w.undo()
    assert w.phase == "verify"
    w.undo()
    assert w.phase == "repair" and w.parts == ()
    w.undo()
    assert w.phase == "diagnose" and node_of(w) == "supply.first-cap-esr"


def test_verify_bad_reading_and_resume(kb, ex):
    w = new_walk(kb, ex)
    for a in ("58", "good", "high-esr"):
        w.answer(a)
    w.record_parts(["50 uF 160 V electrolytic"])
    w.answer("60")                     # still low after the new capacitor
    assert w.verify_failed
    assert not w.steps[-1].normal and w.steps[-1].phase == "verify"
    assert "not normal" in w.prompt().warning
    ev = w.resume_diagnosis()
    assert ev["type"] == "resume" and ev["fault"] == "supply.dry-first-cap"
    # The capacitor investigation is cleared; the rectifier was cleared before: surge next.
    assert w.phase == "diagnose" and node_of(w) == "supply.surge-test"
    assert w.conclusion is None and not w.verify_failed
    w.answer("open")
    assert w.conclusion.id == "supply.open-surge"
    assert w.parts == ("50 uF 160 V electrolytic",)
    w.undo()                           # undo the surge answer
    w.undo()                           # undo the resume: back in verify, flagged
    assert w.phase == "closing" and w.verify_failed


def test_resume_without_conclusion_is_refused(kb, ex):
    w = new_walk(kb, ex)
    with pytest.raises(WalkError):
        w.resume_diagnosis()
    assert w.events == []


def test_closing_check_required_for_line_family(kb, ex):
    w = new_walk(kb, ex)
    for a in ("58", "good", "high-esr"):
        w.answer(a)
    with pytest.raises(WalkError, match="closing check"):
        w.close("repaired", 30)
    with pytest.raises(WalkError):
        w.close("returned-unrepaired", 30)
    w.record_parts(["50 uF 160 V electrolytic"])
    w.answer("148")
    assert node_of(w) == "supply.leakage"
    with pytest.raises(WalkError, match="cannot be skipped"):
        w.skip("no meter")
    assert w.can_close("repaired") is not None
    w.answer("0.9 V")                  # above the 0.75 V limit (ANSI C39.5 network)
    assert w.prompt().kind == "close"
    assert "must not go back" in w.prompt().warning
    assert "Find the leaking part" in w.prompt().warning     # the escalate's advice
    with pytest.raises(WalkError, match="not normal"):
        w.close("repaired", 30)
    w.undo()
    # the failed safety reading stays on record as a note (the case file is the shop's
    # record that the set was measured and failed before it was put right)
    [note] = [e for e in w.events if e["type"] == "note"]
    assert "Leakage" in note["text"] and "0.9 V" in note["text"] and "(high)" in note["text"]
    w.answer("1.1")                    # typed bare: the note gives the unit
    w.undo()
    assert "read 1.1 V (high)" in [e for e in w.events if e["type"] == "note"][-1]["text"]
    w.answer("0.2 V")
    assert w.can_close("repaired") is None
    ev = w.close("repaired", 45)
    assert w.phase == "done" and w.prompt() is None and ev["minutes"] == 45
    with pytest.raises(WalkError):
        w.undo()
    w.reopen()
    assert w.phase == "closing"
    w.close("repaired", 50)
    assert w.to_case_fields()["minutes"] == 50


def test_waiting_parts_needs_no_closing_check(kb, ex):
    w = new_walk(kb, ex)
    for a in ("58", "good", "high-esr"):
        w.answer(a)
    w.close("waiting-parts")
    assert w.to_case_fields()["outcome"] == "waiting-parts"


def test_returned_unrepaired_through_to_closing(kb, ex):
    w = new_walk(kb, ex)
    w.answer("58")
    w.to_closing()
    assert w.phase == "closing" and node_of(w) == "supply.leakage"
    w.answer("0.1")
    with pytest.raises(WalkError):
        w.close("repaired", 10)        # no conclusion, no finding
    w.close("returned-unrepaired", 10)
    assert w.to_case_fields()["conclusion"] is None


def test_transistor_family_closes_without_leakage_check(kb, ex):
    w = new_walk(kb, ex, profile=H.transistor_profile())
    w.answer("5.2")                    # low battery
    assert w.conclusion.id == "supply.tr-flat-battery"
    w.record_parts(["9 V battery"])
    w.answer("9.1")
    assert w.phase == "closing" and w.prompt().kind == "close"
    w.close("repaired", 5)
    assert w.phase == "done"


def test_unknown_outcome_and_symptom(kb, ex):
    with pytest.raises(InputError):
        new_walk(kb, ex, symptom="no-such-symptom")
    with pytest.raises(InputError):
        new_walk(kb, ex, symptom="hum-loud", profile=H.transistor_profile())
    w = new_walk(kb, ex)
    with pytest.raises(WalkError):
        w.close("fixed", 1)


def test_acknowledge_and_note(kb, ex):
    w = new_walk(kb, ex)
    w.acknowledge("live-chassis")
    assert w.prompt().unacknowledged == ("charged-caps",)
    with pytest.raises(InputError):
        w.acknowledge("nope")
    with pytest.raises(InputError):
        w.note("   ")
    assert w.to_case_fields()["acknowledged"] == ["live-chassis"]


# ---------------------------------------------------------------- event sourcing

def _full_case(w):
    for a in ("58 V", "good", "high-esr"):
        w.answer(a)
    w.record_parts(["50 uF 160 V electrolytic"])
    w.answer("148")
    w.answer("0.05")
    w.close("repaired", 30)


def test_determinism_same_answers_same_events(kb, ex):
    a, b = new_walk(kb, ex), new_walk(kb, ex, clock=lambda: datetime(2030, 1, 1, tzinfo=UTC))
    _full_case(a)
    _full_case(b)
    strip = lambda evs: [{k: v for k, v in e.items() if k != "at"} for e in evs]
    assert strip(a.events) == strip(b.events)
    assert a.events != b.events        # only the time stamps differ


def test_from_events_rebuilds_every_phase(kb, ex):
    live = new_walk(kb, ex)
    seen = [(live.phase, node_of(live))]
    actions = [lambda: live.answer("58 V"), lambda: live.answer("good"),
               lambda: live.note("hummed first"), lambda: live.answer("high-esr"),
               lambda: live.record_parts(["50 uF 160 V electrolytic"]),
               lambda: live.answer("148"), lambda: live.answer("0.05"),
               lambda: live.close("repaired", 30)]
    for act in actions:
        act()
        seen.append((live.phase, node_of(live)))
    events = json.loads(json.dumps(live.events))      # through JSON, as from a case file
    for cut in range(len(events) + 1):
        rebuilt = Walk.from_events(kb, H.series_profile(), "dead-lights-on", events[:cut],
                                   expectations=ex)
        assert rebuilt.events == events[:cut]
        assert (rebuilt.phase, node_of(rebuilt)) == seen[cut]
    assert rebuilt.to_case_fields() == live.to_case_fields()


def test_from_events_refuses_an_event_that_does_not_fit(kb, ex):
    bad = [{"n": 1, "at": "x", "type": "answer", "phase": "diagnose", "node": "audio.plate-v",
            "raw": "1", "value": 1.0, "outcome": "absent"}]
    with pytest.raises(WalkError, match="event 1"):
        Walk.from_events(kb, H.series_profile(), "dead-lights-on", bad, expectations=ex)


def test_auto_walk_defaults_and_given_answers(kb, ex):
    # Everything nominal/normal: B+ normal -> audio suspects -> plate normal -> click -> escalate.
    r = auto_walk(kb, H.series_profile(), "dead-lights-on", expectations=ex)
    assert r.conclusion is None and r.escalate == "audio.esc-dead"
    assert [s.node for s in r.steps] == ["supply.rect-out", "audio.plate-v", "audio.speaker-click"]
    assert r.checks == 3 and r.minutes == 2 + 2 + 1
    r = auto_walk(kb, H.series_profile(), "dead-lights-on",
                  {"supply.rectifier_out_v": "58 V"}, {"supply.first-cap-esr": "high-esr"},
                  expectations=ex)
    assert r.conclusion.id == "supply.dry-first-cap"
    assert [(s.node, s.outcome) for s in r.steps] == [
        ("supply.rect-out", "low"), ("supply.rectifier-test", "good"),
        ("supply.first-cap-esr", "high-esr")]
    r = auto_walk(kb, H.series_profile(), "dead-lights-on", {"supply.rectifier_out_v": "absent"},
                  {"supply.surge-test": "open"}, expectations=ex, through=True)
    assert r.conclusion.id == "supply.open-surge" and r.walk.phase == "closing"
    with pytest.raises(InputError):
        auto_walk(kb, H.series_profile(), "dead-lights-on", {"supply.rectifier_out_v": "lots"},
                  expectations=ex)


# ---------------------------------------------------------------- properties (hypothesis)

from hypothesis import given, settings
from hypothesis import strategies as st


@settings(max_examples=60, deadline=None)
@given(st.floats(0.0, 50.0), st.floats(0.1, 200.0), st.floats(0.1, 200.0),
       st.sampled_from(["absent", "low", "normal", "high"]))
def test_representative_value_property(absent_below, gap, width, outcome):
    from faultwise.expect.expected import Expected

    low = absent_below + gap           # a valid band: absent_below < low < high
    e = Expected("x", "x", "supply", low + width / 2, low, low + width, "V", "prop",
                 absent_below=absent_below)
    if outcome == "absent" and absent_below == 0:
        return                          # no absent class when absent_below is 0 (by design)
    assert classify(representative_value(e, outcome), e) == outcome


@settings(max_examples=40, deadline=None)
@given(st.lists(st.integers(0, 10), min_size=1, max_size=12))
def test_undo_is_the_inverse_of_every_move(picks):
    """Random walks (answers, skips, parts, resume) undone one by one retrace the same states."""
    kb, ex = H.knowledge(), H.expectations()
    w = new_walk(kb, ex)
    trail = [(w.phase, node_of(w), len(w.steps))]
    pushed = []
    for pick in picks:
        p = w.prompt()
        if p is None or p.kind in ("escalate", "close"):
            break
        before = len(w.events)
        if p.kind == "repair":
            w.record_parts(["part"]) if pick % 3 else w.to_closing()
        elif p.kind == "check" and p.expected is not None:
            if pick == 10 and p.phase != "closing":
                w.skip("no meter")
            else:
                w.answer_value(representative_value(
                    p.expected, ("absent", "low", "normal", "high")[pick % 4]))
        elif p.kind == "check":
            if pick == 10 and p.phase != "closing":
                w.skip("cannot")
            else:
                w.answer(p.choices[pick % len(p.choices)][0])
        if w.verify_failed and pick % 2:
            w.resume_diagnosis()
        pushed.append(len(w.events) - before)
        trail.append((w.phase, node_of(w), len(w.steps)))
    for state, k in zip(reversed(trail[:-1]), reversed(pushed)):
        for _ in range(k):
            w.undo()
        assert (w.phase, node_of(w), len(w.steps)) == state
    # only the notes of closing readings taken back stay (the safety record)
    assert all(e["type"] == "note" and e["text"].startswith("Taken back") for e in w.events)


def test_an_ohmmeter_over_range_reads_open_and_high():
    # A digital ohmmeter shows "OL" past its top range and a needle meter rests at infinity:
    # at the bench that is how an open winding reads (trade usage, common practice, no
    # source). On a resistance check it is recorded as the high outcome with no number (JSON
    # has no infinity); on a voltage check it is refused and nothing is recorded.
    import json

    from faultwise.core.errors import InputError
    from faultwise.core.units import over_range
    from faultwise.core.workspace import bundled_knowledge_dir
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.profile.load import load_profile
    from faultwise.walk.state import Walk

    assert over_range("OL", "ohm") and over_range(" open ", "kohm") and over_range("∞", "Mohm")
    assert not over_range("OL", "V") and not over_range("4k7", "ohm")
    kd = bundled_knowledge_dir()
    kb = load_knowledge(kd)
    profile = load_profile(kd / "sets" / "demo-ge-pnp-portable.yaml", knowledge_dir=kd)
    walk = Walk(kb, profile, "dead-nothing-lights", counts={})
    walk.answer("low")                  # the board gets well under the battery's volts
    assert walk.current_node == "supply.tr-battery-check"
    with pytest.raises(InputError):
        walk.answer("OL")          # a battery reading past the range is no answer
    assert walk.current_node == "supply.tr-battery-check"
    walk = Walk(kb, profile, "dead-nothing-lights", counts={})
    for node, answer in (("supply.tr-board-volts", "full"), ("audio.tr-click-dead", "none"),
                         ("audio.tr-earphone-test", "earphone-only")):
        assert walk.current_node == node
        walk.answer(answer)
    assert walk.current_node == "audio.tr-voice-coil"
    event = walk.answer("OL")
    assert event["outcome"] == "high" and event["value"] is None and "OL" in event["raw"]
    json.dumps(walk.to_case_fields(), allow_nan=False)
    assert walk.conclusion is not None and walk.conclusion.id == "audio.tr-speaker-open"


def test_a_state_copy_shares_no_container_with_the_original():
    """Every event is derived on a copy of the state (a refused event must leave the walk as
    it was), so the copy may share only what cannot change: every list, dict and suspects
    frame of the copy is its own, whatever fields the state gains later."""
    from dataclasses import fields

    from faultwise.walk.derive import _MFrame, _State

    st = _State(stack=[_MFrame("s", ["a"], "b")], memory={"c": "low"},
                conclusion_stack=[_MFrame("t", ["d"])], close={"outcome": "repaired"})
    for f in fields(_State):
        value = getattr(st, f.name)
        if isinstance(value, list) and not value:
            value.append("x")
        if isinstance(value, dict) and not value:
            value["x"] = "y"
    cp = st.copy()
    assert cp == st
    for f in fields(_State):
        a, b = getattr(st, f.name), getattr(cp, f.name)
        if isinstance(a, (list, dict)):
            assert a is not b, f.name
    assert cp.stack[0] is not st.stack[0] and cp.stack[0].cleared is not st.stack[0].cleared
    assert cp.conclusion_stack[0].cleared is not st.conclusion_stack[0].cleared
