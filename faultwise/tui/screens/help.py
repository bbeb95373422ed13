"""Keys and flow of the bench program, from ``help.md`` beside this file."""

from __future__ import annotations

from importlib.resources import files

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Markdown


def help_text() -> str:
    """The help page (Markdown package data)."""
    return files("faultwise.tui.screens").joinpath("help.md").read_text(encoding="utf-8")


class HelpScreen(ModalScreen[None]):
    """The help page in a scrollable modal; Escape closes it."""

    BINDINGS = [Binding("escape,question_mark,f12", "close", "Close", priority=True)]

    def __init__(self) -> None:
        super().__init__(id="help")

    def compose(self) -> ComposeResult:
        with VerticalScroll(classes="modal-box", id="help-box"):
            yield Markdown(help_text(), open_links=False)

    def action_close(self) -> None:
        self.dismiss(None)
