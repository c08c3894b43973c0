"""Signals during a run: SIGTERM unwinds like Ctrl-C does.

Python turns SIGINT into :class:`KeyboardInterrupt`, so ``with`` blocks
(temporary folders of ``--against``, ``diff REV:path`` and the hook) clean
up. SIGTERM, what CI runners and ``timeout`` send, would end the process at
once and leave them behind; :func:`terminate_gracefully` makes it raise
:class:`Terminated` instead, and ``main`` turns either into one line and the
conventional exit code 128 + signal number.
"""

from __future__ import annotations

import contextlib
import signal
import threading
from collections.abc import Iterator
from types import FrameType

#: Exit codes after a signal: 128 + its number, as POSIX shells report a
#: process a signal ended (common practice, no source).
EXIT_INTERRUPTED = 128 + signal.SIGINT
EXIT_TERMINATED = 128 + signal.SIGTERM


class Terminated(BaseException):
    """SIGTERM arrived (a BaseException, so no ``except Exception`` stops it)."""


def _raise_terminated(signum: int, frame: FrameType | None) -> None:
    raise Terminated


@contextlib.contextmanager
def terminate_gracefully() -> Iterator[None]:
    """Within the block, SIGTERM raises :class:`Terminated` (main thread only;
    the previous handler is restored after)."""
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    previous = signal.signal(signal.SIGTERM, _raise_terminated)
    try:
        yield
    finally:
        signal.signal(signal.SIGTERM, previous)
