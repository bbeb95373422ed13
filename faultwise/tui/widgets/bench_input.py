"""The one text field every screen uses: an Input that follows the bench's cursor setting."""

from __future__ import annotations

from textual.widgets import Input


class BenchInput(Input):
    """An Input whose cursor blinks unless the settings say not (snapshot tests)."""

    def on_mount(self) -> None:
        settings = getattr(getattr(self.app, "bench", None), "settings", None)
        if settings is not None and not settings.cursor_blink:
            self.cursor_blink = False
