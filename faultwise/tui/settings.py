"""The bench program's own small settings file (safety notice acknowledged, and when).

Kept in the user's config folder (``$XDG_CONFIG_HOME/faultwise/bench.json``, else
``~/.config/faultwise/bench.json``), not among the cases, so the case store never sees it.
``Settings(None)`` keeps everything in memory: tests start from a clean state with it.
"""

from __future__ import annotations

import json
import os
from pathlib import Path

from faultwise.core.atomic import atomic_write

FORMAT = "faultwise-bench-settings/1"


def default_settings_path() -> Path:
    """``$XDG_CONFIG_HOME/faultwise/bench.json`` (XDG Base Directory), else ``~/.config/...``."""
    base = os.environ.get("XDG_CONFIG_HOME") or str(Path.home() / ".config")
    return Path(base) / "faultwise" / "bench.json"


class Settings:
    """Read once at start; ``acknowledge_safety`` writes through (best effort)."""

    def __init__(self, path: Path | None = None, *, safety_acknowledged: str | None = None,
                 cursor_blink: bool = True, caution_guard_s: float | None = None) -> None:
        from faultwise.tui.screens.caution import GUARD_S

        self.path = path
        self.safety_acknowledged = safety_acknowledged
        self.cursor_blink = cursor_blink          # off for deterministic screenshots
        # Keys are ignored this long after a caution opens (tests of other flows shorten it).
        self.caution_guard_s = GUARD_S if caution_guard_s is None else caution_guard_s
        self.write_error: str | None = None

    @classmethod
    def load(cls, path: Path) -> "Settings":
        """Settings from ``path``; a missing or unreadable file gives a clean state."""
        try:
            data = json.loads(path.read_text(encoding="utf-8"))
        except (OSError, ValueError):
            return cls(path)
        ack = data.get("safety_acknowledged") if isinstance(data, dict) else None
        return cls(path, safety_acknowledged=ack if isinstance(ack, str) else None)

    def acknowledge_safety(self, when_iso: str) -> None:
        """Remember that the safety notice was read; a failed write is kept for a toast."""
        self.safety_acknowledged = when_iso
        self.write_error = None
        if self.path is None:
            return
        try:
            self.path.parent.mkdir(parents=True, exist_ok=True)
            atomic_write(self.path, json.dumps({"format": FORMAT,
                                                "safety_acknowledged": when_iso}, indent=2) + "\n")
        except OSError as exc:
            self.write_error = f"{self.path}: {exc.strerror or exc}"
