"""The planar layered dielectric that the precise solve works in.

A stack of dielectric layers, listed top-down, between an upper half-space and
either a lower half-space or a solid grounded plane. Conductors are zero
thickness and lie on the interfaces ("levels"): level 0 is the top face of the
first layer, level ``n`` the bottom face of the last one. With a grounded plane
below, that bottom face is the plane itself and carries no meshed conductor;
the plane is folded into the Green's function instead.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from auditor.errors import UsageError

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class LayeredMedium:
    """A planar dielectric stack.

    Parameters
    ----------
    layers:
        ``(thickness_mm, relative_permittivity)`` per layer, top-down.
    above_er:
        Relative permittivity of the half-space above level 0 (air: 1).
    below_er:
        Relative permittivity of the half-space below the last layer; ignored
        when ``ground_below`` is set.
    ground_below:
        A solid grounded plane closes the stack at its bottom face.

    Examples
    --------
    >>> LayeredMedium(layers=((1.0, 4.4),), ground_below=True).level_count
    1
    """

    layers: tuple[tuple[float, float], ...] = ()
    above_er: float = 1.0
    below_er: float = 1.0
    ground_below: bool = False

    def __post_init__(self) -> None:
        for thickness_mm, er in self.layers:
            if not thickness_mm > 0.0:
                raise UsageError(f"layer thickness must be > 0 mm, got {thickness_mm}")
            if not er >= 1.0:
                raise UsageError(f"relative permittivity must be >= 1, got {er}")
        if not (self.above_er >= 1.0 and self.below_er >= 1.0):
            raise UsageError("half-space relative permittivity must be >= 1")
        if self.ground_below and not self.layers:
            raise UsageError("a grounded plane needs at least one layer above it")

    @property
    def level_count(self) -> int:
        """Number of interfaces that can carry meshed conductors."""
        return len(self.layers) + (0 if self.ground_below else 1)

    def level_depth_mm(self, level: int) -> float:
        """Depth of a level below level 0, in mm."""
        self.check_level(level)
        return float(sum(t for t, _ in self.layers[:level]))

    def check_level(self, level: int) -> None:
        """Raise :class:`UsageError` unless ``level`` can carry a conductor."""
        if not 0 <= level < self.level_count:
            raise UsageError(
                f"conductor level {level} outside 0..{self.level_count - 1} of this stack")

    def er_above(self, level: int) -> float:
        """Permittivity just above a level."""
        return self.above_er if level == 0 else self.layers[level - 1][1]

    def er_below(self, level: int) -> float:
        """Permittivity just below a level."""
        return self.below_er if level == len(self.layers) else self.layers[level][1]

    def shortest_layer_mm(self) -> float:
        """Thinnest layer, the length scale of the layered correction (1 mm if none)."""
        return min((t for t, _ in self.layers), default=1.0)

    def thickest_layer_mm(self) -> float:
        """Thickest layer (1 mm if none)."""
        return max((t for t, _ in self.layers), default=1.0)


def spectral_potential(medium: LayeredMedium, k_per_mm: FloatArray) -> FloatArray:
    """Spectral potential between levels, ``g_ij(k)``, dimensionless.

    A unit sheet charge ``exp(i k.r)`` on level ``j`` gives potential
    ``g_ij(k) / (eps0 k)`` on level ``i``. Each layer is a two-port with
    admittance ``er k [[coth kt, -csch kt], [-csch kt, coth kt]]``, a half-space
    adds ``er k`` to its node and a grounded plane shorts the last node
    (physics.md section 1.11; the transmission-line analogy of the static
    spectral problem). Returns an array of shape ``(len(k), L, L)``.
    """
    node_count = len(medium.layers) + 1
    admittance = np.zeros((k_per_mm.size, node_count, node_count))
    admittance[:, 0, 0] += medium.above_er
    admittance[:, -1, -1] += medium.below_er
    for index, (thickness_mm, er) in enumerate(medium.layers):
        decay = np.exp(-2.0 * k_per_mm * thickness_mm)
        coth = (1.0 + decay) / (1.0 - decay)
        csch = 2.0 * np.sqrt(decay) / (1.0 - decay)
        admittance[:, index, index] += er * coth
        admittance[:, index + 1, index + 1] += er * coth
        admittance[:, index, index + 1] -= er * csch
        admittance[:, index + 1, index] -= er * csch
    if medium.ground_below:
        admittance = admittance[:, :-1, :-1]
    return np.asarray(np.linalg.inv(admittance), dtype=float)


def high_k_coefficients(medium: LayeredMedium) -> FloatArray:
    """``A_ij = lim_{k->inf} g_ij(k) exp(k d_ij)``, the direct-ray part.

    At large ``k`` reflections (of order ``exp(-2kt)``) vanish and a sheet
    charge on level ``i`` raises its own plane to ``1/(er_above + er_below)``;
    each layer crossed passes on ``2 er_m/(er_m + er_next) exp(-k t_m)``
    (leading order of the tridiagonal network above).
    """
    count = medium.level_count
    coefficients = np.zeros((count, count))
    for source in range(count):
        value = 1.0 / (medium.er_above(source) + medium.er_below(source))
        coefficients[source, source] = value
        for target in range(source + 1, count):
            er_layer = medium.layers[target - 1][1]
            value *= 2.0 * er_layer / (er_layer + medium.er_below(target))
            coefficients[source, target] = coefficients[target, source] = value
    return coefficients


def level_separations_mm(medium: LayeredMedium) -> FloatArray:
    """Vertical distance between every pair of levels, mm."""
    depths = np.array([medium.level_depth_mm(level) for level in range(medium.level_count)])
    return np.asarray(np.abs(depths[:, None] - depths[None, :]), dtype=float)
