"""The board picture (``--svg FILE``).

Board coordinates are used as SVG user units (mm; both have Y down), so the
picture matches KiCad's view. Layers: the outline, every copper layer's
copper in a faint colour, electrodes filled by sensitivity (ΔC/Cp relative to
the board's most sensitive pad, on the viridis scale, whose stops are
published with matplotlib), the measured ground gap as a dashed ring, the
copper each finding is about (:mod:`auditor.report.svg_focus`), numbered
finding markers, electrode labels placed clear of markers and of each other
(:mod:`auditor.report.svg_labels`) and a legend on the right that starts with
the run's verdict; with ``--precise`` the slider and wheel response plots under
the board (:mod:`auditor.report.svg_plot`). Shapes are compact paths rounded
to 0.01 mm (:mod:`auditor.report.svg_shapes`).
"""

from __future__ import annotations

from html import escape
from pathlib import Path

from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from auditor.decide.records import Report, SensorResult
from auditor.report.svg_focus import HATCH_ID, focus_marks, hatch_pattern
from auditor.report.svg_labels import EM_WIDTH, Label, place_labels
from auditor.report.svg_marks import (
    SEVERITY_COLOURS,
    legend_lines,
    marker_elements,
    spots,
)
from auditor.report.svg_plot import plots_height, scan_plots
from auditor.report.svg_shapes import number, shape_path
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


_n = number


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
            out.append(shape_path(unary_union(shapes), fill=colour, stroke=colour,
                                  stroke_width=thin, opacity=0.18, data_layer=layer))
    out.append("</g>")
    return out


def _outline(report: Report, stroke: float) -> list[str]:
    board = report.board
    if board is None or board.outline.polygon is None:
        return []
    lines = [board.outline.polygon.boundary, *(c.boundary for c in board.outline.cutouts)]
    return ['<g id="outline">', *(shape_path(g, stroke="#222222", stroke_width=stroke)
                                  for g in lines), "</g>"]


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


def _electrodes(report: Report, thin: float) -> list[str]:
    bests = best_ratios(report)
    shapes, gaps = ['<g id="electrodes">'], ['<g id="ground-gaps">']
    for r in report.sensors:
        geometry: BaseGeometry = r.sensor.geometry
        best = bests.get(_scale_group(r), 0.0)
        fraction = r.metrics.delta_ratio / best if r.metrics and best > 0 else 0.0
        colour = sensitivity_colour(fraction) if r.metrics else _UNSOLVED
        shapes.append(shape_path(geometry, fill=colour, stroke="#333333", stroke_width=thin,
                                 opacity=0.9, data_sensor=r.sensor.name))
        gaps += _gap_ring(r, thin)
    return shapes + ["</g>"] + gaps + ["</g>"]


def _labels(report: Report, font: float, frame: tuple[float, float, float, float]
            ) -> list[str]:
    """Name and ratio of every electrode, placed clear of markers and of
    each other (:mod:`auditor.report.svg_labels`)."""
    radius = font * 0.75  # a marker's radius and its stroke
    markers = [(s.x_mm - radius, s.y_mm - radius, s.x_mm + radius, s.y_mm + radius)
               for s in spots(report.findings) if s.x_mm is not None and s.y_mm is not None]
    labels = [Label((r.sensor.name, f"{r.metrics.delta_ratio * 100:.2f} %" if r.metrics
                     else "unsolved"), r.sensor.geometry, font * 0.8)
              for r in report.sensors]
    out = ['<g id="labels">']
    for placed in place_labels(labels, markers, radius, frame):
        for x, y, line in placed.lines:
            out.append(_text(x, y, placed.label.size, line, text_anchor="middle",
                             dominant_baseline="middle", fill="#ffffff", stroke="#000000",
                             stroke_width=_n(font * 0.12), paint_order="stroke"))
    return out + ["</g>"]


def _gap_ring(r: SensorResult, thin: float) -> list[str]:
    around = r.sensor.surroundings
    if around is None or around.min_gap_mm is None or around.min_gap_mm <= 0:
        return []
    ring = r.sensor.geometry.buffer(around.min_gap_mm).boundary
    return [shape_path(ring, stroke="#e67e22", stroke_width=thin * 1.5,
                       stroke_dasharray="0.6 0.4")]


def verdict_line(report: Report) -> tuple[str, str]:
    """``(text, colour)`` of the picture's verdict, as the run decided it."""
    fail_on = report.info.fail_on.label
    if report.exit_code == 0:
        return f"PASS: nothing at or above {fail_on}", "#2e7d32"
    failing = len(report.failing)
    why = [f"{failing} finding{'s' if failing != 1 else ''} at or above {fail_on}"]
    if report.rule_errors:
        why.append(f"{len(report.rule_errors)} rule(s) crashed")
    return "FAIL: " + "; ".join(why), SEVERITY_COLOURS[Severity.ERROR]


def _legend_keys(report: Report) -> list[tuple[str, str]]:
    keys = [("#9e9e9e", "unsolved electrode"), ("#e67e22", "ground gap (dashed ring)")]
    if report.board is not None:
        keys += [(_LAYER_COLOURS[i % len(_LAYER_COLOURS)], f"copper {layer}")
                 for i, layer in enumerate(report.board.copper_layers)]
        keys += [(f"url(#{HATCH_ID})", "other net at fault (hatched)")]
    keys += [(SEVERITY_COLOURS[s], f"finding: {s.label} (and the copper at fault)")
             for s in sorted(Severity, reverse=True)]
    return keys + [("#ffffff", "hollow marker: waived or in the baseline")]


class _Column:
    """The legend's lines, top to bottom; remembers its widest line."""

    def __init__(self, x0: float, y0: float, font: float) -> None:
        self.x0, self.y, self.font, self.width = x0, y0, font, 0.0
        self.out: list[str] = ['<g id="legend" font-family="sans-serif">']

    def line(self, text: str, size: float, step: float = 1.5, indent: float = 0.0,
             **attrs: str) -> None:
        self.y += step * self.font
        self.out.append(_text(self.x0 + indent, self.y, size, text, **attrs))
        self.width = max(self.width, indent + len(text) * size * EM_WIDTH)


def _legend(report: Report, x0: float, y0: float, font: float) -> tuple[list[str], float, float]:
    """The legend's elements, its bottom and its width."""
    col = _Column(x0, y0, font)
    col.line(Path(report.info.board_path).name, font * 1.1, font_weight="bold")
    verdict, colour = verdict_line(report)
    col.line(verdict, font * 0.9, fill=colour, font_weight="bold")
    col.line(f"profile {report.info.profile} · power {report.info.power}", font * 0.8,
             fill="#555555")
    bests = best_ratios(report)
    col.line("electrode ΔC/Cp, share of the best touch pad", font * 0.9, step=2.0)
    if "proximity" in bests and "touch" in bests:
        col.line("(proximity on its own scale)", font * 0.75, step=1.1, fill="#555555")
    steps, y = 10, col.y
    width = font * 14 / steps
    for i in range(steps):
        col.out.append(f'<rect x="{_n(x0 + i * width)}" y="{_n(y + 0.6 * font)}" '
                       f'width="{_n(width)}" height="{_n(font)}" '
                       f'fill="{sensitivity_colour(i / (steps - 1))}"/>')
    best = bests.get("touch", bests.get("proximity", 0.0))
    col.line("0", font * 0.75, step=2.85)
    col.out.append(_text(x0 + steps * width, col.y, font * 0.75,
                         f"{best * 100:.2f} %" if best > 0 else "no pad solved",
                         text_anchor="end"))
    col.y += 0.5 * font
    for key_colour, label in _legend_keys(report):
        col.out.append(f'<rect x="{_n(x0)}" y="{_n(col.y + 1.5 * font - font * 0.8)}" '
                       f'width="{_n(font)}" height="{_n(font)}" fill="{key_colour}" '
                       f'stroke="#777777" stroke-width="{_n(font * 0.05)}"/>')
        col.line(label, font * 0.8, indent=font * 1.5)
    col.line(f"findings ({len(report.findings)}) by place", font * 0.9, step=2.25)
    for line_colour, caption in legend_lines(spots(report.findings)):
        continued = caption.startswith("\u00a0")  # a wrapped caption's next line
        col.line(caption.lstrip("\u00a0"), font * 0.75, step=1.1 if continued else 1.5,
                 indent=font * 1.5 if continued else 0.0, fill=line_colour)
    return col.out + ["</g>"], col.y + font, col.width


def to_svg(report: Report) -> str:
    """The picture as an SVG document (text)."""
    x0, y0, x1, y1 = _extent(report)
    size = max(x1 - x0, y1 - y0, 1.0)
    font, margin, thin = size / 45, size / 30, size / 3000
    legend, legend_bottom, legend_w = _legend(report, x1 + 2 * margin, y0, font)
    scans = report.precise.scans if report.precise else ()
    plots_h = plots_height(scans, x1 - x0, font)
    plots_gap = margin if scans else 0.0
    height = max(y1 - y0 + 2 * margin + 2 * plots_gap + plots_h,
                 legend_bottom - y0 + 2 * margin)
    vx, vy, vw = x0 - margin, y0 - margin, x1 - x0 + 3 * margin + legend_w
    title = f"padaudit: {Path(report.info.board_path).name}: {verdict_line(report)[0]}"
    body = [f"<title>{escape(title)}</title>", hatch_pattern(font * 0.35),
            f'<rect x="{_n(vx)}" y="{_n(vy)}" width="{_n(vw)}" height="{_n(height)}" '
            'fill="#ffffff"/>',
            *_copper(report, thin), *_outline(report, size / 800),
            *_electrodes(report, thin),
            *focus_marks(report.board, report.findings, report.sensors, size / 1500),
            *marker_elements(spots(report.findings), font),
            *_labels(report, font, (vx, vy, x1 + margin, y1 + margin)),
            *legend, *scan_plots(scans, x0, y1 + margin + plots_gap, x1 - x0, font)]
    return ('<?xml version="1.0" encoding="UTF-8"?>\n'
            f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="{_n(vx)} {_n(vy)} {_n(vw)} '
            f'{_n(height)}" width="{_n(vw * 10)}" height="{_n(height * 10)}" '
            'font-family="sans-serif">\n' + "\n".join(body) + "\n</svg>\n")


def write_svg(report: Report, path: str | Path) -> None:
    """Write the picture to ``path``."""
    Path(path).write_text(to_svg(report), encoding="utf-8")
