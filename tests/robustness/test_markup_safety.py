"""Case text that looks like markup or carries terminal control sequences: notes,
customer, complaint, an off-graph finding, a skip reason. The TUI must show it literally
and never pass a control sequence to the terminal; the Markdown and HTML reports must
escape it; the CLI must not print it raw.

Outside facts relied on: ECMA-48 (5th ed., 1991) defines ESC (0x1B) and the 8-bit CSI
(0x9B) that start control sequences, "CSI 2 J" erases the display; OSC 52 (xterm "Control
Sequences", Operating System Commands) writes the clipboard; Rich/Textual console markup
uses "[b]...[/b]" and "[link=...]" (Textual documentation, "Content markup"); HTML must
escape "<" and "&" (WHATWG HTML, 13.1.2). Textual passes control characters inside a
``rich.text.Text`` through to the terminal unchanged (checked in a real terminal under
tmux while writing this suite: "CSI 2 J" in a Static erased the lines painted before it).
"""

from __future__ import annotations

import re
import shutil

from rb_helpers import (KB_WALK, TUI_KB, assert_one_sentence, case_bytes, clock,
                        recorded_case, run_cli)

HOSTILE = ("[/b] [link=x]click[/link] [bold red]loud[/] <script>alert(1)</script> & "
           "\x1b[2J\x1b]52;c;aGVsbG8=\x07 \x9b31m *em* |pipe| `code`")
CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f-\x9f]")
LITERAL = ("[/b]", "[link=x]click[/link]", "[bold red]loud[/]")


def _workspace(tmp_path):
    from faultwise.core.workspace import Workspace

    kb = tmp_path / "knowledge"
    shutil.copytree(TUI_KB, kb)
    cases = tmp_path / "cases"
    cases.mkdir()
    return Workspace(knowledge_dir=kb, cases_dir=cases, bench="B1")


def _hostile_open_case(ws) -> str:
    """An open case, written through the domain, whose text fields are all hostile."""
    from faultwise.cases.store import CaseStore
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.profile.load import load_profile
    from faultwise.walk.state import Walk

    kn = load_knowledge(ws.knowledge_dir)
    profile = load_profile(ws.sets_dir / "demo-5-tube-table.yaml")
    walk = Walk(kn, profile, "hum-loud", clock=clock)
    for caution in ("live-chassis", "charged-caps"):
        walk.acknowledge(caution)
    walk.answer("1")
    walk.note("note " + HOSTILE)
    store = CaseStore(ws.cases_dir, "B1", clock)
    with store.new_case(profile, "demo-5-tube-table.yaml", "complaint " + HOSTILE, "hum-loud",
                        customer="customer " + HOSTILE,
                        knowledge_version=kn.version) as case:
        case.record(walk)
        return case.id


def _app(ws):
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings

    return build_app(ws, clock=clock,
                     settings=Settings(None, safety_acknowledged="2026-12-01T09:30:00+00:00"))


def _assert_screen_safe(app, *, expect_literal=()) -> str:
    """The painted screen (Textual's own SVG export) holds no control character."""
    svg = app.export_screenshot()
    bad = sorted({hex(ord(c)) for c in CONTROL.findall(svg)})
    assert not bad, f"control characters reach the terminal: {bad}"
    text = svg.replace("&#160;", " ").replace("&amp;", "&").replace("&lt;", "<") \
        .replace("&gt;", ">")
    for fragment in expect_literal:
        assert fragment in text, fragment
    return text


async def _ready(pilot):
    await pilot.pause()
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()


async def test_start_screen_and_walk_show_hostile_case_text_literally(tmp_path):
    ws = _workspace(tmp_path)
    case_id = _hostile_open_case(ws)
    app = _app(ws)
    async with app.run_test(size=(160, 40)) as pilot:
        await _ready(pilot)
        assert app.screen.id == "start"
        _assert_screen_safe(app)
        await pilot.press("enter")                    # resume the hostile case
        await _ready(pilot)
        assert app.is_running
        while app.screen.id == "caution":
            await pilot.press("enter")
            await pilot.pause()
        assert app.screen.id == "walk"
        history = app.screen.query_one("#history")
        note = [e for e in app.screen.walk.events if e["type"] == "note"][-1]
        shown = history.get_row(str(note["n"]))[3].plain
        for fragment in LITERAL:
            assert fragment in shown                  # markup shown, not interpreted
        _assert_screen_safe(app, expect_literal=("[/b]",))
    assert (ws.cases_dir / f"{case_id}.json").is_file()


async def test_a_pasted_note_with_escapes_is_recorded_exactly_and_shown_safely(tmp_path):
    """F3 note whose text was pasted with control characters: the case file keeps the text
    exactly (the record is not altered), the screen never shows a raw control character."""
    ws = _workspace(tmp_path)
    case_id = _hostile_open_case(ws)
    app = _app(ws)
    async with app.run_test(size=(160, 40)) as pilot:
        await _ready(pilot)
        await pilot.press("enter")
        await _ready(pilot)
        while app.screen.id == "caution":
            await pilot.press("enter")
            await pilot.pause()
        await pilot.press("f3")
        await pilot.pause()
        assert app.screen.id == "note-prompt"
        app.focused.value = "pasted " + HOSTILE
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen.id == "walk"
        _assert_screen_safe(app, expect_literal=("[/b]",))
    import json

    data = json.loads((ws.cases_dir / f"{case_id}.json").read_text(encoding="utf-8"))
    notes = [e["text"] for e in data["events"] if e["type"] == "note"]
    assert notes[-1].startswith("pasted [/b]")
    assert "[link=x]click[/link]" in notes[-1]


async def test_viewer_shows_a_closed_hostile_case_safely(tmp_path):
    from faultwise.cases.store import CaseStore
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.walk.scripted import walk_from_case

    ws = _workspace(tmp_path)
    case_id = _hostile_open_case(ws)
    with CaseStore(ws.cases_dir, "B1", clock).open(case_id) as case:
        walk = walk_from_case(load_knowledge(ws.knowledge_dir), case.data, clock=clock)
        walk.close("waiting-parts", 12)
        case.record(walk)
    before = (ws.cases_dir / f"{case_id}.json").read_bytes()
    app = _app(ws)
    async with app.run_test(size=(160, 40)) as pilot:
        await _ready(pilot)
        await pilot.press("enter")
        await _ready(pilot)
        assert app.screen.id == "viewer"
        for _ in range(len(walk.events)):
            _assert_screen_safe(app)
            await pilot.press("down")
            await pilot.pause()
    assert (ws.cases_dir / f"{case_id}.json").read_bytes() == before


# ------------------------------------------------------------------ reports and CLI

def _hostile_closed_case() -> dict:
    data = recorded_case()
    data["customer"] = "customer " + HOSTILE
    data["complaint"] = "complaint " + HOSTILE
    data["events"].insert(2, {"n": 3, "at": data["opened"], "type": "note",
                              "text": "note " + HOSTILE})
    for n, event in enumerate(data["events"], 1):
        event["n"] = n
    return data


def test_markdown_and_html_reports_escape_hostile_text():
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.report.job import job_report, job_report_markdown
    from faultwise.report.html_report import job_report_html

    report = job_report(_hostile_closed_case(), load_knowledge(KB_WALK))
    md = job_report_markdown(report)
    html = job_report_html(report)
    for doc in (md, html):
        assert "<script>" not in doc                         # WHATWG HTML: escaped
        assert not CONTROL.findall(doc.replace("\n", "").replace("\t", "")), \
            sorted({hex(ord(c)) for c in CONTROL.findall(doc)})
    assert "&lt;script&gt;" in html and "[/b]" in html


def test_cli_output_never_carries_control_sequences(tmp_path):
    """`faultwise report` prints the case's text to the terminal: ESC and the 8-bit CSI
    must not reach it (OSC 52 would set the clipboard, CSI 2 J erase the screen)."""
    folder = tmp_path / "cases"
    folder.mkdir()
    data = _hostile_closed_case()
    (folder / f"{data['id']}.json").write_bytes(case_bytes(data))
    for args in (["report", data["id"]], ["review"], ["replay"]):
        res = run_cli([*args, "--cases", folder, "--knowledge", KB_WALK], cwd=tmp_path)
        assert res.returncode == 0 and "Traceback" not in res.stderr, res.stderr
        found = sorted({hex(ord(c)) for c in CONTROL.findall(res.stdout + res.stderr)
                        if c not in "\n\t"})
        assert not found, (args, found)


def test_hostile_text_in_an_error_message_is_one_safe_line(tmp_path):
    """A bad reading in an answers file is quoted in the error: a newline or an escape in
    it must not break the one-sentence rule or reach the terminal raw."""
    answers = tmp_path / "answers.yaml"
    answers.write_text('readings: {supply.rectifier_out_v: "5\\e[2J\\nsecond line V"}\n',
                       encoding="utf-8")
    res = run_cli(["walk", KB_WALK / "sets" / "series.yaml", "--symptom", "dead-lights-on",
                   "--answers", answers, "--knowledge", KB_WALK], cwd=tmp_path)
    line = assert_one_sentence(res, names=["answers.yaml"])
    assert not CONTROL.findall(line), repr(line)
