"""Both views of the example job print on one or two pages of A4 and of Letter, in a real
browser (Debian's headless Chromium), offline.

Outside references: the page sizes are ISO 216 A4 (210 x 297 mm = 595.3 x 841.9 pt) and
ANSI Letter (8.5 x 11 in = 612 x 792 pt); the PDF is read with pypdf (page count, media box,
text per page). A golden HTML of each view (tests/fixtures/report_golden, rendered from the
example job) is printed beside today's rendering, and the two are compared by page count
and by the size of what they paint (the ink box of a screenshot), not pixel by pixel.
Regenerate the golden files after an intended layout change with
``FAULTWISE_UPDATE_GOLDEN=1 python -m pytest tests/reference/test_report_print.py``.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
import unicodedata
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from faultwise.graph import load_knowledge  # noqa: E402
from faultwise.report import job_report, read_case  # noqa: E402
from faultwise.report.render import bench_html, customer_html  # noqa: E402
from faultwise.core.workspace import bundled_knowledge_dir  # noqa: E402
from report_example_job import PARTS, SHOP, walk_example_job  # noqa: E402
from .test_report_chromium import CHROMIUM, png_pixels  # noqa: E402

pypdf = pytest.importorskip("pypdf")
pytestmark = pytest.mark.skipif(CHROMIUM is None, reason="chromium is not installed")

GOLDEN = Path(__file__).resolve().parents[1] / "fixtures" / "report_golden"
PAPER_PT = {"A4": (595.28, 841.89), "letter": (612.0, 792.0)}     # ISO 216; ANSI Letter
VIEWS = {"customer": customer_html, "bench": bench_html}
HEADINGS = {
    "customer": ("Your set", "What you told us", "What we found", "Parts replaced",
                 "Checks after the repair", "Electrical safety check", "Time and outcome"),
    "bench": ("Set", "Complaint", "Stage map", "Checks", "Fault", "Repair", "Parts replaced",
              "Readings after the repair", "Leakage check", "Time and outcome", "Notes",
              "Safety"),
}


@pytest.fixture(scope="module")
def pages(tmp_path_factory):
    """Today's HTML of each view of the example job (and the golden files, written if asked)."""
    path = walk_example_job(tmp_path_factory.mktemp("cases"))
    report = job_report(read_case(path), load_knowledge(bundled_knowledge_dir()), SHOP)
    out = {view: render(report) for view, render in VIEWS.items()}
    if os.environ.get("FAULTWISE_UPDATE_GOLDEN"):
        GOLDEN.mkdir(parents=True, exist_ok=True)
        for view, page in out.items():
            (GOLDEN / f"{view}.html").write_text(page, encoding="utf-8")
    return out


def _chromium(tmp: Path, *args: str) -> None:
    cmd = [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
           "--no-first-run", "--disable-background-networking", "--disable-component-update",
           "--disable-sync", f"--user-data-dir={tmp / 'chromium-profile'}", *args]
    subprocess.run(cmd, capture_output=True, text=True, timeout=120)


def print_pdf(page: str, paper: str, tmp: Path, name: str):
    """Print ``page`` on ``paper`` (an @page size rule added, as a print dialog would set it)."""
    html = tmp / f"{name}-{paper}.html"
    html.write_text(page.replace("</style>", f"@page {{ size: {paper}; }}</style>", 1),
                    encoding="utf-8")
    pdf = tmp / f"{name}-{paper}.pdf"
    _chromium(tmp, "--no-pdf-header-footer", f"--print-to-pdf={pdf}", html.resolve().as_uri())
    assert pdf.is_file(), f"chromium printed nothing for {name} on {paper}"
    return pypdf.PdfReader(str(pdf))


def ink_box(page: str, tmp: Path, name: str) -> tuple[int, int]:
    """(width, height) in pixels of what the page paints in a 794 px wide window (A4 at
    96 px per inch), the window tall enough to hold all of it."""
    html = tmp / f"{name}-screen.html"
    html.write_text(page, encoding="utf-8")
    png = tmp / f"{name}.png"
    _chromium(tmp, f"--screenshot={png}", "--window-size=794,3200", html.resolve().as_uri())
    width, height, bpp, rows = png_pixels(png)
    xs, ys = [], []
    for y in range(0, height, 2):
        row = rows[y]
        inked = [x for x in range(0, width, 2)
                 if min(row[x * bpp:x * bpp + 3]) < 235]
        if inked:
            ys.append(y)
            xs += (inked[0], inked[-1])
    assert ys, f"{name}: nothing painted"
    return max(xs) - min(xs), max(ys) - min(ys)


def _lines(pdf_page) -> list[str]:
    """The page's text lines; NFKC undoes the typographic ligatures the PDF uses (fi)."""
    text = unicodedata.normalize("NFKC", pdf_page.extract_text())
    return [line.strip() for line in text.splitlines() if line.strip()]


@pytest.mark.parametrize("paper", sorted(PAPER_PT))
@pytest.mark.parametrize("view", sorted(VIEWS))
def test_view_prints_on_one_or_two_pages_with_nothing_cut(pages, tmp_path, view, paper):
    pdf = print_pdf(pages[view], paper, tmp_path, view)
    assert 1 <= len(pdf.pages) <= 2, len(pdf.pages)
    for p in pdf.pages:                           # the paper asked for, within 1 pt
        assert abs(float(p.mediabox.width) - PAPER_PT[paper][0]) < 1.0
        assert abs(float(p.mediabox.height) - PAPER_PT[paper][1]) < 1.0
    text = [_lines(p) for p in pdf.pages]
    joined = " ".join(" ".join(t) for t in text)
    # Nothing cut: every heading, every part as recorded and the shop's terms are printed.
    for needle in HEADINGS[view] + tuple(PARTS) + ((SHOP.terms,) if view == "customer" else ()):
        assert " ".join(needle.split()) in re.sub(r"\s+", " ", joined), needle
    # No page with a lone heading: no page ends on a heading, none holds only a heading.
    for i, lines in enumerate(text):
        assert lines, f"page {i + 1} is empty"
        if i < len(text) - 1:
            assert lines[-1] not in HEADINGS[view], f"page {i + 1} ends on '{lines[-1]}'"
        assert not (len(lines) == 1 and lines[0] in HEADINGS[view]), f"page {i + 1}"


@pytest.mark.parametrize("view", sorted(VIEWS))
def test_matches_golden_by_pages_and_dimensions(pages, tmp_path, view):
    golden_file = GOLDEN / f"{view}.html"
    assert golden_file.is_file(), "run with FAULTWISE_UPDATE_GOLDEN=1 once to write it"
    golden = golden_file.read_text(encoding="utf-8")
    for paper in PAPER_PT:
        now = print_pdf(pages[view], paper, tmp_path, f"{view}-now")
        then = print_pdf(golden, paper, tmp_path, f"{view}-golden")
        assert len(now.pages) == len(then.pages), (paper, len(now.pages), len(then.pages))
    now_w, now_h = ink_box(pages[view], tmp_path, f"{view}-now")
    then_w, then_h = ink_box(golden, tmp_path, f"{view}-golden")
    assert abs(now_w - then_w) <= 0.03 * then_w, (now_w, then_w)
    assert abs(now_h - then_h) <= 0.05 * then_h, (now_h, then_h)
