"""``padaudit inspect BOARD [--json]``: what the reader understood.

The document and the summary are built in :mod:`auditor.report.inspect_doc`.
"""

from __future__ import annotations

import argparse
import json
import os
import sys

from auditor.cli.colour import use_colour
from auditor.read import read_board
from auditor.report.inspect_doc import inspect_document, write_summary


def register(subparsers: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """Add the ``inspect`` sub-command."""
    parser = subparsers.add_parser(
        "inspect", help="show what was read from a board file",
        description="Summarise what padaudit read from a KiCad board: format version, "
                    "layers, stackup, items, nets and everything it skipped.")
    parser.add_argument("board", metavar="BOARD", help="a .kicad_pcb file")
    parser.add_argument("--json", action="store_true",
                        help="print the documented JSON document instead")


def run(args: argparse.Namespace) -> int:
    """Read the board and print the summary or JSON; 0 on success."""
    board = read_board(args.board)
    if args.json:
        sys.stdout.write(json.dumps(inspect_document(board), indent=2, ensure_ascii=False))
        sys.stdout.write("\n")
    else:
        write_summary(board, sys.stdout, use_colour("auto", sys.stdout, os.environ))
    return 0
