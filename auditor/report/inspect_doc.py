"""The ``padaudit inspect`` document (what the reader understood) and its
plain-text summary.

The JSON document is described in ``docs/inspect-json.md``. Keys are written
in a fixed order, floats rounded to :data:`DECIMALS` places, so the same
board always gives byte-identical output.
"""

from __future__ import annotations

from typing import Any, TextIO

from auditor.model.board import Board
from auditor.model.items import Pad
from auditor.report.rounding import rounded

DECIMALS = 6
#: Nets listed in the human summary before it says "… and N more".
SUMMARY_NETS = 30


def _r(value: float) -> float:
    return rounded(value, DECIMALS)


def _pad_entry(pad: Pad) -> dict[str, Any]:
    first = pad.copper[0].geometry.area if pad.copper else 0.0
    return {"ref": pad.ref, "footprint": pad.footprint_uid, "number": pad.number,
            "net": pad.net, "layers": list(pad.copper_layers), "x_mm": _r(pad.x_mm),
            "y_mm": _r(pad.y_mm), "copper_area_mm2": _r(first), "shape": pad.shape}


def inspect_document(board: Board) -> dict[str, Any]:
    """The ``inspect --json`` document (see docs/inspect-json.md)."""
    bbox = board.outline.bbox_mm
    return {
        "file": board.path,
        "version": board.version,
        "generator": board.generator,
        "copper_layers": list(board.copper_layers),
        "counts": {"footprints": len(board.footprints), "pads": len(board.pads),
                   "tracks": len(board.tracks), "vias": len(board.vias),
                   "zones": len(board.zones), "graphics": len(board.all_graphics)},
        "stackup": {
            "from_file": board.stackup.from_file, "origin": board.stackup.origin,
            "board_thickness_mm": _r(board.stackup.board_thickness_mm),
            "layers": [{"name": s.name, "kind": s.kind, "thickness_mm": _r(s.thickness_mm),
                        "material": s.material, "epsilon_r": _r(s.epsilon_r)}
                       for s in board.stackup.layers]},
        "pads": [_pad_entry(p) for p in board.pads],
        "nets": {name: {"track_length_mm": _r(board.track_graph(name).total_length_mm),
                        "vias": board.track_graph(name).via_count}
                 for name in sorted(board.nets)},
        "zones": [{"net": z.net, "layer": layer, "name": z.name,
                   "filled_area_mm2": _r(g.area if (g := z.fill_on(layer)) else 0.0),
                   "fill": z.fill, "rule_area": z.is_rule_area, "priority": z.priority}
                  for z in board.zones for layer in z.layers],
        "outline": {"bbox_mm": [_r(v) for v in bbox] if bbox else None,
                    "cutouts": len(board.outline.cutouts),
                    "open_ends": board.outline.open_ends},
        "warnings": [{"code": w.code, "message": w.message, "line": w.line,
                      "column": w.column} for w in board.warnings],
    }


def write_summary(board: Board, out: TextIO, colour: bool) -> None:
    """The human summary, plain text (bold headings when ``colour``)."""
    def head(text: str) -> str:
        return f"\033[1m{text}\033[0m" if colour else text

    doc = inspect_document(board)
    counts = doc["counts"]
    out.write(f"{head(board.path)}: KiCad board format {board.version}"
              f"{f' ({board.generator})' if board.generator else ''}\n")
    out.write(f"copper layers: {', '.join(board.copper_layers)}\n")
    out.write("items: " + ", ".join(f"{n} {k}" for k, n in counts.items()) + "\n")
    bbox = board.outline.bbox_mm
    if bbox:
        out.write(f"outline: {bbox[2]:.3f} x {bbox[3]:.3f} mm at ({bbox[0]:.3f}, "
                  f"{bbox[1]:.3f}), {len(board.outline.cutouts)} cut-out(s)\n")
    else:
        out.write("outline: none (no closed Edge.Cuts loop)\n")
    st = board.stackup
    out.write(head(f"stackup ({'from the file' if st.from_file else st.origin}), "
                   f"{st.board_thickness_mm:.3f} mm:") + "\n")
    for s in st.layers:
        material = f" {s.material}" if s.material else ""
        er = f"  εr {s.epsilon_r:.2f}" if s.kind != "copper" else ""
        out.write(f"  {s.name:<14} {s.kind:<10} {s.thickness_mm:.4f} mm{material}{er}\n")
    nets = doc["nets"]
    out.write(head(f"nets ({len(nets)}):") + "\n")
    for name in list(nets)[:SUMMARY_NETS]:
        info = nets[name]
        out.write(f"  {name}: {info['track_length_mm']:.3f} mm of track, "
                  f"{info['vias']} via(s)\n")
    if len(nets) > SUMMARY_NETS:
        out.write(f"  … and {len(nets) - SUMMARY_NETS} more (see --json)\n")
    out.write(head(f"warnings ({len(board.warnings)}):") + "\n")
    for w in board.warnings:
        where = f" (line {w.line})" if w.line is not None else ""
        out.write(f"  {w.code}{where}: {w.message}\n")


__all__ = ["DECIMALS", "SUMMARY_NETS", "inspect_document", "write_summary"]
