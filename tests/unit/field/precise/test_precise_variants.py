"""Batched variants, tied and driven conductors against separate solves of the same cells.

Joining conductors adds their Maxwell rows and columns (charge adds, the
potential is shared; Smythe 1968 ch. 2); a Maxwell sub-block is the matrix
with the other conductors held at 0 V (same source). The variational
estimate is second order in the CG error (Galerkin energy argument, e.g.
Harrington 1968 sec. 1.5, from memory), so a loose tolerance still agrees
with a tight one to far better than the residual.
"""

from __future__ import annotations

import numpy as np
import pytest
from shapely.geometry import Point, box

from auditor.errors import UsageError
from auditor.field.precise import Conductor, LayeredMedium, solve_precise, solve_variants

MEDIUM = LayeredMedium(((1.0, 3.0), (1.6, 4.4)))
PAD = Conductor("pad", Point(10, 10).buffer(4, quad_segs=64), 1)
POUR = Conductor("ground@top", box(0, 0, 20, 20).difference(Point(10, 10).buffer(5)), 1)
PLANE = Conductor("ground@bottom", box(0, 0, 20, 20), 2)
WINDOW = box(-2, -2, 22, 22)


def finger_at(x: float) -> Conductor:
    return Conductor("finger", Point(x, 10).buffer(4, quad_segs=64), 0)


@pytest.fixture(scope="module")
def batched():
    variants = [(), (finger_at(10),), (finger_at(6),)]
    return solve_variants([PAD, POUR, PLANE], variants, MEDIUM, 0.5, window=WINDOW,
                          tolerance=1e-8)


def test_each_variant_equals_its_own_solve(batched) -> None:
    """Same grid (fixed by the window), same cells: the batch changes nothing."""
    for variant, solved in zip([(), (finger_at(10),), (finger_at(6),)], batched, strict=True):
        alone = solve_precise([PAD, POUR, PLANE, *variant], MEDIUM, 0.5, window=WINDOW,
                              tolerance=1e-8)
        assert solved.matrix.names == alone.matrix.names
        assert np.allclose(solved.matrix.array(), alone.matrix.array(), rtol=1e-7, atol=0)


def test_finger_raises_pad_capacitance_more_when_centred(batched) -> None:
    """Thomson monotonicity (physics.md 1.12): a grounded conductor added nearby raises
    C_ii, and more the closer it is."""
    base, centred, aside = (s.matrix.entry("pad", "pad") for s in batched)
    assert centred > aside > base


def test_tied_pieces_are_the_summed_rows_and_columns(batched) -> None:
    tied = {"ground@top": "ground", "ground@bottom": "ground"}
    (joined,) = solve_variants([PAD, POUR, PLANE], [(finger_at(10),)], MEDIUM, 0.5,
                               window=WINDOW, tolerance=1e-8, tied=tied)
    full = batched[1].matrix.array()
    join = np.array([[1, 0, 0], [0, 0, 1], [0, 0, 1], [0, 1, 0]], dtype=float)
    assert joined.matrix.names == ("pad", "finger", "ground")
    assert np.allclose(joined.matrix.array(), join.T @ full @ join, rtol=1e-7, atol=0)


def test_driven_gives_the_maxwell_sub_block(batched) -> None:
    (sub,) = solve_variants([PAD, POUR, PLANE], [(finger_at(10),)], MEDIUM, 0.5,
                            window=WINDOW, tolerance=1e-8, driven=["pad", "finger"])
    full = batched[1].matrix.array()
    assert sub.matrix.names == ("pad", "finger")
    assert np.allclose(sub.matrix.array(), full[np.ix_([0, 3], [0, 3])], rtol=1e-7, atol=0)


def test_loose_tolerance_is_second_order_accurate(batched) -> None:
    """Relative residual 1e-4: entries within 1e-6 of the 1e-8 solve (measured ~1e-8)."""
    loose = solve_variants([PAD, POUR, PLANE], [(), (finger_at(10),)], MEDIUM, 0.5,
                           window=WINDOW)
    for tight, fast in zip(batched[:2], loose, strict=True):
        scale = np.abs(tight.matrix.array()).max()
        assert np.abs(fast.matrix.array() - tight.matrix.array()).max() < 1e-6 * scale
        assert fast.iterations < tight.iterations


def test_variant_on_a_fixed_level_is_solved_on_its_own() -> None:
    neighbour = Conductor("neighbour", box(15.5, 0, 20, 4), 1)
    pad = Conductor("pad", box(0, 0, 10, 10), 1)
    (solved,) = solve_variants([pad], [(neighbour,)], MEDIUM, 0.5)
    alone = solve_precise([pad, neighbour], MEDIUM, 0.5)
    assert np.allclose(solved.matrix.array(), alone.matrix.array(), rtol=1e-5)


def test_bad_driven_or_tied_names_are_usage_errors() -> None:
    with pytest.raises(UsageError, match="driven"):
        solve_variants([PAD], [()], MEDIUM, 0.5, driven=["nothing"])
    with pytest.raises(UsageError, match="drive"):
        solve_variants([PAD], [()], MEDIUM, 0.5, driven=[])
