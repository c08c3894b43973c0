"""One cause, one finding: when the same cause repeats on many electrodes
(every key wired straight to the controller, every pad drawn with paste),
a designer wants to hear it once, with the electrodes listed, not once per
electrode."""

from __future__ import annotations

from collections.abc import Callable, Iterable, Iterator, Sequence
from dataclasses import replace

from auditor.model.vocabulary import TOUCH_KINDS
from auditor.rules.finding import Finding
from auditor.rules.registry import RuleCall
from auditor.sensors.model import Sensor

#: Electrodes named in the message; the finding's nets and refs hold all.
SHOWN = 6


def listed(names: Sequence[str]) -> str:
    """``A, B, C`` or ``A, B, ... and 58 more``.

    >>> listed(["K1", "K2"])
    'K1, K2'
    >>> listed([f"K{i}" for i in range(8)])
    'K0, K1, K2, K3, K4, K5 and 2 more'
    """
    more = len(names) - SHOWN
    return ", ".join(names[:SHOWN]) + (f" and {more} more" if more > 0 else "")


def one_for_all(call: RuleCall, sensors: Iterable[Sensor], single: str, many: str,
                extra_refs: Sequence[str] = (), extra_nets: Sequence[str] = (),
                measured: Sequence[tuple[str, float]] = (), layer: str | None = None,
                ) -> Finding:
    """One finding for ``sensors`` that share one cause.

    With one sensor it is that sensor's finding (message ``single``,
    ``measured`` as given), as a per-electrode rule would give it, so its
    identity (rule, sensor, nets, refs) stays what baselines and waivers
    hold. With several it sits on the first by name, says
    ``"{count} {many}: {names}"`` and carries the nets and references of all
    (``extra_nets``/``extra_refs``, e.g. the controller or the pour, added).
    """
    ordered = sorted(sensors, key=lambda s: s.name)
    first = ordered[0]
    refs = [r for s in ordered for r in s.refs] + list(extra_refs)
    nets = [n for s in ordered for n in s.nets] + list(extra_nets)
    if len(ordered) == 1:
        return call.finding(single, first, measured, nets=nets, refs=refs, layer=layer)
    return call.finding(
        f"{len(ordered)} {many}: {listed([s.name for s in ordered])}", first,
        (("electrodes", float(len(ordered))), *measured), nets=nets, refs=refs, layer=layer)


def one_per_trace(call: RuleCall,
                  per_sensor: Callable[[Sensor, RuleCall], Iterable[Finding]]) -> Iterator[Finding]:
    """``per_sensor``'s findings on every touch electrode, one per piece of copper.

    Electrodes on one sense net (the keys of a matrix row, the pads of one
    channel) share the trace from where their branches join to the
    controller; what that shared stretch runs beside or crosses is one cause.
    Findings with the same message at the same place from electrodes of the
    same nets are merged: sitting on the first electrode by name, with every
    electrode's nets and references, the count in ``measured`` and the
    electrodes named in the message. A finding of one electrode alone is
    left as it is (the identity baselines and waivers hold).
    """
    groups: dict[tuple[object, ...], list[tuple[Sensor, Finding]]] = {}
    for sensor in sorted(call.board.sensors, key=lambda s: s.name):
        if sensor.kind not in TOUCH_KINDS:
            continue
        for found in per_sensor(sensor, call):
            key = (found.message, found.x_mm, found.y_mm, found.layer, tuple(sorted(sensor.nets)))
            groups.setdefault(key, []).append((sensor, found))
    for members in groups.values():
        yield members[0][1] if len(members) == 1 else _merged(members)


def _merged(members: Sequence[tuple[Sensor, Finding]]) -> Finding:
    first = members[0][1]
    names = [s.name for s, _ in members]
    return replace(
        first,
        message=f"{len(members)} electrodes on one sense trace ({listed(names)}): "
                f"{first.message}",
        nets=tuple(sorted({n for _, f in members for n in f.nets})),
        refs=tuple(sorted({r for _, f in members for r in f.refs})),
        measured=(("electrodes", float(len(members))), *first.measured))
