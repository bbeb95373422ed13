"""Domain text put in the bench's words: ids become titles, locations are dropped.

The walk's own sentences already name checks and complaints by title. What still carries
ids is text made for the command line, where an id is useful: the shop review's order
lines, a refusal's location. On the bench screen the title is what the technician knows
a check by, so :func:`readable` swaps the ids it knows for titles (unknown ids are left as
they are) and :func:`bench_sentence` drops the file/node/key location.
"""

from __future__ import annotations

import re
from typing import TYPE_CHECKING

from faultwise.core.safe_text import shown_text as printable  # noqa: F401  (re-exported)

if TYPE_CHECKING:       # the start screen uses these before the knowledge code is loaded
    from faultwise.graph.knowledge import Knowledge

NODE_ID = re.compile(r"\b[a-z][a-z0-9_-]*(?:\.[a-z0-9][a-z0-9_-]*)+")


QUOTED_ID = re.compile(r"'([a-z][a-z0-9-]*)'")


def readable(text: str | None, knowledge: Knowledge | None) -> str:
    """``text`` with every node id the knowledge knows replaced by that node's title, and
    every quoted symptom id (``'hum-loud'``) by the symptom's title."""
    if not text:
        return ""
    nodes = getattr(knowledge, "nodes", None) or {}
    symptoms = getattr(knowledge, "symptoms", None) or {}

    def title(match: re.Match) -> str:
        node = nodes.get(match.group(0))
        return getattr(node, "title", None) or match.group(0)

    def symptom(match: re.Match) -> str:
        found = symptoms.get(match.group(1))
        return f"'{found.title}'" if getattr(found, "title", None) else match.group(0)

    return QUOTED_ID.sub(symptom, NODE_ID.sub(title, text))


def bench_sentence(exc: BaseException) -> str:
    """A refusal as the bench shows it under a field: the message and what to do, without
    the file/node/key location (the technician is looking at the check itself)."""
    message = str(getattr(exc, "message", None) or exc).rstrip(".") + "."
    hint = getattr(exc, "hint", None)
    if hint:
        hint = hint.rstrip(".")
        message += " " + hint[:1].upper() + hint[1:] + "."
    return message


def node_title(knowledge: Knowledge | None, node_id: object) -> str:
    """The node's title when the knowledge has it, else the id as recorded."""
    nodes = getattr(knowledge, "nodes", None) or {}
    node = nodes.get(node_id) if node_id else None
    return getattr(node, "title", None) or str(node_id or "")


def symptom_title(knowledge: Knowledge | None, symptom_id: object) -> str:
    """The symptom's title when the knowledge has it, else the id as recorded."""
    symptoms = getattr(knowledge, "symptoms", None) or {}
    symptom = symptoms.get(symptom_id) if symptom_id else None
    return getattr(symptom, "title", None) or str(symptom_id or "")


def caution_title(knowledge: Knowledge | None, caution_id: object) -> str:
    """The caution's title when the knowledge has it, else the id as recorded."""
    cautions = getattr(knowledge, "cautions", None) or {}
    caution = cautions.get(caution_id) if caution_id else None
    return getattr(caution, "title", None) or str(caution_id or "")


def internal_error(exc: BaseException) -> str:
    """The sentence shown for an unexpected exception (never a traceback)."""
    return (f"Internal error ({type(exc).__name__}: {exc}). Nothing saved was lost; the step "
            "was not recorded. Please report it.")
