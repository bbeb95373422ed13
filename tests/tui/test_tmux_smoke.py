"""Smoke test in a real terminal: the installed `faultwise` command runs in tmux, a case is
walked from the complaint to the close with send-keys, the screen is read with
capture-pane, and the case file is read back from disk.

The knowledge is the TUI tests' fixture folder (so the keys below stay valid while the
bundled knowledge grows); the cases folder and the config folder are temporary. A private
tmux server (-L) is used and killed at the end.
"""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
import time
import uuid
from datetime import date
from pathlib import Path

import pytest
from conftest import FIXTURE_KNOWLEDGE

TMUX = shutil.which("tmux")
FAULTWISE = Path(sys.executable).parent / "faultwise"

pytestmark = [
    pytest.mark.real_clock,                 # runs the app on the machine's clock
    pytest.mark.skipif(TMUX is None, reason="tmux is not installed"),
    pytest.mark.skipif(not FAULTWISE.exists(), reason="the faultwise console script is not "
                       "installed beside this Python"),
]


class Terminal:
    """A detached tmux session on its own server socket."""

    def __init__(self, cwd: Path, command: list[str], env: dict[str, str]) -> None:
        self.socket = f"fwtest-{uuid.uuid4().hex[:8]}"
        exports = " ".join(f"{k}={v}" for k, v in env.items())
        shell = f"env {exports} " + " ".join(command)
        self.tmux("new-session", "-d", "-x", "100", "-y", "30", "-s", "fw", "-c", str(cwd),
                  shell)
        self.tmux("set-option", "-g", "escape-time", "0")

    def tmux(self, *args: str) -> str:
        out = subprocess.run([TMUX, "-L", self.socket, *args], capture_output=True, text=True,
                             timeout=20)
        return out.stdout

    def screen(self) -> str:
        return self.tmux("capture-pane", "-p", "-t", "fw")

    def wait_for(self, text: str, timeout_s: float = 30.0) -> str:
        """Poll the screen until ``text`` shows; fail with the screen if it never does."""
        deadline = time.monotonic() + timeout_s
        screen = ""
        while time.monotonic() < deadline:
            screen = self.screen()
            if text in screen:
                return screen
            time.sleep(0.1)
        raise AssertionError(f"{text!r} never appeared; the screen was:\n{screen}")

    def wait_gone(self, text: str, timeout_s: float = 20.0) -> None:
        """Poll the screen until ``text`` no longer shows (a modal has closed)."""
        deadline = time.monotonic() + timeout_s
        while time.monotonic() < deadline:
            if text not in self.screen():
                return
            time.sleep(0.1)
        raise AssertionError(f"{text!r} is still on the screen:\n{self.screen()}")

    def press_until(self, key: str, text: str, tries: int = 3, each_s: float = 10.0) -> str:
        """Press ``key`` until ``text`` shows: a screen change on a loaded machine.

        Only for keys that are harmless to repeat once the screen has changed (the new
        screen does not bind them); it keeps the test from failing on a key that a busy
        machine delivered before the screen could take it.
        """
        for attempt in range(tries):
            self.keys(key)
            try:
                return self.wait_for(text, timeout_s=each_s)
            except AssertionError:
                if attempt == tries - 1:
                    raise
        raise AssertionError("unreachable")  # pragma: no cover

    def keys(self, *keys: str) -> None:
        self.tmux("send-keys", "-t", "fw", *keys)

    def type(self, text: str) -> None:
        self.tmux("send-keys", "-t", "fw", "-l", text)

    def close(self) -> None:
        self.tmux("kill-server")


def test_walk_a_case_in_a_real_terminal(tmp_path):
    started = date.today()
    cases = tmp_path / "cases"
    env = {"XDG_CONFIG_HOME": str(tmp_path / "config"), "TERM": "xterm-256color",
           "COLORTERM": "truecolor"}
    term = Terminal(tmp_path, [str(FAULTWISE), "--knowledge", str(FIXTURE_KNOWLEDGE),
                               "--cases", str(cases)], env)
    try:
        term.wait_for("Before you start")
        term.keys("Enter")
        term.wait_gone("Before you start")
        term.wait_for("No cases yet")
        term.press_until("n", "sets in the library")
        term.keys("C-u")                            # a repeated 'n' must not stay in the search
        term.type("5 tube")
        term.keys("Enter")
        term.wait_for("✓ Demo 5-tube")              # the set is taken, focus moves on
        term.type("hums loudly")
        term.keys("Enter")
        term.wait_for("✓ Loud hum")
        term.type("T-9")
        term.keys("Enter")
        term.wait_for("The chassis may be live")
        term.keys("Enter")                          # at once: ignored by the guard
        time.sleep(0.3)
        assert "The chassis may be live" in term.screen()
        term.wait_for("Enter: understood")
        term.keys("Enter")
        term.wait_for("Do the heaters glow?")
        term.keys("1")
        term.wait_for("Filter capacitors hold a charge")
        term.wait_for("Enter: understood")
        term.keys("Enter")
        term.wait_for("Expect")
        term.type("20 V")
        term.keys("Enter")
        term.wait_for("Does bridging the first capacitor")
        term.keys("2")
        term.wait_for("Does a known-good rectifier")
        term.keys("1")
        term.wait_for("Weak rectifier tube")
        term.keys("C-t")                            # the suggested parts, picked
        term.wait_for("35W4")
        term.keys("Enter")
        term.wait_for("VERIFY")
        term.type("123")
        term.keys("Enter")
        term.wait_for("Leakage")
        term.type("0.1")
        term.keys("Enter")
        term.wait_for("Close the case")
        term.keys("1")
        term.wait_for("Outcome: repaired")          # focus is on the minutes now
        term.keys("C-u")                            # clear the offered minutes
        term.wait_for("an empty field")             # the field is cleared before typing
        term.type("30")
        term.keys("Enter")
        screen = term.wait_for("1 closed")            # back on the start list
        assert "Traceback" not in screen
        term.keys("C-q")
    finally:
        term.close()
    files = sorted(cases.glob("*.json"))
    assert len(files) == 1
    data = json.loads(files[0].read_text(encoding="utf-8"))
    assert (data["status"], data["outcome"], data["minutes"]) == ("closed", "repaired", 30)
    assert data["conclusion"]["fault"] == "supply.weak-rectifier"
    assert data["customer"] == "T-9"
    # The id is named for the day the app ran on this machine's clock (which may be faked).
    days = {started.strftime("%Y%m%d"), date.today().strftime("%Y%m%d")}
    assert data["id"][:8] in days and files[0].name == f"{data['id']}.json"
    kinds = [(e["type"], e.get("phase")) for e in data["events"]]
    assert ("answer", "verify") in kinds and ("answer", "closing") in kinds
    assert (tmp_path / "config" / "faultwise" / "bench.json").is_file()   # notice remembered
