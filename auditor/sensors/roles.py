"""What a footprint is for, from its words and its pads: electrode, controller,
connector, module, or a part beside the sense net (sensitivity capacitor,
bleed resistor, ESD/TVS diode).

Pads of connectors, controllers and modules (castellated microcontroller
boards) are never electrodes. A connector that a sense net reaches is the end
of the path on this board: the controller is off-board. A two-terminal part
whose other pad is on ground or a supply, and any protection diode, sits
beside the sense net and is neither the controller nor the series part.
The word lists are our own judgement (common practice, no source).
"""

from __future__ import annotations

import re

from auditor.model.board import Board
from auditor.model.items import Footprint, Pad
from auditor.sensors.cues import STRONG_WORDS, is_ground_name, leaf, tokens

CONNECTOR_WORDS = ("connector", "conn", "header", "pinheader", "pinsocket", "socket",
                   "terminal", "receptacle", "jst", "usb", "fpc", "ffc")
MODULE_WORDS = ("module", "castellated")
PROTECTION_WORDS = ("esd", "tvs", "protection", "suppressor")
CONNECTOR_PREFIXES = ("J", "P", "CN", "CON", "X")
DIODE_PREFIXES = ("D", "TVS", "ESD", "LED")
#: Words that name a touch electrode footprint (besides the strong cue words).
ELECTRODE_WORDS = STRONG_WORDS + ("finger", "electrode", "touchpad")

#: Parts with fewer pads than this may be named an electrode by their value.
FEW_PADS = 6

_SUPPLY = re.compile(r"^(\+.*|V(CC|DD|BUS|IN|BAT|SYS|REF)\w*|\d+V\d*\w*|VDC\w*)$")


def _says(fp: Footprint, words: tuple[str, ...], value: bool = True) -> bool:
    """True when the footprint name (or the value) holds one of ``words``: as a
    token's start, or anywhere for words of six letters or more."""
    text = fp.lib_id.split(":")[-1] + (" " + fp.value if value else "")
    toks = tokens(text)
    return any(t.startswith(w) for t in toks for w in words) or any(
        w in text.lower() for w in words if len(w) >= 6)


def is_electrode_part(fp: Footprint) -> bool:
    """A footprint whose name (or, for a part with few pads, value) names a
    touch electrode (``Touchpad``, ``Cap_Electrode``, value ``TouchPoint``).

    A touch controller's value often says touch too; its many pads keep it out.
    """
    few = len({p.number for p in fp.pads}) < FEW_PADS
    return _says(fp, ELECTRODE_WORDS, value=few)


def is_connector(fp: Footprint) -> bool:
    """A connector or header: by its words, or a connector reference with 2+ pads."""
    if is_electrode_part(fp):
        return False
    if _says(fp, CONNECTOR_WORDS):
        return True
    numbers = {p.number for p in fp.pads if p.kind != "np_thru_hole"}
    return _prefix(fp.ref) in CONNECTOR_PREFIXES and len(numbers) >= 2


def _prefix(ref: str) -> str:
    """The letters a reference starts with, upper case (``J12`` → ``J``)."""
    match = re.match(r"[A-Za-z]+", ref)
    return match.group(0).upper() if match else ""


def is_module(fp: Footprint) -> bool:
    """A module footprint (castellated microcontroller board and the like)."""
    return not is_electrode_part(fp) and _says(fp, MODULE_WORDS)


def is_supply_name(net: str) -> bool:
    """Supply-like net names: +3V3, VCC, VDD_IO, 5V, VBUS ...

    >>> [is_supply_name(n) for n in ("+3V3", "VCC", "/p/5V", "TOUCH1")]
    [True, True, True, False]
    """
    return bool(_SUPPLY.match(leaf(net).upper()))


def is_side_part(board: Board, fp: Footprint, net: str) -> bool:
    """A part beside ``net``: protection diode, or a two-terminal part whose
    other pad is on ground, a supply or nothing."""
    if _says(fp, PROTECTION_WORDS) or _prefix(fp.ref) in DIODE_PREFIXES:
        return True  # a diode (ESD/TVS array, LED) is never the controller or series part
    copper = [p for p in fp.pads if p.kind != "np_thru_hole"]
    if len({p.number for p in copper}) != 2:
        return False
    others = {p.net for p in copper if p.net != net}
    return bool(others) and all(o == "" or is_ground_name(o) or is_supply_name(o)
                                for o in others)


def never_electrode(fp: Footprint, controller_min_pads: int) -> bool:
    """Pads of connectors, modules and many-pad parts with no electrode words."""
    if is_electrode_part(fp):
        return False
    numbers = {p.number for p in fp.pads if p.kind != "np_thru_hole"}
    return is_connector(fp) or is_module(fp) or len(numbers) >= controller_min_pads


def part_pads_only(board: Board, pads: tuple[Pad, ...], controller_min_pads: int) -> bool:
    """True when every pad belongs to a footprint whose pads are never electrodes."""
    uids = {p.footprint_uid for p in pads}
    return bool(uids) and all(never_electrode(board.footprint(u), controller_min_pads)
                              for u in uids)
