"""Which footprints carry a courtyard outline.

The board model keeps copper only; KiCad's design-rule conditions, though,
find "what lies under a part" through its courtyard (``insideCourtyard``),
so the rule export needs to know which parts have one. A courtyard is any
footprint graphic on ``F.CrtYd`` or ``B.CrtYd``.

Examples
--------
>>> text = ('(kicad_pcb (footprint "X" (fp_text reference "E1") '
...         '(fp_circle (center 0 0) (end 5 0) (layer "F.CrtYd"))) '
...         '(footprint "Y" (property "Reference" "R1")))')
>>> sorted(courtyard_refs_in(text))
['E1']
"""

from __future__ import annotations

from pathlib import Path

from auditor.errors import BoardFileError
from auditor.read.sexpr import Node, decode, gc_paused, iter_top

_COURTYARD_LAYERS = frozenset({"F.CrtYd", "B.CrtYd"})
_FOOTPRINT_HEADS = frozenset({"footprint", "module"})


def courtyard_refs_in(text: str, path: str | Path = "<string>") -> frozenset[str]:
    """References of the footprints in a board's text that have a courtyard.

    Raises
    ------
    BoardFileError
        As the board reader does for text that is not an s-expression.
    """
    found: set[str] = set()
    with gc_paused():
        for node in iter_top(text, path):
            if isinstance(node, Node) and node.head in _FOOTPRINT_HEADS:
                ref = _reference(node)
                if ref and any(_on_courtyard(child) for child in node if isinstance(child, Node)):
                    found.add(ref)
    return frozenset(found)


def courtyard_refs(path: str | Path) -> frozenset[str]:
    """:func:`courtyard_refs_in` of a board file."""
    try:
        data = Path(path).read_bytes()
    except OSError as exc:
        raise BoardFileError(path, f"cannot read: {exc.strerror or exc}") from None
    return courtyard_refs_in(decode(data, path), path)


def _reference(footprint: Node) -> str:
    for child in footprint:
        if not isinstance(child, Node) or len(child) < 3:
            continue
        if (child.head == "fp_text" and child[1] == "reference") or (
                child.head == "property" and child[1] == "Reference"):
            return str(child[2])
    return ""


def _on_courtyard(graphic: Node) -> bool:
    if not graphic.head.startswith("fp_"):
        return False
    return any(isinstance(c, Node) and c.head == "layer" and len(c) > 1
               and c[1] in _COURTYARD_LAYERS for c in graphic)
