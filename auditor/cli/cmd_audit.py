"""``padaudit audit BOARD``: run every check and print the findings.

Exit codes: 0 clean, 1 findings at or above ``--fail-on`` (default error) or
a crashed rule, 2 bad input or usage, 3 internal error.
"""

from __future__ import annotations

import argparse
import dataclasses

from auditor.audit import run_audit
from auditor.cli.audit_runner import gated_options
from auditor.cli.options import (
    add_fail_on,
    add_jobs,
    add_no_suggest,
    add_overlay,
    add_power,
    add_profile,
    add_solve_mode,
    add_touch_side,
)
from auditor.cli.progress import ProgressCallback
from auditor.cli.report_options import add_report_options, emit


def register(subparsers: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """Add the ``audit`` sub-command."""
    parser = subparsers.add_parser(
        "audit", help="check a board's touch electrodes against the layout rules",
        description="Read a KiCad board, find its touch electrodes, check them against the "
                    "profile's rules and report. Options override the configuration file "
                    "([tool.padaudit] in pyproject.toml or padaudit.toml, found by walking "
                    "up from the board's folder).")
    parser.add_argument("board", metavar="BOARD", help="the .kicad_pcb file")
    parser.add_argument("--config", metavar="FILE",
                        help="configuration file to use instead of searching for one")
    add_profile(parser)
    add_overlay(parser)
    add_power(parser)
    add_touch_side(parser)
    add_fail_on(parser, "lowest severity that fails the run (default: error)")
    parser.add_argument("--no-solve", action="store_true",
                        help="skip the field solve: layout rules only, every electrode "
                             "reported unsolved")
    add_solve_mode(parser, "; adds pad-to-pad coupling and slider response")
    add_no_suggest(parser)
    add_jobs(parser)
    add_report_options(parser)


def run(args: argparse.Namespace) -> int:
    """Audit the board and report; returns the exit code."""
    progress = ProgressCallback(quiet=args.quiet)
    try:
        options = dataclasses.replace(gated_options(args), progress=progress)
        report = run_audit(args.board, options)
    finally:
        progress.close()
    return emit(report, args)
