"""``padaudit sensors BOARD``: list the electrodes found, the cue behind each,
and the near misses.

Exit 0 when electrodes were found, 1 when none were (never a silent pass:
an audit of a board with no electrodes checks nothing), 2 on bad input.
"""

from __future__ import annotations

import argparse
import json
import sys
from collections.abc import Sequence
from typing import Any

from auditor.sensors.find import Rejected, find_sensors
from auditor.sensors.measure import measure
from auditor.sensors.model import Sensor
from auditor.sensors.selection import SensorSelection, selection_from_mapping
from auditor.sensors.suggest import config_lines, structure_notes

CONFIG_HINT = (
    "name them in configuration, e.g. in pyproject.toml:\n"
    "  [tool.padaudit.sensors]\n"
    "  nets = [\"TOUCH*\"]        # or refs = [\"E*\"], net_classes = [\"Touch\"]\n"
    "(or the same table as [sensors] in padaudit.toml), or try --net GLOB / --ref REF"
)
_DIGITS = 4


def register(subparsers: argparse._SubParsersAction[Any]) -> None:
    """Add the ``sensors`` sub-command."""
    parser = subparsers.add_parser(
        "sensors", help="list the sense electrodes found and why",
        description="List the sense electrodes found on BOARD, the cue behind each, and "
                    "copper that was considered but rejected.")
    parser.add_argument("board", metavar="BOARD", help="a .kicad_pcb file")
    parser.add_argument("--json", action="store_true", help="print JSON instead of text")
    parser.add_argument("--net", action="append", default=[], metavar="GLOB",
                        help="treat nets matching GLOB as electrodes (repeatable)")
    parser.add_argument("--ref", action="append", default=[], metavar="REF",
                        help="treat footprint REF (glob) as an electrode (repeatable)")
    parser.add_argument("--controller", default="", metavar="REF",
                        help="the touch controller's reference")
    parser.add_argument("--config", default=None, metavar="FILE",
                        help="configuration file (default: padaudit.toml or pyproject.toml "
                             "found walking up from the board)")
    parser.add_argument("--profile", default=None, metavar="NAME",
                        help="rule profile whose measuring distances to use")


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
    from auditor.pipeline import AuditOptions, measuring_selection, resolve_setup

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
        document = sensors_document(args.board, sensors, rejects)
        document["notes"] = notes
        if not sensors:
            document["suggested_config"] = list(config_lines(rejects))
        sys.stdout.write(json.dumps(document, sort_keys=True, indent=2) + "\n")
    else:
        sys.stdout.write(sensors_text(args.board, sensors, rejects))
        sys.stdout.write("".join(f"  note: {n}\n" for n in notes))
    if not sensors:
        lines = config_lines(rejects)
        hint = CONFIG_HINT if not lines else (
            "to take the candidates above, add to [tool.padaudit.sensors] in pyproject.toml "
            "(or [sensors] in padaudit.toml):\n" + "".join(f"  {line}\n" for line in lines))
        sys.stderr.write(f"padaudit: no sense electrodes found on {args.board}; {hint}"
                         + ("" if hint.endswith("\n") else "\n"))
        return 1
    return 0


def sensors_document(board_path: str, sensors: Sequence[Sensor],
                     rejects: Sequence[Rejected]) -> dict[str, Any]:
    """The JSON document: ``board``, ``sensors`` and ``rejected`` lists."""
    return {
        "board": board_path,
        "sensors": [sensor_record(s) for s in sensors],
        "rejected": [_rounded({"net": r.net, "refs": list(r.refs), "layer": r.layer,
                               "area_mm2": r.area_mm2, "x_mm": r.x_mm, "y_mm": r.y_mm,
                               "why": r.why}) for r in rejects],
    }


def sensor_record(sensor: Sensor) -> dict[str, Any]:
    """One sensor as plain JSON-ready data (floats rounded)."""
    record: dict[str, Any] = {
        "name": sensor.name, "kind": sensor.kind, "nets": list(sensor.nets),
        "refs": list(sensor.refs), "layer": sensor.layer, "area_mm2": sensor.area_mm2,
        "equivalent_diameter_mm": sensor.equivalent_diameter_mm,
        "x_mm": sensor.x_mm, "y_mm": sensor.y_mm, "reason": sensor.reason,
        "group": sensor.group, "index": sensor.index, "exposed": sensor.exposed,
        "pasted": sensor.pasted,
    }
    if sensor.path is not None:
        p = sensor.path
        record["path"] = {
            "length_mm": p.length_mm, "vias": p.vias, "layers": list(p.layers),
            "widths_mm": sorted({r.width_mm for r in p.runs}),
            "controller": f"{p.controller_ref}.{p.controller_pin}" if p.controller_ref else "",
            "controller_ref": p.controller_ref,
            "series_ref": p.series_ref, "series_to_pin_mm": p.series_to_pin_mm,
            "complete": p.complete, "off_board": p.off_board, "nets": list(p.nets),
            "neighbours": [{"net": n.net, "parallel_mm": n.parallel_mm,
                            "min_distance_mm": n.min_distance_mm, "crossings": n.crossings,
                            "noisy": n.noisy, "sense": n.sense} for n in p.neighbours],
            "under_electrodes": list(p.under_electrodes),
        }
    if sensor.surroundings is not None:
        s = sensor.surroundings
        record["surroundings"] = {
            "min_gap_mm": s.min_gap_mm, "typical_gap_mm": s.typical_gap_mm,
            "min_ground_gap_mm": s.min_ground_gap_mm,
            "ground_area_mm2": s.ground_area_mm2,
            "ground_net": s.ground_net, "ground_fill_ratio": s.ground_fill_ratio,
            "nearest_sensor": s.nearest_sensor, "nearest_sensor_mm": s.nearest_sensor_mm,
            "shadows": [{"layer": sh.layer, "fill": sh.fill,
                         "shadowed_fraction": sh.shadowed_fraction,
                         "fill_ratio": sh.fill_ratio} for sh in s.shadows],
            "noisy_parts": [ref for ref, _ in s.noisy_parts],
            "floating_copper": len(s.floating_copper),
        }
    rounded: dict[str, Any] = _rounded(record)
    return rounded


def _rounded(value: Any) -> Any:
    if isinstance(value, float):
        return round(value, _DIGITS) + 0.0
    if isinstance(value, dict):
        return {k: _rounded(v) for k, v in value.items()}
    if isinstance(value, list | tuple):
        return [_rounded(v) for v in value]
    return value


def sensors_text(board_path: str, sensors: Sequence[Sensor],
                 rejects: Sequence[Rejected]) -> str:
    """The plain-text listing."""
    lines = [f"{board_path}: {len(sensors)} sense electrode(s)"]
    for s in sensors:
        where = f"{s.layer} ({s.x_mm:.2f}, {s.y_mm:.2f}) mm"
        group = f" {s.group}[{s.index}]" if s.group else ""
        refs = f" [{', '.join(s.refs)}]" if s.refs else ""
        lines.append(f"  {s.name:<16} {s.kind}{group}{refs}  {s.area_mm2:.1f} mm², "
                     f"{s.equivalent_diameter_mm:.1f} mm across, {where}")
        lines.append(f"    picked because: {s.reason}")
        if s.path is not None:
            p = s.path
            end = f"{p.controller_ref} pin {p.controller_pin}" if p.complete else \
                "no controller pin reached"
            end += " (controller off-board)" if p.off_board else ""
            series = f", through {p.series_ref}" if p.series_ref else ", no series part"
            lines.append(f"    trace {p.length_mm:.1f} mm, {p.vias} via(s){series}, to {end}")
    if rejects:
        lines.append(f"  considered but not taken ({len(rejects)}):")
        for r in rejects:
            refs = f" [{', '.join(r.refs)}]" if r.refs else ""
            lines.append(f"    {r.net}{refs} on {r.layer} at ({r.x_mm:.2f}, {r.y_mm:.2f}): "
                         f"{r.why}")
    return "\n".join(lines) + "\n"


__all__ = ["CONFIG_HINT", "register", "run", "selection_from_args", "sensor_record",
           "sensors_document", "sensors_text"]
