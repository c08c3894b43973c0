"""Hand-built precise-mode records for the rule pairs in test_rule_records.py.

Each case sits just either side of the default profile's limit
(rules/default.toml: max_crosstalk_ratio 0.1, max_linearity_error_mm 2.0,
common practice, no source); dead zones and reversals trigger on any.
"""

from __future__ import annotations

from auditor.model.results import CouplingTable, PreciseExtras, SegmentScan


def coupling(fraction: float) -> CouplingTable:
    """Two buttons coupling 0.3 pF; TOUCH1 at the given share of its Cp."""
    return CouplingTable(("TOUCH1", "TOUCH2"), ((0.0, 0.3), (0.3, 0.0)),
                         ((0.0, fraction), (0.05, 0.0)), cell_mm=0.5)


def scan(linearity_mm: float = 1.0, dead: tuple[tuple[float, float], ...] = (),
         reversals: tuple[float, ...] = ()) -> SegmentScan:
    """A three-segment slider scan with the given figures."""
    return SegmentScan("SLIDER", "slider", ("S1", "S2", "S3"), (5.0, 15.0, 25.0),
                       (0.0, 10.0, 20.0, 30.0), ((0.4, 0.1, 0.0),) * 4,
                       (5.0, 12.0, 21.0, 25.0), linearity_mm, dead, reversals,
                       step_mm=10.0, cell_mm=0.75)


def precise_cases() -> list[tuple[str, PreciseExtras, PreciseExtras]]:
    """(rule id, triggering record, near miss)."""
    return [
        ("crosstalk-high", PreciseExtras(coupling(0.11)), PreciseExtras(coupling(0.09))),
        ("slider-dead-zone", PreciseExtras(scans=(scan(dead=((0.0, 2.0),)),)),
         PreciseExtras(scans=(scan(),))),
        ("slider-reversal", PreciseExtras(scans=(scan(reversals=(12.0,)),)),
         PreciseExtras(scans=(scan(),))),
        ("slider-nonlinear", PreciseExtras(scans=(scan(linearity_mm=2.1),)),
         PreciseExtras(scans=(scan(linearity_mm=1.9),))),
    ]
