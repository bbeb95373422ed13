"""What the walk and conclusion screens share: an open case, its walk, and saving.

Every change goes to the walk first, then to disk (``OpenCase.record``) before the screen
shows the next prompt. A save that fails opens :class:`SaveFailedScreen`; the change stays
in memory until a retry succeeds. When the walk's phase belongs on the other case screen,
the app builds it (``FaultwiseApp.case_screen``): this module imports neither screen.
"""

from __future__ import annotations

from typing import Callable

from textual import events
from textual.binding import Binding
from textual.css.query import NoMatches
from textual.screen import Screen
from textual.widgets import Input

from faultwise.cases.store import OpenCase
from faultwise.core.errors import FaultwiseError
from faultwise.expect.chart import chart_rows, stage_chart_lines
from faultwise.tui.context import Bench
from faultwise.tui.screens.caution import CautionScreen
from faultwise.tui.screens.readings import ReadingsScreen
from faultwise.tui.screens.save_failed import SaveFailedScreen
from faultwise.tui.screens.text_prompt import TextPromptScreen
from faultwise.tui.widgets.bench_input import BenchInput
from faultwise.tui.widgets.check_panel import CheckPanel
from faultwise.tui.wording import bench_sentence, internal_error, printable, readable
from faultwise.walk.results import Prompt
from faultwise.walk.state import Walk


def screen_for(prompt: Prompt) -> str:
    """The id of the screen a prompt belongs on: "conclusion" from the repair on, else "walk"."""
    if prompt.kind in ("repair", "close") or prompt.phase in ("repair", "verify", "closing"):
        return "conclusion"
    return "walk"


class CaseScreen(Screen):
    """Base for screens that change an open case. Subclasses implement ``show_prompt``."""

    # Subclasses list their own bindings around these, in the order the footer shows.
    NOTE = Binding("f3", "note", "Note", priority=True)
    READINGS = Binding("f6", "readings", "Sheet", tooltip="The readings sheet", priority=True)
    CAUTIONS = Binding("f7", "cautions", "Cautions", priority=True, show=False)
    UNDO = Binding("ctrl+z", "undo", "Undo", priority=True)
    BACK = Binding("escape", "leave", "Back", priority=True)

    def __init__(self, bench: Bench, case: OpenCase, walk: Walk, *, id: str) -> None:
        super().__init__(id=id)
        self.bench = bench
        self.case = case
        self.walk = walk
        self._asking_cautions = False

    # ------------------------------------------------------------------ saving

    def _try_save(self) -> str | None:
        """Save the walk into the case; None on success, else the error sentence."""
        try:
            self.case.record(self.walk)
        except FaultwiseError as exc:
            return str(exc)
        except OSError as exc:   # the store maps these; kept as a last guard
            return f"the case could not be saved ({exc.strerror or exc})."
        except Exception as exc:
            return internal_error(exc)
        return None

    def commit(self, then: Callable[[], None]) -> None:
        """Save now; run ``then`` once the case is on disk (after retries if needed)."""
        problem = self._try_save()
        if problem is None:
            then()
            return

        def done(result: str | None) -> None:
            if result == "saved":
                then()
            else:
                self.leave_case(saved=False)

        self.app.push_screen(SaveFailedScreen(problem, self._try_save), done)

    def change(self, action: Callable[[], object], then: Callable[[], None] | None = None
               ) -> bool:
        """Apply ``action`` to the walk; on a domain error toast it (nothing recorded).

        Returns True when the walk changed (and the save was started).
        """
        try:
            action()
        except FaultwiseError as exc:
            self.notify(self.say(exc), severity="error", markup=False, timeout=6)
            return False
        except Exception as exc:  # never a traceback on the bench screen
            self.notify(internal_error(exc), severity="error", markup=False, timeout=10)
            return False
        self.commit(then or self.show_prompt)
        return True

    def answer_text(self, text: str, panel: CheckPanel) -> None:
        """Give typed text to the walk; a refusal goes under the field, nothing recorded."""
        try:
            self.walk.answer(text)
        except FaultwiseError as exc:
            panel.show_error(self.say(exc))
            return
        except Exception as exc:
            panel.show_error(internal_error(exc))
            return
        self.commit(self.show_prompt)

    def say(self, exc: BaseException) -> str:
        """A walk refusal in the bench's words: no location, titles for node ids."""
        return printable(readable(bench_sentence(exc), self.walk.knowledge))

    def readable(self, text: str | None) -> str:
        """Text from the walk with node ids replaced by their titles."""
        return readable(text, self.walk.knowledge)

    # ------------------------------------------------------------------ prompts

    def show_prompt(self) -> None:  # pragma: no cover - each screen draws its own
        """Draw the walk's current prompt (each case screen draws its own)."""
        raise NotImplementedError

    def next_screen(self) -> bool:
        """Switch to the screen the walk's phase belongs on; True when switched."""
        prompt = self.walk.prompt()
        if prompt is None:
            outcome = self.walk.to_case_fields().get("outcome")
            self.notify(f"Case {self.case.id} closed ({outcome}).", markup=False)
            self.leave_case(saved=True)
            return True
        wanted = screen_for(prompt)
        if wanted == self.id:
            return False
        # the app builds the other case screen (this module does not import them)
        self.app.switch_screen(self.app.case_screen(wanted, self.case, self.walk))
        return True

    def ask_cautions(self, prompt: Prompt) -> bool:
        """Show the prompt's unacknowledged cautions first; True when a modal was opened."""
        if not prompt.unacknowledged or self._asking_cautions:
            return False
        pending = [c for c in prompt.cautions if c.id in prompt.unacknowledged]
        self._asking_cautions = True
        shown = self.bench.now_iso()
        modal = CautionScreen(pending, guard_s=self.bench.settings.caution_guard_s)

        def done(ok: bool | None) -> None:
            self._asking_cautions = False
            if not ok:
                self.leave_case(saved=True)
                return

            def acknowledge_all() -> None:
                for caution in pending:
                    self.walk.acknowledge(caution.id, shown=shown, read_s=modal.read_s)

            self.change(acknowledge_all)

        self.app.push_screen(modal, done)
        return True

    # ------------------------------------------------------------------ focus

    def current_field(self) -> BenchInput | None:
        """The field the current step needs, or None (subclasses say which)."""
        return None

    def _step_field(self) -> BenchInput | None:
        """The current step's field; None when the screen has none (or is gone)."""
        try:
            return self.current_field() if self.is_attached else None
        except NoMatches:
            return None

    def focus_field(self) -> None:
        """Give the focus back to the field the current step needs (only while this screen
        is the one shown: a resume can come after the screen was switched away)."""
        if self.app.screen is not self:
            return
        field = self._step_field()
        if field is not None:
            field.focus()

    def on_screen_resume(self) -> None:
        """Every dialog (caution, note, skip, sheet, why, save failed) returns the focus to
        the field the current step needs, so typed digits are never lost."""
        self.focus_field()
        self.call_after_refresh(self.focus_field)

    def on_key(self, event: events.Key) -> None:
        """A printable key while no field has the focus goes into the step's field (a key
        typed while a dialog was closing would otherwise go nowhere)."""
        if not event.is_printable or isinstance(self.focused, Input):
            return
        if self.type_into_field(event.character or ""):
            event.stop()
            event.prevent_default()

    def type_into_field(self, text: str) -> bool:
        """Put ``text`` into the current step's field as typing would (replacing a prefilled
        value or a selection), then focus it; False when the screen has none."""
        field = self._step_field()
        if field is None:
            return False
        field.type_text(text)
        field.focus()
        return True

    def submit_field(self) -> bool:
        """Enter on the current step's field, for a key that reached a closing dialog."""
        field = self._step_field()
        if field is None:
            return False
        field.focus()
        field.action_submit()
        return True

    # ------------------------------------------------------------------ leaving

    def leave_case(self, *, saved: bool) -> None:
        """Release the lock and go back to the start screen."""
        if not saved:
            self.notify("The last step was not saved; the case file keeps the step before it.",
                        severity="warning", timeout=8)
        self.case.close()
        while len(self.app.screen_stack) > 1:
            self.app.pop_screen()

    # ------------------------------------------------------------------ shared actions

    def action_leave(self) -> None:
        self.leave_case(saved=True)

    def action_undo(self) -> None:
        self.change(self.walk.undo, self._after_undo)

    def _after_undo(self) -> None:
        self.notify("Undone.", timeout=2)
        if not self.next_screen():
            self.show_prompt()

    def action_note(self) -> None:
        def done(text: str | None) -> None:
            if text:
                self.change(lambda: self.walk.note(text),
                            lambda: (self.notify("Note saved.", timeout=2), self.show_prompt()))

        self.app.push_screen(TextPromptScreen(
            "Note", "Anything worth keeping with the case (it is saved at once).",
            placeholder="e.g. previous repair: cap replaced with wrong value",
            prompt_id="note-prompt"), done)

    def action_readings(self) -> None:
        prompt = self.walk.prompt()
        current = getattr(getattr(prompt, "expected", None), "name", None)
        try:
            rows = chart_rows(self.walk.profile, self.walk.expectations)
        except FaultwiseError:          # no tube table: the sheet still opens, without a chart
            rows = []
        chart = stage_chart_lines(rows, getattr(prompt, "stage", None))
        self.app.push_screen(ReadingsScreen(self.walk.profile.label, self.walk.expectations,
                                            selected=current, chart=tuple(chart)))

    def action_cautions(self) -> None:
        prompt = self.walk.prompt()
        if prompt is None or not prompt.cautions:
            self.notify("No cautions for this step.", timeout=2)
            return
        self.app.push_screen(CautionScreen(prompt.cautions, reminder=True))

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "undo":
            return any(e.get("type") in ("answer", "skip", "parts", "off-graph", "resume",
                                         "to-closing") for e in self.walk.events)
        if action == "cautions":
            prompt = self.walk.prompt()
            return bool(prompt and prompt.cautions)
        return True
