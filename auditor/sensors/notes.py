"""Notes about the structures found, said once per board, not per electrode.

Both the sensor listing (``padaudit sensors``) and the audit report carry
them, from this one function, so the two never disagree.
"""

from __future__ import annotations

from collections.abc import Sequence

from auditor.sensors.model import Sensor


def structure_notes(sensors: Sequence[Sensor]) -> tuple[str, ...]:
    """One note per structure that needs saying once, not per electrode.

    Examples
    --------
    >>> structure_notes([])
    ()
    """
    keys = [s for s in sensors if s.kind == "keyswitch"]
    if not keys:
        return ()
    switches = len({s.group for s in keys})
    return (f"{len(keys)} pads of {switches} electro-capacitive key switch(es) found: "
            "capacitive sensors under mechanical keys, not finger-touch electrodes, so no "
            "touch rule applies to them",)
