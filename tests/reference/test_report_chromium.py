"""The job report and the shop review render in a real browser (Debian's headless Chromium).

The browser is the outside reference for "a printable page": it must paint the page (a
screenshot that is not blank) from a file with no URL in it, so no network is attempted.
Skipped where /usr/bin/chromium is missing. The PNG is decoded with the standard library
(zlib and the PNG filter rules of ISO/IEC 15948).
"""

from __future__ import annotations

import shutil
import struct
import subprocess
import sys
import zlib
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from faultwise.graph.knowledge import load_knowledge  # noqa: E402
from faultwise.report.job import job_report  # noqa: E402
from faultwise.report.html_report import job_report_html, review_html  # noqa: E402
from faultwise.shop.review import review_folder  # noqa: E402
from review_case_factory import make_case, write_case  # noqa: E402

CHROMIUM = shutil.which("chromium") or ("/usr/bin/chromium" if Path("/usr/bin/chromium").exists()
                                        else None)
KB = Path(__file__).resolve().parents[1] / "fixtures" / "kb_review"

pytestmark = pytest.mark.skipif(CHROMIUM is None, reason="chromium is not installed")


def _paeth(a: int, b: int, c: int) -> int:
    p = a + b - c
    pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
    if pa <= pb and pa <= pc:
        return a
    return b if pb <= pc else c


def png_pixels(path: Path) -> tuple[int, int, int, list[bytes]]:
    """(width, height, bytes per pixel, rows) of an 8-bit RGB/RGBA PNG (ISO/IEC 15948)."""
    data = path.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    pos, idat, header = 8, b"", None
    while pos < len(data):
        (length,) = struct.unpack(">I", data[pos:pos + 4])
        kind = data[pos + 4:pos + 8]
        body = data[pos + 8:pos + 8 + length]
        if kind == b"IHDR":
            header = struct.unpack(">IIBBBBB", body)
        elif kind == b"IDAT":
            idat += body
        pos += 12 + length
    width, height, depth, colour, _, _, interlace = header
    assert depth == 8 and colour in (2, 6) and interlace == 0
    bpp = 3 if colour == 2 else 4
    raw = zlib.decompress(idat)
    stride = width * bpp
    rows, prev = [], bytearray(stride)
    for y in range(height):
        f = raw[y * (stride + 1)]
        line = bytearray(raw[y * (stride + 1) + 1:(y + 1) * (stride + 1)])
        for i in range(stride):
            a = line[i - bpp] if i >= bpp else 0
            b = prev[i]
            c = prev[i - bpp] if i >= bpp else 0
            line[i] = (line[i] + (0, a, b, (a + b) // 2, _paeth(a, b, c))[f]) & 0xFF
        rows.append(bytes(line))
        prev = line
    return width, height, bpp, rows


def ink_fraction(path: Path) -> float:
    """Share of sampled pixels that are not near-white."""
    width, height, bpp, rows = png_pixels(path)
    inked = total = 0
    for row in rows[::4]:
        for x in range(0, width, 4):
            r, g, b = row[x * bpp:x * bpp + 3]
            total += 1
            inked += (r < 235 or g < 235 or b < 235)
    return inked / total


def screenshot(html_path: Path, tmp_path: Path) -> Path:
    png = tmp_path / (html_path.stem + ".png")
    profile = tmp_path / "chromium-profile"
    cmd = [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
           "--no-first-run", "--disable-background-networking", "--disable-component-update",
           "--disable-sync", f"--user-data-dir={profile}", f"--screenshot={png}",
           "--window-size=1000,1400", html_path.resolve().as_uri()]
    proc = subprocess.run(cmd, capture_output=True, text=True, timeout=120)
    assert png.is_file(), proc.stderr[-2000:]
    return png


def _no_urls(page: str) -> None:
    # Nothing for the browser to fetch: no scheme, no protocol-relative URL, no src/href.
    low = page.lower()
    for needle in ("http:", "https:", "//", "src=", "href=", "@import"):
        assert needle not in low, needle


def test_job_report_renders(tmp_path):
    k = load_knowledge(KB)
    case = make_case("20260302-B1-007", symptom="hum-loud",
                     checks=[("supply.first-cap-esr", "good"), ("supply.second-cap-esr", "good"),
                             ("audio.coupling-cap-check", "positive")],
                     fault="audio.leaky-coupling-cap", parts=["22 nF 630 V film capacitor"],
                     closing=[("supply.leakage-check", "0.2")], customer="ticket 4411")
    page = job_report_html(job_report(case, k))
    _no_urls(page)
    html_path = tmp_path / "job.html"
    html_path.write_text(page, encoding="utf-8")
    png = screenshot(html_path, tmp_path)
    assert ink_fraction(png) > 0.02          # text, tables and the stage map painted


def test_review_renders(tmp_path):
    k = load_knowledge(KB)
    cases = tmp_path / "cases"
    for i, (fault, day) in enumerate([("supply.dry-first-cap", 0), ("audio.leaky-coupling-cap", 3),
                                      ("audio.leaky-coupling-cap", 35),
                                      ("supply.dry-second-cap", 70)]):
        write_case(cases, make_case(f"c{i}", symptom="hum-loud", fault=fault, day=day,
                                    minutes=30 + 10 * i))
    page = review_html(review_folder(cases, k))
    _no_urls(page)
    html_path = tmp_path / "review.html"
    html_path.write_text(page, encoding="utf-8")
    png = screenshot(html_path, tmp_path)
    assert ink_fraction(png) > 0.02
