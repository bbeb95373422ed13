"""Hostile and broken case folders: damaged files among good ones, huge and deeply nested
files, FIFOs, ids that try to leave the folder, symlinks that point outside.

What must hold (DESIGN section 8; DEVELOPERS.md "Case file"): a damaged file is reported
with its reason and never written; a review or replay answers for the good cases, names
each damaged file, and leaves every file byte-for-byte as it was; nothing is written
outside the folders the tool was given.

Outside facts relied on: RFC 8259 (JSON text is UTF-8 here; a UTF-16 or Latin-1 file is
not what the store writes); CPython limits int-string conversion to 4300 digits since 3.11
(CVE-2020-10735) and raises ValueError beyond; POSIX open(2) of a FIFO with O_RDONLY
blocks until a writer appears (POSIX.1-2017, open()); rename(2) replaces a symlink itself,
not the file it points to. Byte equality is checked with SHA-256 (hashlib).
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess

import pytest

from rb_helpers import (KB_WALK, PY, assert_one_sentence, case_bytes, json_out,
                        recorded_case, run_cli, sha, tree_hashes, write_case)

from faultwise.cases.store import CaseStore
from faultwise.cases.codec import read_case_bytes
from faultwise.core.errors import CaseError, DamagedCaseError

REASONS = {"empty", "truncated", "not JSON", "binary", "not a mapping", "wrong format version",
           "unknown format version"}


def good() -> bytes:
    return case_bytes(recorded_case())


def hostile_files() -> dict[str, bytes]:
    """name -> bytes of a file that is not a readable case (each a different way to fail)."""
    raw = good()
    text = raw.decode("utf-8")
    latin = json.loads(text)
    latin["customer"] = "Zoë Ærø"
    return {
        "20261201-B1-101.json": raw[: len(raw) // 2],                       # cut by a crash
        "20261201-B1-102.json": b"format: faultwise-case/1\nid: x\n",         # YAML, not JSON
        "20261201-B1-103.json": b"[" * 100_000,                              # deep nesting
        "20261201-B1-104.json": b'{"a":' * 100_000 + b"1" + b"}" * 100_000,
        "20261201-B1-105.json": raw.replace(b'"minutes": 30', b'"minutes": ' + b"9" * 5000),
        "20261201-B1-106.json": text.encode("utf-16"),
        "20261201-B1-107.json": json.dumps(latin, ensure_ascii=False).encode("latin-1"),
        "20261201-B1-108.json": bytes(range(256)) * 8,                        # binary
        "20261201-B1-109.json": b"",
        "20261201-B1-110.json": b" \n\t\n",
        "20261201-B1-111.json": b"[]\n",
        "20261201-B1-112.json": b'{"format": "faultwise-case/99", "id": "x", "events": []}',
        "20261201-B1-113.json": b'{"format": 7, "id": "x", "events": []}',
        "20261201-B1-114.json": b'{"format": "faultwise-case/1", "id": "x", "events": [1, 2]}',
        "20261201-B1-115.json": b'{"format": "faultwise-case/1", "id": null, "events": []}',
        "20261201-B1-116.json": raw + b"\n{}",                               # two documents
        "20261201-B1-117.json": raw.replace(b"{", b"\x00", 1),
    }


@pytest.fixture
def shop(tmp_path):
    """Two good closed cases among every hostile file; returns (folder, hostile names)."""
    folder = tmp_path / "cases"
    write_case(folder, recorded_case("20261201-B1-001"))
    write_case(folder, recorded_case("20261201-B1-002", customer="ticket 4412"))
    names = []
    for name, content in hostile_files().items():
        (folder / name).write_bytes(content)
        names.append(name)
    return folder, sorted(names)


@pytest.mark.parametrize("name", sorted(hostile_files()))
def test_reader_gives_a_damage_reason_for_every_hostile_file(name):
    """read_case_bytes: the only failure is DamagedCaseError, with the file and a reason."""
    content = hostile_files()[name]
    with pytest.raises(DamagedCaseError) as info:
        read_case_bytes(content, name)
    reason = info.value.reason
    assert reason in REASONS or reason.startswith("missing or bad key"), reason
    assert info.value.file == name and name in str(info.value)


def test_store_lists_every_damaged_file_and_never_opens_one(shop):
    folder, names = shop
    before = tree_hashes(folder)
    store = CaseStore(folder, "B2")
    listing = store.list()
    assert sorted(c.id for c in listing.closed) == ["20261201-B1-001", "20261201-B1-002"]
    assert sorted(d.path.name for d in listing.damaged) == names
    for name in names:
        with pytest.raises(CaseError):
            store.open(name[:-5])
    assert tree_hashes(folder) == before
    assert not list(folder.glob("*.lock*"))


@pytest.mark.parametrize("index", [True, False], ids=["index", "no-index"])
def test_review_answers_names_each_damaged_file_and_changes_none(shop, index):
    """faultwise review --json, twice (the second run answers from its index)."""
    folder, names = shop
    before = tree_hashes(folder)
    extra = [] if index else ["--no-index"]
    for _ in range(2):
        res = run_cli(["review", "--json", "--cases", folder, "--knowledge", KB_WALK, *extra],
                      cwd=folder.parent)
        assert "Traceback" not in res.stderr, res.stderr
        assert res.returncode == 0, res.stderr
        doc = json_out(res)
        assert doc["cases"] == 2
        assert sorted(d["file"].rsplit("/", 1)[-1] for d in doc["damaged"]) == names
        assert all(d["reason"] for d in doc["damaged"])
        assert tree_hashes(folder) == before


def test_replay_answers_names_each_damaged_file_and_changes_none(shop):
    folder, names = shop
    before = tree_hashes(folder)
    res = run_cli(["replay", "--json", "--cases", folder, "--knowledge", KB_WALK],
                  cwd=folder.parent)
    assert "Traceback" not in res.stderr and res.returncode == 0, res.stderr
    doc = json_out(res)
    assert doc["replayed"] == 2 and doc["same"] == 2
    assert sorted(d["file"].rsplit("/", 1)[-1] for d in doc["damaged"]) == names
    assert tree_hashes(folder) == before


def test_a_fifo_or_folder_named_like_a_case_does_not_hang_anything(tmp_path):
    """A FIFO 'x.json' (a shared folder can hold anything): opening it for reading blocks
    forever, so every reader must check for a regular file first. Each command runs in a
    subprocess with a timeout; a hang is a failure, not a stuck suite."""
    folder = tmp_path / "cases"
    write_case(folder, recorded_case())
    os.mkfifo(folder / "20261201-B1-050.json")
    (folder / "20261201-B1-051.json").mkdir()
    before = tree_hashes(folder)
    probe = ("import sys; from faultwise.cases.store import CaseStore\n"
             "listing = CaseStore(sys.argv[1], 'B2').list()\n"
             "print(len(listing.closed), sorted(d.path.name for d in listing.damaged))\n")
    runs = {
        "store.list": lambda: subprocess.run([PY, "-c", probe, str(folder)], capture_output=True,
                                             text=True, timeout=20),
        "review": lambda: run_cli(["review", "--json", "--cases", folder, "--knowledge", KB_WALK],
                                  cwd=tmp_path, timeout=20),
        "replay": lambda: run_cli(["replay", "--json", "--cases", folder, "--knowledge", KB_WALK],
                                  cwd=tmp_path, timeout=20),
    }
    hung = []
    for name, run in runs.items():
        try:
            res = run()
        except subprocess.TimeoutExpired:
            hung.append(name)
            continue
        assert "Traceback" not in res.stderr and res.returncode == 0, (name, res.stderr)
    assert hung == [], f"hung on a FIFO named *.json: {hung}"
    assert tree_hashes(folder) == before


def test_huge_case_files_are_read_or_refused_without_hanging(tmp_path):
    """Tens of MB: a 40 MB case (one enormous note) and 40 MB of junk. The review must come
    back (subprocess timeout) and must not change them; each is either a case or damaged."""
    folder = tmp_path / "cases"
    data = recorded_case()
    data["events"].insert(2, {"n": 3, "at": data["opened"], "type": "note",
                              "text": "x" * 40_000_000})
    for n, event in enumerate(data["events"], 1):
        event["n"] = n
    write_case(folder, data, "20261201-B1-001.json")
    junk = folder / "20261201-B1-002.json"
    with open(junk, "wb") as fh:
        block = b'{"format": "faultwise-case/1", "events": [' + b"[" * 100 + b"0, " * 1000
        for _ in range(40_000_000 // len(block)):
            fh.write(block)
    before = {p.name: sha(p) for p in folder.iterdir()}
    res = run_cli(["review", "--json", "--no-index", "--cases", folder, "--knowledge", KB_WALK],
                  cwd=tmp_path, timeout=90)
    assert "Traceback" not in res.stderr and res.returncode == 0, res.stderr
    doc = json_out(res)
    damaged = {d["file"].rsplit("/", 1)[-1] for d in doc["damaged"]}
    assert "20261201-B1-002.json" in damaged
    assert doc["cases"] + len(damaged) == 2
    assert {p.name: sha(p) for p in folder.iterdir()} == before


# ------------------------------------------------------------------ ids and paths

@pytest.mark.parametrize("bad", ["../outside", "../../etc/passwd", "a/../../b", "/tmp/x",
                                 "x\x00y", "nul\x00", ".", "CON", "a" * 300, "x\n", " x"])
def test_case_ids_cannot_leave_the_folder(tmp_path, bad):
    """Every store entry point refuses an id that is not letters, digits, '-', '_' with a
    CaseError (never OSError or ValueError), and nothing appears outside the folder."""
    folder = tmp_path / "shop" / "cases"
    folder.mkdir(parents=True)
    outside = tmp_path / "outside.json"
    outside.write_bytes(good())
    before = tree_hashes(tmp_path)
    store = CaseStore(folder, "B1")
    well_formed = bad.isascii() and bad.isalnum()      # "CON", 300 letters: fine names
    if not well_formed:
        with pytest.raises(CaseError):
            store.path_for(bad)
    with pytest.raises(CaseError):                     # refused, or simply not there
        store.open(bad)
    if not bad.endswith(".json"):
        with pytest.raises(CaseError):
            store.read(bad)
    assert tree_hashes(tmp_path) == before


@pytest.mark.parametrize("ref", ["../outside", "x/../../outside", "no-such-case"])
def test_report_and_replay_of_an_odd_reference_are_one_sentence(tmp_path, ref):
    folder = tmp_path / "cases"
    write_case(folder, recorded_case())
    before = tree_hashes(tmp_path)
    for args in (["report", ref], ["replay", ref]):
        res = run_cli([*args, "--cases", folder, "--knowledge", KB_WALK], cwd=tmp_path)
        assert_one_sentence(res)
    assert tree_hashes(tmp_path) == before


# ------------------------------------------------------------------ symlinks

def test_knowledge_symlinked_outside_is_read_and_never_written_through(tmp_path):
    """Decision (documented here): a knowledge folder may link its files elsewhere (a shop
    sharing one graph between benches), so symlinks are followed for reading. Writing never
    goes through a link: `review --learn` replaces a linked learned.yaml with a file of its
    own (rename(2) replaces the link), and the file the link pointed to is unchanged."""
    shared = tmp_path / "shared"
    shutil.copytree(KB_WALK, shared)
    kb = tmp_path / "kb"
    (kb / "graph").mkdir(parents=True)
    for rel in ("symptoms.yaml", "cautions.yaml", *(f"graph/{p.name}" for p in
                                                      (shared / "graph").glob("*.yaml"))):
        (kb / rel).symlink_to(shared / rel)
    target = tmp_path / "precious.yaml"
    target.write_text("# a file of someone else's: must not change\n")
    (kb / "learned.yaml").symlink_to(target)
    folder = tmp_path / "cases"
    write_case(folder, recorded_case())
    shared_before, target_before = tree_hashes(shared), sha(target)
    lint = run_cli(["lint", "--knowledge", kb], cwd=tmp_path)
    assert "Traceback" not in lint.stderr
    res = run_cli(["review", "--learn", "--cases", folder, "--knowledge", kb], cwd=tmp_path)
    assert "Traceback" not in res.stderr
    assert res.returncode in (0, 1), res.stderr
    if res.returncode == 1:
        assert_one_sentence(res, names=["learned.yaml"])
    assert sha(target) == target_before
    assert tree_hashes(shared) == shared_before
    if res.returncode == 0:
        assert not (kb / "learned.yaml").is_symlink()


def test_a_case_file_symlinked_outside_is_never_written_through(tmp_path):
    """A case file that is a link: saving replaces the link in the cases folder; the
    file outside keeps its bytes."""
    folder = tmp_path / "cases"
    folder.mkdir()
    outside = tmp_path / "elsewhere.json"
    outside.write_bytes(case_bytes(recorded_case(status_closed=False)))
    (folder / "20261201-B1-001.json").symlink_to(outside)
    before = sha(outside)
    store = CaseStore(folder, "B1")
    with store.open("20261201-B1-001") as case:
        case.update(customer="changed at the bench")
    assert sha(outside) == before
    assert store.read("20261201-B1-001")["customer"] == "changed at the bench"


# ------------------------------------------------------------------ the TUI

async def test_tui_resume_of_a_hand_edited_case_reports_and_keeps_running(tmp_path):
    """An open case whose event number was hand-edited to text: resuming it must give a
    message and leave the case unlocked and unchanged, not end the program."""
    from faultwise.cases.store import CaseStore
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.profile.load import load_profile
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings
    from faultwise.walk.state import Walk
    from faultwise.core.workspace import Workspace

    from rb_helpers import TUI_KB, clock

    kb = tmp_path / "knowledge"
    shutil.copytree(TUI_KB, kb)
    ws = Workspace(knowledge_dir=kb, cases_dir=tmp_path / "cases", bench="B1")
    profile = load_profile(ws.sets_dir / "demo-5-tube-table.yaml")
    walk = Walk(load_knowledge(kb), profile, "hum-loud", clock=clock)
    walk.acknowledge("live-chassis")
    walk.answer("1")
    with CaseStore(ws.cases_dir, "B1", clock).new_case(profile, "demo-5-tube-table.yaml",
                                                        "hums", "hum-loud") as case:
        case.record(walk)
        path = case.path
    data = json.loads(path.read_bytes())
    data["events"][-1]["n"] = "two"               # a hand edit in a text editor
    path.write_text(json.dumps(data, indent=2), encoding="utf-8")
    before = sha(path)
    app = build_app(ws, clock=clock,
                    settings=Settings(None, safety_acknowledged="2026-12-01T09:30:00+00:00"))
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.pause()
        await pilot.press("enter")
        await pilot.pause()
        assert app.is_running and app.return_code is None
        assert app.screen.id == "start"
    assert sha(path) == before
    assert not (ws.cases_dir / f"{data['id']}.lock").exists()
