"""``padaudit diff OLD NEW``: compare two boards (files, or ``REV:path``).

Per pad: the change of Cp, ΔC and ΔC/Cp in percent; the findings that are
new and the ones that were fixed. Exit 1 when a pad loses more than
``max_ratio_loss`` (profile; ``--max-ratio-loss`` overrides) of its ratio or
a new finding fails the gate.
"""

from __future__ import annotations

import argparse
import contextlib
import io
import os
import sys
from collections.abc import Iterator
from pathlib import Path

from auditor.cli.audit_runner import AuditFn, auditor_for, shown_as
from auditor.cli.colour import COLOUR_CHOICES, use_colour
from auditor.cli.confirm import confirm_written
from auditor.cli.options import add_fail_on, add_profile
from auditor.cli.outputs import (
    refuse_inputs,
    require_value,
    write_output,
    written_to_stdout,
)
from auditor.decide.diff import compare_reports
from auditor.decide.records import Report
from auditor.decide.summary import summarize_diff
from auditor.errors import UsageError
from auditor.report.diff_render import DIFF_FORMATS, render_diff
from auditor.report.summary_line import render_summary


def _fraction(text: str) -> float:
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"not a number: {text!r}") from None
    if not 0.0 <= value <= 1.0:
        raise argparse.ArgumentTypeError(f"{text}: give a fraction from 0 to 1 (0.2 = 20 %)")
    return value


def register(subparsers: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """Add the ``diff`` sub-command."""
    parser = subparsers.add_parser(
        "diff", help="compare two boards or revisions pad by pad",
        description="Compare two boards pad by pad. Each side is a .kicad_pcb file or "
                    "REV:path for the board at a git revision (e.g. HEAD~1:panel.kicad_pcb).")
    parser.add_argument("old", metavar="OLD")
    parser.add_argument("new", metavar="NEW")
    parser.add_argument("--max-ratio-loss", type=_fraction, metavar="FRACTION",
                        help="fail when a pad loses more than this share of its ΔC/Cp "
                             "(default: the profile's max_ratio_loss)")
    parser.add_argument("--format", choices=DIFF_FORMATS, default="text")
    parser.add_argument("--output", metavar="FILE", help="write the comparison to FILE")
    parser.add_argument("--color", "--colour", dest="color", choices=COLOUR_CHOICES,
                        default="auto")
    parser.add_argument("--config", metavar="FILE",
                        help="configuration file for both sides instead of searching for one")
    add_profile(parser, "rule profile used for both sides")
    add_fail_on(parser, "severity at which a new finding fails (default: configuration, "
                        "else error)")


@contextlib.contextmanager
def _side(spec: str) -> Iterator[tuple[str, str, Path | None]]:
    """Yield ``(path to audit, label, temporary copy or None)`` for ``FILE``
    or ``REV:path`` (the path relative to the current folder, as for the
    file case)."""
    if Path(spec).is_file():
        yield spec, spec, None
        return
    rev, sep, path = spec.partition(":")
    if not sep or not rev or not path:
        raise UsageError(f"{spec}: no such file (for a git revision write REV:path)")
    from auditor.gitrev import board_at

    with board_at(path, rev) as copy:
        yield str(copy), spec, copy


def _audited(audit: AuditFn, spec: str) -> Report:
    with _side(spec) as (path, label, copy):
        rev = label.partition(":")[0] if copy is not None else ""
        return shown_as(audit(path), label, copy, f"{rev}:{{}}")


def run(args: argparse.Namespace) -> int:
    """Run ``padaudit diff``."""
    for name, side in (("OLD", args.old), ("NEW", args.new)):
        require_value(name, side)
    require_value("--output", args.output)
    boards = [args.old, args.new] + [side.partition(":")[2] for side in (args.old, args.new)]
    if args.output:  # refused before two audits, not after
        refuse_inputs("--output", args.output, boards)
    audit = auditor_for(args)
    diff = compare_reports(_audited(audit, args.old), _audited(audit, args.new),
                           args.max_ratio_loss)
    summary = summarize_diff(diff)
    if args.output:
        buffer = io.StringIO()
        render_diff(diff, args.format, buffer)
        write_output("--output", args.output, buffer.getvalue(), boards)
        confirm_written(args.output)
        written_to_stdout(lambda: render_summary(summary, sys.stdout))
    else:
        colour = use_colour(args.color, sys.stdout, os.environ) and args.format == "text"
        written_to_stdout(lambda: render_diff(diff, args.format, sys.stdout, colour))
        if args.format != "text":  # stdout holds the document: the verdict goes aside
            render_summary(summary, sys.stderr)
    return summary.exit_code
