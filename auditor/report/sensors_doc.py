"""The ``padaudit sensors`` listing: its JSON document and its text layout.

Floats in the document are rounded to :data:`DECIMALS` places, so the same
board always gives byte-identical output.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from auditor.report.rounding import rounded_tree
from auditor.sensors.find import Rejected
from auditor.sensors.model import Sensor

DECIMALS = 4


def sensors_document(board_path: str, sensors: Sequence[Sensor],
                     rejects: Sequence[Rejected], notes: Sequence[str] = ()) -> dict[str, Any]:
    """The JSON document: ``board``, ``sensors``, ``rejected`` and ``notes``."""
    return {
        "board": board_path,
        "sensors": [sensor_record(s) for s in sensors],
        "rejected": [rounded_tree({"net": r.net, "refs": list(r.refs), "layer": r.layer,
                                   "area_mm2": r.area_mm2, "x_mm": r.x_mm, "y_mm": r.y_mm,
                                   "why": r.why}, DECIMALS) for r in rejects],
        "notes": list(notes),
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
    rounded: dict[str, Any] = rounded_tree(record, DECIMALS)
    return rounded


def sensors_text(board_path: str, sensors: Sequence[Sensor],
                 rejects: Sequence[Rejected], notes: Sequence[str] = ()) -> str:
    """The plain-text listing, notes last."""
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
    lines += [f"  note: {note}" for note in notes]
    return "\n".join(lines) + "\n"


__all__ = ["DECIMALS", "sensor_record", "sensors_document", "sensors_text"]
