"""Handing freed heap memory back to the operating system between solves.

A field solve allocates and frees arrays of tens of megabytes. The C
library's allocator keeps much of what is freed for reuse instead of
returning it (glibc raises its threshold for mapping large blocks
separately each time such a block is freed), so a process that has run a
few solves keeps 20 to 60 MB more resident than it uses (measured on the
demo's 3-D jobs: 103 MB in use, up to 148 MB resident). When two processes
share the work that excess is counted twice. :func:`release_freed_memory`
asks glibc to return it (``malloc_trim``); where that function does not
exist (other C libraries, other systems) it does nothing.
"""

from __future__ import annotations

import ctypes
import ctypes.util
import sys
from collections.abc import Callable
from functools import lru_cache


@lru_cache(maxsize=1)
def _trim() -> Callable[[int], int] | None:
    """glibc's ``malloc_trim``, or None where there is none."""
    if not sys.platform.startswith("linux"):
        return None
    name = ctypes.util.find_library("c")
    try:
        library = ctypes.CDLL(name)
        trim: Callable[[int], int] = library.malloc_trim
    except (OSError, AttributeError, TypeError):
        return None
    return trim


def release_freed_memory() -> bool:
    """Return the heap's free pages to the system; True if that was possible.

    Examples
    --------
    >>> release_freed_memory() in (True, False)
    True
    """
    trim = _trim()
    if trim is None:
        return False
    trim(0)
    return True


__all__ = ["release_freed_memory"]
