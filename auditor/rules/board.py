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
    title="Configured electrodes were not found",
    fix="Check the configured nets, net classes, references or zones against the board; "
        "`padaudit sensors BOARD` shows what was considered.",
    severity=Severity.ERROR,
)
def no_sensors(call: RuleCall) -> Iterator[Finding]:
    """The configuration names electrodes and none was found: the selection
    is wrong or the board changed under it, and an audit that found nothing
    to audit must not pass. Without such configuration a board with no
    electrode is simply reported as such (no-electrodes)."""
    if not call.board.touch_sensors and call.board.settings.electrodes_configured:
        yield call.finding("the configuration names electrodes, but none was found on "
                           "this board")


@board_rule(
    "no-electrodes",
    title="No touch electrodes found",
    fix="If the board does have electrodes, name their nets (touch, sense, button, slider "
        "...) or list them under [tool.padaudit.sensors] (nets, net_classes, refs); "
        "`padaudit sensors BOARD` shows the near misses.",
    severity=Severity.INFO,
)
def no_electrodes(call: RuleCall) -> Iterator[Finding]:
    """Many boards have no touch electrode at all (a shared CI check runs on
    every board of a repository), so finding none is a note, not a failure;
    the note still says that nothing was judged."""
    if not call.board.touch_sensors and not call.board.settings.electrodes_configured:
        yield call.finding("no touch electrodes found: nothing was judged")
