"""The one text field every screen uses: an Input that follows the bench's cursor setting."""

from __future__ import annotations

from textual import events
from textual.widgets import Input
from textual.widgets.input import Selection

# Keys that start editing a prefilled value (and so end its "replace on typing" state);
# Tab, Escape and function keys only move about, and leave the value replaceable.
_EDIT_KEYS = frozenset(("backspace", "delete", "left", "right", "home", "end"))


def choices_hint(n: int) -> str:
    """'type 1, 2 or 3': the placeholder of a numbered choice, worded as a hint."""
    if n <= 1:
        return "type 1"
    return "type " + ", ".join(str(i) for i in range(1, n)) + f" or {n}"


class BenchInput(Input):
    """An Input whose cursor blinks unless the settings say not (snapshot tests).

    Its placeholder is dim and italic and always worded as a hint ("type ..."), so it is
    never taken for a value that Enter would accept. A value set with :meth:`prefill` (a
    default the technician may correct, such as the minutes since the case opened) is
    replaced by the first character typed, however the field got the focus: a Tab pressed
    out of habit must not turn "1" and a typed "10" into 110.
    """

    _prefilled = False
    _select_again = False           # select_on_focus was paused by type_text

    DEFAULT_CSS = """
    BenchInput > .input--placeholder {
        color: $text-disabled;
        text-style: italic;
    }
    """

    def on_mount(self) -> None:
        settings = getattr(getattr(self.app, "bench", None), "settings", None)
        if settings is not None and not settings.cursor_blink:
            self.cursor_blink = False

    def prefill(self, text: str) -> None:
        """Show a default that the first character typed replaces (Enter accepts it)."""
        self.value = text
        self.cursor_position = len(text)
        self._prefilled = True

    def _claim_prefill(self, replace: bool) -> None:
        """End the prefilled state; ``replace``: select the value so typing replaces it."""
        if self._prefilled:
            self._prefilled = False
            if replace:
                self.selection = Selection(0, len(self.value))

    async def _on_key(self, event: events.Key) -> None:
        if event.is_printable or event.key in _EDIT_KEYS:
            self._claim_prefill(replace=event.is_printable)
        await super()._on_key(event)

    def type_text(self, text: str) -> None:
        """Type ``text`` as keys would (replacing a prefilled value or a selection), for a key
        that reached the screen while the field had no focus. Call it before giving the focus:
        that focus must not select what was just typed (Input selects the whole value on
        focus), or the next key, which may already be on its way, would replace it. Selecting
        on focus comes back once the field loses the focus again."""
        self._claim_prefill(replace=True)
        selection = self.selection
        if selection.is_empty:
            self.insert_text_at_cursor(text)
        else:
            self.replace(text, *selection)
        if not self.has_focus and self.select_on_focus:
            self.select_on_focus = False
            self._select_again = True

    def _on_blur(self, event: events.Blur) -> None:
        if self._select_again:
            self._select_again = False
            self.select_on_focus = True
