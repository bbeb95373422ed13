"""A knowledge folder's content version, without parsing it (cheap: hashlib over the bytes).

``content_version`` is the ``knowledge`` field written into every case and the key the
review cache is kept under; :mod:`faultwise.graph.knowledge` re-exports both names. It lives
in core so that checking a cache does not import the graph.
"""

from __future__ import annotations

import hashlib
from pathlib import Path

__all__ = ["knowledge_files", "content_version"]


def knowledge_files(root: str | Path) -> list[Path]:
    """The files that make up a knowledge folder's content, in sorted order (graph sorted)."""
    root = Path(root)
    files = [root / "symptoms.yaml", root / "cautions.yaml"]
    files += sorted((root / "graph").glob("*.yaml"))
    files.append(root / "learned.yaml")
    return [f for f in files if f.is_file()]


def content_version(root: str | Path) -> str:
    """``sha256:<hex>`` over each file's path (relative to the folder) and bytes, sorted."""
    root = Path(root)
    digest = hashlib.sha256()
    for path in sorted(knowledge_files(root), key=lambda p: p.relative_to(root).as_posix()):
        digest.update(path.relative_to(root).as_posix().encode() + b"\0")
        digest.update(path.read_bytes())
        digest.update(b"\0")
    return "sha256:" + digest.hexdigest()
