"""Safety cautions shown with every report where the work can hurt someone.

padaudit judges capacitive sensing, not electrical safety; these notes say
so where it matters and defer to the rules that do govern.
"""

from __future__ import annotations

MAINS_CAUTION = (
    "Mains power: a touch electrode on a circuit referenced to mains is only as safe as the "
    "insulation between it and the user. The overlay and any creepage and clearance distances "
    "must be rated for the working voltage; product safety standards (for example IEC 62368-1 "
    "for audio/video and IT equipment, IEC 60335-1 for household appliances), local electrical "
    "codes and licensed practice govern. padaudit does not check isolation."
)


def cautions_for(power: str) -> tuple[str, ...]:
    """Cautions due for a power preset (``battery``, ``usb``, ``mains`` ...)."""
    return (MAINS_CAUTION,) if "mains" in power.lower() else ()
