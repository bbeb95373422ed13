"""A case read-only, step by step: the summary, every event, and the detail of the one
selected (band and basis as shown at the time, what was typed, the classification).

The "#" column numbers the checks (1, 2, 3...) as the walk's history does; other events
(cautions read, notes, parts...) have no number and say what they are in words.
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import TYPE_CHECKING

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.content import Content
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Header, Static

from faultwise.tui.context import Bench
from faultwise.tui.widgets.history import MARKS, check_numbers
from faultwise.tui.wording import caution_title, node_title, printable, symptom_title

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge

INPUT_WIDTH = (6, 20)       # (least, most) cells of the input column
RESULT_WIDTH = (6, 12)


def column_width(cells: Iterable[str], heading: str, limits: tuple[int, int]) -> int:
    """The widest cell (or the heading), kept within ``limits``."""
    widest = max([len(heading), *(len(c) for c in cells)])
    return max(limits[0], min(limits[1], widest))

TYPE_WORDS = {"answer": "answer", "skip": "skipped", "note": "note", "acknowledge": "caution read",
              "off-graph": "off-graph finding", "parts": "parts replaced", "resume": "resumed",
              "to-closing": "to closing checks", "close": "closed", "reopen": "reopened"}


def _when(iso: object) -> str:
    """``2026-12-01T09:30:00+00:00`` -> ``2026-12-01 09:30``."""
    return str(iso or "")[:16].replace("T", " ")


def summary_text(data: dict, knowledge: Knowledge | None = None) -> Content:
    """Header lines of a case: id, set, complaint, conclusion, outcome (case text through
    printable: literal, and no control character reaches the terminal)."""
    conclusion = data.get("conclusion") or {}
    fault = conclusion.get("title") if isinstance(conclusion, dict) else None
    profile = (data.get("set") or {}).get("profile") or {}
    return _safe_markup(
        "[b]$id[/b]  $status  [dim]bench $bench, opened $opened[/dim]\n"
        "[b]Set:[/b] $label   [b]Customer:[/b] $customer\n"
        "[b]Complaint:[/b] $complaint  [dim]($symptom)[/dim]\n"
        "[b]Found:[/b] $found   [b]Parts:[/b] $parts   [b]Outcome:[/b] $outcome, $minutes min",
        id=str(data.get("id", "?")), status=str(data.get("status", "?")),
        bench=str(data.get("bench", "?")), opened=_when(data.get("opened")),
        label=str(profile.get("label", "?")), customer=str(data.get("customer") or "-"),
        complaint=str(data.get("complaint") or "-"),
        symptom=symptom_title(knowledge, data.get("symptom")) or "?",
        found=str(fault or data.get("off_graph") or "-"),
        parts=", ".join(str(p) for p in data.get("parts") or ()) or "none",
        outcome=str(data.get("outcome") or "-"), minutes=str(data.get("minutes", "-")))


def event_cells(event: dict, knowledge: Knowledge | None, number: int | None = None
                ) -> tuple[str, str, str, str]:
    """(step number, what, input, result) for one event of the case file; ``number`` is the
    check's step number (None for events that are not checks)."""
    kind = str(event.get("type", "?"))
    n = "" if number is None else str(number)
    if kind in ("answer", "skip"):
        what = node_title(knowledge, event.get("node"))
        phase = event.get("phase")
        if phase and phase != "diagnose":
            what = f"[{phase}] {what}"
        if kind == "skip":
            return n, what, str(event.get("reason") or "-"), "skipped"
        outcome = str(event.get("outcome", ""))
        node = getattr(knowledge, "nodes", {}).get(event.get("node")) if knowledge else None
        normal = getattr(node, "normal", None)
        if normal is not None:                  # marked as the walk's history marks it
            outcome = f"{MARKS[outcome == normal]} {outcome}"
        return n, what, str(event.get("raw", "")), outcome
    text = {"note": event.get("text"), "off-graph": event.get("finding"),
            "acknowledge": caution_title(knowledge, event.get("caution")),
            "resume": node_title(knowledge, event.get("fault")),
            "parts": ", ".join(str(p) for p in event.get("parts") or ()) or "none",
            "close": event.get("outcome")}.get(kind, "")
    result = f"{event.get('minutes', '-')} min" if kind == "close" else ""
    return n, TYPE_WORDS.get(kind, kind), str(text or ""), result


def _safe_markup(template: str, **values: str) -> Content:
    """``Content.from_markup`` with every value made printable."""
    return Content.from_markup(template, **{k: printable(v) for k, v in values.items()})


def event_detail(event: dict, knowledge: Knowledge | None, number: int | None = None
                 ) -> Content:
    """Everything recorded for one event, as safe Content (``number``: the check's step)."""
    kind = str(event.get("type"))
    head = f"Check {number}: " if number is not None else ""
    lines = [_safe_markup("[b]$head$type[/b]  [dim]$at[/dim]", head=head,
                                 type=TYPE_WORDS.get(kind, kind), at=_when(event.get("at")))]
    if event.get("node"):
        lines.append(_safe_markup("$t  [dim]($id)[/dim]",
                                  t=node_title(knowledge, event["node"]), id=str(event["node"])))
    band = event.get("band")
    if isinstance(band, dict):
        def num(key: str) -> str:
            value = band.get(key)
            return f"{value:g}" if isinstance(value, (int, float)) else "?"

        lines.append(_safe_markup(
            "Band $low to $high $unit (nominal $nom)$typ\nBasis: $basis", low=num("low"),
            high=num("high"), unit=str(band.get("unit", "")), nom=num("nominal"),
            typ="  ≈ typical" if band.get("typical") else "", basis=str(band.get("basis", "-"))))
    if kind == "acknowledge" and event.get("caution"):
        lines.append(_safe_markup("[b]Caution:[/b] $t  [dim]($id)[/dim]",
                                         t=caution_title(knowledge, event["caution"]),
                                         id=str(event["caution"])))
    node = knowledge.nodes.get(event.get("node")) if knowledge is not None else None
    choices = getattr(node, "choices", None) or {}
    for key, label in (("raw", "Typed"), ("value", "Value"), ("outcome", "Result"),
                       ("reason", "Reason"), ("text", "Note"), ("finding", "Finding"),
                       ("minutes", "Minutes")):
        if event.get(key) not in (None, ""):
            value = str(event[key])
            if key == "outcome" and kind != "close" and choices.get(value):
                value = f"{value} ({choices[value]})"     # the choice as the tech saw it
            lines.append(_safe_markup("[b]$l:[/b] $v", l=label, v=value))
    return Content("\n").join(lines)


class CaseViewerScreen(Screen):
    """One case, read-only (no lock is taken, nothing is written)."""

    BINDINGS = [Binding("escape", "back", "Back", priority=True)]

    def __init__(self, bench: Bench, case_id: str) -> None:
        super().__init__(id="viewer")
        self.bench = bench
        self.case_id = case_id
        self.data: dict | None = None
        self.events: dict[str, dict] = {}
        self.numbers: dict[int, int] = {}

    def compose(self) -> ComposeResult:
        yield Header()
        with Vertical(id="viewer-body"):
            yield Static("", id="viewer-summary")
            yield DataTable(id="viewer-events", cursor_type="row", zebra_stripes=True)
            yield Static("", id="viewer-detail")
        yield Footer()

    def on_mount(self) -> None:
        from rich.text import Text

        from faultwise.core.errors import FaultwiseError

        self.sub_title = f"case {self.case_id} (read-only)"
        table = self.query_one(DataTable)
        try:
            self.data = self.bench.store.read(self.case_id)
        except FaultwiseError as exc:
            self.query_one("#viewer-summary", Static).update(Content(printable(exc)))
            return
        knowledge = self.bench.knowledge
        self.query_one("#viewer-summary", Static).update(summary_text(self.data, knowledge))
        events = [e for e in self.data.get("events") or () if isinstance(e, dict)]
        self.numbers = check_numbers(events)
        rows = []
        for event in events:
            key = str(event.get("n"))
            self.events[key] = event
            number = self.numbers.get(int(event.get("n") or 0))
            rows.append((key, number, event_cells(event, knowledge, number)))
        # Widths fitted to the screen so the input and the result stay in view beside long
        # titles: input and result as wide as their cells (within limits), the step the rest.
        input_width = column_width((c[2] for _, _, c in rows), "Input", INPUT_WIDTH)
        result_width = column_width((c[3] for _, _, c in rows), "Result", RESULT_WIDTH)
        what_width = max(16, self.app.size.width - 3 - input_width - result_width - 4 * 2 - 2)
        table.add_column("#", key="n", width=3)
        table.add_column("Step", key="what", width=what_width)
        table.add_column("Input", key="input", width=input_width)
        table.add_column("Result", key="result", width=result_width)
        for key, number, (n, what, typed, result) in rows:
            style = "" if number is not None else "italic"
            table.add_row(Text(n, justify="right"), Text(printable(what), style=style),
                          Text(printable(typed)), Text(printable(result)), key=key)
        table.focus()

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        chosen = self.events.get(event.row_key.value if event.row_key else None)
        number = self.numbers.get(int(chosen.get("n") or 0)) if chosen else None
        self.query_one("#viewer-detail", Static).update(
            event_detail(chosen, self.bench.knowledge, number) if chosen else "")

    def action_back(self) -> None:
        self.app.pop_screen()
