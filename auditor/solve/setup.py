"""From a measured sensor to the field solver's description of it, and the solve.

Kept apart from the solves (:mod:`auditor.solve.quick`,
:mod:`auditor.solve.precise`, :mod:`auditor.solve.mutual`) so the mapping can
be checked without running one. What the axisymmetric model cannot hold is said in
the returned notes, never silently dropped.

Choices made here (each also stated in the notes of the pad it affects):

* **Coplanar gap**: the *typical* (median around the perimeter) gap to the
  device ground, not the minimum. The axisymmetric ring has one gap all
  round; its Cp grows with the perimeter share at each gap, so a short
  local pinch (the minimum) would overstate the whole perimeter's coupling.
  The minimum is given in a note when it is much smaller (the tight-gap
  rule judges it). Neighbouring electrodes closer than the ground are not
  part of the quick model (precise mode meshes them).
* **Coplanar ground**: its measured fill beyond the gap becomes the
  solver's hatched ring (a solid border at the gap, as a KiCad hatched pour
  has along its clearance edge, then rings of the same fill); the hatch
  pitch is read from the pour's settings.
* **Ground reach**: the ring and plane extend 10 mm beyond the gap (the
  solver's default), or less when the device ground has less copper than
  that annulus (a small battery device).
* **Plane below**: the nearest other layer behind the pad with other nets'
  copper within the ground's reach, as its coverage ring by ring around
  the pad's centroid (:mod:`auditor.solve.shadows`); a layer covered
  everywhere is the whole plane of the hatch's fill. Depth is the
  dielectric thickness between the layers from the stackup
  (zero-thickness copper). Copper between the pad and the touch face (a
  far-side electrode under a pour) is modelled the same way in front.
* **Rounding**: areas to 3 significant figures, gaps to 2, fills to steps
  of 0.05, depths to 1 µm, before the solve, so pads that differ only by
  polygonised-arc noise (1.999 vs 2.004 mm gaps) or by a hatch's local
  phase (fill 0.33 vs 0.36) share one cached solve. Measured on the
  generated boards of the tests: the change of Cp from this rounding is
  about 1 % at most (fill step), under the model's own approximations.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, replace

from shapely.geometry import Polygon

from auditor.config import Config
from auditor.field.api import PadSetup
from auditor.field.pad_model import DEFAULT_GROUND_MARGIN_MM
from auditor.model.board import Board
from auditor.model.vocabulary import PadSide
from auditor.sensors.model import Sensor
from auditor.solve.shadows import (
    Coplanar,
    LayerCopper,
    coplanar_unmodelled,
    describe,
    layer_copper,
    measured_fill,
)
from auditor.solve.stack import board_layers_from_touch, overlay_with_mask, touch_mask
from auditor.solve.traces import trace_runs_for

#: Finger disk when the profile sets no ``finger_diameter_mm``: physics.md §3,
#: a conductive disk of 8-10 mm flat on the overlay (touchscreen contact
#: patch about 9-11 mm across, published touch-hardware guideline).
DEFAULT_FINGER_MM = 10.0
FINGER_ORIGIN = "physics.md §3: 8-10 mm disk model, contact patch 9-11 mm"


@dataclass(frozen=True)
class FieldInput:
    """A pad setup and what the mapping had to approximate."""

    setup: PadSetup
    notes: tuple[str, ...]
    #: Other nets' copper on the other layers (what the automatic mode reads).
    coppers: tuple[LayerCopper, ...] = ()
    #: Signals or a driven shield beside the pad on its layer (not in the disk).
    coplanar: Coplanar | None = None


def significant(value: float, digits: int = 3) -> float:
    """``value`` to ``digits`` significant figures (0 stays 0)."""
    if value == 0:
        return 0.0
    return round(value, digits - 1 - int(math.floor(math.log10(abs(value)))))


def fill_step(value: float) -> float:
    """A copper fill ratio in steps of 0.05, never below 0.05."""
    return max(0.05, round(20.0 * min(value, 1.0)) / 20.0)


def _ground_gap(sensor: Sensor, notes: list[str]) -> float | None:
    surround = sensor.surroundings
    if surround is None:
        return None
    gap = surround.typical_ground_gap_mm or surround.typical_gap_mm
    if gap is None or gap <= 0:
        return None
    tight = surround.min_ground_gap_mm or surround.min_gap_mm
    if tight is not None and tight < 0.5 * gap:
        notes.append(f"coplanar gap {gap:.2f} mm (typical); locally down to {tight:.2f} mm")
    other = surround.typical_gap_mm
    if other is not None and other < gap - 0.05:
        notes.append(f"other copper (neighbouring electrodes) at {other:.2f} mm not in the "
                     "quick model")
    return significant(gap, 2)


def _ground_outer_mm(sensor: Sensor, gap: float | None, has_plane: bool) -> float | None:
    """Ring/plane outer radius: the solver's 10 mm reach, less for a small ground."""
    surround = sensor.surroundings
    if surround is None or surround.ground_area_mm2 <= 0 or (gap is None and not has_plane):
        return None
    inner = math.sqrt(sensor.area_mm2 / math.pi) + (gap or 0.0)
    outer = inner + DEFAULT_GROUND_MARGIN_MM
    if surround.ground_area_mm2 >= math.pi * (outer ** 2 - inner ** 2):
        return None
    return significant(math.sqrt(inner ** 2 + surround.ground_area_mm2 / math.pi))


def hatch_pitch_mm(board: Board, sensor: Sensor, plane_layer: str | None) -> float:
    """Pitch of the device ground's hatch near the pad (the plane's layer first),
    or the solver's default 1.5 mm when neither pour is hatched."""
    ground = sensor.surroundings.ground_net if sensor.surroundings else ""
    near = sensor.geometry.buffer(3.0)
    layers = [plane_layer, sensor.layer] if plane_layer else [sensor.layer]
    for layer in layers:
        for zone in board.zones:
            if (zone.net == ground and layer in zone.layers and zone.hatch is not None
                    and zone.outline.intersects(near)):
                pitch = zone.hatch.thickness_mm + zone.hatch.gap_mm
                if pitch > 0:
                    return round(pitch, 3)
    return PadSetup.plane_hatch_pitch_mm


def _finger_mm(config: Config, thresholds: Mapping[str, float | int | bool]) -> float:
    value = thresholds.get("finger_diameter_mm", config.thresholds.get("finger_diameter_mm"))
    return float(value) if value else DEFAULT_FINGER_MM


def _side(sensor: Sensor, board: Board, config: Config,
          notes: list[str]) -> PadSide:
    outer = board.copper_layers
    touch_layer = outer[0] if config.touch_side == "front" else outer[-1]
    far_layer = outer[-1] if config.touch_side == "front" else outer[0]
    if sensor.layer not in (touch_layer, far_layer):
        notes.append(f"electrode on inner layer {sensor.layer} modelled as on the far side")
    return "touch" if sensor.layer == touch_layer else "far"


def _other_layers(board: Board, sensor: Sensor, config: Config, outer_mm: float,
                  electrode_nets: frozenset[str]) -> tuple[LayerCopper, ...]:
    """Other nets' copper on every other copper layer, nearest first; layers
    between the electrode and the touch face are ``in_front``."""
    layers = board.copper_layers
    if sensor.layer not in layers:
        return ()
    index = layers.index(sensor.layer)
    out = []
    for k, layer in enumerate(layers):
        if layer != sensor.layer:
            front = k < index if config.touch_side == "front" else k > index
            out.append(layer_copper(board, sensor, layer, outer_mm, electrode_nets, front))
    return tuple(sorted(out, key=lambda c: (c.depth_mm, c.layer)))


def _plane_fields(behind: LayerCopper | None, sensor: Sensor) -> dict[str, object]:
    """Plane depth, fill and ring profile of the PadSetup from the nearest copper behind."""
    if behind is None:
        return {}
    hatch = measured_fill(sensor.surroundings.shadows if sensor.surroundings else (), behind)
    fields: dict[str, object] = {"plane_depth_mm": behind.depth_mm,
                                 "plane_fill": fill_step(hatch) if hatch < 1.0 else 1.0}
    if not behind.whole:
        fields["plane_profile"] = behind.profile
    return fields


def _front_fields(front: LayerCopper | None, board: Board,
                  sensor: Sensor) -> dict[str, object]:
    """Copper between electrode and finger: height, coverage per ring, hatch."""
    if front is None:
        return {}
    return {"front_depth_mm": front.depth_mm, "front_profile": front.profile,
            "front_fill": fill_step(front.hatch_fill) if front.hatch_fill < 1.0 else 1.0,
            "front_hatch_pitch_mm": hatch_pitch_mm(board, sensor, front.layer)}


def _copper_notes(coppers: tuple[LayerCopper, ...], notes: list[str]) -> None:
    for copper in coppers:
        if not copper.empty or copper.sparse_rings:
            notes.append(describe(copper))
    held = {name for c in coppers if not c.empty for name, _, _ in c.classes} - {"ground"}
    if held:
        notes.append(f"{' and '.join(sorted(held))} on other layers held at the device ground "
                     "for Cp (an idle input is grounded, a driven signal is a low-impedance "
                     "node; stated approximation)")
    behind = [c for c in coppers if not c.in_front and not c.empty]
    if len(behind) > 1:
        notes.append(f"only the nearest copper behind the pad ({behind[0].layer}) is modelled")


def pad_setup_for(sensor: Sensor, board: Board, config: Config,
                  thresholds: Mapping[str, float | int | bool] | None = None,
                  electrode_nets: frozenset[str] = frozenset()) -> FieldInput:
    """The :class:`PadSetup` of one self-capacitance sensor and its notes.

    Returns a :class:`FieldInput` (setup + notes + the copper on the other
    layers) rather than the bare setup so every approximation travels with
    the numbers into the report. ``electrode_nets`` (other electrodes' nets)
    only name what the copper on other layers is.
    """
    notes: list[str] = []
    side = _side(sensor, board, config, notes)
    gap = _ground_gap(sensor, notes)
    outer = (_ground_outer_mm(sensor, gap, True) or math.sqrt(sensor.area_mm2 / math.pi)
             + (gap or 0.0) + DEFAULT_GROUND_MARGIN_MM)
    coppers = _other_layers(board, sensor, config, outer, electrode_nets)
    behind = next((c for c in coppers if not c.in_front and not c.empty), None)
    front = next((c for c in coppers if c.in_front and not c.empty), None)
    _copper_notes(coppers, notes)
    finger = _finger_mm(config, thresholds or {})
    notes.append(f"finger {finger:g} mm disk ({FINGER_ORIGIN})"
                 if finger == DEFAULT_FINGER_MM else f"finger {finger:g} mm disk (profile)")
    overlay_mm, overlay_er = overlay_with_mask(config, touch_mask(board, config)
                                               if side == "touch" else None)
    runs, trace_notes = trace_runs_for(sensor, board)
    notes += trace_notes
    setup = PadSetup(
        pad_area_mm2=significant(sensor.area_mm2), gap_mm=gap,
        ground_outer_mm=_ground_outer_mm(sensor, gap, behind is not None),
        plane_hatch_pitch_mm=hatch_pitch_mm(board, sensor, behind.layer if behind else None),
        ground_fill=fill_step(sensor.surroundings.ground_fill_ratio)
        if gap is not None and sensor.surroundings else 1.0,
        board_layers=board_layers_from_touch(board, config, sensor.layer), pad_side=side,
        overlay_mm=overlay_mm, overlay_er=overlay_er, air_gap_mm=round(config.air_gap_mm, 3),
        finger_diameter_mm=finger, power=config.power, traces=runs,
        vias=sensor.path.vias if sensor.path else 0)
    setup = replace(setup, **_plane_fields(behind, sensor), **_front_fields(front, board, sensor))  # type: ignore[arg-type]
    snapped = snapped_to_finger(setup, notes)
    return FieldInput(snapped, tuple(notes), coppers,
                      coplanar_unmodelled(board, sensor, electrode_nets))


#: Pad or ring edges closer than this to the finger's edge (at another
#: height) are moved onto it: near-coincident radii make the graded r-z mesh
#: resolve the micrometre between them (measured: 2-4 s instead of 0.05-0.2 s
#: CPU per solve). 20 µm is below PCB etch tolerance (about ±25 µm,
#: common practice, no source) and changes Cp by well under 0.1 %.
SNAP_MM = 0.02


def snapped_to_finger(setup: PadSetup, notes: list[str]) -> PadSetup:
    """The setup with pad and ring edges moved onto the finger's edge when
    they are within :data:`SNAP_MM` of it."""
    if setup.finger_diameter_mm is None:
        return setup
    finger_r = 0.5 * setup.finger_diameter_mm
    radius = setup.pad_radius_mm
    if 0.0 < abs(radius - finger_r) < SNAP_MM:
        notes.append(f"pad edge moved {1000 * (finger_r - radius):+.0f} µm onto the finger's "
                     "edge (equal-area radius)")
        setup = replace(setup, pad_area_mm2=math.pi * finger_r ** 2)
        radius = finger_r
    if setup.gap_mm is not None and 0.0 < abs(radius + setup.gap_mm - finger_r) < SNAP_MM:
        gap = finger_r - radius
        notes.append(f"ground edge moved {1000 * (gap - setup.gap_mm):+.0f} µm onto the "
                     "finger's edge")
        setup = replace(setup, gap_mm=gap)
    return setup


#: Below this share of its outline's area an electrode is a loop or comb, not a
#: plate, and an equal-area disk misstates it badly: on the demo's proximity
#: loop the quick disk gave ΔC/Cp 48.6 % where the 3-D solve gives 2.6 %.
MIN_OUTLINE_FILL = 0.5


def quick_unfit_reason(sensor: Sensor) -> str:
    """Why the quick disk model cannot stand for this electrode ("" if it can)."""
    filled = _outline_area_mm2(sensor)
    if filled > 0 and sensor.area_mm2 / filled < MIN_OUTLINE_FILL:
        share = sensor.area_mm2 / filled
        return (f"copper fills only {share:.0%} of its outline (a loop or comb): an "
                "equal-area disk does not represent it; the automatic mode or --precise solves "
                "it in 3-D")
    return ""


def _outline_area_mm2(sensor: Sensor) -> float:
    geometry = sensor.geometry
    polygons = getattr(geometry, "geoms", [geometry])
    return float(sum(Polygon(poly.exterior).area for poly in polygons
                     if getattr(poly, "exterior", None) is not None))
