"""A suggested fix as every back-end shows it: one line of text, or a record.

The text reads ``change: Cp a -> b pF, ΔC c -> d pF, ΔC/Cp e -> f %`` so the
three numbers a designer weighs are side by side, before and after.
"""

from __future__ import annotations

from typing import Any

from auditor.model.suggestions import Predicted, Suggestion
from auditor.report.rounding import significant


def effect_text(suggestion: Suggestion, arrow: str = "→", sep: str = ", ") -> str:
    """Cp, ΔC and ΔC/Cp before and after, e.g. ``Cp 5.43 → 5.86 pF, ...``."""
    b, p = suggestion.before, suggestion.predicted
    return sep.join((f"Cp {b.cp_total_pf:.2f} {arrow} {p.cp_total_pf:.2f} pF",
                     f"ΔC {b.delta_c_pf:.3f} {arrow} {p.delta_c_pf:.3f} pF",
                     f"ΔC/Cp {100 * b.delta_ratio:.2f} {arrow} {100 * p.delta_ratio:.2f} %"))


def suggestion_line(suggestion: Suggestion, arrow: str = "→") -> str:
    """The change and its predicted effect in one line.

    >>> s = Suggestion("grow the pad to 7.2 mm across", "pad_diameter_mm", 6.0, 7.2,
    ...                Predicted(5.43, 0.183, 0.0336), Predicted(5.86, 0.272, 0.0463))
    >>> suggestion_line(s, "->")
    'grow the pad to 7.2 mm across: Cp 5.43 -> 5.86 pF, ΔC 0.183 -> 0.272 pF, ΔC/Cp 3.36 -> 4.63 %'
    """
    return f"{suggestion.change}: {effect_text(suggestion, arrow)}"


def _predicted(p: Predicted) -> dict[str, Any]:
    return {"cp_total_pf": significant(p.cp_total_pf), "delta_c_pf": significant(p.delta_c_pf),
            "delta_ratio": significant(p.delta_ratio)}


def suggestion_record(suggestion: Suggestion) -> dict[str, Any]:
    """The suggestion as JSON-ready data (JSON report and SARIF properties)."""
    return {"change": suggestion.change, "parameter": suggestion.parameter,
            "from": significant(suggestion.from_value), "to": significant(suggestion.to_value),
            "clears": suggestion.clears, "before": _predicted(suggestion.before),
            "predicted": _predicted(suggestion.predicted)}
