"""Why this check now: the p/c ranking behind it (walk.explain()).

The title and the legend are docked; the sentence and the table of suspects scroll between
them (PgUp/PgDn), so the dialog fits 80x24 however many suspects there are. Node ids in the
walk's sentence are shown as titles.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.content import Content
from textual.screen import ModalScreen
from textual.widgets import DataTable, Static

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge
    from faultwise.walk.results import Explanation

# Cells of the table's columns other than the suspect's label, and their count.
NUMBER_COLUMNS = (1, 4, 4, 6, 5)          # mark, p, min, p/c, cases


class ExplainScreen(ModalScreen[None]):
    """Shows an Explanation: the sentence, and every open suspect with p, cost, p/c, cases."""

    BINDINGS = [
        Binding("escape,f2,enter", "close", "Close", priority=True),
        Binding("pagedown", "scroll_text(6)", "More", show=False),
        Binding("pageup", "scroll_text(-6)", "Back", show=False),
    ]

    def __init__(self, explanation: Explanation, knowledge: Knowledge) -> None:
        super().__init__(id="explain")
        self.explanation = explanation
        self.knowledge = knowledge

    def _title_of(self, node_id: str) -> str:
        node = self.knowledge.nodes.get(node_id)
        return getattr(node, "title", node_id)

    def label_width(self) -> int:
        """Cells for the suspect's label so p, min, p/c and cases stay in the dialog."""
        box = min(76, int(self.app.size.width * 0.95)) - 2 - 4       # border and padding
        others = sum(NUMBER_COLUMNS) + 2 * (len(NUMBER_COLUMNS) + 1)
        return max(16, box - others - 2)                              # and a scrollbar

    def compose(self) -> ComposeResult:
        from rich.text import Text

        from faultwise.tui.wording import readable

        ex = self.explanation
        with Vertical(classes="modal-box", id="explain-box"):
            yield Static("Why this check now", classes="modal-title", id="explain-title")
            yield Static("[dim]p: the chance this check finds the fault, weighed by the "
                         "answers so far (a fault it would read as normal counts a tenth); "
                         "min: its cost; p/c: the order; cases: closed cases that found a "
                         "fault under it. Escape closes.[/dim]", id="explain-legend")
            with VerticalScroll(id="explain-scroll", can_focus=False):
                yield Static(Content(readable(ex.text, self.knowledge)
                                     or "No ranking applies here."), id="explain-text")
                if ex.came_from:
                    node, outcome = ex.came_from
                    yield Static(Content.from_markup("[dim]Came from:[/dim] $n gave '$o'",
                                                     n=self._title_of(node), o=outcome))
                if ex.ranked:
                    table = DataTable(id="explain-table", cursor_type="none",
                                      show_cursor=False)
                    table.can_focus = False        # keeps the page at its top on opening
                    table.add_column("", key="mark", width=NUMBER_COLUMNS[0])
                    table.add_column("Suspect", key="suspect", width=self.label_width())
                    for key, name, width in zip(("p", "min", "ratio", "cases"),
                                                ("p", "min", "p/c", "cases"),
                                                NUMBER_COLUMNS[1:]):
                        table.add_column(name, key=key, width=width)
                    chosen = getattr(ex.chosen, "target", None)
                    for r in ex.ranked:
                        label = r.investigation.label or self._title_of(r.target)
                        mark = "▶" if r.target == chosen else "·"
                        table.add_row(mark, Text(label), f"{r.p:.2f}", f"{r.cost:g}",
                                      f"{r.ratio:.3g}", str(sum(r.counts.values())),
                                      key=r.target)
                    yield table
                    passed = [r for r in ex.ranked if r.target != chosen]
                    if passed:
                        yield Static(Content(
                            "Passed over for now (lower p/c): "
                            + "; ".join(r.investigation.label or self._title_of(r.target)
                                        for r in passed)))
                if ex.cleared:
                    yield Static(Content("Cleared already: " + "; ".join(
                        self._title_of(t) for t in ex.cleared)))

    def action_close(self) -> None:
        self.dismiss(None)

    def action_scroll_text(self, lines: int) -> None:
        self.query_one("#explain-scroll", VerticalScroll).scroll_relative(y=lines,
                                                                          animate=False)
