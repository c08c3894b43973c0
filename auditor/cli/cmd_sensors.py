"""``padaudit sensors BOARD``: list the electrodes found, the cue behind each,
and the near misses.

Exit 0 when electrodes were found, 1 when none were (never a silent pass:
an audit of a board with no electrodes checks nothing), 2 on bad input.
"""

from __future__ import annotations

import argparse
import json
import sys
from typing import Any

from auditor.cli.options import add_profile, add_selection
from auditor.cli.wrap import write_lines
from auditor.report.sensors_doc import sensors_document, sensors_text
from auditor.sensors.find import find_sensors
from auditor.sensors.measure import measure
from auditor.sensors.notes import structure_notes
from auditor.sensors.selection import SensorSelection, selection_from_mapping
from auditor.sensors.suggest import config_lines

CONFIG_HINT = (
    "name them in configuration, e.g. in pyproject.toml:\n"
    "  [tool.padaudit.sensors]\n"
    "  nets = [\"TOUCH*\"]        # or refs = [\"E*\"], net_classes = [\"Touch\"]\n"
    "(or the same table as [sensors] in padaudit.toml), or try --net GLOB / --ref REF"
)


def register(subparsers: argparse._SubParsersAction[Any]) -> None:
    """Add the ``sensors`` sub-command."""
    parser = subparsers.add_parser(
        "sensors", help="list the sense electrodes found and why",
        description="List the sense electrodes found on BOARD, the cue behind each, and "
                    "copper that was considered but rejected.")
    parser.add_argument("board", metavar="BOARD", help="a .kicad_pcb file")
    parser.add_argument("--json", action="store_true", help="print JSON instead of text")
    add_selection(parser)
    parser.add_argument("--config", default=None, metavar="FILE",
                        help="configuration file (default: padaudit.toml or pyproject.toml "
                             "found walking up from the board)")
    add_profile(parser, "rule profile whose measuring distances to use")


def selection_from_args(args: argparse.Namespace,
                        base: SensorSelection | None = None) -> SensorSelection:
    """The selection the command line asks for, over ``base`` (configuration)."""
    overrides: dict[str, Any] = {}
    if args.net:
        overrides["nets"] = list(args.net)
    if args.ref:
        overrides["refs"] = list(args.ref)
    if args.controller:
        overrides["controller_ref"] = args.controller
    return selection_from_mapping(overrides, "command line", base)


def _configured_selection(args: argparse.Namespace) -> SensorSelection:
    """The selection from the configuration found beside the board (and the
    profile's measuring distances), as ``padaudit audit`` uses it."""
    from auditor.audit import AuditOptions, measuring_selection, resolve_setup

    setup = resolve_setup(args.board, AuditOptions(config_path=args.config,
                                                   profile=args.profile))
    return measuring_selection(setup)


def run(args: argparse.Namespace) -> int:
    """List the sensors; exit 1 when there are none."""
    from auditor.read.kicad_pro import project_path_for
    from auditor.read.reader import read_board

    board = read_board(args.board)
    selection = selection_from_args(args, _configured_selection(args))
    sensors, rejects = find_sensors(board, selection)
    sensors = measure(board, sensors, selection)
    notes = [f"{w.code}: {w.message}" for w in board.warnings] + list(structure_notes(sensors))
    if not board.project_file:
        notes.append(f"no project file {project_path_for(args.board)}: net classes from "
                     "the board only")
    if args.json:
        document = sensors_document(args.board, sensors, rejects, notes)
        if not sensors:
            document["suggested_config"] = list(config_lines(rejects))
        sys.stdout.write(json.dumps(document, sort_keys=True, indent=2) + "\n")
    else:
        write_lines(sys.stdout, sensors_text(args.board, sensors, rejects, notes).splitlines())
    if not sensors:
        lines = config_lines(rejects)
        hint = CONFIG_HINT if not lines else (
            "to take the candidates above, add to [tool.padaudit.sensors] in pyproject.toml "
            "(or [sensors] in padaudit.toml):\n" + "".join(f"  {line}\n" for line in lines))
        sys.stderr.write(f"padaudit: no sense electrodes found on {args.board}; {hint}"
                         + ("" if hint.endswith("\n") else "\n"))
        return 1
    return 0


__all__ = ["CONFIG_HINT", "register", "run", "selection_from_args"]
