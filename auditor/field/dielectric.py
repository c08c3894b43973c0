"""The dielectric layers: as a board lists them, and as the slab both 2-D
solvers fill their mesh with.

The axisymmetric solver (:mod:`auditor.field.axisym`) reads the heights as
``z`` and the cross-section solver (:mod:`auditor.field.crosssection`) as
``y``; either way a slab is unbounded sideways, and the background is vacuum.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class DielectricSlab:
    """Dielectric between two heights (mm), unbounded sideways.

    Examples
    --------
    >>> DielectricSlab(-1.6, 0.0, 4.4).top_mm - DielectricSlab(-1.6, 0.0, 4.4).bottom_mm
    1.6
    """

    bottom_mm: float
    top_mm: float
    er: float


@dataclass(frozen=True)
class BoardLayer:
    """One dielectric layer of a board as a designer lists it, from the touch
    side down: a thickness and a permittivity (the solvers place it as a
    :class:`DielectricSlab`)."""

    thickness_mm: float
    er: float


__all__ = ["BoardLayer", "DielectricSlab"]
