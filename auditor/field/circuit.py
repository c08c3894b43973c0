"""The circuit step: lumped capacitors, floating nodes, reduction.

Small and separate from the field solve so it can be checked by hand.

* A field solve gives a Maxwell matrix referenced to "infinity". Making that
  reference an explicit node turns the matrix into an indefinite admittance
  matrix (each row sums to zero); the reference row is minus the column sums.
* A lumped capacitor between two nodes is stamped like an admittance
  (C_ii += Cx, C_jj += Cx, C_ij -= Cx, C_ji -= Cx).
* Choosing a node as the new reference deletes its row and column.
* Floating nodes carry zero net charge; eliminating them is the Schur
  complement C_AA - C_AF C_FF^-1 C_FA.

[pub: Maxwell's capacitance coefficients, Smythe 1968 ch. 2; I. Smolic &
B. Klajn, "Capacitance matrix revisited", arXiv:2007.10251 (2021)]
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from auditor.field.matrix import CapacitanceMatrix
from auditor.model.vocabulary import PowerPreset


def with_reference_node(matrix: CapacitanceMatrix, name: str) -> CapacitanceMatrix:
    """Make the matrix's implicit reference an explicit node called ``name``."""
    values = matrix.array()
    n = len(matrix.names)
    full = np.zeros((n + 1, n + 1))
    full[:n, :n] = values
    full[:n, n] = -values.sum(axis=1)
    full[n, :n] = -values.sum(axis=0)
    full[n, n] = values.sum()
    return CapacitanceMatrix.from_array((*matrix.names, name), full)


def stamped(matrix: CapacitanceMatrix, node_a: str, node_b: str,
            capacitance_pf: float) -> CapacitanceMatrix:
    """A copy with a lumped capacitor between two nodes (added if missing)."""
    names = list(matrix.names)
    for name in (node_a, node_b):
        if name not in names:
            names.append(name)
    values = np.zeros((len(names), len(names)))
    n = len(matrix.names)
    values[:n, :n] = matrix.array()
    i, j = names.index(node_a), names.index(node_b)
    values[i, i] += capacitance_pf
    values[j, j] += capacitance_pf
    values[i, j] -= capacitance_pf
    values[j, i] -= capacitance_pf
    return CapacitanceMatrix.from_array(tuple(names), values)


def reduced(matrix: CapacitanceMatrix, reference: str | None,
            keep: Sequence[str]) -> CapacitanceMatrix:
    """Matrix among ``keep`` with every other node floating (zero net charge).

    Parameters
    ----------
    matrix:
        Maxwell matrix, or an indefinite one when ``reference`` is given.
    reference:
        Node taken as the new reference (row and column removed), or None to
        keep the matrix's own reference.
    keep:
        Nodes whose potentials are imposed; all others float.

    Examples
    --------
    Two 2 pF capacitors in series through a floating middle node:

    >>> m = CapacitanceMatrix.from_array(("a", "m"), np.array([[2.0, -2.0], [-2.0, 4.0]]))
    >>> round(reduced(m, None, ["a"]).values_pf[0][0], 12)
    1.0
    """
    names = [n for n in matrix.names if n != reference]
    values = matrix.array()
    idx = [matrix.index(n) for n in names]
    values = values[np.ix_(idx, idx)]
    a = [names.index(k) for k in keep]
    f = [i for i in range(len(names)) if i not in a]
    c_aa = values[np.ix_(a, a)]
    if f:
        c_af = values[np.ix_(a, f)]
        c_ff = values[np.ix_(f, f)]
        c_aa = c_aa - c_af @ np.linalg.solve(c_ff, c_af.T)
    return CapacitanceMatrix.from_array(tuple(keep), c_aa)


def two_terminal_pf(matrix: CapacitanceMatrix, node_a: str, node_b: str) -> float:
    """Capacitance between two conductors of an isolated pair, others floating.

    (C11 C22 - C12^2) / (C11 + C22 + 2 C12) after reducing to the pair
    [pub: Smolic & Klajn 2021; physics reference sec. 1.12].
    """
    pair = reduced(matrix, None, [node_a, node_b]).array()
    c11, c22, c12 = pair[0, 0], pair[1, 1], pair[0, 1]
    return float((c11 * c22 - c12 ** 2) / (c11 + c22 + 2 * c12))


#: Name of the earth node. It is the field solve's reference: "infinity" of
#: the open-boundary model is the room, i.e. earth.
EARTH = "earth"

#: Finger-and-body to earth, pF: the 150 pF of the IEC 61000-4-2 (Ed. 2.0,
#: 2008) system-level ESD human model, inside the 100-300 pF measured for a
#: standing person (Jonassen 1998, from memory).
BODY_TO_EARTH_PF = 150.0


#: Device ground to earth by power preset: (pF, origin).
DEVICE_TO_EARTH: dict[PowerPreset, tuple[float, str]] = {
    "battery": (5.0, "common practice, no source: free-space self-capacitance of a "
                     "hand-held device lying on a table (4 pi eps0 x 5 cm = 5.6 pF)"),
    "usb": (100.0, "common practice, no source: ground reaches earth through the host "
                   "and its supply (cable, chassis, Y capacitor), tens to hundreds of pF"),
    "mains": (2200.0, "common practice, no source: class II supply Y capacitor of "
                      "1-4.7 nF; class I (protective earth) is a short"),
}


def touch_network_pf(field: CapacitanceMatrix, pad: str, ground: str | None,
                     finger: str | None, device_to_earth_pf: float,
                     body_to_earth_pf: float) -> float:
    """Capacitance the controller sees between the pad and its device ground."""
    reduced_matrix = touch_network(field, (pad,), ground, finger, device_to_earth_pf,
                                   body_to_earth_pf)
    return reduced_matrix.values_pf[0][0]


def touch_network(field: CapacitanceMatrix, keep: Sequence[str], ground: str | None,
                  finger: str | None, device_to_earth_pf: float,
                  body_to_earth_pf: float) -> CapacitanceMatrix:
    """Matrix among ``keep`` referenced to the device ground, everything else floating.

    The field matrix is referenced to infinity, which is earth. The lumped
    values are totals: the device's whole coupling to earth and the whole
    body's. Part of each is already in the field model (the modelled
    ground's and finger's own coupling to infinity, the row sums), so only
    the remainder is stamped (never negative). With no modelled ground the
    device ground is the far-away ground itself, i.e. earth.
    """
    network = with_reference_node(field, EARTH)
    reference = EARTH
    if ground is not None:
        extra = max(device_to_earth_pf - field.to_reference_pf(ground), 0.0)
        network = stamped(network, ground, EARTH, extra)
        reference = ground
    if finger is not None:
        extra = max(body_to_earth_pf - field.to_reference_pf(finger), 0.0)
        network = stamped(network, finger, EARTH, extra)
    return reduced(network, reference, list(keep))
