"""Board-level solves split into neighbour windows, against the whole solve.

The reference is the whole batched solve of the same discretisation (the
windows' grids are aligned with it, so the only difference is the copper
left out); the tolerances are ours (common practice, no source), set above
the measured differences stated in each test.
"""

from __future__ import annotations

import numpy as np
import pytest
from shapely.geometry import LineString, box

from auditor.field.precise import Conductor, Finger, LayeredMedium, slider_scan
from auditor.field.precise.windows import coupling_blocks, is_split, scan_windows

#: No plane under the strips: the slowest fall-off of the finger's effect.
FREE_STACK = LayeredMedium(((2.0, 3.0), (1.6, 4.4)))


def strip_row(count: int, pitch_mm: float = 7.0) -> list[Conductor]:
    return [Conductor(f"s{i:02d}", box(i * pitch_mm, 0, i * pitch_mm + 6, 20), 1)
            for i in range(count)]


def test_split_rule_is_a_budget_of_cells_times_columns() -> None:
    assert not is_split(1000, 10, budget=10_000)
    assert is_split(1001, 10, budget=10_000)


def test_scan_windows_hold_the_neighbours_of_each_position() -> None:
    """Every position's window holds its nearest segment and the next three
    on each side (fewer at the row's ends); a wheel's windows wrap."""
    centres = np.arange(12) * 7.0
    positions = np.arange(-3.5, 80.0, 7.0 / 3)
    windows = scan_windows(centres, positions, None, block=3, reach=3)
    taken = np.concatenate([t for t, _ in windows])
    assert sorted(taken.tolist()) == list(range(positions.size))
    for positions_of, segments in windows:
        for n in positions_of:
            nearest = int(np.argmin(np.abs(centres - positions[n])))
            wanted = set(range(max(nearest - 3, 0), min(nearest + 4, 12)))
            assert wanted <= set(segments.tolist())
    wheel = scan_windows(centres, positions[:36] + 3.5, 84.0, block=3, reach=3)
    assert {0, 11} <= set(wheel[0][1].tolist())


@pytest.mark.slow
def test_windowed_scan_matches_the_whole_solve() -> None:
    """12 strips of 6 x 20 mm at 7 mm pitch, no plane, 10 mm finger: every
    segment's change within 0.5 % of the largest change of the whole solve
    (measured 0.05 %), estimated positions within 0.05 mm (measured 0.005 mm)."""
    segments = strip_row(12)
    path = LineString([(-0.5, 10), (80.5, 10)])
    whole = slider_scan(segments, Finger(5.0, 0), path, 7.0 / 3, FREE_STACK, 1.0)
    split = slider_scan(segments, Finger(5.0, 0), path, 7.0 / 3, FREE_STACK, 1.0, budget=0)
    expected, got = np.array(whole.delta_pf), np.array(split.delta_pf)
    assert len(split.matrices) == len(whole.matrices)
    assert len(split.matrices[0].names) < len(whole.matrices[0].names)
    assert np.abs(got - expected).max() < 0.005 * expected.max()
    estimate_gap = np.abs(np.array(split.estimated_mm) - np.array(whole.estimated_mm))
    assert np.nanmax(estimate_gap) < 0.05
    assert split.linearity_mm == pytest.approx(whole.linearity_mm, abs=0.05)


def test_coupling_blocks_run_along_the_row_and_reach_their_neighbours() -> None:
    strips = [c.geometry for c in strip_row(10, pitch_mm=17.0)][::-1]
    blocks = coupling_blocks(strips, block=4, reach_mm=40.0)
    assert [sorted(b.tolist()) for b, _ in blocks] == [[6, 7, 8, 9], [2, 3, 4, 5], [0, 1]]
    # Gaps of 11 mm: the strips 11 and 28 mm beyond the block are in reach,
    # the next (45 mm) is not.
    assert blocks[0][1].tolist() == [4, 5, 6, 7, 8, 9]
