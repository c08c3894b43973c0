"""The electrode table of the terminal report.

One row per electrode: rank, name, reference, kind, area, the capacitances,
ΔC and ΔC/Cp with a bar, the signal strength and the verdict (the worst
finding on the electrode). It fits the console's width as
:mod:`auditor.report.text_fit` describes: the bar goes first, then the long
headers, then the table becomes one block per electrode.
"""

from __future__ import annotations

from rich.console import Console
from rich.text import Text

from auditor.decide.records import Report, SensorResult
from auditor.report.text_fit import Cell, Column, fitted_table, print_blocks, print_note
from auditor.report.verdicts import electrode_verdicts
from auditor.sensors.model import name_order

ORDERS: tuple[str, ...] = ("weakest", "rank")
_BAR_CELLS = 10
_EIGHTHS = " ▏▎▍▌▋▊▉█"
_STRENGTH_STYLE = {"ok": "green", "weak": "yellow", "fail": "bold red", "unsolved": "magenta"}
_VERDICT_STYLE = {"ok": "green", "waived": "dim", "warning": "yellow", "error": "bold red",
                  "unsolved": "magenta"}
_NOTE = ("capacitances in pF; ΔC is the change under a finger; signal: ΔC against the "
         "profile's limits; verdict: the worst finding on the electrode")
_SHORT_NOTE = ("pad, trace, Cp: the pad's, the trace's and the total capacitance in pF; "
               "ΔC is the change under a finger; sig: ΔC against the profile's limits; "
               "verdict: the worst finding on the electrode")

def ratio_bar(ratio: float, best_ratio: float, cells: int = _BAR_CELLS) -> str:
    """A bar ``cells`` wide, full for ``best_ratio``, in eighth-cell steps.

    Examples
    --------
    >>> ratio_bar(0.5, 1.0, cells=4)
    '██  '
    """
    if best_ratio <= 0 or ratio <= 0:
        return " " * cells
    eighths = round(min(ratio / best_ratio, 1.0) * cells * 8)
    full, rest = divmod(eighths, 8)
    bar = "█" * full + (_EIGHTHS[rest] if rest else "")
    return bar.ljust(cells)


def ordered_sensors(sensors: tuple[SensorResult, ...], order: str) -> list[SensorResult]:
    """``rank``: most sensitive first; ``weakest``: least sensitive first, with
    unsolved pads (no metrics, nothing known) at the very top."""
    if order not in ORDERS:
        raise ValueError(f"unknown order {order!r}; choose one of: {', '.join(ORDERS)}")
    by_rank = sorted(sensors, key=lambda r: (r.metrics is None, r.rank,
                                             name_order(r.sensor.name)))
    if order == "rank":
        return by_rank
    return sorted(sensors, key=lambda r: (r.metrics is not None, -r.rank,
                                          name_order(r.sensor.name)))


def _pf(value: float) -> str:
    return f"{value:.2f}" if abs(value) >= 0.1 else f"{value:.3f}"


def _ref_or_net(r: SensorResult) -> str:
    """The first reference, else the first net: how to find the pad in KiCad."""
    s = r.sensor
    return (s.refs[0] if s.refs else s.nets[0] if s.nets else "") + (
        "…" if len(s.refs) > 1 else "")


#: The electrode table's columns; short headers are used when the full ones
#: do not fit (the footnote then spells them out).
_SENSOR_COLUMNS = (
    Column("rank", "#", "right"), Column("sensor"), Column("ref/net", "ref"),
    Column("kind"), Column("area mm²", "mm²", "right"), Column("Cp pad", "pad", "right"),
    Column("Cp trace", "trace", "right"), Column("Cp total", "Cp", "right"),
    Column("ΔC", justify="right"), Column("ΔC/Cp", justify="right"), Column("", bar=True),
    Column("signal", "sig"), Column("verdict"),
)
#: Blocks lead with the name, reference and kind.
_BLOCK_ORDER = (1, 2, 3, 0, 4, 5, 6, 7, 8, 9, 10, 11, 12)


def _sensor_row(r: SensorResult, best: float, verdict: str) -> list[Cell]:
    s, m = r.sensor, r.metrics
    cells: list[Cell] = [str(r.rank) if m else "–", s.name, _ref_or_net(r), s.kind,
                         f"{s.area_mm2:.1f}"]
    if m is None:
        cells += ["–"] * 5 + [""]
    else:
        cells += [_pf(m.cp_pad_pf), _pf(m.cp_trace_pf), _pf(m.cp_total_pf),
                  f"{m.delta_c_pf:.3f}", f"{m.delta_ratio * 100:.2f} %",
                  ratio_bar(m.delta_ratio, best)]
    return cells + [Text(r.strength, style=_STRENGTH_STYLE.get(r.strength, "")),
                    Text(verdict, style=_VERDICT_STYLE.get(verdict, ""))]


def sensor_table(console: Console, report: Report, order: str) -> None:
    """The electrode table, widest shape that fits the console, else blocks."""
    rows = ordered_sensors(report.sensors, order)
    title = "weakest first" if order == "weakest" else "most sensitive first"
    console.print()
    console.print(Text(f"Electrodes ({len(rows)}), {title}", style="bold"))
    if not rows:
        console.print("  no electrodes found: nothing was solved or judged")
        return
    best = max((r.metrics.delta_ratio for r in rows if r.metrics), default=0.0)
    verdicts = electrode_verdicts(report)
    cells = [_sensor_row(r, best, verdicts[r.sensor.name]) for r in rows]
    table = fitted_table(console, _SENSOR_COLUMNS, cells)
    if table is None:
        columns = [_SENSOR_COLUMNS[i] for i in _BLOCK_ORDER]
        print_blocks(console, columns, [[row[i] for i in _BLOCK_ORDER] for row in cells],
                     title_columns=3)
    else:
        console.print(table)
    short = table is not None and table.columns[5].header == _SENSOR_COLUMNS[5].short
    print_note(console, _SHORT_NOTE if short else _NOTE)
