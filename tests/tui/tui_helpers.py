"""Key-pressing helpers for the pilot tests: the keys a technician would press."""

from __future__ import annotations

from textual.pilot import Pilot

CASE_ID = "20261201-B1-001"       # first case of the fixed clock's day at bench B1


async def type_text(pilot: Pilot, text: str) -> None:
    """Type ``text`` into whatever has focus, one key per character."""
    await pilot.press(*["space" if ch == " " else ch for ch in text])


async def ready(pilot: Pilot) -> None:
    """Let the start-up workers (knowledge, case listing) finish."""
    await pilot.pause()
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()


async def new_case(pilot: Pilot, *, search: str = "5 tube", complaint: str = "hums",
                   customer: str = "T1", apprentice: bool = False) -> None:
    """From the start screen: n, search the library, complaint, symptom, customer, start."""
    await ready(pilot)
    await pilot.press("n")
    await ready(pilot)
    assert pilot.app.screen.id == "new-case"
    await type_text(pilot, search)
    await pilot.press("enter")                 # takes the best-ranked set
    await type_text(pilot, complaint)
    await pilot.press("enter")                 # takes the best-ranked symptom
    await type_text(pilot, customer)
    if apprentice:
        await pilot.press("f8")
    await pilot.press("enter")                 # starts the walk
    await pilot.pause()


async def answer(pilot: Pilot, text: str) -> None:
    """Type into the focused answer field and press Enter."""
    assert pilot.app.focused is not None and pilot.app.focused.id == "answer", pilot.app.focused
    await type_text(pilot, text)
    await pilot.press("enter")
    await pilot.pause()


async def acknowledge_cautions(pilot: Pilot) -> int:
    """Acknowledge every caution modal on top; returns how many were shown."""
    shown = 0
    while pilot.app.screen.id == "caution":
        shown += 1
        await wait_armed(pilot)
        await pilot.press("enter")
        await pilot.pause()
    return shown


async def wait_armed(pilot: Pilot) -> None:
    """Wait out the caution dialog's guard time (keys are ignored until then)."""
    for _ in range(200):
        screen = pilot.app.screen
        if screen.id != "caution" or screen.armed:
            return
        await pilot.pause(0.05)



async def past_first_observation(pilot: Pilot) -> None:
    """New case, the first observation answered with choice 1, its cautions acknowledged."""
    await new_case(pilot)
    await acknowledge_cautions(pilot)
    await pilot.press("1")
    await pilot.pause()
    await acknowledge_cautions(pilot)

def make_cases(workspace) -> None:
    """Case files for the start screen: 001 closed (waiting-parts), 002 open, one damaged."""
    from conftest import fixed_clock

    from faultwise.cases.store import CaseStore
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.profile.load import load_profile
    from faultwise.walk.state import Walk

    knowledge = load_knowledge(workspace.knowledge_dir)
    profile = load_profile(workspace.sets_dir / "demo-5-tube-table.yaml")
    store = CaseStore(workspace.cases_dir, workspace.bench, fixed_clock)
    for complaint, customer, close in (("hums badly", "ticket 4410", True),
                                       ("loud hum", "ticket 4411", False)):
        walk = Walk(knowledge, profile, "hum-loud", clock=fixed_clock)
        with store.new_case(profile, "demo-5-tube-table.yaml", complaint, "hum-loud",
                            customer=customer, knowledge_version=knowledge.version) as case:
            walk.acknowledge("live-chassis")
            walk.answer("1")
            if close:
                walk.close("waiting-parts", 30)
            case.record(walk)
    (workspace.cases_dir / "20261130-B1-007.json").write_text('{"format": "faultwise-ca')
