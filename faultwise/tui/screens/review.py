"""The shop review screen: the review of the closed cases, with terminal bar charts.

``ReviewScreen(workspace)`` takes a :class:`faultwise.core.workspace.Workspace` or the bench
context (anything with ``.workspace`` and, once loaded, ``.knowledge``). The review runs in
a thread worker (``exit_on_error=False``) that reports progress while it scans the cases
folder; the screen then shows the pairs, the selected pair's fault shares as bars, skipped
checks, off-graph findings, faults never reached, cases back after a repair and minutes
per job by month. Every piece of case text is shown as plain text, never as markup.
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import TYPE_CHECKING

from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Header, ProgressBar, Static

from faultwise.report.job import num, pct
from faultwise.tui.wording import printable

if TYPE_CHECKING:
    from faultwise.core.workspace import Workspace
    from faultwise.graph.knowledge import Knowledge
    from faultwise.shop.review import MonthMinutes, PairReview, Review


def cell(text: object) -> Text:
    """A table cell of case or knowledge text: literal, control characters made visible."""
    return Text(printable(text))


_EIGHTHS = " \u258f\u258e\u258d\u258c\u258b\u258a\u2589"
_FULL = "\u2588"


def block_bar(fraction: float, width: int) -> str:
    """A bar of ``fraction`` x ``width`` cells in unicode blocks, to an eighth of a cell."""
    fraction = max(0.0, min(1.0, fraction))
    eighths = int(round(fraction * width * 8))
    full, part = divmod(eighths, 8)
    text = _FULL * full + (_EIGHTHS[part] if part else "")
    return text.ljust(width)


def _clip(text: str, width: int) -> str:
    """``text`` cut to ``width`` cells with an ellipsis."""
    return text if len(text) <= width else text[: max(1, width - 1)] + "\u2026"


def share_chart(pair: PairReview, width: int = 30, label_width: int = 38) -> str:
    """The pair's smoothed fault shares as bars, one line per fault (raw count after)."""
    lines = []
    for f in pair.faults:
        share = f.smoothed if f.smoothed is not None else f.raw
        label = _clip(f.title, label_width)
        lines.append(f"{label:<{label_width}} {block_bar(share, width)} {pct(share):>4}  "
                     f"({f.count})")
    return "\n".join(lines) or "No faults for this pair."


def chart_widths(screen_width: int) -> tuple[int, int]:
    """(bar, label) widths so that a share line fits on one row of the screen: the line is
    label + bar + 14 cells (spaces, percentage, count), inside padding and a scrollbar."""
    room = screen_width - 2 - 2 - 1
    label = max(16, min(38, int(room * 0.45)))
    return max(8, room - label - 14), label


def month_chart(months: Iterable[MonthMinutes], width: int = 40) -> str:
    """Mean minutes per job by month, as bars."""
    peak = max((m.mean_minutes for m in months), default=0.0) or 1.0
    return "\n".join(f"{m.month}  {block_bar(m.mean_minutes / peak, width)} "
                     f"{m.mean_minutes:5.1f} min  ({m.jobs} jobs)" for m in months) \
        or "No closed jobs with recorded minutes."


class ReviewScreen(Screen):
    """Shop review of the closed cases (read only)."""

    BINDINGS = [
        Binding("escape", "app.pop_screen", "Back"),
        Binding("f5", "rerun", "Review again"),
    ]

    DEFAULT_CSS = """
    ReviewScreen #review-body { padding: 0 1; }
    ReviewScreen .section { margin-top: 1; text-style: bold; }
    ReviewScreen DataTable { max-height: 14; }
    ReviewScreen #review-progress { margin: 0 0 1 0; }
    """

    def __init__(self, workspace: Workspace, *, knowledge: Knowledge | None = None,
                 name: str | None = None) -> None:
        super().__init__(name=name, id="review")
        self.context = workspace
        self.workspace = getattr(workspace, "workspace", workspace)
        self._knowledge = knowledge
        self.review = None
        self._pairs: dict[str, object] = {}

    def compose(self) -> ComposeResult:
        yield Header()
        with VerticalScroll(id="review-body"):
            yield Static("Reading the cases folder...", id="review-status", markup=False)
            yield ProgressBar(id="review-progress", show_eta=False)
            yield Static("Symptom and family (cursor keys: details below)", classes="section")
            yield DataTable(id="review-pairs", cursor_type="row", zebra_stripes=True)
            yield Static("", id="review-shares", markup=False)
            yield DataTable(id="review-faults", cursor_type="row")
            yield Static("", id="review-orders", markup=False)
            yield Static("Checks most often skipped", classes="section")
            yield DataTable(id="review-skipped", cursor_type="row")
            yield Static("Off-graph findings (candidate new faults)", classes="section")
            yield DataTable(id="review-findings", cursor_type="row")
            yield Static("Faults never reached", classes="section")
            yield DataTable(id="review-unreached", cursor_type="row")
            yield Static("Cases back after a repair", classes="section")
            yield DataTable(id="review-reopened", cursor_type="row")
            yield Static("Minutes per job by month", classes="section")
            yield Static("", id="review-months", markup=False)
        yield Footer()

    def on_mount(self) -> None:
        self.title = "Shop review"
        self.query_one("#review-pairs", DataTable).add_columns(
            "Symptom", "Family", "Cases", "Checks", "Minutes", "Now min", "Data min", "Saves")
        faults = self.query_one("#review-faults", DataTable)
        # The title gets what the numbers leave, so Cases..Smoothed stay on screen.
        faults.add_column("Fault", width=self.title_width(5 + 4 + 5 + 8))
        faults.add_columns("Cases", "Raw", "Prior", "Smoothed")
        self.query_one("#review-skipped", DataTable).add_columns("Check", "Skipped", "Reasons")
        self.query_one("#review-findings", DataTable).add_columns("Finding", "Cases", "Case ids")
        self.query_one("#review-unreached", DataTable).add_columns("Fault", "Title", "Stage")
        self.query_one("#review-reopened", DataTable).add_columns("Case", "After", "Rule", "Days")
        self.query_one("#review-pairs", DataTable).focus()
        self.action_rerun()

    def title_width(self, others: int, columns: int = 5) -> int:
        """Cells left for a title column beside ``others`` cells of the other columns
        (each column has two cells of padding; the page has padding and a scrollbar)."""
        return max(20, self.app.size.width - others - 2 * columns - 2 - 2 - 2)

    def _symptom_title(self, symptom_id: str) -> str:
        from faultwise.tui.wording import symptom_title

        knowledge = self._knowledge or getattr(self.context, "knowledge", None)
        return symptom_title(knowledge, symptom_id)

    def _readable(self, text: str) -> str:
        from faultwise.tui.wording import readable

        return readable(text, self._knowledge or getattr(self.context, "knowledge", None))

    # the worker ------------------------------------------------------------------------

    def action_rerun(self) -> None:
        self.query_one("#review-status", Static).update("Reading the cases folder...")
        self.query_one(ProgressBar).update(total=None, progress=0)
        self._run_review()

    @work(thread=True, exit_on_error=False, group="review", exclusive=True)
    def _run_review(self) -> None:
        from faultwise.shop.review import review_folder

        try:
            knowledge = self._knowledge or getattr(self.context, "knowledge", None)
            if knowledge is None:
                from faultwise.graph.knowledge import load_knowledge

                knowledge = load_knowledge(self.workspace.knowledge_dir)
            review = review_folder(self.workspace.cases_dir, knowledge,
                                   progress=self._progress_from_thread)
        except Exception as exc:  # shown on the screen; the bench program keeps running
            self.app.call_from_thread(self._show_error, exc)
            return
        self.app.call_from_thread(self._show_review, review)

    def _progress_from_thread(self, done: int, total: int) -> None:
        self.app.call_from_thread(self._set_progress, done, total)

    def _set_progress(self, done: int, total: int) -> None:
        self.query_one(ProgressBar).update(total=max(total, 1), progress=done)

    def _show_error(self, exc: Exception) -> None:
        self.query_one("#review-status", Static).update(f"The review could not be made: {exc}")
        self.notify(str(exc), title="Review", severity="error", markup=False)

    # showing ---------------------------------------------------------------------------

    def _show_review(self, review: Review) -> None:
        self.review = review
        status = f"{review.cases} closed case(s) reviewed"
        if review.damaged:
            status += f"; {len(review.damaged)} damaged file(s) left unchanged: " + \
                ", ".join(f"{d.file} ({d.reason})" for d in review.damaged[:5])
        self.query_one("#review-status", Static).update(printable(status))
        bar = self.query_one(ProgressBar)
        bar.update(total=1, progress=1)
        pairs = self.query_one("#review-pairs", DataTable)
        pairs.clear()
        self._pairs = {}
        for p in review.pairs:
            key = f"{p.symptom}|{p.family}"
            self._pairs[key] = p
            pairs.add_row(cell(self._symptom_title(p.symptom)), cell(p.family), str(p.cases),
                          num(p.mean_checks),
                          num(p.mean_minutes), num(p.current_minutes), num(p.data_minutes),
                          num(p.saving_minutes), key=key)
        self._show_pair(review.pairs[0] if review.pairs else None)
        skipped = self.query_one("#review-skipped", DataTable)
        skipped.clear()
        for c in review.skipped:
            skipped.add_row(cell(c.title or c.check), str(c.count),
                            cell("; ".join(f"{r} ({n})" for r, n in c.reasons)), key=c.check)
        findings = self.query_one("#review-findings", DataTable)
        findings.clear()
        for i, g in enumerate(review.off_graph):
            findings.add_row(cell(g.finding), str(len(g.cases)), cell(", ".join(g.cases)),
                             key=f"group-{i}")
        unreached = self.query_one("#review-unreached", DataTable)
        unreached.clear()
        for f in review.never_reached:
            unreached.add_row(cell(f.fault), cell(f.title), f.stage, key=f.fault)
        reopened = self.query_one("#review-reopened", DataTable)
        reopened.clear()
        for r in review.reopened:
            reopened.add_row(cell(r.case), cell(r.after), r.rule,
                             "-" if r.days is None else f"{r.days:.0f}", key=r.case)
        self.query_one("#review-months", Static).update(month_chart(review.months))

    def _show_pair(self, pair: PairReview) -> None:
        shares = self.query_one("#review-shares", Static)
        faults = self.query_one("#review-faults", DataTable)
        orders = self.query_one("#review-orders", Static)
        faults.clear()
        if pair is None:
            shares.update("No closed cases.")
            orders.update("")
            return
        bar, label = chart_widths(self.app.size.width)
        title = self._symptom_title(pair.symptom)
        named = f" ({title})" if title and title != pair.symptom else ""
        shares.update(printable(f"{pair.symptom} / {pair.family}{named}: fault shares, "
                                "smoothed (raw count)\n" + share_chart(pair, bar, label)))
        for f in pair.faults:
            faults.add_row(cell(f.title), str(f.count), pct(f.raw), pct(f.prior),
                           pct(f.smoothed), key=f.fault)
        lines = []
        if pair.saving_minutes is not None:
            lines.append(f"Expected minutes: current order {num(pair.current_minutes)}, data "
                         f"order {num(pair.data_minutes)}: saves {num(pair.saving_minutes)} "
                         "min per job")
        for o in pair.orders:
            if o.current != o.data:
                lines.append(f"{o.title}: now {self._readable(' > '.join(o.current))}")
                lines.append(f"{' ' * len(o.title)}  data {self._readable(' > '.join(o.data))}")
        for c in pair.never_varied:
            lines.append(f"Never varied: {c.title or c.check} always '{c.outcome}' in "
                         f"{c.cases} case(s)")
        orders.update(printable("\n".join(lines)))

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        if event.data_table.id == "review-pairs" and event.row_key is not None:
            pair = self._pairs.get(event.row_key.value)
            if pair is not None:
                self._show_pair(pair)
