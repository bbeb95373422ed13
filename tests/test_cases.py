"""The case store: ids, atomic saves, locks, damaged files, crash safety.

Outside facts relied on: POSIX rename(2) replaces the target atomically and O_EXCL
creation fails when the name exists (POSIX.1-2017, open() and rename()); SIGKILL cannot be
caught, so whatever is on disk when it lands is all there is; RFC 8259 JSON, read back with
the standard json module. Damaged files are compared by SHA-256 (hashlib) before and after.
"""

from __future__ import annotations

import errno
import hashlib
import json
import os
import random
import signal
import subprocess
import sys
import time
from datetime import UTC, datetime
from pathlib import Path

import helpers_walk_proc as H
import pytest

from faultwise.cases.store import CaseStore
from faultwise.cases.codec import CASE_KEYS, read_case_bytes
from faultwise.core.errors import CaseError, CaseLockedError, DamagedCaseError
from faultwise.walk.state import Walk

PY = sys.executable
HELPER = str(Path(__file__).parent / "helpers_walk_proc.py")
CLOCK = lambda: datetime(2026, 12, 1, 9, 30, tzinfo=UTC)


def sha(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def make_case(store, **kw):
    return store.new_case(H.series_profile(), "sets/series.yaml", "hums, then went dead",
                          "dead-lights-on", customer=kw.get("customer", "ticket 4411"),
                          knowledge_version="sha256:test")


@pytest.fixture
def store(tmp_path):
    return CaseStore(tmp_path / "cases", "B1", clock=CLOCK)


# ---------------------------------------------------------------- creating and saving

def test_new_case_id_file_and_key_order(store):
    case = make_case(store, customer="Zoë Ortiz")
    assert case.id == "20261201-B1-001"
    raw = case.path.read_bytes()
    assert raw.endswith(b"}\n")
    assert "Zoë".encode() in raw                 # ensure_ascii=False, UTF-8
    data = json.loads(raw)
    assert list(data) == list(CASE_KEYS)
    assert raw.startswith(b'{\n  "format": "faultwise-case/1",\n  "id"')   # indent 2
    assert data["family"] == "series-string" and data["status"] == "open"
    assert data["set"]["profile"]["family"] == "series-string"
    case.close()
    second = make_case(store)
    assert second.id == "20261201-B1-002"
    second.close()


def test_next_number_skips_a_name_taken_meanwhile(store, tmp_path):
    # Another bench process got 001 first (the file exists): O_EXCL/link refuse it and the
    # store moves on to the next number.
    folder = tmp_path / "cases"
    folder.mkdir()
    (folder / "20261201-B1-001.json").write_bytes(b"{}")
    (folder / "20261201-B1-003.json").write_bytes(b"{}")
    case = make_case(store)
    assert case.id == "20261201-B1-004"
    assert (folder / "20261201-B1-001.json").read_bytes() == b"{}"
    case.close()


def test_many_processes_creating_at_the_same_second_get_unique_ids(tmp_path):
    folder = tmp_path / "cases"
    code = ("import sys; sys.path.insert(0, %r)\n"
            "from datetime import datetime, timezone\n"
            "import helpers_walk_proc as H\n"
            "from faultwise.cases.store import CaseStore\n"
            "s = CaseStore(%r, 'B1', clock=lambda: datetime(2026, 12, 1, 9, 30, tzinfo=timezone.utc))\n"
            "c = s.new_case({'family': 'series-string', 'label': 'x'}, 'x', 'dead', 'dead-lights-on')\n"
            "print(c.id); c.close()\n") % (str(Path(HELPER).parent), str(folder))
    procs = [subprocess.Popen([PY, "-c", code], stdout=subprocess.PIPE, text=True)
             for _ in range(4)]
    ids = [p.communicate(timeout=60)[0].strip() for p in procs]
    assert all(p.returncode == 0 for p in procs)
    assert len(set(ids)) == 4
    assert sorted(ids) == [f"20261201-B1-00{i}" for i in range(1, 5)]


def test_record_walk_and_read_back(store):
    kb, ex = H.knowledge(), H.expectations()
    case = make_case(store)
    walk = Walk(kb, H.series_profile(), "dead-lights-on", expectations=ex)
    walk.answer("58 V")
    case.record(walk)
    walk.answer("good")
    case.record(walk)
    data = store.read(case.id)
    assert [e["node"] for e in data["events"]] == ["supply.rect-out", "supply.rectifier-test"]
    assert list(data) == list(CASE_KEYS)
    again = Walk.from_events(kb, H.series_profile(), data["symptom"], data["events"],
                             expectations=ex)
    assert again.prompt().node.id == "supply.first-cap-esr"
    case.append({"type": "note", "text": "appended directly"})
    assert store.read(case.id)["events"][-1]["n"] == 3
    case.close()
    assert not list(store.folder.glob("*.fwtmp")) and not list(store.folder.glob(".*"))


def test_failed_save_keeps_data_and_retry_works(store, monkeypatch):
    case = make_case(store)
    real_replace = os.replace

    def read_only(*a, **k):
        raise OSError(errno.EROFS, os.strerror(errno.EROFS))

    # The process runs as root in CI, so chmod cannot make the folder read-only: fail the
    # rename the way a read-only mount does (EROFS), then ENOSPC from the write.
    monkeypatch.setattr(os, "replace", read_only)
    with pytest.raises(CaseError, match="could not be saved") as info:
        case.append({"type": "note", "text": "kept in memory"})
    assert "Read-only" in str(info.value)
    assert case.data["events"][-1]["text"] == "kept in memory"
    monkeypatch.setattr(os, "replace", real_replace)
    real_fsync = os.fsync
    monkeypatch.setattr(os, "fsync", lambda fd: (_ for _ in ()).throw(OSError(errno.ENOSPC, "No space left on device")))
    with pytest.raises(CaseError, match="No space"):
        case.save()
    monkeypatch.setattr(os, "fsync", real_fsync)
    assert store.read(case.id)["events"] == []          # the file still holds the old version
    assert not list(store.folder.glob(".*.fwtmp"))       # no temp left behind
    case.save()                                         # retry after fixing
    assert store.read(case.id)["events"][-1]["text"] == "kept in memory"
    case.close()


def test_deleted_folder_save_fails_then_retry_after_recreating(store):
    import shutil

    case = make_case(store)
    case.data["customer"] = "changed"
    shutil.rmtree(store.folder)
    with pytest.raises(CaseError):
        case.save()
    assert case.data["customer"] == "changed"
    store.folder.mkdir()
    case.save()
    assert store.read(case.id)["customer"] == "changed"
    case.close()


def test_stale_temp_files_removed_on_start(tmp_path):
    folder = tmp_path / "cases"
    folder.mkdir()
    first = CaseStore(folder, "B1", clock=CLOCK)
    host = first.host
    dead = subprocess.run([PY, "-c", "import os; print(os.getpid())"], capture_output=True, check=True,
                          text=True).stdout.strip()
    ours_dead = folder / f".20261201-B1-001.{host}.{dead}.abc123.fwtmp"
    ours_live = folder / f".20261201-B1-002.{host}.{os.getpid()}.abc123.fwtmp"
    other_host = folder / f".20261201-B1-003.elsewhere.{dead}.abc123.fwtmp"
    foreign = folder / ".notes.tmp"
    for p in (ours_dead, ours_live, other_host, foreign):
        p.write_bytes(b"partial")
    CaseStore(folder, "B2")
    assert not ours_dead.exists()
    assert ours_live.exists() and other_host.exists() and foreign.exists()


# ---------------------------------------------------------------- ids

@pytest.mark.parametrize("bad", ["../x", "a/b", "", "x.json", "a b", "..", "a\\b", "é"])
def test_case_id_safety(store, bad):
    with pytest.raises(CaseError):
        store.path_for(bad)
    with pytest.raises(CaseError):
        store.open(bad)
    if not bad.endswith(".json"):
        with pytest.raises(CaseError):
            store.read(bad)


def test_bad_bench_name_refused(tmp_path):
    with pytest.raises(CaseError):
        CaseStore(tmp_path, "../B1")


# ---------------------------------------------------------------- locks

def test_second_store_is_refused_with_bench_named(store, tmp_path):
    case = make_case(store)
    other = CaseStore(tmp_path / "cases", "B2", clock=CLOCK)
    with pytest.raises(CaseLockedError) as info:
        other.open(case.id)
    assert info.value.bench == "B1"
    assert f"case {case.id} is open at bench B1 (since" in str(info.value)
    case.close()
    reopened = other.open(case.id)
    reopened.close()


def test_two_processes_second_refused(store, tmp_path):
    case = make_case(store)
    case.close()
    holder = subprocess.Popen([PY, HELPER, "hold", str(store.folder), case.id, "B2"],
                              stdin=subprocess.PIPE, stdout=subprocess.PIPE, text=True)
    try:
        assert holder.stdout.readline().strip() == "held"
        with pytest.raises(CaseLockedError, match="bench B2"):
            store.open(case.id)
        listed = store.list().open[0]
        assert listed.locked_by is not None and listed.locked_by.bench == "B2"
    finally:
        holder.stdin.close()
        holder.wait(timeout=30)
    store.open(case.id).close()           # released when the holder closed it


def test_stale_lock_of_a_dead_process_is_taken_over(store):
    case = make_case(store)
    case.close()
    holder = subprocess.Popen([PY, HELPER, "hold", str(store.folder), case.id, "B2"],
                              stdin=subprocess.PIPE, stdout=subprocess.PIPE, text=True)
    assert holder.stdout.readline().strip() == "held"
    holder.kill()
    holder.wait(timeout=30)
    assert (store.folder / f"{case.id}.lock").exists()
    taken = store.open(case.id)            # same host, dead pid: taken over
    assert store.lock_info(case.id).bench == "B1"
    taken.close()


def test_another_hosts_lock_is_respected(store):
    case = make_case(store)
    case.close()
    # filelock's marker format: "<pid>\n<host>\n"; the owner file names the bench.
    (store.folder / f"{case.id}.lock").write_text(f"{os.getpid()}\nbench-pc-3\n")
    (store.folder / f"{case.id}.lock-owner").write_text(json.dumps(
        {"bench": "B3", "host": "bench-pc-3", "pid": 4242, "since": "2026-12-01T08:00:00+00:00"}))
    with pytest.raises(CaseLockedError) as info:
        store.open(case.id)
    assert "bench B3 on bench-pc-3 (since 2026-12-01T08:00:00+00:00)" in str(info.value)


# ---------------------------------------------------------------- damaged files

DAMAGED = {
    "20261201-B1-101.json": (None, "truncated"),            # filled below from a good case
    "20261201-B1-102.json": (b"format: faultwise-case/1\nid: x\nevents: []\n", "not JSON"),
    "20261201-B1-103.json": (b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR", "binary"),
    "20261201-B1-104.json": (b'[{"format": "faultwise-case/1"}]\n', "not a mapping"),
    "20261201-B1-105.json": (b'{"format": "faultwise-case/9", "id": "x", "events": []}\n',
                             "unknown format version"),
    "20261201-B1-106.json": (b'{"format": "other-tool/1", "id": "x", "events": []}\n',
                             "wrong format version"),
    "20261201-B1-107.json": (b"", "empty"),
    "20261201-B1-108.json": (b'{"format": "faultwise-case/1", "id": "x"}\n',
                             "missing or bad key 'events'"),
}


def write_damaged(folder: Path, good_bytes: bytes) -> dict[Path, str]:
    hashes = {}
    for name, (content, _) in DAMAGED.items():
        path = folder / name
        path.write_bytes(good_bytes[: len(good_bytes) // 2] if content is None else content)
        hashes[path] = sha(path)
    return hashes


def test_damaged_files_listed_by_reason_and_left_alone(store):
    good = make_case(store)
    good.close()
    closed = make_case(store)
    closed.update(status="closed", outcome="repaired")
    closed.close()
    hashes = write_damaged(store.folder, good.path.read_bytes())
    listing = store.list()
    assert [c.id for c in listing.open] == [good.id]
    assert [c.id for c in listing.closed] == [closed.id]
    assert {d.path.name: d.reason for d in listing.damaged} == \
        {name: reason for name, (_, reason) in DAMAGED.items()}
    for path in hashes:
        with pytest.raises(DamagedCaseError) as info:
            store.read(path.name[:-5])
        assert path.name in str(info.value)
        with pytest.raises(DamagedCaseError):
            store.open(path.name[:-5])           # never opened for writing
        assert not (store.folder / (path.name[:-5] + ".lock")).exists()
    assert {p: sha(p) for p in hashes} == hashes


def test_a_case_cut_anywhere_reads_as_truncated(store):
    # What a crash without the atomic rename would leave: the file cut at any byte.
    case = make_case(store)
    walk = Walk(H.knowledge(), H.series_profile(), "dead-lights-on", expectations=H.expectations())
    walk.answer("58 V")
    case.record(walk)
    case.close()
    good = case.path.read_bytes()
    for cut in range(1, len(good) - 2, 7):
        with pytest.raises(DamagedCaseError) as info:
            read_case_bytes(good[:cut], "x.json")
        assert info.value.reason == "truncated", (cut, good[max(0, cut - 20):cut])
    assert read_case_bytes(good)["id"] == case.id


def test_read_case_bytes_migrates_v1_unchanged():
    data = {"format": "faultwise-case/1", "id": "a", "events": []}
    assert read_case_bytes(json.dumps(data).encode()) == data


# ---------------------------------------------------------------- crash safety

def test_sigkill_at_random_points_leaves_a_case_that_reopens(store):
    """Kill a walking process at seeded random moments; the JSON always parses, and the
    walk rebuilt from it stands at the last answered step with every earlier answer kept;
    a new process then takes the dead one's lock over and finishes the case."""
    kb, ex = H.knowledge(), H.expectations()
    rng = random.Random(20261201)
    # The full script, walked in this process, gives the reference events.
    ref = Walk(kb, H.series_profile(), "dead-lights-on", expectations=ex)
    for kind, text in H.SCRIPT:
        {"answer": ref.answer, "note": ref.note, "parts": lambda t: ref.record_parts([t]),
         "close": lambda t: ref.close(t, 30)}[kind](text)
    strip = lambda evs: [{k: v for k, v in e.items() if k != "at"} for e in evs]
    full = strip(ref.events)
    for _ in range(5):
        case = make_case(store)
        case.close()
        proc = subprocess.Popen([PY, HELPER, str(store.folder), case.id, "150"],
                                stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
        time.sleep(rng.uniform(0.3, 1.5))
        proc.send_signal(signal.SIGKILL)
        proc.wait(timeout=30)
        data = json.loads(store.path_for(case.id).read_bytes())     # always parses
        events = data["events"]
        assert strip(events) == full[: len(events)]                  # a prefix, answers intact
        walk = Walk.from_events(kb, H.series_profile(), "dead-lights-on", events,
                                expectations=ex)
        assert len(walk.steps) == sum(1 for e in events if e["type"] == "answer")
        finish = subprocess.run([PY, HELPER, str(store.folder), case.id, "1"], check=False,
                                capture_output=True, text=True, timeout=60)
        assert finish.returncode == 0, finish.stderr
        data = store.read(case.id)
        assert strip(data["events"]) == full
        assert data["status"] == "closed" and data["conclusion"]["fault"] == "supply.dry-first-cap"
    CaseStore(store.folder, "B1")                      # a new store start removes dead temps
    assert not list(store.folder.glob(".*.fwtmp"))
