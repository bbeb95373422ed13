"""Demo cases for an invented shop, made by walking the graph with the walk API.

Larkspur Lane Radio Works (invented) has three benches, B1-B3. Every case is a real walk:
a fault is drawn for the complaint, its signature gives the readings (with the small
scatter a real meter shows), the walk asks its checks and records the answers, the repair,
the verify readings, the leakage check and the close, all through ``Walk`` and
``CaseStore``. The generator is seeded: the same seed and the same knowledge give the same
cases. The shop's mix of faults is invented but deliberately differs from the graph's
priors: for every complaint and family, one fault the graph rates middling is this shop's
own common fault (seen twice as often as the graph's likeliest one), so that a review has
a pattern to find, ``review --learn`` changes an order, and the learned order pays.
"""

from __future__ import annotations

import random
from dataclasses import dataclass
from datetime import datetime, timedelta, timezone
from collections.abc import Mapping
from pathlib import Path
from typing import TYPE_CHECKING

from faultwise.core.errors import FaultwiseError

if TYPE_CHECKING:
    from faultwise.cases.store import CaseStore, OpenCase
    from faultwise.expect.context import Expected
    from faultwise.graph.knowledge import Knowledge
    from faultwise.graph.nodes import Fault
    from faultwise.profile.model import Profile
    from faultwise.walk.state import Walk

SHOP = "Larkspur Lane Radio Works"
BENCHES = ("B1", "B2", "B3")
FAMILY_MIX = {"series-string": 0.5, "transformer": 0.25, "transistor": 0.25}
SYMPTOM_MIX = {
    "dead-lights-on": 12, "hum-loud": 12, "weak-reception": 9, "dead-nothing-lights": 9,
    "distorted-audio": 7, "low-volume": 6, "noise-no-stations": 6, "intermittent": 6,
    "squeal-or-motorboat": 5, "scratchy-controls": 5, "fades-after-warmup": 4,
    "dial-off-calibration": 3, "smoke-or-overheat": 3, "dead-after-repair": 3,
}
COMPLAINTS = {
    "dead-lights-on": ["lights up but no sound at all", "dial lamp on, nothing from the speaker"],
    "hum-loud": ["hums loudly, stations faint underneath", "loud hum even with the volume down"],
    "weak-reception": ["only gets the strongest local station", "very weak, needs a long wire"],
    "dead-nothing-lights": ["completely dead, no light, no warmth", "no sound, no click, nothing"],
    "distorted-audio": ["voices sound rough and fuzzy", "distorts on loud passages"],
    "low-volume": ["plays but very quietly even turned up", "volume much lower than it was"],
    "noise-no-stations": ["hiss and crackle but no stations", "noise when tuned, no stations"],
    "intermittent": ["cuts out and comes back", "works if you tap the cabinet"],
    "squeal-or-motorboat": ["whistles on every station", "putt-putt noise at high volume"],
    "scratchy-controls": ["crackles when the volume is turned", "scratchy tuning and switch"],
    "fades-after-warmup": ["fine for ten minutes then fades away", "goes quiet when warm"],
    "dial-off-calibration": ["stations not where the dial says", "dial reads way off"],
    "smoke-or-overheat": ["smoke and a burning smell", "gets very hot, smells bad"],
    "dead-after-repair": ["dead since a neighbour changed a capacitor", "worked until someone fixed it"],
}
CUSTOMERS = ("M. Quillfeather", "T. Oyelaran-Bisset", "J. Marchetti-Hale", "A. Vantongeren",
             "P. Sokolowska", "R. Delacroix-Imbe", "S. Nakagawa-Ross", "L. Featherstonehaugh",
             "H. Abernathy", "C. Ilunga", "D. Przybylski", "E. Castellanos-Moor")
NOTES = ("Customer says it was fine last winter.", "Cabinet finish crazed; told the owner.",
         "Dial cord frayed; mentioned it.", "Back cover missing two screws.")
SKIP_REASONS = ("No ESR meter on this bench today.", "Probe lead broken; used the other bench.")
OFF_GRAPH = ("cracked ceramic trimmer under the first IF can",
             "IF can ceramic trimmer cracked, re-glued",
             "ceramic trimmer in the first IF transformer cracked",
             "mouse nest shorting the speaker leads")
START = datetime(2026, 2, 2, 9, 0, tzinfo=timezone.utc)
SPAN_DAYS = 295


class _Clock:
    """A fake clock the generator moves forward; the walk and the store read it."""

    def __init__(self, now: datetime) -> None:
        self.now = now

    def __call__(self) -> datetime:
        return self.now

    def tick(self, minutes: float) -> None:
        self.now += timedelta(minutes=minutes)


@dataclass(frozen=True)
class DemoSummary:
    closed: int
    open: int
    folder: Path


def _profiles(knowledge_dir: Path) -> dict[str, list[tuple[str, Profile]]]:
    from faultwise.profile.load import load_profile

    by_family: dict[str, list[tuple[str, Profile]]] = {}
    for path in sorted((knowledge_dir / "sets").glob("*.yaml")):
        profile = load_profile(path, knowledge_dir=knowledge_dir)
        by_family.setdefault(profile.family, []).append((path.name, profile))
    return by_family


def _shop_weights(knowledge: Knowledge, symptom: str, profile: Profile) -> dict[str, float]:
    """The invented shop's fault mix for this set: the graph's probabilities, with the
    middle-ranked fault raised to twice the likeliest (this shop's own common fault)."""
    from faultwise.graph.applicability import applying_faults
    from faultwise.expect.expected import expect
    from faultwise.walk.rank import fault_probabilities

    probs = fault_probabilities(knowledge, symptom, profile.family, counts={})
    fits = applying_faults(knowledge, profile, expect(profile))
    faults = [f for f in probs if f in fits and knowledge.nodes[f].signature is not None]
    ordered = sorted(faults, key=lambda f: (-probs[f], f))
    weights = {f: probs[f] for f in ordered}
    if len(ordered) > 2:                 # this shop's own common fault, rare elsewhere
        weights[ordered[len(ordered) // 2]] = 2.0 * probs[ordered[0]]
    return weights


def _reading_text(expected: Expected, outcome: str, rng: random.Random) -> str:
    """What a tech would type for a reading of this class, with a meter's scatter."""
    from faultwise.core.units import format_reading
    from faultwise.expect.classify import representative_value

    value = representative_value(expected, outcome)
    if outcome == "normal":
        span = (expected.high - expected.low) * 0.15
        value = min(expected.high, max(expected.low, expected.nominal + rng.uniform(-span, span)))
    elif outcome in ("low", "high"):
        value *= rng.uniform(0.97, 1.03)
    return format_reading(value, expected.unit)


def _answer(walk: Walk, fault: Fault, rng: random.Random, skip_ok: bool) -> None:
    """Answer the current check as the fault's signature implies."""
    from faultwise.expect.classify import classify

    prompt = walk.prompt()
    check = prompt.node
    for caution in prompt.unacknowledged:
        walk.acknowledge(caution)
    if check.expect is not None and prompt.expected is not None:
        spec = fault.signature.readings.get(check.expect, "normal") if fault else "normal"
        if isinstance(spec, (int, float)):
            outcome = classify(float(spec), prompt.expected)
        else:
            outcome = str(spec)
        if skip_ok and outcome == "normal" and rng.random() < 0.05:
            walk.skip(rng.choice(SKIP_REASONS))
            return
        walk.answer(_reading_text(prompt.expected, outcome, rng))
        return
    choice = check.normal
    if fault is not None:
        choice = fault.signature.observations.get(check.id, check.normal)
    if check.expect is not None and prompt.expected is None:
        choice = "normal"
    walk.answer(choice)


def _diagnose(walk: Walk, fault: Fault, rng: random.Random, clock: _Clock, case: OpenCase,
              stop_after: int | None = None) -> None:
    asked = 0
    while walk.phase == "diagnose":
        prompt = walk.prompt()
        if prompt is None or prompt.kind != "check":
            return
        if stop_after is not None and asked >= stop_after:
            return
        clock.tick(prompt.node.minutes)
        _answer(walk, fault, rng, skip_ok=True)
        case.record(walk)
        asked += 1


def _finish_checks(walk: Walk, rng: random.Random, clock: _Clock, case: OpenCase,
                   phase: str) -> None:
    """Answer verify or closing checks the way a good repair reads."""
    while walk.phase == phase:
        prompt = walk.prompt()
        if prompt is None or prompt.kind != "check":
            return
        for caution in prompt.unacknowledged:
            walk.acknowledge(caution)
        clock.tick(prompt.node.minutes)
        if prompt.node.expect is not None and prompt.expected is not None:
            expected = prompt.expected
            if expected.low <= 0.0:          # a limit such as the leakage check
                value = expected.high * rng.uniform(0.05, 0.5)
                from faultwise.core.units import format_reading

                walk.answer(format_reading(value, expected.unit))
            else:
                walk.answer(_reading_text(expected, "normal", rng))
        elif prompt.node.expect is not None:
            walk.answer("normal")
        else:
            walk.answer(prompt.node.normal)
        case.record(walk)


def _one_case(store: CaseStore, knowledge: Knowledge,
              profiles: Mapping[str, list[tuple[str, Profile]]], rng: random.Random,
              clock: _Clock, plan: str, reopened_from: str | None = None,
              forced: tuple[str, Profile, str, str] | None = None) -> tuple[str, tuple[str, Profile, str, str]]:
    from faultwise.walk.state import Walk

    if forced is None:
        family = rng.choices(list(FAMILY_MIX), weights=list(FAMILY_MIX.values()))[0]
        source, profile = rng.choice(profiles[family])
        symptoms = [s for s in SYMPTOM_MIX if s in knowledge.symptoms
                    and family in knowledge.symptoms[s].entry]
        symptom = rng.choices(symptoms, weights=[SYMPTOM_MIX[s] for s in symptoms])[0]
        customer = f"ticket {rng.randint(4000, 4999)}, {rng.choice(CUSTOMERS)}"
    else:
        source, profile, symptom, customer = forced
    weights = _shop_weights(knowledge, symptom, profile)
    fault_id = rng.choices(list(weights), weights=list(weights.values()))[0]
    fault = knowledge.nodes[fault_id]
    complaint = rng.choice(COMPLAINTS.get(symptom, ["see the ticket"]))
    case = store.new_case(profile, source, complaint, symptom, customer=customer,
                          apprentice=rng.random() < 0.25, knowledge_version=knowledge.version,
                          reopened_from=reopened_from)
    try:
        walk = Walk(knowledge, profile, symptom, clock=clock)
        if rng.random() < 0.15:
            walk.note(rng.choice(NOTES))
        if plan == "open":
            _diagnose(walk, fault, rng, clock, case, stop_after=rng.randint(1, 2))
            case.record(walk)
            return case.id, (source, profile, symptom, customer)
        if plan == "off-graph":
            _diagnose(walk, fault, rng, clock, case, stop_after=1)
            if walk.phase == "diagnose":
                walk.off_graph(OFF_GRAPH[rng.randrange(len(OFF_GRAPH))])
        else:
            _diagnose(walk, fault, rng, clock, case)
            if walk.phase == "diagnose":           # escalated: the tech records what it was
                walk.off_graph(rng.choice(OFF_GRAPH))
        case.record(walk)
        if plan == "unrepaired":
            walk.to_closing()
        elif plan == "waiting":
            clock.tick(10)
            walk.close("waiting-parts", minutes=round(walk.diagnosis_minutes() + 10))
            case.record(walk)
            return case.id, (source, profile, symptom, customer)
        else:
            clock.tick(rng.randint(15, 75))
            parts = list(walk.conclusion.parts) if walk.conclusion else []
            walk.record_parts(parts)
        case.record(walk)
        _finish_checks(walk, rng, clock, case, "verify")
        _finish_checks(walk, rng, clock, case, "closing")
        outcome = "returned-unrepaired" if plan == "unrepaired" else "repaired"
        minutes = round((clock.now - datetime.fromisoformat(case.data["opened"]))
                        .total_seconds() / 60)
        walk.close(outcome, minutes=minutes)
        case.record(walk)
        return case.id, (source, profile, symptom, customer)
    finally:
        case.close()


def generate(knowledge_dir: Path, cases_dir: Path, *, seed: int = 7, closed: int = 200,
             open_cases: int = 3, force: bool = False) -> DemoSummary:
    """Write the demo cases into ``cases_dir`` (refuses a folder holding cases unless ``force``)."""
    from faultwise.cases.store import CaseStore
    from faultwise.graph.knowledge import load_knowledge

    cases_dir = Path(cases_dir)
    existing = sorted(cases_dir.glob("*.json")) if cases_dir.is_dir() else []
    if existing and not force:
        raise FaultwiseError("the cases folder already holds cases", file=str(cases_dir),
                             hint="pass --force to replace the demo cases, or another --cases")
    for path in existing:
        path.unlink()
    knowledge = load_knowledge(knowledge_dir)
    profiles = _profiles(Path(knowledge_dir))
    rng = random.Random(seed)
    total = closed + open_cases
    plans = ["repaired"] * closed
    for i, special in zip((9, 23, 31, 40, 47, 52, 58), ("off-graph", "unrepaired", "waiting",
                                                        "off-graph", "unrepaired", "waiting",
                                                        "off-graph")):
        if i < closed:
            plans[i] = special
    plans += ["open"] * open_cases
    made: dict[int, tuple] = {}
    count_open = 0
    for i, plan in enumerate(plans):
        day = START + timedelta(days=SPAN_DAYS * i / max(total - 1, 1))
        clock = _Clock(day.replace(hour=9 + rng.randint(0, 6), minute=rng.randint(0, 59)))
        store = CaseStore(cases_dir, rng.choice(BENCHES), clock=clock)
        forced = reopened = None
        if i == closed - 5 and 3 in made:   # the owner of an early job is back
            reopened, forced = made[3][0], made[3][1][:2] + ("dead-after-repair",
                                                             made[3][1][3])
        case_id, info = _one_case(store, knowledge, profiles, rng, clock, plan,
                                  reopened_from=reopened, forced=forced)
        made[i] = (case_id, info)
        count_open += plan == "open"
    return DemoSummary(closed=total - count_open, open=count_open, folder=cases_dir)
