"""No-traceback policy: every command that exists in faultwise.cli.COMMANDS, and the bare
`faultwise`, run as a subprocess (sys.executable -m faultwise ...) with broken inputs.

What must hold (DESIGN section 10; DEVELOPERS.md "Rules everyone keeps"): stderr never
holds "Traceback"; the exit status is 1; stderr is one sentence starting "faultwise: " and
ending with ".", naming the file where a file is at fault. "internal error" (the CLI's
last line of defence, exit status 2) counts as a failure: it means a FaultwiseError was
missing. The cases are generated from the command list, so a command added later is run
with the broken inputs of its kind of argument too.
"""

from __future__ import annotations

import shutil
import subprocess
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import pytest

from rb_helpers import KB_WALK, assert_one_sentence, case_bytes, recorded_case, run_cli

from faultwise.cli import COMMANDS


def _available() -> list[str]:
    import importlib

    out = []
    for name in COMMANDS:
        try:
            importlib.import_module(f"faultwise.commands.{name}")
        except ModuleNotFoundError:
            continue
        out.append(name)
    return out


AVAILABLE = _available()


@pytest.fixture(scope="module")
def bad(tmp_path_factory):
    """A folder of broken things, shared by every case below (never changed by them)."""
    root = tmp_path_factory.mktemp("bad inputs ü")
    (root / "binary.yaml").write_bytes(bytes(range(256)) * 4)
    (root / "empty.yaml").write_bytes(b"")
    (root / "hostile.yaml").write_bytes(b'label: !!python/object/apply:os.system ["true"]\n')
    (root / "laughs.yaml").write_bytes(b"a: &a [x, x]\nb: &b [*a, *a]\nlabel: *b\n")
    (root / "utf16.yaml").write_bytes("family: transistor\n".encode("utf-16"))
    (root / "a folder.yaml").mkdir()
    (root / "list.yaml").write_text("- 1\n- 2\n")
    (root / "answers-bad.yaml").write_text("readings: {supply.rectifier_out_v: lots}\n")
    (root / "answers-key.yaml").write_text("colour: blue\n")
    kb_bad = root / "kb-hostile"
    shutil.copytree(KB_WALK, kb_bad)
    (kb_bad / "symptoms.yaml").write_bytes(b"symptoms: !!python/name:os.system\n")
    kb_empty = root / "kb-empty"
    kb_empty.mkdir()
    cases = root / "cases"
    cases.mkdir()
    good = recorded_case()
    (cases / f"{good['id']}.json").write_bytes(case_bytes(good))
    (cases / "20261201-B1-002.json").write_bytes(case_bytes(good)[:200])      # truncated
    (cases / "20261201-B1-003.json").write_bytes(b"\x00\x01\x02")
    (root / "a-file").write_text("not a folder")
    return root


def _profile_cases(r: Path, cmd: list[str], tail: list[str]) -> list:
    """Broken profile arguments: (args, names that the sentence must hold)."""
    return [
        ([*cmd, r / "missing.yaml", *tail], ["missing.yaml"]),
        ([*cmd, r / "a folder.yaml", *tail], ["a folder.yaml"]),
        ([*cmd, r / "binary.yaml", *tail], ["binary.yaml"]),
        ([*cmd, r / "empty.yaml", *tail], ["empty.yaml"]),
        ([*cmd, r / "hostile.yaml", *tail], ["hostile.yaml"]),
        ([*cmd, r / "laughs.yaml", *tail], ["laughs.yaml"]),
        ([*cmd, r / "utf16.yaml", *tail], ["utf16.yaml"]),
        ([*cmd, r / "list.yaml", *tail], ["list.yaml"]),
    ]


def _knowledge_cases(r: Path, cmd: list[str]) -> list:
    return [
        ([*cmd, "--knowledge", r / "no-such-kb"], ["no-such-kb"]),
        ([*cmd, "--knowledge", r / "a-file"], ["a-file"]),
        ([*cmd, "--knowledge", r / "kb-hostile"], ["symptoms.yaml"]),
        ([*cmd, "--knowledge", r / "kb-empty"], ["kb-empty"]),
    ]


def matrix(r: Path) -> list[tuple[str, list, list]]:
    """(label, args, names) for every available command and the bare program."""
    series = KB_WALK / "sets" / "series.yaml"
    k = ["--knowledge", KB_WALK]
    c = ["--cases", r / "cases"]
    out = []
    for name in AVAILABLE:
        rows: list = [([name, "--no-such-option"], [])]
        if name == "expect":
            rows += _profile_cases(r, ["expect"], ["--json"])
        elif name == "match":
            rows += [(["match", "", *k], []), (["match", "x" * 100_000, *k], [], 0),
                     *[(args + ["dead"], names) for args, names in
                       _knowledge_cases(r, ["match"])]]
        elif name == "lint":
            # lint prints the located findings on stdout, its summary sentence on stderr
            rows += [(args, names, "lint") for args, names in _knowledge_cases(r, ["lint"])]
        elif name == "walk":
            w = ["--symptom", "dead-lights-on", "--answers"]
            rows += _profile_cases(r, ["walk"], [*w, r / "answers-key.yaml", *k])
            rows += [(["walk", series, *w, r / n, *k], [n]) for n in
                     ("missing.yaml", "a folder.yaml", "binary.yaml", "hostile.yaml",
                      "answers-bad.yaml", "answers-key.yaml", "utf16.yaml")]
            rows += [(["walk", series, "--symptom", "no-such-symptom", "--answers",
                       r / "answers-key.yaml", *k], []),
                     (["walk", series, "--symptom", "dead-lights-on", *k], [])]
        elif name == "replay":
            rows += [(["replay", "20261201-B1-404", *c, *k], ["20261201-B1-404"]),
                     (["replay", r / "binary.yaml", *c, *k], ["binary.yaml"], 0),   # carries on
                     (["replay", "--cases", r / "a-file", *k, "x"], []),
                     *_knowledge_cases(r, ["replay", *c])]
        elif name == "review":
            rows += [(["review", "--cases", r / "no-such-cases", *k], ["no-such-cases"]),
                     (["review", "--cases", r / "a-file", *k], ["a-file"]),
                     (["review", *c, *k, "--since", "last tuesday"], []),
                     (["review", *c, *k, "--since", "2026-13-45"], []),
                     (["review", *c, *k, "--reopen-days", "many"], []),
                     (["review", *c, *k, "--html", r / "no-such-dir" / "x.html"], ["x.html"]),
                     (["review", *c, *k, "--html", r / "a folder.yaml"], ["a folder.yaml"]),
                     (["review", *c, *k, "--dry-run"], []),
                     *_knowledge_cases(r, ["review", *c])]
        elif name == "report":
            rows += [(["report", "20261201-B1-404", *c, *k], ["20261201-B1-404"]),
                     (["report", "20261201-B1-002", *c, *k], ["20261201-B1-002"]),
                     (["report", "20261201-B1-003", *c, *k], ["20261201-B1-003"]),
                     (["report", r / "a folder.yaml", *c, *k], []),
                     (["report", r / "binary.yaml", *c, *k], ["binary.yaml"]),
                     (["report", "20261201-B1-001", *c, *k, "--html",
                       r / "no-such-dir" / "r.html"], ["r.html"])]
        elif name == "sweep":
            rows += [*_knowledge_cases(r, ["sweep"]),
                     (["sweep", *k, "--symptom", "no-such-symptom"], []),
                     (["sweep", *k, "--family", "valve-radio"], []),
                     (["sweep", *k, "--sets", r / "no-such-sets"], [])]
        elif name == "demo":
            rows += [(["demo", "--cases", r / "a-file" / "sub", *k], []),
                     (["demo", "--cases", r / "cases", *k], []),        # not empty, no --force
                     (["demo", "--cases", r / "demo-new", *k, "--closed", "-5"], []),
                     (["demo", "--cases", r / "demo-new", *k, "--seed", "x"], []),
                     *_knowledge_cases(r, ["demo", "--cases", r / "demo-new"])]
        out += [(f"{name}:{i}", *row) for i, row in enumerate(rows)]
    # The bare program (the TUI) with a workspace it cannot use: it must stop before the
    # screen starts, with one sentence.
    out += [("tui:cases-under-a-file", ["--cases", r / "a-file" / "cases", *k], ["a-file"]),
            ("tui:knowledge-missing", ["--knowledge", r / "no-such-kb"], ["no-such-kb"]),
            ("tui:knowledge-a-file", ["--knowledge", r / "a-file"], ["a-file"]),
            ("tui:bad-bench", ["--bench", "../B1", *c, *k], ["bench"]),
            ("tui:bad-option", ["--no-such-option"], [])]
    return out


def check(res, names, status) -> None:
    """Status 1 and one sentence naming the files; 0 where the command carries on (it then
    names the file on stdout, as review and replay do for a damaged case); lint names them
    on stdout beside its one-sentence summary."""
    if status == 1:
        assert_one_sentence(res, names=names)
        return
    assert "Traceback" not in res.stderr + res.stdout, res.stderr
    if status == "lint":
        assert_one_sentence(res)
    else:
        assert res.returncode == 0, (res.returncode, res.stderr)
    for name in names:
        assert name in res.stdout + res.stderr, (name, res.stdout[-300:])


def test_every_command_with_broken_input_is_one_sentence_and_status_1(bad):
    cases = matrix(bad)
    before = sorted(str(p) for p in bad.rglob("*"))

    def run(case):
        label, args, names, *rest = case
        status = rest[0] if rest else 1
        try:
            return label, args, names, status, run_cli(args, cwd=bad, timeout=15)
        except subprocess.TimeoutExpired:
            return label, args, names, status, None

    failures = []
    with ThreadPoolExecutor(max_workers=2) as pool:
        for label, args, names, status, res in pool.map(run, cases):
            if res is None:
                failures.append(f"{label} {[str(a)[:60] for a in args]}: still running after "
                                "15 s (it should have stopped with one sentence)")
                continue
            try:
                check(res, names, status)
            except AssertionError as exc:
                failures.append(f"{label} {[str(a)[:60] for a in args]}: "
                                f"status {res.returncode}: {str(exc)[:300]}")
    assert len(cases) >= 40
    assert not failures, f"{len(failures)} of {len(cases)} runs broke the rule:\n" + \
        "\n".join(failures)
    # review keeps its index beside the cases by design (DEVELOPERS.md, "Review, index")
    after = sorted(str(p) for p in bad.rglob("*") if "demo-new" not in str(p)
                   and ".faultwise-index.sqlite" not in p.name)
    assert after == [p for p in before if "demo-new" not in p]     # nothing else was written
