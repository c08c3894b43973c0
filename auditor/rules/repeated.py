"""One cause, one finding: when the same cause repeats on many electrodes
(every key wired straight to the controller, every pad drawn with paste),
a designer wants to hear it once, with the electrodes listed, not once per
electrode."""

from __future__ import annotations

from collections.abc import Iterable, Sequence

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
