"""Cautions a check needs, shown before the check and acknowledged once per case.

The caution texts scroll inside the dialog (Up/Down, PgUp/PgDn, the mouse wheel) while the
title and the buttons stay docked at its top and bottom, so "Understood" is on screen at
80x24 however many cautions a step names.

A caution is acknowledged only deliberately: for ``guard_s`` seconds after the dialog opens
every key and click that would acknowledge it is ignored (the dialog says so, and the
"Understood" button is disabled until then). A number key answers a choice at once and the
technician's habitual Enter after it would otherwise land on the dialog that has just
opened for the next check. ``read_s`` is how long the dialog was open when it was
acknowledged; the case records it with the acknowledgement.
"""

from __future__ import annotations

import time
from collections.abc import Iterable
from typing import TYPE_CHECKING

from textual import events
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.content import Content
from textual.screen import ModalScreen
from textual.widgets import Button, Static

if TYPE_CHECKING:
    from faultwise.graph.nodes import Caution

GUARD_S = 1.5        # long enough to stop a habitual keystroke, short enough not to annoy


class CautionScreen(ModalScreen[bool]):
    """True: acknowledged (the check may be shown). False: the tech leaves the case."""

    BINDINGS = [
        Binding("enter", "acknowledge", "Understood", priority=True),
        Binding("ctrl+l", "leave", "Leave the case"),
        Binding("escape", "escape", "Close", show=False),
        Binding("down", "scroll_text(1)", "Scroll", show=False),
        Binding("up", "scroll_text(-1)", "Scroll", show=False),
        Binding("pagedown", "scroll_text(10)", "Page", show=False),
        Binding("pageup", "scroll_text(-10)", "Page", show=False),
    ]

    def __init__(self, cautions: Iterable[Caution], *, reminder: bool = False,
                 guard_s: float = GUARD_S) -> None:
        super().__init__(id="caution")
        self.cautions = tuple(cautions)
        self.reminder = reminder
        self.guard_s = 0.0 if reminder else max(0.0, float(guard_s))
        self.armed = self.guard_s == 0.0
        self.read_s: float | None = None
        self._opened = time.monotonic()

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box -danger", id="caution-box"):
            title = "Cautions for this check" if self.reminder else "Before this check"
            if len(self.cautions) > 1:
                title += f" ({len(self.cautions)} cautions)"
            yield Static(title, classes="modal-title", id="caution-title")
            with Horizontal(classes="modal-buttons", id="caution-buttons"):
                # The guard's hint sits beside the buttons: on screen at 80x24 whatever
                # the length of the texts above.
                yield Static(self._guard_text(), id="caution-guard")
                if not self.reminder:
                    yield Button("Leave the case", id="caution-leave")
                yield Button("Understood", id="caution-ok", variant="error",
                             disabled=not self.armed)
            with VerticalScroll(id="caution-scroll", can_focus=False):
                for caution in self.cautions:
                    yield Static(Content.from_markup("[b]⚠ $title[/b]\n$text",
                                                     title=caution.title, text=caution.text),
                                 classes="caution-text")

    def _guard_text(self) -> Content:
        if self.reminder:
            return Content("")
        if not self.armed:
            return Content.from_markup(
                "[dim]Read first: keys are ignored for $s s after this opens.[/dim]",
                s=f"{self.guard_s:g}")
        return Content.from_markup("[dim]Enter: understood\nEsc: leave the case[/dim]")

    def on_mount(self) -> None:
        self._opened = time.monotonic()
        if self.armed:
            self.query_one("#caution-ok", Button).focus()
        else:
            self.set_focus(None)
            self.set_timer(self.guard_s, self._arm)
        self.call_after_refresh(self._say_more)

    def _arm(self) -> None:
        self.armed = True
        ok = self.query_one("#caution-ok", Button)
        ok.disabled = False
        ok.focus()
        self.query_one("#caution-guard", Static).update(self._guard_text())
        self.refresh_bindings()

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
        if event.button.id == "caution-ok":
            self.action_acknowledge()
        else:
            self.action_leave()

    def _beneath(self):
        """The screen this dialog was opened over (while it is still on the stack)."""
        stack = self.app.screen_stack
        i = stack.index(self) if self in stack else 0
        return stack[i - 1] if i > 0 else None

    def on_key(self, event: events.Key) -> None:
        """Keys typed after the caution was answered, while the dialog is still closing,
        belong to the next check's field: they are handed on, never lost."""
        if self.read_s is None or self.read_s < 0 or not event.is_printable:
            return                   # not answered yet, or left: nothing to hand on
        typer = getattr(self._beneath(), "type_into_field", None)
        if typer is not None and typer(event.character or ""):
            event.stop()
            event.prevent_default()

    def action_acknowledge(self) -> None:
        """Acknowledge, unless the guard time since the dialog opened has not passed."""
        if self.read_s is not None:          # answered, still closing: Enter is the field's
            submit = getattr(self._beneath(), "submit_field", None)
            if self.read_s >= 0 and submit is not None:
                submit()
            return
        if not self.armed:
            return
        self.read_s = round(time.monotonic() - self._opened, 1)
        self.dismiss(True)

    def action_leave(self) -> None:
        if self.read_s is None:
            self.read_s = -1.0          # answered: later keys are not a second answer
            self.dismiss(False)

    def action_escape(self) -> None:
        """Esc closes a reminder (nothing is recorded); on a caution before a check it
        leaves the case, as the walk's own Esc does; it never acknowledges."""
        if self.reminder:
            if self.read_s is None:
                self.read_s = -1.0
                self.dismiss(True)
            return
        self.action_leave()

    def action_scroll_text(self, lines: int) -> None:
        self.query_one("#caution-scroll", VerticalScroll).scroll_relative(y=lines,
                                                                          animate=False)
