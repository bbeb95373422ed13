"""Reading a case for its job report, the report's entry points, and the shop review as
text for a 100-column terminal.

The job report's model is :mod:`faultwise.report.model` (one model, two views: the bench
copy and the customer copy), rendered by :mod:`faultwise.report.render`; ``job_report`` and
``job_report_markdown`` here are the entry points the commands and the tests use. The
statements and number formats every report shares are in :mod:`faultwise.report.formats`.
"""

from __future__ import annotations

import os
from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

from faultwise.report.formats import num, pct
from faultwise.report.model import JobReport, build_report
from faultwise.report.render import bench_markdown

if TYPE_CHECKING:
    from faultwise.core.workspace import Shop
    from faultwise.graph.knowledge import Knowledge
    from faultwise.shop.review_results import Review

# ------------------------------------------------------------------------ reading

def find_case(ref: str, cases_dir: str | os.PathLike) -> Path:
    """A case id or a path -> the case file's path; CaseError when there is none."""
    from faultwise.core.errors import CaseError

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
    from faultwise.core.errors import CaseError

    path = Path(path)
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise CaseError(f"cannot read the case ({exc.strerror})", file=str(path)) from None
    return read_case_bytes(raw, path)


# ------------------------------------------------------------------------ the model

def job_report(case: Mapping[str, Any], knowledge: Knowledge | None = None,
               shop: Shop | None = None) -> JobReport:
    """The report model of a case (:func:`faultwise.report.model.build_report`)."""
    return build_report(case, knowledge, shop)


def job_report_markdown(r: JobReport) -> str:
    """The bench copy as Markdown (:func:`faultwise.report.render.bench_markdown`)."""
    return bench_markdown(r)


# ------------------------------------------------------------------- review as text

WIDTH = 100


def _cut(text: str, n: int) -> str:
    """One line of at most ``n`` characters; leading indentation kept, runs of space joined."""
    text = str(text)
    indent = text[: len(text) - len(text.lstrip(" "))]
    text = indent + " ".join(text.split())
    return text if len(text) <= n else text[: n - 1] + "\u2026"


def _table(head: tuple[str, ...], rows: list[tuple], widths: tuple[int, ...]) -> list[str]:
    """Fixed-width columns; the first column is cut to its width, numbers right-aligned."""
    def line(cells: Sequence[object]) -> str:
        parts = []
        for i, (cell, w) in enumerate(zip(cells, widths)):
            cell = _cut(cell, w)
            parts.append(cell.ljust(w) if i == 0 else cell.rjust(w))
        return "  ".join(parts).rstrip()
    return [line(head), "  ".join("-" * w for w in widths)] + [line(r) for r in rows]


def review_text(review: Review) -> str:
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
                _cut(f"mean checks to the fault {num(p.mean_checks)}, mean minutes to the fault "
                     f"{num(p.mean_minutes)}", WIDTH)]
        if p.note:
            out.append(_cut(f"note: {p.note}", WIDTH))
        out.append("")
        out += _table(("fault", "cases", "raw", "prior", "smoothed"),
                      [(f"{f.title} ({f.fault})", str(f.count), pct(f.raw), pct(f.prior),
                        pct(f.smoothed)) for f in p.faults], (66, 5, 6, 6, 8))
        if p.saving_minutes is not None:
            out += ["", _cut(f"expected minutes: current order {num(p.current_minutes)}, "
                             f"data order {num(p.data_minutes)}, saves "
                             f"{num(p.saving_minutes)} min per job", WIDTH)]
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
