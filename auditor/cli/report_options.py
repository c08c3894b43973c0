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
from collections.abc import Callable, Mapping
from pathlib import Path
from typing import TYPE_CHECKING, TextIO

from auditor.cli.audit_runner import AuditFn, auditor_for, shown_as
from auditor.cli.colour import COLOUR_CHOICES, use_colour
from auditor.cli.confirm import confirm_written
from auditor.cli.outputs import (
    require_value,
    stdout_may_close,
    write_output,
    written_to_stdout,
)
from auditor.decide.records import Report
from auditor.decide.summary import summarize
from auditor.report.render import FORMATS, render
from auditor.report.summary_line import render_summary
from auditor.report.text import ORDERS

if TYPE_CHECKING:  # the comparison is loaded only for --against
    from auditor.decide.diff import ReportDiff


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
                       help="no progress bar, no 'wrote FILE' lines, and no verdict line "
                            "unless the text report is on the terminal")
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


def _write_baseline(report: Report, args: argparse.Namespace, quiet: bool) -> None:
    """Record the report's findings (the audit accepted them all already)."""
    # Imported here, as the picture and the diff below: most runs use none
    # of them, and every import costs start-up time.
    from auditor.decide.baseline import Baseline, dumps

    baseline = Baseline.of(report.findings)
    write_output("--write-baseline", args.write_baseline, dumps(baseline),
                 _inputs(report, args))
    entries = len(baseline.counts)
    confirm_written(args.write_baseline, f"{entries} entr{'y' if entries == 1 else 'ies'}",
                    quiet=quiet)


def _write_svg(report: Report, args: argparse.Namespace, quiet: bool) -> None:
    from auditor.report.svg import to_svg

    write_output("--svg", args.svg, to_svg(_with_board(report)), _inputs(report, args))
    confirm_written(args.svg, quiet=quiet)


def _with_board(report: Report) -> Report:
    """The report with its board for the picture. The audit attaches it;
    when it has not, read the file again (the picture is then still complete)."""
    if report.board is not None or not Path(report.info.board_path).is_file():
        return report
    from auditor.read import read_board

    return dataclasses.replace(report, board=read_board(report.info.board_path))


def _against(report: Report, args: argparse.Namespace, audit: AuditFn | None) -> ReportDiff:
    from auditor.decide.diff import compare_reports
    from auditor.gitrev import board_at, locate

    audit = audit or auditor_for(args)
    board = report.info.board_path
    with board_at(board, args.against) as old_copy:
        old = shown_as(audit(str(old_copy)), f"{args.against}:{locate(board).path}",
                       old_copy, f"{args.against}:{{}}")
    return compare_reports(old, report)


def _write_outputs(report: Report, args: argparse.Namespace) -> None:
    """The files asked for: baseline, picture, report; each confirmed on stderr."""
    quiet = bool(getattr(args, "quiet", False))
    if getattr(args, "write_baseline", None):
        _write_baseline(report, args, quiet)
    if getattr(args, "svg", None):
        _write_svg(report, args, quiet)
    if getattr(args, "output", None):
        import io

        buffer = io.StringIO()
        render(report, getattr(args, "format", "text"), buffer, False,
               order=getattr(args, "order", "weakest"))
        write_output("--output", args.output, buffer.getvalue(), _inputs(report, args))
        confirm_written(args.output, quiet=quiet)


def emit(report: Report, args: argparse.Namespace, *, audit: AuditFn | None = None,
         stdout: TextIO | None = None, env: Mapping[str, str] | None = None,
         demo: bool = False, before_verdict: Callable[[int], None] | None = None) -> int:
    """Write the baseline file and every requested output, end with the
    run's one verdict line, and return the exit code that line states.

    Parameters
    ----------
    report:
        What the audit decided (baseline applied, :func:`auditor.audit.run_audit`).
    args:
        Parsed options from :func:`add_report_options` (missing ones default).
    audit:
        For ``--against``: how to audit the old board (default: the audit
        with the same options).
    demo:
        The bundled demo: the verdict line says the demo exits 0 (the
        caller returns that) and what an audit would return.
    before_verdict:
        Called with the exit code just before the verdict line after a text
        report on stdout, for a caller's own closing words (the verdict line
        stays the run's last).

    Notes
    -----
    The verdict line goes to stdout after a text report there, else to stdout
    when the report went to ``--output``, else (a machine format on stdout)
    to stderr; ``-q`` leaves it out except after a text report on stdout.
    """
    out = stdout or sys.stdout
    environment = os.environ if env is None else env
    fmt = getattr(args, "format", "text")
    colour = use_colour(getattr(args, "color", "auto"), out, environment)
    _check_values(args)
    against = getattr(args, "against", None)
    if against:
        from auditor.gitrev import check_board_at

        check_board_at(report.info.board_path, against)
    _write_outputs(report, args)
    on_stdout = not getattr(args, "output", None)
    text_here = on_stdout and fmt == "text"
    if on_stdout:
        written_to_stdout(lambda: render(report, fmt, out, colour and text_here,
                                         order=getattr(args, "order", "weakest"),
                                         closing=False))
    diff = _against(report, args, audit) if against else None
    aside = out if fmt == "text" else sys.stderr
    if diff is not None:
        from auditor.report.diff_render import render_diff

        with stdout_may_close():
            aside.write("\n")
            render_diff(diff, "text", aside, colour and aside is out, closing=False)
    summary = dataclasses.replace(summarize(report, diff), demo=demo)
    with stdout_may_close():
        if text_here:
            if before_verdict is not None:
                before_verdict(summary.exit_code)
            out.write("\n")
            render_summary(summary, out, colour)
        elif not getattr(args, "quiet", False):
            render_summary(summary, out if not on_stdout else sys.stderr)
    return summary.exit_code


__all__ = ["add_report_options", "emit"]
