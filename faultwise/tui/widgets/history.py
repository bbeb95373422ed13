"""The steps of a case so far, with their classification, one row per event (keyed by n).

The "#" column numbers the checks of the case (1, 2, 3...: answered and skipped checks, in
every phase); other events (notes, parts, off-graph findings...) carry no number and a
word in the result column, in italics.
"""

from __future__ import annotations

from typing import Iterable, Mapping

from rich.text import Text
from textual.widgets import DataTable

from faultwise.tui.wording import node_title, printable

MARKS = {True: "✓", False: "!"}
CHECK_EVENTS = ("answer", "skip")


def check_numbers(events: Iterable[Mapping]) -> dict[int, int]:
    """Event n -> the check's step number within the case (answers and skips, 1, 2, 3...)."""
    numbers: dict[int, int] = {}
    for event in events:
        if event.get("type") in CHECK_EVENTS:
            numbers[int(event.get("n", 0))] = len(numbers) + 1
    return numbers


def event_rows(events, steps, knowledge=None) -> list[tuple[str, tuple[str, str, str, str]]]:
    """(row key, (step number, result, reading, what)) for each event worth showing, oldest
    first; the key is the event's n, the step number is empty for non-check events."""
    by_n = {s.n: s for s in steps}
    numbers = check_numbers(events)
    rows = []
    for e in events:
        n = int(e.get("n", 0))
        key = str(n)
        kind = e.get("type")
        step = by_n.get(n)
        if kind in CHECK_EVENTS and step is not None:
            if kind == "skip":
                result = "skipped"
                reading = e.get("reason") or "-"
            else:
                result = f"{MARKS[step.normal]} {step.outcome}"
                reading = step.raw or "-"
            phase = "" if step.phase == "diagnose" else f"[{step.phase}] "
            rows.append((key, (str(numbers[n]), result, reading, phase + step.title)))
        elif kind == "note":
            rows.append((key, ("", "note", "", str(e.get("text", "")))))
        elif kind == "off-graph":
            rows.append((key, ("", "off-graph", "", str(e.get("finding", "")))))
        elif kind == "parts":
            parts = ", ".join(e.get("parts") or ()) or "none"
            rows.append((key, ("", "parts", "", parts)))
        elif kind == "resume":
            after = "diagnosis resumed after " + node_title(knowledge, e.get("fault"))
            rows.append((key, ("", "not cured", "", after)))
        elif kind == "to-closing":
            rows.append((key, ("", "closing", "", "straight to the closing checks")))
        elif kind == "close":
            rows.append((key, ("", "closed", f"{e.get('minutes', '-')} min",
                               str(e.get("outcome", "")))))
    return rows


class History(DataTable):
    """Read-only table of the case's events; ``show(events, steps, knowledge)`` refills it.

    A step adds rows at the end: only those are added (an undo, which takes rows away,
    refills the table).
    """

    DEFAULT_CSS = """
    History { height: 1fr; overflow-x: hidden; }
    """

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id, cursor_type="row", zebra_stripes=True, show_cursor=False)
        self._rows: list[tuple[str, tuple[str, str, str, str]]] = []    # as shown

    def on_mount(self) -> None:
        self.add_column("#", key="n", width=3)
        self.add_column("Result", key="result", width=10)
        self.add_column("Input", key="reading", width=12)
        self.add_column("Step", key="what")

    def show(self, events: Iterable[Mapping], steps: Iterable, knowledge: object = None
             ) -> None:
        rows = event_rows(events, steps, knowledge)
        if rows == self._rows:
            return
        kept = len(self._rows)
        if rows[:kept] != self._rows:
            self.clear()
            kept = 0
        for key, (number, result, reading, what) in rows[kept:]:
            if not number:
                style = "italic"
            else:
                style = "bold" if result.startswith("!") else ""
            self.add_row(Text(number, justify="right"), Text(printable(result), style=style),
                         Text(printable(reading)), Text(printable(what)), key=key)
        self._rows = rows
        if self.row_count:
            self.move_cursor(row=self.row_count - 1)
