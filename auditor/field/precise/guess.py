"""Starting guesses for a batched solve: variants start from the bare variant.

A variant adds conductors (a finger) to the fixed ones. Driving a fixed
conductor with the finger present differs from driving it without only by
the charge the finger's potential moves: the bare variant's charges (zero on
the finger's cells), corrected by the variant's own solutions for its added
conductors (the finger driven) in the energy-optimal (Galerkin) combination,
leave a residual of a few per cent or less where a zero start leaves all of
it. Measured on the demo board: the touched pad columns start at 0.7-7 % of
their right-hand side and need 19-21 iterations instead of 30-35; a slider
scan's columns start at 0.1-60 %, which saves a third of its operator
applications.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from numpy.typing import NDArray

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]


def reused_columns(node_members: Sequence[Sequence[frozenset[int]]],
                   columns: Sequence[tuple[int, int]], bare: int) -> dict[int, int]:
    """Columns that can start from a column of the bare variant.

    ``node_members[g][j]`` is the set of conductors (numbered as in every
    variant: fixed ones first) joined in node ``j`` of variant ``g``;
    ``columns`` are the right-hand sides as ``(variant, node)``; variant
    ``bare`` has no conductors of its own. Returns, for every column of
    another variant that drives exactly the conductors of a column of the
    bare variant, that column's index.
    """
    base = {node_members[g][j]: c for c, (g, j) in enumerate(columns) if g == bare}
    return {c: base[node_members[g][j]] for c, (g, j) in enumerate(columns)
            if g != bare and node_members[g][j] in base}


def starting_guess(reused: dict[int, int], columns: Sequence[tuple[int, int]],
                   rhs: FloatArray, charge: FloatArray, residual: FloatArray
                   ) -> FloatArray:
    """Starting charges of the reused columns, in the order of ``sorted(reused)``.

    ``charge`` and ``residual`` hold the solved columns (the others are
    ignored): the bare variant's and each variant's own added conductors
    driven. A reused column starts from its bare column's charges ``x_b``
    plus ``X_F c``, ``X_F`` the solved columns of its variant (``A X_F =
    B_F - R_F`` with their right-hand sides and residuals), ``c`` from
    ``(X_F^T A X_F) c = X_F^T (b - A x_b)``, and ``X_F^T A x_b = (A
    X_F)^T x_b`` by symmetry: no operator application is needed.
    """
    order = sorted(reused)
    guess = charge[:, [reused[c] for c in order]].copy()
    for k, column in enumerate(order):
        variant = columns[column][0]
        companions = [c for c, (g, _) in enumerate(columns) if g == variant and c not in reused]
        if not companions:
            continue
        solved = charge[:, companions]
        image = rhs[:, companions] - residual[:, companions]
        gram = solved.T @ image
        projected = solved.T @ rhs[:, column] - image.T @ guess[:, k]
        guess[:, k] += solved @ np.linalg.solve(0.5 * (gram + gram.T), projected)
    return guess
