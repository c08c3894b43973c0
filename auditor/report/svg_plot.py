"""Slider and wheel response plots for the board picture (``--precise``).

One small plot per scanned group: each segment's ΔC against finger position
as a polyline, labelled axes, dead zones shaded and reversals marked. Plots
sit in a row under the board, in the picture's own units (mm of board).
"""

from __future__ import annotations

import textwrap
from collections.abc import Callable
from html import escape
from typing import TYPE_CHECKING

from auditor.report.svg_labels import EM_WIDTH
from auditor.report.svg_shapes import number

if TYPE_CHECKING:
    from auditor.model.results import SegmentScan

#: Segment line colours: matplotlib's published "tab10" cycle (BSD licence).
SEGMENT_COLOURS = ("#1f77b4", "#ff7f0e", "#2ca02c", "#d62728", "#9467bd", "#8c564b",
                   "#e377c2", "#7f7f7f", "#bcbd22", "#17becf")
#: Plot size in font heights (the picture's font scales with the board).
PLOT_WIDTH_FONTS = 26.0
PLOT_HEIGHT_FONTS = 14.0


_n = number


def _text(x: float, y: float, size: float, content: str, **attrs: str) -> str:
    extra = "".join(f' {k.replace("_", "-")}="{v}"' for k, v in attrs.items())
    return (f'<text x="{_n(x)}" y="{_n(y)}" font-size="{_n(size)}"{extra}>'
            f"{escape(content)}</text>")


def plots_height(scans: tuple[SegmentScan, ...], width: float, font: float) -> float:
    """Height the plot rows take under a board ``width`` wide (0 without scans)."""
    if not scans:
        return 0.0
    per_row = max(1, int(width // (PLOT_WIDTH_FONTS * font)))
    rows = -(-len(scans) // per_row)
    return rows * PLOT_HEIGHT_FONTS * font


def scan_plots(scans: tuple[SegmentScan, ...], x0: float, y0: float, width: float,
               font: float) -> list[str]:
    """Every scan's plot, left to right and wrapping at ``width``, from ``(x0, y0)``."""
    if not scans:
        return []
    plot_w, plot_h = PLOT_WIDTH_FONTS * font, PLOT_HEIGHT_FONTS * font
    per_row = max(1, int(width // plot_w))
    out = ['<g id="scan-plots" font-family="sans-serif">']
    for k, scan in enumerate(scans):
        row, column = divmod(k, per_row)
        out += scan_plot(scan, x0 + column * plot_w, y0 + row * plot_h, plot_w, plot_h, font)
    return out + ["</g>"]


def _ticks(top: float) -> list[float]:
    """0, the middle and ``top``: enough to read a response's level."""
    return [0.0, top / 2, top] if top > 0 else [0.0]


def scan_plot(scan: SegmentScan, x: float, y: float, width: float, height: float,
              font: float) -> list[str]:
    """One plot in the box ``(x, y, width, height)``: title, axes, one polyline
    per segment, segment names at their peaks."""
    small = font * 0.7
    left, right = x + font * 3.2, x + width - font * 1.2
    # The summary wraps inside the plot's box; the axes move down under it.
    summary = textwrap.wrap(_summary(scan), max(20, int((width - font) / (small * EM_WIDTH))),
                            break_long_words=False)
    top = y + font * (2.6 + 0.8 * (len(summary) - 1))
    bottom = y + height - font * 2.6
    positions = scan.positions_mm
    first, last = (positions[0], positions[-1]) if positions else (0.0, 1.0)
    span = (last - first) or 1.0
    peak = max((max(row) for row in scan.delta_pf if row), default=0.0)
    ceiling = peak * 1.1 if peak > 0 else 1.0

    def px(position: float) -> float:
        return left + (position - first) / span * (right - left)

    def py(value: float) -> float:
        return bottom - max(value, 0.0) / ceiling * (bottom - top)

    out = [f'<g class="scan" data-group="{escape(scan.group)}">',
           f'<rect x="{_n(x)}" y="{_n(y)}" width="{_n(width - font * 0.4)}" '
           f'height="{_n(height - font * 0.4)}" fill="#ffffff" stroke="#bbbbbb" '
           f'stroke-width="{_n(font * 0.04)}"/>',
           _text(x + font * 0.5, y + font * 1.2, font * 0.85,
                 f"{scan.kind} {scan.group}: ΔC against finger position", font_weight="bold"),
           *(_text(x + font * 0.5, y + font * (2.1 + 0.8 * i), small, line, fill="#555555")
             for i, line in enumerate(summary))]
    out += _shading(scan, px, top, bottom, font)
    out += _axes(left, right, top, bottom, first, last, ceiling, font)
    for i, name in enumerate(scan.segment_names):
        colour = SEGMENT_COLOURS[i % len(SEGMENT_COLOURS)]
        points = " ".join(f"{_n(px(p))},{_n(py(row[i]))}"
                          for p, row in zip(positions, scan.delta_pf, strict=True))
        out.append(f'<polyline points="{points}" fill="none" stroke="{colour}" '
                   f'stroke-width="{_n(font * 0.12)}" stroke-linejoin="round"/>')
        if positions:
            best = max(range(len(positions)), key=lambda n: scan.delta_pf[n][i])
            half = 0.3 * small * len(name)  # keep a name at either end off the axes
            label_x = min(max(px(positions[best]), left + half + font * 0.2), right - half)
            out.append(_text(label_x, py(scan.delta_pf[best][i]) - font * 0.3,
                             small * 0.9, name, text_anchor="middle", fill=colour))
    return out + ["</g>"]


def _summary(scan: SegmentScan) -> str:
    zones = ", ".join(f"{a:.1f}–{b:.1f} mm" for a, b in scan.dead_zones_mm)
    back = ", ".join(f"{p:.1f} mm" for p in scan.reversals_mm)
    return (f"linearity {scan.linearity_mm:.2f} mm · dead zones "
            f"{zones + ' (shaded)' if zones else 'none'} · reversals "
            f"{back + ' (dashed)' if back else 'none'}")


def _shading(scan: SegmentScan, to_x: Callable[[float], float], top: float, bottom: float,
             font: float) -> list[str]:
    out = []
    for a, b in scan.dead_zones_mm:
        x_a, x_b = to_x(a), to_x(b)
        out.append(f'<rect x="{_n(x_a)}" y="{_n(top)}" width="{_n(max(x_b - x_a, font * 0.2))}" '
                   f'height="{_n(bottom - top)}" fill="#e0e0e0"><title>dead zone</title></rect>')
    for p in scan.reversals_mm:
        x_p = to_x(p)
        out.append(f'<line x1="{_n(x_p)}" y1="{_n(top)}" x2="{_n(x_p)}" y2="{_n(bottom)}" '
                   f'stroke="#d62728" stroke-width="{_n(font * 0.08)}" '
                   f'stroke-dasharray="{_n(font * 0.3)} {_n(font * 0.2)}"/>')
    return out


def _axes(left: float, right: float, top: float, bottom: float, first: float, last: float,
          ceiling: float, font: float) -> list[str]:
    small, stroke = font * 0.65, _n(font * 0.05)
    out = [f'<polyline points="{_n(left)},{_n(top)} {_n(left)},{_n(bottom)} {_n(right)},'
           f'{_n(bottom)}" fill="none" stroke="#333333" stroke-width="{stroke}"/>']
    for value in _ticks(ceiling / 1.1):
        y = bottom - value / ceiling * (bottom - top)
        out.append(f'<line x1="{_n(left - font * 0.25)}" y1="{_n(y)}" x2="{_n(left)}" '
                   f'y2="{_n(y)}" stroke="#333333" stroke-width="{stroke}"/>')
        out.append(_text(left - font * 0.35, y, small, f"{value:.2f}", text_anchor="end",
                         dominant_baseline="middle"))
    for value in (first, (first + last) / 2, last):
        x = left + (value - first) / ((last - first) or 1.0) * (right - left)
        out.append(f'<line x1="{_n(x)}" y1="{_n(bottom)}" x2="{_n(x)}" '
                   f'y2="{_n(bottom + font * 0.25)}" stroke="#333333" stroke-width="{stroke}"/>')
        out.append(_text(x, bottom + font * 0.95, small, f"{value:.1f}", text_anchor="middle"))
    out.append(_text((left + right) / 2, bottom + font * 1.9, small,
                     "finger position along the path (mm)", text_anchor="middle"))
    out.append(_text(left - font * 2.6, (top + bottom) / 2, small, "ΔC (pF)",
                     text_anchor="middle",
                     transform=f"rotate(-90 {_n(left - font * 2.6)} {_n((top + bottom) / 2)})"))
    return out
