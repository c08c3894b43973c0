"""One entry point for every stream back-end.

Each back-end is a function ``(report, stream, colour, order) -> None``
registered under its format name; the picture (``svg``) writes a file and
lives in :mod:`auditor.report.svg`.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TextIO

from auditor.report.as_json import render_json
from auditor.report.junit import render_junit
from auditor.report.markdown import render_markdown
from auditor.report.model import Report
from auditor.report.sarif import render_sarif
from auditor.report.text import ORDERS, render_text

Backend = Callable[[Report, TextIO, bool, str], None]

BACKENDS: dict[str, Backend] = {
    "text": lambda r, s, colour, order: render_text(r, s, colour, order=order),
    "json": lambda r, s, colour, order: render_json(r, s),
    "sarif": lambda r, s, colour, order: render_sarif(r, s),
    "junit": lambda r, s, colour, order: render_junit(r, s),
    "markdown": lambda r, s, colour, order: render_markdown(r, s, order=order),
}
FORMATS: tuple[str, ...] = tuple(BACKENDS)


def render(report: Report, fmt: str, stream: TextIO, colour: bool = False, *,
           order: str = "weakest") -> None:
    """Write ``report`` to ``stream`` in format ``fmt``.

    Parameters
    ----------
    fmt:
        One of :data:`FORMATS`.
    colour:
        Only the text back-end uses it; machine formats never carry colour.
    order:
        Electrode order for text and markdown (``weakest`` or ``rank``).

    Raises
    ------
    ValueError
        For an unknown format or order, listing the valid choices.
    """
    if fmt not in BACKENDS:
        raise ValueError(f"unknown format {fmt!r}; choose one of: {', '.join(FORMATS)}")
    if order not in ORDERS:
        raise ValueError(f"unknown order {order!r}; choose one of: {', '.join(ORDERS)}")
    BACKENDS[fmt](report, stream, colour, order)
