"""Fixtures for the bench TUI tests: throwaway folders, a fixed clock, in-memory settings."""

from __future__ import annotations

import json
import shutil
from datetime import datetime, timezone
from pathlib import Path

import pytest

FIXTURE_KNOWLEDGE = Path(__file__).parent / "fixtures" / "knowledge"
FIXED_NOW = datetime(2026, 12, 1, 9, 30, tzinfo=timezone.utc)


def fixed_clock() -> datetime:
    return FIXED_NOW


@pytest.fixture
def knowledge_dir(tmp_path: Path) -> Path:
    """A copy of the small fixture knowledge (the tests may not change the original)."""
    target = tmp_path / "knowledge"
    shutil.copytree(FIXTURE_KNOWLEDGE, target)
    return target


@pytest.fixture
def cases_dir(tmp_path: Path) -> Path:
    folder = tmp_path / "cases"
    folder.mkdir()
    return folder


@pytest.fixture
def workspace(knowledge_dir: Path, cases_dir: Path):
    from faultwise.core.workspace import Workspace

    return Workspace(knowledge_dir=knowledge_dir, cases_dir=cases_dir, bench="B1")


@pytest.fixture
def make_app(workspace):
    """build_app with the fixed clock; ``acknowledged=False`` starts as a first run."""
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings

    def make(*, acknowledged: bool = True, settings=None):
        if settings is None:
            # A short caution guard keeps these flows quick; test_caution_guard uses the
            # shipped one.
            settings = Settings(None, safety_acknowledged=FIXED_NOW.isoformat()
                                if acknowledged else None, caution_guard_s=0.2)
        return build_app(workspace, clock=fixed_clock, settings=settings)

    return make


def read_case(cases_dir: Path, case_id: str | None = None) -> dict:
    """The only (or the named) case file, parsed from disk."""
    if case_id is None:
        files = sorted(p for p in cases_dir.glob("*.json"))
        assert len(files) == 1, files
        path = files[0]
    else:
        path = cases_dir / f"{case_id}.json"
    return json.loads(path.read_text(encoding="utf-8"))
