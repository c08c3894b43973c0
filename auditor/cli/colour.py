"""Whether output gets colour and a progress bar: decided once per run.

Colour follows, in order: ``--color always|never``; then, for ``auto``, the
``NO_COLOR`` convention (any non-empty value turns colour off, see
https://no-color.org), ``TERM=dumb``, and finally whether the stream is a
terminal. The progress bar needs a terminal too and stays off under CI
(``CI`` set, as CI services do) and with ``--quiet``.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import TextIO

from auditor.errors import UsageError

COLOUR_CHOICES: tuple[str, ...] = ("auto", "always", "never")


def _is_terminal(stream: TextIO) -> bool:
    isatty = getattr(stream, "isatty", None)
    try:
        return bool(isatty()) if isatty is not None else False
    except ValueError:  # closed stream
        return False


def use_colour(choice: str, stream: TextIO, env: Mapping[str, str]) -> bool:
    """Decide colour for ``stream``.

    Parameters
    ----------
    choice:
        ``auto``, ``always`` or ``never`` (the ``--color`` option).
    stream:
        Where the report goes.
    env:
        The environment (``os.environ`` in real runs).

    Raises
    ------
    UsageError
        For an unknown choice, listing the valid ones.
    """
    if choice not in COLOUR_CHOICES:
        raise UsageError(f"--color {choice!r}: choose one of {', '.join(COLOUR_CHOICES)}")
    if choice == "always":
        return True
    if choice == "never":
        return False
    if env.get("NO_COLOR", ""):
        return False
    if env.get("TERM", "") == "dumb":
        return False
    return _is_terminal(stream)


def use_progress(stream: TextIO, env: Mapping[str, str], quiet: bool) -> bool:
    """True when a progress bar may be drawn on ``stream`` (normally stderr)."""
    if quiet or env.get("CI", ""):
        return False
    if env.get("TERM", "") == "dumb":
        return False
    return _is_terminal(stream)
