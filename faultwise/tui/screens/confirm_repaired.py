"""Closing as repaired while a verify reading was not normal: ask before anything is
recorded. Returns "repaired" (close anyway), "resume" (resume the diagnosis) or None
(cancel: back to the close form, nothing recorded).
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.content import Content
from textual.screen import ModalScreen
from textual.widgets import Button, Static

QUESTION = "A verify reading was not normal: close as repaired anyway?"


class ConfirmRepairedScreen(ModalScreen[str | None]):
    """``failing``: one line per verify check that was not normal (title and reading)."""

    BINDINGS = [
        Binding("y", "choose('repaired')", "Yes, repaired"),
        Binding("r", "choose('resume')", "Resume diagnosis"),
        Binding("escape", "choose('')", "Cancel"),
    ]

    def __init__(self, failing: list[str], *, can_resume: bool = True) -> None:
        super().__init__(id="confirm-repaired")
        self.failing = list(failing)
        self.can_resume = can_resume

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box -danger", id="confirm-box"):
            yield Static(QUESTION, classes="modal-title", id="confirm-question")
            lines = [Content.from_markup("[b]Not normal:[/b] $f", f=f) for f in self.failing]
            lines.append(Content("The repair may not have cured the fault. Resume the "
                                 "diagnosis to try the next suspect, or close as repaired "
                                 "if you know why the reading is off."))
            yield Static(Content("\n").join(lines), id="confirm-failing")
            with Horizontal(classes="modal-buttons"):
                yield Button("Yes (y)", id="confirm-yes", variant="error")
                if self.can_resume:
                    yield Button("Resume diagnosis (r)", id="confirm-resume",
                                 variant="primary")
                yield Button("Cancel (Esc)", id="confirm-cancel")

    def on_mount(self) -> None:
        self.query_one("#confirm-cancel", Button).focus()      # the safe default

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        return not (parameters == ("resume",) and not self.can_resume)

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.action_choose({"confirm-yes": "repaired", "confirm-resume": "resume"}.get(
            event.button.id or "", ""))

    def action_choose(self, choice: str) -> None:
        self.dismiss(choice or None)
