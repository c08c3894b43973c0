"""The changes a designer can make to one electrode, as changes of its setup.

Each :class:`Lever` is one parameter (pad diameter, cover thickness, cover
permittivity, ground gap, copper under the pad) with its sensible range and
grid, and maps a value to the electrode's own :class:`PadSetup` changed with
:func:`dataclasses.replace` (the setup that produced its numbers), so a
prediction is a solve of exactly the electrode's model with one thing
changed. Every changed setup goes through :func:`snapped_to_finger`, as the
mapping of a real board does.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from dataclasses import dataclass, replace

from auditor.config import Config
from auditor.field.api import PadSetup
from auditor.model.items import StackupLayer
from auditor.solve.setup import fill_step, snapped_to_finger
from auditor.solve.stack import overlay_with_mask

#: Thinnest cover suggested (mm): common practice, no source; value chosen by
#: padaudit (plastic fronts thinner than about 0.5 mm flex under a finger).
MIN_OVERLAY_MM = 0.5
#: Highest cover permittivity suggested: soda-lime glass, 7.0 (materials
#: table, von Hippel, from memory).
MAX_OVERLAY_ER = 7.0
#: Grids: what a designer would draw or order (common practice, no source).
PAD_STEP_MM = 0.1
OVERLAY_STEP_MM = 0.1
ER_STEP = 0.1
GAP_STEP_MM = 0.05


@dataclass(frozen=True)
class Electrode:
    """One electrode as the suggestions see it.

    ``setup``: the quick model's setup that produced its numbers;
    ``mask``: the touch-side solder mask folded into the cover (None for an
    electrode on the far side); ``lumped_pf``: what its Cp total holds
    besides the field model; ``plane_layer`` and ``plane_fill_ratio``:
    the layer and measured hatch fill of the copper the model puts under the
    pad ("" and 0 without); ``disk_model``: False when the electrode's own
    numbers came from another model (the 3-D solve).
    """

    setup: PadSetup
    config: Config
    mask: StackupLayer | None
    limits: Mapping[str, float | int | bool]
    plane_layer: str = ""
    plane_fill_ratio: float = 0.0
    disk_model: bool = True
    #: Capacitance outside the field model in the electrode's Cp total
    #: (controller pin, parts on the sense net), pF.
    lumped_pf: float = 0.0
    #: What the predictions leave out, appended to each suggestion's text.
    caveat: str = ""

    def limit(self, name: str, default: float) -> float:
        """A profile threshold as a float."""
        return float(self.limits.get(name, default))


@dataclass(frozen=True)
class Lever:
    """One parameter: its value now, the end of its sensible range, its grid."""

    parameter: str
    start: float
    bound: float
    step: float
    apply: Callable[[float], PadSetup]
    words: Callable[[float], str]


def _snapped(setup: PadSetup) -> PadSetup:
    return snapped_to_finger(setup, [])


def with_pad_diameter(setup: PadSetup, diameter_mm: float) -> PadSetup:
    """The pad grown (or shrunk) to an equal-area disk of ``diameter_mm``;
    a ground of limited reach keeps its width beyond the gap."""
    radius = 0.5 * diameter_mm
    outer = setup.ground_outer_mm
    if outer is not None:
        outer = outer + radius - setup.pad_radius_mm
    return _snapped(replace(setup, pad_area_mm2=math.pi * radius ** 2, ground_outer_mm=outer))


def with_gap(setup: PadSetup, gap_mm: float) -> PadSetup:
    """The coplanar ground moved out to ``gap_mm`` (its reach kept)."""
    outer = setup.ground_outer_mm
    if outer is not None and setup.gap_mm is not None:
        outer = outer + gap_mm - setup.gap_mm
    return _snapped(replace(setup, gap_mm=gap_mm, ground_outer_mm=outer))


def with_cover(electrode: Electrode, thickness_mm: float, er: float) -> PadSetup:
    """The cover changed; the touch-side mask stays under it in series."""
    config = electrode.config
    cover = replace(config.overlay, thickness_mm=thickness_mm, epsilon_r=er)
    mm, eps = overlay_with_mask(replace(config, overlay=cover), electrode.mask)
    return _snapped(replace(electrode.setup, overlay_mm=mm, overlay_er=eps))


def pad_lever(electrode: Electrode) -> Lever | None:
    """Pad diameter up to the profile's largest sensible pad."""
    start = round(2.0 * electrode.setup.pad_radius_mm, 3)
    bound = electrode.limit("pad_max_diameter_mm", 20.0)
    if start >= bound - 1e-9:
        return None
    return Lever("pad_diameter_mm", start, bound, PAD_STEP_MM,
                 lambda d: with_pad_diameter(electrode.setup, d),
                 lambda d: f"grow the pad to {d:.1f} mm across ({math.pi * d * d / 4:.0f} mm²)")


def thickness_lever(electrode: Electrode) -> Lever | None:
    """Cover thickness down to :data:`MIN_OVERLAY_MM`."""
    cover = electrode.config.overlay
    if cover.thickness_mm <= MIN_OVERLAY_MM + 1e-9:
        return None
    return Lever("overlay_mm", cover.thickness_mm, MIN_OVERLAY_MM, OVERLAY_STEP_MM,
                 lambda t: with_cover(electrode, t, cover.epsilon_r),
                 lambda t: f"thin the cover to {t:.1f} mm")


def permittivity_lever(electrode: Electrode) -> Lever | None:
    """Cover permittivity up to :data:`MAX_OVERLAY_ER` (glass)."""
    cover = electrode.config.overlay
    if cover.thickness_mm <= 0 or cover.epsilon_r >= MAX_OVERLAY_ER - 1e-9:
        return None
    return Lever("overlay_er", cover.epsilon_r, MAX_OVERLAY_ER, ER_STEP,
                 lambda er: with_cover(electrode, cover.thickness_mm, er),
                 lambda er: f"use a cover material of εr {er:.1f} or more "
                            f"(same {cover.thickness_mm:g} mm)")


def gap_lever(electrode: Electrode) -> Lever | None:
    """Coplanar gap up to the profile's widest sensible gap."""
    gap = electrode.setup.gap_mm
    bound = electrode.limit("ground_gap_max_mm", 2.0)
    if gap is None or gap >= bound - 1e-9:
        return None
    return Lever("ground_gap_mm", gap, bound, GAP_STEP_MM,
                 lambda g: with_gap(electrode.setup, g),
                 lambda g: f"widen the gap to ground to {g:.2f} mm")


def hatched_fill(electrode: Electrode) -> float | None:
    """The model's plane fill once the copper under the pad is hatched at the
    profile's ``under_fill_max_ratio`` (None: no plane, or already within it)."""
    setup, measured = electrode.setup, electrode.plane_fill_ratio
    limit = electrode.limit("under_fill_max_ratio", 0.5)
    if setup.plane_depth_mm is None or measured <= limit + 1e-9:
        return None
    return fill_step(setup.plane_fill * limit / measured)


def hatch_lever(electrode: Electrode) -> Lever | None:
    """Copper under the pad hatched at the profile's fill (one value)."""
    fill = hatched_fill(electrode)
    if fill is None:
        return None
    limit = electrode.limit("under_fill_max_ratio", 0.5)
    return Lever("plane_fill", electrode.plane_fill_ratio, limit, 0.0,
                 lambda _: _snapped(replace(electrode.setup, plane_fill=fill)),
                 lambda _: f"hatch the copper under the pad on {electrode.plane_layer} "
                           f"at {100 * limit:.0f} % fill")


def clear_lever(electrode: Electrode) -> Lever | None:
    """Copper under the pad removed (one value)."""
    if electrode.setup.plane_depth_mm is None:
        return None
    return Lever("plane_fill", electrode.plane_fill_ratio, 0.0, 0.0,
                 lambda _: _snapped(replace(electrode.setup, plane_depth_mm=None,
                                            plane_fill=1.0)),
                 lambda _: f"clear the copper under the pad on {electrode.plane_layer}")
