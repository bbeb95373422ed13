"""Tests that run the app on the machine's clock must pass on any day.

Most tests give the app the fixed clock of the test helpers; the terminal tests start the
installed `faultwise` in tmux, which names its cases by today's date. One of them once
waited for a file named for the day it was written and failed on every later day. These
checks rerun every test marked ``real_clock`` with the clock moved a year forward and a
year back by libfaketime (Debian package `faketime`, installed by `.ci/run`), and make sure
every test that starts the app in a terminal carries the mark.
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
from datetime import date
from pathlib import Path

import pytest

TESTS = Path(__file__).resolve().parent
ROOT = TESTS.parent
FAKETIME = shutil.which("faketime")

needs_faketime = pytest.mark.skipif(
    FAKETIME is None and not os.environ.get("CI"),
    reason="libfaketime is not installed (apt-get install faketime); CI installs it")


def _faked(offset: str, *argv: str, timeout: float) -> subprocess.CompletedProcess:
    assert FAKETIME, "faketime is missing: .ci/run must install the Debian package faketime"
    # The monotonic clock is shifted too: libfaketime 0.9.10 with it left alone makes
    # Python's time.sleep fail with EINVAL (seen here). Intervals stay real seconds.
    env = dict(os.environ)
    return subprocess.run([FAKETIME, "-f", offset, *argv], cwd=ROOT, env=env,
                          capture_output=True, text=True, timeout=timeout)


@needs_faketime
def test_the_faked_clock_really_moves():
    """The harness itself: a Python under faketime sees a date a year away."""
    out = _faked("+365d", sys.executable, "-c", "import datetime; print(datetime.date.today())",
                 timeout=60)
    shown = date.fromisoformat(out.stdout.strip())
    assert abs((shown - date.today()).days - 365) <= 1, out


@needs_faketime
@pytest.mark.parametrize("offset", ["+365d", "-365d"])
def test_real_clock_tests_pass_a_year_away(offset):
    """Every `real_clock` test passes when today is a year later (or earlier)."""
    out = _faked(offset, sys.executable, "-m", "pytest", "-q", "-m", "real_clock",
                 "-p", "no:randomly", str(TESTS), timeout=900)
    tail = out.stdout[-3000:] + out.stderr[-2000:]
    assert out.returncode == 0, tail
    passed = re.search(r"(\d+) passed", out.stdout)
    assert passed and int(passed.group(1)) >= 2, tail     # the tmux tests ran, not skipped
    assert "skipped" not in out.stdout.splitlines()[-1], tail


def test_every_terminal_test_runs_on_the_real_clock_mark():
    """A test that starts the installed app in tmux reads the real clock: it must carry
    the `real_clock` mark so the check above reruns it a year away."""
    unmarked = []
    for path in TESTS.rglob("test_*.py"):
        text = path.read_text(encoding="utf-8")
        if "new-session" in text and "real_clock" not in text:
            unmarked.append(str(path.relative_to(ROOT)))
    assert not unmarked, f"add @pytest.mark.real_clock to the terminal tests in {unmarked}"
