"""Finding markers for the board picture: one numbered marker per place.

Several findings often sit at the same spot (an electrode's centre); one
marker per place, coloured by the worst severity there and hollow when none of
them counts for the gate, keeps the picture readable. The legend lists each
place once with its rules.
"""

from __future__ import annotations

import textwrap
from collections import Counter
from dataclasses import dataclass

from auditor.decide.records import DecidedFinding
from auditor.report.svg_shapes import number
from auditor.rules.finding import Severity

SEVERITY_COLOURS = {Severity.ERROR: "#d62728", Severity.WARNING: "#ff7f0e",
                    Severity.INFO: "#1f77b4"}
LEGEND_PLACES = 30  # more than this and the legend says how many were left out
CAPTION_CHARS = 50  # a longer caption wraps onto more lines, never cut


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

    def caption(self) -> str:
        """``SENSOR: rule-a, rule-b ×2``, whole (the legend wraps it)."""
        sensors = sorted({d.finding.sensor for d in self.findings if d.finding.sensor})
        counts = Counter(d.finding.rule_id for d in self.findings)
        # a no-break space keeps "×2" with its rule when the legend wraps
        rules = ", ".join(r + (f"\u00a0×{n}" if n > 1 else "") for r, n in counts.items())
        return f"{', '.join(sensors) or 'board'}: {rules}"


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


_n = number


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
    lines = []
    for spot in places[:LEGEND_PLACES]:
        wrapped = textwrap.wrap(spot.caption(), CAPTION_CHARS, break_long_words=False,
                                break_on_hyphens=False,
                                subsequent_indent="\u00a0" * 4)  # SVG folds plain spaces
        head = f"{spot.number or '–'}  "
        lines += [(SEVERITY_COLOURS[spot.worst], (head if i == 0 else "") + text)
                  for i, text in enumerate(wrapped)]
    if len(places) > LEGEND_PLACES:
        lines.append(("#555555", f"… and {len(places) - LEGEND_PLACES} more places "
                                 "(see the text report)"))
    return lines
