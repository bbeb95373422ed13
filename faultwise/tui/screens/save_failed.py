"""A save that failed: the answer stays in memory; retry until the folder takes it."""

from __future__ import annotations

from typing import Callable

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.content import Content
from textual.screen import ModalScreen
from textual.widgets import Button, Static


class SaveFailedScreen(ModalScreen[str]):
    """Returns "saved" once ``retry()`` succeeds, or "leave" (the unsaved step is dropped).

    ``retry`` returns None on success or the error sentence of the new failure.
    """

    BINDINGS = [
        Binding("enter", "retry", "Retry", priority=True),
        Binding("ctrl+l", "leave", "Leave the case"),
    ]

    def __init__(self, error: str, retry: Callable[[], str | None]) -> None:
        super().__init__(id="save-failed")
        self.error = error
        self.retry = retry
        self.tries = 1

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box -danger"):
            yield Static("The case could not be saved", classes="modal-title")
            yield Static(Content.from_markup(
                "$error\n\nYour last step is kept in memory and is not lost yet. Fix the "
                "cause (permissions, free space, the disk itself), then retry. The next "
                "check is shown only once the case is on disk.", error=self.error),
                id="save-error")
            with Horizontal(classes="modal-buttons"):
                yield Button("Leave the case", id="save-leave")
                yield Button("Retry", id="save-retry", variant="primary")

    def on_mount(self) -> None:
        self.query_one("#save-retry", Button).focus()

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        if event.button.id == "save-retry":
            self.action_retry()
        else:
            self.action_leave()

    def action_retry(self) -> None:
        problem = self.retry()
        if problem is None:
            self.dismiss("saved")
            return
        self.tries += 1
        self.query_one("#save-error", Static).update(Content.from_markup(
            "$error\n\nStill failing (try $n). Your last step is kept in memory; fix the "
            "cause and retry.", error=problem, n=str(self.tries)))

    def action_leave(self) -> None:
        self.dismiss("leave")
