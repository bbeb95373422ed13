"""Update widgets in place, only where something changed (the walk step's redraw budget).

A walk step changes a few lines of the screen. Every ``Static.update`` marks its widget for
a repaint (and, by default, the screen for a new layout), and every class change restyles
the widget: done for all widgets on every step, that work alone takes longer than the step
itself. :func:`set_text` skips a text that is unchanged (Textual already skips a class or a
``display`` set to what it is). ``layout=False`` is for a widget whose size cannot change
with its text (a fixed height and width in its CSS).
"""

from __future__ import annotations

from textual.content import Content
from textual.widgets import Static


def same_text(a: object, b: object) -> bool:
    """Whether two contents look the same: text and styles (``Content ==`` compares the
    text only)."""
    if isinstance(a, Content) and isinstance(b, Content):
        return a.plain == b.plain and a.spans == b.spans
    return type(a) is type(b) and a == b


def set_text(widget: Static, content: str | Content, *, layout: bool = True) -> bool:
    """``widget.update(content)`` unless it already shows that; True when it was updated."""
    if same_text(widget.content, content):
        return False
    widget.update(content, layout=layout)
    return True

