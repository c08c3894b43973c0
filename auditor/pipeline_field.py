"""From a measured sensor to the field solver's description of it, and the solve.

Kept apart from :mod:`auditor.pipeline` so the mapping can be checked
without running a solve. What the axisymmetric model cannot hold is said in
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
* **Plane below**: the nearest shadow on another layer; its fill is the
  shadowed fraction times the hatch fill, depth is the dielectric
  thickness between the layers from the stackup (zero-thickness copper).
* **Rounding**: areas to 3 significant figures, gaps to 2, fills to steps
  of 0.05, depths to 1 µm, before the solve, so pads that differ only by
  polygonised-arc noise (1.999 vs 2.004 mm gaps) or by a hatch's local
  phase (fill 0.33 vs 0.36) share one cached solve. Measured on the
  generated boards of the tests: the change of Cp from this rounding is
  about 1 % at most (fill step), under the model's own approximations.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from dataclasses import dataclass, replace
from typing import Literal

from auditor.config import Config
from auditor.errors import UsageError
from auditor.field.api import BoardLayer, MutualSetup, PadSetup, solve_mutual, solve_pad
from auditor.field.pad_model import DEFAULT_GROUND_MARGIN_MM
from auditor.model.board import Board
from auditor.model.items import StackupLayer
from auditor.pipeline_traces import dielectric_between_mm, trace_runs_for
from auditor.report.model import PadMetrics
from auditor.sensors.model import LayerShadow, Sensor

#: A shadow covering less than this share of the pad is left out of the model
#: (common practice, no source: the copper-under-electrode rule reports it).
PLANE_MIN_SHADOW = 0.1

#: Finger disk when the profile sets no ``finger_diameter_mm``: physics.md §3,
#: a conductive disk of 8-10 mm flat on the overlay (touchscreen contact
#: patch about 9-11 mm across, published touch-hardware guideline).
DEFAULT_FINGER_MM = 10.0
FINGER_ORIGIN = "physics.md §3: 8-10 mm disk model, contact patch 9-11 mm"

#: Solder mask permittivity when the stackup gives none (materials table).
MASK_ER = 3.6

SELF_KINDS = ("button", "slider", "wheel", "proximity")

Progress = Callable[[str, int, int], None]


@dataclass(frozen=True)
class FieldInput:
    """A pad setup and what the mapping had to approximate."""

    setup: PadSetup
    notes: tuple[str, ...]


def significant(value: float, digits: int = 3) -> float:
    """``value`` to ``digits`` significant figures (0 stays 0)."""
    if value == 0:
        return 0.0
    return round(value, digits - 1 - int(math.floor(math.log10(abs(value)))))


def fill_step(value: float) -> float:
    """A copper fill ratio in steps of 0.05, never below 0.05."""
    return max(0.05, round(20.0 * min(value, 1.0)) / 20.0)


def _physical(board: Board, config: Config) -> tuple[StackupLayer, ...]:
    """Stackup layers from the touch side down."""
    layers = board.stackup.layers
    return layers if config.touch_side == "front" else tuple(reversed(layers))


def _dielectric(lay: StackupLayer) -> BoardLayer:
    er = lay.epsilon_r if lay.epsilon_r >= 1.0 else 1.0
    if lay.kind == "mask" and lay.epsilon_r <= 1.0:
        er = MASK_ER
    return BoardLayer(round(lay.thickness_mm, 4), round(er, 3))


def board_layers_from_touch(board: Board, config: Config,
                            electrode_layer: str | None = None) -> tuple[BoardLayer, ...]:
    """The board's dielectrics listed from the touch side down.

    With ``electrode_layer`` on the touch side, the mask over it is left out
    (it is folded into the overlay, :func:`overlay_with_mask`) and the far
    side's mask kept; for a far-side electrode the touch-side mask is kept
    and the mask under the electrode (facing away from the finger) dropped.
    """
    physical = _physical(board, config)
    copper = [i for i, lay in enumerate(physical) if lay.kind == "copper"]
    if not copper:
        return ()
    first, last = copper[0], copper[-1]
    far = electrode_layer is not None and electrode_layer != physical[first].name
    start, stop = (0, last) if far else (first, len(physical))
    if electrode_layer is None:
        start, stop = first, last
    return tuple(_dielectric(lay) for lay in physical[start:stop]
                 if lay.kind in ("dielectric", "mask") and lay.thickness_mm > 0)


def touch_mask(board: Board, config: Config) -> StackupLayer | None:
    """The solder mask on the touch side of the board, if the stackup has one."""
    physical = _physical(board, config)
    for lay in physical:
        if lay.kind == "copper":
            return None
        if lay.kind == "mask" and lay.thickness_mm > 0:
            return lay
    return None


def overlay_with_mask(config: Config, mask: StackupLayer | None) -> tuple[float, float]:
    """Overlay (thickness mm, er) with the touch-side mask in series under it.

    The mask lies between copper and cover; one layer of the summed
    thickness and the series (thickness-weighted harmonic) er keeps the
    parallel-plate capacitance of the two (physics.md §2).
    """
    cover_mm, cover_er = config.overlay.thickness_mm, config.overlay.epsilon_r
    if mask is None:
        return cover_mm, cover_er
    mask_er = _dielectric(mask).er
    total = cover_mm + mask.thickness_mm
    resistance = (cover_mm / cover_er if cover_mm > 0 else 0.0) + mask.thickness_mm / mask_er
    return round(total, 4), round(total / resistance, 3)


def _plane(sensor: Sensor) -> LayerShadow | None:
    if sensor.surroundings is None:
        return None
    planes = [s for s in sensor.surroundings.shadows
              if s.fill != "none" and s.shadowed_fraction >= PLANE_MIN_SHADOW]
    return min(planes, key=lambda s: (s.depth_mm, s.layer)) if planes else None


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
          notes: list[str]) -> Literal["touch", "far"]:
    outer = board.copper_layers
    touch_layer = outer[0] if config.touch_side == "front" else outer[-1]
    far_layer = outer[-1] if config.touch_side == "front" else outer[0]
    if sensor.layer not in (touch_layer, far_layer):
        notes.append(f"electrode on inner layer {sensor.layer} modelled as on the far side")
    return "touch" if sensor.layer == touch_layer else "far"


def pad_setup_for(sensor: Sensor, board: Board, config: Config,
                  thresholds: Mapping[str, float | int | bool] | None = None) -> FieldInput:
    """The :class:`PadSetup` of one self-capacitance sensor and its notes.

    Returns a :class:`FieldInput` (setup + notes) rather than the bare setup
    so every approximation travels with the numbers into the report.
    """
    notes: list[str] = []
    side = _side(sensor, board, config, notes)
    gap = _ground_gap(sensor, notes)
    plane = _plane(sensor)
    if plane is not None and side == "far":
        notes.append(f"copper on {plane.layer} between electrode and finger not modelled")
        plane = None
    depth = fill = None
    if plane is not None:
        depth = round(dielectric_between_mm(board, sensor.layer, plane.layer), 3)
        fill = fill_step(min(plane.shadowed_fraction, 1.0) * plane.fill_ratio)
        if plane.shadowed_fraction < 0.99:
            notes.append(f"plane on {plane.layer} under {plane.shadowed_fraction:.0%} of "
                         "the pad: modelled as a full plane of proportionally lower fill")
    finger = _finger_mm(config, thresholds or {})
    notes.append(f"finger {finger:g} mm disk ({FINGER_ORIGIN})"
                 if finger == DEFAULT_FINGER_MM else f"finger {finger:g} mm disk (profile)")
    overlay_mm, overlay_er = overlay_with_mask(config, touch_mask(board, config)
                                               if side == "touch" else None)
    runs, trace_notes = trace_runs_for(sensor, board)
    notes += trace_notes
    setup = PadSetup(
        pad_area_mm2=significant(sensor.area_mm2), gap_mm=gap,
        ground_outer_mm=_ground_outer_mm(sensor, gap, depth is not None),
        plane_depth_mm=depth if fill else None, plane_fill=fill if fill else 1.0,
        plane_hatch_pitch_mm=hatch_pitch_mm(board, sensor, plane.layer if plane else None),
        ground_fill=fill_step(sensor.surroundings.ground_fill_ratio)
        if gap is not None and sensor.surroundings else 1.0,
        board_layers=board_layers_from_touch(board, config, sensor.layer), pad_side=side,
        overlay_mm=overlay_mm, overlay_er=overlay_er, air_gap_mm=round(config.air_gap_mm, 3),
        finger_diameter_mm=finger, power=config.power, traces=runs,
        vias=sensor.path.vias if sensor.path else 0)
    return FieldInput(setup, tuple(notes))


def metrics_from_quick(mapped: FieldInput) -> PadMetrics:
    """Solve one mapped pad with the quick axisymmetric model."""
    solve = solve_pad(mapped.setup)
    return PadMetrics(solve.cp_pad_pf, solve.cp_trace_pf, solve.cp_total_pf,
                      solve.delta_c_pf, solve.delta_ratio, "quick",
                      mapped.notes + solve.notes)


def _mutual_partner(sensor: Sensor, sensors: tuple[Sensor, ...]) -> Sensor | None:
    """The nearest electrode of the opposite mutual role (same group first)."""
    want = "mutual-tx" if sensor.kind == "mutual-rx" else "mutual-rx"
    partners = [s for s in sensors if s.kind == want]
    if not partners:
        return None
    return min(partners, key=lambda s: (s.group != sensor.group or not s.group,
                                        sensor.geometry.distance(s.geometry), s.name))


def metrics_for_mutual(rx: Sensor, tx: Sensor, board: Board, config: Config,
                       thresholds: Mapping[str, float | int | bool]) -> PadMetrics:
    """Cm and its drop under the finger for a tx/rx pair, in the PadMetrics slots.

    The pair becomes the solver's inner disk and concentric ring (the
    smaller electrode inside); ``cp_pad_pf`` carries Cm and ``delta_c_pf``
    the drop of Cm under the finger, as the notes say.
    """
    inner, outer = sorted((rx, tx), key=lambda s: (s.area_mm2, s.name))
    stack = pad_setup_for(inner, board, config, thresholds)
    gap = max(round(inner.geometry.distance(outer.geometry), 2), 0.05)
    inner_r = math.sqrt(inner.area_mm2 / math.pi)
    ring_in = inner_r + gap
    width = math.sqrt(ring_in ** 2 + outer.area_mm2 / math.pi) - ring_in
    setup = MutualSetup(significant(2 * inner_r), gap, significant(width),
                        "rx" if inner is rx else "tx", replace(stack.setup, traces=(), vias=0))
    solve = solve_mutual(setup)
    notes = (f"mutual pair {tx.name} -> {rx.name}: cp_pad_pf is Cm, delta_c_pf the drop of "
             "Cm under the finger",
             "pair modelled as a disk and a concentric ring of the same areas") + stack.notes
    return PadMetrics(solve.cm_pf, 0.0, solve.cm_pf, solve.delta_cm_pf, solve.delta_ratio,
                      "quick", notes)


def _precise_or_quick(sensor: Sensor, board: Board, config: Config, mapped: FieldInput,
                      sensors: tuple[Sensor, ...]) -> PadMetrics:
    """The precise metrics, or the quick ones with the reason when the 3-D
    model cannot take this electrode (e.g. a layer missing from the stackup)."""
    from auditor.pipeline_precise import metrics_from_precise

    try:
        return metrics_from_precise(sensor, board, config, mapped, sensors)
    except (UsageError, KeyError) as exc:
        quick = metrics_from_quick(mapped)
        return replace(quick, notes=(f"precise solve not possible ({exc}); quick "
                                     "estimate shown",) + quick.notes)


def solve_sensors(board: Board, sensors: tuple[Sensor, ...], config: Config, *,
                  precise: bool = False, progress: Progress | None = None,
                  thresholds: Mapping[str, float | int | bool] | None = None,
                  ) -> dict[str, PadMetrics]:
    """Field metrics per sensor name (``method`` "quick" or "precise").

    Self-capacitance electrodes (button, slider, wheel, proximity) are solved
    one by one; a mutual receive electrode gets the Cm of its pair; a
    transmit electrode, or a sensor that cannot be mapped, gets no entry (the
    report shows it unsolved) — nothing is made up. ``progress`` is called
    as ``progress(sensor_name, done, total)``.
    """
    limits = thresholds or {}
    out: dict[str, PadMetrics] = {}
    for done, sensor in enumerate(sensors, start=1):
        if sensor.kind in SELF_KINDS and sensor.area_mm2 > 0:
            mapped = pad_setup_for(sensor, board, config, limits)
            out[sensor.name] = (_precise_or_quick(sensor, board, config, mapped, sensors)
                                if precise else metrics_from_quick(mapped))
        elif sensor.kind == "mutual-rx":
            tx = _mutual_partner(sensor, sensors)
            if tx is not None:
                out[sensor.name] = metrics_for_mutual(sensor, tx, board, config, limits)
        if progress is not None:
            progress(sensor.name, done, len(sensors))
    return out
