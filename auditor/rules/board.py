"""Board-level rules: what the reader could not understand, and boards on
which no electrode was found."""

from __future__ import annotations

from collections import Counter
from collections.abc import Iterator

from auditor.rules.finding import Finding, Severity
from auditor.rules.registry import RuleCall, board_rule


@board_rule(
    "read-incomplete",
    title="The board file was only partly understood",
    fix="Read the listed warnings; refill zones in KiCad (B key) and save, or report the "
        "unsupported item so padaudit learns it.",
    severity=Severity.WARNING,
)
def read_incomplete(call: RuleCall) -> Iterator[Finding]:
    """Whatever the reader skipped or guessed was not checked, so a board with
    reader warnings is never reported as clean. One finding per kind of
    warning, with its count and the first place it occurred."""
    by_code = Counter(w.code for w in call.board.read_warnings)
    for code in sorted(by_code):
        first = next(w for w in call.board.read_warnings if w.code == code)
        where = f" (first at line {first.line})" if first.line is not None else ""
        yield call.finding(
            f"reader warning {code} x{by_code[code]}: {first.message}{where}",
            measured=(("count", float(by_code[code])),), nets=(), refs=(code,))


@board_rule(
    "no-sensors",
    title="No touch electrode was found",
    fix="Name the sense nets (touch, sense, button, slider ...) or list them under "
        "[tool.padaudit.sensors] (nets, net_classes, refs); `padaudit sensors BOARD` shows "
        "what was considered.",
    severity=Severity.ERROR,
)
def no_sensors(call: RuleCall) -> Iterator[Finding]:
    """An audit that found nothing to audit must not pass silently: either the
    board has no electrodes or the selection did not recognise them."""
    if not call.board.sensors:
        yield call.finding("no touch electrodes were found on this board")
