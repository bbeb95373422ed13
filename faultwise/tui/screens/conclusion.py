"""After the diagnosis: the fault, the repair, parts replaced, the verify readings, the
closing (leakage) check, and the close with an outcome and the minutes spent.
"""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult, SystemCommand
from textual.binding import Binding
from textual.containers import Vertical
from textual.content import Content
from textual.widgets import Footer, Header, Input, Static

from faultwise.tui.screens.case_screen import CaseScreen
from faultwise.tui.widgets.bench_input import BenchInput
from faultwise.tui.widgets.check_panel import CheckPanel
from faultwise.tui.widgets.history import History
from faultwise.tui.widgets.stage_map import StageMap

OUTCOME_CHOICES = (("repaired", "repaired"), ("returned-unrepaired", "returned unrepaired"),
                   ("waiting-parts", "waiting for parts"))


def split_parts(text: str) -> list[str]:
    """'50 uF 160 V electrolytic; 35W4' -> two parts (separated by ';' or ',')."""
    return [p.strip() for p in text.replace(";", ",").split(",") if p.strip()]


class ConclusionScreen(CaseScreen):
    """Repair, verify, closing checks and close."""

    BINDINGS = [
        CaseScreen.NOTE,
        CaseScreen.READINGS,
        Binding("f8", "resume", "Not cured", tooltip="Resume the diagnosis", priority=True),
        Binding("f9", "to_closing", "Unrepaired", tooltip="Return the set unrepaired",
                priority=True),
        CaseScreen.UNDO,
        CaseScreen.CAUTIONS,
        CaseScreen.BACK,
    ]

    def __init__(self, bench, case, walk) -> None:
        super().__init__(bench, case, walk, id="conclusion")
        self.outcome: str | None = None

    def compose(self) -> ComposeResult:
        yield Header()
        yield StageMap(id="stage-map")
        with Vertical(id="conclusion-body"):
            yield Static("", id="conclusion-title")
            yield Static("", id="repair-steps")
            with Vertical(id="parts-form", classes="form-block"):
                yield Static("Parts replaced, separated by commas (leave empty if none); "
                             "Enter records them and starts the verify checks.",
                             classes="form-label")
                yield BenchInput(id="parts", compact=True)
                yield Static("", id="parts-error", classes="field-error")
            yield CheckPanel(id="check")
            with Vertical(id="close-form", classes="form-block"):
                yield Static("", id="close-caption")
                yield Static(Content("\n").join(
                    Content.from_markup("[b reverse] $n [/]  $label", n=str(i), label=label)
                    for i, (_, label) in enumerate(OUTCOME_CHOICES, 1)), id="close-choices")
                yield BenchInput(id="close-outcome", compact=True,
                                 placeholder="outcome: 1, 2 or 3")
                yield BenchInput(id="close-minutes", compact=True, placeholder="minutes spent",
                                 type="number")
                yield Static("", id="close-error", classes="field-error")
            yield History(id="history")
        yield Footer(show_command_palette=False)

    def on_mount(self) -> None:
        self.sub_title = f"case {self.case.id}"
        self.show_prompt()

    # ------------------------------------------------------------------ drawing

    def show_prompt(self) -> None:
        if self.next_screen():
            return
        prompt = self.walk.prompt()
        fault = self.walk.conclusion
        finding = self.walk.off_graph_finding
        stage = fault.stage if fault else None
        from faultwise.tui.screens.walk import map_states

        self.query_one(StageMap).show(map_states(self.walk), prompt.stage or stage)
        self.query_one(History).show(self.walk.events, self.walk.steps, self.walk.knowledge)
        title = self.query_one("#conclusion-title", Static)
        steps = self.query_one("#repair-steps", Static)
        if fault is not None:
            title.update(Content.from_markup("[b]✗ FAULT[/b]  $t  [dim]($s)[/dim]", t=fault.title,
                                             s=fault.stage))
            lines = [Content.from_markup("[dim]$i.[/dim] $r", i=str(i), r=r)
                     for i, r in enumerate(fault.repair, 1)]
            parts = ", ".join(fault.parts) or "none listed"
            lines.append(Content.from_markup("[b]Parts:[/b] $p", p=parts))
            steps.update(Content("\n").join(lines))
        elif finding:
            title.update(Content.from_markup("[b]Off-graph finding[/b]  $f", f=finding))
            steps.update("Repair as the finding needs; the graph has no steps for it.")
        else:
            title.update("Returning the set")
            steps.update("")
        phase = prompt.phase
        self.query_one("#parts-form").display = prompt.kind == "repair"
        self.query_one(CheckPanel).display = prompt.kind == "check"
        self.query_one("#close-form").display = prompt.kind == "close"
        if prompt.kind == "repair":
            if self.ask_cautions(prompt):
                return
            box = self.query_one("#parts", Input)
            if not box.value and fault is not None:
                box.value = ", ".join(fault.parts)
            box.focus()
        elif prompt.kind == "check":
            if self.ask_cautions(prompt):
                self.query_one(CheckPanel).display = False
                return
            panel = self.query_one(CheckPanel)
            panel.show(prompt)
            panel.input.focus()
        else:
            self._show_close_form(prompt)
        steps.display = phase == "repair" or prompt.kind == "close"
        self.refresh_bindings()

    def _show_close_form(self, prompt) -> None:
        warn = f"\n! {prompt.warning}" if prompt.warning else ""
        self.query_one("#close-caption", Static).update(Content.from_markup(
            "[b]Close the case[/b]: choose the outcome, then type the minutes spent.$w",
            w=warn))
        minutes = self.query_one("#close-minutes", Input)
        if not minutes.value:
            minutes.value = str(self.elapsed_minutes())
        self.query_one("#close-outcome", Input).focus()

    def elapsed_minutes(self) -> int:
        """Whole minutes since the case was opened (the tech may correct it)."""
        from datetime import datetime

        try:
            opened = datetime.fromisoformat(str(self.case.data.get("opened")))
            return max(0, int((self.bench.clock() - opened).total_seconds() // 60))
        except (TypeError, ValueError):
            return 0

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
        from faultwise.errors import FaultwiseError
        from faultwise.walk import resolve_choice

        error = self.query_one("#close-error", Static)
        try:
            outcome = resolve_choice(text, OUTCOME_CHOICES)
        except FaultwiseError as exc:
            error.update(Content(str(exc)))
            return
        reason = self.walk.can_close(outcome)
        if reason:
            error.update(Content(f"Cannot close as {outcome}: {reason}."))
            return
        self.outcome = outcome
        error.update(Content(f"Outcome: {outcome}. Type the minutes and press Enter."))
        self.query_one("#close-outcome", Input).value = dict(OUTCOME_CHOICES)[outcome]
        self.query_one("#close-minutes", Input).focus()

    @on(Input.Submitted, "#close-minutes")
    def minutes_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        error = self.query_one("#close-error", Static)
        if self.outcome is None:
            error.update("Choose the outcome first (1, 2 or 3).")
            self.query_one("#close-outcome", Input).focus()
            return
        try:
            minutes = float(event.value.strip())
        except ValueError:
            error.update(Content(f"'{event.value}' is not a number of minutes."))
            return
        outcome = self.outcome
        self.change(lambda: self.walk.close(outcome, minutes))

    # ------------------------------------------------------------------ actions

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "resume":
            return self.walk.conclusion is not None and self.walk.phase in (
                "repair", "verify", "closing")
        if action == "to_closing":
            return self.walk.phase in ("repair", "verify")
        return super().check_action(action, parameters)

    def action_resume(self) -> None:
        self.change(self.walk.resume_diagnosis)

    def action_to_closing(self) -> None:
        self.change(self.walk.to_closing)

    def palette_commands(self):
        yield SystemCommand("Not cured: resume the diagnosis",
                            "Clear this suspect and go on with the next one", self.action_resume)
        yield SystemCommand("Return the set unrepaired",
                            "Skip to the closing checks and close", self.action_to_closing)
