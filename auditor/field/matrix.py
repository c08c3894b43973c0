"""The Maxwell capacitance matrix as a small immutable value with names.

Convention (Maxwell's capacitance coefficients, e.g. Smythe 1968 ch. 2):
charges Q = C V with potentials measured from a common reference node that
is not a row of the matrix. Diagonal entries are positive, off-diagonal
entries negative; a row sum is that conductor's capacitance to the
reference. Values in pF.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from auditor.errors import UsageError


@dataclass(frozen=True)
class CapacitanceMatrix:
    """Named symmetric capacitance matrix in pF.

    Examples
    --------
    >>> m = CapacitanceMatrix.from_array(("a", "b"), np.array([[2.0, -1.0], [-1.0, 3.0]]))
    >>> m.entry("a", "b")
    -1.0
    >>> m.to_reference_pf("b")
    2.0
    """

    names: tuple[str, ...]
    values_pf: tuple[tuple[float, ...], ...]

    @classmethod
    def from_array(cls, names: tuple[str, ...], values: NDArray[np.float64]) -> CapacitanceMatrix:
        if values.shape != (len(names), len(names)):
            raise ValueError(f"matrix shape {values.shape} does not match {len(names)} names")
        sym = 0.5 * (values + values.T)
        return cls(names, tuple(tuple(float(v) for v in row) for row in sym))

    def array(self) -> NDArray[np.float64]:
        """The values as a fresh numpy array."""
        return np.array(self.values_pf, dtype=float).reshape(len(self.names), len(self.names))

    def index(self, name: str) -> int:
        """Position of a conductor; UsageError naming the valid ones if absent."""
        try:
            return self.names.index(name)
        except ValueError:
            raise UsageError(f"no conductor {name!r}; conductors are "
                             f"{', '.join(self.names)}") from None

    def entry(self, row: str, column: str) -> float:
        """One coefficient C[row, column] in pF."""
        return self.values_pf[self.index(row)][self.index(column)]

    def to_reference_pf(self, name: str) -> float:
        """Row sum: the conductor's partial capacitance to the reference node."""
        return float(sum(self.values_pf[self.index(name)]))

