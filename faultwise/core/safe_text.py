"""Text from files and people made safe to show: no control sequence reaches a terminal.

A note, complaint or finding may hold a pasted escape sequence ("ESC [ 2 J" clears a screen,
OSC 52 writes the clipboard; ECMA-48 / ISO 6429). Every place that shows such text passes it
through :func:`shown_text` (multi-line) or :func:`one_line` (messages, table cells): C0
controls become the Unicode control pictures (ESC -> U+241B), DEL U+2421, C1 controls (the
8-bit CSI 0x9B...) U+FFFD. Tab and newline are kept. The record itself is never altered:
only what is shown.
"""

from __future__ import annotations

import re

CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f-\x9f]")


def _picture(match: re.Match) -> str:
    code = ord(match.group(0))
    if code < 0x20:
        return chr(0x2400 + code)
    return "\u2421" if code == 0x7F else "\ufffd"


def shown_text(text: object) -> str:
    """``text`` with every control character but newline and tab made visible and harmless."""
    return CONTROL.sub(_picture, str(text))


def one_line(text: object) -> str:
    """``text`` on one line: runs of white space folded, control characters made visible."""
    return " ".join(shown_text(text).split())
