"""Circuit step: lumped stamps, floating nodes, earth (hand-computable checks)."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from auditor.field.circuit import (
    reduced,
    stamped,
    touch_network,
    touch_network_pf,
    two_terminal_pf,
    with_reference_node,
)
from auditor.field.matrix import CapacitanceMatrix

positive = st.floats(min_value=0.01, max_value=100.0)


def _series(a: float, b: float) -> float:
    return a * b / (a + b)


def test_series_capacitors_through_floating_node() -> None:
    # Two capacitors in series (any circuit text): 2 pF and 3 pF -> 1.2 pF.
    m = stamped(stamped(CapacitanceMatrix((), ()), "a", "mid", 2.0), "mid", "gnd", 3.0)
    assert reduced(m, "gnd", ["a"]).entry("a", "a") == pytest.approx(1.2, rel=1e-12)


def test_two_terminal_formula_reproduces_love_column() -> None:
    # Physics reference 1.4: (C11 C22 - C12^2)/(C11 + C22 + 2 C12) of the tabulated
    # Maxwell entries reproduces Love's two-terminal value at d/a = 0.1.
    m = CapacitanceMatrix.from_array(("a", "b"), np.array([[39.07585, -34.78879],
                                                           [-34.78879, 39.07585]]))
    assert two_terminal_pf(m, "a", "b") == pytest.approx(36.9323219, rel=1e-6)


@settings(max_examples=60, deadline=None)
@given(c_pg=positive, c_pf=positive, c_fg=positive, c_be=positive, c_ed=positive,
       s_f=st.floats(min_value=0.0, max_value=0.5), s_g=st.floats(min_value=0.0, max_value=1.0))
def test_body_earth_reduction_matches_hand_formula(c_pg: float, c_pf: float, c_fg: float,
                                                   c_be: float, c_ed: float, s_f: float,
                                                   s_g: float) -> None:
    # Physics reference 1.12: dC_eff = dC_grounded - C_pf^2 / (C_ff + C_ret),
    # C_ret = C_be C_ed / (C_be + C_ed), C_ff = C_pf + C_fg (exact algebra).
    # Field matrix (pad, ground, finger) to earth; pad has no direct earth path,
    # the finger's and ground's own earth couplings s_f, s_g are part of the totals.
    s_f, s_g = min(s_f, 0.99 * c_be), min(s_g, 0.99 * c_ed)
    field = np.array([[c_pg + c_pf, -c_pg, -c_pf],
                      [-c_pg, c_pg + c_fg + s_g, -c_fg],
                      [-c_pf, -c_fg, c_pf + c_fg + s_f]])
    matrix = CapacitanceMatrix.from_array(("pad", "ground", "finger"), field)
    touched = touch_network_pf(matrix, "pad", "ground", "finger", c_ed, c_be)
    c_ret = _series(c_be, c_ed)
    hand = c_pg + c_pf - c_pf ** 2 / (c_pf + c_fg + c_ret)
    assert touched == pytest.approx(hand, rel=1e-9)


def test_earth_node_rows_sum_to_zero() -> None:
    m = CapacitanceMatrix.from_array(("a", "b"), np.array([[3.0, -1.0], [-1.0, 2.5]]))
    full = with_reference_node(m, "earth").array()
    assert full.sum(axis=0) == pytest.approx(np.zeros(3), abs=1e-12)
    assert full[2, 2] == pytest.approx(3.5)


def test_no_modelled_ground_means_earth_is_device_ground() -> None:
    # A lone pad (8 eps0 a to infinity) reads its own capacitance; a grounded
    # finger of large body capacitance adds the series path pad-finger-body.
    m = CapacitanceMatrix.from_array(("pad", "finger"), np.array([[1.0, -0.6], [-0.6, 0.9]]))
    value = touch_network_pf(m, "pad", None, "finger", 5.0, 150.0)
    # finger to earth: 0.3 field + 149.7 stamped = 150 total
    assert value == pytest.approx(0.4 + _series(0.6, 150.0), rel=1e-12)


def test_modelled_coupling_is_not_counted_twice() -> None:
    # The device-to-earth value is a total: with the modelled ground already at
    # 2 pF to infinity, a 5 pF preset stamps only 3 pF more.
    m = CapacitanceMatrix.from_array(("pad", "ground"), np.array([[1.0, -1.0], [-1.0, 3.0]]))
    out = touch_network(m, ["pad"], "ground", None, 5.0, 150.0)
    assert out.entry("pad", "pad") == pytest.approx(1.0, rel=1e-12)


def test_unknown_conductor_names_valid_ones() -> None:
    from auditor.errors import UsageError
    m = CapacitanceMatrix.from_array(("pad",), np.array([[1.0]]))
    with pytest.raises(UsageError, match="conductors are pad"):
        m.entry("pad", "finger")
