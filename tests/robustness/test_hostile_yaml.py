"""Hostile YAML in every place a person's file is read: knowledge (symptoms, cautions, a
graph file, learned counts, the tube table), a set profile, an answers file, the
workspace config, and the TUI's set library.

What must hold: a tag that would build a Python object never runs (each payload would
create a marker file if it did), aliases that expand exponentially are refused, deep
nesting, huge files, binary data and wrong encodings are refused, and every refusal is a
FaultwiseError naming the file.

Outside facts relied on: PyYAML's unsafe loaders construct objects for the
``tag:yaml.org,2002:python/...`` tags (PyYAML documentation, "Loading YAML"; CVE-2017-18342),
so these payloads are live if any loader other than the safe one touches them; the
"billion laughs" expansion (each level of aliases multiplies the size, here 10 levels of
10 = 10^10 nodes; known from XML entity expansion, CWE-776); YAML 1.1/1.2 allow UTF-16
with a BOM but the project reads UTF-8 only (DEVELOPERS.md).
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from rb_helpers import KB_WALK, TUI_KB, assert_one_sentence, clock, run_cli

from faultwise.core.errors import FaultwiseError
from faultwise.graph.knowledge import load_knowledge
from faultwise.profile.load import load_profile


def payloads(marker: Path) -> dict[str, bytes]:
    """name -> file content; the first four would create ``marker`` if constructed."""
    m = str(marker)
    laughs = ['a0: &a0 ["lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol"]']
    laughs += [f"a{i}: &a{i} [" + ", ".join([f"*a{i - 1}"] * 10) + "]" for i in range(1, 10)]
    return {
        "os-system": f'format: x\nlabel: !!python/object/apply:os.system ["touch {m}"]\n'.encode(),
        "popen": (f"format: x\nnodes: !!python/object/new:subprocess.Popen\n"
                  f"  args: [[touch, {m}]]\n").encode(),
        "exec": f"label: !!python/object/apply:builtins.exec [\"open('{m}', 'w')\"]\n".encode(),
        "name": b"family: !!python/name:os.system\n",
        "local-tag": b"label: !secret abc\n",
        "billion-laughs": ("\n".join(laughs) + "\nlabel: *a9\n").encode(),
        "deep-list": b"label: " + b"[" * 10_000 + b"]" * 10_000 + b"\n",
        "deep-map": b"label: " + b"{a: " * 10_000 + b"1" + b"}" * 10_000 + b"\n",
        "huge": b"label: x\n" + b"# padding line of a file far too large\n" * 120_000,
        "binary": bytes(range(256)) * 16,
        "utf-16": "label: Zoë's set\nfamily: series-string\n".encode("utf-16"),
        "latin-1": "label: Zoë's set, 5 Röhren\nfamily: series-string\n".encode("latin-1"),
        "empty": b"",
        "not-a-mapping": b"- just\n- a list\n",
    }


KNOWLEDGE_FILES = ("symptoms.yaml", "cautions.yaml", "graph/supply.yaml", "learned.yaml")


@pytest.fixture
def marker(tmp_path):
    path = tmp_path / "MARKER-code-ran"
    yield path
    assert not path.exists(), "a YAML tag ran code"


@pytest.mark.parametrize("where", KNOWLEDGE_FILES)
def test_hostile_knowledge_file_is_a_located_error(tmp_path, marker, where):
    kb = tmp_path / "kb"
    refused = []
    hostile = {k: v for k, v in payloads(marker).items() if k != "empty"}
    # An empty knowledge file is plain (no) data, not an attack: the loader may take it and
    # lint then names what is missing (tests/test_lint.py). Every other payload is refused.
    for name, content in hostile.items():
        if kb.exists():
            shutil.rmtree(kb)
        shutil.copytree(KB_WALK, kb)
        (kb / where).write_bytes(content)
        with pytest.raises(FaultwiseError) as info:
            load_knowledge(kb)
        err = info.value
        assert err.file and Path(err.file).name == Path(where).name, (name, err.file, str(err))
        refused.append(name)
    assert len(refused) == len(hostile)


def test_hostile_tube_table_is_a_located_error(tmp_path, marker):
    kb = tmp_path / "kb"
    shutil.copytree(KB_WALK, kb)
    profile = KB_WALK / "sets" / "series.yaml"
    for name, content in payloads(marker).items():
        (kb / "tubes.yaml").write_bytes(content)
        with pytest.raises(FaultwiseError) as info:
            load_profile(profile, knowledge_dir=kb)
        assert info.value.file and Path(info.value.file).name == "tubes.yaml", (name, str(info.value))


def test_hostile_profile_is_a_located_error(tmp_path, marker):
    for name, content in payloads(marker).items():
        path = tmp_path / f"{name}.yaml"
        path.write_bytes(content)
        with pytest.raises(FaultwiseError) as info:
            load_profile(path)
        assert info.value.file == str(path), (name, str(info.value))


@pytest.mark.parametrize("name", ["os-system", "popen", "billion-laughs", "deep-map", "utf-16"])
def test_cli_refuses_hostile_yaml_in_one_sentence(tmp_path, marker, name):
    """The same payloads reach the commands: expect (profile), walk (answers file), lint
    (knowledge), and any command through faultwise.yaml in the working folder."""
    content = payloads(marker)[name]
    bad = tmp_path / "bad.yaml"
    bad.write_bytes(content)
    kb = tmp_path / "kb"
    shutil.copytree(KB_WALK, kb)
    (kb / "graph" / "supply.yaml").write_bytes(content)
    profile = KB_WALK / "sets" / "series.yaml"
    assert_one_sentence(run_cli(["expect", bad], cwd=tmp_path), names=["bad.yaml"])
    assert_one_sentence(run_cli(["walk", profile, "--symptom", "dead-lights-on", "--answers",
                                 bad, "--knowledge", KB_WALK], cwd=tmp_path),
                        names=["bad.yaml"])
    lint = run_cli(["lint", "--knowledge", kb], cwd=tmp_path)
    assert "Traceback" not in lint.stderr and lint.returncode == 1, lint.stderr
    assert "supply.yaml" in lint.stdout + lint.stderr
    home = tmp_path / "shop"
    home.mkdir()
    (home / "faultwise.yaml").write_bytes(content)
    assert_one_sentence(run_cli(["review", "--json"], cwd=home), names=["faultwise.yaml"])


async def test_tui_set_library_lists_hostile_profiles_as_unusable(tmp_path, marker):
    """The new-case screen reads every sets/*.yaml in a worker: hostile ones are listed
    with their error, the good ones stay usable, and no code runs."""
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings
    from faultwise.core.workspace import Workspace

    kb = tmp_path / "knowledge"
    shutil.copytree(TUI_KB, kb)
    hostile = payloads(marker)
    for name, content in hostile.items():
        (kb / "sets" / f"zz-{name}.yaml").write_bytes(content)
    ws = Workspace(knowledge_dir=kb, cases_dir=tmp_path / "cases", bench="B1")
    (tmp_path / "cases").mkdir()
    app = build_app(ws, clock=clock,
                    settings=Settings(None, safety_acknowledged="2026-12-01T09:30:00+00:00"))
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.press("n")
        await pilot.pause()
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert app.screen.id == "new-case"
        library = {item.path.name: item for item in app.screen.library}
        for name in hostile:
            item = library[f"zz-{name}.yaml"]
            assert item.profile is None and item.error and f"zz-{name}.yaml" in item.error
        assert any(item.profile is not None for item in library.values())
        assert app.is_running
