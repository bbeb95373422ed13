"""A new case: the set (library search or a family template), the complaint and its
symptom, the customer reference and apprentice mode.

Up and Down move through the list under the field being typed in; Enter takes the
highlighted entry and moves on; F10 starts the walk.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING
from pathlib import Path

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.content import Content
from textual.screen import Screen
from textual.widgets import Checkbox, Footer, Header, Input, OptionList, Static
from textual.widgets.option_list import Option

from faultwise.tui.context import Bench
from faultwise.tui.widgets.bench_input import BenchInput
from faultwise.tui.wording import internal_error, printable

if TYPE_CHECKING:
    from faultwise.profile.model import Profile


@dataclass(frozen=True)
class LibrarySet:
    """One file of the set library: its profile, or why it cannot be used."""

    path: Path
    label: str
    profile: object | None
    error: str | None = None

    @property
    def search_text(self) -> str:
        return f"{self.label} {self.path.stem.replace('-', ' ')}"


def tube_table_dir(bench: Bench) -> Path | None:
    """The knowledge folder when it carries its own tube table, else None (the bundled one)."""
    from faultwise.profile.tubes import workspace_tube_dir

    return workspace_tube_dir(bench.workspace.knowledge_dir)


def read_library(bench: Bench) -> list[LibrarySet]:
    """Every ``<knowledge>/sets/*.yaml``, loaded and validated (slow: run in a worker)."""
    from faultwise.core.errors import FaultwiseError
    from faultwise.profile.load import load_profile

    out = []
    folder = bench.workspace.sets_dir
    for path in sorted(folder.glob("*.yaml")) if folder.is_dir() else []:
        try:
            profile = load_profile(path, knowledge_dir=tube_table_dir(bench))
        except FaultwiseError as exc:
            out.append(LibrarySet(path, path.stem, None, str(exc)))
            continue
        out.append(LibrarySet(path, profile.label, profile))
    return out


def rank_sets(query: str, sets: list[LibrarySet]) -> list[LibrarySet]:
    """Library sets best first for a search text (rapidfuzz WRatio); all, by label, if empty."""
    if not query.strip():
        return sorted(sets, key=lambda s: s.label.casefold())
    from rapidfuzz import fuzz, process, utils

    texts = [s.search_text for s in sets]
    found = process.extract(query, texts, scorer=fuzz.WRatio,
                            processor=utils.default_process, limit=None, score_cutoff=40)
    # A word typed in full that a set's text holds as a whole word comes first: WRatio
    # scores 'portable' against '... table set' as high as against '... portable' (the
    # partial match), and a technician who types a word means that word. Then WRatio; its
    # ties ('6.3 V console' scored the 230 V set as high as the 6.3 V console) go to the
    # whole words in common, then the file order.
    typed = utils.default_process(query).split()
    whole = {index: sum(1 for word in typed
                        if word in utils.default_process(texts[index]).split())
             for _, _, index in found}
    tie = {index: fuzz.token_set_ratio(query, texts[index], processor=utils.default_process)
           for _, _, index in found}
    found = sorted(found, key=lambda hit: (-whole[hit[2]], -hit[1], -tie[hit[2]], hit[2]))
    return [sets[index] for _, _, index in found]


def apprentice_label(on: bool) -> str:
    """The checkbox says its state in words (its mark alone differs only by colour)."""
    return ("Apprentice mode: ON, guidance open at every step (F8 turns it off)" if on else
            "Apprentice mode: off (F8 turns it on: guidance open at every step)")


class NewCaseScreen(Screen):
    """Collects what a case needs, creates it, and hands over to the walk."""

    BINDINGS = [
        Binding("f10", "start", "Start walk", priority=True),
        Binding("f2", "template", "Template", priority=True),
        Binding("f8", "apprentice", "Apprentice", priority=True),
        Binding("down", "move(1)", "Next", show=False),
        Binding("up", "move(-1)", "Previous", show=False),
        Binding("escape", "back", "Back", priority=True),
    ]

    def __init__(self, bench: Bench) -> None:
        super().__init__(id="new-case")
        self.bench = bench
        self.library: list[LibrarySet] = []
        self.shown_sets: list[LibrarySet] = []
        self.chosen_set: LibrarySet | None = None
        self.shown_symptoms: list[str] = []
        self.chosen_symptom: str | None = None

    def compose(self) -> ComposeResult:
        yield Header()
        with Vertical(id="new-body"):
            with Horizontal(classes="field-row"):
                yield Static("Set", classes="field-name")
                yield BenchInput(id="set-search", compact=True,
                                 placeholder="search the set library (F2: fill a template instead)")
            yield OptionList(id="set-list", compact=True)
            yield Static("", id="set-chosen", classes="field-note")
            with Horizontal(classes="field-row"):
                yield Static("Complaint", classes="field-name")
                yield BenchInput(id="complaint", compact=True,
                                 placeholder="what the customer says, e.g. hums loudly")
            yield OptionList(id="symptom-list", compact=True)
            yield Static("", id="symptom-chosen", classes="field-note")
            with Horizontal(classes="field-row"):
                yield Static("Customer", classes="field-name")
                yield BenchInput(id="customer", compact=True,
                                 placeholder="ticket or name (optional)")
            yield Checkbox(apprentice_label(False), id="apprentice", compact=True)
            yield Static("", id="new-error", classes="field-error")
        yield Footer()

    def on_mount(self) -> None:
        self.sub_title = "new case"
        for list_id in ("#set-list", "#symptom-list"):
            self.query_one(list_id, OptionList).can_focus = False
        self.query_one("#set-search", Input).focus()
        self.query_one("#set-chosen", Static).update("Reading the set library...")
        self._load_library()
        self._rank_symptoms("")

    @work(thread=True, exit_on_error=False, group="library")
    def _load_library(self) -> None:
        try:
            library = read_library(self.bench)
        except Exception as exc:  # an unreadable folder: say so, the template still works
            self.app.call_from_thread(self.query_one("#set-chosen", Static).update,
                                      Content(f"The set library cannot be read ({exc}); "
                                              "press F2 to fill a family template."))
            return
        self.app.call_from_thread(self._library_ready, library)

    def _library_ready(self, library: list[LibrarySet]) -> None:
        self.library = library
        note = self.query_one("#set-chosen", Static)
        if not library:
            note.update(Content(f"No set profiles in {self.bench.workspace.sets_dir}; press F2 "
                                "to fill a family template."))
        elif self.chosen_set is None:
            note.update(Content(f"{len(library)} sets in the library. Type to search, Enter "
                                "takes the highlighted one."))
        self._rank_sets(self.query_one("#set-search", Input).value)

    # ------------------------------------------------------------------ lists

    def _rank_sets(self, query: str) -> None:
        self.shown_sets = rank_sets(query, self.library)
        box = self.query_one("#set-list", OptionList)
        box.clear_options()
        # One line per set so four fit: the file name shows once the set is taken.
        box.add_options([Option(Content.from_markup("$l  [dim]$f[/dim]", l=printable(s.label),
                                                    f="" if s.profile else "cannot be read"),
                                id=str(i))
                         for i, s in enumerate(self.shown_sets)])
        if self.shown_sets:
            box.highlighted = 0

    def _rank_symptoms(self, text: str) -> None:
        from faultwise.graph.match import match

        knowledge = self.bench.knowledge
        family = getattr(self.chosen_set.profile, "family", None) if self.chosen_set else None
        ranked = [m for m in match(text, knowledge)
                  if family is None or family in knowledge.symptoms[m.id].families]
        self.shown_symptoms = [m.id for m in ranked]
        box = self.query_one("#symptom-list", OptionList)
        box.clear_options()
        box.add_options([Option(Content.from_markup("$t  [dim]$i[/dim]", t=m.title, i=m.id),
                                id=m.id) for m in ranked])
        if ranked:
            box.highlighted = 0

    @on(Input.Changed, "#set-search")
    def set_search_changed(self, event: Input.Changed) -> None:
        self._rank_sets(event.value)

    @on(Input.Changed, "#complaint")
    def complaint_changed(self, event: Input.Changed) -> None:
        self._rank_symptoms(event.value)

    def action_move(self, delta: int) -> None:
        focused = self.focused
        list_id = {"set-search": "#set-list", "complaint": "#symptom-list"}.get(
            getattr(focused, "id", ""))
        if list_id is None:
            self.focus_next() if delta > 0 else self.focus_previous()
            return
        box = self.query_one(list_id, OptionList)
        if box.option_count:
            current = box.highlighted if box.highlighted is not None else -delta
            box.highlighted = max(0, min(box.option_count - 1, current + delta))

    # ------------------------------------------------------------------ choosing

    @on(Input.Submitted, "#set-search")
    def set_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        box = self.query_one("#set-list", OptionList)
        if box.highlighted is None or not self.shown_sets:
            self._error("No set matches; change the search or press F2 for a template.")
            return
        self._choose_set(self.shown_sets[box.highlighted])

    @on(OptionList.OptionSelected, "#set-list")
    def set_clicked(self, event: OptionList.OptionSelected) -> None:
        self._choose_set(self.shown_sets[int(event.option.id)])

    def _choose_set(self, chosen: LibrarySet) -> None:
        note = self.query_one("#set-chosen", Static)
        if chosen.profile is None:
            note.update(Content(f"{chosen.path.name} cannot be used: {chosen.error}"))
            return
        self.chosen_set = chosen
        self._show_chosen_set()
        self._error(None)
        self._rank_symptoms(self.query_one("#complaint", Input).value)
        self.query_one("#complaint", Input).focus()

    def _show_chosen_set(self) -> None:
        s = self.chosen_set
        self.query_one("#set-chosen", Static).update(Content.from_markup(
            "[b]✓[/b] $l  [dim]($f, $src)[/dim]", l=printable(s.label), f=s.profile.family,
            src=s.path.name))

    @on(Input.Submitted, "#complaint")
    def complaint_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        box = self.query_one("#symptom-list", OptionList)
        if box.highlighted is None or not self.shown_symptoms:
            self._error("No symptom applies; check the set's family.")
            return
        self._choose_symptom(self.shown_symptoms[box.highlighted])

    @on(OptionList.OptionSelected, "#symptom-list")
    def symptom_clicked(self, event: OptionList.OptionSelected) -> None:
        self._choose_symptom(event.option.id)

    def _choose_symptom(self, symptom_id: str) -> None:
        self.chosen_symptom = symptom_id
        title = self.bench.knowledge.symptoms[symptom_id].title
        self.query_one("#symptom-chosen", Static).update(Content.from_markup(
            "[b]✓[/b] $t  [dim]($i)[/dim]", t=title, i=symptom_id))
        self._error(None)
        self.query_one("#customer", Input).focus()

    @on(Input.Submitted, "#customer")
    def customer_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.action_start()

    # ------------------------------------------------------------------ actions

    def _error(self, message: str | None) -> None:
        self.query_one("#new-error", Static).update(Content(message or ""))

    def action_apprentice(self) -> None:
        box = self.query_one("#apprentice", Checkbox)
        box.value = not box.value

    @on(Checkbox.Changed, "#apprentice")
    def apprentice_changed(self, event: Checkbox.Changed) -> None:
        event.checkbox.label = apprentice_label(event.value)

    def action_back(self) -> None:
        self.app.pop_screen()

    def action_template(self) -> None:
        from faultwise.tui.screens.template_form import TemplateFormScreen

        def done(result: tuple[Profile, dict] | None) -> None:
            if result is None:
                return
            profile, _data = result
            self.chosen_set = LibrarySet(Path("form"), profile.label, profile)
            self._show_chosen_set()
            self._rank_symptoms(self.query_one("#complaint", Input).value)
            self.query_one("#complaint", Input).focus()

        self.app.push_screen(TemplateFormScreen(tube_table_dir(self.bench)), done)

    def action_start(self) -> None:
        """Create the case file and start the walk (nothing is written on a refusal)."""
        from faultwise.core.errors import FaultwiseError
        from faultwise.expect.expected import expect_in_workspace
        from faultwise.walk.state import Walk

        complaint = self.query_one("#complaint", Input).value.strip()
        if self.chosen_set is None:
            self._error("Choose the set first (Enter on the highlighted one, or F2).")
            self.query_one("#set-search", Input).focus()
            return
        if not complaint:
            self._error("Type the complaint, as the customer gave it.")
            self.query_one("#complaint", Input).focus()
            return
        if self.chosen_symptom is None:
            self._error("Pick the symptom that fits the complaint (Enter in the complaint).")
            self.query_one("#complaint", Input).focus()
            return
        profile = self.chosen_set.profile
        knowledge = self.bench.knowledge
        try:
            expectations = expect_in_workspace(profile, self.bench.workspace.knowledge_dir)
            walk = Walk(knowledge, profile, self.chosen_symptom, expectations=expectations,
                        clock=self.bench.clock)
            case = self.bench.store.new_case(
                profile, self.chosen_set.path.name, complaint, self.chosen_symptom,
                customer=self.query_one("#customer", Input).value.strip(),
                apprentice=self.query_one("#apprentice", Checkbox).value,
                knowledge_version=knowledge.version)
        except FaultwiseError as exc:
            self._error(str(exc))
            return
        except Exception as exc:  # never a traceback on the bench screen
            self._error(internal_error(exc))
            return
        self.app.switch_screen(self.app.case_screen("walk", case, walk))
