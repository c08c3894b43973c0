"""Field results shared by several stages: per-pad metrics and what precise
mode adds to a report (electrode coupling and slider response).

``solve`` makes them, ``rules`` judge them, ``decide`` ranks them and the
reporters show them. Plain frozen records (no matrices, no geometry) so
those stages can read them without the solver; values in pF and mm.
"""

from __future__ import annotations

from dataclasses import dataclass

from auditor.model.vocabulary import PART_CONNECTIONS, PartConnection

#: Opening words of the 3-D solve's note on an electrode solved with a
#: driven shield at its own potential (the shield takes charge off the pad,
#: so the pad's Cp may fall below the isolated-disk floor).
DRIVEN_SHIELD_NOTE = "driven shield "
#: How a part on the sense net enters Cp (``LumpedPart.connection``):
#: ``to-ground`` and ``to-net`` add their capacitance in parallel (another net
#: is taken as AC ground: a supply or a driven pin is a low impedance at the
#: sense frequency); ``series`` is a capacitor in the sense path, in series
#: with the electrode's side; ``between-pins`` (to another pin of the
#: controller, a charge-transfer sampling capacitor) is not added;
#: ``series-resistor`` and ``resistor`` change no static capacitance;
#: ``not-read`` (value field not understood), ``not-fitted`` (DNP) and
#: ``other`` (a part whose capacitance is not known) are not added.
CONNECTIONS: tuple[PartConnection, ...] = PART_CONNECTIONS


@dataclass(frozen=True)
class LumpedPart:
    """A part on an electrode's sense net, as the Cp total counts it.

    ``pf`` is the capacitance read from the value field (None: not a
    capacitor or not read); ``connection`` one of :data:`CONNECTIONS`;
    ``net`` the net of its other pad (``""`` when it has none).
    """

    ref: str
    value: str
    pf: float | None
    connection: PartConnection
    net: str = ""


@dataclass(frozen=True)
class PadMetrics:
    """Field-solve results for one sensor, in pF (ratio unitless)."""

    cp_pad_pf: float
    cp_trace_pf: float
    cp_total_pf: float
    delta_c_pf: float
    delta_ratio: float
    method: str = "quick"  # quick (axisymmetric) or precise (3-D)
    notes: tuple[str, ...] = ()
    #: With ``method == "precise"``: the quick estimate of the same pad, for
    #: showing the two side by side (None for quick metrics).
    quick_cp_pad_pf: float | None = None
    quick_cp_total_pf: float | None = None
    quick_delta_c_pf: float | None = None
    #: With ``method == "precise"`` and no quick estimate beside it: why
    #: (not computed, or the electrode does not map onto the quick model).
    quick_missing: str = ""
    #: The controller pin's own capacitance and the net effect of the parts
    #: on the sense net, both included in ``cp_total_pf``: Cp total = pad +
    #: trace (with vias) + pin + parts. ``cp_parts_pf`` is negative when a
    #: series capacitor divides the electrode's share.
    cp_pin_pf: float = 0.0
    cp_parts_pf: float = 0.0
    parts: tuple[LumpedPart, ...] = ()
    #: Why this model answered (the automatic mode's test, or a forcing flag).
    method_reason: str = ""

    @property
    def quick_difference(self) -> tuple[float, float] | None:
        """``(Cp total, ΔC)`` change of this result against the quick
        estimate, as fractions (``0.05`` = 5 % above); None without one."""
        if self.quick_cp_total_pf is None or self.quick_delta_c_pf is None:
            return None
        if self.quick_cp_total_pf == 0 or self.quick_delta_c_pf == 0:
            return None
        return (self.cp_total_pf / self.quick_cp_total_pf - 1.0,
                self.delta_c_pf / self.quick_delta_c_pf - 1.0)


@dataclass(frozen=True)
class CrosstalkPair:
    """Coupling between two electrodes: ``-C_ij`` and its share of each Cp.

    ``fraction_of_first`` is ``-C_ij / C_ii`` (``C_ii`` the first pad's
    Maxwell self term with every other conductor at 0 V).
    """

    first: str
    second: str
    crosstalk_pf: float
    fraction_of_first: float
    fraction_of_second: float

    @property
    def worst_fraction(self) -> float:
        """The larger of the two shares."""
        return max(self.fraction_of_first, self.fraction_of_second)


@dataclass(frozen=True)
class CouplingTable:
    """Crosstalk among all electrodes of one board (row i: what couples into i)."""

    names: tuple[str, ...]
    crosstalk_pf: tuple[tuple[float, ...], ...]
    fraction_of_cp: tuple[tuple[float, ...], ...]
    cell_mm: float

    def pairs(self) -> tuple[CrosstalkPair, ...]:
        """Every unordered pair once, in name order."""
        out = []
        for i, first in enumerate(self.names):
            for j in range(i + 1, len(self.names)):
                out.append(CrosstalkPair(first, self.names[j], self.crosstalk_pf[i][j],
                                         self.fraction_of_cp[i][j],
                                         self.fraction_of_cp[j][i]))
        return tuple(out)


@dataclass(frozen=True)
class SegmentScan:
    """A finger stepped along a slider or wheel group (see ``SliderScan``).

    ``delta_pf[n][i]``: segment ``i``'s change at ``positions_mm[n]``;
    ``estimated_mm[n]`` the interpolated position (``nan`` in a dead zone);
    ``linearity_mm`` the worst ``|estimated - true|`` between the first and
    last segment centres (whole turn on a wheel).
    """

    group: str
    kind: str
    segment_names: tuple[str, ...]
    segment_centres_mm: tuple[float, ...]
    positions_mm: tuple[float, ...]
    delta_pf: tuple[tuple[float, ...], ...]
    estimated_mm: tuple[float, ...]
    linearity_mm: float
    dead_zones_mm: tuple[tuple[float, float], ...]
    reversals_mm: tuple[float, ...]
    step_mm: float
    cell_mm: float
    x_mm: float = 0.0  # where to point at on the board (the group's centre)
    y_mm: float = 0.0

    @property
    def monotonic(self) -> bool:
        """True when the estimated position never steps back along the path."""
        return not self.reversals_mm


@dataclass(frozen=True)
class PreciseExtras:
    """Board-level precise results: coupling table and scans, with notes."""

    coupling: CouplingTable | None = None
    scans: tuple[SegmentScan, ...] = ()
    notes: tuple[str, ...] = ()
