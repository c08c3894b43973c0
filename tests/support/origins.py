"""What counts as a threshold's origin note in a profile (the convention the
built-in profiles follow; see the brief's rule on naming sources)."""

from __future__ import annotations

#: A note names its origin with one of these.
ORIGIN_MARKERS = ("published:", "common practice, no source", "from memory")


def has_origin(note: str) -> bool:
    """True when a threshold note names its origin."""
    lowered = note.lower()
    return any(marker in lowered for marker in ORIGIN_MARKERS)
