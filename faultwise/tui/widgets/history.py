"""The steps of a case so far, with their classification, one row per event (keyed by n)."""

from __future__ import annotations

from textual.widgets import DataTable

MARKS = {True: "✓", False: "!"}


def event_rows(events, steps) -> list[tuple[str, tuple[str, str, str, str]]]:
    """(row key, (n, what, reading, result)) for each event worth showing, oldest first."""
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
            rows.append((str(n), (str(n), phase + step.title, reading, result)))
        elif kind == "note":
            rows.append((str(n), (str(n), "note", str(e.get("text", "")), "")))
        elif kind == "off-graph":
            rows.append((str(n), (str(n), "off-graph finding", str(e.get("finding", "")), "")))
        elif kind == "parts":
            parts = ", ".join(e.get("parts") or ()) or "none"
            rows.append((str(n), (str(n), "parts replaced", parts, "")))
        elif kind == "resume":
            rows.append((str(n), (str(n), "diagnosis resumed", str(e.get("fault", "")), "")))
        elif kind == "to-closing":
            rows.append((str(n), (str(n), "to the closing checks", "", "")))
        elif kind == "close":
            rows.append((str(n), (str(n), "closed", str(e.get("outcome", "")),
                                  f"{e.get('minutes', '-')} min")))
    return rows


class History(DataTable):
    """Read-only table of the case's events; ``show(events, steps)`` refills it."""

    DEFAULT_CSS = """
    History { height: 1fr; }
    """

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id, cursor_type="row", zebra_stripes=True, show_cursor=False)

    def on_mount(self) -> None:
        self.add_column("#", key="n", width=3)
        self.add_column("Step", key="what")
        self.add_column("Reading", key="reading")
        self.add_column("Result", key="result")

    def show(self, events, steps) -> None:
        from rich.text import Text

        self.clear()
        for key, (n, what, reading, result) in event_rows(events, steps):
            style = "bold" if result.startswith("!") else ""
            self.add_row(n, Text(what), Text(reading), Text(result, style=style), key=key)
        if self.row_count:
            self.move_cursor(row=self.row_count - 1)
