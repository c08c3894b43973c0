"""Parts that usually make noise near a pad: LEDs, inductors, crystals, regulators.

Recognised by reference prefix (``SelectionSelection.noisy_prefixes``: D, LED,
L, Y, X, FB by default), by words in the library id or value (LED, inductor,
crystal, oscillator, regulator, buck, boost, LDO ...), and, for a ``U`` part,
by an inductor within :data:`REGULATOR_INDUCTOR_MM` (a switching regulator).
Distances are from the electrode's copper to the part's nearest pad.
"""

from __future__ import annotations

import re

from shapely.geometry import Point
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from auditor.model.board import Board
from auditor.model.items import Footprint
from auditor.sensors.model import Sensor
from auditor.sensors.selection import SensorSelection

#: A U part with an inductor this close is taken for a switching regulator.
REGULATOR_INDUCTOR_MM = 5.0
_NOISY_WORDS = re.compile(
    r"(?<![a-z])led|inductor|crystal|oscillator|xtal|regulator|ldo|buck|boost|dc.?dc|ams1117|"
    r"lm317|78\d\d|ferrite", re.IGNORECASE)
_PREFIX = re.compile(r"^[A-Za-z]+")


def ref_prefix(ref: str) -> str:
    """The letters a reference starts with (``LED3`` → ``LED``)."""
    found = _PREFIX.match(ref)
    return found.group(0).upper() if found else ""


def is_noisy_part(board: Board, fp: Footprint, selection: SensorSelection) -> bool:
    """Whether ``fp`` is a part that switches current (see module docs)."""
    prefix = ref_prefix(fp.ref)
    if prefix in {p.upper() for p in selection.noisy_prefixes}:
        return True
    lib_name = fp.lib_id.split(":")[-1]
    if _NOISY_WORDS.search(lib_name) or _NOISY_WORDS.search(fp.value) \
            or _NOISY_WORDS.search(fp.lib_id.split(":")[0]):
        return True
    return prefix == "U" and _has_inductor_near(board, fp)


def _has_inductor_near(board: Board, fp: Footprint) -> bool:
    body = part_copper(fp)
    return any(ref_prefix(o.ref) == "L" and body.distance(part_copper(o)) <= REGULATOR_INDUCTOR_MM
               for o in board.footprints if o.uid != fp.uid)


def part_copper(fp: Footprint) -> BaseGeometry:
    """The union of a part's pads, or its anchor point when it has none."""
    shapes = [s.geometry for pad in fp.pads for s in pad.copper]
    return unary_union(shapes) if shapes else Point(fp.x_mm, fp.y_mm)


def noisy_parts_near(board: Board, sensor: Sensor,
                     selection: SensorSelection) -> tuple[tuple[str, float], ...]:
    """(reference, distance mm) of noisy parts within ``parts_radius_mm``, nearest first."""
    radius = selection.parts_radius_mm
    x0, y0, x1, y1 = sensor.geometry.bounds
    found: list[tuple[float, str]] = []
    for fp in board.footprints:
        if fp.uid in sensor.footprint_uids:
            continue
        if not (x0 - radius - 20 <= fp.x_mm <= x1 + radius + 20
                and y0 - radius - 20 <= fp.y_mm <= y1 + radius + 20):
            continue
        dist = float(sensor.geometry.distance(part_copper(fp)))
        if dist <= radius and is_noisy_part(board, fp, selection):
            found.append((dist, fp.ref))
    return tuple((ref, dist) for dist, ref in sorted(found))
