"""Atomic file writes: the one helper behind case files, learned counts and bench settings.

A file is replaced whole through a temp file in the same folder: write, flush, fsync the
temp, rename it over the target (atomic on POSIX and on Windows' ``os.replace``), then fsync
the folder so the rename itself survives a power cut. A crash leaves the old file or the new
one, never half of one. Temp names are unique (``.<prefix>.<random hex>.fwtmp``): two
writers never share one, and a stale temp from a crashed writer never blocks the next write.
Errors are ``OSError`` for the caller to turn into its own located message; on an error the
temp is removed and the target is left as it was.
"""

from __future__ import annotations

import os
import secrets
from pathlib import Path

__all__ = ["TEMP_SUFFIX", "atomic_write", "fsync_dir", "write_temp"]

TEMP_SUFFIX = ".fwtmp"


def fsync_dir(folder: str | Path) -> None:
    """fsync a folder (makes a rename in it durable); silent where folders cannot be synced."""
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass          # some filesystems do not sync folders
    finally:
        os.close(fd)


def write_temp(folder: str | Path, prefix: str, payload: bytes) -> Path:
    """A new temp file ``.<prefix>.<hex>.fwtmp`` in ``folder`` holding ``payload``, fsynced."""
    tmp = Path(folder) / f".{prefix}.{secrets.token_hex(6)}{TEMP_SUFFIX}"
    fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o644)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(payload)
            fh.flush()
            os.fsync(fh.fileno())
    except BaseException:
        try:
            tmp.unlink()
        except OSError:
            pass
        raise
    return tmp


def atomic_write(path: str | Path, payload: bytes | str, *, temp_prefix: str | None = None) -> None:
    """Replace ``path`` with ``payload`` (str is written as UTF-8) as the module doc says."""
    path = Path(path)
    data = payload.encode("utf-8") if isinstance(payload, str) else bytes(payload)
    tmp: Path | None = write_temp(path.parent, temp_prefix or path.name, data)
    try:
        os.replace(tmp, path)
        tmp = None
    finally:
        if tmp is not None:
            try:
                tmp.unlink()
            except OSError:
                pass
    fsync_dir(path.parent)
