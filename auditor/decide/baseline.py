"""Baseline files: accept today's findings so that only new ones fail.

A baseline holds each finding's :attr:`~auditor.rules.finding.Finding.key`
(rule, sensor, nets, references) and how many findings had that key. No
coordinates, messages, uuids or measured values go in, so re-saving the board
in KiCad, nudging a part by a hair or solver noise do not make a finding
"new". Entries are sorted, so the file itself is byte-stable.

Matching counts: a key recorded once accepts one finding with that key; a
second one is new. Entries left unmatched are *stale* and reported.
"""

from __future__ import annotations

import dataclasses
import json
from collections import Counter
from collections.abc import Iterable
from pathlib import Path

from auditor.decide.policy import baseline_leftovers, mark_baseline
from auditor.decide.records import DecidedFinding, Report
from auditor.errors import ConfigError
from auditor.model.vocabulary import FindingKey

BASELINE_FORMAT = 1


@dataclasses.dataclass(frozen=True)
class Baseline:
    """Accepted finding keys with their counts."""

    counts: tuple[tuple[FindingKey, int], ...]

    @classmethod
    def of(cls, findings: Iterable[DecidedFinding]) -> Baseline:
        """Baseline accepting ``findings`` (waived ones need no baseline)."""
        counter = Counter(d.finding.key for d in findings if not d.waived)
        return cls(tuple(sorted(counter.items())))


def describe(key: FindingKey) -> str:
    """A key as people read it: ``rule-id on SENSOR (nets ...; refs ...)``."""
    rule_id, sensor, nets, refs = key
    where = [f"nets {', '.join(nets)}"] if nets else []
    where += [f"refs {', '.join(refs)}"] if refs else []
    text = f"{rule_id} on {sensor or 'the board'}"
    return text + (f" ({'; '.join(where)})" if where else "")


def dumps(baseline: Baseline) -> str:
    """The baseline file's text (JSON, sorted, final newline)."""
    entries = [{"rule_id": k[0], "sensor": k[1], "nets": list(k[2]), "refs": list(k[3]),
                "count": n} for k, n in baseline.counts]
    doc = {"padaudit_baseline": BASELINE_FORMAT, "entries": entries}
    return json.dumps(doc, indent=2, sort_keys=True) + "\n"


def _strings(value: object, path: Path, what: str) -> tuple[str, ...]:
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        raise ConfigError(path, f"baseline entry: {what} must be a list of strings")
    return tuple(value)


def _entry(raw: object, path: Path) -> tuple[FindingKey, int]:
    if not isinstance(raw, dict):
        raise ConfigError(path, "baseline entry must be an object")
    rule_id, sensor, count = raw.get("rule_id"), raw.get("sensor", ""), raw.get("count", 1)
    if not isinstance(rule_id, str) or not rule_id or not isinstance(sensor, str):
        raise ConfigError(path, "baseline entry needs a rule_id and a sensor string")
    if not isinstance(count, int) or isinstance(count, bool) or count < 1:
        raise ConfigError(path, f"baseline entry for {rule_id}: count must be a positive integer")
    key = (rule_id, sensor, _strings(raw.get("nets", []), path, "nets"),
           _strings(raw.get("refs", []), path, "refs"))
    return key, count


def _document(file: Path) -> object:
    """The file's JSON; whatever is wrong with it is a :class:`ConfigError`."""
    try:
        text = file.read_bytes().decode("utf-8")
        return json.loads(text)
    except OSError as exc:
        raise ConfigError(file, f"cannot read baseline: {exc.strerror or exc}") from None
    except UnicodeDecodeError as exc:
        raise ConfigError(file, f"baseline is not UTF-8 text (byte {exc.start} is "
                                f"0x{exc.object[exc.start]:02x})") from None
    except json.JSONDecodeError as exc:
        raise ConfigError(file, f"baseline is not JSON: {exc.msg}", exc.lineno, exc.colno) from None
    except RecursionError:
        raise ConfigError(file, "baseline is nested too deeply to be a padaudit baseline") \
            from None
    except ValueError:  # an integer of thousands of digits
        raise ConfigError(file, "baseline holds a number with too many digits (a count is "
                                "a small positive integer)") from None


def load_baseline(path: str | Path) -> Baseline:
    """Read a baseline file.

    Raises
    ------
    ConfigError
        When the file is missing, not JSON, or not a padaudit baseline, with
        the line and column of a JSON syntax error.
    """
    file = Path(path)
    doc = _document(file)
    if not isinstance(doc, dict) or doc.get("padaudit_baseline") != BASELINE_FORMAT:
        raise ConfigError(file, f"not a padaudit baseline (format {BASELINE_FORMAT} expected)")
    entries = doc.get("entries")
    if not isinstance(entries, list):
        raise ConfigError(file, "baseline has no 'entries' list")
    counter: Counter[FindingKey] = Counter()
    for raw in entries:
        key, count = _entry(raw, file)
        counter[key] += count
    return Baseline(tuple(sorted(counter.items())))


def _known_rule_ids(report: Report) -> frozenset[str]:
    """Every rule id padaudit has (registry), and those the report names."""
    from auditor.rules.registry import all_rules

    return frozenset(r.rule_id for r in all_rules()) | {r.rule_id for r in report.rules} \
        | {d.finding.rule_id for d in report.findings}


def apply_baseline(report: Report, baseline: Baseline) -> Report:
    """Mark findings the baseline accepts; list what it holds that was not found.

    Matching is :func:`auditor.decide.policy.mark_baseline` (findings in report
    order, each entry accepting ``count`` of them; waived findings are not
    marked but use up entries left over, so those are not stale).
    """
    marked, stale_keys = mark_baseline(report.findings, dict(baseline.counts))
    left = baseline_leftovers(marked, dict(baseline.counts))
    known = _known_rule_ids(report)
    stale = tuple(describe(k) + (f" (x{left[k]} not found)" if left[k] > 1 else "")
                  + ("" if k[0] in known else f" (unknown rule id '{k[0]}': a typo, or a "
                     "rule padaudit no longer has)")
                  for k in stale_keys)
    return dataclasses.replace(report, findings=marked,
                               stale_baseline=report.stale_baseline + stale)


def accepted_since(report: Report, earlier: Report) -> Report:
    """``report`` with the findings ``earlier`` also had marked as accepted,
    so only findings new since then can fail (``hook run --new-since REV``).

    Matching is that of a baseline written from ``earlier`` (by key, counted:
    a second finding with the same key is still new); what ``earlier`` had
    and is now fixed is not listed as stale.
    """
    marked, _stale = mark_baseline(report.findings, dict(Baseline.of(earlier.findings).counts))
    return dataclasses.replace(report, findings=marked)
