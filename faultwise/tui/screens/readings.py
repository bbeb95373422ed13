"""The readings sheet: every expectation for the set, grouped by stage, basis on selection."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.content import Content
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Header, Static

from faultwise.tui.widgets.check_panel import reading_text
from faultwise.tui.wording import printable

NUMBER_WIDTH = 9
SCROLLBAR_WIDTH = 2
STAGE_ORDER = ("supply", "audio", "detector", "if", "oscillator", "antenna")
STAGE_TITLES = {"supply": "Supply", "audio": "Audio", "detector": "Detector", "if": "IF",
                "oscillator": "Oscillator and mixer", "antenna": "Antenna and tuning"}


def grouped(expectations: dict) -> list[tuple[str, list]]:
    """[(stage, [Expected, ...]), ...] by stage, in the order expect() gives within one."""
    by_stage: dict[str, list] = {}
    for exp in expectations.values():
        by_stage.setdefault(exp.stage, []).append(exp)
    order = list(STAGE_ORDER) + sorted(s for s in by_stage if s not in STAGE_ORDER)
    return [(s, by_stage[s]) for s in order if s in by_stage]


def clip(text: str, width: int) -> str:
    """``text`` cut to ``width`` cells with an ellipsis."""
    return text if len(text) <= width else text[: max(1, width - 1)] + "…"


class ReadingsScreen(Screen):
    """Expected readings of one set (a DataTable addressed by expectation name)."""

    BINDINGS = [Binding("escape,f6", "back", "Back", priority=True)]

    def __init__(self, label: str, expectations: dict, *, selected: str | None = None,
                 chart: tuple[str, ...] = ()) -> None:
        super().__init__(id="readings")
        self.label = label
        self.chart = tuple(chart)      # voltage chart lines of the stage under test
        self.expectations = dict(expectations)
        self.first = selected          # the current check's reading, selected on opening

    def compose(self) -> ComposeResult:
        yield Header()
        yield Static(Content.from_markup("[b]Readings sheet[/b]  $label  [dim](≈ typical)[/dim]",
                                         label=printable(self.label)), id="readings-caption")
        if self.chart:
            yield Static(Content.from_markup("[b]Chart, this stage[/b] [dim](* typical)[/dim]\n$rows",
                                             rows=printable("\n".join(self.chart))),
                         id="readings-chart")
        yield DataTable(id="readings-table", cursor_type="row", zebra_stripes=True)
        yield Static("", id="readings-basis")
        yield Footer()

    def on_mount(self) -> None:
        from rich.text import Text

        table = self.query_one(DataTable)
        # Every column on screen: three numbers, the typical mark, two cells of padding
        # each, and room for the vertical scrollbar (a long sheet always has one).
        title_width = max(20, self.app.size.width - 3 * (NUMBER_WIDTH + 2) - (1 + 2) - 2
                          - SCROLLBAR_WIDTH)
        table.add_column("Reading", key="title", width=title_width)
        table.add_column("Low", key="low", width=NUMBER_WIDTH)
        table.add_column("Nominal", key="nominal", width=NUMBER_WIDTH)
        table.add_column("High", key="high", width=NUMBER_WIDTH)
        table.add_column("", key="typical", width=1)
        for stage, items in grouped(self.expectations):
            table.add_row(Text(STAGE_TITLES.get(stage, stage).upper(), style="bold"), "", "",
                          "", "", key=f"stage:{stage}")
            for e in items:
                title = clip("  " + (e.title or e.name), title_width)
                table.add_row(Text(title), reading_text(e.low, e.unit),
                              reading_text(e.nominal, e.unit), reading_text(e.high, e.unit),
                              "≈" if e.typical else "", key=e.name)
        table.focus()
        if self.first in self.expectations:
            table.move_cursor(row=table.get_row_index(self.first))
        elif len(self.expectations):
            table.move_cursor(row=1)
        else:
            self.query_one("#readings-basis", Static).update(
                "No expectations could be computed for this set.")

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        key = event.row_key.value if event.row_key is not None else None
        exp = self.expectations.get(key)
        box = self.query_one("#readings-basis", Static)
        if exp is None:
            box.update(Content(f"Stage {key.split(':', 1)[-1]}" if key else ""))
            return
        typical = ("\n≈ rests on typical values the profile did not give"
                   if exp.typical else "")
        box.update(Content.from_markup("[b]$title[/b]  [dim]$name ($unit)[/dim]\n$basis$typical",
                                       title=exp.title or exp.name, name=exp.name,
                                       unit=exp.unit or "-", basis=exp.basis or "-",
                                       typical=typical))

    def selected_name(self) -> str | None:
        table = self.query_one(DataTable)
        key = table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value
        return key if key in self.expectations else None

    def action_back(self) -> None:
        self.app.pop_screen()
