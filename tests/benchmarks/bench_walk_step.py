"""One walk step as the technician feels it: the answer's key press to the next check on screen.

A Textual pilot (headless) runs the bench app on the bundled knowledge and the demo sets, in
a throwaway cases folder. Each timed step starts at the key that gives the answer (Enter
after a typed reading, or a choice's number) and ends when the app has handled it and
refreshed: the walk has moved, the case file has been replaced atomically (fsync of the
temp and of the folder, :mod:`faultwise.core.atomic`) and the next check's title is on the
screen. Caution notices are acknowledged outside the timing. Walks are started one after
another until N steps (default 20) are timed. Prints the median, the 95th percentile and
the slowest step; the target is under 50 ms at the 95th percentile on this machine.

    python tests/benchmarks/bench_walk_step.py [N]
"""

from __future__ import annotations

import asyncio
import json
import statistics
import sys
import tempfile
import time
from pathlib import Path

# (set search, complaint): walks with many checks on the bundled knowledge; cycled.
WALKS = (("5 tube", "hums"), ("transformer", "dead"), ("portable", "weak"),
         ("5 tube", "distorted"), ("console", "hum"))


async def _type(pilot, text: str) -> None:
    await pilot.press(*["space" if ch == " " else ch for ch in text])


async def _settle(pilot) -> None:
    await pilot.pause()
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()


async def _acknowledge(pilot) -> None:
    while pilot.app.screen.id == "caution":
        await pilot.press("enter")
        await pilot.pause()


async def _new_case(pilot, search: str, complaint: str) -> bool:
    await _settle(pilot)
    await pilot.press("n")
    await _settle(pilot)
    if pilot.app.screen.id != "new-case":
        return False
    await _type(pilot, search)
    await pilot.press("enter")
    await _type(pilot, complaint)
    await pilot.press("enter")
    await _type(pilot, "bench")
    await pilot.press("enter")
    await _settle(pilot)
    await _acknowledge(pilot)
    return pilot.app.screen.id == "walk"


def _answer_keys(prompt) -> list[str]:
    """A plausible answer: the nominal reading typed then Enter, or the normal choice's key."""
    if prompt.is_measurement:
        from faultwise.core.units import format_reading

        text = format_reading(prompt.expected.nominal, prompt.expected.unit, 3)
        return ["space" if ch == " " else ch for ch in text] + ["enter"]
    names = [name for name, _ in prompt.choices]
    normal = getattr(prompt.node, "normal", None)
    # an abnormal answer now and then keeps the walk going deeper into the suspects
    pick = names.index(normal) if normal in names else 0
    return [str(pick + 1)]


async def measure(n: int, workspace) -> tuple[list[float], list[float]]:
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings

    app = build_app(workspace, settings=Settings(None, safety_acknowledged="2026-01-01T00:00"))
    times: list[float] = []
    idle: list[float] = []          # the same press and pause for a key bound to nothing
    async with app.run_test(size=(120, 40)) as pilot:
        walk_no = 0
        while len(times) < n and walk_no < 4 * len(WALKS):
            search, complaint = WALKS[walk_no % len(WALKS)]
            walk_no += 1
            if not await _new_case(pilot, search, complaint):
                await pilot.press("escape")
                continue
            while len(times) < n and app.screen.id == "walk":
                screen = app.screen
                prompt = screen.walk.prompt()
                if prompt is None or prompt.kind != "check":
                    break
                keys = _answer_keys(prompt)
                if len(keys) > 1:
                    await pilot.press(*keys[:-1])          # typing is not the step
                    await pilot.pause()
                t0 = time.perf_counter()
                await pilot.press("f19")                    # bound to nothing: the harness
                await pilot.pause()
                idle.append(time.perf_counter() - t0)
                before = len(screen.walk.events)
                t0 = time.perf_counter()
                await pilot.press(keys[-1])
                await pilot.pause()                         # handled and refreshed
                elapsed = time.perf_counter() - t0
                if len(screen.walk.events) == before:
                    break                                   # refused: not a step
                saved = json.loads(screen.case.path.read_text(encoding="utf-8"))
                assert len(saved["events"]) == len(screen.walk.events), "case not saved"
                nxt = screen.walk.prompt()
                if app.screen is screen and nxt is not None and nxt.node is not None:
                    shown = str(screen.query_one("#check-title").render())
                    assert nxt.node.title in shown or nxt.kind != "check", shown
                times.append(elapsed)
                await _acknowledge(pilot)
            # leave the case (it stays open on disk) and start the next walk
            while app.screen.id not in ("start",) and len(app.screen_stack) > 1:
                await pilot.press("escape")
                await _settle(pilot)
                if app.screen.id in ("walk", "conclusion"):
                    break
    return times, idle


def main(n: int) -> None:
    from faultwise.core.workspace import Workspace, bundled_knowledge_dir

    with tempfile.TemporaryDirectory() as tmp:
        cases = Path(tmp) / "cases"
        cases.mkdir()
        ws = Workspace(knowledge_dir=bundled_knowledge_dir(), cases_dir=cases, bench="B1")
        times, idle = asyncio.run(measure(n, ws))
    if not times:
        print("no step could be timed")
        sys.exit(1)
    ms = sorted(t * 1000 for t in times)
    p95 = statistics.quantiles(ms, n=20, method="inclusive")[-1] if len(ms) > 1 else ms[0]
    print(f"steps timed: {len(ms)}")
    print(f"median: {statistics.median(ms):.1f} ms")
    print(f"95th percentile: {p95:.1f} ms (target < 50 ms)")
    print(f"slowest: {ms[-1]:.1f} ms")
    base = sorted(t * 1000 for t in idle)
    print(f"pilot press+pause of an unbound key (harness floor): median "
          f"{statistics.median(base):.1f} ms")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 20)
