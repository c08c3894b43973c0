"""The axisymmetric touch-pad model: what a pad and its surroundings become.

Shared by :mod:`auditor.field.api` (self-capacitance pads) and
:mod:`auditor.field.mutual` (mutual pairs). The modelling choices are
described in :mod:`auditor.field.api` and ``docs/physics-model.md``.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from functools import lru_cache

from auditor.errors import UsageError
from auditor.field.axisym import AxisymModel, Sheet, solve_axisym, solve_axisym_pair
from auditor.field.circuit import BODY_TO_EARTH_PF, DEVICE_TO_EARTH, touch_network
from auditor.field.dielectric import BoardLayer, DielectricSlab
from auditor.field.matrix import CapacitanceMatrix
from auditor.field.traces import TraceRunSpec
from auditor.model.vocabulary import PadSide, PowerPreset

#: Mesh length scale at hatch-ring edges, in pitches: about one or two cells
#: per ring and per opening (measured in bench_field: as accurate as finer
#: spacing against an eta = 0.05 run, and 35-45 % faster).
_HATCH_SCALE = 3.0
#: Ground ring / plane reach beyond the pad when not given (mm).
DEFAULT_GROUND_MARGIN_MM = 10.0


@dataclass(frozen=True)
class PadSetup:
    """A self-capacitance pad and everything around it (mm, relative permittivity).

    Parameters
    ----------
    pad_area_mm2:
        Copper area; the model uses the disk of that area.
    gap_mm:
        Gap to the coplanar ground, or None for no coplanar ground.
    ground_outer_mm:
        Outer radius of coplanar ground and plane (None: pad radius + gap + 10).
    plane_depth_mm, plane_fill, plane_hatch_pitch_mm:
        Plane below the pad (None: none), its copper coverage and hatch pitch.
    board_layers:
        Dielectric layers listed from the touch side down.
    pad_side:
        "touch" (pad copper faces the overlay) or "far" (board in between).
    overlay_mm, overlay_er, air_gap_mm:
        Cover and the air between board and cover.
    finger_diameter_mm, finger_height_mm:
        Finger disk (None: baseline only) and its height above the overlay.
    power, body_to_earth_pf:
        Device ground to earth preset and the body's capacitance to earth.
    traces, vias:
        Sense trace runs and via count (they add to Cp, not to ΔC).
    ground_fill:
        Copper coverage of the coplanar ground.
    """

    pad_area_mm2: float
    gap_mm: float | None = 1.0
    ground_outer_mm: float | None = None
    plane_depth_mm: float | None = None
    plane_fill: float = 1.0
    plane_hatch_pitch_mm: float = 1.5
    board_layers: tuple[BoardLayer, ...] = (BoardLayer(1.6, 4.4),)
    pad_side: PadSide = "touch"
    overlay_mm: float = 2.0
    overlay_er: float = 2.8
    air_gap_mm: float = 0.0
    finger_diameter_mm: float | None = 10.0
    finger_height_mm: float = 0.0
    power: PowerPreset = "battery"
    body_to_earth_pf: float = BODY_TO_EARTH_PF
    traces: tuple[TraceRunSpec, ...] = ()
    vias: int = 0
    #: Copper coverage of the coplanar ground (1 = solid pour); a hatched pour
    #: is modelled like a hatched plane, with a solid border at the gap.
    ground_fill: float = 1.0

    @property
    def pad_radius_mm(self) -> float:
        return math.sqrt(self.pad_area_mm2 / math.pi)

    @property
    def board_mm(self) -> float:
        return sum(layer.thickness_mm for layer in self.board_layers)


@lru_cache(maxsize=256)
def field_matrices(model: AxisymModel, finger: Sheet | None
                   ) -> tuple[CapacitanceMatrix, CapacitanceMatrix | None]:
    """Baseline and touched matrices, cached per geometry (boards repeat pads).

    With a finger both come from one mesh per level
    (:func:`auditor.field.axisym.solve_axisym_pair`); the baseline is a
    solve without the finger conductor, never a sub-block of the touched one.
    """
    if finger is None:
        return solve_axisym(model).matrix, None
    baseline, touched = solve_axisym_pair(model, finger)
    return baseline.matrix, touched.matrix


def check_setup(setup: PadSetup) -> None:
    """UsageError for values no pad can have."""
    positive = {"pad area": setup.pad_area_mm2, "hatch pitch": setup.plane_hatch_pitch_mm,
                "body-to-earth capacitance": setup.body_to_earth_pf}
    for label, value in positive.items():
        if not value > 0:
            raise UsageError(f"{label} must be positive, got {value}")
    for label, maybe in {"gap": setup.gap_mm, "plane depth": setup.plane_depth_mm,
                         "finger diameter": setup.finger_diameter_mm}.items():
        if maybe is not None and not maybe > 0:
            raise UsageError(f"{label} must be positive or none, got {maybe}")
    if not 0.0 <= setup.plane_fill <= 1.0:
        raise UsageError(f"plane fill must be within 0..1, got {setup.plane_fill}")
    if not 0.0 < setup.ground_fill <= 1.0:
        raise UsageError(f"coplanar ground fill must be within (0, 1], got {setup.ground_fill}")
    for label, value in {"overlay thickness": setup.overlay_mm, "air gap": setup.air_gap_mm,
                         "finger height": setup.finger_height_mm}.items():
        if value < 0:
            raise UsageError(f"{label} must not be negative, got {value}")
    if any(layer.thickness_mm <= 0 or layer.er < 1 for layer in setup.board_layers):
        raise UsageError("board layers need a positive thickness and er >= 1")
    if setup.overlay_er < 1:
        raise UsageError(f"overlay er must be >= 1, got {setup.overlay_er}")
    if (setup.finger_diameter_mm is not None and setup.finger_height_mm == 0
            and dielectrics(setup)[1] == 0.0):
        raise UsageError("the finger would lie on the bare pad: give an overlay, an air gap "
                         "or a finger height")
    if setup.power not in DEVICE_TO_EARTH:
        raise UsageError(f"unknown power preset {setup.power!r}; choose one of "
                         f"{', '.join(DEVICE_TO_EARTH)}")


def ground_outer_mm(setup: PadSetup) -> float:
    """Outer radius of the coplanar ground and of the plane."""
    inner = setup.pad_radius_mm + (setup.gap_mm or 0.0)
    outer = setup.ground_outer_mm
    if outer is None:
        return inner + DEFAULT_GROUND_MARGIN_MM
    if outer <= inner:
        raise UsageError(f"ground outer radius {outer} mm must exceed pad radius + gap "
                         f"({inner:.3f} mm)")
    return outer


#: Dielectric films thinner than this (mm) ...
THIN_FILM_MM = 0.05
#: ... and at least this far (mm) behind the pad, on the side away from the
#: finger, are left out of the quick model (both limits common practice, no
#: source: solder mask is 10-40 µm, a board core 0.2 mm and more). Such a film (the far side's
#: solder mask under the board) makes the graded mesh resolve its own
#: thickness, a quarter of the nodes, for almost nothing: on the demo
#: board's pads, leaving the 10 µm mask out changed Cp by 0.17-0.26 % and
#: ΔC by at most 0.04 %, and took 25 % less time (measured with this solver,
#: the same pads with and without the film).
FAR_FILM_MM = 1.0


def left_out_films(setup: PadSetup) -> tuple[int, ...]:
    """Indexes (in ``board_layers``) of the thin films behind the pad that
    :func:`dielectrics` leaves out (none when the pad faces away from the
    finger: then every board layer lies between them)."""
    if setup.pad_side == "far":
        return ()
    out, depth = [], 0.0
    for index, layer in enumerate(setup.board_layers):
        if layer.thickness_mm < THIN_FILM_MM and depth >= FAR_FILM_MM:
            out.append(index)
        depth += layer.thickness_mm
    return tuple(out)


def dielectrics(setup: PadSetup) -> tuple[tuple[DielectricSlab, ...], float]:
    """Layers and the height of the touch surface above the pad plane
    (thin films far behind the pad left out, :func:`left_out_films`)."""
    layers: list[DielectricSlab] = []
    top = 0.0
    board = setup.board_layers
    if setup.pad_side == "far":
        for layer in reversed(board):
            layers.append(DielectricSlab(top, top + layer.thickness_mm, layer.er))
            top += layer.thickness_mm
    else:
        bottom, skipped = 0.0, left_out_films(setup)
        for index, layer in enumerate(board):
            if index not in skipped:
                layers.append(DielectricSlab(bottom - layer.thickness_mm, bottom, layer.er))
            bottom -= layer.thickness_mm
    top += setup.air_gap_mm
    if setup.overlay_mm > 0:
        layers.append(DielectricSlab(top, top + setup.overlay_mm, setup.overlay_er))
    return tuple(layers), top + setup.overlay_mm


def plane_sheets(depth_mm: float, radius_mm: float, fill: float,
                 pitch_mm: float) -> tuple[Sheet, ...]:
    """A solid plane disk, or rings of the same fill for a hatched plane."""
    return _hatched(-depth_mm, 0.0, radius_mm, fill, pitch_mm)


def _hatched(z_mm: float, inner_mm: float, outer_mm: float, fill: float,
             pitch_mm: float) -> tuple[Sheet, ...]:
    """Rings covering ``fill`` of each pitch from inner to outer radius."""
    if fill >= 1.0:
        return (Sheet("ground", z_mm, outer_mm, inner_mm),)
    if fill <= 0.0:
        return ()
    width = fill * pitch_mm
    sheets = []
    start = inner_mm
    while start < outer_mm - 1e-9:
        centre = start + 0.5 * pitch_mm
        inner, outer = max(centre - 0.5 * width, inner_mm), min(centre + 0.5 * width, outer_mm)
        if outer > inner:
            sheets.append(Sheet("ground", z_mm, outer, inner,
                                edge_scale_mm=_HATCH_SCALE * pitch_mm))
        start += pitch_mm
    return tuple(sheets)


def coplanar_sheets(inner_mm: float, outer_mm: float, fill: float,
                    pitch_mm: float) -> tuple[Sheet, ...]:
    """Coplanar ground: solid, or a solid border at the gap (a hatched pour's
    outline, one hatch line wide) followed by rings of the same fill."""
    if fill >= 1.0 or fill <= 0.0:
        return _hatched(0.0, inner_mm, outer_mm, max(fill, 1.0), pitch_mm)
    border = min(inner_mm + fill * pitch_mm, outer_mm)
    return (Sheet("ground", 0.0, border, inner_mm),
            *_hatched(0.0, border + 0.5 * (1.0 - fill) * pitch_mm, outer_mm, fill, pitch_mm))


def ground_sheets(setup: PadSetup, inner_mm: float) -> tuple[Sheet, ...]:
    """Coplanar ring from ``inner_mm`` and the plane below, both on the ground net."""
    outer = ground_outer_mm(setup)
    sheets: tuple[Sheet, ...] = ()
    if setup.gap_mm is not None:
        sheets += coplanar_sheets(inner_mm, outer, setup.ground_fill, setup.plane_hatch_pitch_mm)
    if setup.plane_depth_mm is not None:
        if (setup.pad_side == "touch" and setup.board_layers
                and setup.plane_depth_mm > setup.board_mm + 1e-6):
            raise UsageError(f"plane depth {setup.plane_depth_mm} mm is below the board "
                             f"({setup.board_mm} mm thick)")
        sheets += plane_sheets(setup.plane_depth_mm, outer, setup.plane_fill,
                               setup.plane_hatch_pitch_mm)
    return sheets


def finger_sheet(setup: PadSetup, surface_mm: float) -> Sheet | None:
    """The finger disk on (or above) the touch surface, if there is a finger."""
    if setup.finger_diameter_mm is None:
        return None
    return Sheet("finger", surface_mm + setup.finger_height_mm, 0.5 * setup.finger_diameter_mm)


def reduced_network(matrix: CapacitanceMatrix, keep: Sequence[str], setup: PadSetup,
                    with_finger: bool) -> CapacitanceMatrix:
    """Circuit step for a field matrix of this model (earth, body, power preset)."""
    ground = "ground" if "ground" in matrix.names else None
    finger = "finger" if with_finger else None
    return touch_network(matrix, keep, ground, finger, DEVICE_TO_EARTH[setup.power][0],
                         setup.body_to_earth_pf)
