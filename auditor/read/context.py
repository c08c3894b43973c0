"""State shared by the token handlers while one board is read.

:class:`ReadContext` knows the file (for error positions), the format version,
the copper stack, the net table and collects :class:`ReadWarning` records.
Small accessors (:meth:`ReadContext.num`, :meth:`ReadContext.xy`) turn atoms
into checked numbers so that a bad number anywhere is a located
:class:`BoardFileError`, never a ``ValueError``.
"""

from __future__ import annotations

import math
from collections.abc import Iterator
from dataclasses import dataclass, field
from pathlib import Path

from auditor.errors import BoardFileError
from auditor.model.items import ReadWarning
from auditor.read.sexpr import Locator, Node

#: Larger than any board (KiCad itself clamps coordinates to ±2^31 nm ≈ ±2147 mm,
#: kicad-format.md §1 [S4]); anything beyond is corrupt data, not a design.
ABSURD_MM = 1.0e5

#: KiCad 10 stopped writing net codes (kicad-format.md §2: 20251028).
NETS_BY_NAME_FROM = 20251028

#: The newest format this reader was written against (KiCad 10, [S5]).
NEWEST_KNOWN = 20260206

COPPER_TYPES = frozenset({"signal", "power", "mixed", "jumper"})


@dataclass
class ReadContext:
    """Mutable reading state for one file (never escapes the read stage)."""

    path: str
    locator: Locator
    version: int = 20201115  # "missing (version) means ≤ 20201115" (§2 [S4])
    copper_layers: tuple[str, ...] = ("F.Cu", "B.Cu")
    all_layers: tuple[str, ...] = ()
    net_codes: dict[str, str] = field(default_factory=dict)
    net_names: list[str] = field(default_factory=list)
    warnings: list[ReadWarning] = field(default_factory=list)
    _skipped: dict[tuple[str, str], list[int]] = field(default_factory=dict)
    _net_seen: set[str] = field(default_factory=set)
    shape_cache: dict[object, object] = field(default_factory=dict)
    _names: dict[str, str] = field(default_factory=dict)
    _copper_set: frozenset[str] = frozenset({"F.Cu", "B.Cu"})

    # -- errors and warnings -------------------------------------------------
    def error(self, node: Node | None, message: str) -> BoardFileError:
        """A located error for ``node`` (file level when ``node`` is None)."""
        if node is None:
            return BoardFileError(self.path, message)
        line, col = self.locator.of_token(node.token)
        return BoardFileError(self.path, message, line, col)

    def warn(self, code: str, message: str, node: Node | None = None) -> None:
        """Record that something was skipped, guessed or approximated."""
        line = col = None
        if node is not None:
            line, col = self.locator.of_token(node.token)
        self.warnings.append(ReadWarning(code, message, line, col))

    def place(self, node: Node) -> tuple[int, int]:
        """1-based line and column where ``node`` starts in the file (kept on
        the board's items, so a report can point at them)."""
        return self.locator.of_token(node.token)

    def skipped(self, where: str, node: Node) -> None:
        """Note an unknown token; reported once per kind by :meth:`finish`."""
        self._skipped.setdefault((where, node.head or "?"), []).append(node.token)

    def finish(self) -> tuple[ReadWarning, ...]:
        """All warnings, unknown tokens summarised, in a stable order."""
        out = list(self.warnings)
        for (where, head), tokens in sorted(self._skipped.items()):
            line, col = self.locator.of_token(tokens[0])
            times = f" ({len(tokens)} times)" if len(tokens) > 1 else ""
            out.append(ReadWarning("unknown-token",
                                   f"skipped unknown '{head}' in {where}{times}", line, col))
        return tuple(out)

    # -- atoms ---------------------------------------------------------------
    def num(self, node: Node, index: int, default: float | None = None) -> float:
        """``node[index]`` as a finite number of sane size."""
        if index >= len(node) or not isinstance(node[index], str):
            if default is not None:
                return default
            raise self.error(node, f"'{node.head}' is missing a number")
        text = node[index]
        try:
            value = float(text)
        except ValueError:
            raise self.error(node, f"'{node.head}': expected a number, got {text[:40]!r}") \
                from None
        if not math.isfinite(value) or abs(value) > ABSURD_MM:
            raise self.error(node, f"'{node.head}': number out of range: {text[:40]}")
        return value

    def dimension(self, node: Node, index: int, item: Node, zero_ok: bool = False,
                  default: float = 0.0) -> float:
        """``node[index]`` as a width, size or radius of ``item`` (mm).

        KiCad never writes one that is not a positive finite number (zero is
        allowed where ``zero_ok``: a filled shape's pen). Anything else is a
        ``bad-size`` warning on ``item`` and reads as 0, so the lost copper is
        reported (``read-incomplete``) rather than silently dropped.
        """
        if index >= len(node) or not isinstance(node[index], str):
            return default
        text = node[index]
        try:
            value = float(text)
        except ValueError:
            raise self.error(node, f"'{node.head}': expected a number, got {text[:40]!r}") \
                from None
        if math.isfinite(value) and (value > 0 or (zero_ok and value == 0)):
            if value > ABSURD_MM:
                raise self.error(node, f"'{node.head}': number out of range: {text[:40]}")
            return value
        self.warn("bad-size", f"'{item.head}' with {node.head} {text[:20]}: not a positive "
                  "size, its copper is not modelled", item)
        return 0.0

    def size_of(self, item: Node, key: str) -> float:
        """The :meth:`dimension` of an item's ``(key N)`` child (0 when absent)."""
        found = find(item, key)
        if found is None or len(found) < 2:
            return 0.0
        return self.dimension(found, 1, item)

    def xy(self, node: Node) -> tuple[float, float]:
        """The two numbers of ``(at x y …)``, ``(start x y)``, ``(xy x y)`` …"""
        return self.num(node, 1), self.num(node, 2)

    def value_of(self, node: Node, key: str, default: float = 0.0) -> float:
        """The number of a ``(key N)`` child, or ``default`` when absent."""
        found = find(node, key)
        if found is None or len(found) < 2:
            return default
        return self.num(found, 1)

    def int_(self, node: Node, index: int, default: int = 0) -> int:
        """An integer atom (priorities, counts)."""
        return int(self.num(node, index, float(default)))

    # -- nets ----------------------------------------------------------------
    def net_of(self, node: Node | None) -> str:
        """The net name an item's ``(net …)`` child refers to (``""`` if none).

        Accepts ``(net 7)`` via the net table, ``(net 7 "GND")`` (the name
        wins, as KiCad checks it) and KiCad 10's ``(net "GND")``.
        """
        if node is None or len(node) < 2:
            return ""
        if len(node) >= 3 and isinstance(node[2], str):
            return self.canonical(node[2])
        token = node[1]
        if not isinstance(token, str):
            return ""
        if self.version >= NETS_BY_NAME_FROM or not self.net_codes:
            if token.lstrip("-").isdigit() and token in self.net_codes:
                return self.net_codes[token]
            return "" if token == "0" and not self.net_codes else self.canonical(token)
        name = self.net_codes.get(token)
        if name is None:
            self.warn("unknown-net-code", f"net code {token} is not in the net table", node)
            return ""
        return name

    def add_net(self, name: str) -> None:
        """Remember a net name (first seen order)."""
        if name and name not in self._net_seen:
            self._net_seen.add(name)
            self.net_names.append(name)

    # -- layers --------------------------------------------------------------
    def expand_layers(self, names: list[str]) -> list[str]:
        """Expand KiCad layer wildcards (§4): ``*.Cu``, ``*In.Cu``, ``F&B.Cu``,
        ``*.Mask`` …; names are kept in the order given, without repeats."""
        out: list[str] = []
        for name in names:
            for layer in self._expand_one(name):
                if layer not in out:
                    out.append(layer)
        return out

    def _expand_one(self, name: str) -> list[str]:
        cu = self.copper_layers
        if name == "*.Cu":
            return list(cu)
        if name == "*In.Cu":
            return list(cu[1:-1])
        if name == "F&B.Cu":
            return [cu[0], cu[-1]] if len(cu) > 1 else list(cu)
        if name.startswith("*."):
            return [f"F.{name[2:]}", f"B.{name[2:]}"]
        if name.startswith("F&B."):
            return [f"F.{name[4:]}", f"B.{name[4:]}"]
        return [name]

    def canonical(self, text: str) -> str:
        """One shared string object per distinct layer or net name (every
        token is a fresh string; thousands of items repeat the same names)."""
        return self._names.setdefault(text, text)

    def set_copper(self, layers: tuple[str, ...]) -> None:
        """Fix the copper stack (front first)."""
        self.copper_layers = layers
        self._copper_set = frozenset(layers)

    def is_copper(self, layer: str) -> bool:
        """True for a copper layer of this board."""
        return layer in self._copper_set


def find(node: Node, key: str) -> Node | None:
    """The first child list whose keyword is ``key``."""
    for item in node:
        if isinstance(item, Node) and item and item[0] == key:
            return item
    return None


def children(node: Node, start: int = 1) -> Iterator[Node]:
    """Child lists of ``node``."""
    for item in node[start:]:
        if isinstance(item, Node):
            yield item


def atoms(node: Node, start: int = 1) -> list[str]:
    """The bare atoms of ``node`` after its keyword."""
    return [item for item in node[start:] if isinstance(item, str)]


def flag(node: Node, key: str) -> bool:
    """A KiCad boolean in any of its spellings: bare ``key``, ``(key)``,
    ``(key yes)`` (``(key no)`` is false). §1 [S4 parseMaybeAbsentBool]."""
    for item in node[1:]:
        if item == key:
            return True
        if isinstance(item, Node) and item and item[0] == key:
            return len(item) < 2 or item[1] not in ("no", "false")
    return False


def text_of(node: Node | None, default: str = "") -> str:
    """``node[1]`` as text, or ``default``."""
    if node is None or len(node) < 2 or not isinstance(node[1], str):
        return default
    return node[1]


def source_path(path: str | Path) -> str:
    """The path as given, for messages."""
    return str(path)
