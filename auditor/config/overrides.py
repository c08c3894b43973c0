"""Command-line values on top of the configuration file (flags win)."""

from __future__ import annotations

import math
from dataclasses import replace
from typing import cast

from auditor.config.limits import LIMITS
from auditor.config.load import check_threshold_order
from auditor.config.model import Config, Overlay
from auditor.config.profiles import Profile, load_profile, resolve_profile
from auditor.config.values import overlay_of_material
from auditor.errors import ConfigError, UsageError
from auditor.model.vocabulary import POWER_PRESETS, TOUCH_SIDES, PowerPreset, TouchSide
from auditor.rules.finding import Severity

#: The cover's range, from the one table of limits (why: there).
MIN_OVERLAY_MM = LIMITS["overlay.thickness_mm"].minimum
MAX_OVERLAY_MM = LIMITS["overlay.thickness_mm"].maximum
_SPEC_HELP = "expected MM:MATERIAL, MM:ER or none, e.g. 2:acrylic or 1.5:3.1"


def parse_overlay_spec(text: str, option: str = "--overlay") -> Overlay:
    """``MM:MATERIAL``, ``MM:ER`` or ``none`` as given to ``--overlay``.

    Every error names the option and the text given. ``none`` is no cover
    (thickness 0, er 1).

    Examples
    --------
    >>> parse_overlay_spec("2:acrylic").epsilon_r
    2.8
    >>> parse_overlay_spec("1.5:3.1").describe()
    '1.5 mm (er 3.1)'
    >>> parse_overlay_spec("none").thickness_mm
    0.0
    """
    def fail(message: str) -> UsageError:
        return UsageError(f"{option} {text!r}: {message}")

    if text.strip().lower() == "none":
        return Overlay(0.0, 1.0, "")
    thickness_text, sep, what = text.partition(":")
    try:
        thickness_mm = float(thickness_text)
    except ValueError:
        thickness_mm = math.nan
    if not sep or not math.isfinite(thickness_mm) or not what.strip():
        raise fail(_SPEC_HELP)
    if not MIN_OVERLAY_MM <= thickness_mm <= MAX_OVERLAY_MM:
        raise fail(f"thickness must be from {MIN_OVERLAY_MM:g} mm (1 µm) to "
                   f"{MAX_OVERLAY_MM:g} mm; for no cover write {option} none")
    try:
        epsilon_r = float(what)
    except ValueError:
        try:
            return overlay_of_material(thickness_mm, what)
        except UsageError as exc:
            raise fail(str(exc)) from None
    problem = LIMITS["overlay.epsilon_r"].problem(epsilon_r)
    if problem is not None:
        raise fail(f"relative permittivity {problem}")
    return Overlay(thickness_mm, epsilon_r, "")


def _choice(value: str, choices: tuple[str, ...], flag: str) -> str:
    if value.lower() not in choices:
        raise UsageError(f"{flag} {value!r}: choose one of: {', '.join(choices)}")
    return value.lower()


def check_profile_option(profile: str) -> None:
    """Check a ``--profile`` value names a built-in profile or a file (a path
    on the command line is relative to the working folder).

    Raises
    ------
    UsageError
        One line naming the option, with the valid choices; the message
        already quotes the name, so it is not repeated.
    """
    try:
        resolve_profile(profile)
    except ConfigError as exc:
        raise UsageError(f"--profile: {exc.message}") from None


def profile_option(profile: str) -> Profile:
    """The profile ``--profile`` names, checked as :func:`check_profile_option`
    does (a profile file that is found but malformed keeps its file:line error)."""
    check_profile_option(profile)
    return load_profile(profile)


def with_overrides(config: Config, *, profile: str | None = None, overlay: str | None = None,
                   power: str | None = None, touch_side: str | None = None,
                   fail_on: str | None = None) -> Config:
    """``config`` with every given command-line value replacing the file's."""
    changes: dict[str, object] = {}
    if profile:
        check_profile_option(profile)
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
    merged = replace(config, **changes)  # type: ignore[arg-type]
    check_threshold_order(merged)
    return merged
