"""Records produced by the sensor stage: what each electrode is, how its
trace runs and what surrounds it.

These are the contract between ``sensors`` (which fills them), ``rules``
(which judges them) and ``field`` (which solves them). Lengths in mm, areas in
mm², board frame (Y down).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

from shapely.geometry.base import BaseGeometry

from auditor.model.items import Pad, Track, Via
from auditor.model.vocabulary import SensorKind


@dataclass(frozen=True)
class SourcePlace:
    """Where an item starts in the board file (1-based line and column), so a
    finding about it can point there; not part of any record's equality (a
    re-save moves lines without changing the board)."""

    source_line: int | None = None
    source_column: int | None = None

    @classmethod
    def of(cls, item: Track | Via | Pad) -> SourcePlace | None:
        """The place of a board item, or None when it was not read from a file."""
        if item.source_line is None:
            return None
        return cls(item.source_line, item.source_column)


@dataclass(frozen=True)
class TraceRun:
    """A stretch of sense trace with one cross-section.

    ``place``: where the stretch's first track starts in the board file.
    """

    layer: str
    width_mm: float
    length_mm: float
    place: SourcePlace | None = field(default=None, compare=False, repr=False)


@dataclass(frozen=True)
class Neighbour:
    """Another net that the sense path runs beside or crosses."""

    net: str
    parallel_mm: float = 0.0  # length run within the profile's distance
    #: Edge to edge on the same layer; None when the net only crosses on another layer.
    min_distance_mm: float | None = 0.0
    crossings: int = 0  # crossings on adjacent layers
    noisy: bool = False
    sense: bool = False  # the net is (part of) another electrode's sense path
    #: Where on the sense path the other net comes closest (None: crossings only).
    x_mm: float | None = None
    y_mm: float | None = None
    layer: str = ""
    #: Where the first crossing on another layer is (None: no crossing).
    crossing_x_mm: float | None = None
    crossing_y_mm: float | None = None
    crossing_layer: str = ""
    #: The sense path's track where the other net comes closest, and the one
    #: it first crosses, as places in the board file.
    place: SourcePlace | None = field(default=None, compare=False, repr=False)
    crossing_place: SourcePlace | None = field(default=None, compare=False, repr=False)


@dataclass(frozen=True)
class SensePath:
    """The route from the electrode to the controller pin."""

    length_mm: float
    runs: tuple[TraceRun, ...]
    vias: int
    layers: tuple[str, ...]
    controller_ref: str = ""
    controller_pin: str = ""
    series_ref: str = ""
    series_to_pin_mm: float | None = None  # path length series part -> pin
    #: Where the series part's pad on the electrode's net sits (None: no part).
    series_x_mm: float | None = None
    series_y_mm: float | None = None
    series_layer: str = ""
    neighbours: tuple[Neighbour, ...] = ()
    under_electrodes: tuple[str, ...] = ()  # other sensors it passes under/beside
    #: (electrode, place of the first track passing under or beside it).
    under_places: tuple[tuple[str, SourcePlace], ...] = field(default=(), compare=False,
                                                              repr=False)
    complete: bool = True  # False when the path could not be followed to a pin
    nets: tuple[str, ...] = ()  # nets along the path: electrode's, then after the series part
    #: The path ends at a connector (``controller_ref``) to a controller on another board.
    off_board: bool = False


@dataclass(frozen=True)
class LayerShadow:
    """Copper under (or over) the electrode on one other layer."""

    layer: str
    depth_mm: float  # vertical distance from the electrode's layer
    shadowed_fraction: float  # of the electrode's area, 0..1
    fill_ratio: float  # local copper coverage of what shadows it, 0..1
    fill: Literal["solid", "hatched", "none"]
    nets: tuple[str, ...] = ()


@dataclass(frozen=True)
class Surroundings:
    """What is around one electrode."""

    ground_net: str
    min_gap_mm: float | None  # to same-layer copper of other nets; None = none near
    typical_gap_mm: float | None  # median gap around the perimeter
    ground_fill_ratio: float  # coverage of the coplanar ground near the pad, 0..1
    shadows: tuple[LayerShadow, ...] = ()
    nearest_sensor: str = ""
    nearest_sensor_mm: float | None = None
    noisy_parts: tuple[tuple[str, float], ...] = ()  # (ref, distance mm)
    floating_copper: tuple[tuple[float, float, float], ...] = ()  # (x, y, distance mm)
    ground_area_mm2: float = 0.0  # the device ground's total copper area
    min_ground_gap_mm: float | None = None  # as min_gap_mm, to the device ground only
    typical_ground_gap_mm: float | None = None


@dataclass(frozen=True)
class Sensor:
    """One sense electrode.

    ``name`` is unique on the board and stable across re-saves (reference or
    net based). ``x_mm``/``y_mm`` is the copper's centroid, or a point on the
    copper when the centroid falls outside it (a loop).

    ``group`` names the slider, wheel or mutual pair the electrode belongs to
    (all its segments share it) and is empty for a lone electrode; ``index``
    orders the segments within the group. Rules use ``group`` to leave the
    designed closeness of one group's segments alone.
    """

    name: str
    kind: SensorKind
    nets: tuple[str, ...]
    refs: tuple[str, ...]
    layer: str
    area_mm2: float
    x_mm: float
    y_mm: float
    reason: str
    geometry: BaseGeometry
    group: str = ""
    index: int = 0
    exposed: bool = False  # solder-mask opening over the copper
    pasted: bool = False
    path: SensePath | None = None
    surroundings: Surroundings | None = None
    footprint_uids: tuple[str, ...] = ()  # footprints with copper in the electrode
    #: Where the electrode's first item (pad, else zone) starts in the board
    #: file, 1-based; reports point annotations there.
    source_line: int | None = None
    source_column: int | None = None

    @property
    def equivalent_diameter_mm(self) -> float:
        """Diameter of the disk with the same area."""
        import math

        return 2.0 * math.sqrt(max(self.area_mm2, 0.0) / math.pi)


def name_order(name: str) -> tuple[tuple[int, int | str], ...]:
    """Sort key that puts ``TOUCH2#2`` before ``TOUCH2#10`` (numbers by value).

    Examples
    --------
    >>> sorted(["B10", "B2", "A"], key=name_order)
    ['A', 'B2', 'B10']
    """
    import re

    return tuple((1, int(part)) if part.isdigit() else (0, part)
                 for part in re.split(r"(\d+)", name) if part)

@dataclass(frozen=True)
class Rejected:
    """Copper that looked like an electrode but was not taken, and why."""

    net: str
    refs: tuple[str, ...]
    layer: str
    area_mm2: float
    x_mm: float
    y_mm: float
    why: str
