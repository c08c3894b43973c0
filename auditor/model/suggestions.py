"""A change that fixes a finding, with its effect predicted by the field solve.

``solve`` makes them (:mod:`auditor.solve.suggest`), the audit entry attaches
them to the decided findings, the reporters show them. Plain frozen records:
capacitances in pF, the changed parameter in its own unit (named in
``parameter``: ``pad_diameter_mm``, ``overlay_mm``, ``overlay_er``,
``ground_gap_mm``, ``plane_fill``, ``trace_length_mm``).
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Predicted:
    """The three numbers a designer weighs: baseline, touch signal, their ratio."""

    cp_total_pf: float
    delta_c_pf: float
    delta_ratio: float


@dataclass(frozen=True)
class Suggestion:
    """One change and what the field solve predicts it does.

    Attributes
    ----------
    change:
        The change in words, e.g. ``grow the pad to 7.2 mm across``.
    parameter:
        What changes (see the module docstring for the names and units).
    from_value, to_value:
        The parameter now and after the change (``to_value`` is the smallest
        change that clears the finding, or the end of the sensible range when
        nothing in it does).
    before, predicted:
        The electrode's numbers from the same model before and after.
    clears:
        False when no change within the sensible range clears the finding;
        ``change`` then says so.
    """

    change: str
    parameter: str
    from_value: float
    to_value: float
    before: Predicted
    predicted: Predicted
    clears: bool = True
