"""The review of an unchanged shop, answered from a cache: no graph loaded, no share recomputed.

The index beside the cases (:mod:`faultwise.cases.index`, its ``meta`` table) holds the last
review (the ``review --json`` document) under a key made of:

- the **generation of the cases folder**: a SHA-256 over every case file's name, size,
  mtime (ns) and inode, the same stat the index keys its rows by
  (:func:`faultwise.cases.index.folder_generation`), and the index schema;
- the **knowledge hash**: :func:`faultwise.core.knowledge_version.content_version`, the
  bytes of the knowledge files (no YAML parsed);
- the review's options (``since``, ``reopen_days``) and :data:`CACHE_FORMAT`, bumped when
  the review's rules change.

Any difference recomputes the review and writes the cache again (one SQLite transaction,
best effort: a read-only folder or a busy index just recomputes next time). The cache is
never trusted beyond its key: an index of another schema or a document that does not decode
is ignored. It is JSON, not pickle: a cases folder may be shared, and a cache must not be
able to run code. No file is added to the cases folder.
"""

from __future__ import annotations

import hashlib
import json
import os
from datetime import date
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    import sqlite3

    from faultwise.shop.review_results import Review

__all__ = ["CACHE_FORMAT", "cache_key", "read_cached", "write_cached", "review_from_dict"]

CACHE_FORMAT = "faultwise-review-cache/1"


def cache_key(cases_dir: str | os.PathLike, knowledge_dir: str | os.PathLike, *,
              since: date | None, reopen_days: float) -> str:
    """The key a review of this folder with this knowledge and these options is kept under."""
    from faultwise.cases.index import folder_generation
    from faultwise.core.knowledge_version import content_version

    parts = [CACHE_FORMAT, folder_generation(cases_dir), content_version(knowledge_dir),
             since.isoformat() if since else "", repr(float(reopen_days))]
    return hashlib.sha256("\0".join(parts).encode("utf-8")).hexdigest()


def _connect(cases_dir: str | os.PathLike) -> sqlite3.Connection | None:
    import sqlite3

    from faultwise.cases.index import index_path

    path = index_path(cases_dir)
    if not path.is_file():
        return None
    return sqlite3.connect(str(path), timeout=2.0, isolation_level=None)


def read_cached(cases_dir: str | os.PathLike, key: str) -> dict | None:
    """The cached review document when the index holds one under this key, else None."""
    import sqlite3

    from faultwise.cases.index import SCHEMA

    try:
        con = _connect(cases_dir)
        if con is None:
            return None
        try:
            rows = dict(con.execute("SELECT key, value FROM meta WHERE key IN "
                                    "('schema', 'review_key', 'review')").fetchall())
        finally:
            con.close()
        if rows.get("schema") != SCHEMA or rows.get("review_key") != f"{CACHE_FORMAT} {key}":
            return None
        doc = json.loads(rows["review"])
    except (sqlite3.Error, OSError, KeyError, TypeError, ValueError):
        return None
    return doc if isinstance(doc, dict) else None


def write_cached(cases_dir: str | os.PathLike, key: str, review_doc: dict) -> bool:
    """Keep ``review_doc`` under ``key`` in the index; False when that cannot be done."""
    import sqlite3

    from faultwise.cases.index import SCHEMA

    payload = json.dumps(review_doc, separators=(",", ":"), ensure_ascii=False)
    try:
        con = _connect(cases_dir)
        if con is None:
            return False
        try:
            con.execute("BEGIN IMMEDIATE")
            row = con.execute("SELECT value FROM meta WHERE key='schema'").fetchone()
            if row is None or row[0] != SCHEMA:
                con.execute("ROLLBACK")
                return False
            con.executemany("INSERT OR REPLACE INTO meta VALUES (?, ?)",
                            [("review_key", f"{CACHE_FORMAT} {key}"), ("review", payload)])
            con.execute("COMMIT")
        finally:
            con.close()
    except (sqlite3.Error, OSError):
        return False
    return True


def review_from_dict(doc: dict) -> Review:
    """The :class:`faultwise.shop.review_results.Review` of a ``review_to_dict`` document."""
    from faultwise.cases.listing import DamagedFile
    from faultwise.shop.review_results import (FaultShare, FindingGroup, ListOrder,
                                               MonthMinutes, PairReview, Reopened, Review,
                                               SkippedCheck, SteadyCheck, UnreachedFault)

    def pair(p: dict) -> PairReview:
        return PairReview(
            p["symptom"], p["family"], p["cases"], p["concluded"],
            tuple(FaultShare(f["fault"], f["title"], f["count"], f["raw"], f["prior"],
                             f["smoothed"]) for f in p["faults"]),
            p["mean_checks"], p["mean_minutes"],
            tuple(ListOrder(o["suspects"], o["title"], o["weight"], tuple(o["current"]),
                            tuple(o["data"]), o["current_minutes"], o["data_minutes"])
                  for o in p["orders"]),
            p["current_minutes"], p["data_minutes"],
            tuple(SteadyCheck(c["check"], c["title"], c["outcome"], c["cases"])
                  for c in p["never_varied"]),
            p.get("note", ""))

    index = doc.get("index") or {}
    return Review(
        cases=doc["cases"],
        damaged=tuple(DamagedFile(d["file"], d["reason"]) for d in doc["damaged"]),
        since=doc["since"],
        pairs=tuple(pair(p) for p in doc["pairs"]),
        skipped=tuple(SkippedCheck(c["check"], c["title"], c["count"],
                                   tuple((r["reason"], r["count"]) for r in c["reasons"]))
                      for c in doc["skipped"]),
        off_graph=tuple(FindingGroup(g["finding"], tuple(g["variants"]), tuple(g["cases"]))
                        for g in doc["off_graph"]),
        never_reached=tuple(UnreachedFault(f["fault"], f["title"], f["stage"],
                                           tuple(f["families"]), tuple(f["symptoms"]))
                            for f in doc["never_reached"]),
        reopened=tuple(Reopened(r["case"], r["after"], r["rule"], r["days"])
                       for r in doc["reopened"]),
        months=tuple(MonthMinutes(m["month"], m["jobs"], m["mean_minutes"])
                     for m in doc["months"]),
        knowledge=doc.get("knowledge", ""),
        parsed=index.get("parsed", 0), from_index=index.get("from_index", 0),
        index_note=index.get("note", ""))
