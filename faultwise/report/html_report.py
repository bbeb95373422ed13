"""Self-contained printable HTML for the job report and the shop review.

One file each: inline CSS and inline SVG, no scripts, no links, no fonts or images from
anywhere (nothing in the page names a URL). Every piece of case text goes through
``html.escape``.
"""

from __future__ import annotations

from html import escape

from faultwise.report.job import (LEAKAGE_STATEMENT, NOT_LINE_CONNECTED, SAFETY_STATEMENT,
                                  JobReport, ReportStep, band_text, minutes_text, reading_text,
                                  when_text)
from faultwise.report.svg import bar_chart_svg, column_chart_svg, stage_map_svg

CSS = """
body { font-family: sans-serif; color: #1d1d1d; margin: 24px auto; max-width: 900px;
       line-height: 1.4; font-size: 14px; }
h1 { font-size: 22px; margin: 0 0 4px; }
h2 { font-size: 17px; border-bottom: 1px solid #bbb; margin-top: 22px; padding-bottom: 2px; }
h3 { font-size: 15px; }
.shop { font-weight: bold; font-size: 15px; }
.meta { color: #444; }
table { border-collapse: collapse; width: 100%; margin: 6px 0; }
th, td { border: 1px solid #ccc; padding: 3px 6px; text-align: left; vertical-align: top; }
th { background: #f0f2f5; }
td.num { text-align: right; white-space: nowrap; }
.bad { color: #a5281b; font-weight: bold; }
.ok { color: #2e6b30; }
blockquote { margin: 6px 0; padding: 4px 10px; border-left: 4px solid #bbb; background: #f7f7f7; }
.safety { border: 2px solid #a5281b; padding: 8px 12px; background: #fff6f4; }
code { font-size: 12px; color: #444; }
svg { max-width: 100%; height: auto; }
@media print { body { margin: 0; max-width: none; } h2 { break-after: avoid; }
               table, svg { break-inside: avoid; } }
"""


def _page(title: str, body: list[str]) -> str:
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            f"<title>{escape(title)}</title><style>{CSS}</style></head><body>\n"
            + "\n".join(body) + "\n</body></html>\n")


def _e(text) -> str:
    from faultwise.core.safe_text import shown_text

    return escape(shown_text(text))


def _steps_table(steps: tuple[ReportStep, ...]) -> str:
    rows = ["<table><tr><th>#</th><th>Check</th><th>Reading</th>"
            "<th>Expected band (as recorded)</th><th>Result</th></tr>"]
    for s in steps:
        cls = "ok" if s.normal else "bad"
        rows.append(f"<tr><td class=\"num\">{s.n}</td><td>{_e(s.title)}<br><code>{_e(s.node)}"
                    f"</code></td><td>{_e(reading_text(s))}</td>"
                    f"<td>{_e(band_text(s.band) or 'observation')}</td>"
                    f"<td class=\"{cls}\">{_e(s.outcome)}</td></tr>")
    rows.append("</table>")
    return "".join(rows)


def job_report_html(r: JobReport) -> str:
    """The job report as one printable page with the receiver's stage map."""
    closed = _e(when_text(r.closed)) if r.closed else f"not yet ({_e(r.status)})"
    b = [f"<h1>Job report {_e(r.case_id)}</h1>",
         f"<div class=\"shop\">{_e(r.shop)}</div>",
         f"<div class=\"meta\">Bench {_e(r.bench or '-')} &middot; opened "
         f"{_e(when_text(r.opened) or '-')} &middot; closed {closed}</div>",
         "<h2>Set</h2><table>",
         f"<tr><th>Set</th><td>{_e(r.set_label)}</td></tr>",
         f"<tr><th>Family</th><td>{_e(r.family)}"
         f"{' (line-connected)' if r.line_connected else ''}</td></tr>",
         f"<tr><th>Profile</th><td>{_e(r.set_source or '-')}</td></tr>",
         f"<tr><th>Customer</th><td>{_e(r.customer or '-')}</td></tr></table>",
         "<h2>Complaint</h2>",
         f"<blockquote>{_e(r.complaint or '(none recorded)')}</blockquote>",
         f"<p>Symptom: {_e(r.symptom_title or r.symptom)} <code>{_e(r.symptom)}</code></p>",
         "<h2>Stage map</h2>", stage_map_svg(dict(r.stages), f"Stage map of case {r.case_id}"),
         "<h2>Checks</h2>",
         _steps_table(r.checks) if r.checks else "<p>No checks recorded.</p>"]
    if r.skipped:
        b.append("<p>Checks that could not be made:</p><ul>" + "".join(
            f"<li>{_e(t)} <code>{_e(n)}</code>: {_e(reason or 'no reason given')}</li>"
            for n, t, reason in r.skipped) + "</ul>")
    b.append("<h2>Fault</h2>")
    if r.fault:
        b.append(f"<p class=\"bad\">{_e(r.fault_title or r.fault)}</p>"
                 f"<p><code>{_e(r.fault)}</code>, {_e(r.fault_stage)} stage</p>")
    if r.off_graph:
        b.append(f"<p>Finding outside the decision graph: {_e(r.off_graph)}</p>")
    if not r.fault and not r.off_graph:
        b.append("<p>No fault concluded.</p>")
    b.append("<h2>Repair</h2>")
    b.append("<ol>" + "".join(f"<li>{_e(s)}</li>" for s in r.repair) + "</ol>" if r.repair
             else "<p>Repair steps as the bench recorded them (see the parts and notes).</p>")
    b.append("<h3>Parts replaced</h3>")
    b.append("<ul>" + "".join(f"<li>{_e(p)}</li>" for p in r.parts) + "</ul>" if r.parts
             else "<p>None.</p>")
    b.append("<h2>Readings after the repair</h2>")
    b.append(_steps_table(r.after) if r.after else "<p>None recorded.</p>")
    b.append("<h2>Leakage check</h2>")
    if not r.line_connected:
        b.append(f"<p>{_e(NOT_LINE_CONNECTED)}</p>")
    elif r.leakage:
        passed = all(s.normal for s in r.leakage)
        b.append(_steps_table(r.leakage))
        b.append("<p class=\"ok\">Result: passed.</p>" if passed else
                 "<p class=\"bad\">Result: NOT passed: the set must not go back to its owner.</p>")
    else:
        b.append("<p class=\"bad\">NOT RECORDED: a line-connected set must pass the leakage "
                 "check before it goes back to its owner.</p>")
    b += ["<h2>Time and outcome</h2><table>",
          f"<tr><th>Time spent</th><td>{_e(minutes_text(r.minutes))}</td></tr>",
          f"<tr><th>Outcome</th><td>{_e(r.outcome or 'open')}</td></tr></table>"]
    if r.notes:
        b.append("<h2>Notes</h2><ul>" + "".join(f"<li>{_e(n)}</li>" for n in r.notes) + "</ul>")
    b.append(f"<h2>Safety</h2><div class=\"safety\"><p>{_e(SAFETY_STATEMENT)}</p>"
             + (f"<p>{_e(LEAKAGE_STATEMENT)}</p>" if r.line_connected else "") + "</div>")
    return _page(f"Job report {r.case_id}", b)


def _pct(x) -> str:
    return "-" if x is None else f"{100 * x:.0f}%"


def _num(x, digits: int = 1) -> str:
    return "-" if x is None else f"{x:.{digits}f}"


def review_html(review, shop: str = "Larkspur Lane Radio Works") -> str:
    """The shop review as one printable page with inline SVG charts."""
    since = f" since {_e(review.since)}" if review.since else ""
    b = [f"<h1>Shop review</h1><div class=\"shop\">{_e(shop)}</div>",
         f"<p class=\"meta\">{review.cases} closed cases{since}; "
         f"{len(review.damaged)} damaged file(s).</p>"]
    if review.damaged:
        b.append("<h2>Damaged files (left unchanged)</h2><table><tr><th>File</th><th>Reason</th>"
                 "</tr>" + "".join(f"<tr><td>{_e(d.file)}</td><td>{_e(d.reason)}</td></tr>"
                                   for d in review.damaged) + "</table>")
    if review.months:
        rows = [(m.month, m.mean_minutes, f"{m.mean_minutes:.0f}") for m in review.months]
        b += ["<h2>Minutes per job by month</h2>",
              column_chart_svg(rows, "Mean minutes per closed job, by month of the close")]
    for p in review.pairs:
        b.append(f"<h2>{_e(p.symptom)} / {_e(p.family)}</h2>")
        b.append(f"<p>{p.cases} closed case(s), {p.concluded} repaired with a concluded fault. "
                 f"Mean checks to the fault {_num(p.mean_checks)}; mean minutes to the fault "
                 f"{_num(p.mean_minutes)}.</p>")
        if p.note:
            b.append(f"<p class=\"bad\">{_e(p.note)}</p>")
        bars = [(f.title, f.smoothed if f.smoothed is not None else f.raw,
                 f"{_pct(f.smoothed)} ({f.count})") for f in p.faults]
        if bars:
            b.append(bar_chart_svg(bars, "Fault shares, smoothed (raw count in brackets)"))
        b.append("<table><tr><th>Fault</th><th>Cases</th><th>Raw</th><th>Prior</th>"
                 "<th>Smoothed</th></tr>" + "".join(
                     f"<tr><td>{_e(f.title)}<br><code>{_e(f.fault)}</code></td>"
                     f"<td class=\"num\">{f.count}</td><td class=\"num\">{_pct(f.raw)}</td>"
                     f"<td class=\"num\">{_pct(f.prior)}</td>"
                     f"<td class=\"num\">{_pct(f.smoothed)}</td></tr>" for f in p.faults)
                 + "</table>")
        if p.saving_minutes is not None:
            b.append(f"<p>Expected minutes per job: current order {_num(p.current_minutes)}, "
                     f"order the data supports {_num(p.data_minutes)}; saving "
                     f"<b>{_num(p.saving_minutes)} min</b> per job.</p>")
            moved = [o for o in p.orders if o.current != o.data]
            if moved:
                b.append("<table><tr><th>Suspects list</th><th>Current order</th>"
                         "<th>Data order</th></tr>" + "".join(
                             f"<tr><td>{_e(o.title)}<br><code>{_e(o.suspects)}</code></td>"
                             f"<td>{'<br>'.join(_e(t) for t in o.current)}</td>"
                             f"<td>{'<br>'.join(_e(t) for t in o.data)}</td></tr>"
                             for o in moved) + "</table>")
        if p.never_varied:
            b.append("<h3>Checks whose outcome never varied</h3><table><tr><th>Check</th>"
                     "<th>Outcome</th><th>Cases</th></tr>" + "".join(
                         f"<tr><td>{_e(c.title or c.check)}<br><code>{_e(c.check)}</code></td>"
                         f"<td>{_e(c.outcome)}</td><td class=\"num\">{c.cases}</td></tr>"
                         for c in p.never_varied) + "</table>")
    b.append("<h2>Checks most often skipped</h2>")
    b.append("<table><tr><th>Check</th><th>Skipped</th><th>Reasons</th></tr>" + "".join(
        f"<tr><td>{_e(c.title or c.check)}<br><code>{_e(c.check)}</code></td>"
        f"<td class=\"num\">{c.count}</td><td>"
        + "; ".join(f"{_e(r)} ({n})" for r, n in c.reasons) + "</td></tr>"
        for c in review.skipped) + "</table>" if review.skipped else "<p>None.</p>")
    b.append("<h2>Off-graph findings (candidate new faults)</h2>")
    b.append("<table><tr><th>Finding</th><th>Cases</th></tr>" + "".join(
        f"<tr><td>{'<br>'.join(_e(v) for v in g.variants)}</td>"
        f"<td>{len(g.cases)}: {_e(', '.join(g.cases))}</td></tr>" for g in review.off_graph)
        + "</table>" if review.off_graph else "<p>None.</p>")
    b.append("<h2>Faults never reached</h2>")
    b.append("<ul>" + "".join(f"<li>{_e(f.title)} <code>{_e(f.fault)}</code></li>"
                              for f in review.never_reached) + "</ul>"
             if review.never_reached else "<p>None.</p>")
    b.append("<h2>Cases back after a repair</h2>")
    b.append("<table><tr><th>Case</th><th>After</th><th>Rule</th><th>Days</th></tr>" + "".join(
        f"<tr><td>{_e(r.case)}</td><td>{_e(r.after)}</td><td>{_e(r.rule)}</td>"
        f"<td class=\"num\">{_num(r.days, 0)}</td></tr>" for r in review.reopened) + "</table>"
        if review.reopened else "<p>None.</p>")
    b.append(f"<h2>Safety</h2><div class=\"safety\"><p>{_e(SAFETY_STATEMENT)}</p></div>")
    return _page("Shop review", b)
