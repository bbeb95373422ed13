"""The project's own exceptions. Each carries where the problem is and what to do about it.

Nothing below the CLI and the TUI prints: they raise one of these, and the edges turn it
into one clear sentence (CLI: stderr and exit status 1; TUI: a toast or a modal).
"""

from __future__ import annotations


class FaultwiseError(Exception):
    """A problem a technician can act on, with its location.

    ``file``, ``line``, ``key`` and ``node`` are each optional; ``hint`` says what to do.
    """

    def __init__(
        self,
        message: str,
        *,
        file: str | None = None,
        line: int | None = None,
        key: str | None = None,
        node: str | None = None,
        hint: str | None = None,
    ) -> None:
        super().__init__(message)
        self.message = message
        self.file = None if file is None else str(file)
        self.line = line
        self.key = key
        self.node = node
        self.hint = hint

    def location(self) -> str:
        """``file:line, key 'k', node 'n'`` or an empty string."""
        parts: list[str] = []
        if self.file:
            parts.append(self.file + (f":{self.line}" if self.line else ""))
        elif self.line:
            parts.append(f"line {self.line}")
        if self.node:
            parts.append(f"node '{self.node}'")
        if self.key:
            parts.append(f"key '{self.key}'")
        return ", ".join(parts)

    def __str__(self) -> str:
        where = self.location()
        text = f"{where}: {self.message}" if where else self.message
        text = text.rstrip(".") + "."
        if self.hint:
            hint = self.hint.rstrip(".")
            text += " " + hint[:1].upper() + hint[1:] + "."
        return text


class InputError(FaultwiseError):
    """A reading or value typed by a person could not be understood."""


class ProfileError(FaultwiseError):
    """A set profile is malformed or impossible."""


class KnowledgeError(FaultwiseError):
    """The knowledge folder (graph, symptoms, cautions, tubes) is malformed."""


class CaseError(FaultwiseError):
    """A case file cannot be read, written or opened."""


class CaseLockedError(CaseError):
    """The case is open at another bench."""

    def __init__(self, message: str, *, bench: str | None = None, **kw) -> None:
        super().__init__(message, **kw)
        self.bench = bench


class DamagedCaseError(CaseError):
    """A case file exists but is damaged; it is reported and never overwritten."""


class WalkError(FaultwiseError):
    """An action that does not apply to the walk's current state."""


class MissingAnswerError(InputError):
    """A screenless walk reached a check its answers file does not answer.

    ``section`` is where the answer belongs (``readings`` or ``observations``), ``key`` the
    name to write there, ``accepts`` the answers the check takes, ``title`` its title.
    """

    def __init__(self, message: str, *, section: str, accepts: tuple[str, ...],
                 title: str = "", **kw) -> None:
        super().__init__(message, **kw)
        self.section = section
        self.accepts = tuple(accepts)
        self.title = title
