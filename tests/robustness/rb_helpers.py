"""Shared builders for the robustness suite: paths, a recorded case, CLI runs, file hashes.

Imported by every ``tests/robustness/test_*.py`` (pytest puts this folder on ``sys.path``);
it also puts ``tests/`` there so the walk helpers of ``tests/helpers_walk_proc.py`` (the
kb_walk fixture knowledge, its invented set and bands) are shared, not copied.
Nothing here is a conftest, so the names of ``tests/tui/conftest.py`` stay unshadowed.
"""

from __future__ import annotations

import copy
import hashlib
import json
import os
import subprocess
import sys
from datetime import datetime, timezone
from pathlib import Path

HERE = Path(__file__).resolve().parent
TESTS = HERE.parent
if str(TESTS) not in sys.path:
    sys.path.insert(0, str(TESTS))

import helpers_walk_proc as H  # noqa: E402

PY = sys.executable
KB_WALK = TESTS / "fixtures" / "kb_walk"
KB_SMALL = TESTS / "fixtures" / "kb_small"
TUI_KB = TESTS / "tui" / "fixtures" / "knowledge"
FIXED = datetime(2026, 12, 1, 9, 30, tzinfo=timezone.utc)
CASE_ID = "20261201-B1-001"


def clock() -> datetime:
    return FIXED


def run_script(walk, script=H.SCRIPT, upto: int | None = None):
    """Drive ``walk`` through ``helpers_walk_proc.SCRIPT`` (a full repaired case)."""
    for kind, text in script[:upto]:
        H.script_step(walk, kind, text)
    return walk


def recorded_case(case_id: str = CASE_ID, *, upto: int | None = None, customer="ticket 4411",
                  status_closed: bool = True) -> dict:
    """A case dict as the store writes it, walked on kb_walk with the fixture bands."""
    from faultwise.cases.store import CaseStore  # noqa: F401  (import check: module loads)
    from faultwise.cases.codec import CASE_FORMAT, ordered
    from faultwise.profile.model import profile_to_dict
    from faultwise.walk.state import Walk

    walk = Walk(H.knowledge(), H.series_profile(), "dead-lights-on",
                expectations=H.expectations(), clock=clock)
    run_script(walk, upto=upto)
    stamp = FIXED.isoformat(timespec="seconds")
    data = {"format": CASE_FORMAT, "id": case_id, "bench": "B1", "status": "open",
            "opened": stamp, "updated": stamp, "closed": None, "customer": customer,
            "set": {"source": "series.yaml", "profile": profile_to_dict(H.series_profile())},
            "complaint": "hums, then went dead", "symptom": "dead-lights-on",
            "family": "series-string", "knowledge": "", "apprentice": False,
            "acknowledged": [], "events": [], "conclusion": None, "off_graph": None,
            "parts": [], "outcome": None, "minutes": None, "reopened_from": None}
    data.update(walk.to_case_fields())
    if not status_closed:
        data.update(status="open", closed=None, outcome=None)
    return ordered(copy.deepcopy(data))


def case_bytes(data: dict) -> bytes:
    from faultwise.cases.codec import dump_case

    return dump_case(data)


def write_case(folder: Path, data: dict, name: str | None = None) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    path = folder / (name or f"{data['id']}.json")
    path.write_bytes(case_bytes(data))
    return path


def sha(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def tree_hashes(folder: Path, *, skip=(".faultwise-index.sqlite",)) -> dict[str, str]:
    """SHA-256 of every regular file under ``folder`` (FIFOs and folders by kind only)."""
    out = {}
    for path in sorted(folder.rglob("*")):
        rel = str(path.relative_to(folder))
        if any(rel.startswith(s) for s in skip):
            continue
        if path.is_symlink():
            out[rel] = "symlink:" + os.readlink(path)
        elif path.is_fifo():
            out[rel] = "fifo"
        elif path.is_dir():
            out[rel] = "dir"
        else:
            out[rel] = sha(path)
    return out


def cli_env(home: Path) -> dict:
    """The environment of a CLI run: no user config, no workspace variables, no colour."""
    env = {k: v for k, v in os.environ.items() if not k.startswith("FAULTWISE_")}
    env.update(HOME=str(home), XDG_CONFIG_HOME=str(home / ".config"), NO_COLOR="1",
               PYTHONIOENCODING="utf-8", COLUMNS="100")
    env.pop("FAULTWISE_DEBUG", None)
    return env


def run_cli(args, *, cwd: Path, timeout: float = 60, stdin=subprocess.DEVNULL):
    """``python -m faultwise ARGS`` in ``cwd`` with a clean environment."""
    return subprocess.run([PY, "-m", "faultwise", *map(str, args)], cwd=cwd,
                          env=cli_env(cwd), capture_output=True, text=True,
                          encoding="utf-8", errors="replace", timeout=timeout, stdin=stdin)


def assert_one_sentence(result, *, names=(), status=1) -> str:
    """stderr holds no traceback and exactly one line 'faultwise: ... .' naming ``names``."""
    err = result.stderr
    assert "Traceback" not in err, err
    assert result.returncode == status, (result.returncode, err, result.stdout[-500:])
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1, err
    line = lines[0]
    assert line.startswith("faultwise: ") and line.rstrip().endswith("."), line
    assert "internal error" not in line, line
    for name in names:
        assert str(name) in line, (name, line)
    return line


def json_out(result) -> dict:
    return json.loads(result.stdout)
