"""The board's stackup as the field models see it, from the touch side down.

Solder mask: the touch-side mask lies between copper and cover, so it joins
the overlay in series; the far-side mask stays a thin board layer under a
touch-side electrode (and is dropped under a far-side one, where it faces
away from the finger).
"""

from __future__ import annotations

from auditor.config import Config
from auditor.field.api import BoardLayer
from auditor.model.board import Board
from auditor.model.items import StackupLayer

#: Solder mask permittivity when the stackup gives none (materials table:
#: solder-mask 3.6, common practice, no source).
MASK_ER = 3.6


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
