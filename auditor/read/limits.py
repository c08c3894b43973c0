"""What the reader refuses before reading: files that are not regular files,
and files larger than a limit.

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
    raw = os.environ.get(LIMIT_VARIABLE, "").strip()
    if not raw:
        return int(DEFAULT_LIMIT_MB * 1e6)
    try:
        value = float(raw)
    except ValueError:
        value = math.nan
    if not math.isfinite(value) or value <= 0:
        raise BoardFileError(LIMIT_VARIABLE, f"expected a positive number of megabytes, "
                             f"got {raw[:40]!r}")
    return max(1, int(value * 1e6))


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
