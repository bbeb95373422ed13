"""Job report for one case (Markdown) and the shop review as text for a 100-column terminal.

The job report reads the case file as recorded: the band of each reading is the band
written into the case when the reading was taken, not one computed again. The knowledge,
when given, only supplies titles and the fault's repair steps. HTML forms of both are in
:mod:`faultwise.report_html`.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path
from typing import Mapping

from faultwise.nodes import STAGES

SHOP = "Larkspur Lane Radio Works"
LINE_FAMILIES = ("series-string", "transformer")
SAFETY_STATEMENT = (
    "This record was kept with faultwise, which supports trained people. It does not replace "
    "training, the set's service data, local electrical codes or licensed practice, and it "
    "defers to all of them.")
LEAKAGE_STATEMENT = (
    "A line-connected set can put line voltage on its chassis and on any metal a person can "
    "touch. It goes back to its owner only after a leakage check: the AC voltage across "
    "1500 ohm shunted by 0.15 uF, from each exposed metal part to a true earth, with the plug "
    "one way and then reversed, not through an isolation transformer, is at most 0.75 V "
    "(0.5 mA).")
NOT_LINE_CONNECTED = "Not line-connected (battery set): no leakage check is needed."


@dataclass(frozen=True)
class ReportStep:
    """One answered check as recorded: reading, band and classification."""

    n: int
    node: str
    title: str
    raw: str
    value: float | None
    band: Mapping | None
    outcome: str
    normal: bool


@dataclass(frozen=True)
class JobReport:
    shop: str
    case_id: str
    bench: str
    customer: str
    opened: str
    closed: str
    status: str
    set_label: str
    set_source: str
    family: str
    complaint: str
    symptom: str
    symptom_title: str
    checks: tuple[ReportStep, ...]
    skipped: tuple[tuple[str, str, str], ...]       # (node, title, reason)
    fault: str
    fault_title: str
    fault_stage: str
    off_graph: str
    repair: tuple[str, ...]
    parts: tuple[str, ...]
    after: tuple[ReportStep, ...]
    leakage: tuple[ReportStep, ...]
    line_connected: bool
    minutes: float | None
    outcome: str
    notes: tuple[str, ...]
    stages: Mapping[str, str]                       # stage -> fault | cleared | checked


# ------------------------------------------------------------------------ reading

def find_case(ref: str, cases_dir: str | os.PathLike) -> Path:
    """A case id or a path -> the case file's path; CaseError when there is none."""
    from faultwise.errors import CaseError

    path = Path(ref)
    if path.is_file():
        return path
    candidate = Path(cases_dir) / f"{ref}.json"
    if candidate.is_file():
        return candidate
    raise CaseError(f"no case '{ref}'", file=str(candidate),
                    hint="give a case id from the cases folder (--cases DIR) or a path to a "
                         "case file")


def read_case(path: str | os.PathLike) -> dict:
    """Read one case file; DamagedCaseError (file, reason) when it cannot be read."""
    from faultwise.cases import read_case_bytes
    from faultwise.errors import CaseError

    path = Path(path)
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise CaseError(f"cannot read the case ({exc.strerror})", file=str(path)) from None
    return read_case_bytes(raw, path)


# ------------------------------------------------------------------------ the model

def _title(knowledge, node_id: str, fallback: str = "") -> str:
    node = knowledge.nodes.get(node_id) if knowledge is not None else None
    return node.title if node is not None else (fallback or node_id)


def _is_normal(knowledge, node_id: str, outcome: str) -> bool:
    node = knowledge.nodes.get(node_id) if knowledge is not None else None
    if node is not None and getattr(node, "normal", None):
        return outcome == node.normal
    return outcome == "normal"


def _step(ev: Mapping, knowledge) -> ReportStep:
    node = str(ev.get("node") or "")
    outcome = str(ev.get("outcome") or "")
    value = ev.get("value")
    band = ev.get("band") if isinstance(ev.get("band"), dict) else None
    number_value = float(value) if isinstance(value, (int, float)) and \
        not isinstance(value, bool) else None
    return ReportStep(int(ev.get("n") or 0), node, _title(knowledge, node),
                      str(ev.get("raw") or ""), number_value, band, outcome,
                      _is_normal(knowledge, node, outcome))


def _stage_of(knowledge, node_id: str) -> str:
    node = knowledge.nodes.get(node_id) if knowledge is not None else None
    if node is not None:
        return node.stage
    head = node_id.split(".", 1)[0]
    return head if head in STAGES else ""


def stage_states(checks: tuple[ReportStep, ...], fault_stage: str, knowledge=None) -> dict:
    """Stage -> ``fault`` (the conclusion's), ``cleared`` (a check there read normal) or
    ``checked`` (checks there, none normal)."""
    states: dict[str, str] = {}
    for step in checks:
        stage = _stage_of(knowledge, step.node)
        if not stage:
            continue
        if step.normal:
            states[stage] = "cleared"
        else:
            states.setdefault(stage, "checked")
    if fault_stage:
        states[fault_stage] = "fault"
    return states


def job_report(case: Mapping, knowledge=None) -> JobReport:
    """The report's content from a case dict (DEVELOPERS.md, "Case file")."""
    events = [e for e in case.get("events") or () if isinstance(e, dict)]
    phase = lambda e: e.get("phase", "diagnose")  # noqa: E731
    answers = [e for e in events if e.get("type") == "answer"]
    checks = tuple(_step(e, knowledge) for e in answers if phase(e) == "diagnose")
    after = tuple(_step(e, knowledge) for e in answers if phase(e) == "verify")
    closing = tuple(_step(e, knowledge) for e in answers if phase(e) == "closing")
    skipped = tuple((str(e.get("node") or ""), _title(knowledge, str(e.get("node") or "")),
                     str(e.get("reason") or "")) for e in events if e.get("type") == "skip")
    notes = tuple(str(e.get("text")) for e in events if e.get("type") == "note" and e.get("text"))
    findings = [str(e.get("finding")) for e in events
                if e.get("type") == "off-graph" and e.get("finding")]
    off = case.get("off_graph")
    off_text = "; ".join(findings) or (str(off.get("finding")) if isinstance(off, dict)
                                       else str(off or ""))
    conclusion = case.get("conclusion") if isinstance(case.get("conclusion"), dict) else {}
    fault = str(conclusion.get("fault") or "")
    node = knowledge.nodes.get(fault) if knowledge is not None and fault else None
    fault_stage = str(conclusion.get("stage") or (node.stage if node is not None else "")
                      or (_stage_of(None, fault) if fault else ""))
    symptom = str(case.get("symptom") or "")
    sym = knowledge.symptoms.get(symptom) if knowledge is not None else None
    s = case.get("set") if isinstance(case.get("set"), dict) else {}
    profile = s.get("profile") if isinstance(s.get("profile"), dict) else {}
    family = str(case.get("family") or profile.get("family") or "")
    if node is not None:
        from faultwise.node_text import for_case_profile

        node = for_case_profile(node, family, profile)
    minutes = case.get("minutes")
    return JobReport(
        shop=SHOP, case_id=str(case.get("id") or ""), bench=str(case.get("bench") or ""),
        customer=str(case.get("customer") or ""), opened=str(case.get("opened") or ""),
        closed=str(case.get("closed") or ""), status=str(case.get("status") or ""),
        set_label=str(profile.get("label") or s.get("source") or "(no set profile)"),
        set_source=str(s.get("source") or ""), family=family,
        complaint=str(case.get("complaint") or ""), symptom=symptom,
        symptom_title=sym.title if sym is not None else "",
        checks=checks, skipped=skipped, fault=fault,
        fault_title=str(conclusion.get("title") or (node.title if node is not None else "")),
        fault_stage=fault_stage, off_graph=off_text,
        repair=tuple(node.repair) if node is not None else (),
        parts=tuple(str(p) for p in case.get("parts") or ()),
        after=after, leakage=closing, line_connected=family in LINE_FAMILIES,
        minutes=float(minutes) if isinstance(minutes, (int, float)) and
        not isinstance(minutes, bool) else None,
        outcome=str(case.get("outcome") or ""), notes=notes,
        stages=stage_states(checks, fault_stage, knowledge))


# ------------------------------------------------------------------------ formatting

def number(value: float, unit: str = "") -> str:
    """A value with its unit for display (units.format_reading where it knows the unit)."""
    if unit:
        try:
            from faultwise.units import format_reading

            return format_reading(float(value), unit)
        except Exception:  # an unknown unit recorded by an older version: show it plainly
            pass
    return f"{value:.4g} {unit}".strip()


def band_text(band: Mapping | None) -> str:
    """``low to high unit (nominal n)`` from a recorded band, or an empty string."""
    if not band:
        return ""
    unit = str(band.get("unit") or "")
    low, high, nom = band.get("low"), band.get("high"), band.get("nominal")
    nums = all(isinstance(v, (int, float)) for v in (low, high))
    text = f"{number(low, unit)} to {number(high, unit)}" if nums else ""
    if isinstance(nom, (int, float)):
        text += f" (nominal {number(nom, unit)})"
    if band.get("typical"):
        text += ", typical values"
    return text.strip()


def when_text(iso: str) -> str:
    """``2026-12-01T09:30:00+00:00`` -> ``2026-12-01 09:30 +00:00``; other text as it is."""
    from faultwise.casesummary import parse_time

    t = parse_time(iso)
    if t is None:
        return iso
    zone = t.strftime(" %z") if t.tzinfo else ""
    if len(zone) == 6:
        zone = zone[:4] + ":" + zone[4:]
    return t.strftime("%Y-%m-%d %H:%M") + zone


def reading_text(step: ReportStep) -> str:
    if step.value is not None and step.band and step.band.get("unit"):
        return number(step.value, str(step.band["unit"]))
    return step.raw


def minutes_text(minutes: float | None) -> str:
    if minutes is None:
        return "not recorded"
    h, m = divmod(int(round(minutes)), 60)
    return f"{h} h {m:02d} min" if h else f"{m} min"


def _md(text: str) -> str:
    """Case text made safe inside a Markdown table cell or line (no control characters)."""
    from faultwise.safe_text import one_line

    return one_line(text).replace("\\", "\\\\").replace("|", "\\|") \
        .replace("<", "&lt;").replace(">", "&gt;")


def _step_table(steps: tuple[ReportStep, ...]) -> list[str]:
    lines = ["| # | Check | Reading | Expected band (as recorded) | Result |",
             "|---|---|---|---|---|"]
    for s in steps:
        result = s.outcome + ("" if s.normal else " (not normal)")
        lines.append(f"| {s.n} | {_md(s.title)} (`{_md(s.node)}`) | {_md(reading_text(s))} | "
                     f"{_md(band_text(s.band)) or 'observation'} | {_md(result)} |")
    return lines


def job_report_markdown(r: JobReport) -> str:
    """The job report as Markdown: every section, in the order a customer reads it."""
    out = [f"# Job report {r.case_id}", "",
           f"**{r.shop}**, bench {_md(r.bench) or '-'}. Opened {_md(when_text(r.opened)) or '-'}, "
           f"closed {_md(when_text(r.closed)) or 'not yet (' + _md(r.status) + ')'}.", "",
           "## Set", "",
           f"- Set: {_md(r.set_label)}",
           f"- Family: {_md(r.family)}" + (" (line-connected)" if r.line_connected else ""),
           f"- Profile: {_md(r.set_source) or '-'}",
           f"- Customer: {_md(r.customer) or '-'}", "",
           "## Complaint", "",
           f"> {_md(r.complaint) or '(none recorded)'}", "",
           f"Symptom: {_md(r.symptom_title or r.symptom)} (`{_md(r.symptom)}`)", "",
           "## Checks", ""]
    out += _step_table(r.checks) if r.checks else ["No checks recorded."]
    if r.skipped:
        out += ["", "Checks that could not be made:", ""]
        out += [f"- {_md(t)} (`{_md(n)}`): {_md(reason) or 'no reason given'}"
                for n, t, reason in r.skipped]
    out += ["", "## Fault", ""]
    if r.fault:
        out.append(f"{_md(r.fault_title or r.fault)} (`{_md(r.fault)}`), "
                   f"{_md(r.fault_stage)} stage.")
    if r.off_graph:
        out.append(f"Finding outside the decision graph: {_md(r.off_graph)}")
    if not r.fault and not r.off_graph:
        out.append("No fault concluded.")
    out += ["", "## Repair", ""]
    out += [f"{i}. {_md(step)}" for i, step in enumerate(r.repair, 1)] or \
        ["Repair steps as the bench recorded them (see the parts and notes)."]
    out += ["", "### Parts replaced", ""]
    out += [f"- {_md(p)}" for p in r.parts] or ["None."]
    out += ["", "## Readings after the repair", ""]
    out += _step_table(r.after) if r.after else ["None recorded."]
    out += ["", "## Leakage check", ""]
    if not r.line_connected:
        out.append(NOT_LINE_CONNECTED)
    elif r.leakage:
        out += _step_table(r.leakage)
        passed = all(s.normal for s in r.leakage)
        out += ["", "Result: " + ("passed." if passed else "NOT passed: the set must not go back "
                                  "to its owner.")]
    else:
        out.append("NOT RECORDED: a line-connected set must pass the leakage check before it "
                   "goes back to its owner.")
    out += ["", "## Time and outcome", "",
            f"- Time spent: {minutes_text(r.minutes)}",
            f"- Outcome: {_md(r.outcome) or 'open'}"]
    if r.notes:
        out += ["", "## Notes", ""] + [f"- {_md(n)}" for n in r.notes]
    out += ["", "## Safety", "", SAFETY_STATEMENT]
    if r.line_connected:
        out += ["", LEAKAGE_STATEMENT]
    return "\n".join(out) + "\n"


# ------------------------------------------------------------------- review as text

WIDTH = 100


def _pct(x: float | None) -> str:
    return "-" if x is None else f"{100 * x:.0f}%"


def _num(x: float | None, digits: int = 1) -> str:
    return "-" if x is None else f"{x:.{digits}f}"


def _cut(text: str, n: int) -> str:
    """One line of at most ``n`` characters; leading indentation kept, runs of space joined."""
    text = str(text)
    indent = text[: len(text) - len(text.lstrip(" "))]
    text = indent + " ".join(text.split())
    return text if len(text) <= n else text[: n - 1] + "\u2026"


def _table(head: tuple[str, ...], rows: list[tuple], widths: tuple[int, ...]) -> list[str]:
    """Fixed-width columns; the first column is cut to its width, numbers right-aligned."""
    def line(cells) -> str:
        parts = []
        for i, (cell, w) in enumerate(zip(cells, widths)):
            cell = _cut(cell, w)
            parts.append(cell.ljust(w) if i == 0 else cell.rjust(w))
        return "  ".join(parts).rstrip()
    return [line(head), "  ".join("-" * w for w in widths)] + [line(r) for r in rows]


def review_text(review) -> str:
    """The shop review for a terminal of 100 columns."""
    out = [f"Shop review: {review.cases} closed case{'s' if review.cases != 1 else ''}"
           + (f" since {review.since}" if review.since else "")
           + (f", {len(review.damaged)} damaged file(s)" if review.damaged else "")]
    for d in review.damaged:
        out.append(_cut(f"  damaged: {d.file}: {d.reason} (left unchanged)", WIDTH))
    for p in review.pairs:
        out += ["", "=" * WIDTH,
                _cut(f"{p.symptom} / {p.family}: {p.cases} case(s), {p.concluded} repaired "
                     f"with a concluded fault", WIDTH),
                _cut(f"mean checks to the fault {_num(p.mean_checks)}, mean minutes to the fault "
                     f"{_num(p.mean_minutes)}", WIDTH)]
        if p.note:
            out.append(_cut(f"note: {p.note}", WIDTH))
        out.append("")
        out += _table(("fault", "cases", "raw", "prior", "smoothed"),
                      [(f"{f.title} ({f.fault})", str(f.count), _pct(f.raw), _pct(f.prior),
                        _pct(f.smoothed)) for f in p.faults], (66, 5, 6, 6, 8))
        if p.saving_minutes is not None:
            out += ["", _cut(f"expected minutes: current order {_num(p.current_minutes)}, "
                             f"data order {_num(p.data_minutes)}, saves "
                             f"{_num(p.saving_minutes)} min per job", WIDTH)]
            for o in p.orders:
                if o.current != o.data:
                    out.append(_cut(f"  {o.suspects}: now {' > '.join(o.current)}", WIDTH))
                    out.append(_cut(f"  {' ' * len(o.suspects)}  data {' > '.join(o.data)}", WIDTH))
        if p.never_varied:
            out += ["", "checks whose outcome never varied (move later or drop):"]
            out += [_cut(f"  {c.check}: always '{c.outcome}' in {c.cases} case(s)", WIDTH)
                    for c in p.never_varied]
    out += ["", "=" * WIDTH, "Checks most often skipped"]
    out += [_cut(f"  {c.check} skipped {c.count}x: " +
                 "; ".join(f"{r} ({n})" for r, n in c.reasons), WIDTH)
            for c in review.skipped[:15]] or ["  none"]
    out += ["", "Off-graph findings (candidate new faults)"]
    for g in review.off_graph[:20]:
        out.append(_cut(f"  {len(g.cases)}x {g.finding}", WIDTH))
        out.append(_cut(f"      cases: {', '.join(g.cases)}", WIDTH))
    if not review.off_graph:
        out.append("  none")
    out += ["", "Faults never reached in a closed case"]
    out += [_cut(f"  {f.fault}: {f.title}", WIDTH) for f in review.never_reached] or ["  none"]
    out += ["", "Cases back after a repair"]
    out += [_cut(f"  {r.case} after {r.after} ({r.rule}"
                 + (f", {r.days:.0f} days" if r.days is not None else "") + ")", WIDTH)
            for r in review.reopened] or ["  none"]
    if review.months:
        out += ["", "Minutes per job by month"]
        peak = max(m.mean_minutes for m in review.months) or 1.0
        for m in review.months:
            bar = "#" * int(round(50 * m.mean_minutes / peak))
            out.append(f"  {m.month}  {m.mean_minutes:6.1f} min  {m.jobs:5d} jobs  {bar}")
    return "\n".join(out) + "\n"
