"""After the diagnosis: the fault, the repair, parts replaced, the verify readings, the
closing (leakage) check, and the close with an outcome and the minutes spent.

Closing as repaired while a verify reading was not normal asks first
(:class:`ConfirmRepairedScreen`); nothing is recorded until the technician chooses. The
minutes field starts at the whole minutes since the case was opened (at least 1) and takes
a whole number of 0 or more, refused in place otherwise.
"""

from __future__ import annotations

from collections.abc import Iterator
from datetime import datetime

from textual import on
from textual.app import ComposeResult, SystemCommand
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.content import Content
from textual.validation import Integer
from textual.widgets import Header, Input, Static

from faultwise.cases.store import OpenCase
from faultwise.core.errors import FaultwiseError
from faultwise.core.parts_list import split_parts
from faultwise.tui.context import Bench
from faultwise.tui.meter_keys import MeterKeys
from faultwise.tui.screens.case_screen import CaseScreen
from faultwise.tui.screens.confirm_repaired import ConfirmRepairedScreen
from faultwise.tui.widgets.bench_footer import BenchFooter
from faultwise.tui.widgets.bench_input import BenchInput
from faultwise.tui.widgets.check_panel import CheckPanel
from faultwise.tui.widgets.history import History
from faultwise.tui.widgets.in_place import set_text
from faultwise.tui.widgets.stage_map import StageMap
from faultwise.tui.wording import printable
from faultwise.walk.results import Prompt, resolve_choice
from faultwise.walk.stages import walk_stage_states
from faultwise.walk.state import Walk

OUTCOME_CHOICES = (("repaired", "repaired"), ("returned-unrepaired", "returned unrepaired"),
                   ("waiting-parts", "waiting for parts"))


MINUTES_RULE = "a whole number of minutes, 0 or more"


def whole_minutes_since(opened_iso: object, now: datetime) -> int:
    """Whole minutes from the case's ``opened`` stamp to ``now``, at least 1 (a case closed
    within its first minute still took some time); 1 when the stamp cannot be read."""
    try:
        opened = datetime.fromisoformat(str(opened_iso))
        return max(1, int((now - opened).total_seconds() // 60))
    except (TypeError, ValueError):
        return 1


def failed_verify_lines(walk: Walk) -> list[str]:
    """'<check title>: read <outcome> (<typed>)' for each verify reading of the current
    repair that was not normal (after the last resume; skipped checks are not failures)."""
    resumed = [int(e.get("n", 0)) for e in walk.events if e.get("type") == "resume"]
    since = max(resumed, default=0)
    lines = []
    for step in walk.steps:
        if step.phase != "verify" or step.n <= since or step.normal or \
                step.outcome == "skipped":
            continue
        typed = f" ({step.raw})" if step.raw else ""
        lines.append(f"{step.title}: read {step.outcome}{typed}")
    return lines


class ConclusionScreen(MeterKeys, CaseScreen):
    """Repair, verify, closing checks and close."""

    BINDINGS = [
        CaseScreen.NOTE,
        CaseScreen.READINGS,
        Binding("f8", "resume", "Not cured", tooltip="Resume the diagnosis", priority=True),
        Binding("f9", "to_closing", "Unrepaired", tooltip="Return the set unrepaired",
                priority=True),
        Binding("ctrl+t", "take_parts", "Pick", tooltip="Put the suggested parts "
                "in the field", priority=True),
        Binding("pagedown", "scroll_steps(4)", "More steps", show=False, priority=True),
        Binding("pageup", "scroll_steps(-4)", "Steps back", show=False, priority=True),
        *MeterKeys.BINDINGS,
        CaseScreen.UNDO,
        CaseScreen.CAUTIONS,
        CaseScreen.BACK,
    ]

    def __init__(self, bench: Bench, case: OpenCase, walk: Walk) -> None:
        super().__init__(bench, case, walk, id="conclusion")
        self.outcome: str | None = None
        self._last_choice: str | None = None   # the outcome last typed (a refusal kept in view)

    def compose(self) -> ComposeResult:
        yield Header()
        yield StageMap(id="stage-map")
        with Vertical(id="conclusion-body"):
            yield Static("", id="conclusion-title")
            with VerticalScroll(id="repair-scroll", can_focus=False):
                yield Static("", id="repair-steps")
            with Vertical(id="parts-form", classes="form-block"):
                yield Static("Parts replaced, separated by commas or semicolons (empty if none); Enter "
                             "records them and starts the verify checks.",
                             classes="form-label")
                yield Static("", id="parts-suggested")
                yield BenchInput(id="parts", compact=True, select_on_focus=False,
                                 placeholder="type the parts you fitted (empty: none)")
                yield Static("", id="parts-error", classes="field-error")
            yield CheckPanel(id="check")
            with Vertical(id="close-form", classes="form-block"):
                yield Static("", id="close-caption")
                yield Static(Content("\n").join(
                    Content.from_markup("[b reverse] $n [/]  $label", n=str(i), label=label)
                    for i, (_, label) in enumerate(OUTCOME_CHOICES, 1)), id="close-choices")
                # Each field has its label on its row: the minutes' real default must not
                # pass for an outcome typed or offered.
                with Horizontal(classes="field-row close-row"):
                    yield Static("Outcome", classes="field-name")
                    yield BenchInput(id="close-outcome", compact=True,
                                     placeholder="type 1, 2 or 3")
                with Horizontal(classes="field-row close-row"):
                    yield Static("Minutes spent", classes="field-name")
                    yield BenchInput(id="close-minutes", compact=True,
                                     placeholder="type the minutes spent",
                                     type="integer", validate_on=["changed", "submitted"],
                                     validators=[Integer(minimum=0,
                                                         failure_description=MINUTES_RULE)])
                yield Static("", id="close-error", classes="field-error")
            yield History(id="history")
        yield BenchFooter(show_command_palette=False, compact=True)

    def on_mount(self) -> None:
        self.sub_title = f"case {self.case.id}"
        self.show_prompt()

    # ------------------------------------------------------------------ drawing

    def show_prompt(self) -> None:
        """Draw the current step (repair, verify or closing check, close form) in one batch."""
        if self.next_screen():
            return
        with self.app.batch_update():
            self._draw(self.walk.prompt())
        self.refresh_bindings()

    def _draw(self, prompt: Prompt) -> None:
        fault = self.walk.conclusion
        finding = self.walk.off_graph_finding
        stage = fault.stage if fault else None
        self.query_one(StageMap).show(walk_stage_states(self.walk), prompt.stage or stage)
        self.query_one(History).show(self.walk.events, self.walk.steps, self.walk.knowledge)
        title = self.query_one("#conclusion-title", Static)
        steps = self.query_one("#repair-steps", Static)
        if fault is not None:
            set_text(title, Content.from_markup("[b]✗ FAULT[/b]  $t  [dim]($s)[/dim]", t=fault.title,
                                             s=fault.stage))
        elif finding:
            set_text(title, Content.from_markup("[b]Off-graph finding[/b]  $f",
                                             f=printable(finding)))
        else:
            set_text(title, "Returning the set")
        if prompt.kind == "close":
            # The repair is done: one line of what was fitted leaves room for the close form.
            set_text(steps, Content.from_markup("[b]Parts replaced:[/b] $p",
                                             p=printable(", ".join(self.walk.parts) or "none")))
        elif fault is not None:
            lines = [Content.from_markup("[dim]$i.[/dim] $r", i=str(i), r=r)
                     for i, r in enumerate(fault.repair, 1)]
            parts = ", ".join(fault.parts) or "none listed"
            lines.append(Content.from_markup("[b]Parts:[/b] $p", p=parts))
            set_text(steps, Content("\n").join(lines))
        elif finding:
            set_text(steps, "Repair as the finding needs; the graph has no steps for it.")
        else:
            set_text(steps, Content(""))
        phase = prompt.phase
        self.query_one("#parts-form").display = prompt.kind == "repair"
        self.query_one(CheckPanel).display = prompt.kind == "check"
        self.query_one("#close-form").display = prompt.kind == "close"
        if prompt.kind == "repair":
            if self.ask_cautions(prompt):
                return
            # The knowledge's suggestion is shown beside the field, never put in it: the
            # case records only what the technician typed or picked (ctrl+t).
            suggested = ", ".join(fault.parts) if fault is not None else ""
            self.query_one("#parts-suggested", Static).update(Content.from_markup(
                "[dim]Suggested:[/dim] $p  [dim](ctrl+t puts it in the field)[/dim]",
                p=suggested) if suggested else "")
            self.query_one("#parts", Input).focus()
        elif prompt.kind == "check":
            if self.ask_cautions(prompt):
                self.query_one(CheckPanel).display = False
                return
            panel = self.query_one(CheckPanel)
            panel.show(prompt, self.walk.knowledge)
            panel.input.focus()
        else:
            self._show_close_form(prompt)
        self.query_one("#repair-scroll").display = phase == "repair" or prompt.kind == "close"

    def _show_close_form(self, prompt: Prompt) -> None:
        warn = f"\n! {self.readable(prompt.warning)}" if prompt.warning else ""
        self.query_one("#close-caption", Static).update(Content.from_markup(
            "[b]Close the case[/b]: choose the outcome, then type the minutes spent.$w",
            w=warn))
        minutes = self.query_one("#close-minutes", BenchInput)
        if not minutes.value:
            minutes.prefill(str(self.elapsed_minutes()))
        self.query_one("#close-outcome", Input).focus()

    def elapsed_minutes(self) -> int:
        """Whole minutes since the case was opened, at least 1 (the tech may correct it)."""
        return whole_minutes_since(self.case.data.get("opened"), self.bench.clock())

    def current_field(self) -> BenchInput | None:
        if self.query_one("#parts-form").display:
            return self.query_one("#parts", BenchInput)
        panel = self.query_one(CheckPanel)
        if panel.display:
            return panel.input
        if self.query_one("#close-form").display:
            return self.query_one("#close-minutes" if self.outcome else "#close-outcome",
                                  BenchInput)
        return None

    # ------------------------------------------------------------------ input

    @on(Input.Submitted, "#parts")
    def parts_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        parts = split_parts(event.value)
        self.change(lambda: self.walk.record_parts(parts))

    @on(CheckPanel.Answered)
    def answered(self, event: CheckPanel.Answered) -> None:
        self.answer_text(event.text, self.query_one(CheckPanel))

    @on(Input.Changed, "#close-outcome")
    def outcome_changed(self, event: Input.Changed) -> None:
        value = event.value.strip()
        if value in ("1", "2", "3"):
            self._choose_outcome(value)

    @on(Input.Submitted, "#close-outcome")
    def outcome_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self._choose_outcome(event.value)

    def _choose_outcome(self, text: str) -> None:
        error = self.query_one("#close-error", Static)
        if not str(text or "").strip():
            error.update("No outcome chosen yet: type 1, 2 or 3 (the field is empty).")
            return
        try:
            outcome = resolve_choice(text, OUTCOME_CHOICES)
        except FaultwiseError as exc:
            # typed on after a refused choice (the minutes, say): say the refusal again
            error.update(Content(f"{exc} {self._refusal(self._last_choice)}".strip()))
            return
        self._last_choice = outcome
        if self.walk.can_close(outcome):
            error.update(Content(self._refusal(outcome)))
            return
        if outcome == "repaired" and self.walk.verify_failed:
            self._confirm_repaired()
            return
        self._take_outcome(outcome)

    def _refusal(self, outcome: str | None) -> str:
        """Why the walk refuses to close as ``outcome`` now ('' when it does not)."""
        reason = self.walk.can_close(outcome) if outcome else None
        return f"Cannot close as {outcome}: {self.readable(reason)}." if reason else ""

    def _take_outcome(self, outcome: str) -> None:
        self.outcome = outcome
        self.query_one("#close-outcome", Input).value = dict(OUTCOME_CHOICES)[outcome]
        self.query_one("#close-minutes", Input).focus()
        # Said last, so that the message on screen means the minutes field has the focus.
        self.query_one("#close-error", Static).update(
            Content(f"Outcome: {outcome}. Type the minutes and press Enter."))

    def _confirm_repaired(self) -> None:
        """Ask before a repaired close with a verify reading off; nothing is recorded here."""
        def done(choice: str | None) -> None:
            if choice == "repaired":
                self._take_outcome("repaired")
            elif choice == "resume":
                self.action_resume()
            else:
                self.outcome = None
                box = self.query_one("#close-outcome", Input)
                box.value = ""
                self.query_one("#close-error", Static).update(
                    "Not closed. Choose the outcome (1, 2 or 3).")
                box.focus()

        self.app.push_screen(ConfirmRepairedScreen(
            failed_verify_lines(self.walk) or ["a verify reading (see the history)"],
            can_resume=self.walk.conclusion is not None), done)

    @on(Input.Changed, "#close-minutes")
    def minutes_changed(self, event: Input.Changed) -> None:
        result = event.validation_result
        if result is not None and not result.is_valid:
            self._minutes_refused(event.value)
        elif self.outcome is not None:
            self.query_one("#close-error", Static).update(
                Content(f"Outcome: {self.outcome}. Type the minutes and press Enter."))

    def _minutes_refused(self, value: str) -> None:
        shown = value.strip() or "an empty field"
        self.query_one("#close-error", Static).update(
            Content(f"Minutes: {shown} is not {MINUTES_RULE}."))

    @on(Input.Submitted, "#close-minutes")
    def minutes_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        error = self.query_one("#close-error", Static)
        if self.outcome is None:
            error.update("Choose the outcome first (1, 2 or 3).")
            self.query_one("#close-outcome", Input).focus()
            return
        result = event.validation_result
        if result is not None and not result.is_valid:
            self._minutes_refused(event.value)
            return
        minutes = int(event.value.strip())
        outcome = self.outcome
        self.change(lambda: self.walk.close(outcome, minutes))

    # ------------------------------------------------------------------ actions

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "resume":
            return self.walk.conclusion is not None and self.walk.phase in (
                "repair", "verify", "closing")
        if action == "to_closing":
            return self.walk.phase in ("repair", "verify")
        if action == "take_parts":
            fault = self.walk.conclusion
            return self.walk.phase == "repair" and fault is not None and bool(fault.parts)
        return super().check_action(action, parameters)

    def action_take_parts(self) -> None:
        """Pick the knowledge's suggested parts: they replace the field's text, to be edited."""
        fault = self.walk.conclusion
        if fault is None or not fault.parts:
            return
        box = self.query_one("#parts", Input)
        box.value = "; ".join(fault.parts)
        box.cursor_position = len(box.value)
        box.focus()

    def action_resume(self) -> None:
        self.change(self.walk.resume_diagnosis)

    def action_scroll_steps(self, lines: int) -> None:
        self.query_one("#repair-scroll", VerticalScroll).scroll_relative(y=lines,
                                                                         animate=False)

    def action_to_closing(self) -> None:
        self.change(self.walk.to_closing)

    def palette_commands(self) -> Iterator[SystemCommand]:
        """The conclusion's rare commands, for the command palette."""
        yield SystemCommand("Not cured: resume the diagnosis",
                            "Clear this suspect and go on with the next one", self.action_resume)
        yield SystemCommand("Return the set unrepaired",
                            "Skip to the closing checks and close", self.action_to_closing)
