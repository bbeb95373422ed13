"""One atomic write (faultwise.core.atomic) behind case files, learned counts and bench settings.

What "atomic and durable" means here is POSIX rename(2) semantics (IEEE Std 1003.1:
rename replaces the target in one step) plus fsync of the file before the rename and of the
folder after it (the usual way to make a rename survive a power cut; common practice, no
source beyond the fsync(2) manual page). The tests record the fsync calls and check what is
on disk, not how the helper is written.
"""

from __future__ import annotations

import errno
import json
import os
import stat
from pathlib import Path

import pytest

from faultwise.core.atomic import TEMP_SUFFIX, atomic_write


@pytest.fixture
def fsyncs(monkeypatch):
    """Record what each os.fsync call synced: 'file' or 'dir'."""
    seen: list[str] = []
    real = os.fsync

    def spy(fd):
        seen.append("dir" if stat.S_ISDIR(os.fstat(fd).st_mode) else "file")
        return real(fd)

    monkeypatch.setattr(os, "fsync", spy)
    return seen


def test_replaces_whole_file_syncs_file_then_folder_and_leaves_no_temp(tmp_path, fsyncs):
    target = tmp_path / "a.json"
    target.write_text("old", encoding="utf-8")
    atomic_write(target, "new ü")
    assert target.read_bytes() == "new ü".encode("utf-8")
    assert fsyncs == ["file", "dir"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.json"]


def test_a_failed_write_keeps_the_old_file_and_removes_its_temp(tmp_path, monkeypatch):
    target = tmp_path / "a.json"
    target.write_text("old", encoding="utf-8")

    def full(fd):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(os, "fsync", full)
    with pytest.raises(OSError):
        atomic_write(target, "new")
    assert target.read_text(encoding="utf-8") == "old"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.json"]


def test_temp_names_are_unique_and_a_stale_one_blocks_nothing(tmp_path, monkeypatch):
    target = tmp_path / "a.json"
    made: list[str] = []
    real_replace = os.replace

    def spy(src, dst):
        made.append(Path(src).name)
        return real_replace(src, dst)

    monkeypatch.setattr(os, "replace", spy)
    for text in ("1", "2", "3"):
        atomic_write(target, text)
    assert len(set(made)) == 3 and all(n.endswith(TEMP_SUFFIX) for n in made)
    # a crashed writer's temp (even a folder where a temp name might be) stays out of the way
    (tmp_path / f".a.json.{'0' * 12}{TEMP_SUFFIX}").mkdir()
    atomic_write(target, "4")
    assert target.read_text(encoding="utf-8") == "4"


def test_bench_settings_are_written_durably_past_a_stale_temp(tmp_path, fsyncs):
    """The settings file used a fixed temp name (bench.tmp) and no fsync: a leftover
    ``bench.tmp`` that cannot be overwritten made every acknowledgement fail."""
    from faultwise.tui.settings import Settings

    path = tmp_path / "faultwise" / "bench.json"
    path.parent.mkdir()
    (path.parent / "bench.tmp").mkdir()          # a stale temp that cannot be overwritten
    settings = Settings(path)
    settings.acknowledge_safety("2026-12-01T09:30:00+00:00")
    assert settings.write_error is None
    assert json.loads(path.read_text(encoding="utf-8"))["safety_acknowledged"] == \
        "2026-12-01T09:30:00+00:00"
    assert "file" in fsyncs and "dir" in fsyncs
    assert Settings.load(path).safety_acknowledged == "2026-12-01T09:30:00+00:00"
