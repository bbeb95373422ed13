"""The steps of a case so far, with their classification, one row per event (keyed by n).

The "#" column numbers the checks of the case (1, 2, 3...: answered and skipped checks, in
every phase); other events (notes, parts, off-graph findings...) carry no number and a
word in the result column, in italics.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from typing import TYPE_CHECKING

from rich.style import Style
from rich.text import Text
from textual.geometry import Size
from textual.scroll_view import ScrollView
from textual.strip import Strip

from faultwise.tui.wording import node_title, printable

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge
    from faultwise.walk.results import Step

MARKS = {True: "✓", False: "!"}
CHECK_EVENTS = ("answer", "skip")


def check_numbers(events: Iterable[Mapping]) -> dict[int, int]:
    """Event n -> the check's step number within the case (answers and skips, 1, 2, 3...)."""
    numbers: dict[int, int] = {}
    for event in events:
        if event.get("type") in CHECK_EVENTS:
            numbers[int(event.get("n", 0))] = len(numbers) + 1
    return numbers


def event_rows(events: Iterable[Mapping], steps: Iterable[Step], knowledge: Knowledge | None = None
               ) -> list[tuple[str, tuple[str, str, str, str]]]:
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


#: (title, width, justify); width 0 takes what the others leave
COLUMNS = (("#", 3, "right"), ("Result", 10, "left"), ("Input", 12, "left"), ("Step", 0, "left"))
PAD = 1         # a blank column each side of a cell


def cell_texts(cells: tuple[str, str, str, str]) -> tuple[Text, Text, Text, Text]:
    """The four cells of a row as shown: a check refused ('!') in bold, other events in
    italics, every file text made printable."""
    number, result, reading, what = cells
    marked = Text(printable(result))
    marked.stylize("italic" if not number else ("bold" if result.startswith("!") else ""))
    return (Text(number), marked, Text(printable(reading)), Text(printable(what)))


class History(ScrollView, can_focus=True):
    """Read-only table of the case's events, the newest at the bottom, its header fixed.

    ``show(events, steps, knowledge)`` brings it up to date. Drawn with Textual's line API:
    a row is rendered once, when it is added (again only if the width changes), so a step
    repaints the row it adds and not the whole table. ``rows`` maps each row's key (the
    event's n) to its cells; ``get_row(key)`` gives them.
    """

    COMPONENT_CLASSES = {"history--header", "history--even-row"}

    DEFAULT_CSS = """
    History {
        background: $surface;
        color: $foreground;
        height: 1fr;
        overflow-x: hidden;
        & > .history--header { text-style: bold; background: $panel; color: $foreground; }
        & > .history--even-row { background: $surface-lighten-1 50%; }
        &:dark > .history--even-row { background: $surface-darken-1 40%; }
    }
    """

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self._given: list[tuple[str, tuple[str, str, str, str]]] = []   # event_rows shown
        self.rows: dict[str, tuple[Text, Text, Text, Text]] = {}
        self._order: list[str] = []
        self._strips: dict[tuple[int, int], Strip] = {}      # (row index, width) -> line

    @property
    def row_count(self) -> int:
        return len(self._order)

    def get_row(self, key: str) -> tuple[Text, Text, Text, Text]:
        """The cells of the row for event ``key``."""
        return self.rows[key]

    def show(self, events: Iterable[Mapping], steps: Iterable[Step],
             knowledge: Knowledge | None = None) -> None:
        """Show the rows for ``events``: the new ones are added at the end (an undo, which
        takes rows away, refills the table) and the newest is scrolled into view."""
        rows = event_rows(events, steps, knowledge)
        if rows == self._given:
            return
        kept = len(self._given)
        if rows[:kept] != self._given:
            self.rows.clear()
            self._order.clear()
            self._strips.clear()
            kept = 0
        for key, cells in rows[kept:]:
            self.rows[key] = cell_texts(cells)
            self._order.append(key)
        self._given = rows
        self.virtual_size = Size(self.size.width, len(self._order) + 1)
        # now, in this frame (force: the scrollbar that allows it comes with the next layout)
        self.scroll_end(animate=False, immediate=True, force=True)
        self.refresh()

    def on_resize(self) -> None:
        self.virtual_size = Size(self.size.width, len(self._order) + 1)
        self.scroll_end(animate=False)

    def notify_style_update(self) -> None:
        super().notify_style_update()
        self._strips.clear()                 # colours changed: render the rows again

    def render_line(self, y: int) -> Strip:
        width = self.size.width
        if y == 0:
            return self._line(-1, width)
        index = int(self.scroll_offset.y) + y - 1
        if index >= len(self._order):
            return Strip.blank(width, self.rich_style)
        return self._line(index, width)

    def _line(self, index: int, width: int) -> Strip:
        """Row ``index`` (-1: the header) rendered at ``width``, cached."""
        strip = self._strips.get((index, width))
        if strip is None:
            if index < 0:          # titles to the left, as over any table
                cells = tuple(Text(title, justify="left") for title, _, _ in COLUMNS)
                style = self.get_component_rich_style("history--header")
            else:
                cells = self.rows[self._order[index]]
                style = (self.get_component_rich_style("history--even-row") if index % 2 == 0
                         else Style())
            strip = self._render_row(cells, width, self.rich_style + style)
            self._strips[(index, width)] = strip
        return strip

    def _render_row(self, cells: tuple[Text, ...], width: int, style: Style) -> Strip:
        fixed = sum(w + 2 * PAD for _, w, _ in COLUMNS if w)
        line = Text(no_wrap=True, end="")
        for cell, (_, w, justify) in zip(cells, COLUMNS):
            w = w or max(1, width - fixed - 2 * PAD)
            text = cell.copy()
            text.plain = text.plain.replace("\n", " ")
            text.truncate(w, overflow="crop")
            text.align(text.justify or justify, w)
            line.append(" " * PAD)
            line.append_text(text)
            line.append(" " * PAD)
        segments = line.render(self.app.console)
        return Strip(segments).crop_extend(0, width, None).apply_style(style)
