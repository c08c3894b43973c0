"""Imports every module that registers built-in rules (import order does not
matter: the registry sorts by id)."""

from auditor.rules import (
    board,
    electrode,
    ground,
    groups,
    metrics,
    plausibility,
    precise_rules,
    trace,
)

__all__ = ["board", "electrode", "groups", "ground", "metrics", "plausibility", "precise_rules",
           "trace"]
