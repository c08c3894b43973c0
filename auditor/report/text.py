"""The terminal report, laid out with rich.

Sections, top to bottom: header, cautions, electrode table, with
``--precise`` the coupling and slider blocks (:mod:`auditor.report.text_precise`),
findings by severity, per-rule counts, notes on the board's structures
(key switches ...), what the reader skipped, stale waivers
and baseline entries, crashed rules, and the closing verdict line. Without colour the
console is built with no colour system, so not one escape code is written.
"""

from __future__ import annotations

import io
from collections import Counter
from typing import TextIO

from rich.console import Console
from rich.table import Table
from rich.text import Text

from auditor.decide.records import DecidedFinding, Report, RuleInfo
from auditor.decide.summary import summarize
from auditor.report.suggestion_view import effect_text
from auditor.report.summary_line import summary_text
from auditor.report.text_electrodes import ORDERS, ordered_sensors, ratio_bar, sensor_table
from auditor.report.text_fit import stream_width
from auditor.report.text_lumped import render_lumped_lines
from auditor.report.text_precise import render_precise_sections
from auditor.rules.finding import Severity

__all__ = ["ORDERS", "ordered_sensors", "ratio_bar", "render_text"]
_FILE_WIDTH = 100  # columns when writing to a file or pipe
_SEVERITY_STYLE = {Severity.ERROR: "bold red", Severity.WARNING: "yellow", Severity.INFO: "cyan"}


def _header(console: Console, report: Report) -> None:
    info = report.info
    console.print(Text(f"padaudit {info.tool_version} · touch electrode audit", style="bold"))
    grid = Table.grid(padding=(0, 2))
    grid.add_column(style="dim")
    grid.add_column()
    grid.add_row("board", f"{info.board_path}  (file format {info.board_version})")
    grid.add_row("config", info.config_path or "none")
    grid.add_row("profile", f"{info.profile}   fail on {info.fail_on.label}")
    grid.add_row("overlay", info.overlay)
    grid.add_row("touch side", info.touch_side)
    grid.add_row("power", info.power)
    console.print(grid)


def _cautions(console: Console, report: Report) -> None:
    if not report.cautions:
        return
    grid = Table.grid(padding=(0, 1))
    grid.add_column(no_wrap=True)
    grid.add_column()
    for caution in report.cautions:
        grid.add_row(Text("CAUTION", style="bold reverse yellow"), caution)
    console.print()
    console.print(grid)


def _where(d: DecidedFinding) -> str:
    f = d.finding
    parts = []
    if f.x_mm is not None and f.y_mm is not None:
        parts.append(f"x {f.x_mm:.2f} mm, y {f.y_mm:.2f} mm")
    if f.layer:
        parts.append(f.layer)
    if f.refs:
        parts.append("refs " + ", ".join(f.refs))
    if f.nets:
        parts.append("nets " + ", ".join(f.nets))
    return " · ".join(parts) if parts else "the whole board"


def _finding_rows(grid: Table, d: DecidedFinding) -> None:
    f = d.finding
    head = Text(f"{f.sensor or 'board'}: ", style="bold")
    head.append(f.message, style="")
    if d.severity != f.severity:
        moved = "raised" if d.severity > f.severity else "lowered"
        head.append(f" ({moved} from {f.severity.label} by the configuration)", style="dim")
    grid.add_row("•", head)
    grid.add_row("", Text(f"at {_where(d)}", style="dim"))
    if d.waived:
        grid.add_row("", Text(f"waived: {d.waived}", style="dim"))
    if d.in_baseline:
        grid.add_row("", Text("in the baseline: accepted earlier, does not fail", style="dim"))
    for suggestion in d.suggestions:
        grid.add_row("try", Text(suggestion.change))
        grid.add_row("", Text(effect_text(suggestion, sep=" · "), style="dim"))


def _rule_block(console: Console, rule_id: str, group: list[DecidedFinding],
                rule: RuleInfo | None, severity: Severity) -> None:
    """One rule's findings: the rule and its fix once, then each finding
    (sensor, message, where)."""
    head = Text("  ")
    head.append(rule_id, style=_SEVERITY_STYLE[severity])
    head.append(f"  ×{len(group)}" if len(group) > 1 else "")
    if rule is not None and rule.title:
        head.append(f"  {rule.title}", style="dim")
    console.print(head)
    grid = Table.grid(padding=(0, 1))
    grid.add_column(no_wrap=True, width=6, justify="right")
    grid.add_column()
    if rule is not None and rule.fix:
        grid.add_row("fix", Text(rule.fix, style="italic"))
    for d in group:
        _finding_rows(grid, d)
    console.print(grid)


def _findings(console: Console, report: Report) -> None:
    rules = {r.rule_id: r for r in report.rules}
    console.print()
    if not report.findings:
        console.print(Text("Findings: none", style="bold"))
        return
    console.print(Text(f"Findings ({len(report.findings)})", style="bold"))
    for severity in sorted(Severity, reverse=True):
        group = [d for d in report.findings if d.severity == severity]
        if not group:
            continue
        console.print(Text(f" {severity.label.upper()} ({len(group)})",
                           style=_SEVERITY_STYLE[severity]))
        by_rule: dict[str, list[DecidedFinding]] = {}
        for d in group:
            by_rule.setdefault(d.finding.rule_id, []).append(d)
        for rule_id, members in by_rule.items():
            _rule_block(console, rule_id, members, rules.get(rule_id), severity)


def _rule_counts(console: Console, report: Report) -> None:
    if not report.findings:
        return
    total = Counter(d.finding.rule_id for d in report.findings)
    failing = Counter(d.finding.rule_id for d in report.failing)
    worst = {rid: max(d.severity for d in report.findings if d.finding.rule_id == rid)
             for rid in total}
    table = Table(box=None, pad_edge=False, header_style="bold", show_edge=False)
    table.add_column("rule")
    table.add_column("worst")
    table.add_column("found", justify="right")
    table.add_column("failing", justify="right")
    for rid in sorted(total, key=lambda r: (-worst[r], r)):
        table.add_row(rid, Text(worst[rid].label, style=_SEVERITY_STYLE[worst[rid]]),
                      str(total[rid]), str(failing[rid]))
    console.print()
    console.print(Text("Per rule", style="bold"))
    console.print(table)


def _listing(console: Console, title: str, lines: tuple[str, ...]) -> None:
    if not lines:
        return
    console.print()
    console.print(Text(title, style="bold"))
    grid = Table.grid(padding=(0, 1))
    grid.add_column(no_wrap=True, width=3, justify="right")
    grid.add_column()
    for line in lines:
        grid.add_row("-", line)
    console.print(grid)


def _result(console: Console, report: Report) -> None:
    console.print()
    console.print(summary_text(summarize(report)))


def render_text(report: Report, stream: TextIO, colour: bool, *, order: str = "weakest",
                width: int | None = None, closing: bool = True) -> None:
    """Write the terminal report to ``stream``.

    Parameters
    ----------
    colour:
        Decided once by the caller; ``False`` writes plain text, no escapes.
    order:
        ``weakest`` (default) or ``rank`` for the electrode table.
    width:
        Columns; ``None`` asks the terminal, or 100 when not writing to one.
    closing:
        End with the verdict line (:mod:`auditor.report.summary_line`);
        ``False`` when the caller prints one line for the whole run.
    """
    if width is None:
        width = stream_width(stream, _FILE_WIDTH)
    buffer = io.StringIO()
    console = Console(file=buffer, force_terminal=colour, no_color=not colour,
                      color_system="standard" if colour else None, highlight=False,
                      emoji=False, markup=False, width=width, soft_wrap=False)
    _header(console, report)
    _cautions(console, report)
    sensor_table(console, report, order)
    render_lumped_lines(console, ordered_sensors(report.sensors, order))
    render_precise_sections(console, report, ordered_sensors(report.sensors, order))
    _findings(console, report)
    _rule_counts(console, report)
    _listing(console, "Notes on the board", report.notes)
    _listing(console, "Skipped or guessed while reading the board", report.read_warnings)
    _listing(console, "Stale waivers (matched nothing)", report.stale_waivers)
    _listing(console, "Stale baseline entries (no longer found)", report.stale_baseline)
    _listing(console, "Rules that crashed (their checks did not run)",
             tuple(f"{rid}: {err}" for rid, err in report.rule_errors))
    if closing:
        _result(console, report)
    # rich pads table rows to full width; trailing blanks only make diffs noisy.
    stream.write("".join(line.rstrip() + "\n" for line in buffer.getvalue().splitlines()))
