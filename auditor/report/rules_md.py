"""The rule catalogue as text: ``padaudit rules`` and ``docs/rules.md``.

``python -m auditor.cli.rules_doc > docs/rules.md`` regenerates the document; a
test checks the committed copy is current.
"""

from __future__ import annotations

from auditor.config.profiles import Profile, load_profile
from auditor.rules.registry import RuleSpec, all_rules


def threshold_lines(spec: RuleSpec, profile: Profile) -> list[str]:
    """``name = value  (origin)`` for each threshold the rule reads."""
    lines = []
    for name in spec.thresholds:
        value = profile.thresholds.get(name, "(not set)")
        shown = str(value).lower() if isinstance(value, bool) else str(value)
        origin = profile.origins.get(name, "") or "no origin given"
        lines.append(f"{name} = {shown}: {origin}")
    return lines


def rule_text(spec: RuleSpec, profile: Profile) -> str:
    """Everything about one rule, for the terminal."""
    level = profile.level_of(spec.rule_id) or spec.severity.label
    parts = [f"{spec.rule_id} ({level}): {spec.title}", "", spec.rationale, "",
             f"Fix: {spec.fix}", "",
             "Applies to: " + ("the board" if spec.scope == "board" else ", ".join(spec.kinds))]
    if spec.thresholds:
        parts += ["", f"Thresholds (profile {profile.name}):"]
        parts += [f"  {line}" for line in threshold_lines(spec, profile)]
    return "\n".join(parts) + "\n"


def rules_markdown(profile_name: str = "default") -> str:
    """The whole catalogue as Markdown."""
    profile = load_profile(profile_name)
    out = ["# padaudit rules", "",
           "Generated from the rule registry by `python -m auditor.cli.rules_doc`; do not edit.",
           f"Thresholds are those of the `{profile.name}` profile (`rules/{profile.name}.toml`).",
           "", "| Rule | Severity | Title |", "|------|----------|-------|"]
    specs = all_rules()
    out += [f"| [`{s.rule_id}`](#{s.rule_id}) | {s.severity.label} | {s.title} |" for s in specs]
    for spec in specs:
        out += ["", f"## {spec.rule_id}", "", f"**{spec.title}** (default severity "
                f"{spec.severity.label}; applies to "
                + ("the board" if spec.scope == "board" else ", ".join(spec.kinds)) + ")",
                "", spec.rationale, "", f"*Fix:* {spec.fix}"]
        if spec.thresholds:
            out += ["", "Thresholds:", ""]
            out += [f"- `{line.split(' = ', 1)[0]}` = {line.split(' = ', 1)[1]}"
                    for line in threshold_lines(spec, profile)]
    return "\n".join(out) + "\n"

