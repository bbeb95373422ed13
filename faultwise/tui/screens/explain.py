"""Why this check now: the p/c ranking behind it (walk.explain())."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.content import Content
from textual.screen import ModalScreen
from textual.widgets import DataTable, Static


class ExplainScreen(ModalScreen[None]):
    """Shows an Explanation: the sentence, and every open suspect with p, cost, p/c, cases."""

    BINDINGS = [Binding("escape,f2,enter", "close", "Close", priority=True)]

    def __init__(self, explanation, knowledge) -> None:
        super().__init__(id="explain")
        self.explanation = explanation
        self.knowledge = knowledge

    def _title_of(self, node_id: str) -> str:
        node = self.knowledge.nodes.get(node_id)
        return getattr(node, "title", node_id)

    def compose(self) -> ComposeResult:
        ex = self.explanation
        with Vertical(classes="modal-box", id="explain-box"):
            yield Static("Why this check now", classes="modal-title")
            from faultwise.tui.wording import readable

            yield Static(Content(readable(ex.text, self.knowledge) or "No ranking applies here."),
                         id="explain-text")
            if ex.came_from:
                node, outcome = ex.came_from
                yield Static(Content.from_markup("[dim]Came from:[/dim] $n gave '$o'",
                                                 n=self._title_of(node), o=outcome))
            if ex.ranked:
                table = DataTable(id="explain-table", cursor_type="none", show_cursor=False)
                table.add_columns("", "Suspect", "p", "min", "p/c", "cases")
                chosen = getattr(ex.chosen, "target", None)
                for r in ex.ranked:
                    from rich.text import Text

                    label = r.investigation.label or self._title_of(r.target)
                    mark = "▶" if r.target == chosen else "·"
                    table.add_row(mark, Text(label), f"{r.p:.2f}", f"{r.cost:g}",
                                  f"{r.ratio:.3g}", str(sum(r.counts.values())), key=r.target)
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
            yield Static("[dim]p: share of this complaint's faults under the suspect; "
                         "min: its cost; p/c: the order; cases: closed cases that found a "
                         "fault under it. Escape closes.[/dim]", id="explain-legend")

    def action_close(self) -> None:
        self.dismiss(None)
