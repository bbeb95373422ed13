"""The steps of a case so far, with their classification, one row per event (keyed by n)."""

from __future__ import annotations

from textual.widgets import DataTable

MARKS = {True: "✓", False: "!"}


def event_rows(events, steps) -> list[tuple[str, tuple[str, str, str, str]]]:
    """(row key, (n, result, reading, what)) for each event worth showing, oldest first."""
    by_n = {s.n: s for s in steps}
    rows = []
    for e in events:
        n = int(e.get("n", 0))
        kind = e.get("type")
        step = by_n.get(n)
        if kind in ("answer", "skip") and step is not None:
            if kind == "skip":
                result = "skipped"
                reading = e.get("reason") or "-"
            else:
                result = f"{MARKS[step.normal]} {step.outcome}"
                reading = step.raw or "-"
            phase = "" if step.phase == "diagnose" else f"[{step.phase}] "
            rows.append((str(n), (str(n), result, reading, phase + step.title)))
        elif kind == "note":
            rows.append((str(n), (str(n), "note", "", str(e.get("text", "")))))
        elif kind == "off-graph":
            rows.append((str(n), (str(n), "off-graph", "", str(e.get("finding", "")))))
        elif kind == "parts":
            parts = ", ".join(e.get("parts") or ()) or "none"
            rows.append((str(n), (str(n), "parts", "", parts)))
        elif kind == "resume":
            after = "diagnosis resumed after " + str(e.get("fault", ""))
            rows.append((str(n), (str(n), "not cured", "", after)))
        elif kind == "to-closing":
            rows.append((str(n), (str(n), "closing", "", "straight to the closing checks")))
        elif kind == "close":
            rows.append((str(n), (str(n), "closed", f"{e.get('minutes', '-')} min",
                                  str(e.get("outcome", "")))))
    return rows


class History(DataTable):
    """Read-only table of the case's events; ``show(events, steps)`` refills it."""

    DEFAULT_CSS = """
    History { height: 1fr; overflow-x: hidden; }
    """

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id, cursor_type="row", zebra_stripes=True, show_cursor=False)

    def on_mount(self) -> None:
        self.add_column("#", key="n", width=3)
        self.add_column("Result", key="result", width=10)
        self.add_column("Input", key="reading", width=12)
        self.add_column("Step", key="what")

    def show(self, events, steps) -> None:
        from rich.text import Text

        self.clear()
        for key, (n, result, reading, what) in event_rows(events, steps):
            style = "bold" if result.startswith("!") else ""
            self.add_row(n, Text(result, style=style), Text(reading), Text(what), key=key)
        if self.row_count:
            self.move_cursor(row=self.row_count - 1)
