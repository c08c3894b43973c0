"""The finder's late judgements: what can only be decided once every net has
been looked at (alike small pads, resistor chains) or lies outside the nets
(unfilled zones, net-less touch footprints)."""

from __future__ import annotations

from auditor.model.board import Board
from auditor.sensors.chain import resistor_chains
from auditor.sensors.cues import name_cue
from auditor.sensors.model import Rejected
from auditor.sensors.pieces import Piece, outer_layers
from auditor.sensors.selection import SensorSelection, matches
from auditor.sensors.siblings import alike_siblings, netless_touch_copper


class LateJudgements:
    """Mixed into the finder, which provides the state and the three hooks."""

    board: Board
    sel: SensorSelection
    grounds: set[str]
    rejects: list[Rejected]
    small: list[tuple[Piece, str]]
    unreached: list[Piece]

    def _accept(self, piece: Piece, reason: str) -> None:
        raise NotImplementedError

    def _reject(self, piece: Piece, why: str) -> None:
        raise NotImplementedError

    def _net_config(self, net: str) -> str:
        raise NotImplementedError

    def judge_late(self) -> None:
        """Run every late judgement, in a fixed order."""
        self._reject_unfilled_zones()
        self._judge_small()
        self._judge_chains()
        self._reject_netless()

    def _reject_unfilled_zones(self) -> None:
        """A zone that may be an electrode but has no fill in the file cannot be measured."""
        outer = set(outer_layers(self.board))
        for zone in self.board.zones:
            if zone.is_rule_area or zone.fills or zone.net in self.grounds \
                    or not outer & set(zone.layers):
                continue
            named = (self.sel.zones and zone.name and matches(zone.name, self.sel.zones)) \
                or self._net_config(zone.net) or name_cue(zone.net) or name_cue(zone.name)
            if named:
                c = zone.outline.centroid
                self.rejects.append(Rejected(
                    zone.net, (), zone.layers[0], round(float(zone.outline.area), 6),
                    round(c.x, 6), round(c.y, 6),
                    f"zone {zone.name or zone.net!r} has no fill in the file, so its copper is "
                    "unknown (refill the zones in KiCad and save)"))

    def _judge_small(self) -> None:
        """Touch-named pads under the floor, taken when alike siblings back them."""
        cues = dict((id(p), cue) for p, cue in self.small)
        taken = alike_siblings([p for p, _ in self.small])
        for piece, family in taken:
            self._accept(piece, f"{cues[id(piece)]}; {piece.area_mm2:.1f} mm², one of "
                         f"{family} alike touch-named pads")
        kept = {id(p) for p, _ in taken}
        for piece, cue in self.small:
            if id(piece) not in kept:
                self._reject(piece, f"{cue}, but its largest copper is {piece.area_mm2:.1f} "
                             f"mm² (needs {self.sel.cue_min_area_mm2:g} mm², or an alike "
                             "sibling pad)")

    def _judge_chains(self) -> None:
        """Unreached segments joined by a resistor chain: one resistive slider."""
        for members in resistor_chains(self.board, self.unreached):
            nets = {p.net for p in members}
            self.rejects = [r for r in self.rejects if r.net not in nets]
            for piece in members:
                self._accept(piece, f"{piece.area_mm2:.0f} mm² of copper, one of "
                             f"{len(members)} segments joined by a resistor chain "
                             "(resistive slider)")

    def _reject_netless(self) -> None:
        for ref, layer, area, x, y in netless_touch_copper(self.board):
            self.rejects.append(Rejected(
                "", (ref,), layer, round(area, 6), round(x, 6), round(y, 6),
                f"touch footprint {ref} has {area:.0f} mm² of copper without a net (drawn "
                "before the schematic?): an electrode without a net cannot be followed "
                "to a controller; give it a net"))
