"""What the reader refuses before reading: files that are not regular files,
files larger than a limit, and boards with more items than a limit.

A FIFO would block the reader forever and a device such as ``/dev/zero``
never ends, so only regular files are read. The size limit keeps a wrong
file (a disk image, a log) from taking the machine's memory: the model of a
board takes about ten times its file size. Boards larger than the default
are real but rare (panels); the limit is raised with an environment
variable, named in the message.
"""

from __future__ import annotations

import math
import os
import re
import stat
from pathlib import Path

from auditor.errors import BoardFileError

#: Environment variable raising (or lowering) the read limit, in megabytes.
LIMIT_VARIABLE = "PADAUDIT_MAX_BOARD_MB"
#: Default read limit (MB): a 256 MB board file is several times the largest
#: panel seen in practice (common practice, no source).
DEFAULT_LIMIT_MB = 256.0


def limit_bytes() -> int:
    """The read limit in bytes (:data:`LIMIT_VARIABLE`, else the default)."""
    return max(1, int(_positive_setting(LIMIT_VARIABLE, DEFAULT_LIMIT_MB) * 1e6))


def read_limited(file: Path) -> bytes:
    """The bytes of a regular file no larger than :func:`limit_bytes`.

    Raises
    ------
    BoardFileError
        For a FIFO, device, socket or a file over the limit.
    OSError
        As ``open`` raises it (missing, unreadable).
    """
    limit = limit_bytes()
    # O_NONBLOCK: opening a FIFO with no writer would otherwise wait forever
    # before fstat could say what it is.
    handle = os.open(file, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    with os.fdopen(handle, "rb") as stream:
        mode = os.fstat(handle).st_mode
        if not stat.S_ISREG(mode):
            raise BoardFileError(file, f"not a regular file ({_kind(mode)}); "
                                 "give the .kicad_pcb file itself")
        data = stream.read(limit + 1)
    if len(data) > limit:
        raise BoardFileError(file, f"board too large: over the read limit of "
                             f"{limit / 1e6:g} MB; set {LIMIT_VARIABLE} to a larger "
                             "number of megabytes to read it")
    return data


def _kind(mode: int) -> str:
    if stat.S_ISFIFO(mode):
        return "a FIFO"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a file"


#: Environment variable raising (or lowering) the item limit.
ITEMS_VARIABLE = "PADAUDIT_MAX_BOARD_ITEMS"
#: Default item limit. Measured (bench/bench_scale.py, shared 2-core
#: machine): 240 000 tracks audit in about 40 s and 0.5 GB, one million pads
#: took over 6 minutes and 2.7 GB; the limit keeps a run within minutes.
DEFAULT_ITEMS = 400_000
#: What counts as an item: pads, tracks, vias, zones and drawn shapes.
_ITEM = re.compile(r"\((?:pad|segment|arc|via|zone|gr_[a-z]+|fp_[a-z]+)[\s)]")


def _positive_setting(name: str, default: float) -> float:
    raw = os.environ.get(name, "").strip()
    if not raw:
        return default
    try:
        value = float(raw)
    except ValueError:
        value = math.nan
    if not math.isfinite(value) or value <= 0:
        raise BoardFileError(name, f"expected a positive number, got {raw[:40]!r}")
    return value


def check_item_count(text: str, path: str) -> None:
    """Refuse, before parsing, a board with more items than the limit.

    The count is of item keywords in the text (fast: the file is not
    parsed), so it may include a few that are not copper.

    Raises
    ------
    BoardFileError
        Naming the count, the limit and how to raise it.
    """
    limit = int(_positive_setting(ITEMS_VARIABLE, DEFAULT_ITEMS))
    if len(text) < limit * 8:  # no item takes fewer than 8 characters
        return
    count = sum(1 for _ in _ITEM.finditer(text))
    if count > limit:
        raise BoardFileError(path, f"board too large: about {count} items (pads, tracks, "
                             f"vias, zones, shapes), over the limit of {limit}; set "
                             f"{ITEMS_VARIABLE} to a larger number to audit it anyway")
