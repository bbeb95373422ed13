"""Small inline SVG drawings for the HTML reports: the receiver's stage map and two charts.

Plain SVG text, no scripts, no external references (fonts are the viewer's generic
``sans-serif``). Every label passes through ``html.escape``. Each state is written as a word
in the drawing as well as a colour, so a grey-scale print still reads.
"""

from __future__ import annotations

from html import escape

# (stage id, label, x, y) of the signal-path boxes, left to right; the supply sits below.
_BOX_W, _BOX_H = 118, 58
_PATH = (
    ("antenna", "Antenna", 10),
    ("oscillator", "Oscillator / mixer", 148),
    ("if", "IF", 286),
    ("detector", "Detector", 424),
    ("audio", "Audio", 562),
    ("speaker", "Speaker", 700),
)
# Keyed by the states of faultwise.walk.stages (the bench map's rule).
_STATE_STYLE = {
    "faulty": ("#f6d2cc", "#a5281b", 3.0, "FAULT"),
    "cleared": ("#d9eed8", "#2e6b30", 1.5, "cleared"),
    "suspect": ("#fbeccb", "#8a6212", 1.5, "suspect"),
    "not-needed": ("#eeeeee", "#555555", 1.5, "not needed"),
    "": ("#ffffff", "#777777", 1.0, ""),
}


def _text(x: float, y: float, text: str, *, size: int = 13, anchor: str = "middle",
          weight: str = "normal", fill: str = "#222") -> str:
    return (f'<text x="{x:.1f}" y="{y:.1f}" font-family="sans-serif" font-size="{size}" '
            f'text-anchor="{anchor}" font-weight="{weight}" fill="{fill}">{escape(text)}</text>')


def _box(x: float, y: float, label: str, state: str, w: float = _BOX_W, h: float = _BOX_H) -> str:
    fill, stroke, width, word = _STATE_STYLE.get(state, _STATE_STYLE[""])
    parts = [f'<rect x="{x}" y="{y}" width="{w}" height="{h}" rx="6" fill="{fill}" '
             f'stroke="{stroke}" stroke-width="{width}"/>',
             _text(x + w / 2, y + (h / 2 - 2 if word else h / 2 + 5), label, weight="bold")]
    if word:
        parts.append(_text(x + w / 2, y + h / 2 + 16, word, size=11, fill=stroke,
                           weight="bold" if state == "faulty" else "normal"))
    return "".join(parts)


def stage_map_svg(states: dict[str, str], title: str = "Stage map") -> str:
    """Block diagram of an AM superhet: the signal path left to right, the supply beneath.

    ``states``: stage id -> a state of :mod:`faultwise.walk.stages` (absent: not examined).
    """
    width, height = 830, 250
    y = 40
    out = [f'<svg width="{width}" height="{height}" '
           f'viewBox="0 0 {width} {height}" role="img" aria-label="{escape(title)}">',
           f"<title>{escape(title)}</title>",
           '<defs><marker id="arrow" markerWidth="8" markerHeight="8" refX="7" refY="4" '
           'orient="auto"><path d="M0,0 L8,4 L0,8 z" fill="#555"/></marker></defs>']
    for i, (stage, label, x) in enumerate(_PATH):
        out.append(_box(x, y, label, states.get(stage, "")))
        if i + 1 < len(_PATH):
            x2 = _PATH[i + 1][2]
            out.append(f'<line x1="{x + _BOX_W}" y1="{y + _BOX_H / 2}" x2="{x2 - 2}" '
                       f'y2="{y + _BOX_H / 2}" stroke="#555" stroke-width="1.5" '
                       'marker-end="url(#arrow)"/>')
    sy = 160
    out.append(_box(148, sy, "Supply (heaters, B+)", states.get("supply", ""), w=532, h=50))
    for _, _, x in _PATH[1:5]:
        cx = x + _BOX_W / 2
        out.append(f'<line x1="{cx}" y1="{sy}" x2="{cx}" y2="{y + _BOX_H + 2}" stroke="#999" '
                   'stroke-width="1.2" stroke-dasharray="4 3" marker-end="url(#arrow)"/>')
    out.append(_text(10, 22, "Signal path", size=12, anchor="start", fill="#555"))
    lx = 10
    for state, name in (("faulty", "faulty stage"), ("cleared", "checks normal"),
                        ("suspect", "suspect"), ("not-needed", "suspected, not needed"),
                        ("", "not examined")):
        fill, stroke, w, _ = _STATE_STYLE[state]
        out.append(f'<rect x="{lx}" y="228" width="14" height="14" fill="{fill}" '
                   f'stroke="{stroke}" stroke-width="{w}"/>')
        out.append(_text(lx + 20, 240, name, size=11, anchor="start"))
        lx += 162
    out.append("</svg>")
    return "".join(out)


def bar_chart_svg(rows: list[tuple[str, float, str]], title: str, *, width: int = 760,
                  label_w: int = 300, max_value: float = 1.0) -> str:
    """Horizontal bars: (label, value between 0 and max_value, text printed after the bar)."""
    bar_h, gap, top = 18, 8, 28
    height = top + len(rows) * (bar_h + gap) + 8
    room = width - label_w - 90
    out = [f'<svg width="{width}" height="{height}" '
           f'viewBox="0 0 {width} {height}" role="img" aria-label="{escape(title)}">',
           f"<title>{escape(title)}</title>", _text(0, 16, title, anchor="start", weight="bold")]
    for i, (label, value, note) in enumerate(rows):
        y = top + i * (bar_h + gap)
        frac = 0.0 if max_value <= 0 else max(0.0, min(1.0, value / max_value))
        short = label if len(label) <= 44 else label[:43] + "\u2026"
        out.append(_text(label_w - 8, y + 13, short, size=12, anchor="end"))
        out.append(f'<rect x="{label_w}" y="{y}" width="{room}" height="{bar_h}" fill="#eef0f3"/>')
        out.append(f'<rect x="{label_w}" y="{y}" width="{room * frac:.1f}" height="{bar_h}" '
                   'fill="#3b6ea5"/>')
        out.append(_text(label_w + room + 6, y + 13, note, size=12, anchor="start"))
    out.append("</svg>")
    return "".join(out)


def column_chart_svg(rows: list[tuple[str, float, str]], title: str, *, width: int = 760,
                     height: int = 240, unit: str = "min") -> str:
    """Vertical bars by period: (x label, value, note above the bar), e.g. minutes per job."""
    top, bottom, left = 30, 40, 50
    plot_h = height - top - bottom
    n = max(1, len(rows))
    slot = (width - left - 10) / n
    peak = max((v for _, v, _ in rows), default=0.0) or 1.0
    out = [f'<svg width="{width}" height="{height}" '
           f'viewBox="0 0 {width} {height}" role="img" aria-label="{escape(title)}">',
           f"<title>{escape(title)}</title>", _text(0, 16, title, anchor="start", weight="bold"),
           f'<line x1="{left}" y1="{top + plot_h}" x2="{width - 10}" y2="{top + plot_h}" '
           'stroke="#555"/>',
           _text(left - 6, top + 10, f"{peak:.0f} {unit}", size=11, anchor="end")]
    for i, (label, value, note) in enumerate(rows):
        h = plot_h * max(0.0, value) / peak
        x = left + i * slot + slot * 0.15
        w = slot * 0.7
        y = top + plot_h - h
        out.append(f'<rect x="{x:.1f}" y="{y:.1f}" width="{w:.1f}" height="{h:.1f}" '
                   'fill="#3b6ea5"/>')
        out.append(_text(x + w / 2, y - 4, note, size=10))
        if n <= 14 or i % max(1, n // 12) == 0:
            out.append(_text(x + w / 2, top + plot_h + 16, label, size=10))
    out.append("</svg>")
    return "".join(out)
