"""Cautions a check needs, shown before the check and acknowledged once per case.

The caution texts scroll inside the dialog (Up/Down, PgUp/PgDn, the mouse wheel) while the
title and the buttons stay docked at its top and bottom, so "Understood" is on screen at
80x24 however many cautions a step names.
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.content import Content
from textual.screen import ModalScreen
from textual.widgets import Button, Static


class CautionScreen(ModalScreen[bool]):
    """True: acknowledged (the check may be shown). False: the tech leaves the case."""

    BINDINGS = [
        Binding("enter", "acknowledge", "Understood", priority=True),
        Binding("ctrl+l", "leave", "Leave the case"),
        Binding("down", "scroll_text(1)", "Scroll", show=False),
        Binding("up", "scroll_text(-1)", "Scroll", show=False),
        Binding("pagedown", "scroll_text(10)", "Page", show=False),
        Binding("pageup", "scroll_text(-10)", "Page", show=False),
    ]

    def __init__(self, cautions, *, reminder: bool = False) -> None:
        super().__init__(id="caution")
        self.cautions = tuple(cautions)
        self.reminder = reminder

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box -danger", id="caution-box"):
            title = "Cautions for this check" if self.reminder else "Before this check"
            if len(self.cautions) > 1:
                title += f" ({len(self.cautions)} cautions)"
            yield Static(title, classes="modal-title", id="caution-title")
            with Horizontal(classes="modal-buttons", id="caution-buttons"):
                if not self.reminder:
                    yield Button("Leave the case", id="caution-leave")
                yield Button("Understood", id="caution-ok", variant="error")
            with VerticalScroll(id="caution-scroll", can_focus=False):
                for caution in self.cautions:
                    yield Static(Content.from_markup("[b]⚠ $title[/b]\n$text",
                                                     title=caution.title, text=caution.text),
                                 classes="caution-text")

    def on_mount(self) -> None:
        self.query_one("#caution-ok", Button).focus()
        self.call_after_refresh(self._say_more)

    def _say_more(self) -> None:
        """When the texts do not all fit, say so in the title (the scrollbar is thin)."""
        if self.query_one("#caution-scroll", VerticalScroll).max_scroll_y > 0:
            title = self.query_one("#caution-title", Static)
            title.update(Content.from_markup("$t  [dim](↓ PgDn: more below)[/dim]",
                                             t=str(title.render())))

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        return not (action == "leave" and self.reminder)

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.dismiss(event.button.id == "caution-ok")

    def action_acknowledge(self) -> None:
        self.dismiss(True)

    def action_leave(self) -> None:
        self.dismiss(False)

    def action_scroll_text(self, lines: int) -> None:
        self.query_one("#caution-scroll", VerticalScroll).scroll_relative(y=lines,
                                                                          animate=False)
