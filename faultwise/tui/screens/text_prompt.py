"""Ask for one line of text (a note, a reason for a skip, an off-graph finding)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.content import Content
from textual.screen import ModalScreen
from textual.widgets import Input, Static

from faultwise.tui.widgets.bench_input import BenchInput


class TextPromptScreen(ModalScreen[str | None]):
    """Returns the text typed (stripped, not empty), or None when cancelled with escape."""

    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, title: str, explanation: str, *, placeholder: str = "",
                 allow_empty: bool = False, prompt_id: str = "text-prompt") -> None:
        super().__init__(id=prompt_id)
        self.title_text = title
        self.explanation = explanation
        self.placeholder = placeholder
        self.allow_empty = allow_empty

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box"):
            yield Static(self.title_text, classes="modal-title", markup=False)
            yield Static(self.explanation, markup=False)
            yield BenchInput(placeholder=self.placeholder, id="prompt-input")
            yield Static("", id="prompt-error", classes="field-error")
            yield Static("[dim]Enter saves, Escape cancels[/dim]")

    def on_mount(self) -> None:
        self.query_one(Input).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        text = event.value.strip()
        if not text and not self.allow_empty:
            self.query_one("#prompt-error", Static).update(
                Content("Type something first, or press Escape to cancel."))
            return
        self.dismiss(text)

    def action_cancel(self) -> None:
        self.dismiss(None)
