"""The sense route when the net carries side parts as well.

:func:`auditor.sensors.reach.reach_of` accepts a net that reaches the
controller pin directly or through one series part and nothing else. Real
sense nets often also carry a capacitor to ground, a sampling capacitor to
another controller pin or a pull resistor. :func:`route_of` finds the route
past such two-terminal side parts (on the electrode's net or on the pin's
net) so the path can be followed; the solve stage then counts the parts
(:mod:`auditor.solve.lumped`). Finding electrodes still uses the strict
:func:`reach_of`, so what counts as an electrode does not change.
"""

from __future__ import annotations

import re
from collections.abc import Collection

from auditor.model.board import Board
from auditor.model.items import Footprint, Pad
from auditor.sensors.reach import Reach, _attached, is_controller, reach_of
from auditor.sensors.selection import SensorSelection

#: A net of such a name is a ground or a supply, never the sense route.
POWER_NAME = re.compile(r"(^|[^a-z])(gnd|vss|ground|vcc|vdd|vbat|v?\d+v\d*)($|[^a-z])",
                         re.IGNORECASE)


def _two_terminal(fp: Footprint) -> bool:
    return len({p.number for p in fp.pads if p.kind != "np_thru_hole"}) == 2


def _is_side(fp: Footprint, selection: SensorSelection) -> bool:
    return _two_terminal(fp) and not is_controller(fp, selection)


def route_of(board: Board, net: str, electrode_uids: Collection[str],
             selection: SensorSelection) -> Reach:
    """As :func:`reach_of`, past two-terminal side parts; the strict answer
    when no single route to one controller pin stands out."""
    plain = reach_of(board, net, electrode_uids, selection)
    if plain.ok:
        return plain
    attached = _attached(board, net, set(electrode_uids))
    refs = tuple(sorted({board.footprint(uid).ref for uid in attached}))
    found = []
    for uid, pads in attached.items():
        if not all(_is_side(board.footprint(u), selection) for u in attached if u != uid):
            continue
        route = _route_through(board, board.footprint(uid), pads[0], selection, refs)
        if route is not None:
            found.append(route)
    if len(found) > 1:  # a series resistor is the usual route; a capacitor, a side part
        found = [r for r in found if r.series_pad is not None and r.series_pad.ref[:1] == "R"]
    return found[0] if len(found) == 1 else plain


def _route_through(board: Board, fp: Footprint, near: Pad, selection: SensorSelection,
                   refs: tuple[str, ...]) -> Reach | None:
    side = [r for r in refs if r != fp.ref]
    if is_controller(fp, selection):
        return Reach(True, f"net goes straight to {fp.ref} pin {near.number}"
                     f"{_side_text(side)}", controller_pad=near, parts=refs)
    if not _two_terminal(fp):
        return None
    far = next((p for p in fp.pads if p.kind != "np_thru_hole" and p.number != near.number),
               None)
    if far is None or far.net in ("", near.net) or POWER_NAME.search(far.net):
        return None
    beyond = _attached(board, far.net, {fp.uid})
    controllers = [(uid, pads) for uid, pads in beyond.items()
                   if is_controller(board.footprint(uid), selection)]
    if len(controllers) != 1 or len(controllers[0][1]) != 1 or not all(_is_side(board.footprint(u), selection)
                                        for u in beyond if u != controllers[0][0]):
        return None
    ctrl = board.footprint(controllers[0][0])
    side += sorted(board.footprint(u).ref for u in beyond if u != ctrl.uid)
    return Reach(True, f"net goes through {fp.ref} to {ctrl.ref} pin "
                 f"{controllers[0][1][0].number}{_side_text(side)}",
                 controller_pad=controllers[0][1][0],
                 series_pad=near, series_far_pad=far, parts=refs + (ctrl.ref,))


def _side_text(refs: list[str]) -> str:
    return f" (side parts on the way: {', '.join(refs)})" if refs else ""
