"""The voltage chart as a printable HTML page: one socket (tube) or lead (transistor)
drawing per device with its readings written at the pins, and the table beneath.

One self-contained file: inline CSS and SVG, no scripts, no external assets; every text
passes through ``html.escape``. The socket drawing is viewed from under the chassis (the
wiring side), pins numbered clockwise from the gap (miniature) or the key (octal, loctal),
as the handbooks draw their base diagrams.
"""

from __future__ import annotations

import math
from html import escape
from typing import TYPE_CHECKING

from faultwise.expect.chart import ChartRow
from faultwise.expect.context import basis_num as _n

if TYPE_CHECKING:
    from faultwise.profile.model import Profile
    from faultwise.profile.tubes import TubeTable

_CSS = ("body{font-family:sans-serif;margin:1.5em;color:#222}h1{font-size:1.4em}"
        "h2{font-size:1.1em;margin:1.2em 0 .3em}.dev{page-break-inside:avoid;display:flex;"
        "gap:1.5em;align-items:flex-start;border-top:1px solid #999;padding-top:.5em}"
        "table{border-collapse:collapse}td,th{border:1px solid #bbb;padding:2px 6px;"
        "font-size:.9em}th{background:#eee}td.n{text-align:right}.note{font-size:.85em;color:#555}")


def _t(x: float, y: float, text: object, size: float = 11, anchor: str = "middle",
       weight: str = "normal") -> str:
    return (f'<text x="{x:.1f}" y="{y:.1f}" font-family="sans-serif" font-size="{size}" '
            f'text-anchor="{anchor}" font-weight="{weight}">{escape(str(text))}</text>')


def socket_svg(base: str, pins: dict[int, str], title: str) -> str:
    """A tube socket seen from below: pin circles clockwise, each labelled with its reading."""
    count = {"7-pin miniature": 7, "9-pin miniature": 9, "octal": 8, "loctal": 8,
             "4-pin": 4, "6-pin": 6}.get(base, 8)
    miniature = "miniature" in base
    cx, cy, r = 220, 150, 62
    parts = [f'<svg xmlns="http://www.w3.org/2000/svg" width="440" height="300" '
             f'viewBox="0 0 440 300" role="img" aria-label="{escape(title)}">',
             f'<circle cx="{cx}" cy="{cy}" r="{r + 18}" fill="#f4f1ea" stroke="#555"/>']
    if miniature:   # the gap where a pin would be, at the top
        slots = count + 1
        angle0 = -math.pi / 2 + 2 * math.pi / slots
    else:           # the key at the top, pins evenly round it
        slots = count
        angle0 = -math.pi / 2 + math.pi / slots
        parts.append(f'<rect x="{cx - 7}" y="{cy - 14}" width="14" height="28" fill="#999"/>')
        parts.append(f'<circle cx="{cx}" cy="{cy}" r="16" fill="#ccc" stroke="#555"/>')
    for i in range(count):
        a = angle0 + 2 * math.pi * i / slots
        x, y = cx + r * math.cos(a), cy + r * math.sin(a)
        label = pins.get(i + 1, "")
        parts.append(f'<circle cx="{x:.1f}" cy="{y:.1f}" r="9" fill="{"#fff" if label else "#ddd"}" '
                     'stroke="#333"/>')
        parts.append(_t(x, y + 4, i + 1, size=10, weight="bold"))
        if label:
            lx, ly = cx + (r + 34) * math.cos(a), cy + (r + 34) * math.sin(a)
            anchor = "start" if math.cos(a) > 0.2 else "end" if math.cos(a) < -0.2 else "middle"
            parts.append(_t(lx, ly + 4, label, size=10, anchor=anchor))
    parts.append(_t(cx, 292, "socket seen from below (wiring side)", size=10))
    parts.append("</svg>")
    return "".join(parts)


def lead_svg(readings: dict[str, str], title: str) -> str:
    """A transistor symbol with its base, collector and emitter readings written at the leads."""
    parts = ['<svg xmlns="http://www.w3.org/2000/svg" width="340" height="200" '
             f'viewBox="-50 0 340 200" role="img" aria-label="{escape(title)}">',
             '<circle cx="130" cy="100" r="38" fill="#f4f1ea" stroke="#555"/>',
             '<line x1="40" y1="100" x2="115" y2="100" stroke="#333" stroke-width="2"/>',
             '<line x1="115" y1="75" x2="115" y2="125" stroke="#333" stroke-width="4"/>',
             '<line x1="115" y1="88" x2="150" y2="60" stroke="#333" stroke-width="2"/>',
             '<line x1="150" y1="60" x2="150" y2="20" stroke="#333" stroke-width="2"/>',
             '<line x1="115" y1="112" x2="150" y2="140" stroke="#333" stroke-width="2"/>',
             '<line x1="150" y1="140" x2="150" y2="180" stroke="#333" stroke-width="2"/>',
             _t(30, 96, "B", weight="bold", anchor="end"), _t(160, 24, "C", weight="bold", anchor="start"),
             _t(160, 184, "E", weight="bold", anchor="start"),
             _t(30, 114, readings.get("B", ""), size=10, anchor="end"),
             _t(160, 40, readings.get("C", ""), size=10, anchor="start"),
             _t(160, 168, readings.get("E", ""), size=10, anchor="start"), "</svg>"]
    return "".join(parts)


def chart_html(profile: Profile, rows: list[ChartRow], tube_table: TubeTable | None = None) -> str:
    """The whole printable page for one set."""
    from faultwise.profile.tubes import load_tube_table, lookup

    table = tube_table if tube_table is not None else (
        load_tube_table() if profile.line_powered else None)
    body = [f"<h1>Voltage chart: {escape(profile.label)}</h1>",
            '<p class="note">' + escape(
                "DC to B- (series-string) or chassis, set on and warm, tuned off station, with a "
                "high-impedance meter. A series-string chassis may be live: work through an "
                "isolation transformer. Filter capacitors hold charge after switch-off."
                if profile.line_powered else
                "DC to the common rail, magnitudes (PNP readings are negative), no signal, "
                "volume down.") + " * rests on a typical value.</p>"]
    devices: dict[str, list[ChartRow]] = {}
    for r in rows:
        devices.setdefault(r.device, []).append(r)
    for device, group in devices.items():
        labels: dict = {}
        for r in group:
            if r.unit == "V" and r.pin not in ("-", "?"):
                for p in r.pin.split("-"):
                    if p.isdigit():
                        labels.setdefault(int(p), f"{r.electrode} {_n(r.nominal)} V")
                    else:
                        labels.setdefault(p, f"{_n(r.nominal)} V")
        if group[0].role == "supply":
            drawing = ""
        elif profile.line_powered:
            tube_type = device.split(" ", 1)[1]
            data = lookup(tube_type, table) if table is not None else None
            drawing = socket_svg(data.base if data else "octal", labels, device)
        else:
            drawing = lead_svg({k: v for k, v in labels.items() if isinstance(k, str)}, device)
        rows_html = "".join(
            f"<tr><td>{escape(r.pin)}</td><td>{escape(r.electrode)}</td>"
            f'<td class="n">{escape(_n(r.nominal))} {escape(r.unit)}{" *" if r.typical else ""}</td>'
            f'<td class="n">{escape(_n(r.low))} - {escape(_n(r.high))}</td>'
            f"<td>{escape(r.name)}</td></tr>" for r in group)
        body.append(f'<h2>{escape(device)}</h2><div class="dev">{drawing}<table><tr><th>pin</th>'
                    f"<th>electrode</th><th>expected</th><th>band</th><th>name</th></tr>"
                    f"{rows_html}</table></div>")
    return ("<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\">"
            f"<title>Voltage chart: {escape(profile.label)}</title><style>{_CSS}</style></head>"
            f"<body>{''.join(body)}</body></html>\n")
