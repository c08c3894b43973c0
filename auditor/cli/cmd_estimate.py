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
from dataclasses import dataclass
from typing import Any

from auditor.cli.wrap import write_lines
from auditor.errors import UsageError
from auditor.field.api import BoardLayer, PadSetup, PadSolve, solve_pad
from auditor.field.circuit import POWER_PRESETS
from auditor.field.materials import material

MAINS_CAUTION = ("caution: touch electrodes on mains-referenced circuits need isolation rated "
                 "for it; product safety standards (e.g. IEC 62368-1, IEC 60335-1), local "
                 "codes and licensed practice govern, not this estimate.")
_MAX_SWEEP = 50
_MAX_PAD_DIAMETER_MM = 1000.0  # 1 m; common practice, no source
_MAX_VALUE = 1000.0  # any length option (mm), εr or pF; common practice, no source
_MIN_OVERLAY_MM = 0.001  # thinner layers: the finger touches the pad, the mesh fails
#: Cells of ``--precise``: 0.25 mm keeps the round pad within about 0.5 % of
#: the quick solve (tests/unit/solve/test_precise.py) at about 1.5 s a pad.
_PRECISE_CELL_MM = 0.25
_DIGITS = 6


@dataclass(frozen=True)
class _Overlay:
    thickness_mm: float
    er: float
    label: str


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
    p.add_argument("--pad-side", choices=("touch", "far"), default="touch",
                   help="pad copper on the touch side of the board or the far side")
    p.add_argument("--overlay", default="2:acrylic", metavar="MM:ER|MM:MATERIAL|none",
                   help="cover over the board (default 2:acrylic)")
    p.add_argument("--air-gap", default="0", metavar="MM",
                   help="air between board and overlay (default 0)")
    p.add_argument("--finger", default="10", metavar="MM|none",
                   help="finger contact diameter; none = baseline only (default 10)")
    p.add_argument("--finger-height", default="0", metavar="MM",
                   help="finger height above the overlay (default 0, touching)")
    p.add_argument("--power", default="battery", metavar="|".join(POWER_PRESETS),
                   help="how the device ground reaches earth (default battery)")
    p.add_argument("--body-pf", default="150", metavar="PF",
                   help="body to earth capacitance (default 150, IEC 61000-4-2)")
    p.add_argument("--precise", action="store_true",
                   help="also solve the pad in 3-D (moment method) and show both results")
    p.add_argument("--cell", default=None, metavar="MM",
                   help="cell side of the --precise solve (default 0.25)")
    p.add_argument("--json", action="store_true", help="print JSON instead of text")


def _number(option: str, text: str, low: float | None = 0.0, inclusive: bool = False) -> float:
    try:
        value = float(text)
    except ValueError:
        raise UsageError(f"{option}: expected a number, got {text!r}") from None
    if not math.isfinite(value) or (low is not None and (value < low or
                                                         (value == low and not inclusive))):
        bound = f">= {low:g}" if inclusive else f"> {low:g}"
        raise UsageError(f"{option}: expected a finite number {bound}, got {text!r}")
    if value > _MAX_VALUE:
        # Far past any board; the mesh would not fit in floating point.
        raise UsageError(f"{option}: {value:g} is larger than {_MAX_VALUE:g}, the largest "
                         "value estimated")
    return value


def _fill(option: str, text: str) -> float:
    value = _number(option, text, inclusive=True)
    if value > 1.0:
        raise UsageError(f"{option}: expected a coverage within 0..1, got {text!r}")
    return value


def _optional(option: str, text: str) -> float | None:
    return None if text.strip().lower() == "none" else _number(option, text)


def _plane_depth(text: str) -> float | None:
    depth_mm = _optional("--plane-below", text)
    if depth_mm is not None and depth_mm < _MIN_OVERLAY_MM:
        # The graded mesh cannot resolve a thinner dielectric and returned a far
        # too small Cp without complaint.
        raise UsageError(f"--plane-below: {depth_mm:g} mm is closer than {_MIN_OVERLAY_MM:g} "
                         "mm (1 µm)")
    return depth_mm


def _diameters(text: str) -> tuple[float, ...]:
    parts = text.split(":")
    if len(parts) == 1:
        return _sizeable((_number("--pad-diameter", text),))
    if len(parts) != 3:
        raise UsageError(f"--pad-diameter: expected MM or start:stop:step, got {text!r}")
    start, stop, step = (_number("--pad-diameter", p) for p in parts)
    if stop < start:
        raise UsageError(f"--pad-diameter: stop {stop:g} is below start {start:g}")
    count = int(math.floor((stop - start) / step + 1e-9)) + 1
    if count > _MAX_SWEEP:
        raise UsageError(f"--pad-diameter: {count} steps, at most {_MAX_SWEEP} allowed")
    return _sizeable(tuple(round(start + i * step, 9) for i in range(count)))


def _sizeable(diameters: tuple[float, ...]) -> tuple[float, ...]:
    # Past this the mesh no longer fits in floating point and the solver fails
    # inside; no printed board is that large anyway.
    if max(diameters) > _MAX_PAD_DIAMETER_MM:
        raise UsageError(f"--pad-diameter: {max(diameters):g} mm is larger than "
                         f"{_MAX_PAD_DIAMETER_MM:g} mm, the largest pad estimated")
    return diameters


def _overlay(text: str) -> _Overlay:
    if text.strip().lower() == "none":
        return _Overlay(0.0, 1.0, "none")
    thickness, sep, what = text.partition(":")
    if not sep:
        raise UsageError(f"--overlay: expected MM:ER, MM:MATERIAL or none, got {text!r}")
    mm = _number("--overlay", thickness)
    if mm < _MIN_OVERLAY_MM:
        raise UsageError(f"--overlay: {mm:g} mm is thinner than {_MIN_OVERLAY_MM:g} mm "
                         "(1 µm); for no cover write --overlay none")
    try:
        er = float(what)
    except ValueError:
        try:
            found = material(what)
        except UsageError as exc:
            raise UsageError(f"--overlay {text!r}: {exc}") from None
        return _Overlay(mm, found.er, f"{found.name}, er {found.er:g} ({found.origin})")
    if not (math.isfinite(er) and er >= 1.0):
        raise UsageError(f"--overlay: er must be >= 1, got {what!r}")
    return _Overlay(mm, er, f"er {er:g} (given)")


def _setup(args: argparse.Namespace, diameter_mm: float, overlay: _Overlay) -> PadSetup:
    if args.power not in POWER_PRESETS:
        raise UsageError(f"--power: expected one of {', '.join(POWER_PRESETS)}, "
                         f"got {args.power!r}")
    gap = _optional("--gap", args.gap)
    radius = diameter_mm / 2
    outer = radius + (gap or 0.0) + _number("--ground-width", args.ground_width)
    return PadSetup(
        pad_area_mm2=math.pi * radius ** 2, gap_mm=gap, ground_outer_mm=outer,
        plane_depth_mm=_plane_depth(args.plane_below),
        plane_fill=_fill("--plane-fill", args.plane_fill),
        plane_hatch_pitch_mm=_number("--hatch-pitch", args.hatch_pitch),
        board_layers=(BoardLayer(_number("--board-thickness", args.board_thickness),
                                 _number("--board-er", args.board_er, low=1.0,
                                         inclusive=True)),),
        pad_side=args.pad_side, overlay_mm=overlay.thickness_mm, overlay_er=overlay.er,
        air_gap_mm=_number("--air-gap", args.air_gap, inclusive=True),
        finger_diameter_mm=_optional("--finger", args.finger),
        finger_height_mm=_number("--finger-height", args.finger_height, inclusive=True),
        power=args.power, body_to_earth_pf=_number("--body-pf", args.body_pf),
        ground_fill=_fill("--ground-fill", args.ground_fill))


def _record(diameter_mm: float, solve: PadSolve) -> dict[str, Any]:
    def r(value: float) -> float:
        return round(value, _DIGITS) + 0.0
    return {
        "pad_diameter_mm": r(diameter_mm), "cp_pf": r(solve.cp_total_pf),
        "cp_touched_pf": r(solve.cp_touched_pf), "delta_c_pf": r(solve.delta_c_pf),
        "delta_ratio": r(solve.delta_ratio), "matrix": solve.matrix.rounded(_DIGITS),
        "matrix_with_finger": (None if solve.matrix_with_finger is None
                               else solve.matrix_with_finger.rounded(_DIGITS)),
        "notes": list(solve.notes)}


def _precise_solve(setup: PadSetup, cell_mm: float) -> PadSolve:
    from auditor.field.round_pad import estimate_precise  # heavy: only when asked

    try:
        return estimate_precise(setup, cell_mm=cell_mm)
    except ValueError as exc:  # e.g. a plane depth between the board's layer interfaces
        raise UsageError(f"--precise: {exc}") from None


def _change_pct(precise: float, quick: float) -> float | None:
    return round((precise / quick - 1.0) * 100.0, 4) + 0.0 if quick else None


def _with_precise(record: dict[str, Any], solve: PadSolve) -> dict[str, Any]:
    """The quick record with the precise one beside it and their difference."""
    precise = _record(record["pad_diameter_mm"], solve)
    del precise["pad_diameter_mm"]
    precise["change_pct"] = {key: _change_pct(precise[key], record[key])
                             for key in ("cp_pf", "cp_touched_pf", "delta_c_pf", "delta_ratio")}
    return {**record, "method": "quick", "precise": precise}


def run(args: argparse.Namespace) -> int:
    """Solve and print; exit 0."""
    diameters = _diameters(args.pad_diameter)
    overlay = _overlay(args.overlay)
    setups = [_setup(args, d, overlay) for d in diameters]
    records = [_record(d, solve_pad(s)) for d, s in zip(diameters, setups, strict=True)]
    if args.cell is not None and not args.precise:
        raise UsageError("--cell: sets the cells of the --precise solve; add --precise")
    if args.precise:
        cell_mm = _number("--cell", args.cell or str(_PRECISE_CELL_MM))
        records = [_with_precise(rec, _precise_solve(s, cell_mm))
                   for rec, s in zip(records, setups, strict=True)]
    cautions = [MAINS_CAUTION] if args.power == "mains" else []
    if args.json:
        payload: dict[str, Any] = (dict(records[0]) if len(records) == 1
                                   else {"sweep": records})
        payload["overlay"] = overlay.label
        payload["cautions"] = cautions
        sys.stdout.write(json.dumps(payload, sort_keys=True, indent=2) + "\n")
        for caution in cautions:
            sys.stderr.write(f"padaudit: {caution}\n")
        return 0
    write_lines(sys.stdout, _text(records, setups[0], overlay) + cautions)
    return 0


def _text(records: list[dict[str, Any]], setup: PadSetup, overlay: _Overlay) -> list[str]:
    plane = ("none" if setup.plane_depth_mm is None
             else f"{setup.plane_depth_mm:g} mm below, fill {setup.plane_fill:g}")
    gap = "none" if setup.gap_mm is None else f"{setup.gap_mm:g} mm"
    if setup.gap_mm is not None and setup.ground_fill < 1.0:
        gap += f" (fill {setup.ground_fill:g})"
    finger = ("none" if setup.finger_diameter_mm is None
              else f"{setup.finger_diameter_mm:g} mm, {setup.finger_height_mm:g} mm above")
    lines = [f"overlay  {overlay.thickness_mm:g} mm, {overlay.label}",
             f"ground   ring gap {gap}; plane {plane}",
             f"board    {setup.board_mm:g} mm, er {setup.board_layers[0].er:g}; "
             f"pad on the {setup.pad_side} side",
             f"finger   {finger}; power {setup.power}", ""]
    if len(records) == 1 and "precise" in records[0]:
        lines += _side_by_side(records[0])
    elif len(records) == 1:
        rec = records[0]
        lines += [f"Cp (pad to device ground)  {rec['cp_pf']:.4f} pF",
                  f"with finger                {rec['cp_touched_pf']:.4f} pF",
                  f"delta C                    {rec['delta_c_pf']:.4f} pF",
                  f"delta C / Cp               {100 * rec['delta_ratio']:.2f} %", ""]
        lines += _matrix_lines("field matrix, no finger (pF, reference: earth)", rec["matrix"])
        if rec["matrix_with_finger"] is not None:
            lines += _matrix_lines("field matrix, with finger", rec["matrix_with_finger"])
    else:
        lines += _sweep_lines(records)
    notes = records[0]["notes"]
    if len(records) > 1:
        notes = ["pads as equal-area disks (area kept, perimeter not)",
                 *(n for n in notes if not n.startswith("pad as"))]
    lines += ["", "model:"] + [f"  - {note}" for note in notes]
    if "precise" in records[0]:
        lines += ["precise model:"] + [f"  - {note}" for note in records[0]["precise"]["notes"]]
    return lines


def _sweep_lines(records: list[dict[str, Any]]) -> list[str]:
    head = f"{'pad mm':>7} {'Cp pF':>9} {'dC pF':>9} {'dC/Cp %':>8}"
    if "precise" not in records[0]:
        return [head] + [f"{rec['pad_diameter_mm']:7g} {rec['cp_pf']:9.4f} "
                         f"{rec['delta_c_pf']:9.4f} {100 * rec['delta_ratio']:8.2f}"
                         for rec in records]
    lines = [head + f" {'3-D Cp':>9} {'change':>8} {'3-D dC':>9} {'change':>8}"]
    for rec in records:
        precise, change = rec["precise"], rec["precise"]["change_pct"]
        lines.append(f"{rec['pad_diameter_mm']:7g} {rec['cp_pf']:9.4f} {rec['delta_c_pf']:9.4f} "
                     f"{100 * rec['delta_ratio']:8.2f} {precise['cp_pf']:9.4f} "
                     f"{_pct(change['cp_pf']):>8} {precise['delta_c_pf']:9.4f} "
                     f"{_pct(change['delta_c_pf']):>8}")
    return lines


def _pct(value: float | None) -> str:
    return "–" if value is None else f"{value:+.2f} %"


def _side_by_side(rec: dict[str, Any]) -> list[str]:
    """Quick and precise results of one pad, with the precise one's change."""
    precise, change = rec["precise"], rec["precise"]["change_pct"]
    lines = [f"{'':27}{'quick':>10}{'precise 3-D':>13}{'change':>10}"]
    for label, key, unit, scale in (("Cp (pad to device ground)", "cp_pf", "pF", 1.0),
                                    ("with finger", "cp_touched_pf", "pF", 1.0),
                                    ("delta C", "delta_c_pf", "pF", 1.0),
                                    ("delta C / Cp", "delta_ratio", "%", 100.0)):
        lines.append(f"{label:27}{rec[key] * scale:7.4f} {unit:2}{precise[key] * scale:10.4f} "
                     f"{unit:2}{_pct(change[key]):>10}")
    lines.append("")
    lines += _matrix_lines("field matrix, no finger (pF, reference: earth), quick", rec["matrix"])
    lines += _matrix_lines("field matrix, no finger, precise 3-D", precise["matrix"])
    if rec["matrix_with_finger"] is not None:
        lines += _matrix_lines("field matrix, with finger, quick", rec["matrix_with_finger"])
    if precise["matrix_with_finger"] is not None:
        lines += _matrix_lines("field matrix, with finger, precise 3-D",
                               precise["matrix_with_finger"])
    return lines


def _matrix_lines(title: str, matrix: dict[str, Any]) -> list[str]:
    names = matrix["conductors"]
    lines = [title, "         " + "".join(f"{n:>10}" for n in names)]
    for name, row in zip(names, matrix["pf"], strict=True):
        lines.append(f"{name:>9}" + "".join(f"{v:10.4f}" for v in row))
    return lines + [""]

