"""Command-line values on top of the configuration file (flags win)."""

from __future__ import annotations

import math
from dataclasses import replace
from typing import cast

from auditor.config.model import Config, Overlay
from auditor.config.values import overlay_of_material
from auditor.errors import UsageError
from auditor.model.vocabulary import POWER_PRESETS, TOUCH_SIDES, PowerPreset, TouchSide
from auditor.rules.finding import Severity


def parse_overlay_spec(text: str) -> Overlay:
    """``MM:MATERIAL`` or ``MM:ER`` as given to ``--overlay``.

    Examples
    --------
    >>> parse_overlay_spec("2:acrylic").epsilon_r
    2.8
    >>> parse_overlay_spec("1.5:3.1").describe()
    '1.5 mm (er 3.1)'
    """
    thickness_text, sep, what = text.partition(":")
    try:
        thickness_mm = float(thickness_text)
    except ValueError:
        thickness_mm = -1.0
    if not sep or not 0 <= thickness_mm < math.inf or not what.strip():
        raise UsageError(f"--overlay {text!r}: expected MM:MATERIAL or MM:ER, "
                         "e.g. 2:acrylic or 1.5:3.1")
    try:
        epsilon_r = float(what)
    except ValueError:
        try:
            return overlay_of_material(thickness_mm, what)
        except UsageError as exc:
            raise UsageError(f"--overlay {text!r}: {exc}") from None
    if not 1.0 <= epsilon_r < math.inf:
        raise UsageError(f"--overlay {text!r}: relative permittivity must be a finite number "
                         "of at least 1")
    return Overlay(thickness_mm, epsilon_r, "")


def _choice(value: str, choices: tuple[str, ...], flag: str) -> str:
    if value.lower() not in choices:
        raise UsageError(f"{flag} {value!r}: choose one of: {', '.join(choices)}")
    return value.lower()


def with_overrides(config: Config, *, profile: str | None = None, overlay: str | None = None,
                   power: str | None = None, touch_side: str | None = None,
                   fail_on: str | None = None) -> Config:
    """``config`` with every given command-line value replacing the file's."""
    changes: dict[str, object] = {}
    if profile:
        changes["profile"] = profile
        changes["base_dir"] = None  # a profile path on the command line is relative to cwd
    if overlay:
        changes["overlay"] = parse_overlay_spec(overlay)
    if power:
        changes["power"] = cast(PowerPreset, _choice(power, POWER_PRESETS, "--power"))
    if touch_side:
        changes["touch_side"] = cast(TouchSide, _choice(touch_side, TOUCH_SIDES, "--touch-side"))
    if fail_on:
        try:
            changes["fail_on"] = Severity.parse(fail_on)
        except ValueError as exc:
            raise UsageError(f"--fail-on: {exc}") from None
    return replace(config, **changes)  # type: ignore[arg-type]
