"""Where the user must act: the copper a finding is about, drawn on its layer.

A marker says *that* something is wrong near a point; these marks show
*what*: for a finding that names another net (a noisy net close by, a
parallel run, a crossing) the stretch of sense trace near that point in the
severity's colour and the other net's copper outlined beside it; for copper
under an electrode the part of it under the pad; for a tight ground gap the
narrowest gap itself, as a line across it. Marks need the board
(``report.board``); without it there are none.
"""

from __future__ import annotations

from shapely.geometry import LineString, Point
from shapely.geometry.base import BaseGeometry
from shapely.ops import nearest_points, unary_union

from auditor.decide.records import DecidedFinding, SensorResult
from auditor.model.board import Board
from auditor.report.svg_marks import SEVERITY_COLOURS
from auditor.report.svg_shapes import number, shape_path

#: Radius around a finding's point within which its copper is drawn, in mm,
#: unless the finding measured a longer run (common practice, no source).
REACH_MM = 6.0
HATCH_ID = "other-net"


def hatch_pattern(pitch: float) -> str:
    """The black hatch that fills another net's copper (lines ``pitch`` apart),
    so the colour underneath still shows."""
    return (f'<defs><pattern id="{HATCH_ID}" width="{number(pitch)}" height="{number(pitch)}" '
            'patternUnits="userSpaceOnUse" patternTransform="rotate(45)">'
            f'<line x1="0" y1="0" x2="0" y2="{number(pitch)}" stroke="#000000" '
            f'stroke-width="{number(pitch * 0.3)}"/></pattern></defs>')


def _reach(d: DecidedFinding) -> float:
    measured = dict(d.finding.measured)
    return max(REACH_MM, 0.5 * float(measured.get("parallel_mm", 0.0)) + 1.0)


def _net_copper(board: Board, layer: str, nets: list[str], area: BaseGeometry) -> BaseGeometry:
    parts = [board.copper_of_net(layer, net).intersection(area) for net in nets]
    return unary_union([p for p in parts if not p.is_empty])


def _other_net_marks(board: Board, d: DecidedFinding, sensor: SensorResult,
                     width: float) -> list[str]:
    f = d.finding
    assert f.x_mm is not None and f.y_mm is not None
    spot = Point(f.x_mm, f.y_mm)
    own = [n for n in f.nets if n in sensor.sensor.nets]
    others = [n for n in f.nets if n not in sensor.sensor.nets]
    # Copper under the pad: show it under the pad; anything else: near the spot.
    area = (sensor.sensor.geometry if sensor.sensor.geometry.contains(spot)
            else spot.buffer(_reach(d)))
    colour = SEVERITY_COLOURS[d.severity]
    out = [shape_path(_net_copper(board, f.layer, others, area), fill=f"url(#{HATCH_ID})",
                      stroke="#000000", stroke_width=width,
                      stroke_dasharray=f"{number(width * 4)} {number(width * 3)}")]
    if area is not sensor.sensor.geometry:
        out.append(shape_path(_net_copper(board, f.layer, own, area), fill=colour,
                              stroke=colour, stroke_width=width * 5, opacity=0.85))
    return out


def _gap_marks(board: Board, d: DecidedFinding, sensor: SensorResult,
               width: float) -> list[str]:
    """A line across the narrowest gap between the pad and other copper."""
    gap = float(dict(d.finding.measured).get("gap_mm", 0.0))
    pad = sensor.sensor.geometry
    near = pad.buffer(gap * 2 + 0.05)
    items = board.items_on(d.finding.layer or sensor.sensor.layer)
    others = unary_union([it.geometry for it in items if it.net not in sensor.sensor.nets
                          and it.geometry.intersects(near)])
    if others.is_empty:
        return []
    a, b = nearest_points(pad.boundary, others)
    across = LineString([a, b])
    middle = across.interpolate(0.5, normalized=True)
    colour = SEVERITY_COLOURS[d.severity]
    return [shape_path(across.buffer(max(gap * 0.5, width)), fill=colour),
            shape_path(middle.buffer(max(gap * 4, width * 12)).boundary, stroke=colour,
                       stroke_width=width * 2)]


def _foreign_nets(nets: tuple[str, ...], sensor: SensorResult,
                  sensors: tuple[SensorResult, ...]) -> bool:
    """True when the finding names a net that is neither this electrode's nor
    a sibling segment's of its slider or wheel (those findings are about the
    group, not about copper near a point)."""
    own = set(sensor.sensor.nets)
    if sensor.sensor.group:
        own |= {n for r in sensors if r.sensor.group == sensor.sensor.group
                for n in r.sensor.nets}
    return any(n not in own for n in nets)


def focus_marks(board: Board | None, findings: tuple[DecidedFinding, ...],
                sensors: tuple[SensorResult, ...], width: float) -> list[str]:
    """The ``focus`` group: copper at fault for every finding that has it."""
    if board is None:
        return []
    by_name = {r.sensor.name: r for r in sensors}
    out = ['<g id="focus">']
    drawn: set[tuple[object, ...]] = set()
    # Worst first, so copper named by several findings takes the worst colour.
    for d in sorted(findings, key=lambda d: -int(d.severity)):
        f = d.finding
        sensor = by_name.get(f.sensor)
        key = (f.x_mm, f.y_mm, f.layer, f.nets)
        if sensor is None or f.x_mm is None or f.y_mm is None or not f.layer or key in drawn:
            continue
        drawn.add(key)
        if _foreign_nets(f.nets, sensor, sensors):
            out += _other_net_marks(board, d, sensor, width)
        elif "gap_mm" in dict(f.measured):
            out += _gap_marks(board, d, sensor, width)
    return [line for line in out if line] + ["</g>"]
