"""The import-linter contracts in pyproject.toml hold, and the check can fail.

The contracts (``[tool.importlinter]``): the layers core -> calc -> profile -> expect -> graph
-> walk -> cases -> shop/report -> commands/tui -> cli, lower never importing higher, and the
domain never importing Textual or Rich. import-linter reads every import in a module, those
inside function bodies included, so an import put off until call time is caught too (the older
probe in test_domain_imports only sees what is imported at import time).

The second test copies the package to a temporary folder, adds one deliberate bad import and
runs the same check there: it must report the broken contract by name.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

# lint-imports through its Python entry point, in a fresh interpreter run from ``cwd``.
LINT = "import sys; from importlinter.cli import lint_imports; sys.exit(lint_imports())"
LAYERS = "Layers: lower never imports higher"
NO_UI = "The domain never imports Textual or Rich"


def _lint(cwd: Path, pythonpath: Path | None = None) -> subprocess.CompletedProcess:
    env = dict(os.environ)
    if pythonpath is not None:
        env["PYTHONPATH"] = str(pythonpath)
    return subprocess.run([sys.executable, "-c", LINT], cwd=cwd, env=env, capture_output=True,
                          text=True, timeout=300)


def test_layer_and_ui_contracts_are_kept():
    out = _lint(ROOT)
    assert out.returncode == 0, out.stdout + out.stderr
    assert f"{LAYERS} KEPT" in out.stdout
    assert f"{NO_UI} KEPT" in out.stdout
    assert "2 kept, 0 broken" in out.stdout


def _copy_project(tmp_path: Path) -> Path:
    dest = tmp_path / "project"
    ignore = shutil.ignore_patterns("__pycache__", "*.pyc")
    # symlinks=False: faultwise/knowledge (a link to knowledge/) is copied as a folder.
    shutil.copytree(ROOT / "faultwise", dest / "faultwise", ignore=ignore, symlinks=False)
    shutil.copy2(ROOT / "pyproject.toml", dest / "pyproject.toml")
    return dest


# (module file, the line added inside a function body, the contract that must break,
#  the import the report must name)
BAD_IMPORTS = [
    ("core/units.py", "from faultwise.walk.state import Walk",
     LAYERS, "faultwise.core.units -> faultwise.walk.state"),
    ("profile/tubes.py", "from faultwise.graph.nodes import Check",
     LAYERS, "faultwise.profile.tubes -> faultwise.graph.nodes"),
    ("expect/context.py", "import textual",
     NO_UI, "faultwise.expect.context -> textual"),
]


@pytest.mark.parametrize("rel,line,contract,named", BAD_IMPORTS,
                         ids=[b[0] for b in BAD_IMPORTS])
def test_a_deliberate_bad_import_breaks_the_contract(tmp_path, rel, line, contract, named):
    dest = _copy_project(tmp_path)
    target = dest / "faultwise" / rel
    # Inside a function, so that only a check which reads function bodies sees it.
    target.write_text(target.read_text(encoding="utf-8")
                      + f"\n\ndef _deliberate_bad_import():\n    {line}\n", encoding="utf-8")
    # The copy, not the installed package, is the one analysed.
    where = subprocess.run([sys.executable, "-c", "import faultwise; print(faultwise.__file__)"],
                           cwd=dest, env={**os.environ, "PYTHONPATH": str(dest)},
                           capture_output=True, text=True, check=True)
    assert where.stdout.strip().startswith(str(dest))
    out = _lint(dest, pythonpath=dest)
    assert out.returncode != 0
    assert f"{contract} BROKEN" in out.stdout, out.stdout
    assert named in out.stdout, out.stdout
