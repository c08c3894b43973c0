"""The physical stackup from ``(setup (stackup …))``, or KiCad's defaults.

Defaults (kicad-format.md §5, from KiCad's stackup_predefined_prms.h /
board_stackup.cpp [S11]): FR-4 dielectric εr 4.5, copper 35 µm, solder mask
10 µm with εr 3.3. The dielectric between copper layers takes what is left of
the board thickness, split evenly (common practice, no source).
"""

from __future__ import annotations

from auditor.model.items import Stackup, StackupLayer
from auditor.read.context import ReadContext, children, find, text_of
from auditor.read.sexpr import Node

FR4_EPSILON_R = 4.5
COPPER_MM = 0.035
MASK_MM = 0.010
MASK_EPSILON_R = 3.3
DEFAULT_THICKNESS_MM = 1.6
DEFAULT_ORIGIN = ("KiCad default stackup (FR-4 εr 4.5, 35 µm copper, 10 µm mask εr 3.3; from "
                  "KiCad source pcbnew/board_stackup_manager/stackup_predefined_prms.h, "
                  "see docs/reference/kicad-format.md §5 [S11])")

_KINDS = {"copper": "copper", "core": "dielectric", "prepreg": "dielectric"}


def _kind(type_name: str) -> str:
    lowered = type_name.lower()
    if lowered in _KINDS:
        return _KINDS[lowered]
    for word, kind in (("mask", "mask"), ("silk", "silk"), ("paste", "paste")):
        if word in lowered:
            return kind
    return "dielectric"


def read_stackup(node: Node, ctx: ReadContext, thickness_mm: float | None) -> Stackup:
    """The stackup list, top to bottom; sub-layers become extra entries."""
    rows: list[StackupLayer] = []
    for layer in children(node):
        if layer.head != "layer":
            continue
        kind = _kind(text_of(find(layer, "type")))
        if kind in ("silk", "paste"):
            continue
        rows.extend(_rows(layer, ctx, kind))
    total = sum(r.thickness_mm for r in rows)
    return Stackup(tuple(rows), thickness_mm if thickness_mm else total, True,
                   "board file stackup")


def _rows(layer: Node, ctx: ReadContext, kind: str) -> list[StackupLayer]:
    name = text_of(layer)
    default_er = {"mask": MASK_EPSILON_R, "dielectric": FR4_EPSILON_R}.get(kind, 1.0)
    groups: list[list[Node]] = [[]]
    for item in layer[2:]:
        if item == "addsublayer":
            groups.append([])
        elif isinstance(item, Node):
            groups[-1].append(item)
    out = []
    for group in groups:
        values = {c.head: c for c in group}
        thickness = ctx.num(values["thickness"], 1) if "thickness" in values else 0.0
        eps = ctx.num(values["epsilon_r"], 1) if "epsilon_r" in values else default_er
        material = text_of(values.get("material"))
        out.append(StackupLayer(name, kind, thickness, material, eps))
    return out


def default_stackup(copper_layers: tuple[str, ...], thickness_mm: float | None) -> Stackup:
    """KiCad's default stack for this copper count and board thickness."""
    board = thickness_mm if thickness_mm and thickness_mm > 0 else DEFAULT_THICKNESS_MM
    n = len(copper_layers)
    dielectric = max(board - n * COPPER_MM, 0.0) / max(n - 1, 1)
    rows = [StackupLayer("F.Mask", "mask", MASK_MM, "", MASK_EPSILON_R)]
    for i, name in enumerate(copper_layers):
        rows.append(StackupLayer(name, "copper", COPPER_MM))
        if i < n - 1:
            rows.append(StackupLayer(f"dielectric {i + 1}", "dielectric", dielectric, "FR4",
                                     FR4_EPSILON_R))
    rows.append(StackupLayer("B.Mask", "mask", MASK_MM, "", MASK_EPSILON_R))
    return Stackup(tuple(rows), board, False, DEFAULT_ORIGIN)
