"""SQLite index beside the cases: one compact summary per case file, keyed by its stat.

``<cases>/.faultwise-index.sqlite`` maps each ``*.json`` file name to (size, mtime in
ns, inode) and the summary of :func:`faultwise.cases.summary.summarise` (or the reason the
file is damaged, from :func:`faultwise.cases.store.read_case_bytes`). A scan stats every file
(``os.scandir``) and parses only those whose stat differs from the index, so a review of
an unchanged folder reads the index alone.

The index is a cache and is never trusted: a file that is not a database, a database of
another shape, or another schema or summary version is removed and rebuilt; a row that does
not decode is re-parsed from its case file. A case file replaced while it is read (benches
write by temp file and rename, so a read sees the old or the new file) is cached only when
its stat did not change across the read; a damaged reading of a changing file is reported
for this run only. When the index cannot be written (read-only folder, another review
holding the lock) the scan still returns correct results, it just parses again next time.
"""

from __future__ import annotations

import json
import os
from dataclasses import dataclass
from pathlib import Path
from typing import Callable

from faultwise.cases.listing import DamagedFile
from faultwise.cases.codec import read_case_bytes
from faultwise.cases.summary import SUMMARY_VERSION, summarise
from faultwise.core.errors import DamagedCaseError

INDEX_NAME = ".faultwise-index.sqlite"
SCHEMA = f"faultwise-index/1+summary/{SUMMARY_VERSION}"
PROGRESS_EVERY = 250

Progress = Callable[[int, int], None]


Damaged = DamagedFile      # older name of the one damaged-file record


@dataclass(frozen=True)
class Scan:
    """Every readable case's summary (file-name order), the damaged files, and the counts."""

    summaries: tuple[dict, ...]
    damaged: tuple[DamagedFile, ...]
    parsed: int                   # files read and parsed in this run
    from_index: int               # files answered from the index
    index_note: str = ""          # why the index was rebuilt or not written, if it was
    rebuilt: bool = False


def folder_generation(cases_dir: str | os.PathLike) -> str:
    """``sha256:<hex>`` over every case file's (name, size, mtime ns, inode) and the schema.

    Changes whenever a case file is added, removed, rewritten or replaced: the stat the
    index keys its rows by, so what the index would re-read also changes the generation.
    """
    import hashlib

    digest = hashlib.sha256(SCHEMA.encode("utf-8") + b"\0")
    for name, size, mtime_ns, ino in _case_entries(Path(cases_dir)):
        digest.update(f"{name}\0{size}\0{mtime_ns}\0{ino}\n".encode("utf-8"))
    return "sha256:" + digest.hexdigest()


def index_path(cases_dir: str | os.PathLike) -> Path:
    """Where the index of a cases folder lives."""
    return Path(cases_dir) / INDEX_NAME


def _case_entries(cases_dir: Path) -> list[tuple[str, int, int, int]]:
    """(name, size, mtime_ns, inode) of every ``*.json`` file, hidden and temp files aside.

    Subfolders are read too (a shop that files old jobs by year keeps them in the review):
    the name is then the path relative to the cases folder with '/' separators, which is
    also the index's key. Hidden folders and links to folders are not entered.
    """
    out: list[tuple[str, int, int, int]] = []
    pending = [(cases_dir, "")]
    while pending:
        folder, prefix = pending.pop()
        try:
            it = os.scandir(folder)
        except (FileNotFoundError, NotADirectoryError, PermissionError):
            continue
        with it:
            for entry in it:
                name = entry.name
                if name.startswith("."):
                    continue
                try:
                    if entry.is_dir(follow_symlinks=False):
                        pending.append((Path(entry.path), prefix + name + "/"))
                        continue
                    if not name.endswith(".json") or not entry.is_file():
                        continue
                    st = entry.stat()
                except OSError:
                    continue  # removed between listing and stat
                out.append((prefix + name, st.st_size, st.st_mtime_ns, st.st_ino))
    out.sort()
    return out


def case_entries(cases_dir: Path) -> list[tuple[str, int, int, int]]:
    """The listing the review uses, for other readers of a cases folder (replay)."""
    return _case_entries(Path(cases_dir))


def read_one(path: str | Path, key: tuple[int, int, int]
             ) -> tuple[dict | None, str | None, bool]:
    """Parse one case file -> (summary, damage reason, whether the result may be cached)."""
    path = os.fspath(path)
    try:
        with open(path, "rb") as fh:
            raw = fh.read()
    except FileNotFoundError:
        return None, None, False        # removed since the listing: not a case any more
    except OSError as exc:
        return None, f"unreadable: {exc.strerror}", False
    try:
        summary = summarise(read_case_bytes(raw, path), os.path.basename(path))
    except DamagedCaseError as exc:
        try:
            st = os.stat(path)
            stable = (st.st_size, st.st_mtime_ns, st.st_ino) == key and len(raw) == key[0]
        except OSError:
            stable = False
        return None, exc.reason, stable
    return summary, None, len(raw) == key[0]


class _Store:
    """The SQLite file; every failure to open or trust it leads to a rebuild or to no index."""

    def __init__(self, path: Path) -> None:
        import sqlite3

        self.sqlite3 = sqlite3
        self.path = path
        self.con = None
        self.note = ""
        self.rebuilt = False

    def open(self) -> dict[str, tuple]:
        """Connect and return the rows by name; rebuild when the file is not our index."""
        try:
            self.con = self._connect()
            return self._rows()
        except self.sqlite3.Error as exc:   # not a database, other schema, malformed
            if _busy(exc):                  # another review is writing it: not damaged
                self.note = f"index not used ({exc})"
                self.close()
                return {}
            self.note = f"index rebuilt ({exc})"
        except _Stale as exc:
            self.note = f"index rebuilt ({exc})"
        self.close()
        self.rebuilt = True
        try:
            for suffix in ("", "-journal", "-wal", "-shm"):
                try:
                    os.remove(str(self.path) + suffix)
                except FileNotFoundError:
                    pass
            self.con = self._connect()
            self._create()
        except (OSError, self.sqlite3.Error) as exc:
            self.note = f"index not used ({exc})"
            self.close()
        return {}

    def _connect(self):
        con = self.sqlite3.connect(str(self.path), timeout=2.0, isolation_level=None)
        # A rollback journal (not WAL): the cases folder may be a network share.
        con.execute("PRAGMA journal_mode=DELETE")
        con.execute("PRAGMA synchronous=NORMAL")
        return con

    def _create(self) -> None:
        con = self.con
        con.execute("BEGIN IMMEDIATE")
        con.execute("CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL)")
        con.execute("CREATE TABLE IF NOT EXISTS cases (name TEXT PRIMARY KEY, size INTEGER, "
                    "mtime_ns INTEGER, ino INTEGER, summary TEXT, damaged TEXT)")
        con.execute("INSERT OR REPLACE INTO meta VALUES ('schema', ?)", (SCHEMA,))
        con.execute("COMMIT")

    def _rows(self) -> dict[str, tuple]:
        con = self.con
        tables = {r[0] for r in con.execute("SELECT name FROM sqlite_master WHERE type='table'")}
        if not tables:
            self._create()       # a new, empty file
            return {}
        if not {"meta", "cases"} <= tables:
            raise _Stale("not a faultwise index")
        row = con.execute("SELECT value FROM meta WHERE key='schema'").fetchone()
        if row is None or row[0] != SCHEMA:
            raise _Stale(f"schema {row[0] if row else 'missing'!r}, expected {SCHEMA!r}")
        return {r[0]: r[1:] for r in
                con.execute("SELECT name, size, mtime_ns, ino, summary, damaged FROM cases")}

    def write(self, upserts: list[tuple], removed: list[str]) -> None:
        """One transaction: the new and changed rows in, the removed ones out."""
        if self.con is None or (not upserts and not removed):
            return
        con = self.con
        try:
            con.execute("BEGIN IMMEDIATE")
            con.executemany("INSERT OR REPLACE INTO cases VALUES (?, ?, ?, ?, ?, ?)", upserts)
            con.executemany("DELETE FROM cases WHERE name = ?", [(n,) for n in removed])
            con.execute("COMMIT")
        except self.sqlite3.Error as exc:   # locked by another review, read-only folder
            self.note = self.note or f"index not updated ({exc})"
            try:
                con.execute("ROLLBACK")
            except self.sqlite3.Error:
                pass

    def close(self) -> None:
        if self.con is not None:
            try:
                self.con.close()
            except self.sqlite3.Error:
                pass
            self.con = None


def _busy(exc: Exception) -> bool:
    """Whether an SQLite error means "in use by another connection" rather than damage."""
    name = getattr(exc, "sqlite_errorname", "") or ""
    return name.startswith(("SQLITE_BUSY", "SQLITE_LOCKED")) or "locked" in str(exc)


class _Stale(Exception):
    """The file is a database, but not this version of the index."""


def _cached(row: tuple, key: tuple) -> tuple[dict | None, str | None] | None:
    """The row's (summary, damage) when its stat matches and it decodes, else None."""
    if tuple(row[:3]) != key:
        return None
    summary_text, damaged = row[3], row[4]
    if damaged is not None:
        return (None, damaged) if isinstance(damaged, str) else None
    try:
        summary = json.loads(summary_text)
    except (TypeError, ValueError):
        return None
    return (summary, None) if isinstance(summary, dict) else None


def scan_cases(cases_dir: str | os.PathLike, *, use_index: bool = True,
               progress: Progress | None = None) -> Scan:
    """Summaries of every case file in the folder, through the index where it is current."""
    import gc

    # A bulk load makes many objects that live on: the cycle collector would walk them
    # again and again for nothing (parsed cases are freed by reference counting).
    collecting = gc.isenabled()
    gc.disable()
    try:
        return _scan(Path(cases_dir), use_index, progress)
    finally:
        if collecting:
            gc.enable()


def _scan(cases_dir: Path, use_index: bool, progress: Progress | None) -> Scan:
    entries = _case_entries(cases_dir)
    store = None
    rows: dict[str, tuple] = {}
    if use_index and cases_dir.is_dir():
        store = _Store(index_path(cases_dir))
        rows = store.open()
    summaries: list[dict] = []
    damaged: list[DamagedFile] = []
    upserts: list[tuple] = []
    parsed = hits = 0
    total = len(entries)
    dumps = json.JSONEncoder(separators=(",", ":"), ensure_ascii=False).encode
    folder = os.fspath(cases_dir)
    for i, (name, size, mtime_ns, ino) in enumerate(entries):
        key = (size, mtime_ns, ino)
        row = rows.get(name)
        hit = _cached(row, key) if row is not None else None
        if hit is not None:
            hits += 1
            summary, reason = hit
        else:
            parsed += 1
            summary, reason, cacheable = read_one(os.path.join(folder, name), key)
            if summary is None and reason is None:
                continue                 # vanished
            if cacheable and store is not None:
                upserts.append((name, size, mtime_ns, ino,
                                None if summary is None else dumps(summary),
                                reason))
        if summary is not None:
            summaries.append(summary)
        else:
            damaged.append(DamagedFile(name, reason))
        if progress is not None and i % PROGRESS_EVERY == 0:
            progress(i, total)
    note = ""
    rebuilt = False
    if store is not None:
        present = {e[0] for e in entries}
        removed = [n for n in rows if n not in present]
        store.write(upserts, removed)
        note, rebuilt = store.note, store.rebuilt
        store.close()
    if progress is not None:
        progress(total, total)
    return Scan(tuple(summaries), tuple(damaged), parsed, hits, note, rebuilt)
