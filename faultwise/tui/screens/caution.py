"""Cautions a check needs, shown before the check and acknowledged once per case."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.content import Content
from textual.screen import ModalScreen
from textual.widgets import Button, Static


class CautionScreen(ModalScreen[bool]):
    """True: acknowledged (the check may be shown). False: the tech leaves the case."""

    BINDINGS = [
        Binding("enter", "acknowledge", "Understood", priority=True),
        Binding("ctrl+l", "leave", "Leave the case"),
    ]

    def __init__(self, cautions, *, reminder: bool = False) -> None:
        super().__init__(id="caution")
        self.cautions = tuple(cautions)
        self.reminder = reminder

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box -danger", id="caution-box"):
            title = "Cautions for this check" if self.reminder else "Before this check"
            yield Static(title, classes="modal-title")
            for caution in self.cautions:
                yield Static(Content.from_markup("[b]⚠ $title[/b]\n$text", title=caution.title,
                                                 text=caution.text), classes="caution-text")
            with Horizontal(classes="modal-buttons"):
                if not self.reminder:
                    yield Button("Leave the case", id="caution-leave")
                yield Button("Understood", id="caution-ok", variant="error")

    def on_mount(self) -> None:
        self.query_one("#caution-ok", Button).focus()

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        return not (action == "leave" and self.reminder)

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.dismiss(event.button.id == "caution-ok")

    def action_acknowledge(self) -> None:
        self.dismiss(True)

    def action_leave(self) -> None:
        self.dismiss(False)
