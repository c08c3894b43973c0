"""Graded node lines (common practice, no source: properties of the construction)."""

from __future__ import annotations

import numpy as np

from auditor.field.grading import Breakpoint, graded_line


def test_line_contains_breakpoints_and_grades_towards_edges() -> None:
    points = [Breakpoint(0.0, False), Breakpoint(5.0, True), Breakpoint(6.0, True),
              Breakpoint(300.0, False)]
    line = graded_line(points, 0.15, 1e-4, 6.0)
    for p in points:
        assert np.min(np.abs(line - p.position_mm)) < 1e-12
    steps = np.diff(line)
    assert (steps > 0).all()
    at_edge = steps[np.searchsorted(line, 5.0) - 1]
    assert at_edge < 0.05 * 1.0  # much finer than the 1 mm gap
    assert steps[-1] > 10.0  # coarse towards the far boundary


def test_halving_eta_roughly_doubles_nodes() -> None:
    points = [Breakpoint(0.0, False), Breakpoint(1.0, True), Breakpoint(30.0, False)]
    coarse = len(graded_line(points, 0.2, 1e-4, 1.0))
    fine = len(graded_line(points, 0.1, 1e-4, 1.0))
    assert 1.6 < fine / coarse < 2.4


def test_near_coincident_breakpoints_merge() -> None:
    points = [Breakpoint(0.0, False), Breakpoint(1.0, True), Breakpoint(1.0 + 1e-12, True),
              Breakpoint(10.0, False)]
    line = graded_line(points, 0.2, 1e-4, 1.0)
    assert (np.diff(line) > 1e-9).all()
