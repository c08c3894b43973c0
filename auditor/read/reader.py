"""``read_board``: a ``.kicad_pcb`` file (format 4 … 10) to a :class:`Board`.

Top-level tokens map to small handlers in two tables: :data:`_HEADER`
(version, layers, nets, setup …, which items refer to) and :data:`_ITEMS`.
Items are handled one by one as the parser completes them; a file whose
header comes after its items (KiCad does not promise the order) is read again
with the header first. Tokens with no copper meaning are in :data:`_IGNORED`;
anything else is skipped with an ``unknown-token`` warning, never silently.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from pathlib import Path

from shapely.errors import GEOSException

from auditor.errors import BoardFileError
from auditor.model.board import Board
from auditor.model.items import CopperShape, NetClass, Track
from auditor.read.context import (
    COPPER_TYPES,
    NEWEST_KNOWN,
    ReadContext,
    atoms,
    children,
    find,
    text_of,
)
from auditor.read.footprints import read_footprint
from auditor.read.kicad_pro import with_project_netclasses
from auditor.read.limits import check_item_count, read_limited
from auditor.read.outline import build_outline
from auditor.read.parts import BoardParts, EdgePiece
from auditor.read.sexpr import Locator, Node, decode, gc_paused, iter_top, parse
from auditor.read.shapes import kind_of, read_shape
from auditor.read.stackup import default_stackup, read_stackup
from auditor.read.tracks import finish_segments, read_arc, read_segment, read_via
from auditor.read.zones import read_zone

Handler = Callable[[Node, ReadContext, BoardParts], None]


def read_board(path: str | Path) -> Board:
    """Read a KiCad board file (never writes to it), with the net classes of
    the ``.kicad_pro`` project file beside it.

    Raises
    ------
    BoardFileError
        For a missing file, a directory, unreadable or non-UTF-8 content and
        anything :func:`read_board_text` rejects.
    """
    file = Path(path)
    if file.is_dir():
        raise BoardFileError(path, "is a directory, not a board file" + _boards_inside(file))
    try:
        data = read_limited(file)
    except FileNotFoundError:
        raise BoardFileError(path, "no such file") from None
    except OSError as exc:
        raise BoardFileError(path, f"cannot read: {exc.strerror or exc}") from None
    # KiCad 6+ keeps net classes in the project file: they belong to the board.
    return with_project_netclasses(read_board_text(decode(data, path), str(path)))


def _boards_inside(folder: Path) -> str:
    """A hint naming the boards in a folder given where a board was expected
    (a KiCad project folder, most likely)."""
    boards = sorted(folder.glob("*.kicad_pcb"))
    if not boards:
        return ""
    return "; pass the board inside it: " + ", ".join(str(b) for b in boards[:3]) + (
        ", ..." if len(boards) > 3 else "")


def read_board_text(text: str, path: str = "<string>") -> Board:
    """Read a board from its text; ``path`` is used in messages only.

    Top-level items are handled as the parser completes them and then
    dropped, so the whole file's tree never exists at once. KiCad writes the
    header (layers, nets, setup) before the items; a file that does not is
    read again with the whole tree in two passes.

    Examples
    --------
    >>> board = read_board_text('(kicad_pcb (version 20240108) (generator "pcbnew"))')
    >>> board.version, board.copper_layers
    (20240108, ('F.Cu', 'B.Cu'))
    """
    check_item_count(text, path)
    locator = Locator(text)
    try:
        with gc_paused():
            return _read(locator, path, iter_top(text, path, locator), streaming=True)
    except _HeaderAfterItems:
        root = parse(text, path)
        header = [n for n in root if not isinstance(n, Node) or n.head in _HEADER]
        rest = [n for n in root if isinstance(n, Node) and n.head not in _HEADER]
        return _read(locator, path, iter(header + rest), streaming=False)


class _HeaderAfterItems(Exception):
    """A header token came after items (not KiCad's order): re-read."""


def _read(locator: Locator, path: str, top: Iterator[str | Node], streaming: bool) -> Board:
    ctx = ReadContext(path=path, locator=locator)
    parts = BoardParts()
    head = next(top, None)
    if head != "kicad_pcb":
        shown = head if isinstance(head, str) else "(…)"
        raise BoardFileError(path, f"not a KiCad board (top-level '{str(shown)[:40]}')", 1, 1)
    current: Node | None = None
    seen_items = False
    try:
        for node in top:
            if not isinstance(node, Node):
                continue  # stray atoms at top level carry nothing
            current = node
            seen_items = _dispatch(node, ctx, parts, seen_items, streaming)
        current = None
        return _assemble(ctx, parts)
    except (ValueError, TypeError, IndexError, KeyError, AttributeError,
            GEOSException) as exc:
        # A malformed item that slipped past the checks: still a located,
        # one-line error about the file, not a traceback.
        what = current.head[:40] if current is not None else "board"
        raise ctx.error(current, f"cannot read '{what}': {exc}") from None


def _dispatch(node: Node, ctx: ReadContext, parts: BoardParts, seen_items: bool,
              streaming: bool) -> bool:
    header = _HEADER.get(node.head)
    if header is not None:
        if seen_items and streaming:
            raise _HeaderAfterItems
        header(node, ctx, parts)
        return seen_items
    item = _ITEMS.get(node.head)
    if item is not None:
        item(node, ctx, parts)
        return True
    if not _known(node.head):
        ctx.skipped("kicad_pcb", node)
    return seen_items


def _known(head: str) -> bool:
    return head in _IGNORED or head in _GR_NOT_COPPER


def _assemble(ctx: ReadContext, parts: BoardParts) -> Board:
    finish_segments(parts)
    tracks = tuple(t for t in parts.tracks if t is not None)
    if parts.stackup_node is not None:
        stackup = read_stackup(parts.stackup_node, ctx, parts.board_thickness_mm)
    else:
        stackup = default_stackup(ctx.copper_layers, parts.board_thickness_mm)
        ctx.warn("no-stackup", f"no stackup in the file; using {stackup.origin}")
    if parts.copper_text:
        ctx.warn("copper-text-skipped",
                 f"{parts.copper_text} text item(s) on copper not modelled as copper")
    return Board(
        path=ctx.path, version=ctx.version, generator=parts.generator,
        copper_layers=ctx.copper_layers, stackup=stackup, nets=_nets(ctx, parts, tracks),
        footprints=tuple(parts.footprints), tracks=tracks,
        vias=tuple(parts.vias), zones=tuple(parts.zones), graphics=tuple(parts.graphics),
        outline=build_outline(parts.edges), netclasses=tuple(parts.netclasses),
        warnings=ctx.finish())


def _nets(ctx: ReadContext, parts: BoardParts, tracks: tuple[Track, ...]) -> tuple[str, ...]:
    for fp in parts.footprints:
        for pad in fp.pads:
            ctx.add_net(pad.net)
    for named in (tracks, parts.vias, parts.zones, parts.graphics):
        for item in named:
            ctx.add_net(item.net)
    return tuple(ctx.net_names)


# -- header handlers ---------------------------------------------------------
def _version(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    token = text_of(node)
    if not token.isdigit() or len(token) > 8:
        raise ctx.error(node, f"unreadable format version {token[:20]!r}")
    ctx.version = int(token)
    if ctx.version > NEWEST_KNOWN:
        ctx.warn("newer-version", f"format {ctx.version} is newer than the newest known "
                 f"({NEWEST_KNOWN}); read best-effort", node)


def _generator(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    parts.generator = " ".join(atoms(node))


def _general(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    thickness = find(node, "thickness")
    if thickness is not None:
        parts.board_thickness_mm = ctx.num(thickness, 1)


def _layers(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    # Copper is identified by the entry's type, never its ordinal (§0.4):
    # KiCad 9 renumbered them.
    names: list[str] = []
    copper: list[str] = []
    for entry in children(node):
        words = atoms(entry, 0)
        if len(words) < 3:
            raise ctx.error(entry, "layer entry needs ordinal, name and type")
        names.append(words[1])
        if words[2] in COPPER_TYPES:
            copper.append(words[1])
    if not copper:
        raise ctx.error(node, "the layer table has no copper layer")
    ctx.all_layers = tuple(names)
    ctx.set_copper(tuple(copper))


def _net(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    if len(node) < 3 or not isinstance(node[1], str) or not isinstance(node[2], str):
        raise ctx.error(node, "net table entry needs a code and a name")
    ctx.net_codes[node[1]] = node[2]
    ctx.add_net(node[2])


def _net_class(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    name = text_of(node)
    nets = tuple(text_of(c) for c in children(node) if c.head == "add_net")
    parts.netclasses.append(NetClass(name, nets))


# -- item handlers -----------------------------------------------------------
def _footprint(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    read_footprint(node, ctx, parts)


def _zone(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    zone = read_zone(node, ctx)
    if zone is not None:
        parts.zones.append(zone)


def _graphic(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    kind = kind_of(node.head)
    assert kind is not None
    spec = read_shape(node, kind, ctx)
    if spec is None:
        return
    if "Edge.Cuts" in spec.layers:
        parts.edges.append(EdgePiece(spec.path, spec.closed))
    copper = [layer for layer in spec.layers if ctx.is_copper(layer)]
    if copper:
        geometry = spec.geometry()
        net = ctx.net_of(spec.net_node)
        parts.graphics.extend(CopperShape(layer, net, geometry, kind) for layer in copper)


def _gr_text(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    if ctx.is_copper(text_of(find(node, "layer"))):
        parts.copper_text += 1


def _setup(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    # The stackup is read at assembly (it needs general's thickness, which may
    # come later); KiCad ≤ 5 design rules in setup are not needed.
    parts.stackup_node = find(node, "stackup")


_HEADER: dict[str, Handler] = {
    "version": _version, "host": _generator, "generator": _generator,
    "general": _general, "layers": _layers, "net": _net, "net_class": _net_class,
    "setup": _setup,
}

_ITEMS: dict[str, Handler] = {
    "footprint": _footprint, "module": _footprint, "segment": read_segment,
    "arc": read_arc, "via": read_via, "zone": _zone,
    "gr_line": _graphic, "gr_arc": _graphic, "gr_circle": _graphic, "gr_rect": _graphic,
    "gr_poly": _graphic, "gr_curve": _graphic, "gr_text": _gr_text,
}

_GR_NOT_COPPER = frozenset({"gr_text_box", "gr_vector", "gr_bbox"})

#: Top-level tokens with no copper meaning (§3, §12).
_IGNORED = frozenset({
    "generator_version", "page", "paper", "title_block", "property", "group", "generated",
    "dimension", "target", "image", "table", "gr_text_box", "embedded_fonts",
    "embedded_files", "barcode", "point", "tstamp", "uuid", "teardrops",
})
