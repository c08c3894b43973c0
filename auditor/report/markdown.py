"""A Markdown summary for a pull-request comment: verdict line, compact
electrode table, failing findings in full, the rest folded away."""

from __future__ import annotations

from typing import TextIO

from auditor.decide.records import DecidedFinding, Report
from auditor.report.suggestion_view import suggestion_line
from auditor.report.text import ordered_sensors
from auditor.report.text_precise import strongest_pairs
from auditor.report.verdicts import electrode_verdicts

#: Coupled pairs named in the summary line.
TOP_PAIRS = 3

#: Findings listed per section; a PR comment must stay well under the size
#: limit of code-hosting services (GitHub: 65536 characters).
MAX_LISTED = 60


def cell(text: str) -> str:
    """Escape a value for a Markdown table cell (pipes, line breaks)."""
    return text.replace("\\", "\\\\").replace("|", "\\|").replace("\n", " ")


def _headline(report: Report) -> str:
    info = report.info
    failing = len(report.failing)
    if report.exit_code == 0:
        verdict = "**pass**"
        if report.read_warnings:
            verdict += f" (incomplete: {len(report.read_warnings)} item(s) skipped while reading)"
    elif failing:
        verdict = f"**fail**: {failing} finding{'s' if failing != 1 else ''} at or above {info.fail_on.label}"
    else:
        verdict = "**fail**: a rule crashed"
    return f"### padaudit: {verdict} · `{cell(info.board_path)}`"


def _where(d: DecidedFinding) -> str:
    f = d.finding
    parts = []
    if f.x_mm is not None and f.y_mm is not None:
        parts.append(f"({f.x_mm:.2f}, {f.y_mm:.2f}) mm")
    if f.layer:
        parts.append(f.layer)
    parts += [", ".join(f.refs)] if f.refs else []
    return " · ".join(parts) or "board"


def _finding_line(d: DecidedFinding, fixes: dict[str, str]) -> str:
    f = d.finding
    line = f"- **{d.severity.label}** `{f.rule_id}`"
    line += f" {f.sensor}: " if f.sensor else ": "
    line += f"{f.message} ({_where(d)})"
    if fixes.get(f.rule_id):
        line += f"  \n  fix: {fixes[f.rule_id]}"
    if d.waived:
        line += f"  \n  waived: {d.waived}"
    if d.in_baseline:
        line += "  \n  in the baseline"
    for suggestion in d.suggestions:
        line += f"  \n  try: {suggestion_line(suggestion)}"
    return line


def _table(report: Report, order: str) -> list[str]:
    lines = ["| rank | sensor | kind | Cp total pF | ΔC pF | ΔC/Cp | signal | verdict |",
             "|---:|---|---|---:|---:|---:|---|---|"]
    verdicts = electrode_verdicts(report)
    for r in ordered_sensors(report.sensors, order):
        m = r.metrics
        nums = ("–", "–", "–") if m is None else (
            f"{m.cp_total_pf:.2f}", f"{m.delta_c_pf:.3f}", f"{m.delta_ratio * 100:.2f} %")
        rank = str(r.rank) if m else "–"
        lines.append(f"| {rank} | {cell(r.sensor.name)} | {r.sensor.kind} | "
                     f"{' | '.join(nums)} | {r.strength} | {verdicts[r.sensor.name]} |")
    return lines


def _precise(report: Report) -> list[str]:
    """Coupling and slider/wheel linearity in a few lines (``--precise`` only)."""
    extras = report.precise
    if extras is None:
        return []
    out = ["", "#### Precise solve", ""]
    solved = [r.metrics for r in report.sensors if r.metrics is not None]
    changes = [(abs(d[1]), d[1], r.sensor.name) for r in report.sensors
               if r.metrics and (d := r.metrics.quick_difference) is not None]
    line = (f"{sum(1 for m in solved if m.method != 'quick')} of {len(solved)} solved "
            "electrodes in 3-D")
    if changes:
        _, change, name = max(changes)
        line += f"; largest ΔC change against the quick estimate {change * 100:+.1f} % ({cell(name)})"
    out.append(line + ".")
    pairs = strongest_pairs(extras)[:TOP_PAIRS]
    if pairs:
        named = ", ".join(f"`{cell(p.first)}`–`{cell(p.second)}` {p.crosstalk_pf:.3f} pF "
                          f"({p.worst_fraction * 100:.1f} % of a Cp)" for p in pairs)
        out += ["", f"Strongest coupling: {named}."]
    if extras.scans:
        out += ["", "| slider/wheel | linearity mm | dead zones | reversals |",
                "|---|---:|---|---|"]
        for scan in extras.scans:
            zones = ", ".join(f"{a:.1f}–{b:.1f} mm" for a, b in scan.dead_zones_mm) or "none"
            back = ", ".join(f"{p:.1f} mm" for p in scan.reversals_mm) or "none"
            out.append(f"| {cell(scan.group)} ({scan.kind}) | {scan.linearity_mm:.2f} | "
                       f"{zones} | {back} |")
    return out


def _capped(lines: list[str]) -> list[str]:
    """At most :data:`MAX_LISTED` lines: pull-request comments have a size limit."""
    if len(lines) <= MAX_LISTED:
        return lines
    left = len(lines) - MAX_LISTED
    return lines[:MAX_LISTED] + [f"- … and {left} more (see the full report)"]


def render_markdown(report: Report, stream: TextIO, *, order: str = "weakest") -> None:
    """Write the pull-request summary to ``stream``."""
    info = report.info
    fixes = {r.rule_id: r.fix for r in report.rules}
    failing_ids = {id(d) for d in report.failing}
    out = [_headline(report), "",
           f"profile `{cell(info.profile)}` · overlay {cell(info.overlay)} · touch side "
           f"{cell(info.touch_side)} · power {cell(info.power)} · padaudit {info.tool_version}",
           ""]
    out += [f"> **Caution:** {c}" for c in report.cautions]
    out += [""] if report.cautions else []
    out += _table(report, order) if report.sensors else ["No electrodes found."]
    out += _precise(report)
    failing = [d for d in report.findings if id(d) in failing_ids]
    rest = [d for d in report.findings if id(d) not in failing_ids]
    if failing:
        out += ["", f"#### Failing ({len(failing)})", ""]
        out += _capped([_finding_line(d, fixes) for d in failing])
    if rest:
        out += ["", f"<details><summary>Other findings ({len(rest)})</summary>", ""]
        out += _capped([_finding_line(d, fixes) for d in rest])
        out += ["", "</details>"]
    for title, items in (("Notes", report.notes),
                         ("Skipped while reading", report.read_warnings),
                         ("Stale waivers", report.stale_waivers),
                         ("Stale baseline entries", report.stale_baseline),
                         ("Crashed rules", tuple(f"`{r}`: {e}" for r, e in report.rule_errors))):
        if items:
            out += ["", f"**{title}**", ""] + [f"- {cell(i)}" for i in items]
    stream.write("\n".join(out) + "\n")
