"""The record every rule yields, and the severity scale.

Rules never print and never filter: they yield :class:`Finding` records. What
is shown and what fails is decided in one place (``auditor.decide``).
"""

from __future__ import annotations

import enum
from dataclasses import dataclass

from auditor.model.vocabulary import SEVERITY_NAMES, FindingKey


class Severity(enum.IntEnum):
    """Severity scale; larger is worse, so ``>=`` compares as people expect."""

    INFO = 1
    WARNING = 2
    ERROR = 3

    @classmethod
    def parse(cls, text: str) -> Severity:
        """Parse ``error``/``warning``/``info`` (case-insensitive).

        Raises
        ------
        ValueError
            With the valid choices listed.
        """
        try:
            return cls[text.strip().upper()]
        except KeyError:
            choices = ", ".join(SEVERITY_NAMES)
            raise ValueError(f"unknown severity {text!r}; choose one of: {choices}") from None

    @property
    def label(self) -> str:
        """Lower-case name: ``error``, ``warning`` or ``info``."""
        return self.name.lower()


@dataclass(frozen=True)
class Finding:
    """One problem found by one rule at one place.

    Attributes
    ----------
    rule_id:
        The rule's stable slug (e.g. ``ground-gap-tight``).
    severity:
        The rule's default severity; ``decide`` may override it.
    message:
        One sentence with the measured value and the limit.
    x_mm, y_mm, layer:
        Where, in board coordinates (Y down), or ``None``/``""``.
    nets, refs:
        Nets and footprint references involved, sorted.
    measured:
        Named measured values and limits, e.g. ``(("gap_mm", 0.21), ("min_mm", 0.5))``.
    sensor:
        Name of the sensor concerned, ``""`` for board-level findings.
    source_line, source_column:
        Where the item concerned starts in the board file (1-based), for
        annotations on the file (SARIF); ``None`` when unknown.
    """

    rule_id: str
    severity: Severity
    message: str
    x_mm: float | None = None
    y_mm: float | None = None
    layer: str = ""
    nets: tuple[str, ...] = ()
    refs: tuple[str, ...] = ()
    measured: tuple[tuple[str, float], ...] = ()
    sensor: str = ""
    source_line: int | None = None
    source_column: int | None = None

    @property
    def key(self) -> FindingKey:
        """Identity that survives re-saves of the board: rule, sensor, nets,
        references (no uuids, no coordinates, no float noise)."""
        return (self.rule_id, self.sensor, self.nets, self.refs)
