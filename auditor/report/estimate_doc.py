"""The ``padaudit estimate`` document (one pad or a sweep) and its text layout.

A record per pad diameter holds Cp, Cp with the finger, ΔC, ΔC/Cp and both
capacitance matrices, rounded to :data:`DECIMALS` places; with ``--precise``
it also holds the 3-D result and the change from the quick one in percent.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from auditor.field.api import PadSetup, PadSolve
from auditor.field.matrix import CapacitanceMatrix
from auditor.report.rounding import rounded, rounded_tree

DECIMALS = 6
#: Places of the quick-to-precise change, in percent.
_CHANGE_DECIMALS = 4


def _matrix(matrix: CapacitanceMatrix | None) -> dict[str, Any] | None:
    if matrix is None:
        return None
    return {"conductors": list(matrix.names), "pf": rounded_tree(matrix.values_pf, DECIMALS)}


def estimate_record(diameter_mm: float, solve: PadSolve) -> dict[str, Any]:
    """One pad's quick solve as JSON-ready data."""
    return {
        "pad_diameter_mm": rounded(diameter_mm, DECIMALS),
        "cp_pf": rounded(solve.cp_total_pf, DECIMALS),
        "cp_touched_pf": rounded(solve.cp_touched_pf, DECIMALS),
        "delta_c_pf": rounded(solve.delta_c_pf, DECIMALS),
        "delta_ratio": rounded(solve.delta_ratio, DECIMALS),
        "matrix": _matrix(solve.matrix), "matrix_with_finger": _matrix(solve.matrix_with_finger),
        "notes": list(solve.notes)}


def _change_pct(precise: float, quick: float) -> float | None:
    return rounded((precise / quick - 1.0) * 100.0, _CHANGE_DECIMALS) if quick else None


def with_precise(record: dict[str, Any], solve: PadSolve) -> dict[str, Any]:
    """The quick record with the precise one beside it and their difference."""
    precise = estimate_record(record["pad_diameter_mm"], solve)
    del precise["pad_diameter_mm"]
    precise["change_pct"] = {key: _change_pct(precise[key], record[key])
                             for key in ("cp_pf", "cp_touched_pf", "delta_c_pf", "delta_ratio")}
    return {**record, "method": "quick", "precise": precise}


def estimate_document(records: Sequence[dict[str, Any]], overlay_label: str,
                      cautions: Sequence[str]) -> dict[str, Any]:
    """The ``estimate --json`` document: one record, or ``sweep`` for several."""
    document: dict[str, Any] = (dict(records[0]) if len(records) == 1
                                else {"sweep": list(records)})
    document["overlay"] = overlay_label
    document["cautions"] = list(cautions)
    return document


def estimate_text(records: Sequence[dict[str, Any]], setup: PadSetup, overlay_label: str,
                  cautions: Sequence[str]) -> str:
    """The plain-text layout: the described stack, the results, the model notes."""
    return "\n".join(_text(list(records), setup, overlay_label) + list(cautions)) + "\n"


def _text(records: list[dict[str, Any]], setup: PadSetup, overlay_label: str) -> list[str]:
    plane = ("none" if setup.plane_depth_mm is None
             else f"{setup.plane_depth_mm:g} mm below, fill {setup.plane_fill:g}")
    gap = "none" if setup.gap_mm is None else f"{setup.gap_mm:g} mm"
    if setup.gap_mm is not None and setup.ground_fill < 1.0:
        gap += f" (fill {setup.ground_fill:g})"
    finger = ("none" if setup.finger_diameter_mm is None
              else f"{setup.finger_diameter_mm:g} mm, {setup.finger_height_mm:g} mm above")
    lines = [f"overlay  {setup.overlay_mm:g} mm, {overlay_label}",
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


__all__ = ["DECIMALS", "estimate_document", "estimate_record", "estimate_text",
           "with_precise"]
