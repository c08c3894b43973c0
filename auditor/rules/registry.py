"""The rule registry: one decorator per rule, one runner for all of them.

A rule is a small generator function registered with :func:`sensor_rule`
(called once per sensor of the kinds it applies to) or :func:`board_rule`
(called once per board). The decorator carries everything people need to
know about the rule; the function's docstring is its rationale.

Examples
--------
>>> from auditor.rules.registry import all_rules
>>> all(spec.rule_id == spec.rule_id.lower() for spec in all_rules())
True
"""

from __future__ import annotations

import inspect
import re
from collections.abc import Callable, Iterable, Iterator
from dataclasses import dataclass, field
from typing import Protocol

from auditor.model.vocabulary import TOUCH_KINDS, SensorKind
from auditor.rules.context import Limits, RuleContext
from auditor.rules.finding import Finding, Severity
from auditor.sensors.model import Sensor


class SourcePlaced(Protocol):
    """Anything read from the board file that knows where it starts."""

    @property
    def source_line(self) -> int | None: ...  # noqa: D102 - a protocol member

    @property
    def source_column(self) -> int | None: ...  # noqa: D102


_SLUG = re.compile(r"^[a-z][a-z0-9]*(-[a-z0-9]+)*$")

#: Sensor rules run on these kinds only (key switches and other non-touch
#: kinds get none).
ALL_KINDS: tuple[SensorKind, ...] = TOUCH_KINDS


@dataclass(frozen=True)
class RuleCall:
    """One invocation of a rule: its limits, the board context and a finding
    factory that fills in the rule's id and default severity."""

    rule_id: str
    severity: Severity
    limits: Limits
    board: RuleContext

    def finding(self, message: str, sensor: Sensor | None = None,
                measured: Iterable[tuple[str, float]] = (), *,
                nets: Iterable[str] | None = None, refs: Iterable[str] | None = None,
                x_mm: float | None = None, y_mm: float | None = None,
                layer: str | None = None, item: SourcePlaced | None = None) -> Finding:
        """A :class:`Finding` of this rule, located at ``sensor`` unless told;
        ``item`` (a track, via, pad or zone the finding is about) gives the
        line in the board file, else the sensor's first item does."""
        placed: SourcePlaced | None = item if item is not None else sensor
        return Finding(
            rule_id=self.rule_id,
            severity=self.severity,
            message=message,
            x_mm=x_mm if x_mm is not None else (sensor.x_mm if sensor else None),
            y_mm=y_mm if y_mm is not None else (sensor.y_mm if sensor else None),
            layer=layer if layer is not None else (sensor.layer if sensor else ""),
            nets=tuple(sorted(set(nets if nets is not None else
                                  (sensor.nets if sensor else ())))),
            refs=tuple(sorted(set(refs if refs is not None else
                                  (sensor.refs if sensor else ())))),
            measured=tuple((k, round(float(v), 6)) for k, v in measured),
            sensor=sensor.name if sensor else "",
            source_line=placed.source_line if placed is not None else None,
            source_column=placed.source_column if placed is not None else None,
        )


SensorRuleFn = Callable[[Sensor, RuleCall], Iterator[Finding]]
BoardRuleFn = Callable[[RuleCall], Iterator[Finding]]


@dataclass(frozen=True)
class RuleSpec:
    """A registered rule and what it says about itself."""

    rule_id: str
    title: str
    rationale: str
    fix: str
    severity: Severity
    thresholds: tuple[str, ...]
    kinds: tuple[SensorKind, ...]
    scope: str  # "sensor" or "board"
    function: Callable[..., Iterator[Finding]] = field(compare=False, repr=False)
    module: str = ""

    def run(self, ctx: RuleContext) -> list[Finding]:
        """All findings of this rule on one board (exceptions propagate)."""
        call = RuleCall(self.rule_id, self.severity,
                        ctx.limits_for(self.rule_id, self.thresholds), ctx)
        if self.scope == "board":
            return list(self.function(call))
        found: list[Finding] = []
        for sensor in ctx.sensors:
            if sensor.kind in self.kinds:
                found.extend(self.function(sensor, call))
        return found


_REGISTRY: dict[str, RuleSpec] = {}


def _register(spec: RuleSpec) -> None:
    if not _SLUG.match(spec.rule_id):
        raise ValueError(f"rule id {spec.rule_id!r} is not a lower-case slug")
    if spec.rule_id in _REGISTRY:
        raise ValueError(f"rule id {spec.rule_id!r} registered twice")
    _REGISTRY[spec.rule_id] = spec


def _decorate(rule_id: str, title: str, fix: str, severity: Severity,
              thresholds: tuple[str, ...], kinds: tuple[SensorKind, ...],
              scope: str) -> Callable[[Callable[..., Iterator[Finding]]],
                                      Callable[..., Iterator[Finding]]]:
    def wrap(function: Callable[..., Iterator[Finding]]) -> Callable[..., Iterator[Finding]]:
        _register(RuleSpec(rule_id, title, _reflowed(function.__doc__ or ""), fix,
                           severity, thresholds, kinds, scope, function,
                           function.__module__))
        return function
    return wrap


def _reflowed(doc: str) -> str:
    """A docstring as paragraphs of one line each."""
    paragraphs = inspect.cleandoc(doc).split("\n\n")
    return "\n\n".join(" ".join(p.split()) for p in paragraphs)


def sensor_rule(rule_id: str, *, title: str, fix: str, severity: Severity,
                thresholds: tuple[str, ...] = (),
                kinds: tuple[SensorKind, ...] = ALL_KINDS,
                ) -> Callable[[SensorRuleFn], SensorRuleFn]:
    """Register a rule called once per sensor of one of ``kinds``."""
    return _decorate(rule_id, title, fix, severity, thresholds, kinds, "sensor")


def board_rule(rule_id: str, *, title: str, fix: str, severity: Severity,
               thresholds: tuple[str, ...] = ()) -> Callable[[BoardRuleFn], BoardRuleFn]:
    """Register a rule called once per board."""
    return _decorate(rule_id, title, fix, severity, thresholds, ALL_KINDS, "board")


def all_rules() -> tuple[RuleSpec, ...]:
    """Every registered rule, sorted by id (imports the rule modules)."""
    import auditor.rules.builtin  # noqa: F401 - registers the rules

    return tuple(_REGISTRY[k] for k in sorted(_REGISTRY))


@dataclass(frozen=True)
class RuleRun:
    """Findings of every rule that ran, and the rules that crashed."""

    findings: tuple[Finding, ...]
    errors: tuple[tuple[str, str], ...]


def run_rules(ctx: RuleContext, rule_ids: Iterable[str] | None = None) -> RuleRun:
    """Run the rules (all, or those in ``rule_ids``) on one board.

    A rule that raises is recorded in ``errors`` as ``(rule id, message)``;
    its partial findings are dropped and the other rules still run.
    """
    wanted = None if rule_ids is None else set(rule_ids)
    findings: list[Finding] = []
    errors: list[tuple[str, str]] = []
    for spec in all_rules():
        if wanted is not None and spec.rule_id not in wanted:
            continue
        try:
            findings.extend(spec.run(ctx))
        except Exception as exc:  # noqa: BLE001 - one broken rule must not hide the rest
            errors.append((spec.rule_id, f"{type(exc).__name__}: {exc}"))
    return RuleRun(tuple(findings), tuple(errors))
