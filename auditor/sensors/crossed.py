"""Mutual-capacitance X/Y pairs: electrodes stacked on the two outer layers.

Self-capacitance electrodes never lie over one another (the one below would
shield the one above). When electrodes of different nets on opposite layers
overlap, they are a mutual pair: transmit segments on one layer under a
receive strip on the other. The side with fewer electrodes is the receive
side (one strip over several segments); on a tie the front one, nearer the
finger. Each stack gets one group, named after its receive electrode
(common practice, no source).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

from auditor.sensors import robust
from auditor.sensors.components import connected_components
from auditor.sensors.model import Sensor

#: Share of the smaller electrode's area the overlap must reach.
OVERLAP_SHARE = 0.2


def crossed_kinds(sensors: Sequence[Sensor], fixed: set[str], front_layer: str
                  ) -> tuple[list[Sensor], set[str]]:
    """``sensors`` with stacked X/Y pairs typed and grouped, and the names changed."""
    free = [i for i, s in enumerate(sensors) if s.name not in fixed]
    links: dict[int, set[int]] = {i: set() for i in free}
    for k, i in enumerate(free):
        for j in free[k + 1:]:
            if _stacked(sensors[i], sensors[j]):
                links[i].add(j)
                links[j].add(i)
    out, changed = list(sensors), set()
    for comp in connected_components([s for s in sorted(links) if links[s]],
                                     links.__getitem__):
        by_layer: dict[str, list[int]] = {}
        for i in comp:
            by_layer.setdefault(sensors[i].layer, []).append(i)
        rx_layer = min(by_layer, key=lambda lay: (len(by_layer[lay]), lay != front_layer))
        group = min(sensors[i].name for i in by_layer[rx_layer])
        for i in comp:
            rx = sensors[i].layer == rx_layer
            out[i] = replace(sensors[i], kind="mutual-rx" if rx else "mutual-tx", group=group,
                             reason=f"{sensors[i].reason}; "
                             f"{'receive strip over' if rx else 'transmit segment under'} "
                             "electrodes of other nets on the other layer (mutual X/Y)")
            changed.add(sensors[i].name)
    return out, changed


def _stacked(a: Sensor, b: Sensor) -> bool:
    if a.layer == b.layer or set(a.nets) & set(b.nets) or not a.geometry.intersects(b.geometry):
        return False
    shared = float(robust.intersection(a.geometry, b.geometry).area)
    return shared >= OVERLAP_SHARE * min(a.area_mm2, b.area_mm2)
