"""The first screen: the safety statement, the cases at this bench, and a new case.

It paints before the knowledge is loaded; the case listing is read in a worker.
"""

from __future__ import annotations

from collections.abc import Iterable, Iterator
from pathlib import Path
from typing import TYPE_CHECKING

from textual import work
from textual.app import ComposeResult, SystemCommand
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Header, Static

from faultwise.tui.context import Bench
from faultwise.tui.messages import KnowledgeReady
from faultwise.tui.screens.safety import SAFETY_SHORT

if TYPE_CHECKING:
    from faultwise.cases.store import CaseSummary, DamagedFile, Listing

RECENT_CLOSED = 30


def shown_path(path: Path) -> str:
    """The path relative to the working folder when it lies inside it, else as it is."""
    try:
        return str(path.resolve().relative_to(Path.cwd().resolve())) or "."
    except ValueError:
        return str(path)


def short_labels(labels: Iterable[object]) -> dict[str, str]:
    """Each set label without what every label shown shares at its start: the part up to
    the last ': ' ('Demo bench set: 5-tube table set' -> '5-tube table set'), and the
    words all labels begin with ('Demo 5-tube ...', 'Demo 6-tube ...' -> '5-tube ...').
    The full label stays in the detail line."""
    labels = [str(x or "") for x in labels]
    out = {x: x.rpartition(": ")[2] or x for x in labels}
    distinct = sorted(set(out.values()))
    if len(distinct) > 1:
        words = [v.split(" ") for v in distinct]
        common = 0
        while all(len(w) > common + 1 for w in words) and \
                len({w[common] for w in words}) == 1:
            common += 1
        if common:
            out = {k: " ".join(v.split(" ")[common:]) for k, v in out.items()}
    return out


STATE_WORDS = {"repaired": "repaired", "returned-unrepaired": "unrepaired",
               "waiting-parts": "for parts"}
FIXED_COLUMNS = {"case": 15, "state": 10}
SET_MIN = 12


def column_widths(width: int, set_len: int, symptom_len: int) -> dict[str, int]:
    """Widths for the four columns in a table ``width`` cells wide (scrollbar and one cell
    of padding each side of every column left aside): the symptom in full while the set
    keeps at least SET_MIN cells, the (short) set label the rest, cut only when it must be."""
    room = max(2 * SET_MIN, width - 2 - 2 * 4 - sum(FIXED_COLUMNS.values()))
    symptom = min(symptom_len, room - SET_MIN)
    return {**FIXED_COLUMNS, "set": room - symptom, "symptom": symptom}


def _when(iso: str | None) -> str:
    """``2026-12-01T09:30:00+00:00`` -> ``2026-12-01 09:30``."""
    return (iso or "")[:16].replace("T", " ")


class StartScreen(Screen):
    """Open cases to resume, recent closed cases, damaged files, and a new case."""

    BINDINGS = [
        Binding("n", "new_case", "New case"),
        Binding("enter", "open_selected", "Open", priority=True),
        Binding("v", "view_selected", "View"),
        Binding("r", "review", "Review"),
        Binding("f9", "safety", "Safety"),
        Binding("question_mark", "app.bench_help", "Help"),
        Binding("f5", "refresh", "Refresh", show=False),
    ]

    def __init__(self, bench: Bench) -> None:
        super().__init__(id="start")
        self.bench = bench
        self.listing = None
        self._rows: dict[str, tuple[str, object]] = {}   # row key -> (kind, item)

    def compose(self) -> ComposeResult:
        yield Header()
        with Vertical(id="start-body"):
            yield Static(f"[b]Safety[/b]  {SAFETY_SHORT}  [dim](F9: the full notice)[/dim]",
                         id="safety-strip")
            yield Static("Reading the cases folder...", id="cases-caption", markup=False)
            yield DataTable(id="cases", cursor_type="row", zebra_stripes=True)
            yield Static("", id="case-detail", markup=False)
        yield Footer()

    def on_mount(self) -> None:
        table = self.query_one(DataTable)
        self._columns(table, column_widths(self.app.size.width, 24, 22))
        table.focus()
        self.call_after_refresh(self.refresh_cases)

    def _columns(self, table: DataTable, widths: dict[str, int]) -> None:
        table.clear(columns=True)
        for key, title in (("case", "Case"), ("state", "State"), ("set", "Set"),
                           ("symptom", "Symptom")):
            table.add_column(title, key=key, width=widths[key])

    def on_resize(self) -> None:
        if self.listing is not None:
            self._show_listing(self.listing)

    # listing --------------------------------------------------------------------------

    def refresh_cases(self) -> None:
        self._list_cases()

    @work(thread=True, exit_on_error=False, group="listing", exclusive=True)
    def _list_cases(self) -> None:
        try:
            listing = self.bench.store.list()
        except Exception as exc:  # a folder we cannot read: say so, keep running
            self.app.call_from_thread(self._show_listing_error, exc)
            return
        self.app.call_from_thread(self._show_listing, listing)

    def _show_listing_error(self, exc: Exception) -> None:
        self.query_one("#cases-caption", Static).update(
            f"The cases folder cannot be read: {exc}")

    def _show_listing(self, listing: Listing) -> None:
        self.listing = listing
        table = self.query_one(DataTable)
        chosen = self.selected()
        was = f"{chosen[0]}:{getattr(chosen[1], 'id', None) or chosen[1].path}" if chosen else None
        self._rows.clear()
        closed = sorted(listing.closed, key=lambda s: s.updated or "", reverse=True)
        opened = sorted(listing.open, key=lambda s: s.updated or "", reverse=True)
        shown = opened + closed[:RECENT_CLOSED]
        short = short_labels(s.set_label for s in shown)
        longest = max((len(short[s.set_label]) for s in shown), default=0)
        longest = max([longest] + [len(d.reason) for d in listing.damaged])
        symptoms = max((len(self.symptom_title(s.symptom)) for s in shown), default=0)
        self._columns(table, column_widths(self.size.width or self.app.size.width, longest,
                                           symptoms))
        for s in opened:
            state = "open" if s.locked_by is None else f"in use {s.locked_by.bench}"
            self._add(table, "open", s, (s.id, state, short[s.set_label],
                                         self.symptom_title(s.symptom)))
        for d in listing.damaged:
            self._add(table, "damaged", d, (d.path.stem, "DAMAGED", d.reason, ""))
        for s in closed[:RECENT_CLOSED]:
            state = STATE_WORDS.get(s.outcome or "", s.outcome or "closed")
            self._add(table, "closed", s, (s.id, state, short[s.set_label],
                                           self.symptom_title(s.symptom)))
        n_open, n_closed, n_bad = len(listing.open), len(listing.closed), len(listing.damaged)
        caption = (f"Bench {self.bench.workspace.bench}: {n_open} open, {n_closed} closed"
                   + (f", {n_bad} damaged" if n_bad else "")
                   + f"   in {shown_path(self.bench.workspace.cases_dir)}")
        if not self._rows:
            caption += "\nNo cases yet. Press n to start one."
        self.query_one("#cases-caption", Static).update(caption)
        if was in self._rows:                     # keep the cursor on the same case
            table.move_cursor(row=table.get_row_index(was))
        self._describe_selected()
        self.refresh_bindings()

    def symptom_title(self, symptom_id: str | None) -> str:
        """The symptom's title once the knowledge is loaded (its id until then)."""
        from faultwise.tui.wording import symptom_title

        return symptom_title(self.bench.knowledge, symptom_id) if symptom_id else ""

    def _add(self, table: DataTable, kind: str, item: CaseSummary | DamagedFile,
             cells: Iterable[str | None]) -> None:
        key = f"{kind}:{getattr(item, 'id', None) or item.path}"
        self._rows[key] = (kind, item)
        from rich.text import Text

        from faultwise.tui.wording import printable

        table.add_row(*(Text(printable(c or "")) for c in cells), key=key)

    def selected(self) -> tuple[str, object] | None:
        table = self.query_one(DataTable)
        if not self._rows or table.row_count == 0:
            return None
        try:
            key = table.coordinate_to_cell_key(table.cursor_coordinate).row_key
        except Exception:
            return None
        return self._rows.get(key.value)

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        self._describe_selected()
        self.refresh_bindings()

    def on_data_table_row_selected(self, event: DataTable.RowSelected) -> None:
        event.stop()
        self.action_open_selected()

    def _describe_selected(self) -> None:
        from faultwise.tui.wording import printable

        self.query_one("#case-detail", Static).update(printable(self._detail_text()))

    def _detail_text(self) -> str:
        """One or two lines about the selected row (case text: shown through printable)."""
        chosen = self.selected()
        if chosen is None:
            return ""
        kind, item = chosen
        if kind == "damaged":
            return (f"{item.path}: damaged ({item.reason}). It is left untouched and "
                    "cannot be opened for writing.")
        if kind == "open":
            who = f" Customer: {item.customer}." if item.customer else ""
            return (f"{item.set_label}. Open since {_when(item.opened)}, last step "
                    f"{_when(item.updated)}.{who} Enter resumes the walk.")
        fault = item.fault_title or item.fault or "no conclusion"
        minutes = f"{item.minutes:g}" if item.minutes is not None else "-"
        return (f"{item.set_label}. Closed {_when(item.updated)}: {fault}; {minutes} "
                "min. Enter shows the case read-only.")

    # actions --------------------------------------------------------------------------

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        chosen = self.selected()
        if action == "open_selected":
            return chosen is not None
        if action == "view_selected":
            return chosen is not None and chosen[0] != "damaged"
        return True

    def action_safety(self) -> None:
        self.app.show_safety(first_run=False)

    def action_refresh(self) -> None:
        self.refresh_cases()

    def action_new_case(self) -> None:
        from faultwise.tui.screens.new_case import NewCaseScreen

        self.app.with_knowledge(lambda: self.app.push_screen(NewCaseScreen(self.bench)))

    def action_open_selected(self) -> None:
        chosen = self.selected()
        if chosen is None:
            return
        kind, item = chosen
        if kind == "damaged":
            self.notify(f"{item.path.name} is damaged ({item.reason}); it cannot be opened for "
                        "writing. Repair or move the file by hand.", severity="error",
                        markup=False)
        elif kind == "open":
            self.app.with_knowledge(lambda: self.resume(item.id))
        else:
            self.action_view_selected()

    def action_view_selected(self) -> None:
        chosen = self.selected()
        if chosen is None or chosen[0] == "damaged":
            return
        from faultwise.tui.screens.viewer import CaseViewerScreen

        item = chosen[1]
        self.app.with_knowledge(lambda: self.app.push_screen(CaseViewerScreen(self.bench, item.id)))

    def action_review(self) -> None:
        from faultwise.tui.screens.review import ReviewScreen

        self.app.push_screen(ReviewScreen(self.bench))

    def resume(self, case_id: str) -> None:
        """Open the case for writing (takes the lock) and continue its walk."""
        from faultwise.core.errors import FaultwiseError

        try:
            case, walk = self.bench.open_walk(case_id)
        except FaultwiseError as exc:
            self.notify(str(exc), severity="error", markup=False, timeout=8)
            self.refresh_cases()
            return
        # the walk screen moves on to the conclusion by itself when the case is that far
        self.app.push_screen(self.app.case_screen("walk", case, walk))

    def on_screen_resume(self) -> None:
        self.refresh_cases()

    def on_knowledge_ready(self, message: KnowledgeReady) -> None:
        self.refresh_bindings()
        if self.listing is not None:
            self._show_listing(self.listing)      # symptom titles instead of ids

    def palette_commands(self) -> Iterator[SystemCommand]:
        """The start screen's rare commands, for the command palette."""
        from textual.app import SystemCommand

        yield SystemCommand("Refresh the case list", "Read the cases folder again",
                            self.refresh_cases)
