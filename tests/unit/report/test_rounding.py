"""The one rounding module (common practice, no source: deterministic output
needs rounding before printing, and -0.0 printed as 0.0)."""

from __future__ import annotations

import json

from auditor.report.rounding import rounded, rounded_tree


def test_rounded_never_gives_negative_zero() -> None:
    assert json.dumps(rounded(-1e-9, 6)) == "0.0"
    assert rounded(2.0000004, 6) == 2.0
    assert rounded(1.23456789, 4) == 1.2346


def test_rounded_tree_reaches_every_float_and_leaves_the_rest() -> None:
    tree = {"a": (1.23456, "text", 3, None), "b": [{"c": -0.00001}], "d": True}
    assert rounded_tree(tree, 3) == {"a": [1.235, "text", 3, None], "b": [{"c": 0.0}],
                                     "d": True}
