"""Rounding floats for documents, so solver noise cannot change the bytes.

Every JSON document padaudit writes rounds through this module: to a number
of decimal places (the estimate, sensors and inspect documents) or to six
significant digits (the report, SARIF and diff documents). ``-0.0`` always
becomes ``0.0``, which prints the same on every machine.
"""

from __future__ import annotations

import math
from typing import Any


def rounded(value: float, places: int) -> float:
    """``value`` to ``places`` decimal places, never ``-0.0``.

    Examples
    --------
    >>> rounded(-0.0000001, 6)
    0.0
    >>> rounded(2.718281828, 4)
    2.7183
    """
    return round(value, places) + 0.0


def rounded_tree(value: Any, places: int) -> Any:
    """``value`` with every float inside dicts, lists and tuples rounded
    (tuples become lists, as JSON writes them).

    Examples
    --------
    >>> rounded_tree({"a": [1.23456, (2.0001, "x")]}, 2)
    {'a': [1.23, [2.0, 'x']]}
    """
    if isinstance(value, float):
        return rounded(value, places)
    if isinstance(value, dict):
        return {key: rounded_tree(item, places) for key, item in value.items()}
    if isinstance(value, list | tuple):
        return [rounded_tree(item, places) for item in value]
    return value


def significant(value: float | None) -> float | None:
    """``value`` to six significant digits; ``None`` for None, NaN or infinity.

    Examples
    --------
    >>> significant(123.456789)
    123.457
    >>> significant(float("nan")) is None
    True
    """
    if value is None or not math.isfinite(value):
        return None
    if value == 0:
        return 0.0
    return float(f"{value:.6g}")


__all__ = ["rounded", "rounded_tree", "significant"]
