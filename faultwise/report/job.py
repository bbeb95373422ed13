"""Reading a case for its job report, the report's number formats, and the shop review as
text for a 100-column terminal.

The job report's model is :mod:`faultwise.report.model` (one model, two views: the bench
copy and the customer copy), rendered by :mod:`faultwise.report.render`; ``job_report`` and
``job_report_markdown`` here are the entry points the commands and the tests use.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Mapping

SAFETY_STATEMENT = (
    "This record was kept with faultwise, which supports trained people. It does not replace "
    "training, the set's service data, local electrical codes or licensed practice, and it "
    "defers to all of them.")
LEAKAGE_STATEMENT = (
    "A mains-powered set can put line voltage on its chassis and on any metal a person can "
    "touch (a series-string set by design, a transformer set through a fault). It goes back "
    "to its owner only after a leakage check: the AC voltage across 1500 ohm shunted by 0.15 uF, from each exposed metal part to a true earth, with the plug "
    "one way and then reversed, not through an isolation transformer, is at most 0.75 V "
    "(0.5 mA).")
NOT_LINE_CONNECTED = "Not mains-powered (battery set): no leakage check is needed."


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

def job_report(case: Mapping, knowledge=None, shop=None):
    """The report model of a case (:func:`faultwise.report.model.build_report`)."""
    from faultwise.report.model import build_report

    return build_report(case, knowledge, shop)


# ------------------------------------------------------------------------ formatting

def number(value: float, unit: str = "") -> str:
    """A value with its unit for display (units.format_reading where it knows the unit)."""
    if unit:
        try:
            from faultwise.core.units import format_reading

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
    from faultwise.cases.summary import parse_time

    t = parse_time(iso)
    if t is None:
        return iso
    zone = t.strftime(" %z") if t.tzinfo else ""
    if len(zone) == 6:
        zone = zone[:4] + ":" + zone[4:]
    return t.strftime("%Y-%m-%d %H:%M") + zone


def minutes_text(minutes: float | None) -> str:
    if minutes is None:
        return "not recorded"
    h, m = divmod(int(round(minutes)), 60)
    return f"{h} h {m:02d} min" if h else f"{m} min"


def job_report_markdown(r) -> str:
    """The bench copy as Markdown (:func:`faultwise.report.render.bench_markdown`)."""
    from faultwise.report.render import bench_markdown

    return bench_markdown(r)


# ------------------------------------------------------------------- review as text

WIDTH = 100


def pct(x: float | None) -> str:
    """A share 0..1 as a whole percent (``"-"`` when unknown): one rule for every report."""
    return "-" if x is None else f"{100 * x:.0f}%"


def num(x: float | None, digits: int = 1) -> str:
    """A number with ``digits`` decimals (``"-"`` when unknown): one rule for every report."""
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
