"""Finding markers for the board picture: one numbered marker per place.

Several findings often sit at the same spot (an electrode's centre); one
marker per place, coloured by the worst severity there and hollow when none of
them counts for the gate, keeps the picture readable. The legend lists each
place once with its rules.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass

from auditor.decide.records import DecidedFinding
from auditor.rules.finding import Severity

SEVERITY_COLOURS = {Severity.ERROR: "#d62728", Severity.WARNING: "#ff7f0e",
                    Severity.INFO: "#1f77b4"}
LEGEND_PLACES = 30  # more than this and the legend says how many were left out


@dataclass(frozen=True)
class Spot:
    """Findings at one place of the board (``x_mm``/``y_mm`` None: board-level)."""

    number: int
    x_mm: float | None
    y_mm: float | None
    findings: tuple[DecidedFinding, ...]

    @property
    def worst(self) -> Severity:
        """The highest effective severity here."""
        return max(d.severity for d in self.findings)

    @property
    def gating(self) -> bool:
        """True when at least one finding here may fail the run."""
        return any(d.counts_for_gate for d in self.findings)

    def caption(self, max_chars: int = 48) -> str:
        """``SENSOR: rule-a, rule-b ×2`` shortened to ``max_chars``."""
        sensors = sorted({d.finding.sensor for d in self.findings if d.finding.sensor})
        counts = Counter(d.finding.rule_id for d in self.findings)
        rules = ", ".join(r + (f" ×{n}" if n > 1 else "") for r, n in counts.items())
        text = f"{', '.join(sensors) or 'board'}: {rules}"
        return text if len(text) <= max_chars else text[: max_chars - 1] + "…"


def spots(findings: tuple[DecidedFinding, ...]) -> list[Spot]:
    """Group findings by place (to 0.01 mm), numbered in order of appearance;
    board-level findings (no position) come last, unnumbered (0)."""
    places: dict[tuple[float, float], list[DecidedFinding]] = {}
    unplaced: list[DecidedFinding] = []
    for d in findings:
        f = d.finding
        if f.x_mm is None or f.y_mm is None:
            unplaced.append(d)
        else:
            places.setdefault((round(f.x_mm, 2), round(f.y_mm, 2)), []).append(d)
    out = [Spot(i, x, y, tuple(group)) for i, ((x, y), group) in enumerate(places.items(), 1)]
    if unplaced:
        out.append(Spot(0, None, None, tuple(unplaced)))
    return out


def _n(value: float) -> str:
    return f"{value:.3f}".rstrip("0").rstrip(".")


def marker_elements(places: list[Spot], font: float) -> list[str]:
    """SVG circles with numbers, one per placed spot."""
    out = ['<g id="findings">']
    for spot in places:
        if spot.x_mm is None or spot.y_mm is None:
            continue
        colour = SEVERITY_COLOURS[spot.worst]
        fill, ink = (colour, "#ffffff") if spot.gating else ("#ffffff", colour)
        x, y = _n(spot.x_mm), _n(spot.y_mm)
        out.append(f'<circle cx="{x}" cy="{y}" r="{_n(font * 0.6)}" fill="{fill}" '
                   f'stroke="{colour}" stroke-width="{_n(font * 0.15)}"/>')
        out.append(f'<text x="{x}" y="{y}" font-size="{_n(font * 0.7)}" text-anchor="middle" '
                   f'dominant-baseline="central" fill="{ink}" font-weight="bold">'
                   f"{spot.number}</text>")
    return out + ["</g>"]


def legend_lines(places: list[Spot]) -> list[tuple[str, str]]:
    """``(colour, text)`` lines for the legend, at most :data:`LEGEND_PLACES`."""
    lines = [(SEVERITY_COLOURS[s.worst], f"{s.number or '–'}  {s.caption()}")
             for s in places[:LEGEND_PLACES]]
    if len(places) > LEGEND_PLACES:
        lines.append(("#555555", f"… and {len(places) - LEGEND_PLACES} more places "
                                 "(see the text report)"))
    return lines
