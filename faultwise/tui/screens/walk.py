"""The walk: one check at a time from the complaint to a conclusion.

Layout: the stage map; the current check (title, instruction, expected band and basis,
choices, the answer field and its refusal line); the guidance pane (how and why) beside
it; the history of steps below. Every binding works while the answer field has focus.
"""

from __future__ import annotations

from typing import Iterator

from textual import on
from textual.app import ComposeResult, SystemCommand
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.content import Content
from textual.widgets import Header, Static

from faultwise.cases.store import OpenCase
from faultwise.graph.knowledge import Knowledge
from faultwise.tui.context import Bench
from faultwise.tui.meter_keys import MeterKeys
from faultwise.tui.screens.case_screen import CaseScreen
from faultwise.tui.screens.explain import ExplainScreen
from faultwise.tui.screens.text_prompt import TextPromptScreen
from faultwise.tui.widgets.bench_footer import BenchFooter
from faultwise.tui.widgets.bench_input import BenchInput
from faultwise.tui.widgets.check_panel import CheckPanel
from faultwise.tui.widgets.history import History
from faultwise.tui.widgets.in_place import set_text
from faultwise.tui.widgets.stage_map import StageMap
from faultwise.tui.wording import printable
from faultwise.walk.rank import fault_probabilities
from faultwise.walk.results import Prompt
from faultwise.walk.stages import walk_stage_states
from faultwise.walk.state import Walk

__all__ = ["WalkScreen", "guidance_for"]


def guidance_for(prompt: Prompt, knowledge: Knowledge) -> Content:
    """How and why of the current step, and its cautions, as safe Content."""
    node = prompt.node
    parts: list[Content] = []
    if node is None:
        parts.append(Content("Every suspect for this complaint was cleared. Record what you "
                             "found with F5, or note it with F3."))
    elif prompt.kind == "escalate":
        parts.append(Content.from_markup("[b]Where the graph ends[/b]\n$a",
                                         a=getattr(node, "advice", "") or "-"))
    else:
        how = getattr(node, "how", "") or "-"
        why = getattr(node, "why", "") or "-"
        parts.append(Content.from_markup("[b]How[/b]\n$how", how=how))
        parts.append(Content.from_markup("[b]Why[/b]\n$why", why=why))
    for frame in prompt.context:
        parts.append(Content.from_markup("[b]Suspects[/b] $t\n[dim]now:[/dim] $c", t=frame.title,
                                         c=frame.current_label or "-"))
    for caution in prompt.cautions:
        parts.append(Content.from_markup("[b]⚠ $t[/b]\n$x", t=caution.title, x=caution.text))
    return Content("\n\n").join(parts)


class WalkScreen(MeterKeys, CaseScreen):
    """Diagnosis: checks, skips, notes, off-graph findings, undo, why-this-check."""

    BINDINGS = [
        Binding("f1", "guidance", "Guide", tooltip="Show or hide how and why", priority=True),
        Binding("f2", "why", "Why", tooltip="Why this check now", priority=True),
        CaseScreen.NOTE,
        Binding("f4", "skip", "Skip", priority=True),
        Binding("f5", "off_graph", "Found", tooltip="Record an off-graph finding",
                priority=True),
        CaseScreen.READINGS,
        *MeterKeys.BINDINGS,
        CaseScreen.UNDO,
        CaseScreen.CAUTIONS,
        CaseScreen.BACK,
    ]

    def __init__(self, bench: Bench, case: OpenCase, walk: Walk) -> None:
        super().__init__(bench, case, walk, id="walk")
        self.guidance_open = bool(case.data.get("apprentice"))

    def compose(self) -> ComposeResult:
        yield Header()
        yield StageMap(id="stage-map")
        with Horizontal(id="walk-body"):
            with Vertical(id="walk-left"):
                yield Static("", id="walk-context")
                yield CheckPanel(id="check")
                yield Static("", id="escalate")
                yield History(id="history")
            with VerticalScroll(id="guidance"):
                yield Static("", id="guidance-text")
        yield BenchFooter(show_command_palette=False, compact=True)

    def on_mount(self) -> None:
        self.sub_title = f"case {self.case.id}"
        self._check_panel = self.query_one(CheckPanel)
        self._escalate_box = self.query_one("#escalate", Static)
        self._stage_map = self.query_one(StageMap)
        self._history_table = self.query_one(History)
        self._guidance_text = self.query_one("#guidance-text", Static)
        self._context_line = self.query_one("#walk-context", Static)
        self.query_one("#guidance").display = self.guidance_open
        self.show_prompt()
        # The first answers rank the suspects: the family's graph they need is built once per
        # run (about 0.1 s with the networkx import), and the answers are weighed against each
        # fault's physics (about 1 ms a fault): do both now, beside the first check, not after
        # a key press. Each is cached by one assignment of a finished object, so the walk
        # reading meanwhile at worst computes one a second time.
        walk = self.walk

        def warm_up() -> None:
            fault_probabilities(walk.knowledge, walk.symptom, walk.family)
            walk.evidence.warm(walk.knowledge.faults_for(walk.symptom, walk.family))

        self.run_worker(warm_up, thread=True, exit_on_error=False, group="warm-up",
                        name="warm-up")

    # ------------------------------------------------------------------ drawing

    def show_prompt(self) -> None:
        """Draw the current check in place: only what changed since the last step is
        updated, all in one batch (one repaint)."""
        if self.next_screen():
            return
        with self.app.batch_update():
            self._draw(self.walk.prompt())
        self.refresh_bindings()

    def _draw(self, prompt: Prompt) -> None:
        walk = self.walk
        panel, escalate = self._check_panel, self._escalate_box
        self._stage_map.show(walk_stage_states(walk), prompt.stage)
        self._history_table.show(walk.events, walk.steps, walk.knowledge)
        set_text(self._guidance_text, guidance_for(prompt, walk.knowledge))
        context = " › ".join(f.current_label or f.title for f in prompt.context)
        set_text(self._context_line,
                 Content.from_markup("[dim]Following:[/dim] $c", c=context) if context else
                 Content.from_markup("[dim]Complaint:[/dim] $c", c=printable(
                     self.case.data.get("complaint") or walk.symptom)))
        if prompt.kind == "check":
            if self.ask_cautions(prompt):
                panel.display = False
                escalate.display = True
                set_text(escalate, "Read and acknowledge the caution before this check.")
                return
            panel.display = True
            escalate.display = False
            panel.show(prompt, walk.knowledge)
            panel.input.focus()
        else:
            panel.display = False
            escalate.display = True
            node = prompt.node
            title = getattr(node, "title", None) or "No suspect is left"
            set_text(escalate, Content.from_markup(
                "[b]$t[/b]\n$w\nThe graph has nothing more to check here. Press F5 to record "
                "what you found (an off-graph finding), F3 for a note, ctrl+z to undo.",
                t=title, w=self.readable(prompt.warning) or getattr(node, "advice", "") or ""))
            self.set_focus(None)

    def current_field(self) -> BenchInput | None:
        panel = self._check_panel
        prompt = self.walk.prompt()
        if prompt is None or prompt.kind != "check" or not panel.display:
            return None
        return panel.input

    # ------------------------------------------------------------------ answering

    @on(CheckPanel.Answered)
    def answered(self, event: CheckPanel.Answered) -> None:
        self.answer_text(event.text, self._check_panel)

    # ------------------------------------------------------------------ actions

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        prompt = self.walk.prompt()
        asking = prompt is not None and prompt.kind == "check"
        if action == "skip":
            return asking and prompt.phase != "closing"
        if action == "why":
            return prompt is not None and prompt.phase == "diagnose" and asking
        if action == "off_graph":
            return self.walk.phase == "diagnose"
        return super().check_action(action, parameters)

    def action_guidance(self) -> None:
        self.guidance_open = not self.guidance_open
        self.query_one("#guidance").display = self.guidance_open

    def action_why(self) -> None:
        explanation = self.walk.explain()
        if explanation is None:
            self.notify("No ranking applies to this step.", timeout=3)
            return
        self.app.push_screen(ExplainScreen(explanation, self.walk.knowledge))

    def action_skip(self) -> None:
        def done(reason: str | None) -> None:
            if reason:
                self.change(lambda: self.walk.skip(reason))

        self.app.push_screen(TextPromptScreen(
            "Skip this check", "Why can it not be made? The walk goes on without it.",
            placeholder="e.g. no ESR meter at this bench", prompt_id="skip-prompt"), done)

    def action_off_graph(self) -> None:
        def done(finding: str | None) -> None:
            if finding:
                self.change(lambda: self.walk.off_graph(finding))

        self.app.push_screen(TextPromptScreen(
            "Record what you found", "A fault the graph does not know. Diagnosis ends here "
            "and the repair starts.", placeholder="e.g. cracked solder joint at the IF can",
            prompt_id="off-graph-prompt"), done)

    def action_to_closing(self) -> None:
        self.change(self.walk.to_closing)

    def palette_commands(self) -> Iterator[SystemCommand]:
        """The walk's rare commands, for the command palette."""
        yield SystemCommand("Return the set unrepaired",
                            "Skip to the closing checks (the leakage check) and close",
                            self.action_to_closing)
        yield SystemCommand("Show the cautions of this check", "See the cautions again",
                            self.action_cautions)
