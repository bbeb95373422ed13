"""No import circles among faultwise's modules, and the check can fail.

The import graph is grimp's (the library import-linter is built on): every direct import of
one faultwise module by another, those inside function bodies included, so an import put
off until call time cannot hide a circle. Imports under ``if TYPE_CHECKING:`` are left out:
they never run, and they are how an annotation names a type of a module in the same layer
that imports this one (an upward one is still caught by the layers contract,
tests/test_import_layers.py). A circle is a strongly connected component of more than one
module (networkx.strongly_connected_components); the failure names its modules and the
imports that close it, file line by file line.

The second test copies the package to a temporary folder, adds one deliberate back import
inside a function body and runs the same check there: it must find that circle.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]

# Run in a fresh interpreter with PYTHONPATH set, so the package analysed is the one in
# that folder (not whichever faultwise this interpreter imported first).
PROBE = r"""
import json, grimp, networkx as nx
g = grimp.build_graph("faultwise", cache_dir=None, exclude_type_checking_imports=True)
d = nx.DiGraph()
for m in g.modules:
    d.add_node(m)
    for imported in g.find_modules_directly_imported_by(m):
        d.add_edge(m, imported)
out = []
for comp in nx.strongly_connected_components(d):
    if len(comp) < 2:
        continue
    edges = []
    for a in sorted(comp):
        for b in sorted(comp):
            if d.has_edge(a, b):
                lines = sorted(x["line_number"] for x in g.get_import_details(importer=a, imported=b))
                edges.append([a, b, lines])
    out.append({"modules": sorted(comp), "imports": edges})
print(json.dumps({"modules": len(d), "cycles": sorted(out, key=lambda c: c["modules"])}))
"""


def _cycles(folder: Path) -> dict:
    env = {**os.environ, "PYTHONPATH": str(folder)}
    out = subprocess.run([sys.executable, "-c", PROBE], cwd=folder, env=env,
                         capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stderr
    return json.loads(out.stdout)


def _describe(cycles: list[dict]) -> str:
    lines = []
    for c in cycles:
        lines.append("import circle: " + ", ".join(c["modules"]))
        lines += [f"    {a} -> {b} (line {', '.join(map(str, n))})" for a, b, n in c["imports"]]
    return "\n".join(lines)


def test_no_module_imports_itself_through_others():
    found = _cycles(ROOT)
    assert found["modules"] > 100          # the whole package was read, not a stub of it
    assert not found["cycles"], _describe(found["cycles"])


def test_a_deliberate_circle_is_found(tmp_path):
    dest = tmp_path / "project"
    ignore = shutil.ignore_patterns("__pycache__", "*.pyc")
    # symlinks=False: faultwise/knowledge (a link to knowledge/) is copied as a folder.
    shutil.copytree(ROOT / "faultwise", dest / "faultwise", ignore=ignore, symlinks=False)
    # core.units is imported by walk.state; the back import hides in a function body.
    target = dest / "faultwise" / "core" / "units.py"
    target.write_text(target.read_text(encoding="utf-8")
                      + "\n\ndef _deliberate_circle():\n"
                        "    from faultwise.walk.state import Walk  # noqa: F401\n",
                      encoding="utf-8")
    found = _cycles(dest)
    mine = [c for c in found["cycles"] if "faultwise.core.units" in c["modules"]]
    assert len(mine) == 1, _describe(found["cycles"])
    assert "faultwise.walk.state" in mine[0]["modules"]
    assert any(a == "faultwise.core.units" and b == "faultwise.walk.state"
               for a, b, _ in mine[0]["imports"])
    assert "faultwise.core.units -> faultwise.walk.state" in _describe(mine)
