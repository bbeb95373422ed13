"""A case read-only, step by step: the summary, every event, and the detail of the one
selected (band and basis as shown at the time, what was typed, the classification).
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.content import Content
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Header, Static

from faultwise.tui.context import Bench

TYPE_WORDS = {"answer": "answer", "skip": "skipped", "note": "note", "acknowledge": "caution read",
              "off-graph": "off-graph finding", "parts": "parts replaced", "resume": "resumed",
              "to-closing": "to closing checks", "close": "closed", "reopen": "reopened"}


def summary_text(data: dict) -> Content:
    """Header lines of a case: id, set, complaint, conclusion, outcome."""
    conclusion = data.get("conclusion") or {}
    fault = conclusion.get("title") if isinstance(conclusion, dict) else None
    profile = (data.get("set") or {}).get("profile") or {}
    return Content.from_markup(
        "[b]$id[/b]  $status  [dim]bench $bench, opened $opened[/dim]\n"
        "[b]Set:[/b] $label   [b]Customer:[/b] $customer\n"
        "[b]Complaint:[/b] $complaint  [dim]($symptom)[/dim]\n"
        "[b]Found:[/b] $found   [b]Parts:[/b] $parts   [b]Outcome:[/b] $outcome, $minutes min",
        id=str(data.get("id", "?")), status=str(data.get("status", "?")),
        bench=str(data.get("bench", "?")), opened=str(data.get("opened", ""))[:16],
        label=str(profile.get("label", "?")), customer=str(data.get("customer") or "-"),
        complaint=str(data.get("complaint") or "-"), symptom=str(data.get("symptom", "?")),
        found=str(fault or data.get("off_graph") or "-"),
        parts=", ".join(str(p) for p in data.get("parts") or ()) or "none",
        outcome=str(data.get("outcome") or "-"), minutes=str(data.get("minutes", "-")))


def node_title(knowledge, node_id) -> str:
    node = knowledge.nodes.get(node_id) if knowledge is not None and node_id else None
    return getattr(node, "title", None) or str(node_id or "")


def event_cells(event: dict, knowledge) -> tuple[str, str, str, str]:
    """(n, what, input, result) for one event of the case file."""
    kind = str(event.get("type", "?"))
    n = str(event.get("n", ""))
    if kind in ("answer", "skip"):
        what = node_title(knowledge, event.get("node"))
        phase = event.get("phase")
        if phase and phase != "diagnose":
            what = f"[{phase}] {what}"
        if kind == "skip":
            return n, what, str(event.get("reason") or "-"), "skipped"
        return n, what, str(event.get("raw", "")), str(event.get("outcome", ""))
    text = {"note": event.get("text"), "off-graph": event.get("finding"),
            "acknowledge": event.get("caution"), "resume": event.get("fault"),
            "parts": ", ".join(str(p) for p in event.get("parts") or ()) or "none",
            "close": event.get("outcome")}.get(kind, "")
    result = f"{event.get('minutes', '-')} min" if kind == "close" else ""
    return n, TYPE_WORDS.get(kind, kind), str(text or ""), result


def event_detail(event: dict, knowledge) -> Content:
    """Everything recorded for one event, as safe Content."""
    kind = str(event.get("type"))
    lines = [Content.from_markup("[b]#$n $type[/b]  [dim]$at[/dim]", n=str(event.get("n", "")),
                                 type=TYPE_WORDS.get(kind, kind), at=str(event.get("at", "")))]
    if event.get("node"):
        lines.append(Content.from_markup("$t  [dim]($id)[/dim]",
                                         t=node_title(knowledge, event["node"]),
                                         id=str(event["node"])))
    band = event.get("band")
    if isinstance(band, dict):
        def num(key: str) -> str:
            value = band.get(key)
            return f"{value:g}" if isinstance(value, (int, float)) else "?"

        lines.append(Content.from_markup(
            "Band $low to $high $unit (nominal $nom)$typ\nBasis: $basis", low=num("low"),
            high=num("high"), unit=str(band.get("unit", "")), nom=num("nominal"),
            typ="  ≈ typical" if band.get("typical") else "", basis=str(band.get("basis", "-"))))
    for key, label in (("raw", "Typed"), ("value", "Value"), ("outcome", "Result"),
                       ("reason", "Reason"), ("text", "Note"), ("finding", "Finding")):
        if event.get(key) not in (None, ""):
            lines.append(Content.from_markup("[b]$l:[/b] $v", l=label, v=str(event[key])))
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

    def compose(self) -> ComposeResult:
        yield Header()
        with Vertical(id="viewer-body"):
            yield Static("", id="viewer-summary")
            yield DataTable(id="viewer-events", cursor_type="row", zebra_stripes=True)
            yield Static("", id="viewer-detail")
        yield Footer()

    def on_mount(self) -> None:
        from rich.text import Text

        from faultwise.errors import FaultwiseError

        self.sub_title = f"case {self.case_id} (read-only)"
        table = self.query_one(DataTable)
        table.add_column("#", key="n", width=3)
        table.add_column("Step", key="what")
        table.add_column("Input", key="input")
        table.add_column("Result", key="result")
        try:
            self.data = self.bench.store.read(self.case_id)
        except FaultwiseError as exc:
            self.query_one("#viewer-summary", Static).update(Content(str(exc)))
            return
        self.query_one("#viewer-summary", Static).update(summary_text(self.data))
        for event in self.data.get("events") or ():
            key = str(event.get("n"))
            self.events[key] = event
            cells = event_cells(event, self.bench.knowledge)
            table.add_row(*(Text(c) for c in cells), key=key)
        table.focus()

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        chosen = self.events.get(event.row_key.value if event.row_key else None)
        self.query_one("#viewer-detail", Static).update(
            event_detail(chosen, self.bench.knowledge) if chosen else "")

    def action_back(self) -> None:
        self.app.pop_screen()
