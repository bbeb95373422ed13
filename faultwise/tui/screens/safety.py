"""The safety notice: shown on first run and again with F9 from the start screen."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Static

SAFETY_TITLE = "Before you start"

SAFETY_LINES = (
    "faultwise supports trained people at the bench. It does not replace training, the "
    "set's service data, local electrical codes or licensed practice, and it defers to them.",
    "- A line-connected set can have a live chassis: work through an isolation transformer "
    "and treat every metal part as live until you have measured it.",
    "- Filter capacitors hold a charge after the power is off: discharge them through a "
    "resistor before you touch the circuit.",
    "- Bring a set up slowly, through a series lamp or a variable transformer.",
    "- Do the leakage check before a line-connected set goes back to its owner.",
)

SAFETY_SHORT = ("For trained people. Line-connected sets can have a live chassis. Local "
                "electrical codes and licensed practice come first.")


class SafetyScreen(ModalScreen[bool]):
    """Returns True once the notice is acknowledged (False: closed again without asking)."""

    BINDINGS = [
        Binding("enter", "acknowledge", "I understand", priority=True),
        Binding("escape", "close", "Back"),
    ]

    def __init__(self, *, first_run: bool) -> None:
        super().__init__(id="safety")
        self.first_run = first_run

    def compose(self) -> ComposeResult:
        with Vertical(id="safety-box", classes="modal-box"):
            yield Static(SAFETY_TITLE, classes="modal-title")
            for i, line in enumerate(SAFETY_LINES):
                yield Static(line, classes="safety-line" + (" -lead" if i == 0 else ""),
                             markup=False)
            yield Button("I understand", id="safety-ok", variant="primary")

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "close":
            return not self.first_run
        return True

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.dismiss(True)

    def action_acknowledge(self) -> None:
        self.dismiss(True)

    def action_close(self) -> None:
        self.dismiss(False)
