"""``padaudit estimate``: the quick field solve for a described pad, no board.

Lets a designer size a pad before layout: Cp, the change under a finger and
the capacitance matrices, for one pad diameter or a sweep (``8:16:2``).
``--precise`` also solves the same round pad, ring and plane with the 3-D
moment method (:func:`auditor.field.round_pad.estimate_precise`) and prints
it beside the quick result with the difference.
"""

from __future__ import annotations

import argparse
import json
import math
import sys
from functools import partial

from auditor.cli.options import add_jobs, add_overlay, add_power
from auditor.cli.wrap import write_lines
from auditor.config.limits import LIMITS
from auditor.config.model import Overlay
from auditor.config.overrides import parse_overlay_spec
from auditor.decide.cautions import cautions_for
from auditor.errors import UsageError
from auditor.field.api import BoardLayer, PadSetup, PadSolve
from auditor.field.batch import solve_pads
from auditor.field.fanout import Fanout
from auditor.field.materials import material
from auditor.model.vocabulary import PAD_SIDES
from auditor.report.estimate_doc import (
    estimate_document,
    estimate_record,
    estimate_text,
    with_precise,
)

_MAX_SWEEP = 50
#: Cells of ``--precise``: 0.25 mm keeps the round pad within about 0.5 % of
#: the quick solve (tests/unit/solve/test_precise.py) at about 1.5 s a pad.
_PRECISE_CELL_MM = 0.25


def register(subparsers: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """Add the ``estimate`` sub-command."""
    p = subparsers.add_parser(
        "estimate", help="estimate Cp and finger ΔC for a described pad (no board needed)",
        description="Quick axisymmetric field solve of a round pad with its ground, "
                    "board, overlay and finger. Lengths in mm.")
    p.add_argument("--pad-diameter", default="10", metavar="MM|A:B:STEP",
                   help="pad diameter, or a sweep range start:stop:step (default 10)")
    p.add_argument("--gap", default="1", metavar="MM|none",
                   help="gap to a coplanar ground ring; none = no ring (default 1)")
    p.add_argument("--ground-width", default="10", metavar="MM",
                   help="radial width of the coplanar ground / plane beyond the gap (default 10)")
    p.add_argument("--ground-fill", default="1", metavar="0..1",
                   help="copper coverage of the coplanar ground, 1 = solid (default 1)")
    p.add_argument("--plane-below", default="none", metavar="MM|none",
                   help="depth of a ground plane under the pad (default none)")
    p.add_argument("--plane-fill", default="1", metavar="0..1",
                   help="copper coverage of that plane, 1 = solid (default 1)")
    p.add_argument("--hatch-pitch", default="1.5", metavar="MM",
                   help="pitch of a hatched plane (default 1.5)")
    p.add_argument("--board-er", default="4.4", metavar="ER", help="board er (default 4.4)")
    p.add_argument("--board-thickness", default="1.6", metavar="MM",
                   help="board thickness (default 1.6)")
    p.add_argument("--pad-side", choices=PAD_SIDES, default="touch",
                   help="pad copper on the touch side of the board or the far side")
    add_overlay(p, default="2:acrylic")
    p.add_argument("--air-gap", default="0", metavar="MM",
                   help="air between board and overlay (default 0)")
    p.add_argument("--finger", default="10", metavar="MM|none",
                   help="finger contact diameter; none = baseline only (default 10)")
    p.add_argument("--finger-height", default="0", metavar="MM",
                   help="finger height above the overlay (default 0, touching)")
    add_power(p, default="battery", help="how the device ground reaches earth (default battery)")
    p.add_argument("--body-pf", default="150", metavar="PF",
                   help="body to earth capacitance (default 150, IEC 61000-4-2)")
    p.add_argument("--precise", action="store_true",
                   help="also solve the pad in 3-D (moment method) and show both results")
    p.add_argument("--cell", default=None, metavar="MM",
                   help="cell side of the --precise solve (default 0.25)")
    p.add_argument("--json", action="store_true", help="print JSON instead of text")
    add_jobs(p)


def _number(option: str, text: str, name: str) -> float:
    """``text`` as a number within ``LIMITS[name]`` (the table the
    configuration checks too)."""
    try:
        value = float(text)
    except ValueError:
        raise UsageError(f"{option}: expected a number, got {text!r}") from None
    problem = LIMITS[name].problem(value)
    if problem is not None:
        raise UsageError(f"{option}: {problem}")
    return value


def _optional(option: str, text: str, name: str) -> float | None:
    return None if text.strip().lower() == "none" else _number(option, text, name)


def _diameters(text: str) -> tuple[float, ...]:
    parts = text.split(":")
    if len(parts) == 1:
        return (_number("--pad-diameter", text, "estimate.pad_diameter_mm"),)
    if len(parts) != 3:
        raise UsageError(f"--pad-diameter: expected MM or start:stop:step, got {text!r}")
    start, stop, step = (_number("--pad-diameter", p, "estimate.pad_diameter_mm")
                         for p in parts)
    if stop < start:
        raise UsageError(f"--pad-diameter: stop {stop:g} is below start {start:g}")
    count = int(math.floor((stop - start) / step + 1e-9)) + 1
    if count > _MAX_SWEEP:
        raise UsageError(f"--pad-diameter: {count} steps, at most {_MAX_SWEEP} allowed")
    return tuple(round(start + i * step, 9) for i in range(count))


def _overlay_label(overlay: Overlay) -> str:
    if overlay.thickness_mm == 0.0:
        return "none"
    if not overlay.material:
        return f"er {overlay.epsilon_r:g} (given)"
    found = material(overlay.material)
    return f"{found.name}, er {found.er:g} ({found.origin})"


def _setup(args: argparse.Namespace, diameter_mm: float, overlay: Overlay) -> PadSetup:
    def number(option: str, name: str) -> float:
        return _number(option, getattr(args, option[2:].replace("-", "_")), f"estimate.{name}")

    gap = _optional("--gap", args.gap, "estimate.gap_mm")
    radius = diameter_mm / 2
    outer = radius + (gap or 0.0) + number("--ground-width", "ground_width_mm")
    return PadSetup(
        pad_area_mm2=math.pi * radius ** 2, gap_mm=gap, ground_outer_mm=outer,
        plane_depth_mm=_optional("--plane-below", args.plane_below, "estimate.plane_depth_mm"),
        plane_fill=number("--plane-fill", "plane_fill"),
        plane_hatch_pitch_mm=number("--hatch-pitch", "hatch_pitch_mm"),
        board_layers=(BoardLayer(number("--board-thickness", "board_thickness_mm"),
                                 number("--board-er", "board_er")),),
        pad_side=args.pad_side, overlay_mm=overlay.thickness_mm, overlay_er=overlay.epsilon_r,
        air_gap_mm=_number("--air-gap", args.air_gap, "air_gap_mm"),
        finger_diameter_mm=_optional("--finger", args.finger, "estimate.finger_diameter_mm"),
        finger_height_mm=number("--finger-height", "finger_height_mm"),
        power=args.power, body_to_earth_pf=number("--body-pf", "body_to_earth_pf"),
        ground_fill=number("--ground-fill", "ground_fill"))


def _precise_solve(setup: PadSetup, cell_mm: float) -> PadSolve:
    from auditor.field.round_pad import estimate_precise  # heavy: only when asked

    try:
        return estimate_precise(setup, cell_mm=cell_mm)
    except ValueError as exc:  # e.g. a plane depth between the board's layer interfaces
        raise UsageError(f"--precise: {exc}") from None


def _precise_solves(setups: list[PadSetup], cell_mm: float,
                    workers: int | None) -> list[PadSolve]:
    """The 3-D solve of each diameter of a sweep, over the cores (the same
    bits as one after the other: :class:`auditor.field.fanout.Fanout`)."""
    fanout: Fanout[PadSetup, PadSolve] = Fanout(partial(_precise_solve, cell_mm=cell_mm),
                                                workers)
    for setup in setups:
        fanout.add(setup)
    return fanout.results()


def run(args: argparse.Namespace) -> int:
    """Solve and print; exit 0."""
    diameters = _diameters(args.pad_diameter)
    overlay = parse_overlay_spec(args.overlay)
    setups = [_setup(args, d, overlay) for d in diameters]
    records = [estimate_record(d, solved) for d, solved in
               zip(diameters, solve_pads(setups, args.jobs), strict=True)]
    if args.cell is not None and not args.precise:
        raise UsageError("--cell: sets the cells of the --precise solve; add --precise")
    if args.precise:
        cell_mm = _number("--cell", args.cell or str(_PRECISE_CELL_MM), "estimate.cell_mm")
        records = [with_precise(rec, solved) for rec, solved in
                   zip(records, _precise_solves(setups, cell_mm, args.jobs), strict=True)]
    cautions = cautions_for(args.power)
    label = _overlay_label(overlay)
    if args.json:
        document = estimate_document(records, label, cautions)
        sys.stdout.write(json.dumps(document, sort_keys=True, indent=2) + "\n")
        for caution in cautions:
            sys.stderr.write(f"padaudit: {caution}\n")
    else:
        write_lines(sys.stdout, estimate_text(records, setups[0], label, cautions).splitlines())
    return 0
