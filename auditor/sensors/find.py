"""Find the sense electrodes on a board, and say why each was picked.

Cues, strongest first (each sensor's ``reason`` names the one that decided):

1. configuration: net globs, net classes, footprint references, library ids
   or properties, zone names;
2. a net class named for touch (``Touch``, ``Touch_Keys`` ...);
3. a strong word in the net name or the electrode footprint's library id
   (``TOUCH3``, ``Touchpad:TP_10mm``);
4. a weak word in the net name (``BTN2``, ``KEY_3``, ``TP4``) *and* the net's
   structure (below);
5. structure alone: large outer-layer copper on a net that otherwise reaches
   only a controller pin, directly or through one two-terminal part.

Thresholds are ``SensorSelection.min_area_mm2`` (structure alone) and
``cue_min_area_mm2`` (with a cue). Copper on a named net that misses them, and
structural candidates that miss by less than half, come back as rejects.
"""

from __future__ import annotations

from collections.abc import Sequence

from auditor.model.board import Board
from auditor.model.items import NetClass
from auditor.sensors.cues import is_ground_name, name_cue
from auditor.sensors.late import LateJudgements
from auditor.sensors.matrix import key_footprints
from auditor.sensors.model import Rejected as Rejected  # re-exported: callers import it here
from auditor.sensors.model import Sensor
from auditor.sensors.pieces import (
    Piece,
    outer_layers,
    pads_by_net,
    pieces_on,
    without_far_side_twins,
)
from auditor.sensors.reach import reach_of
from auditor.sensors.roles import is_electrode_part, part_pads_only
from auditor.sensors.selection import SensorSelection, matches
from auditor.sensors.shaping import Candidate, shaped_sensors
from auditor.sensors.siblings import SIBLING_FLOOR_MM2
from auditor.sensors.spatial import net_copper_area

#: Nets with more pads than this are supply or bus nets, never one electrode.
MAX_PADS_ON_SENSE_NET = 12




def find_sensors(board: Board, selection: SensorSelection | None = None,
                 netclasses: Sequence[NetClass] | None = None
                 ) -> tuple[tuple[Sensor, ...], tuple[Rejected, ...]]:
    """The electrodes on ``board`` and the near misses.

    Parameters
    ----------
    board:
        The board model.
    selection:
        What configuration says; defaults find electrodes automatically.
    netclasses:
        Net classes to use; ``None`` takes the board's (its own and its
        project file's, both loaded by ``read_board``).

    Returns
    -------
    (sensors, rejects)
        Sensors sorted by name (paths and surroundings not yet measured; see
        :func:`auditor.sensors.measure`), rejects sorted by net.
    """
    sel = selection or SensorSelection()
    classes = tuple(netclasses) if netclasses is not None else board.netclasses
    finder = _Finder(board, sel, classes)
    return finder.run()


def classes_of(net: str, classes: Sequence[NetClass]) -> tuple[str, ...]:
    """Names of the classes ``net`` belongs to (by listing or pattern)."""
    return tuple(sorted({c.name for c in classes
                         if net in c.nets or (c.patterns and matches(net, c.patterns))}))


def ground_net(board: Board, selection: SensorSelection) -> str:
    """The device ground: the configured one, else the ground-named net with most copper."""
    names = [n for n in board.nets if matches(n, selection.ground_nets)] \
        if selection.ground_nets else [n for n in board.nets if is_ground_name(n)]
    if len(names) <= 1:
        return names[0] if names else ""
    return max(sorted(names), key=lambda n: net_copper_area(board, n))


class _Finder(LateJudgements):
    def __init__(self, board: Board, sel: SensorSelection, classes: tuple[NetClass, ...]):
        self.board, self.sel, self.classes = board, sel, classes
        self.grounds = {n for n in board.nets if is_ground_name(n)
                        or (sel.ground_nets and matches(n, sel.ground_nets))}
        self.accepted: list[Candidate] = []
        self.rejects: list[Rejected] = []
        self.small: list[tuple[Piece, str]] = []  # touch-named pads under the floor
        self.keys = key_footprints(board, sel.cue_min_area_mm2) if sel.automatic else {}
        self.key_nets = {n for pair in self.keys.values() for n in pair.split("+")}
        self.net_uids: tuple[str, ...] = ()
        self.unreached: list[Piece] = []  # large copper whose net reaches no single pin

    def run(self) -> tuple[tuple[Sensor, ...], tuple[Rejected, ...]]:
        by_net: dict[str, list[Piece]] = {}
        for piece in self._pieces():
            by_net.setdefault(piece.net, []).append(piece)
        for net in sorted(by_net):
            self._judge_net(net, sorted(by_net[net], key=lambda p: -p.area_mm2))
        self.judge_late()
        sensors = shaped_sensors(self.board, self.sel, self.accepted)
        return sensors, tuple(sorted(self.rejects, key=lambda r: (r.net, r.layer, r.x_mm)))

    def _pieces(self) -> list[Piece]:
        pad_counts = {net: len(pads) for net, pads in pads_by_net(self.board).items()}
        nets = {n for n in self.board.nets if n and n not in self.grounds
                and not matches(n, self.sel.exclude_nets)
                and (pad_counts.get(n, 0) <= MAX_PADS_ON_SENSE_NET or self._net_config(n)
                     or n in self.key_nets)}
        found: list[Piece] = []
        if not self.board.copper_layers:
            return found
        for layer in outer_layers(self.board):
            found.extend(pieces_on(self.board, layer, nets))
        return without_far_side_twins(found, self.board.copper_layers[0])

    def _net_config(self, net: str) -> str:
        sel = self.sel
        for label, globs in (("net", sel.nets), ("mutual transmit", sel.mutual_tx),
                             ("mutual receive", sel.mutual_rx), ("proximity", sel.proximity)):
            hit = next((g for g in globs if matches(net, [g])), None)
            if hit:
                return f"configured {label} pattern {hit!r}"
        for kind, groups in (("slider", sel.sliders), ("wheel", sel.wheels)):
            for group, globs in groups:
                if matches(net, globs):
                    return f"configured {kind} {group!r}"
        cls = next((c for c in classes_of(net, self.classes) if matches(c, sel.net_classes)),
                   None)
        return f"configured net class {cls!r}" if cls else ""

    def _piece_config(self, piece: Piece) -> str:
        sel = self.sel
        for uid in piece.footprint_uids:
            fp = self.board.footprint(uid)
            if sel.refs and matches(fp.ref, sel.refs):
                return f"configured reference {fp.ref}"
            if sel.lib_ids and matches(fp.lib_id, sel.lib_ids):
                return f"configured library id {fp.lib_id}"
            for key, glob in sel.properties:
                value = fp.property(key)
                if value is not None and matches(value, [glob]):
                    return f"configured property {key}={value}"
        zone = next((z for z in piece.zones if z.name and matches(z.name, sel.zones)), None)
        return f"configured zone {zone.name!r}" if zone and sel.zones else ""

    def _judge_net(self, net: str, pieces: list[Piece]) -> None:
        net_reason = self._net_config(net)
        taken = [p for p in pieces if self._piece_config(p)]
        for piece in taken:
            self._accept(piece, self._piece_config(piece))
        rest = [p for p in pieces if p not in taken]
        if net_reason:
            self._judge_configured(net, rest, net_reason)
        elif self.sel.automatic and not taken:
            self._judge_auto(net, rest)

    def _is_never_electrode(self, piece: Piece) -> bool:
        """Pads only, all of controllers, connectors or modules, and smaller than
        an electrode found by structure (a many-pad footprint of large pads with
        no words is an electrode footprint, not a controller)."""
        return set(piece.sources) <= {"pad", "custom pad"} \
            and piece.area_mm2 < self.sel.min_area_mm2 and part_pads_only(
            self.board, piece.pads, self.sel.controller_min_pads)

    def _judge_configured(self, net: str, pieces: list[Piece], reason: str) -> None:
        pieces = [p for p in pieces if not self._is_never_electrode(p)]
        big = [p for p in pieces if p.area_mm2 >= self.sel.cue_min_area_mm2]
        if not big and pieces and not self._is_part_pad(pieces[0]):
            big = pieces[:1]
        for piece in big:
            self._accept(piece, reason)
        if not big and pieces:
            self._reject(pieces[0], f"{reason}, but the net has no electrode copper "
                         f"(largest piece {pieces[0].area_mm2:.1f} mm² is a part's pad)")

    def _is_part_pad(self, piece: Piece) -> bool:
        return bool(piece.pads) and len(piece.sources) == 1 and all(
            len(self.board.footprint(uid).pads) >= 2 for uid in piece.footprint_uids)

    def _judge_auto(self, net: str, pieces: list[Piece]) -> None:
        pieces = [p for p in pieces if not self._is_never_electrode(p)]
        cue, strong = self._cue(net, pieces[0] if pieces else None)
        # Pieces of one net (a slider's split ends) are not parts to each other.
        self.net_uids = tuple(sorted({u for p in pieces if p.area_mm2 >= self.sel.cue_min_area_mm2
                                      or not self._is_part_pad(p) for u in p.footprint_uids}))
        took = False
        for piece in pieces:
            # A piece's own footprint words name it better than the net's first piece's.
            own = self._cue(net, piece) if piece is not pieces[0] else (cue, strong)
            took |= self._judge_auto_piece(piece, *(own if own[0] else (cue, strong)))
        if cue and not took and pieces:
            top = pieces[0]
            if top.area_mm2 < self.sel.cue_min_area_mm2 and not self._is_part_pad(top) \
                    and top.area_mm2 >= SIBLING_FLOOR_MM2:
                self.small.append((top, cue))
            elif top.area_mm2 < self.sel.cue_min_area_mm2 and not self._is_part_pad(top):
                self._reject(top, f"{cue}, but its largest copper is {top.area_mm2:.1f} mm² "
                             f"(needs {self.sel.cue_min_area_mm2:g} mm²)")

    def _judge_auto_piece(self, piece: Piece, cue: str, strong: bool) -> bool:
        sel = self.sel
        uids = piece.footprint_uids
        if uids and all(u in self.keys for u in uids) and piece.area_mm2 >= sel.cue_min_area_mm2:
            refs = ", ".join(self.board.footprint(u).ref for u in uids)
            self._accept(piece, f"{cue + '; ' if cue else ''}pad of key {refs} in a matrix of "
                         "pad pairs on row and column nets")
            return True
        reach = reach_of(self.board, piece.net, self.net_uids, sel)
        area = piece.area_mm2
        if cue and area >= sel.cue_min_area_mm2 and (strong or reach.ok):
            self._accept(piece, cue if reach.ok else f"{cue} ({reach.why})")
            return True
        if cue and area >= sel.cue_min_area_mm2:
            self._reject(piece, f"{cue}, but {reach.why}")
        elif area >= sel.min_area_mm2 and reach.ok:
            self._accept(piece, f"{area:.0f} mm² of {'/'.join(piece.sources)} on a net that "
                         f"{reach.why.removeprefix('net ')}")
            return True
        elif area >= sel.min_area_mm2 and len(reach.parts) <= 3 and not cue:
            self.unreached.append(piece)
            self._reject(piece, f"{area:.0f} mm² of copper, but {reach.why}")
        elif area >= 0.5 * sel.min_area_mm2 and reach.ok and not cue:
            self._reject(piece, f"{area:.1f} mm² is below the {sel.min_area_mm2:g} mm² "
                         "needed without a name cue")
        return False

    def _cue(self, net: str, piece: Piece | None) -> tuple[str, bool]:
        for cls in classes_of(net, self.classes):
            if name_cue(cls):
                return f"net class {cls!r}", True
        cue = name_cue(net)
        if cue:
            return f"net name has {cue.word!r}", cue.strong
        for uid in piece.owner_uids if piece else ():
            fp = self.board.footprint(uid)
            lib_cue = name_cue(fp.lib_id.split(":")[-1]) or name_cue(fp.value)
            ref_cue = name_cue(fp.ref)  # TOUCH3, SLIDER1: a reference prefix names it too
            if lib_cue and lib_cue.strong or is_electrode_part(fp) or (
                    ref_cue is not None and ref_cue.strong):
                return f"footprint {fp.ref} is {fp.lib_id or fp.value!r}", True
        return "", False

    def _accept(self, piece: Piece, reason: str) -> None:
        self.accepted.append(Candidate(piece, reason))

    def _reject(self, piece: Piece, why: str) -> None:
        c = piece.geometry.centroid
        refs = tuple(sorted({self.board.footprint(u).ref for u in piece.footprint_uids}))
        self.rejects.append(Rejected(piece.net, refs, piece.layer, round(piece.area_mm2, 6),
                                     round(c.x, 6), round(c.y, 6), why))
