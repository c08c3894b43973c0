"""Report options shared by commands that produce a report, and the one
function that writes it and picks the exit code.

``cmd_audit`` calls :func:`add_report_options` on its parser and ends with
``return emit(report, args)``.
"""

from __future__ import annotations

import argparse
import dataclasses
import os
import sys
from collections.abc import Mapping
from pathlib import Path
from typing import TextIO

from auditor.cli.audit_runner import AuditFn, auditor_for, shown_as
from auditor.cli.colour import COLOUR_CHOICES, use_colour
from auditor.cli.outputs import (
    require_value,
    stdout_may_close,
    write_output,
    written_to_stdout,
)
from auditor.decide.records import Report
from auditor.report.render import FORMATS, render
from auditor.report.text import ORDERS


def add_report_options(parser: argparse.ArgumentParser) -> None:
    """Add ``--format``, ``--output``, ``--svg``, ``--color``, ``--quiet``,
    ``--order``, ``--baseline``, ``--write-baseline`` and ``--against``."""
    group = parser.add_argument_group("report")
    group.add_argument("--format", choices=FORMATS, default="text",
                       help="report format (default: text)")
    group.add_argument("--output", metavar="FILE",
                       help="write the report to FILE instead of stdout (written even when "
                            "the run fails)")
    group.add_argument("--svg", metavar="FILE", help="also draw the board with its "
                       "electrodes and findings to FILE (SVG)")
    group.add_argument("--color", "--colour", dest="color", choices=COLOUR_CHOICES,
                       default="auto", help="colour in the terminal report (default: auto)")
    group.add_argument("-q", "--quiet", action="store_true",
                       help="no progress bar, and no summary line when the report goes to --output")
    group.add_argument("--order", choices=ORDERS, default="weakest",
                       help="electrode table order: weakest first or by rank")
    gate = parser.add_argument_group("gate")
    either = gate.add_mutually_exclusive_group()
    either.add_argument("--baseline", metavar="FILE",
                        help="accept the findings recorded in FILE; only new ones fail")
    either.add_argument("--write-baseline", metavar="FILE",
                        help="record every current finding in FILE (then nothing recorded "
                             "fails)")
    gate.add_argument("--against", metavar="REV",
                      help="also compare with the board at git revision REV; fail when a pad "
                           "loses more than the profile's max_ratio_loss of its ratio")


def _inputs(report: Report, args: argparse.Namespace) -> tuple[str, ...]:
    """The boards this run read: no output may land on one of them."""
    return tuple(p for p in (getattr(args, "board", None), report.info.board_path) if p)


def _check_values(args: argparse.Namespace) -> None:
    for option in ("output", "svg", "baseline", "write_baseline", "against"):
        require_value("--" + option.replace("_", "-"), getattr(args, option, None))


def _write_baseline(report: Report, args: argparse.Namespace) -> None:
    """Record the report's findings (the audit accepted them all already)."""
    # Imported here, as the picture and the diff below: most runs use none
    # of them, and every import costs start-up time.
    from auditor.decide.baseline import Baseline, dumps

    write_output("--write-baseline", args.write_baseline, dumps(Baseline.of(report.findings)),
                 _inputs(report, args))


def _with_board(report: Report) -> Report:
    """The report with its board for the picture. The audit attaches it;
    when it has not, read the file again (the picture is then still complete)."""
    if report.board is not None or not Path(report.info.board_path).is_file():
        return report
    from auditor.read import read_board

    return dataclasses.replace(report, board=read_board(report.info.board_path))


def _against(report: Report, args: argparse.Namespace, audit: AuditFn | None,
             stdout: TextIO, colour: bool) -> int:
    from auditor.decide.diff import compare_reports
    from auditor.gitrev import board_at, locate
    from auditor.report.diff_render import render_diff

    audit = audit or auditor_for(args)
    board = report.info.board_path
    with board_at(board, args.against) as old_copy:
        old = shown_as(audit(str(old_copy)), f"{args.against}:{locate(board).path}")
    diff = compare_reports(old, report)
    with stdout_may_close():
        stdout.write("\n")
        render_diff(diff, "text", stdout, colour)
    return diff.exit_code


def emit(report: Report, args: argparse.Namespace, *, audit: AuditFn | None = None,
         stdout: TextIO | None = None, env: Mapping[str, str] | None = None) -> int:
    """Write the baseline file and every requested output, return the exit code.

    Parameters
    ----------
    report:
        What the audit decided (baseline applied, :func:`auditor.audit.run_audit`).
    args:
        Parsed options from :func:`add_report_options` (missing ones default).
    audit:
        For ``--against``: how to audit the old board (default: the audit
        with the same options).
    """
    out = stdout or sys.stdout
    environment = os.environ if env is None else env
    fmt, order = getattr(args, "format", "text"), getattr(args, "order", "weakest")
    colour = use_colour(getattr(args, "color", "auto"), out, environment)
    _check_values(args)
    if getattr(args, "against", None):
        from auditor.gitrev import check_board_at

        check_board_at(report.info.board_path, args.against)
    if getattr(args, "write_baseline", None):
        _write_baseline(report, args)
    if getattr(args, "svg", None):
        from auditor.report.svg import to_svg

        write_output("--svg", args.svg, to_svg(_with_board(report)), _inputs(report, args))
    if getattr(args, "output", None):
        import io

        buffer = io.StringIO()
        render(report, fmt, buffer, False, order=order)
        write_output("--output", args.output, buffer.getvalue(), _inputs(report, args))
        if not getattr(args, "quiet", False):
            written_to_stdout(lambda: out.write(summary_line(report, args.output) + "\n"))
    else:
        written_to_stdout(lambda: render(report, fmt, out, colour and fmt == "text",
                                         order=order))
    code = report.exit_code
    if getattr(args, "against", None):
        code = max(code, _against(report, args, audit, out if fmt == "text" else sys.stderr,
                                  colour))
    return code


def summary_line(report: Report, written_to: str) -> str:
    """One line for the terminal when the report went to a file."""
    failing = len(report.failing)
    state = "FAIL" if report.exit_code else "PASS"
    if report.read_warnings:
        state += f" (incomplete: {len(report.read_warnings)} item(s) skipped while reading)"
    return (f"padaudit: {state}: {len(report.sensors)} electrode(s), "
            f"{len(report.findings)} finding(s), {failing} failing; report in {written_to}")


__all__ = ["add_report_options", "emit", "summary_line"]
