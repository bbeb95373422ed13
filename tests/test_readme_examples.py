"""Every command in the README's "Examples from a checkout" block runs, as a technician
would type it, from a copy of the checkout (so the files they write stay out of the
repository): exit status 0, output on stdout, never a traceback. The shipped example
answers files under knowledge/answers/ each walk to a conclusion without an assumed answer.
"""

from __future__ import annotations

import json
import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
import yaml

ROOT = Path(__file__).resolve().parent.parent
BIN = Path(sys.executable).parent
README = ROOT / "README.md"


def example_commands() -> list[str]:
    text = README.read_text(encoding="utf-8")
    block = re.search(r"Examples from a checkout:\s*```sh\n(.*?)```", text, re.S)
    assert block, "the README has no 'Examples from a checkout' block"
    return [line.strip() for line in block.group(1).splitlines() if line.strip()]


@pytest.fixture(scope="module")
def checkout(tmp_path_factory) -> Path:
    where = tmp_path_factory.mktemp("checkout")
    shutil.copytree(ROOT / "knowledge", where / "knowledge",
                    ignore=shutil.ignore_patterns("__pycache__"))
    shutil.copytree(ROOT / "cases", where / "cases",
                    ignore=shutil.ignore_patterns(".faultwise-index.sqlite*"))
    return where


def test_the_block_has_the_commands():
    commands = example_commands()
    assert len(commands) >= 7
    assert all(c.startswith("faultwise ") for c in commands)
    assert any(" walk " in f" {c} " for c in commands)


@pytest.mark.skipif(not (BIN / "faultwise").exists(),
                    reason="the faultwise console script is not installed beside this Python")
@pytest.mark.parametrize("command", example_commands())
def test_readme_example_runs_from_a_checkout(checkout, command):
    env = {**os.environ, "PATH": f"{BIN}{os.pathsep}{os.environ.get('PATH', '')}"}
    env.pop("FAULTWISE_CASES", None)
    env.pop("FAULTWISE_KNOWLEDGE", None)
    out = subprocess.run(["bash", "-c", command], cwd=checkout, env=env, capture_output=True,
                         text=True, timeout=600)
    assert out.returncode == 0, (command, out.stderr[-2000:])
    assert "Traceback" not in out.stderr and out.stdout.strip(), command
    if "--json" in command:
        json.loads(out.stdout)
    if "--html" in command:
        html = command.split("--html")[1].split()[0]
        assert (checkout / html).stat().st_size > 0


ANSWERS = sorted((ROOT / "knowledge" / "answers").glob("*.yaml"))


@pytest.mark.parametrize("path", ANSWERS, ids=[p.stem for p in ANSWERS])
def test_example_answers_walk_to_a_conclusion_without_assumptions(path):
    """The command named in each file's header, run as written: a conclusion, every check
    answered by the file (no --assume-normal)."""
    header = [line[2:] for line in path.read_text(encoding="utf-8").splitlines()
              if line.startswith("# ")]
    start = next(i for i, line in enumerate(header) if line.startswith("faultwise walk "))
    command = header[start].rstrip("\\ ") + " " + header[start + 1].strip()
    args = command.split()[1:] + ["--json"]
    out = subprocess.run([sys.executable, "-m", "faultwise", *args], cwd=ROOT,
                         capture_output=True, text=True, timeout=120)
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert doc["conclusion"] and doc["assumed"] == []
    data = yaml.safe_load(path.read_text(encoding="utf-8"))
    given = set(data.get("readings") or {}) | set(data.get("observations") or {})
    used = {s["expect"] or s["node"] for s in doc["steps"]}
    assert given == used, "the file answers exactly the checks the walk asks"


def test_there_are_a_few_example_jobs():
    assert len(ANSWERS) >= 3
    families = set()
    for path in ANSWERS:
        text = path.read_text(encoding="utf-8")
        set_file = re.search(r"knowledge/sets/(\S+\.yaml)", text).group(1)
        families.add(yaml.safe_load((ROOT / "knowledge" / "sets" / set_file).read_text())["family"])
    assert families == {"series-string", "transformer", "transistor"}
