"""Parts that usually make noise near a pad: LEDs, inductors, crystals, regulators.

Recognised by reference prefix (``SelectionSelection.noisy_prefixes``: D, LED,
L, Y, X, FB by default), by words in the library id or value (LED, inductor,
crystal, oscillator, regulator, buck, boost, LDO ...), and, for a ``U`` part,
by an inductor within :data:`REGULATOR_INDUCTOR_MM` (a switching regulator).
Protection diodes (ESD, TVS: by words, or a diode from the electrode's net to
ground or a supply rail) switch nothing and are not noisy, nor are linear regulators
named only by a part number. Distances are from the electrode's copper to the
part's nearest pad.
"""

from __future__ import annotations

import re

from shapely.geometry import Point
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from auditor.model.board import Board
from auditor.model.items import Footprint
from auditor.sensors.cues import is_ground_name
from auditor.sensors.model import Sensor
from auditor.sensors.noisy import is_power_rail
from auditor.sensors.selection import SensorSelection

#: A U part with an inductor this close is taken for a switching regulator.
REGULATOR_INDUCTOR_MM = 5.0
_NOISY_WORDS = re.compile(
    r"(?<![a-z])led|inductor|crystal|oscillator|xtal|regulator|ldo|buck|boost|dc.?dc|ferrite",
    re.IGNORECASE)
#: Words of protection parts (our own judgement, common practice, no source).
_PROTECTION_WORDS = re.compile(r"esd|tvs|transient|suppress|protect|varistor",
                               re.IGNORECASE)
_PREFIX = re.compile(r"^[A-Za-z]+")


def ref_prefix(ref: str) -> str:
    """The letters a reference starts with (``LED3`` → ``LED``)."""
    found = _PREFIX.match(ref)
    return found.group(0).upper() if found else ""


def is_noisy_part(board: Board, fp: Footprint, selection: SensorSelection,
                  sense_nets: tuple[str, ...] = ()) -> bool:
    """Whether ``fp`` is a part that switches current (see module docs)."""
    prefix = ref_prefix(fp.ref)
    if is_protection_part(fp, sense_nets):
        return False
    if prefix in {p.upper() for p in selection.noisy_prefixes}:
        return True
    lib_name = fp.lib_id.split(":")[-1]
    if _NOISY_WORDS.search(lib_name) or _NOISY_WORDS.search(fp.value) \
            or _NOISY_WORDS.search(fp.lib_id.split(":")[0]):
        return True
    return prefix == "U" and _has_inductor_near(board, fp)


def is_protection_part(fp: Footprint, sense_nets: tuple[str, ...] = ()) -> bool:
    """ESD and TVS diodes: by words in the library id or value, or a diode
    (reference ``D``, not named an LED) from one of ``sense_nets`` to ground
    or a supply rail."""
    if _PROTECTION_WORDS.search(fp.lib_id) or _PROTECTION_WORDS.search(fp.value):
        return True
    if ref_prefix(fp.ref) != "D" or _NOISY_WORDS.search(fp.lib_id + " " + fp.value):
        return False
    nets = {pad.net for pad in fp.pads if pad.net}
    quiet = any(is_ground_name(n) or is_power_rail(n) for n in nets)
    return quiet and bool(nets & set(sense_nets))


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
        if dist <= radius and is_noisy_part(board, fp, selection, sensor.nets):
            found.append((dist, fp.ref))
    return tuple((ref, dist) for dist, ref in sorted(found))
