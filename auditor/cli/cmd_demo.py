"""``padaudit demo``: the full audit on the bundled, invented front-panel board.

The demo board has layout problems planted on purpose (see
``fixtures/demo/README.md``), so its audit finds errors. ``demo`` shows them
and exits 0: it is a demonstration, not a gate. ``padaudit audit`` on the same
file exits 1, as a merge gate should.
"""

from __future__ import annotations

import argparse
import dataclasses
import shutil
import sys
import textwrap

from auditor.audit import run_audit
from auditor.cli.audit_runner import gated_options, shown_as
from auditor.cli.main import EXIT_CLEAN, EXIT_FINDINGS
from auditor.cli.options import add_jobs, add_no_suggest, add_solve_mode
from auditor.cli.progress import ProgressCallback
from auditor.cli.report_options import add_report_options, emit
from auditor.demo import demo_board_path, demo_config_path


def register(subparsers: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """Add the ``demo`` sub-command."""
    parser = subparsers.add_parser(
        "demo", help="audit the bundled demo board (an invented room panel)",
        description="Run the full audit on the demo board that ships with padaudit: a "
                    "wall-mounted room panel behind 2 mm acrylic with six buttons, a "
                    "five-segment slider and a proximity loop, with layout problems "
                    "planted on purpose. Exits 0 even though it finds problems.")
    parser.add_argument("--path", action="store_true",
                        help="print where the demo board is installed and stop "
                             "(copy it to try the other commands)")
    add_solve_mode(parser)
    add_no_suggest(parser)
    add_jobs(parser)
    add_report_options(parser)


def run(args: argparse.Namespace) -> int:
    """Audit the demo board; returns 0 unless something went wrong."""
    board = demo_board_path()
    if args.path:
        print(board)
        return EXIT_CLEAN
    # The demo's configuration sits beside the board; name it explicitly so a
    # padaudit.toml in the user's working folder cannot change the demo.
    args.config = str(demo_config_path())
    progress = ProgressCallback(quiet=args.quiet)
    try:
        options = dataclasses.replace(gated_options(args), progress=progress)
        # Show the file's name, not where this venv put it, so the demo's
        # output is the same on every machine.
        report = shown_as(run_audit(str(board), options), board.name)
        report = dataclasses.replace(report, info=dataclasses.replace(
            report.info, config_path=demo_config_path().name))
    finally:
        progress.close()
    code = emit(report, args, demo=True, before_verdict=lambda code: _closing_for(code, board))
    return EXIT_CLEAN if code == EXIT_FINDINGS else code


def _closing_for(code: int, board: object) -> None:
    if code == EXIT_FINDINGS:
        _closing("This is the demo: the problems above were planted on purpose. "
                 "`padaudit audit` would exit 1 here and stop a merge.",
                 f"Copy the board to experiment: padaudit demo --path  ->  {board}")


def _closing(*paragraphs: str) -> None:
    """The closing lines, wrapped at words to the terminal (100 columns in a
    file or pipe); a path longer than a line stays whole."""
    width = shutil.get_terminal_size((100, 24)).columns if sys.stdout.isatty() else 100
    sys.stdout.write("\n")
    for text in paragraphs:
        sys.stdout.write(textwrap.fill(text, width=max(width - 1, 40), break_long_words=False,
                                       break_on_hyphens=False) + "\n")
