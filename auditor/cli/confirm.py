"""One line on stderr for every file a command writes.

``wrote front_panel.svg``, ``wrote baseline.json: 10 entries``: the user sees
what appeared on disk without reading the report, and stdout stays free for
the report itself. ``-q``/``--quiet`` suppresses these lines, as it does the
progress bar (common practice for command-line tools, no source).
"""

from __future__ import annotations

import sys
from typing import TextIO


def confirm_written(path: str, detail: str = "", *, quiet: bool = False,
                    stream: TextIO | None = None) -> None:
    """Say that ``path`` was written (``detail``: what it holds), unless ``quiet``."""
    if quiet:
        return
    (stream or sys.stderr).write(f"wrote {path}{': ' + detail if detail else ''}\n")
