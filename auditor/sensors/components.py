"""Connected components of a small link graph (electrodes that touch, chain,
or stack), walked in sorted order so every run groups them the same way."""

from __future__ import annotations

from collections.abc import Callable, Iterable
from typing import TypeVar

#: Electrodes are linked by index or by net name.
T = TypeVar("T", int, str)


def connected_components(starts: Iterable[T], linked: Callable[[T], set[T]]) -> list[list[T]]:
    """Each component reached from ``starts`` (in their order), sorted.

    Examples
    --------
    >>> links = {1: {2}, 2: {1}, 3: set()}
    >>> connected_components(sorted(links), links.__getitem__)
    [[1, 2], [3]]
    """
    seen: set[T] = set()
    out = []
    for start in starts:
        if start in seen:
            continue
        stack, comp = [start], []
        seen.add(start)
        while stack:
            node = stack.pop()
            comp.append(node)
            for other in sorted(linked(node) - seen):
                seen.add(other)
                stack.append(other)
        out.append(sorted(comp))
    return out


__all__ = ["connected_components"]
