"""Disk and folder faults while a case is being walked: a full disk, a read-only folder, the
folder deleted or replaced, a path with spaces and non-ASCII letters.

What must hold for every fault: a clear CaseError naming the file; the answer kept in
memory (the walk and the case data still hold it); the file on disk still the last good
version (it parses, nothing earlier lost); no temp file left; and a retry that works once
the fault is gone.

Real faults where the sandbox allows them (a 64 KiB tmpfs for the full disk, a read-only
bind mount for the read-only folder; both need root with mount rights, which CI has here),
else the same errno injected at the system call (root ignores permission bits, so chmod
0o555 cannot be used). Every write point of the store is also failed one by one.
Outside facts: ENOSPC "No space left on device", EROFS "Read-only file system" (POSIX
errno.h; os.strerror); mount(8) "--bind" and "remount,ro,bind" (util-linux).
"""

from __future__ import annotations

import errno
import json
import os
import shutil
import subprocess
from pathlib import Path

import pytest

from rb_helpers import KB_WALK, H, clock, json_out, run_cli

from faultwise.cases.store import CaseStore
from faultwise.core.errors import CaseError
from faultwise.walk.state import Walk

NON_ASCII = Path("Bänk 2") / "cases ü"


def _mount(*args: str) -> bool:
    try:
        return subprocess.run(["mount", *args], capture_output=True, timeout=20).returncode == 0
    except (OSError, subprocess.TimeoutExpired):
        return False


def _umount(path: Path) -> None:
    subprocess.run(["umount", str(path)], capture_output=True, timeout=20)


@pytest.fixture
def tiny_disk(tmp_path):
    """A 64 KiB tmpfs (a real full disk), or None where mounting is not allowed."""
    where = tmp_path / "tiny disk ü"
    where.mkdir()
    if os.geteuid() != 0 or not _mount("-t", "tmpfs", "-o", "size=64k", "tmpfs", str(where)):
        yield None
        return
    try:
        yield where
    finally:
        _umount(where)


def _fill(folder: Path) -> Path:
    """Write a filler file until the disk is full; returns it."""
    filler = folder / "filler.bin"
    with open(filler, "wb", buffering=0) as fh:
        try:
            while True:
                fh.write(b"\0" * 4096)
        except OSError as exc:
            assert exc.errno == errno.ENOSPC
    return filler


def _walk_and_case(folder: Path):
    store = CaseStore(folder, "B1", clock=clock)
    case = store.new_case(H.series_profile(), "series.yaml", "hums, then went dead",
                          "dead-lights-on", customer="ticket 4411")
    walk = Walk(H.knowledge(), H.series_profile(), "dead-lights-on",
                expectations=H.expectations(), clock=clock)
    walk.answer("58 V")
    case.record(walk)
    return store, case, walk


def _assert_fault_kept_everything(store, case, walk, saved_events, exc_info, words):
    err = exc_info.value
    assert isinstance(err, CaseError)
    assert err.file and Path(err.file).name == f"{case.id}.json"
    assert any(w in str(err) for w in words), str(err)
    assert "Traceback" not in str(err)
    # In memory: the walk and the case data hold the new answer.
    assert walk.steps[-1].raw == "good"
    assert case.data["events"][-1]["raw"] == walk.events[-1]["raw"]
    # On disk: the last good version, parseable, nothing earlier lost.
    on_disk = json.loads(case.path.read_bytes())
    assert on_disk["events"] == saved_events
    assert not list(case.path.parent.glob(".*.fwtmp"))


# ------------------------------------------------------------------ full disk

def test_full_disk_real_or_injected(tiny_disk, tmp_path, monkeypatch):
    folder = (tiny_disk or tmp_path / "disk") / "cases"
    store, case, walk = _walk_and_case(folder)
    saved = json.loads(case.path.read_bytes())["events"]
    walk.note("a long note " * 400)                      # bigger than what is left
    walk.answer("good")
    if tiny_disk is not None:
        filler = _fill(tiny_disk)
    else:
        def no_space(fd):
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
        monkeypatch.setattr(os, "fsync", no_space)
    with pytest.raises(CaseError) as info:
        case.record(walk)
    _assert_fault_kept_everything(store, case, walk, saved, info, ("No space", "space"))
    # A new case on the full disk: refused cleanly, nothing half-made left behind.
    with pytest.raises(CaseError):
        store.new_case(H.series_profile(), "series.yaml", "dead", "dead-lights-on")
    assert sorted(p.name for p in folder.glob("*.json")) == [f"{case.id}.json"]
    if tiny_disk is not None:
        filler.unlink()
    else:
        monkeypatch.undo()
    case.record(walk)                                    # the retry works
    events = json.loads(case.path.read_bytes())["events"]
    assert [e["raw"] for e in events if e["type"] == "answer"] == ["58 V", "good"]
    rebuilt = Walk.from_events(H.knowledge(), H.series_profile(), "dead-lights-on", events,
                               expectations=H.expectations())
    assert rebuilt.prompt().node.id == walk.prompt().node.id
    case.close()
    assert not list(folder.glob("*.lock"))


class _FailingFile:
    """A file object whose write fails with ``code`` after ``allow`` bytes."""

    def __init__(self, real, allow, code=errno.ENOSPC):
        self.real, self.allow, self.code = real, allow, code

    def write(self, data):
        if len(data) > self.allow:
            self.real.write(data[: self.allow])
            raise OSError(self.code, os.strerror(self.code))
        return self.real.write(data)

    def __getattr__(self, name):
        return getattr(self.real, name)

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.real.close()


POINTS = ["write", "fsync", "replace", "open-temp"]


@pytest.mark.parametrize("point", POINTS)
@pytest.mark.parametrize("errno_code", [errno.ENOSPC, errno.EROFS, errno.EIO, errno.EDQUOT])
def test_every_write_point_failing_keeps_the_answer(tmp_path, monkeypatch, point, errno_code):
    store, case, walk = _walk_and_case(tmp_path / "cases")
    saved = json.loads(case.path.read_bytes())["events"]
    walk.answer("good")
    boom = OSError(errno_code, os.strerror(errno_code))
    real_fdopen, real_open = os.fdopen, os.open
    if point == "write":
        monkeypatch.setattr(os, "fdopen", lambda fd, *a, **k:
                            _FailingFile(real_fdopen(fd, *a, **k), 100, errno_code))
    elif point == "fsync":
        monkeypatch.setattr(os, "fsync", lambda fd: (_ for _ in ()).throw(boom))
    elif point == "replace":
        monkeypatch.setattr(os, "replace", lambda *a, **k: (_ for _ in ()).throw(boom))
    else:
        def failing_open(path, flags, *a, **k):
            if str(path).endswith(".fwtmp"):
                raise boom
            return real_open(path, flags, *a, **k)
        monkeypatch.setattr(os, "open", failing_open)
    with pytest.raises(CaseError) as info:
        case.record(walk)
    _assert_fault_kept_everything(store, case, walk, saved, info,
                                  (os.strerror(errno_code),))
    monkeypatch.undo()
    case.record(walk)
    assert json.loads(case.path.read_bytes())["events"] == case.data["events"]
    case.close()


@pytest.mark.parametrize("point", ["link", "temp", "lock"])
def test_new_case_failing_leaves_nothing_half_made(tmp_path, monkeypatch, point):
    folder = tmp_path / "cases"
    folder.mkdir()
    boom = OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
    real_open = os.open
    if point == "link":
        monkeypatch.setattr(os, "link", lambda *a, **k: (_ for _ in ()).throw(boom))
        monkeypatch.setattr(os, "replace", lambda *a, **k: (_ for _ in ()).throw(boom))
    else:
        suffix = ".fwtmp" if point == "temp" else ".lock"

        def failing_open(path, flags, *a, **k):
            if str(path).endswith(suffix):
                raise boom
            return real_open(path, flags, *a, **k)
        monkeypatch.setattr(os, "open", failing_open)
    store = CaseStore(folder, "B1", clock=clock)
    with pytest.raises(CaseError) as info:
        store.new_case(H.series_profile(), "series.yaml", "dead", "dead-lights-on")
    assert "No space" in str(info.value)
    monkeypatch.undo()
    leftovers = sorted(p.name for p in folder.iterdir())
    assert not [n for n in leftovers if n.endswith((".fwtmp", ".lock", ".lock-owner"))], leftovers
    for name in leftovers:                      # a claimed name must still be a readable case
        assert name.endswith(".json")
        store.read(folder / name)
    case = store.new_case(H.series_profile(), "series.yaml", "dead", "dead-lights-on")
    case.close()


# ------------------------------------------------------------------ read-only folder

@pytest.fixture
def read_only(tmp_path):
    """Make a folder read-only and writable again: a read-only bind mount where allowed,
    else an EROFS injected at os.open/os.replace/os.link (root ignores chmod)."""
    state = {}

    def make(folder: Path, monkeypatch):
        if os.geteuid() == 0 and _mount("--bind", str(folder), str(folder)):
            if _mount("-o", "remount,ro,bind", str(folder)):
                state["mount"] = folder
                return "mount"
            _umount(folder)
        if os.geteuid() != 0:
            folder.chmod(0o555)
            state["chmod"] = folder
            return "chmod"
        boom = OSError(errno.EROFS, os.strerror(errno.EROFS))
        real_open = os.open

        def ro_open(path, flags, *a, **k):
            if str(path).startswith(str(folder)) and flags & (os.O_WRONLY | os.O_RDWR | os.O_CREAT):
                raise boom
            return real_open(path, flags, *a, **k)
        monkeypatch.setattr(os, "open", ro_open)
        monkeypatch.setattr(os, "replace", lambda *a, **k: (_ for _ in ()).throw(boom))
        return "injected"

    def undo(monkeypatch):
        if "mount" in state:
            _umount(state.pop("mount"))
        if "chmod" in state:
            state.pop("chmod").chmod(0o755)
        monkeypatch.undo()

    yield make, undo
    if "mount" in state:
        _umount(state["mount"])
    if "chmod" in state:
        state["chmod"].chmod(0o755)


def test_read_only_folder_save_fails_cleanly_then_retry(tmp_path, monkeypatch, read_only):
    make, undo = read_only
    store, case, walk = _walk_and_case(tmp_path / "cases")
    saved = json.loads(case.path.read_bytes())["events"]
    walk.answer("good")
    how = make(store.folder, monkeypatch)
    with pytest.raises(CaseError) as info:
        case.record(walk)
    _assert_fault_kept_everything(store, case, walk, saved, info,
                                  ("Read-only", "Permission denied"))
    # Reading still works on the read-only folder, and review answers (its index is not
    # written there; the scan is still complete).
    assert store.read(case.id)["events"] == saved
    if how == "mount":
        res = run_cli(["review", "--json", "--cases", store.folder, "--knowledge", KB_WALK],
                      cwd=tmp_path)
        assert res.returncode == 0 and "Traceback" not in res.stderr, res.stderr
        assert json_out(res)["damaged"] == []
    undo(monkeypatch)
    case.record(walk)
    assert [e["raw"] for e in store.read(case.id)["events"] if e["type"] == "answer"] == \
        ["58 V", "good"]
    case.close()


# ------------------------------------------------------------------ the folder goes away

@pytest.mark.parametrize("how", ["deleted", "replaced-by-file", "renamed"])
def test_folder_gone_while_a_case_is_open(tmp_path, how):
    store, case, walk = _walk_and_case(tmp_path / "cases")
    saved_bytes = case.path.read_bytes()
    saved = json.loads(saved_bytes)["events"]
    walk.answer("good")
    away = tmp_path / "cases-moved"
    if how == "deleted":
        shutil.rmtree(store.folder)
    elif how == "replaced-by-file":
        shutil.rmtree(store.folder)
        store.folder.write_text("not a folder")
    else:
        store.folder.rename(away)
    with pytest.raises(CaseError) as info:
        case.record(walk)
    assert Path(info.value.file).name == f"{case.id}.json"
    assert walk.steps[-1].raw == "good" and case.data["events"][-1]["raw"] == "good"
    if how == "renamed":                     # the moved folder still holds the good version
        assert json.loads((away / f"{case.id}.json").read_bytes())["events"] == saved
        away.rename(store.folder)
    else:
        if how == "replaced-by-file":
            store.folder.unlink()
        store.folder.mkdir()
    case.record(walk)
    assert [e["raw"] for e in store.read(case.id)["events"] if e["type"] == "answer"] == \
        ["58 V", "good"]
    case.close()


# ------------------------------------------------------------------ odd paths

def test_path_with_spaces_and_non_ascii_works_end_to_end(tmp_path):
    folder = tmp_path / NON_ASCII
    _, case, walk = _walk_and_case(folder)
    walk.answer("good")
    case.record(walk)
    case.close()
    cmds = {
        "review": ["review", "--json", "--cases", folder, "--knowledge", KB_WALK],
        "replay": ["replay", "--json", "--cases", folder, "--knowledge", KB_WALK],
        "report": ["report", case.id, "--cases", folder, "--knowledge", KB_WALK],
        "report-html": ["report", case.id, "--html", folder.parent / "bericht ö.html",
                        "--cases", folder, "--knowledge", KB_WALK],
    }
    for name, args in cmds.items():
        res = run_cli(args, cwd=tmp_path)
        assert res.returncode == 0 and "Traceback" not in res.stderr, (name, res.stderr)
    assert json_out(run_cli(cmds["replay"][:], cwd=tmp_path))["replayed"] == 1
    assert (folder.parent / "bericht ö.html").read_text(encoding="utf-8").count(case.id) >= 1
    # A profile path with the same letters through expect.
    profile = tmp_path / "Sätze ü" / "meine Röhre.yaml"
    profile.parent.mkdir()
    shutil.copy(KB_WALK / "sets" / "series.yaml", profile)
    res = run_cli(["expect", profile, "--json"], cwd=tmp_path)
    assert res.returncode == 0 and json_out(res)["expectations"], res.stderr
