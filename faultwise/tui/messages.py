"""Messages the app sends to its screens."""

from __future__ import annotations

from textual.message import Message


class KnowledgeReady(Message):
    """The knowledge folder has been loaded into ``bench.knowledge``."""
