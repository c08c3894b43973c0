"""The last line of every run, rendered from :class:`~auditor.decide.summary.RunSummary`.

One wording for ``audit``, ``audit --against``, ``diff`` and ``hook``: the
verdict, the counts (errors, warnings, waived, baselined, stale), why it
fails, and the exit code it agrees with.
"""

from __future__ import annotations

from typing import TextIO

from rich.console import Console
from rich.text import Text

from auditor.decide.summary import FindingCounts, RunSummary


def _plural(count: int, word: str) -> str:
    return f"{count} {word}{'' if count == 1 else 's'}"


def describe_counts(counts: FindingCounts) -> str:
    """``2 errors, 1 warning, 0 waived, 3 baselined, 0 stale`` (info only when any)."""
    parts = [_plural(counts.errors, "error"), _plural(counts.warnings, "warning")]
    parts += [f"{counts.notes} info"] if counts.notes else []
    parts += [f"{counts.waived} waived", f"{counts.baselined} baselined",
              f"{counts.stale} stale"]
    return ", ".join(parts)


def _clauses(summary: RunSummary) -> list[str]:
    counts = describe_counts(summary.counts)
    clauses = [f"new: {counts}" if summary.new_only else counts]
    if summary.exit_code:
        clauses += list(summary.reasons)
    else:
        clauses.append(f"nothing {'new ' if summary.new_only else ''}at or above "
                       f"{summary.fail_on.label}")
    if summary.incomplete:  # partly understood is not clean: say so on the last line
        clauses.append(f"INCOMPLETE: {summary.incomplete} item(s) skipped or guessed "
                       "while reading")
    if summary.electrodes == 0:
        clauses.append("no electrodes were found, so nothing was judged")
    return clauses


def summary_line(summary: RunSummary) -> str:
    """The closing line as plain text.

    Examples
    --------
    >>> from auditor.decide.summary import FindingCounts, RunSummary
    >>> from auditor.rules.finding import Severity
    >>> summary_line(RunSummary(0, FindingCounts(warnings=2), (), Severity.ERROR, electrodes=3))
    'PASS  0 errors, 2 warnings, 0 waived, 0 baselined, 0 stale; nothing at or above error (exit 0)'
    """
    verdict = "FAIL" if summary.exit_code else "PASS"
    code = f"exit {summary.exit_code}"
    if summary.demo and summary.exit_code:
        code = f"demo: exit 0; an audit would {code}"
    return f"{verdict}  {'; '.join(_clauses(summary))} ({code})"


def summary_text(summary: RunSummary) -> Text:
    """The closing line for rich, the verdict coloured."""
    line = summary_line(summary)
    text = Text(line[:4], style="bold red" if summary.exit_code else "bold green")
    text.append(line[4:], style="bold yellow" if summary.incomplete else "")
    return text


def render_summary(summary: RunSummary, stream: TextIO, colour: bool = False) -> None:
    """Write the closing line to ``stream``: the verdict coloured when
    ``colour``; wrapped at words on a terminal, whole on one line elsewhere
    (a log search then finds it)."""
    terminal = stream.isatty()
    if not colour and not terminal:
        stream.write(summary_line(summary) + "\n")
        return
    console = Console(file=stream, force_terminal=colour, no_color=not colour,
                      color_system="standard" if colour else None, highlight=False,
                      emoji=False, markup=False, soft_wrap=not terminal)
    console.print(summary_text(summary))
