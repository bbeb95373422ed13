"""The domain never imports Textual or Rich (DESIGN section 2, STYLE "The domain stays pure").

A fresh interpreter imports every domain module (everything in the package except the
TUI, the CLI and its commands) and reports which UI packages ended up in sys.modules. This
sees imports made at import time; imports inside function bodies are covered by the
import-linter contract (tests/test_import_layers.py).
"""

from __future__ import annotations

import json
import subprocess
import sys

UI_PACKAGES = ("textual", "rich")
# The domain layers (pyproject [tool.importlinter]); the probe must import modules of each.
DOMAIN_PACKAGES = ("core", "calc", "profile", "expect", "graph", "walk", "cases", "shop", "report",
                   "meter")
NOT_DOMAIN = ("faultwise.tui", "faultwise.commands", "faultwise.cli", "faultwise.__main__")

PROBE = r"""
import importlib, json, pkgutil, sys
import faultwise
skip = tuple(sys.argv[1].split(","))
ui_roots = tuple(sys.argv[2].split(","))
names = []
for info in pkgutil.walk_packages(faultwise.__path__, "faultwise."):
    if info.name.startswith(skip):
        continue
    importlib.import_module(info.name)
    names.append(info.name)
ui = sorted(m for m in sys.modules if m.split(".")[0] in ui_roots)
print(json.dumps({"modules": names, "ui": ui}))
"""


def _probe(skip: tuple[str, ...] = NOT_DOMAIN) -> dict:
    out = subprocess.run([sys.executable, "-c", PROBE, ",".join(skip), ",".join(UI_PACKAGES)],
                         capture_output=True, text=True, check=True, timeout=120)
    return json.loads(out.stdout)


def test_domain_modules_do_not_import_textual_or_rich():
    result = _probe()
    # The probe must have imported the domain, or it proves nothing.
    assert "faultwise.profile.model" in result["modules"]
    assert "faultwise.graph.nodes" in result["modules"]
    assert not any(m.startswith("faultwise.tui") for m in result["modules"])
    assert result["ui"] == [], f"domain imports pulled in {result['ui'][:5]}"


def test_probe_detects_a_ui_import():
    """The same probe, with the TUI package let in, sees Textual (guards the check itself)."""
    result = _probe(tuple(m for m in NOT_DOMAIN if m != "faultwise.tui"))
    assert "faultwise.tui.app" in result["modules"]
    assert "textual" in result["ui"]
