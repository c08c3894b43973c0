"""The lines under the terminal's electrode table that say what the Cp total
holds besides copper: the controller pin and the parts on the sense nets.

Kept out of the table (no new columns, so it stays narrow): one line for the
pin, then one per electrode with capacitors or unknown parts on its net.
Resistors are left to the JSON notes: they change no static capacitance.
"""

from __future__ import annotations

from collections.abc import Sequence

from rich.console import Console
from rich.table import Table
from rich.text import Text

from auditor.decide.records import SensorResult
from auditor.model.results import LumpedPart

_WORDS = {
    "to-ground": "to {net}",
    "to-net": "to {net} (as AC ground)",
    "series": "in series",
    "between-pins": "to {net}, a controller pin: not added",
    "not-read": "value not read: not added",
    "not-fitted": "not fitted",
    "other": "capacitance unknown: not added",
}


def part_words(part: LumpedPart) -> str:
    """``C5 22pF to GND`` and the like."""
    how = _WORDS[part.connection].format(net=part.net)
    return f"{part.ref} {part.value} {how}".replace("  ", " ")


def render_lumped_lines(console: Console, rows: Sequence[SensorResult]) -> None:
    """The pin line and the per-electrode parts lines (nothing when no
    electrode has a pin or parts counted)."""
    pins = sorted({r.metrics.cp_pin_pf for r in rows if r.metrics and r.metrics.cp_pin_pf})
    grid = Table.grid(padding=(0, 1))
    grid.add_column(no_wrap=True)
    grid.add_column(no_wrap=True, justify="right")
    grid.add_column()
    for r in rows:
        listed = [p for p in r.metrics.parts if p.connection in _WORDS] if r.metrics else []
        if listed and r.metrics is not None:
            grid.add_row(f"   {r.sensor.name}", f"{r.metrics.cp_parts_pf:+.2f} pF",
                         "; ".join(part_words(p) for p in listed))
    if pins:
        values = "/".join(f"{p:g}" for p in pins)
        tail = " and the parts below" if grid.row_count else ""
        console.print(Text(f"  Cp total includes the controller pin ({values} pF, pin_pf)"
                           f"{tail}", style="dim"))
    if grid.row_count:
        console.print(grid)
