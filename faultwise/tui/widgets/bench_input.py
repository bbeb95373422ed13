"""The one text field every screen uses: an Input that follows the bench's cursor setting."""

from __future__ import annotations

from textual.widgets import Input


def choices_hint(n: int) -> str:
    """'type 1, 2 or 3': the placeholder of a numbered choice, worded as a hint."""
    if n <= 1:
        return "type 1"
    return "type " + ", ".join(str(i) for i in range(1, n)) + f" or {n}"


class BenchInput(Input):
    """An Input whose cursor blinks unless the settings say not (snapshot tests).

    Its placeholder is dim and italic and always worded as a hint ("type ..."), so it is
    never taken for a value that Enter would accept.
    """

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
