"""The board picture (``--svg FILE``).

Board coordinates are used as SVG user units (mm; both have Y down), so the
picture matches KiCad's view. Layers: the outline, every copper layer's
copper in a faint colour, electrodes filled by sensitivity (ΔC/Cp relative to
the board's most sensitive pad, on the viridis scale, whose stops are
published with matplotlib), the measured ground gap as a dashed ring,
numbered finding markers and a legend panel on the right; with ``--precise``
the slider and wheel response plots under the board
(:mod:`auditor.report.svg_plot`). Shapes come from
shapely's own ``.svg()`` output.
"""

from __future__ import annotations

from html import escape
from pathlib import Path

from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from auditor.decide.records import Report, SensorResult
from auditor.report.svg_marks import (
    LEGEND_PLACES,
    SEVERITY_COLOURS,
    legend_lines,
    marker_elements,
    spots,
)
from auditor.report.svg_plot import plots_height, scan_plots
from auditor.rules.finding import Severity

# viridis at 0, .25, .5, .75, 1 (matplotlib's published colormap, CC0).
_VIRIDIS = ("#440154", "#3b528b", "#21918c", "#5ec962", "#fde725")
_LAYER_COLOURS = ("#c0392b", "#2e86c1", "#27ae60", "#b7950b", "#8e44ad", "#d35400")
_SEVERITY_COLOURS = SEVERITY_COLOURS
_UNSOLVED = "#9e9e9e"


def sensitivity_colour(fraction: float) -> str:
    """Colour for ``fraction`` of the best ratio (0..1), interpolating viridis."""
    t = min(max(fraction, 0.0), 1.0) * (len(_VIRIDIS) - 1)
    i = min(int(t), len(_VIRIDIS) - 2)
    a, b = _VIRIDIS[i], _VIRIDIS[i + 1]
    mix = [round(int(a[k:k + 2], 16) + (int(b[k:k + 2], 16) - int(a[k:k + 2], 16)) * (t - i))
           for k in (1, 3, 5)]
    return "#" + "".join(f"{c:02x}" for c in mix)


def _n(value: float) -> str:
    return f"{value:.3f}".rstrip("0").rstrip(".")


def _text(x: float, y: float, size: float, content: str, **attrs: str) -> str:
    extra = "".join(f' {k.replace("_", "-")}="{v}"' for k, v in attrs.items())
    return (f'<text x="{_n(x)}" y="{_n(y)}" font-size="{_n(size)}"{extra}>'
            f"{escape(content)}</text>")


def _extent(report: Report) -> tuple[float, float, float, float]:
    board = report.board
    if board is not None and board.outline.polygon is not None:
        return tuple(board.outline.polygon.bounds)
    shapes = [r.sensor.geometry for r in report.sensors]
    if not shapes:
        return (0.0, 0.0, 10.0, 10.0)
    return tuple(unary_union(shapes).buffer(2.0).bounds)


def _copper(report: Report, thin: float) -> list[str]:
    board = report.board
    if board is None:
        return []
    out = ['<g id="copper">']
    for i, layer in enumerate(board.copper_layers):
        shapes = [it.geometry for it in board.items_on(layer)]
        if shapes:
            colour = _LAYER_COLOURS[i % len(_LAYER_COLOURS)]
            out.append(unary_union(shapes).svg(thin, colour, 0.18))
    out.append("</g>")
    return out


def _outline(report: Report, stroke: float) -> list[str]:
    board = report.board
    if board is None or board.outline.polygon is None:
        return []
    lines = [board.outline.polygon.boundary, *(c.boundary for c in board.outline.cutouts)]
    return ['<g id="outline">', *(g.svg(stroke, "#222222", 1.0) for g in lines), "</g>"]


def _scale_group(r: SensorResult) -> str:
    """Proximity electrodes sense a hand at a distance; scaling buttons
    against them would paint every button the same dark colour."""
    return "proximity" if r.sensor.kind == "proximity" else "touch"


def best_ratios(report: Report) -> dict[str, float]:
    """The best ΔC/Cp per colour-scale group (``touch``, ``proximity``)."""
    best: dict[str, float] = {}
    for r in report.sensors:
        if r.metrics:
            group = _scale_group(r)
            best[group] = max(best.get(group, 0.0), r.metrics.delta_ratio)
    return best


def _electrodes(report: Report, thin: float, font: float) -> list[str]:
    bests = best_ratios(report)
    shapes, gaps, labels = ['<g id="electrodes">'], ['<g id="ground-gaps">'], ['<g id="labels">']
    for r in report.sensors:
        geometry: BaseGeometry = r.sensor.geometry
        best = bests.get(_scale_group(r), 0.0)
        fraction = r.metrics.delta_ratio / best if r.metrics and best > 0 else 0.0
        colour = sensitivity_colour(fraction) if r.metrics else _UNSOLVED
        shapes.append(geometry.svg(thin, colour, 0.9))
        gaps += _gap_ring(r, thin)
        ratio = f"{r.metrics.delta_ratio * 100:.2f} %" if r.metrics else "unsolved"
        for x, y, line in _label_lines(r, font, ratio):
            labels.append(_text(x, y, font * 0.8, line,
                                text_anchor="middle", dominant_baseline="middle",
                                fill="#ffffff", stroke="#000000",
                                stroke_width=_n(font * 0.12), paint_order="stroke"))
    return shapes + ["</g>"] + gaps + ["</g>"] + labels + ["</g>"]


def _label_lines(r: SensorResult, font: float, ratio: str) -> list[tuple[float, float, str]]:
    """Name and ratio inside a pad big enough to hold them, else above and below
    it, so that a finding marker at the centre does not cover them."""
    x, y = _label_point(r)
    x0, y0, x1, y1 = r.sensor.geometry.bounds
    if y1 - y0 > 5 * font and x1 - x0 > 5 * font:
        # above the centre, where a finding's marker usually sits
        return [(x, y - 1.9 * font, r.sensor.name), (x, y - 1.0 * font, ratio)]
    return [(x, y0 - 0.4 * font, r.sensor.name), (x, y1 + 0.9 * font, ratio)]


def _label_point(r: SensorResult) -> tuple[float, float]:
    """The sensor's centre, or a point on its copper when the centre is not
    (rings, loops)."""
    geometry = r.sensor.geometry
    centre = geometry.centroid
    if geometry.is_empty or geometry.buffer(1e-6).contains(centre):
        return r.sensor.x_mm, r.sensor.y_mm
    inside = geometry.representative_point()
    return inside.x, inside.y


def _gap_ring(r: SensorResult, thin: float) -> list[str]:
    around = r.sensor.surroundings
    if around is None or around.min_gap_mm is None or around.min_gap_mm <= 0:
        return []
    ring = r.sensor.geometry.buffer(around.min_gap_mm).boundary
    svg = ring.svg(thin * 1.5, "#e67e22", 1.0)
    return [svg.replace("<polyline ", '<polyline stroke-dasharray="0.6 0.4" ')]


def _legend(report: Report, x0: float, y0: float, font: float) -> list[str]:
    line = font * 1.5
    out = ['<g id="legend" font-family="sans-serif">',
           _text(x0, y0 + line, font * 1.1, Path(report.info.board_path).name, font_weight="bold"),
           _text(x0, y0 + 2 * line, font * 0.8, f"profile {report.info.profile} · "
                 f"power {report.info.power}", fill="#555555")]
    y = y0 + 3.5 * line
    bests = best_ratios(report)
    out.append(_text(x0, y, font * 0.9, "electrode ΔC/Cp, share of the best touch pad"))
    if "proximity" in bests and "touch" in bests:  # one line would run off the picture
        out.append(_text(x0, y + 0.75 * line, font * 0.75, "(proximity on its own scale)",
                         fill="#555555"))
        y += 0.75 * line
    steps = 10
    width = font * 14 / steps
    for i in range(steps):
        out.append(f'<rect x="{_n(x0 + i * width)}" y="{_n(y + 0.4 * line)}" '
                   f'width="{_n(width)}" height="{_n(font)}" '
                   f'fill="{sensitivity_colour(i / (steps - 1))}"/>')
    best = bests.get("touch", bests.get("proximity", 0.0))
    out.append(_text(x0, y + 1.9 * line, font * 0.75, "0"))
    top = f"{best * 100:.2f} %" if best > 0 else "no pad solved"
    out.append(_text(x0 + steps * width, y + 1.9 * line, font * 0.75, top, text_anchor="end"))
    y += 3 * line
    keys = [("#9e9e9e", "unsolved electrode"), ("#e67e22", "ground gap (dashed ring)")]
    if report.board is not None:
        keys += [(_LAYER_COLOURS[i % len(_LAYER_COLOURS)], f"copper {layer}")
                 for i, layer in enumerate(report.board.copper_layers)]
    keys += [(_SEVERITY_COLOURS[s], f"finding: {s.label}") for s in sorted(Severity, reverse=True)]
    keys += [("#ffffff", "hollow marker: waived or in the baseline")]
    for colour, label in keys:
        out.append(f'<rect x="{_n(x0)}" y="{_n(y - font * 0.8)}" width="{_n(font)}" '
                   f'height="{_n(font)}" fill="{colour}" stroke="#777777" '
                   f'stroke-width="{_n(font * 0.05)}"/>')
        out.append(_text(x0 + font * 1.5, y, font * 0.8, label))
        y += line
    y += line * 0.5
    places = spots(report.findings)
    out.append(_text(x0, y, font * 0.9, f"findings ({len(report.findings)}) by place"))
    for colour, caption in legend_lines(places):
        y += line
        out.append(_text(x0, y, font * 0.75, caption, fill=colour))
    return out + ["</g>"]


def to_svg(report: Report) -> str:
    """The picture as an SVG document (text)."""
    x0, y0, x1, y1 = _extent(report)
    size = max(x1 - x0, y1 - y0, 1.0)
    font, margin, thin = size / 45, size / 30, size / 3000
    legend_w = font * 24
    rows = 18 + min(len(spots(report.findings)), LEGEND_PLACES + 1)
    scans = report.precise.scans if report.precise else ()
    plots_h = plots_height(scans, x1 - x0, font)
    plots_gap = margin if scans else 0.0
    height = max(y1 - y0 + 2 * margin + 2 * plots_gap + plots_h,
                 rows * font * 1.5 + 2 * margin)
    vx, vy, vw = x0 - margin, y0 - margin, x1 - x0 + 3 * margin + legend_w
    body = [f'<rect x="{_n(vx)}" y="{_n(vy)}" width="{_n(vw)}" height="{_n(height)}" '
            'fill="#ffffff"/>',
            *_copper(report, thin), *_outline(report, size / 800),
            *_electrodes(report, thin, font), *marker_elements(spots(report.findings), font),
            *_legend(report, x1 + 2 * margin, y0, font),
            *scan_plots(scans, x0, y1 + margin + plots_gap, x1 - x0, font)]
    return ('<?xml version="1.0" encoding="UTF-8"?>\n'
            f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="{_n(vx)} {_n(vy)} {_n(vw)} '
            f'{_n(height)}" width="{_n(vw * 10)}" height="{_n(height * 10)}" '
            'font-family="sans-serif">\n' + "\n".join(body) + "\n</svg>\n")


def write_svg(report: Report, path: str | Path) -> None:
    """Write the picture to ``path``."""
    Path(path).write_text(to_svg(report), encoding="utf-8")
