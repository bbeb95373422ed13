"""Self-contained printable HTML for the shop review (and the job report's entry point; its
templates are rendered by :mod:`faultwise.report.render`).

One file each: inline CSS and inline SVG, no scripts, no links, no fonts or images from
anywhere (nothing in the page names a URL). Every piece of case text goes through
``html.escape``.
"""

from __future__ import annotations

from html import escape
from typing import TYPE_CHECKING

from faultwise.report.formats import SAFETY_STATEMENT, num, pct
from faultwise.report.svg import bar_chart_svg, column_chart_svg

if TYPE_CHECKING:
    from faultwise.report.model import JobReport
    from faultwise.shop.review_results import Review

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


def _e(text: object) -> str:
    from faultwise.core.safe_text import shown_text

    return escape(shown_text(text))


def job_report_html(r: JobReport) -> str:
    """The bench copy as one printable page (:func:`faultwise.report.render.bench_html`)."""
    from faultwise.report.render import bench_html

    return bench_html(r)


def review_html(review: Review, shop: str = "") -> str:
    """The shop review as one printable page with inline SVG charts; ``shop``: the configured
    shop name (none shown when empty)."""
    since = f" since {_e(review.since)}" if review.since else ""
    b = ["<h1>Shop review</h1>" + (f"<div class=\"shop\">{_e(shop)}</div>" if shop else ""),
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
                 f"Mean checks to the fault {num(p.mean_checks)}; mean minutes to the fault "
                 f"{num(p.mean_minutes)}.</p>")
        if p.note:
            b.append(f"<p class=\"bad\">{_e(p.note)}</p>")
        bars = [(f.title, f.smoothed if f.smoothed is not None else f.raw,
                 f"{pct(f.smoothed)} ({f.count})") for f in p.faults]
        if bars:
            b.append(bar_chart_svg(bars, "Fault shares, smoothed (raw count in brackets)"))
        b.append("<table><tr><th>Fault</th><th>Cases</th><th>Raw</th><th>Prior</th>"
                 "<th>Smoothed</th></tr>" + "".join(
                     f"<tr><td>{_e(f.title)}<br><code>{_e(f.fault)}</code></td>"
                     f"<td class=\"num\">{f.count}</td><td class=\"num\">{pct(f.raw)}</td>"
                     f"<td class=\"num\">{pct(f.prior)}</td>"
                     f"<td class=\"num\">{pct(f.smoothed)}</td></tr>" for f in p.faults)
                 + "</table>")
        if p.saving_minutes is not None:
            b.append(f"<p>Expected minutes per job: current order {num(p.current_minutes)}, "
                     f"order the data supports {num(p.data_minutes)}; saving "
                     f"<b>{num(p.saving_minutes)} min</b> per job.</p>")
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
        f"<td class=\"num\">{num(r.days, 0)}</td></tr>" for r in review.reopened) + "</table>"
        if review.reopened else "<p>None.</p>")
    b.append(f"<h2>Safety</h2><div class=\"safety\"><p>{_e(SAFETY_STATEMENT)}</p></div>")
    return _page("Shop review", b)
