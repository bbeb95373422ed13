"""The example job for the report tests: a loud-hum job on the demo 230 V transformer set.

Walked with the walk API and written by the case store, as the bench would (not
hand-written JSON), with a fixed clock so that the case, and so the report, is the same on
every run. Invented shop, customer and readings; the fault is the bundled graph's dried
second filter capacitor. Observations are answered with the key a tech presses (the
choice's number, e.g. "2"), so the report has to turn each back into the choice's words.
"""

from __future__ import annotations

from datetime import datetime, timedelta, timezone
from pathlib import Path

from faultwise.core.workspace import Shop, bundled_knowledge_dir

SET_FILE = "demo-230v-transformer.yaml"
FAULT = "supply.open-second-filter-cap"
SHOP = Shop(name="Larkspur Lane Radio Works",
            contact="14 Larkspur Lane, Eastbrook\ntel. 0100 555 0199",
            terms="Parts and labour are guaranteed for 90 days from collection. Sets left "
                  "more than 60 days after we have told you they are ready may be disposed of.")
# What the bench typed for each reading (by expectation name); observations by check id
# give the choice name, answered below by its number, the key a tech presses.
READINGS = {"supply.ripple_vpp": "10.2 Vpp", "supply.b_plus_v": "251 V",
            "safety.leakage_v": "92 mV"}
OBSERVATIONS = {"audio.tf-hum-volume-zero": "stays", "supply.second-cap-bridge": "cured"}
AFTER = {"supply.second-cap-bridge": "no-change"}
PARTS = ["50 uF 350 V electrolytic capacitor (second filter)", "2k2 1 W filter resistor",
         "EL84 output tube", "dial cord"]


class Clock:
    def __init__(self) -> None:
        self.now = datetime(2026, 11, 24, 9, 30, tzinfo=timezone.utc)

    def __call__(self) -> datetime:
        return self.now

    def tick(self, minutes: float) -> None:
        self.now += timedelta(minutes=minutes)


def _answer(walk, answers: dict) -> str:
    """Answer the asked check: a reading as typed, an observation by its key (1..n)."""
    prompt = walk.prompt()
    for caution in prompt.unacknowledged:
        walk.acknowledge(caution)
    check = prompt.node
    if check.expect is not None:
        typed = READINGS.get(check.expect)
        if typed is None:                       # not in the plan: the nominal, as typed
            from faultwise.core.units import format_reading

            typed = format_reading(prompt.expected.nominal, prompt.expected.unit)
        walk.answer(typed)
        return check.id
    choice = answers.get(check.id, check.normal)
    key = str(list(check.choices).index(choice) + 1)
    walk.answer(key)
    return check.id


def walk_example_job(cases_dir: Path) -> Path:
    """Walk the job into ``cases_dir``; return the closed case file's path."""
    from faultwise.cases import CaseStore
    from faultwise.graph import load_knowledge
    from faultwise.profile import load_profile
    from faultwise.walk import Walk

    kdir = bundled_knowledge_dir()
    knowledge = load_knowledge(kdir)
    profile = load_profile(kdir / "sets" / SET_FILE, knowledge_dir=kdir)
    clock = Clock()
    store = CaseStore(cases_dir, "B2", clock=clock)
    case = store.new_case(profile, SET_FILE, "loud hum even with the volume turned right "
                          "down; it started after a winter in the loft", "hum-loud",
                          customer="ticket 4512, H. Abernathy",
                          knowledge_version=knowledge.version)
    try:
        walk = Walk(knowledge, profile, "hum-loud", clock=clock)
        walk.note("Owner asked for the dial lamp to be looked at; it is fine.")
        while walk.phase == "diagnose":
            prompt = walk.prompt()
            assert prompt is not None and prompt.kind == "check", prompt
            clock.tick(prompt.node.minutes)
            _answer(walk, OBSERVATIONS)
            case.record(walk)
        assert walk.conclusion is not None and walk.conclusion.id == FAULT, walk.conclusion
        clock.tick(35)
        walk.record_parts(PARTS)
        case.record(walk)
        for phase, answers in (("verify", AFTER), ("closing", {})):
            while walk.phase == phase and walk.prompt().kind == "check":
                clock.tick(walk.prompt().node.minutes)
                _answer(walk, answers)
                case.record(walk)
        clock.tick(5)
        walk.close("repaired", minutes=round((clock.now - datetime(
            2026, 11, 24, 9, 30, tzinfo=timezone.utc)).total_seconds() / 60))
        case.record(walk)
        return store.path_for(case.id)
    finally:
        case.close()
