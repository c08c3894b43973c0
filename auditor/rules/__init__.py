"""Layout rules: a registry of small functions that yield findings."""

from auditor.rules.finding import Finding, Severity

__all__ = ["Finding", "Severity"]
