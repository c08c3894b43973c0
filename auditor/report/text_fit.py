"""Tables that fit the terminal without cutting a number or a name.

A table is tried in three shapes, widest first, and the first that fits the
console's width is printed: all columns with full headers; without the bar
columns (a picture of a number already in the table); with short headers.
When even that is too wide, each row becomes a block of its own: the row's
name on one line, then ``header value`` pairs filled to the width, never
split inside a pair.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal, TextIO

from rich.cells import cell_len
from rich.console import Console
from rich.padding import Padding
from rich.table import Table
from rich.text import Text

Cell = str | Text
Justify = Literal["left", "right"]
#: Indent of the lines of a block under the row's name.
BLOCK_INDENT = 4


def stream_width(stream: TextIO, default: int) -> int:
    """The terminal's width when ``stream`` is one, else ``default`` (files
    and pipes get a fixed width, so their output does not depend on where
    the command ran)."""
    probe = Console(file=stream)
    return probe.width if probe.is_terminal else default


@dataclass(frozen=True)
class Column:
    """One column: its full header, the short one used when space is tight,
    its alignment, and whether it is a bar (dropped first)."""

    header: str
    short: str = ""
    justify: Justify = "left"
    bar: bool = False

    def title(self, short: bool) -> str:
        """The header to show (the full one when no short one is given)."""
        return self.short if short and self.short else self.header


def _table(columns: Sequence[Column], rows: Sequence[Sequence[Cell]], *, bars: bool,
           short: bool) -> Table:
    table = Table(box=None, pad_edge=False, header_style="bold", show_edge=False,
                  collapse_padding=True)
    keep = [i for i, c in enumerate(columns) if bars or not c.bar]
    for i in keep:
        table.add_column(columns[i].title(short), justify=columns[i].justify, no_wrap=True)
    for row in rows:
        table.add_row(*(row[i] for i in keep))
    return table


def natural_width(console: Console, table: Table) -> int:
    """Columns ``table`` takes when nothing is squeezed (measured against a
    very wide console, since rich clamps a measurement to the width given)."""
    return console.measure(table, options=console.options.update_width(10_000)).maximum


def fitted_table(console: Console, columns: Sequence[Column],
                 rows: Sequence[Sequence[Cell]]) -> Table | None:
    """The widest shape of the table that fits ``console.width``, or None
    when only blocks fit (see :func:`print_blocks`)."""
    for bars, short in ((True, False), (False, False), (False, True)):
        if short and not any(c.short for c in columns):
            continue
        table = _table(columns, rows, bars=bars, short=short)
        if natural_width(console, table) <= console.width:
            return table
    return None


def filled_lines(pieces: Sequence[Text], width: int, indent: int = BLOCK_INDENT,
                 separator: str = " · ") -> list[Text]:
    """``pieces`` joined by ``separator`` into lines of at most ``width``
    cells (a piece longer than a line gets a line of its own, uncut)."""
    lines: list[Text] = []
    line = Text(" " * indent)
    for piece in pieces:
        fresh = line.cell_len == indent
        needed = cell_len(piece.plain) + (0 if fresh else cell_len(separator))
        if not fresh and line.cell_len + needed > width:
            lines.append(line)
            line, fresh = Text(" " * indent), True
        if not fresh:
            line.append(separator, style="dim")
        line.append_text(piece)
    if line.cell_len > indent:
        lines.append(line)
    return lines


def print_blocks(console: Console, columns: Sequence[Column],
                 rows: Sequence[Sequence[Cell]], title_columns: int = 1) -> None:
    """One block per row: the first ``title_columns`` cells on a line, then
    every other non-empty, non-bar cell as ``header value``."""
    for row in rows:
        head = Text()
        for cell in row[:title_columns]:
            head.append_text(Text(cell) if isinstance(cell, str) else cell)
            head.append("  ")
        head.rstrip()
        console.print(head, no_wrap=True, overflow="ignore", crop=False)
        pieces = []
        for column, cell in zip(columns[title_columns:], row[title_columns:], strict=True):
            text = Text(cell) if isinstance(cell, str) else cell
            if column.bar or not text.plain.strip():
                continue
            piece = Text(f"{column.header} ", style="dim")
            piece.append_text(text)
            pieces.append(piece)
        for line in filled_lines(pieces, console.width):
            console.print(line, no_wrap=True, overflow="ignore", crop=False)


def print_note(console: Console, text: str, indent: int = 2) -> None:
    """A dim footnote under a table, wrapped at words, every line indented."""
    console.print(Padding(Text(text, style="dim"), (0, 0, 0, indent)))


def print_fitted(console: Console, columns: Sequence[Column],
                 rows: Sequence[Sequence[Cell]], title_columns: int = 1) -> bool:
    """Print the widest table shape that fits, else blocks; True for a table."""
    table = fitted_table(console, columns, rows)
    if table is None:
        print_blocks(console, columns, rows, title_columns)
        return False
    console.print(table)
    return True
