"""``footprint`` (6+) and ``module`` (≤ 5) with their children.

Children other than zones are footprint-local and placed with
board = (Fx, Fy) + R(Fa)·(x, y) (kicad-format.md §7); zones inside a
footprint are already in board coordinates (§0.2). Back-side footprints are
stored mirrored already, so nothing is mirrored here (§0.3).
"""

from __future__ import annotations

from collections.abc import Callable

from auditor.model.items import CopperShape, Footprint, Pad
from auditor.read.context import ReadContext, atoms, children, find, text_of
from auditor.read.pads import read_pad
from auditor.read.parts import BoardParts, EdgePiece
from auditor.read.sexpr import Node
from auditor.read.shapes import kind_of, read_shape
from auditor.read.zones import read_zone

#: Footprint children with no copper or outline meaning.
_IGNORED = frozenset({
    "layer", "at", "tedit", "tstamp", "uuid", "descr", "tags", "path", "attr", "locked",
    "placed", "model", "group", "dimension", "private_layers", "net_tie_pad_groups",
    "embedded_files", "embedded_fonts", "component_classes", "variant", "units", "stackup",
    "point", "sheetname", "sheetfile", "solder_mask_margin", "solder_paste_margin",
    "solder_paste_ratio", "solder_paste_margin_ratio", "clearance", "zone_connect",
    "thermal_width", "thermal_gap", "autoplace_cost90", "autoplace_cost180",
    "fp_text_box", "property", "fp_text", "duplicate_pad_numbers_are_jumpers",
    "jumper_pad_groups", "table", "image", "barcode", "generator", "version", "fp_image",
})


class _Placement:
    """A footprint's frame while its children are read."""

    def __init__(self, uid: str, ref: str, at: tuple[float, float, float]) -> None:
        self.uid, self.ref, self.at = uid, ref, at
        self.pads: list[Pad] = []
        self.graphics: list[CopperShape] = []


def _texts(node: Node) -> tuple[str, str, list[tuple[str, str]]]:
    ref = value = ""
    props: list[tuple[str, str]] = []
    for child in children(node):
        if child.head == "property" and len(child) > 2:
            key, val = str(child[1]), str(child[2])
            props.append((key, val))
            ref = val if key == "Reference" else ref
            value = val if key == "Value" else value
        elif child.head == "fp_text" and len(child) > 2:
            if child[1] == "reference":
                ref = str(child[2])
            elif child[1] == "value":
                value = str(child[2])
    keys = {key for key, _ in props}
    # ≤ 7 writes them as fp_text; offer them as properties in every version
    props = [(k, v) for k, v in (("Reference", ref), ("Value", value)) if k not in keys] + props
    return ref, value, props


def read_footprint(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    """Read a footprint and add it (and its zones and edges) to ``parts``."""
    at = find(node, "at")
    if at is None:
        raise ctx.error(node, f"'{node.head}' has no (at …)")
    fx, fy = ctx.xy(at)
    line, column = ctx.place(node)  # before its pads: items are located in file order
    placement_at = (fx, fy, ctx.num(at, 3, 0.0))
    ref, value, props = _texts(node)
    uid = parts.unique_uid(ref)
    frame = _Placement(uid, ref, placement_at)
    for child in children(node, 2):
        handler = _CHILD.get(child.head)
        if handler is not None:
            handler(child, ctx, parts, frame)
        elif kind_of(child.head) is not None and child.head.startswith("fp_"):
            _shape(child, ctx, parts, frame)
        elif child.head not in _IGNORED:
            ctx.skipped(node.head, child)
    lib_id = node[1] if len(node) > 1 and isinstance(node[1], str) else ""
    layer = text_of(find(node, "layer"), ctx.copper_layers[0])
    attr = find(node, "attr")
    parts.footprints.append(Footprint(
        uid=uid, ref=ref, value=value, lib_id=lib_id, x_mm=fx, y_mm=fy,
        angle_deg=placement_at[2], side="back" if _is_back(layer, ctx) else "front",
        attributes=tuple(atoms(attr)) if attr is not None else (),
        properties=tuple(props), pads=tuple(frame.pads), graphics=tuple(frame.graphics),
        source_line=line, source_column=column))


def _is_back(layer: str, ctx: ReadContext) -> bool:
    return layer.startswith("B.") or (len(ctx.copper_layers) > 1
                                      and layer == ctx.copper_layers[-1])


def _pad(node: Node, ctx: ReadContext, parts: BoardParts, frame: _Placement) -> None:
    frame.pads.append(read_pad(node, ctx, frame.uid, frame.ref, frame.at))


def _zone(node: Node, ctx: ReadContext, parts: BoardParts, frame: _Placement) -> None:
    zone = read_zone(node, ctx, frame.uid)  # board coordinates already (§0.2)
    if zone is not None:
        parts.zones.append(zone)


def _shape(node: Node, ctx: ReadContext, parts: BoardParts, frame: _Placement) -> None:
    kind = kind_of(node.head)
    assert kind is not None
    spec = read_shape(node, kind, ctx)
    if spec is None:
        return
    fx, fy, fa = frame.at
    if "Edge.Cuts" in spec.layers:
        parts.edges.append(EdgePiece(spec.placed_path(fa, fx, fy), spec.closed))
    copper = [layer for layer in spec.layers if ctx.is_copper(layer)]
    if not copper:
        return
    geometry = spec.geometry(fa, fx, fy)
    net = ctx.net_of(spec.net_node)
    for layer in copper:
        frame.graphics.append(CopperShape(layer, net, geometry, kind, frame.uid))


def _text(node: Node, ctx: ReadContext, parts: BoardParts, frame: _Placement) -> None:
    layer = find(node, "layer")
    if layer is not None and ctx.is_copper(text_of(layer)):
        parts.copper_text += 1


_CHILD: dict[str, Callable[[Node, ReadContext, BoardParts, _Placement], None]] = {
    "pad": _pad,
    "zone": _zone,
    "fp_text": _text,
}
