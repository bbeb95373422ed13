"""Text from files and people made safe to show: no control sequence reaches a terminal.

A note, complaint or finding may hold a pasted escape sequence ("ESC [ 2 J" clears a screen,
OSC 52 writes the clipboard; ECMA-48 / ISO 6429). Every place that shows such text passes it
through :func:`shown_text` (multi-line) or :func:`one_line` (messages, table cells). The
record itself is never altered: only what is shown.
"""

from __future__ import annotations

import unicodedata

_KEEP = {"\n", "\t"}


def _visible(c: str) -> str:
    """A control character as a visible escape (``\\x1b``), never the character itself."""
    return c.encode("unicode_escape").decode("ascii")


def _is_control(c: str) -> bool:
    return unicodedata.category(c) in ("Cc", "Cf", "Zl", "Zp") or c == "\x7f"


def shown_text(text) -> str:
    """``text`` with every control character but newline and tab shown as an escape."""
    return "".join(_visible(c) if c not in _KEEP and _is_control(c) else c for c in str(text))


def one_line(text) -> str:
    """``text`` on one line: runs of white space folded, control characters escaped."""
    return " ".join(shown_text(text).split())
