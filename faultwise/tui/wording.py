"""Sentences from the walk, put in the bench's words: node ids become their titles.

The walk's warnings and explanations name nodes by id (``supply.hum-ripple``); on the
bench screen the check's title is what the technician knows it by. Ids the knowledge does
not hold are left as they are.
"""

from __future__ import annotations

import re

NODE_ID = re.compile(r"\b[a-z][a-z0-9_-]*(?:\.[a-z0-9][a-z0-9_-]*)+")


def readable(text: str | None, knowledge) -> str:
    """``text`` with every node id the knowledge knows replaced by that node's title."""
    if not text:
        return ""
    nodes = getattr(knowledge, "nodes", None) or {}

    def title(match: re.Match) -> str:
        node = nodes.get(match.group(0))
        return getattr(node, "title", None) or match.group(0)

    return NODE_ID.sub(title, text)


def bench_sentence(exc) -> str:
    """A refusal as the bench shows it under a field: the message and what to do, without
    the file/node/key location (the technician is looking at the check itself)."""
    message = str(getattr(exc, "message", None) or exc).rstrip(".") + "."
    hint = getattr(exc, "hint", None)
    if hint:
        hint = hint.rstrip(".")
        message += " " + hint[:1].upper() + hint[1:] + "."
    return message
