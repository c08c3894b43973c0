"""Where a net goes: straight to a controller pin, through one series part, or elsewhere.

A sense electrode's net, apart from the electrode itself, reaches only one
pin of the controller (a part with many pads), either directly or through one
two-terminal part (the series resistor) whose other pad is on a net that
reaches only that controller pin (kicad-format.md §14, structural cue).

Parts beside the net (a sensitivity capacitor or bleed resistor to ground,
an ESD/TVS diode; :func:`auditor.sensors.roles.is_side_part`) are left out
of that count. A connector in the controller's place ends the path on this
board: the controller is off-board (``Reach.off_board``).
"""

from __future__ import annotations

from collections.abc import Collection
from dataclasses import dataclass

from auditor.model.board import Board
from auditor.model.items import Footprint, Pad
from auditor.sensors.pieces import pads_by_net
from auditor.sensors.roles import is_connector, is_electrode_part, is_side_part
from auditor.sensors.selection import SensorSelection


@dataclass(frozen=True)
class Reach:
    """How an electrode's net reaches the controller.

    ``ok`` is True for the two accepted shapes (direct, one series part);
    ``why`` says in words what was found either way.
    """

    ok: bool
    why: str
    controller_pad: Pad | None = None
    series_pad: Pad | None = None  # the series part's pad on the electrode net
    series_far_pad: Pad | None = None  # its pad on the controller side
    parts: tuple[str, ...] = ()  # refs reached besides the electrode's own
    off_board: bool = False  # the path ends at a connector to an off-board controller


def is_controller(fp: Footprint, selection: SensorSelection) -> bool:
    """A controller: the configured reference, or a part with many pads that
    is neither a connector nor an electrode footprint."""
    if selection.controller_ref:
        return fp.ref == selection.controller_ref
    if is_connector(fp) or is_electrode_part(fp):
        return False
    return len({p.number for p in fp.pads}) >= selection.controller_min_pads


def _end_of_path(fp: Footprint, selection: SensorSelection) -> str:
    """``controller``, ``connector`` (off-board controller) or ``""``."""
    if is_controller(fp, selection):
        return "controller"
    return "connector" if not selection.controller_ref and is_connector(fp) else ""


def reach_of(board: Board, net: str, electrode_uids: Collection[str],
             selection: SensorSelection) -> Reach:
    """Classify how ``net`` reaches a controller pin, ignoring the electrode's parts."""
    attached = _attached(board, net, set(electrode_uids))
    refs = tuple(sorted({board.footprint(uid).ref for uid in attached}))
    if not attached:
        return Reach(False, "net reaches no other part")
    if len(attached) > 1:
        return Reach(False, f"net reaches {len(attached)} parts ({', '.join(refs)})", parts=refs)
    (uid, pads), = attached.items()
    fp = board.footprint(uid)
    end = _end_of_path(fp, selection)
    if end == "controller":
        return Reach(True, f"net goes straight to {fp.ref} pin {pads[0].number}",
                     controller_pad=pads[0], parts=refs)
    if end == "connector":
        return Reach(True, f"net goes straight to connector {fp.ref} pin {pads[0].number} "
                     "(controller off-board)", controller_pad=pads[0], parts=refs,
                     off_board=True)
    return _through_series(board, fp, pads[0], selection, refs)


def _through_series(board: Board, fp: Footprint, near: Pad, selection: SensorSelection,
                    refs: tuple[str, ...]) -> Reach:
    copper_pads = [p for p in fp.pads if p.kind != "np_thru_hole"]
    if len({p.number for p in copper_pads}) != 2:
        return Reach(False, f"net reaches {fp.ref}, which is neither a controller nor a "
                     "two-terminal part", parts=refs)
    far = next((p for p in copper_pads if p.number != near.number), None)
    if far is None or far.net == "" or far.net == near.net:
        return Reach(False, f"{fp.ref}'s other pad is not connected", parts=refs)
    beyond = _attached(board, far.net, {fp.uid})
    ends = {uid: _end_of_path(board.footprint(uid), selection) for uid in beyond}
    # Besides the one controller pin, the far net may carry passives (a
    # sensitivity capacitor between two controller pins, a bleed resistor).
    chosen = [uid for uid, end in ends.items() if end]
    rest_passive = all(_two_terminal(board.footprint(uid)) for uid in beyond
                       if uid not in chosen)
    if len(chosen) == 1 and rest_passive:
        uid = chosen[0]
        ctrl, pads = board.footprint(uid), beyond[uid]
        off = ends[uid] == "connector"
        where = f"connector {ctrl.ref} pin {pads[0].number} (controller off-board)" if off \
            else f"{ctrl.ref} pin {pads[0].number}"
        return Reach(True, f"net goes through {fp.ref} to {where}",
                     controller_pad=pads[0], series_pad=near, series_far_pad=far,
                     parts=refs + (ctrl.ref,), off_board=off)
    names = ", ".join(sorted({board.footprint(u).ref for u in beyond})) or "nothing"
    return Reach(False, f"{fp.ref} leads to {names}, not to one controller pin", parts=refs)


def _two_terminal(fp: Footprint) -> bool:
    return len({p.number for p in fp.pads if p.kind != "np_thru_hole"}) == 2


def _attached(board: Board, net: str, skip: set[str]) -> dict[str, tuple[Pad, ...]]:
    """Parts on ``net`` (pads by footprint), without ``skip``, side parts and
    electrode footprints."""
    out: dict[str, list[Pad]] = {}
    for pad in pads_by_net(board).get(net, ()):
        fp = board.footprint(pad.footprint_uid)
        # Other electrodes on the net (the keys of a matrix row) are not parts.
        if pad.footprint_uid not in skip and not is_side_part(board, fp, net) \
                and not is_electrode_part(fp):
            out.setdefault(pad.footprint_uid, []).append(pad)
    return {uid: tuple(sorted(p, key=lambda q: q.number)) for uid, p in sorted(out.items())}
