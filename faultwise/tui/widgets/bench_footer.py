"""The key bar of the case screens: rebuilt only when the keys it shows have changed.

Textual's Footer rebuilds all its keys whenever the screen asks for its bindings to be
refreshed; a walk screen asks on every step and on every focus change, so the key bar was
rebuilt two or three times per step while showing the same keys. This one waits until the
step has been painted, compares what it would show with what it shows, and rebuilds only
on a difference (a key that now applies, or no longer does).
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.screen import Screen
from textual.widgets import Footer


class BenchFooter(Footer):
    """A Footer that rebuilds only when the shown keys change."""

    def __init__(self, **kwargs: object) -> None:
        super().__init__(**kwargs)
        self._shown: tuple | None = None        # what the last build showed
        self._check_pending = False

    def keys_shown(self) -> tuple:
        """What the bar shows: each shown key, its label and whether it applies now."""
        keys = tuple((binding.key, binding.description, binding.action, enabled, tooltip,
                      binding.group)
                     for _, binding, enabled, tooltip in self.screen.active_bindings.values()
                     if binding.show)
        return keys, self.show_command_palette, self.compact

    def compose(self) -> ComposeResult:
        built = 0
        for widget in super().compose():
            built += 1
            yield widget
        # recorded as built; nothing built (bindings not ready yet): the next change rebuilds
        self._shown = self.keys_shown() if built else None

    def bindings_changed(self, screen: Screen) -> None:
        if self._shown is None:
            super().bindings_changed(screen)
        elif not self._check_pending:
            self._check_pending = True
            self.call_after_refresh(self._check_keys, screen)

    def _check_keys(self, screen: Screen) -> None:
        self._check_pending = False
        if self.is_attached and self.keys_shown() != self._shown:
            super().bindings_changed(screen)
