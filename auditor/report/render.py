"""One entry point for every stream back-end.

Each back-end is a function ``(report, stream, colour, order) -> None``
registered under its format name; the picture (``svg``) writes a file and
lives in :mod:`auditor.report.svg`.
"""

from __future__ import annotations

import importlib
from collections.abc import Callable
from typing import TextIO

from auditor.decide.records import Report
from auditor.report.text import ORDERS

Backend = Callable[[Report, TextIO, bool, str, bool], None]

#: Format name -> (module, function); a back-end is imported only when used
#: (a run writes one format; importing all would slow every start).
_BACKENDS: dict[str, tuple[str, str]] = {
    "text": ("auditor.report.text", "render_text"),
    "json": ("auditor.report.as_json", "render_json"),
    "sarif": ("auditor.report.sarif", "render_sarif"),
    "junit": ("auditor.report.junit", "render_junit"),
    "markdown": ("auditor.report.markdown", "render_markdown"),
}
#: Back-ends that take the electrode order.
_ORDERED = frozenset({"text", "markdown"})
FORMATS: tuple[str, ...] = tuple(_BACKENDS)


def _backend(fmt: str) -> Backend:
    module, name = _BACKENDS[fmt]
    function = getattr(importlib.import_module(module), name)
    if fmt == "text":
        return lambda r, s, colour, order, closing: function(r, s, colour, order=order,
                                                             closing=closing)
    if fmt in _ORDERED:
        return lambda r, s, colour, order, closing: function(r, s, order=order)
    return lambda r, s, colour, order, closing: function(r, s)


def render(report: Report, fmt: str, stream: TextIO, colour: bool = False, *,
           order: str = "weakest", closing: bool = True) -> None:
    """Write ``report`` to ``stream`` in format ``fmt``.

    Parameters
    ----------
    fmt:
        One of :data:`FORMATS`.
    colour:
        Only the text back-end uses it; machine formats never carry colour.
    order:
        Electrode order for text and markdown (``weakest`` or ``rank``).
    closing:
        Text only: end with the verdict line (``False`` when the caller
        prints one line for the whole run).

    Raises
    ------
    ValueError
        For an unknown format or order, listing the valid choices.
    """
    if fmt not in _BACKENDS:
        raise ValueError(f"unknown format {fmt!r}; choose one of: {', '.join(FORMATS)}")
    if order not in ORDERS:
        raise ValueError(f"unknown order {order!r}; choose one of: {', '.join(ORDERS)}")
    _backend(fmt)(report, stream, colour, order, closing)
