"""The precise-mode parts of the terminal report.

* the solve method of each electrode and, for 3-D solves, the quick
  estimate beside it with the change;
* "Pad-to-pad coupling": the strongest electrode pairs, capped at
  :data:`MAX_PAIRS` rows;
* one block per slider or wheel: each segment's ΔC against finger position as
  a sparkline, with the linearity figure, dead zones and reversals.

Layout only: every number comes from :class:`~auditor.model.results.PreciseExtras`
and :class:`~auditor.model.results.PadMetrics`.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from rich.console import Console
from rich.padding import Padding
from rich.table import Table
from rich.text import Text

from auditor.decide.records import Report, SensorResult
from auditor.report.text_fit import print_note

if TYPE_CHECKING:
    from auditor.model.results import CrosstalkPair, PreciseExtras, SegmentScan

#: Rows of the coupling table; the rest is counted on one line.
MAX_PAIRS = 10
#: Widest sparkline; longer scans are binned (each cell the bin's largest ΔC).
MAX_SPARK_CELLS = 60
#: Narrowest sparkline, whatever the terminal width (the grid wraps below it).
MIN_SPARK_CELLS = 12
_SPARKS = "▁▂▃▄▅▆▇█"
_DEAD, _REVERSAL, _PLAIN = "×", "!", "·"


def has_precise_metrics(report: Report) -> bool:
    """True when at least one electrode was solved by the precise method."""
    return any(r.metrics is not None and r.metrics.method != "quick" for r in report.sensors)


def _percent(fraction: float) -> str:
    return f"{fraction * 100:+.1f} %" if math.isfinite(fraction) else "–"


def _change(value: float, quick: float | None) -> str:
    if quick is None or quick == 0:
        return "–"
    return _percent(value / quick - 1.0)


def method_table(console: Console, results: list[SensorResult]) -> None:
    """Each solved electrode's method and, for precise ones, the quick estimate
    beside it. A table of its own: the electrode table is full at 100 columns."""
    solved = [r for r in results if r.metrics is not None]
    precise = sum(1 for r in solved if r.metrics and r.metrics.method != "quick")
    console.print()
    console.print(Text(f"Solve method ({precise} of {len(solved)} solved electrodes precise), "
                       "precise against the quick estimate", style="bold"))
    table = Table(box=None, pad_edge=False, header_style="bold", show_edge=False,
                  collapse_padding=True)
    for name in ("sensor", "method", "Cp total", "quick", "change", "ΔC", "quick", "change"):
        table.add_column(name, justify="left" if name in ("sensor", "method") else "right",
                         no_wrap=True)
    for r in solved:
        m = r.metrics
        assert m is not None
        if m.method == "quick" or m.quick_cp_total_pf is None:
            table.add_row(r.sensor.name, m.method, f"{m.cp_total_pf:.2f}", "", "",
                          f"{m.delta_c_pf:.3f}", "", "")
            continue
        quick_delta = "–" if m.quick_delta_c_pf is None else f"{m.quick_delta_c_pf:.3f}"
        table.add_row(r.sensor.name, m.method, f"{m.cp_total_pf:.2f}",
                      f"{m.quick_cp_total_pf:.2f}", _change(m.cp_total_pf, m.quick_cp_total_pf),
                      f"{m.delta_c_pf:.3f}", quick_delta,
                      _change(m.delta_c_pf, m.quick_delta_c_pf))
    console.print(table)
    print_note(console, "precise: 3-D solve of the real copper; quick: the pad as a disk "
                       "(axisymmetric)")
    _reasons(console, solved)


def _reasons(console: Console, solved: list[SensorResult]) -> None:
    """Why each model answered, and why a precise one has no quick estimate
    beside it; electrodes with the same reason on one line."""
    by_reason: dict[str, list[str]] = {}
    for r in solved:
        if r.metrics is not None and r.metrics.method_reason:
            by_reason.setdefault(r.metrics.method_reason, []).append(r.sensor.name)
    missing: dict[str, list[str]] = {}
    for r in solved:
        if r.metrics is not None and r.metrics.quick_missing:
            missing.setdefault(r.metrics.quick_missing, []).append(r.sensor.name)
    for reason, names in by_reason.items():
        print_note(console, f"{', '.join(names)}: {reason}")
    for reason, names in missing.items():
        print_note(console, f"{', '.join(names)}: quick estimate {reason}")


def strongest_pairs(extras: PreciseExtras) -> list[CrosstalkPair]:
    """Every coupled pair, strongest share of a pad's Cp first (then pF, names)."""
    if extras.coupling is None:
        return []
    return sorted(extras.coupling.pairs(),
                  key=lambda p: (-p.worst_fraction, -p.crosstalk_pf, p.first, p.second))


def _coupling(console: Console, extras: PreciseExtras) -> None:
    pairs = strongest_pairs(extras)
    if extras.coupling is None or not pairs:
        return
    console.print()
    console.print(Text(f"Pad-to-pad coupling ({len(pairs)} pair{'s' if len(pairs) != 1 else ''}"
                       f", {extras.coupling.cell_mm:g} mm cells), largest share of a Cp first",
                       style="bold"))
    table = Table(box=None, pad_edge=False, header_style="bold", show_edge=False,
                  collapse_padding=True)
    for name, justify in (("pair", "left"), ("crosstalk pF", "right"),
                          ("% of first Cp", "right"), ("% of second Cp", "right")):
        table.add_column(name, justify=justify, no_wrap=True)  # type: ignore[arg-type]
    for pair in pairs[:MAX_PAIRS]:
        table.add_row(f"{pair.first} – {pair.second}", f"{pair.crosstalk_pf:.3f}",
                      f"{pair.fraction_of_first * 100:.2f} %",
                      f"{pair.fraction_of_second * 100:.2f} %")
    console.print(table)
    if len(pairs) > MAX_PAIRS:
        console.print(f"  … {len(pairs) - MAX_PAIRS} more pairs, weaker (see --format json)")
    print_note(console, "crosstalk in pF with every other electrode held at ground; "
                       "shares of each pad's own Cp")


def sparkline(values: list[float], top: float) -> str:
    """One block character per value, full for ``top``, lowest block at or below 0.

    Examples
    --------
    >>> sparkline([0.0, 0.5, 1.0], 1.0)
    '▁▅█'
    """
    out = []
    for value in values:
        share = min(max(value / top, 0.0), 1.0) if top > 0 else 0.0
        out.append(_SPARKS[round(share * (len(_SPARKS) - 1))])
    return "".join(out)


def binned(count: int, cells: int = MAX_SPARK_CELLS) -> list[range]:
    """Split ``count`` scan positions into at most ``cells`` consecutive bins."""
    bins = min(count, cells)
    edges = [round(k * count / bins) for k in range(bins + 1)]
    return [range(edges[k], edges[k + 1]) for k in range(bins)]


def _marks(scan: SegmentScan, bins: list[range]) -> str:
    def inside(position: float) -> bool:
        return any(lo - 1e-9 <= position <= hi + 1e-9 for lo, hi in scan.dead_zones_mm)

    reversal = {round(p, 6) for p in scan.reversals_mm}
    out = []
    for cell in bins:
        positions = [scan.positions_mm[n] for n in cell]
        if any(round(p, 6) in reversal for p in positions):
            out.append(_REVERSAL)
        elif any(inside(p) for p in positions):
            out.append(_DEAD)
        else:
            out.append(_PLAIN)
    return "".join(out)


def _ranges(zones: tuple[tuple[float, float], ...]) -> str:
    return ", ".join(f"{lo:.1f}–{hi:.1f} mm" for lo, hi in zones) if zones else "none"


def _peak(scan: SegmentScan, segment: int) -> str:
    peak = max(range(len(scan.positions_mm)), key=lambda n: scan.delta_pf[n][segment])
    return (f"peak {scan.delta_pf[peak][segment]:.3f} pF at "
            f"{scan.positions_mm[peak]:.1f} mm")


def _spark_cells(console: Console, scan: SegmentScan, peaks: list[str]) -> int:
    """Sparkline cells that leave room for the names and peaks on one line
    (at least :data:`MIN_SPARK_CELLS`, at most :data:`MAX_SPARK_CELLS`)."""
    names = max([len("marks"), *(len(n) for n in scan.segment_names)]) + 2
    beside = max([len(p) for p in peaks] + [len(f"{_DEAD} dead zone, {_REVERSAL} reversal")])
    room = console.width - names - beside - 4  # two gaps of two columns
    return max(MIN_SPARK_CELLS, min(MAX_SPARK_CELLS, room))


def _scan_block(console: Console, scan: SegmentScan) -> None:
    first, last = scan.positions_mm[0], scan.positions_mm[-1]
    console.print()
    console.print(Text(f"{scan.kind.capitalize()} {scan.group}: finger response "
                       f"({len(scan.segment_names)} segments, {len(scan.positions_mm)} "
                       f"positions {first:.1f}–{last:.1f} mm, step {scan.step_mm:.2f} mm)",
                       style="bold"))
    linearity = (f"{scan.linearity_mm:.2f} mm" if math.isfinite(scan.linearity_mm)
                 else "not measurable")
    reversals = (", ".join(f"{p:.1f} mm" for p in scan.reversals_mm)
                 if scan.reversals_mm else "none")
    console.print(Padding(f"linearity (worst position error) {linearity} · dead zones "
                          f"{_ranges(scan.dead_zones_mm)} · reversals {reversals}", (0, 0, 0, 2)))
    peaks = [_peak(scan, i) for i in range(len(scan.segment_names))]
    bins = binned(len(scan.positions_mm), _spark_cells(console, scan, peaks))
    top = max((max(row) for row in scan.delta_pf if row), default=0.0)
    grid = Table.grid(padding=(0, 2))
    for _ in range(3):
        grid.add_column(no_wrap=True)
    for i, name in enumerate(scan.segment_names):
        series = [max(scan.delta_pf[n][i] for n in cell) for cell in bins]
        grid.add_row(f"  {name}", sparkline(series, top), peaks[i])
    grid.add_row("  marks", Text(_marks(scan, bins), style="dim"),
                 Text(f"{_DEAD} dead zone, {_REVERSAL} reversal", style="dim"))
    console.print(grid)
    print_note(console, f"ΔC against finger position along the {scan.kind}; a full block is "
                       f"{top:.3f} pF")


def render_precise_sections(console: Console, report: Report,
                            results: list[SensorResult]) -> None:
    """Method table (when any pad was solved in 3-D), coupling and slider/wheel
    blocks; nothing for a quick run."""
    if has_precise_metrics(report):
        method_table(console, results)
    extras = report.precise
    if extras is None:
        return
    _coupling(console, extras)
    for scan in extras.scans:
        if scan.positions_mm and scan.segment_names:
            _scan_block(console, scan)
