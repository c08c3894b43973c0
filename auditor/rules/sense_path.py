"""What the trace rules share about a sense path: which neighbouring nets
count against it, whether it ends off the board, and where a finding about
it is placed (the thing to move, not the electrode's centroid)."""

from __future__ import annotations

from typing import Any

from auditor.rules.groups import in_one_group
from auditor.rules.registry import RuleCall
from auditor.sensors.model import Neighbour, SensePath, Sensor


def at_neighbour(neighbour: Neighbour) -> dict[str, Any]:
    """Place a finding where the other net comes closest to the sense path,
    and point it at the path's track there in the board file (the
    electrode's own place when that is not known)."""
    if neighbour.x_mm is None or neighbour.y_mm is None:
        return {}
    return {"x_mm": neighbour.x_mm, "y_mm": neighbour.y_mm, "layer": neighbour.layer,
            "item": neighbour.place}


def at_series_part(path: SensePath) -> dict[str, Any]:
    """Place a finding at the series part (the thing to move)."""
    if path.series_x_mm is None or path.series_y_mm is None:
        return {}
    return {"x_mm": path.series_x_mm, "y_mm": path.series_y_mm, "layer": path.series_layer}


def is_sense(neighbour: Neighbour, call: RuleCall) -> bool:
    return neighbour.sense or neighbour.net in call.board.settings.sense_nets


def is_noisy(neighbour: Neighbour, call: RuleCall) -> bool:
    """Noisy by name or driver, unless it is a sense net (whatever its name:
    a sense net called ``*_LED`` is still a sense net)."""
    if is_sense(neighbour, call):
        return False
    return neighbour.noisy or call.board.settings.is_noisy_net(neighbour.net)


#: Reference prefixes of connectors (IEC 81346 / common practice, no source).
CONNECTOR_PREFIXES = ("J", "P", "CN", "CON", "X", "XS")


def off_board(path: SensePath) -> bool:
    """True when the path ends on a connector to an off-board controller:
    the sensor stage's flag when it sets one, else the end part's prefix."""
    flag = getattr(path, "off_board", None)
    if isinstance(flag, bool):
        return flag
    prefix = "".join(c for c in path.controller_ref if c.isalpha()).upper()
    return prefix in CONNECTOR_PREFIXES


def sibling_net(sensor: Sensor, net: str, call: RuleCall) -> bool:
    """True when ``net`` belongs to a segment of ``sensor``'s own slider or
    wheel (their traces run together by design)."""
    return any(in_one_group(sensor, other) and net in (*other.nets, *(
        other.path.nets if other.path else ())) for other in call.board.sensors)


def at_crossing(neighbour: Neighbour) -> dict[str, Any]:
    """Place a finding where the path first crosses the other net, on the
    path's track that crosses it."""
    if neighbour.crossing_x_mm is None or neighbour.crossing_y_mm is None:
        return {}
    return {"x_mm": neighbour.crossing_x_mm, "y_mm": neighbour.crossing_y_mm,
            "layer": neighbour.crossing_layer, "item": neighbour.crossing_place}


def nets_of(sensor_name: str, call: RuleCall) -> tuple[str, ...]:
    for s in call.board.sensors:
        if s.name == sensor_name:
            return s.nets
    return ()
