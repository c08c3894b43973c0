"""Copper under (or over) an electrode on the other copper layers.

For each other layer we take the other nets' copper inside the electrode's
outline and report:

* ``shadowed_fraction``: the share of the electrode's area that lies over
  that copper's *extent*. For a hatched zone the extent is the hatch with its
  openings closed (a morphological closing by just over half the hatch gap),
  so a hatched plane under the whole pad shadows all of it, while a real
  cut-out under the pad stays open;
* ``fill_ratio``: the local copper coverage within that extent. When the
  electrode covers fewer than :data:`MIN_CELLS` hatch cells the local
  measure depends on where the grid happens to fall, so the zone's own
  settings give the closed form of an infinite hatch, 1 − (g/(g+t))²,
  instead (t line width, g gap; :class:`auditor.model.items.HatchSettings`).
"""

from __future__ import annotations

from dataclasses import dataclass

from shapely.geometry.base import BaseGeometry

from auditor.model.board import Board
from auditor.model.items import HatchSettings
from auditor.sensors import robust
from auditor.sensors.model import LayerShadow, Sensor
from auditor.sensors.spatial import pieces_in

#: Hatch cells the electrode must cover for the local coverage to be used.
MIN_CELLS = 4.0
#: Local coverage from which copper counts as solid even inside a hatched pour.
SOLID_RATIO = 0.9
#: Closing radius when a hatched zone carries no settings (mm).
DEFAULT_CLOSING_MM = 0.75


@dataclass(frozen=True)
class _Under:
    copper: BaseGeometry
    nets: tuple[str, ...]
    hatch: HatchSettings | None
    hatched: bool


def shadows_of(board: Board, sensor: Sensor) -> tuple[LayerShadow, ...]:
    """One :class:`LayerShadow` per other copper layer, in stack order."""
    return tuple(layer_shadow(board, sensor, layer) for layer in board.copper_layers
                 if layer != sensor.layer)


def layer_shadow(board: Board, sensor: Sensor, layer: str) -> LayerShadow:
    """The copper under ``sensor`` on ``layer``."""
    depth = depth_between(board, sensor.layer, layer)
    area = float(sensor.geometry.area)
    under = _copper_under(board, sensor, layer)
    if under is None or area <= 0:
        return LayerShadow(layer, depth, 0.0, 0.0, "none")
    inside = robust.intersection(under.copper, sensor.geometry)
    if under.hatched:
        radius = _closing_radius(under.hatch)
        extent = robust.intersection(under.copper.buffer(radius).buffer(-radius),
                                     sensor.geometry)
    else:
        extent = inside
    extent_area = max(float(extent.area), float(inside.area))
    if extent_area <= 1e-9:
        return LayerShadow(layer, depth, 0.0, 0.0, "none")
    ratio = float(inside.area) / extent_area
    if under.hatch is not None and under.hatched:
        pitch = under.hatch.thickness_mm + under.hatch.gap_mm
        if extent_area < MIN_CELLS * pitch * pitch:
            ratio = under.hatch.fill_ratio
    # A solid patch of a net whose pour is hatched elsewhere is solid here.
    hatched = under.hatched and ratio < SOLID_RATIO
    return LayerShadow(layer, depth, min(1.0, extent_area / area), min(1.0, ratio),
                       "hatched" if hatched else "solid", under.nets)


def _copper_under(board: Board, sensor: Sensor, layer: str) -> _Under | None:
    own = set(sensor.nets)
    probe = sensor.geometry
    margin = max([_closing_radius(z.hatch) for z in board.zones if z.fill == "hatched"] + [0.0])
    region = probe.buffer(2 * margin + 0.1) if margin else probe
    hits = pieces_in(board, layer, region, lambda it: it.net not in own)
    if not hits:
        return None
    copper = robust.union([p.geometry for p in hits])
    if copper.is_empty or not copper.intersects(probe):
        return None
    under = [p for p in hits if p.geometry.intersects(probe)]
    hatched_nets = {p.item.net for p in under if p.item.source == "zone"}
    zones = [z for z in board.zones if z.fill == "hatched" and z.net in hatched_nets
             and z.fill_on(layer) is not None]
    hatch = next((z.hatch for z in zones if z.hatch is not None), None)
    nets = tuple(sorted({p.item.net for p in under}))
    return _Under(copper, nets, hatch, bool(zones))


def _closing_radius(hatch: HatchSettings | None) -> float:
    return DEFAULT_CLOSING_MM if hatch is None else 0.5 * hatch.gap_mm * 1.05 + 1e-3


def depth_between(board: Board, layer_a: str, layer_b: str) -> float:
    """Vertical distance between two copper layers from the stackup (mm)."""
    try:
        return abs(board.stackup.depth_of(layer_b) - board.stackup.depth_of(layer_a))
    except KeyError:
        names = board.copper_layers
        if layer_a not in names or layer_b not in names or len(names) < 2:
            return 0.0
        step = board.stackup.board_thickness_mm / (len(names) - 1)
        return abs(names.index(layer_b) - names.index(layer_a)) * step
