"""The SQLite index beside the cases: picked-up changes, rebuilds, and no re-parsing.

The oracle is the cases folder itself: every scan through the index must return exactly
what a scan without the index returns (``use_index=False`` parses every file).
"""

from __future__ import annotations

import json
import os
import sqlite3
from pathlib import Path

import pytest

import faultwise.cases.index as index_mod
from faultwise.cases.index import INDEX_NAME, SCHEMA, scan_cases
from review_case_factory import make_case, write_case


def _cases(n: int = 5) -> list[dict]:
    return [make_case(f"2026030{i}-B1-00{i}", symptom="hum-loud",
                      checks=[("supply.first-cap-esr", "bad")], fault="supply.dry-first-cap",
                      day=i, minutes=20 + i) for i in range(1, n + 1)]


@pytest.fixture()
def folder(tmp_path: Path) -> Path:
    for case in _cases():
        write_case(tmp_path, case)
    return tmp_path


@pytest.fixture()
def parses(monkeypatch) -> list[str]:
    """Every case file the index parses (its reader is wrapped to count)."""
    seen: list[str] = []
    real = index_mod.read_case_bytes

    def counting(raw, file="case"):
        seen.append(Path(str(file)).name)
        return real(raw, file)

    monkeypatch.setattr(index_mod, "read_case_bytes", counting)
    return seen


def _same_as_plain_scan(folder: Path, scan) -> None:
    plain = scan_cases(folder, use_index=False)
    assert scan.summaries == plain.summaries
    assert scan.damaged == plain.damaged


def test_second_scan_reads_only_the_index(folder, parses):
    first = scan_cases(folder)
    assert (first.parsed, first.from_index) == (5, 0)
    assert (folder / INDEX_NAME).is_file()
    parses.clear()
    second = scan_cases(folder)
    assert parses == []                                # no case file parsed
    assert (second.parsed, second.from_index) == (0, 5)
    assert second.summaries == first.summaries


def test_changed_added_removed_are_picked_up(folder, parses):
    scan_cases(folder)
    changed = _cases()[1]
    changed["minutes"] = 99
    changed["conclusion"] = {"fault": "audio.leaky-coupling-cap", "title": "", "stage": "audio"}
    write_case(folder, changed)
    added = make_case("20260309-B2-001", symptom="dead-lights-on", fault="audio.weak-output")
    write_case(folder, added)
    os.remove(folder / f"{_cases()[0]['id']}.json")
    parses.clear()
    scan = scan_cases(folder)
    assert sorted(parses) == sorted([f"{changed['id']}.json", f"{added['id']}.json"])
    by_id = {s["id"]: s for s in scan.summaries}
    assert by_id[changed["id"]]["minutes"] == 99
    assert by_id[changed["id"]]["fault"] == "audio.leaky-coupling-cap"
    assert added["id"] in by_id
    assert _cases()[0]["id"] not in by_id
    _same_as_plain_scan(folder, scan)
    con = sqlite3.connect(folder / INDEX_NAME)
    names = {r[0] for r in con.execute("SELECT name FROM cases")}
    con.close()
    assert f"{_cases()[0]['id']}.json" not in names     # the removed row is gone too


def test_replaced_file_with_same_size_and_mtime_is_picked_up(folder, parses):
    # A bench replaces a case by temp file + rename: a new inode, even when size and mtime
    # happen to match (here forced with os.utime).
    scan_cases(folder)
    path = folder / f"{_cases()[2]['id']}.json"
    st = path.stat()
    text = path.read_text()
    new = text.replace('"minutes": 23', '"minutes": 87')
    assert len(new) == len(text)
    tmp = folder / ".replace.fwtmp"
    tmp.write_text(new)
    os.replace(tmp, path)
    os.utime(path, ns=(st.st_atime_ns, st.st_mtime_ns))
    parses.clear()
    scan = scan_cases(folder)
    assert parses == [path.name]
    assert {s["id"]: s["minutes"] for s in scan.summaries}[_cases()[2]["id"]] == 87


@pytest.mark.parametrize("damage", ["random bytes", "other schema", "other database"])
def test_damaged_or_stale_index_is_rebuilt(folder, parses, damage):
    scan_cases(folder)
    ipath = folder / INDEX_NAME
    if damage == "random bytes":
        ipath.write_bytes(os.urandom(4096))
    elif damage == "other schema":
        con = sqlite3.connect(ipath)
        con.execute("UPDATE meta SET value = 'faultwise-index/0' WHERE key = 'schema'")
        con.commit()
        con.close()
    else:
        ipath.unlink()
        con = sqlite3.connect(ipath)
        con.execute("CREATE TABLE notes (text TEXT)")
        con.commit()
        con.close()
    parses.clear()
    scan = scan_cases(folder)
    assert scan.rebuilt and "rebuilt" in scan.index_note
    assert len(parses) == 5                          # nothing trusted
    _same_as_plain_scan(folder, scan)
    con = sqlite3.connect(ipath)
    assert con.execute("SELECT value FROM meta WHERE key='schema'").fetchone()[0] == SCHEMA
    con.close()
    parses.clear()
    again = scan_cases(folder)
    assert parses == [] and not again.rebuilt


def test_undecodable_row_is_parsed_again(folder, parses):
    scan_cases(folder)
    name = f"{_cases()[3]['id']}.json"
    con = sqlite3.connect(folder / INDEX_NAME)
    con.execute("UPDATE cases SET summary = '{not json' WHERE name = ?", (name,))
    con.commit()
    con.close()
    parses.clear()
    scan = scan_cases(folder)
    assert parses == [name]
    _same_as_plain_scan(folder, scan)


def test_stable_damaged_file_is_cached_and_reported(folder, parses):
    (folder / "broken.json").write_bytes(b'{"format": "faultwise-case/1", "id": ')
    first = scan_cases(folder)
    assert [(d.file, d.reason) for d in first.damaged] == [("broken.json", "truncated")]
    parses.clear()
    second = scan_cases(folder)
    assert parses == []
    assert second.damaged == first.damaged
    # Repaired by hand: picked up as a good case.
    write_case(folder, make_case("broken", symptom="hum-loud"))
    third = scan_cases(folder)
    assert third.damaged == ()
    assert "broken" in {s["id"] for s in third.summaries}


def test_file_changing_during_the_scan_is_not_cached(folder, monkeypatch, parses):
    # The listing saw one stat, then a bench replaced the file before it was read: the
    # result is used for this run, but not stored under the stale stat.
    path = folder / "20260310-B1-001.json"
    path.write_bytes(b'{"format": "faultwise-case/1"')          # half-written at listing
    real_entries = index_mod._case_entries

    def listing_then_replace(d):
        entries = real_entries(d)
        write_case(folder, make_case("20260310-B1-001", symptom="hum-loud"))
        return entries

    monkeypatch.setattr(index_mod, "_case_entries", listing_then_replace)
    scan = scan_cases(folder)
    assert "20260310-B1-001" in {s["id"] for s in scan.summaries}   # new content was read
    con = sqlite3.connect(folder / INDEX_NAME)
    stored = con.execute("SELECT COUNT(*) FROM cases WHERE name = ?", (path.name,)).fetchone()
    con.close()
    assert stored == (0,)                 # not stored under the listing's stale stat
    monkeypatch.setattr(index_mod, "_case_entries", real_entries)
    parses.clear()
    again = scan_cases(folder)
    assert parses == [path.name]          # stale stat not trusted: parsed again
    assert again.damaged == ()


def test_damaged_reading_of_a_changing_file_is_for_this_run_only(folder):
    path = folder / "x.json"
    path.write_bytes(b'{"format": "faultwise-case/1", ')
    st = path.stat()
    summary, reason, cacheable = index_mod.read_one(path, (st.st_size + 7, st.st_mtime_ns,
                                                           st.st_ino))
    assert summary is None and reason == "truncated" and cacheable is False
    summary, reason, cacheable = index_mod.read_one(path, (st.st_size, st.st_mtime_ns, st.st_ino))
    assert cacheable is True


def test_hidden_temp_and_lock_files_are_not_cases(folder):
    (folder / ".20260301-B1-001.host.123.abc.fwtmp").write_text("{")
    (folder / "20260301-B1-001.lock").write_text("")
    (folder / ".hidden.json").write_text("{")
    scan = scan_cases(folder)
    assert scan.damaged == () and len(scan.summaries) == 5


def test_read_only_folder_still_scans(folder, monkeypatch):
    # An index that cannot be written leaves the results right; it just is not stored.
    def refuse(self, *a, **k):
        raise sqlite3.OperationalError("attempt to write a readonly database")

    monkeypatch.setattr(index_mod._Store, "_connect", refuse)
    scan = scan_cases(folder)
    assert "not used" in scan.index_note
    _same_as_plain_scan(folder, scan)


def test_summary_is_compact_json(folder):
    scan_cases(folder)
    con = sqlite3.connect(folder / INDEX_NAME)
    rows = con.execute("SELECT summary FROM cases").fetchall()
    con.close()
    assert len(rows) == 5
    for (text,) in rows:
        data = json.loads(text)
        assert data["symptom"] == "hum-loud"
        assert text == json.dumps(data, separators=(",", ":"))     # no indentation or spaces


def test_benches_writing_while_reviews_run(folder):
    # Benches replace case files atomically (temp file + rename) while two reviews scan:
    # every scan sees each case old or new, never damaged, and no scan fails. Bounded:
    # 60 rewrites, then the writer stops.
    import threading

    stop = threading.Event()
    errors: list[BaseException] = []

    def bench() -> None:
        try:
            for i in range(60):
                case = _cases()[i % 5]
                case["minutes"] = 100 + i
                tmp = folder / f".{case['id']}.w.{i}.fwtmp"
                tmp.write_text(json.dumps(case, indent=2))
                os.replace(tmp, folder / f"{case['id']}.json")
        except BaseException as exc:  # pragma: no cover - reported below
            errors.append(exc)
        finally:
            stop.set()

    def review(results: list) -> None:
        try:
            while not stop.is_set():
                results.append(scan_cases(folder))
            results.append(scan_cases(folder))
        except BaseException as exc:  # pragma: no cover - reported below
            errors.append(exc)

    results_a: list = []
    results_b: list = []
    threads = [threading.Thread(target=bench), threading.Thread(target=review, args=(results_a,)),
               threading.Thread(target=review, args=(results_b,))]
    for t in threads:
        t.start()
    for t in threads:
        t.join(timeout=60)
    assert not errors
    for scan in results_a + results_b:
        assert scan.damaged == () and len(scan.summaries) == 5
    final = scan_cases(folder)
    _same_as_plain_scan(folder, final)
    assert max(s["minutes"] for s in final.summaries) == 159


def test_index_locked_by_another_review_is_not_rebuilt(folder, monkeypatch):
    # Another review holds the write lock for longer than the wait: this scan parses the
    # files itself and leaves the index alone (a busy index is not a damaged one).
    scan_cases(folder)
    monkeypatch.setattr(index_mod._Store, "_connect", lambda self: self._locked())

    def locked(self):
        con = sqlite3.connect(str(self.path), timeout=0.05, isolation_level=None)
        con.execute("PRAGMA journal_mode=DELETE")
        return con

    monkeypatch.setattr(index_mod._Store, "_locked", locked, raising=False)
    holder = sqlite3.connect(folder / INDEX_NAME, isolation_level=None)
    holder.execute("BEGIN EXCLUSIVE")
    try:
        scan = scan_cases(folder)
    finally:
        holder.execute("ROLLBACK")
        holder.close()
    assert not scan.rebuilt and "not used" in scan.index_note
    _same_as_plain_scan(folder, scan)
    assert scan_cases(folder).parsed == 0           # the index is still there and current
