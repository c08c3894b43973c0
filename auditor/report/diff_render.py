"""Back-ends for a :class:`~auditor.decide.diff.ReportDiff`: text, json, markdown."""

from __future__ import annotations

import io
from typing import Any, TextIO

from rich.console import Console
from rich.text import Text

from auditor.decide.diff import PadChange, ReportDiff
from auditor.decide.records import DecidedFinding
from auditor.decide.summary import summarize_diff
from auditor.report.as_json import dumps
from auditor.report.rounding import significant
from auditor.report.summary_line import summary_text
from auditor.report.text_fit import (
    Cell,
    Column,
    fitted_table,
    print_blocks,
    print_note,
    stream_width,
)

DIFF_FORMATS: tuple[str, ...] = ("text", "json", "markdown")
DIFF_SCHEMA_VERSION = 1
_FILE_WIDTH = 120  # columns when writing to a file or pipe
_FIELDS = (("cp_total_pf", "Cp total pF"), ("delta_c_pf", "ΔC pF"), ("delta_ratio", "ΔC/Cp"))


def _pct(value: float | None) -> str:
    return "n/a" if value is None else f"{value:+.1f} %"


def _value(change: PadChange, field: str, side: str) -> str:
    metrics = change.old if side == "old" else change.new
    if metrics is None:
        return "–"
    number = getattr(metrics, field)
    return f"{number * 100:.2f}%" if field == "delta_ratio" else f"{number:.3f}" if abs(number) < 1 else f"{number:.2f}"


def _cell(change: PadChange, field: str) -> str:
    return (f"{_value(change, field, 'old')} → {_value(change, field, 'new')} "
            f"({_pct(change.change_pct(field))})")


def _flag(change: PadChange, diff: ReportDiff) -> str:
    if change.ratio_loss > diff.max_ratio_loss:
        return f"lost {change.ratio_loss * 100:.1f} % (> {diff.max_ratio_loss * 100:.0f} %)"
    return change.status if change.status != "compared" else ""


def _finding_line(d: DecidedFinding) -> str:
    f = d.finding
    who = f" {f.sensor}" if f.sensor else ""
    return f"{d.severity.label} {f.rule_id}{who}: {f.message}"


#: Short headers for narrow terminals (units then in the note under the table).
_SHORT = {"Cp total pF": "Cp", "ΔC pF": "ΔC"}


def _pad_table(console: Console, diff: ReportDiff) -> None:
    """Old → new per pad and field, as a table when it fits, else one block per pad."""
    columns = [Column("sensor")]
    for _, title in _FIELDS:
        columns += [Column(title, _SHORT.get(title, title)), Column("", justify="right")]
    columns.append(Column("note"))
    rows: list[list[Cell]] = []
    for change in diff.pads:
        cells: list[Cell] = [change.name]
        for field, _ in _FIELDS:
            cells += [f"{_value(change, field, 'old')} → {_value(change, field, 'new')}",
                      _pct(change.change_pct(field))]
        flag = _flag(change, diff)
        rows.append(cells + [Text(flag, style="bold red" if change in diff.losing else "dim")])
    table = fitted_table(console, columns, rows)
    if table is not None:
        console.print(table)
        if table.columns[1].header != columns[1].header:
            print_note(console, "Cp total and ΔC in pF")
        return
    block_columns = [Column("sensor")] + [Column(t) for _, t in _FIELDS] + [Column("note")]
    print_blocks(console, block_columns,
                 [[r[0], *(f"{r[i]} ({r[i + 1]})" for i in (1, 3, 5)), r[7]] for r in rows])


def render_diff_text(diff: ReportDiff, stream: TextIO, colour: bool,
                     width: int | None = None, closing: bool = True) -> None:
    """Write the comparison for people, ``width`` columns wide (``None``:
    the terminal's width, or 120 when not writing to one); ``closing=False``
    leaves out the verdict line for a caller that prints one for the whole run."""
    if width is None:
        width = stream_width(stream, _FILE_WIDTH)
    buffer = io.StringIO()
    console = Console(file=buffer, force_terminal=colour, no_color=not colour,
                      color_system="standard" if colour else None, highlight=False,
                      emoji=False, markup=False, width=width)
    console.print(Text(f"padaudit diff: {diff.old_label} → {diff.new_label}", style="bold"))
    _pad_table(console, diff)
    for title, items in (("New findings", diff.new_findings),
                         ("Fixed findings", diff.fixed_findings)):
        console.print()
        console.print(Text(f"{title} ({len(items)})", style="bold"))
        for d in items:
            console.print(f"  - {_finding_line(d)}")
    unsolved = [p.name for p in diff.pads if p.status == "unsolved"]
    if unsolved:
        console.print()
        console.print(Text(f"Not compared ({len(unsolved)}): no field solve on one side or "
                           f"both: {', '.join(unsolved)}", style="yellow"))
    if closing:
        console.print()
        console.print(summary_text(summarize_diff(diff)))
    stream.write("".join(line.rstrip() + "\n" for line in buffer.getvalue().splitlines()))


def _pad_doc(change: PadChange) -> dict[str, Any]:
    doc: dict[str, Any] = {"name": change.name, "status": change.status,
                           "ratio_loss": significant(change.ratio_loss)}
    for field, _ in _FIELDS + (("cp_pad_pf", ""), ("cp_trace_pf", "")):
        doc[field] = {
            "old": significant(getattr(change.old, field)) if change.old else None,
            "new": significant(getattr(change.new, field)) if change.new else None,
            "change_pct": significant(change.change_pct(field)),
        }
    return doc


def _finding_doc(d: DecidedFinding) -> dict[str, Any]:
    f = d.finding
    return {"rule_id": f.rule_id, "severity": d.severity.label, "sensor": f.sensor,
            "nets": list(f.nets), "refs": list(f.refs), "message": f.message,
            "counts_for_gate": d.counts_for_gate}


def diff_document(diff: ReportDiff) -> dict[str, Any]:
    """The comparison as JSON-ready data."""
    return {
        "diff_schema_version": DIFF_SCHEMA_VERSION, "old": diff.old_label, "new": diff.new_label,
        "max_ratio_loss": significant(diff.max_ratio_loss), "fail_on": diff.fail_on.label,
        "pads": [_pad_doc(p) for p in diff.pads],
        "losing": [p.name for p in diff.losing],
        "not_compared": [p.name for p in diff.pads if p.status == "unsolved"],
        "new_findings": [_finding_doc(d) for d in diff.new_findings],
        "fixed_findings": [_finding_doc(d) for d in diff.fixed_findings],
        "exit_code": diff.exit_code,
    }


def render_diff_markdown(diff: ReportDiff, stream: TextIO) -> None:
    """Write the comparison as a pull-request comment."""
    verdict = "**fail**" if diff.exit_code else "**pass**"
    out = [f"### padaudit diff: {verdict} · `{diff.old_label}` → `{diff.new_label}`", "",
           "| sensor | Cp total pF | ΔC pF | ΔC/Cp | |", "|---|---|---|---|---|"]
    for change in diff.pads:
        out.append(f"| {change.name} | " + " | ".join(_cell(change, f) for f, _ in _FIELDS)
                   + f" | {_flag(change, diff)} |")
    for title, items in (("New findings", diff.new_findings),
                         ("Fixed findings", diff.fixed_findings)):
        if items:
            out += ["", f"**{title}**", ""] + [f"- {_finding_line(d)}" for d in items]
    stream.write("\n".join(out) + "\n")


def render_diff(diff: ReportDiff, fmt: str, stream: TextIO, colour: bool = False,
                closing: bool = True) -> None:
    """Write ``diff`` in ``fmt`` (one of :data:`DIFF_FORMATS`); ``closing``
    as for :func:`render_diff_text`."""
    if fmt == "json":
        stream.write(dumps(diff_document(diff)))
    elif fmt == "markdown":
        render_diff_markdown(diff, stream)
    elif fmt == "text":
        render_diff_text(diff, stream, colour, closing=closing)
    else:
        raise ValueError(f"unknown format {fmt!r}; choose one of: {', '.join(DIFF_FORMATS)}")
