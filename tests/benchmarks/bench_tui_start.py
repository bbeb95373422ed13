"""Launch to first screen: the bench TUI against a bare Textual app (DESIGN section 12).

Each app runs N times as a fresh subprocess (headless, so no terminal is needed); on its
first paint an auto-pilot prints the wall-clock time and calls ``app.exit()``. The time
measured runs from starting the interpreter to that print, so work done after the first
paint (the knowledge loading in a worker) is not counted, as the target intends. The bare
app shows a header, a label and a footer. Prints the medians and the ratio; the target is
at most 1.5x (aim 1.2x). Run: python tests/benchmarks/bench_tui_start.py [N]
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

BARE = r"""
from textual.app import App
from textual.widgets import Footer, Header, Label

class Bare(App):
    def compose(self):
        yield Header()
        yield Label("bench")
        yield Footer()

async def first_paint(pilot):
    import time
    print(time.time(), flush=True)
    pilot.app.exit()

Bare().run(headless=True, auto_pilot=first_paint)
"""

FAULTWISE = r"""
import sys
from faultwise.tui.app import build_app
from faultwise.tui.settings import Settings
from faultwise.core.workspace import resolve_workspace

ws = resolve_workspace(knowledge=sys.argv[2], cases=sys.argv[1])
app = build_app(ws, settings=Settings(None, safety_acknowledged="2026-01-01T00:00:00+00:00"))

async def first_paint(pilot):
    import time
    print(time.time(), flush=True)
    pilot.app.exit()

app.run(headless=True, auto_pilot=first_paint)
"""


def time_once_s(code: str, *args: str) -> float:
    """Seconds from starting the interpreter to the app's first paint (printed by the child)."""
    start = time.time()
    out = subprocess.run([sys.executable, "-c", code, *args], check=True,
                         capture_output=True, text=True)
    return float(out.stdout.split()[0]) - start


def knowledge_dir() -> str:
    """The bundled knowledge once it is written, else the TUI tests' small fixture."""
    from faultwise.core.workspace import bundled_knowledge_dir

    bundled = bundled_knowledge_dir()
    if (bundled / "symptoms.yaml").is_file():
        return str(bundled)
    return str(Path(__file__).resolve().parents[1] / "tui" / "fixtures" / "knowledge")


def main(n: int = 15) -> None:
    knowledge = knowledge_dir()
    with tempfile.TemporaryDirectory() as tmp:
        cases = str(Path(tmp) / "cases")
        Path(cases).mkdir()
        time_once_s(BARE), time_once_s(FAULTWISE, cases, knowledge)          # warm the file cache
        bare, ours = [], []
        for _ in range(n):                                          # interleave the runs
            bare.append(time_once_s(BARE))
            ours.append(time_once_s(FAULTWISE, cases, knowledge))
    b, o = statistics.median(bare), statistics.median(ours)
    print(f"bare Textual app: median {b * 1000:.0f} ms over {n} runs")
    print(f"faultwise TUI:    median {o * 1000:.0f} ms over {n} runs")
    print(f"ratio: {o / b:.2f} (target <= 1.5, aim 1.2)")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 15)
