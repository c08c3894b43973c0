"""Rules on precise-mode results: electrode crosstalk and slider response.

They read ``RuleContext.precise`` (set only by ``--precise`` runs) through
the attributes described by the protocols below, so rules import nothing
from the field stage (``auditor.model.results`` has records that
fit). Without precise data every rule here yields nothing.
"""

from __future__ import annotations

import math
from collections.abc import Iterator, Sequence
from typing import Protocol, runtime_checkable

from auditor.rules.finding import Finding, Severity
from auditor.rules.registry import RuleCall, board_rule


class CrosstalkPairLike(Protocol):
    """One electrode pair's coupling."""

    @property
    def first(self) -> str: ...

    @property
    def second(self) -> str: ...

    @property
    def crosstalk_pf(self) -> float: ...

    @property
    def worst_fraction(self) -> float: ...


class CouplingLike(Protocol):
    """The coupling table."""

    def pairs(self) -> Sequence[CrosstalkPairLike]: ...


class ScanLike(Protocol):
    """A finger scan along one slider or wheel."""

    @property
    def group(self) -> str: ...

    @property
    def kind(self) -> str: ...

    @property
    def segment_names(self) -> tuple[str, ...]: ...

    @property
    def linearity_mm(self) -> float: ...

    @property
    def dead_zones_mm(self) -> tuple[tuple[float, float], ...]: ...

    @property
    def reversals_mm(self) -> tuple[float, ...]: ...

    @property
    def x_mm(self) -> float: ...

    @property
    def y_mm(self) -> float: ...


@runtime_checkable
class PreciseLike(Protocol):
    """What a rule reads of the precise results."""

    @property
    def coupling(self) -> CouplingLike | None: ...

    @property
    def scans(self) -> Sequence[ScanLike]: ...


def _precise(call: RuleCall) -> PreciseLike | None:
    data = getattr(call.board, "precise", None)
    return data if isinstance(data, PreciseLike) else None


def _scans(call: RuleCall) -> Sequence[ScanLike]:
    data = _precise(call)
    return data.scans if data is not None else ()


@board_rule(
    "crosstalk-high",
    title="Two electrodes couple strongly to each other",
    fix="Space the electrodes further apart, put grounded hatch between them, or route "
        "their traces apart; check the overlay is not thicker than their spacing.",
    severity=Severity.WARNING,
    thresholds=("max_crosstalk_ratio",),
)
def crosstalk_high(call: RuleCall) -> Iterator[Finding]:
    """A touch on one electrode also changes its neighbour's reading when the
    two couple strongly; the precise solve gives the mutual capacitance as a
    share of each pad's own Cp, and a large share risks double detections."""
    data = _precise(call)
    if data is None or data.coupling is None:
        return
    limit = call.limits["max_crosstalk_ratio"]
    slider_pairs = {frozenset(scan.segment_names[i:i + 2]) for scan in data.scans
                    for i in range(len(scan.segment_names) - 1)}
    for pair in data.coupling.pairs():
        if frozenset((pair.first, pair.second)) in slider_pairs:
            continue  # neighbouring segments of one slider are meant to share the finger
        if pair.worst_fraction > limit + 1e-12:
            yield call.finding(
                f"{pair.first} and {pair.second} couple {pair.crosstalk_pf:.3f} pF, "
                f"{100 * pair.worst_fraction:.1f} % of Cp (limit {100 * limit:.0f} %)",
                measured=(("crosstalk_pf", pair.crosstalk_pf),
                          ("fraction_of_cp", pair.worst_fraction), ("max_ratio", limit)),
                refs=())


@board_rule(
    "slider-dead-zone",
    title="Slider or wheel has positions with almost no response",
    fix="Narrow the segment pitch below the finger size, interleave segment edges, or thin "
        "the overlay so a finger always overlaps two segments.",
    severity=Severity.WARNING,
)
def slider_dead_zone(call: RuleCall) -> Iterator[Finding]:
    """Where the summed response of all segments falls below a tenth of its
    peak, the controller cannot tell a finger from no finger and the
    position is lost."""
    for scan in _scans(call):
        for start, end in scan.dead_zones_mm:
            yield call.finding(
                f"{scan.kind} {scan.group}: no usable response from {start:.1f} to "
                f"{end:.1f} mm along it", measured=(("dead_from_mm", start),
                                                   ("dead_to_mm", end)), x_mm=scan.x_mm, y_mm=scan.y_mm)


@board_rule(
    "slider-reversal",
    title="Slider or wheel position steps back as the finger moves on",
    fix="Make segments equal and evenly spaced; interleave their edges so the response "
        "hands over smoothly from one segment to the next.",
    severity=Severity.WARNING,
)
def slider_reversal(call: RuleCall) -> Iterator[Finding]:
    """An interpolated position that moves backwards while the finger moves
    forwards makes the reading jump; it comes from uneven segments or gaps."""
    for scan in _scans(call):
        if scan.reversals_mm:
            first = scan.reversals_mm[0]
            yield call.finding(
                f"{scan.kind} {scan.group}: estimated position steps back at "
                f"{len(scan.reversals_mm)} position(s), first at {first:.1f} mm",
                measured=(("reversals", float(len(scan.reversals_mm))),
                          ("first_mm", first)), x_mm=scan.x_mm, y_mm=scan.y_mm)


@board_rule(
    "slider-nonlinear",
    title="Slider or wheel position error too large",
    fix="Shorten the segment pitch (below finger size), interleave segment edges, keep "
        "segments equal in area and trace length.",
    severity=Severity.INFO,
    thresholds=("max_linearity_error_mm",),
)
def slider_nonlinear(call: RuleCall) -> Iterator[Finding]:
    """The position interpolated from the segments' signals departs from the
    finger's true position; beyond a few millimetres the slider feels
    uneven."""
    limit = call.limits["max_linearity_error_mm"]
    for scan in _scans(call):
        if math.isfinite(scan.linearity_mm) and scan.linearity_mm > limit + 1e-9:
            yield call.finding(
                f"{scan.kind} {scan.group}: position error up to {scan.linearity_mm:.2f} mm "
                f"(limit {limit:.1f} mm)",
                measured=(("linearity_mm", scan.linearity_mm), ("max_mm", limit)),
                x_mm=scan.x_mm, y_mm=scan.y_mm)
