"""``padaudit kicad-rules BOARD``: the profile's touch limits as KiCad custom
design rules, so KiCad's own checker keeps them while people route.

Writes a ``.kicad_dru`` file (``(version 1)``, read by KiCad 6 and later) to
stdout or ``-o FILE``; an existing file is only replaced with ``--force``,
and a board file never. ``--append-only`` prints the rules without the
``(version 1)`` line, to add to a rules file the project already has.

Exit 0 when rules were written, 1 when the board has no electrodes (an empty
rules file would check nothing), 2 on bad input.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path
from typing import Any

from auditor.cli.confirm import confirm_written
from auditor.cli.options import add_selection
from auditor.errors import UsageError
from auditor.report.kicad_dru_build import DruExport

#: Suffixes never written to, even with --force (padaudit never writes a board).
_PROTECTED = (".kicad_pcb", ".kicad_pro", ".kicad_sch", ".kicad_prl")


def register(subparsers: argparse._SubParsersAction[Any]) -> None:
    """Add the ``kicad-rules`` sub-command."""
    parser = subparsers.add_parser(
        "kicad-rules", help="write the touch limits as KiCad custom design rules",
        description="Write KiCad custom design rules (.kicad_dru) that encode the profile's "
                    "limits for BOARD's sense nets: clearance to noisy nets, sense trace "
                    "width, the gap around each electrode and no foreign tracks or vias "
                    "under it. Save them as BOARD.kicad_dru beside the board (or paste them "
                    "into Board Setup > Custom Rules) and KiCad checks them.")
    parser.add_argument("board", metavar="BOARD", help="a .kicad_pcb file")
    parser.add_argument("-o", "--output", metavar="FILE", default=None,
                        help="write to FILE instead of stdout (e.g. BOARD.kicad_dru)")
    parser.add_argument("--force", action="store_true",
                        help="replace FILE if it exists")
    parser.add_argument("--append-only", action="store_true",
                        help="only the rules, without the (version 1) line, to append to an "
                             "existing rules file")
    parser.add_argument("--profile", default=None, metavar="NAME",
                        help="rule profile whose limits to export (default: from the "
                             "configuration, else default)")
    parser.add_argument("--config", default=None, metavar="FILE",
                        help="configuration file (default: padaudit.toml or pyproject.toml "
                             "found walking up from the board)")
    add_selection(parser)


def run(args: argparse.Namespace) -> int:
    """Export the rules; exit 1 when there is no electrode to export for."""
    target = _checked_target(args)
    export = export_for(args)
    if not export.electrodes:
        from auditor.cli.cmd_sensors import CONFIG_HINT

        sys.stderr.write(f"padaudit: no sense electrodes found on {args.board}, no rules "
                         f"written; {CONFIG_HINT}\n")
        return 1
    text = export.text(header=not args.append_only)
    if target is None:
        sys.stdout.write(text)
        return 0
    try:
        with target.open("w" if args.force else "x", encoding="utf-8", newline="\n") as out:
            out.write(text)
    except FileExistsError:
        raise UsageError(f"{target} exists; pass --force to replace it, or --append-only "
                         "to print rules to add to it") from None
    except OSError as exc:
        raise UsageError(f"{target}: cannot write: {exc.strerror or exc}") from None
    count = len(export.rules)
    confirm_written(str(target), f"{count} rule{'' if count == 1 else 's'}")
    return 0


def _checked_target(args: argparse.Namespace) -> Path | None:
    if args.output is None or args.output == "-":
        return None
    target = Path(args.output)
    if target.suffix in _PROTECTED:
        raise UsageError(f"{target}: padaudit never writes KiCad design files; write the "
                         "rules to a .kicad_dru file")
    if target.exists() and not args.force:
        raise UsageError(f"{target} exists; pass --force to replace it, or --append-only "
                         "to print rules to add to it")
    return target


def export_for(args: argparse.Namespace) -> DruExport:
    """Read the board, find and measure its electrodes, build the rules."""
    from auditor.audit import AuditOptions, describe_warning, measuring_selection, resolve_setup
    from auditor.cli.cmd_sensors import selection_from_args
    from auditor.read.courtyards import courtyard_refs
    from auditor.read.reader import read_board
    from auditor.report.kicad_dru_build import ExportInputs, build_rules
    from auditor.sensors import find_sensors, mark_sense_neighbours, measure_each
    from auditor.sensors.model import name_order

    setup = resolve_setup(args.board, AuditOptions(config_path=args.config,
                                                   profile=args.profile))
    board = read_board(args.board)
    selection = selection_from_args(args, measuring_selection(setup))
    found, _rejected = find_sensors(board, selection)
    measured = mark_sense_neighbours(list(measure_each(board, found, selection)))
    sensors = tuple(sorted(measured, key=lambda s: name_order(s.name)))
    from auditor import __version__

    return build_rules(ExportInputs(
        board=board, sensors=sensors, thresholds=setup.thresholds,
        noisy_globs=tuple(dict.fromkeys((*selection.noisy_nets, *setup.config.noisy_nets))),
        courtyard_refs=courtyard_refs(args.board), profile=setup.profile.name,
        producer=f"padaudit {__version__}", board_label=Path(args.board).name,
        read_notes=tuple(describe_warning(w) for w in board.warnings)))


__all__ = ["export_for", "register", "run"]
