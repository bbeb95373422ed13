"""The bench program on the shipped knowledge and demo sets (the default workspace).

The keys do not depend on the content: every measurement is answered with its expected
nominal value (so it classifies normal, as a healthy stage would) and every observation
with its first choice, until the walk leaves the diagnosis or eight checks are done. After
each answer the case file on disk must hold it.
"""

from __future__ import annotations

from conftest import FIXED_NOW, fixed_clock, read_case
from tui_helpers import acknowledge_cautions, new_case, type_text

from faultwise.core.workspace import Workspace, bundled_knowledge_dir


async def test_walk_on_the_bundled_knowledge(cases_dir):
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings

    workspace = Workspace(knowledge_dir=bundled_knowledge_dir(), cases_dir=cases_dir, bench="B3")
    app = build_app(workspace, clock=fixed_clock,
                    settings=Settings(None, safety_acknowledged=FIXED_NOW.isoformat()))
    async with app.run_test(size=(80, 24)) as pilot:
        await new_case(pilot, search="5 tube table", complaint="hums loudly")
        data = read_case(cases_dir)
        assert data["set"]["source"] == "demo-5-tube-table.yaml"
        assert data["symptom"] == "hum-loud"
        answered = 0
        needed: set[str] = set()
        for _ in range(8):
            await acknowledge_cautions(pilot)
            screen = app.screen
            if screen.id != "walk" or not screen.query_one("#check").display:
                break
            prompt = screen.walk.prompt()
            needed.update(c.id for c in prompt.cautions)
            if prompt.is_measurement:
                app.focused.value = ""
                await type_text(pilot, f"{prompt.expected.nominal:.4g}")
                await pilot.press("enter")
            else:
                await pilot.press("1")
            await pilot.pause()
            answered += 1
            events = read_case(cases_dir)["events"]
            last = [e for e in events if e["type"] == "answer"][-1]
            assert last["node"] == prompt.node.id
            if prompt.is_measurement:
                assert last["outcome"] == "normal"
        assert answered >= 1
        # Every caution a shown check needed was acknowledged (once) before it.
        acknowledged = read_case(cases_dir)["acknowledged"]
        assert needed <= set(acknowledged)
        assert len(acknowledged) == len(set(acknowledged))
