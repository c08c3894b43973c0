"""Configuration lines that would select the near misses.

When nothing is found but copper came close, a generic hint makes the user
look up key names; the exact lines, with the references or nets of the
candidates, can be pasted into ``[tool.padaudit.sensors]`` as they are.
"""

from __future__ import annotations

from collections.abc import Sequence

from auditor.sensors.cues import is_auto_name
from auditor.sensors.find import Rejected
from auditor.sensors.model import name_order


def config_lines(rejects: Sequence[Rejected]) -> tuple[str, ...]:
    """Lines for ``[tool.padaudit.sensors]`` selecting the candidates in ``rejects``.

    Candidates on a named net are selected by net, the others by reference;
    copper with neither (a net-less footprint) needs a net first.

    Examples
    --------
    >>> r = Rejected("Net-(TP1-Pad1)", ("TP1",), "F.Cu", 9.0, 0.0, 0.0, "small")
    >>> config_lines([r])
    ('refs = ["TP1"]',)
    """
    nets = sorted({r.net for r in rejects if r.net and not is_auto_name(r.net)},
                  key=name_order)
    refs = sorted({ref for r in rejects if r.net and is_auto_name(r.net) for ref in r.refs},
                  key=name_order)
    lines = []
    if refs:
        lines.append("refs = [" + ", ".join(f'"{ref}"' for ref in refs) + "]")
    if nets:
        lines.append("nets = [" + ", ".join(f'"{net}"' for net in nets) + "]")
    return tuple(lines)

