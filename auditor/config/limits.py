"""One table of every number padaudit reads from a file or an option: its
type, unit, range and why the range is what it is.

The configuration (``padaudit.toml``), the profiles' ``[thresholds]``,
``[sensors]`` and ``padaudit estimate``'s options all check their values here,
so a value refused in one place is refused everywhere with the same words.
Keys are the configuration's dotted names (``overlay.thickness_mm``,
``sensors.min_area_mm2``, ``thresholds.trace_max_vias``); quantities only
``estimate`` reads are under ``estimate.``. A threshold a rule declares but
this table does not know gets :data:`GENERIC_THRESHOLD`.

Upper bounds keep the field mesh and the geometry in floating point and in
memory: an air gap of 1e300 mm once grew to 21 GB, a 1e9 mm cover took 87 s
and 4.5 GB. On the demo board a 1000 mm cover took 16 s and 230 MB in the
quick audit (12 s and 126 MB with the defaults) but over 240 s and 1.2 GB
with --precise, so cover and air gap stop at 100 mm (104 s and 323 MB with
--precise, as with the defaults); lengths only ``estimate`` reads stop at
1000 mm.

Examples
--------
>>> LIMITS["air_gap_mm"].problem(-1)
'must be at least 0 mm (got -1)'
>>> LIMITS["thresholds.trace_max_vias"].problem(2.5)
'must be a whole number from 0 to 1000 (got 2.5)'
>>> LIMITS["thresholds.trace_max_vias"].problem(2) is None
True
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any, Literal

Kind = Literal["number", "integer", "flag"]

_BOARD = "common practice, no source: larger than any printed board"
_MESH = ("keeps the field mesh in floating point and in memory (1000 mm measured at "
         "16 s, 230 MB on the demo board)")
_FRACTION = "a fraction of a whole"
_COVER = ("past any cover; on the demo board --precise took 104 s and 323 MB at 100 mm "
          "(171 s, 325 MB with defaults) and over 240 s and 1.2 GB at 1000 mm")
_ER = "vacuum is 1; liquid water, about 80 (physics.md §2), is past any cover or board"


@dataclass(frozen=True)
class Limit:
    """The type, unit and range of one value.

    ``minimum`` is included unless ``above`` (then the value must be larger);
    ``zero_means`` names what 0 means where 0 is allowed below ``minimum``
    (``"no cover"``); ``option`` is the command-line option reading the same
    quantity.
    """

    kind: Kind
    unit: str
    minimum: float
    maximum: float
    why: str
    above: bool = False
    zero_means: str = ""
    option: str = ""

    def describe(self, with_unit: bool = True) -> str:
        """The range as people read it, e.g. ``0.001 to 1000 mm, or 0 (no cover)``."""
        if self.kind == "flag":
            return "true or false"
        low = f"more than {_num(self.minimum)}" if self.above else _num(self.minimum)
        unit = f" {self.unit}" if self.unit and with_unit else ""
        text = f"{low} to {_num(self.maximum)}{unit}"
        return text + (f", or 0 ({self.zero_means})" if self.zero_means else "")

    def problem(self, value: Any) -> str | None:
        """What is wrong with ``value`` (``None`` when it is acceptable)."""
        if self.kind == "flag":
            return None if isinstance(value, bool) else f"must be true or false (got {shown(value)})"
        kind = "a whole number" if self.kind == "integer" else "a number"
        wrong = f"must be {kind} from {self.describe()} (got {shown(value)})"
        if isinstance(value, bool) or not isinstance(value, int | float):
            return wrong
        if self.kind == "integer" and not isinstance(value, int):
            return wrong
        if isinstance(value, float) and not math.isfinite(value):
            return f"must be a finite number (got {shown(value)})"
        if value == 0 and self.zero_means:
            return None
        # int and float compare exactly in Python: a 400-digit integer is
        # compared, never converted to float (which overflowed).
        unit = f" {self.unit}" if self.unit else ""
        zero = f", or 0 ({self.zero_means})" if self.zero_means else ""
        if self.above and value <= self.minimum:
            return f"must be more than {_num(self.minimum)}{unit} (got {shown(value)})"
        if value < self.minimum:
            return f"must be at least {_num(self.minimum)}{unit}{zero} (got {shown(value)})"
        if value > self.maximum:
            return f"must be at most {_num(self.maximum)}{unit} (got {shown(value)})"
        return None

def _num(value: float) -> str:
    return f"{value:.15g}"


def shown(value: Any) -> str:
    """``value`` for a message; a huge integer by its number of digits."""
    if isinstance(value, int) and not isinstance(value, bool) and abs(value) >= 10 ** 15:
        return f"an integer of {len(str(abs(value)))} digits"
    text = repr(value)
    return text if len(text) <= 40 else text[:37] + "..."


def _mm(maximum: float, why: str = _BOARD, **extra: Any) -> Limit:
    return Limit("number", "mm", 0.0, maximum, why, **extra)


def _ratio(maximum: float = 1.0, why: str = _FRACTION) -> Limit:
    return Limit("number", "", 0.0, maximum, why)


def _count(maximum: float, minimum: float = 0.0) -> Limit:
    return Limit("integer", "", minimum, maximum, "common practice, no source")


_CONFIG: dict[str, Limit] = {
    "air_gap_mm": _mm(100.0, _COVER, option="--air-gap"),
    "overlay.thickness_mm": Limit(
        "number", "mm", 0.001, 100.0, "below 1 µm the finger touches the copper and the "
        "graded mesh fails; above, " + _COVER, zero_means="no cover", option="--overlay MM:..."),
    "overlay.epsilon_r": Limit("number", "", 1.0, 100.0, _ER, option="--overlay MM:ER"),
    "sensors.min_area_mm2": Limit("number", "mm²", 0.0, 1e6, _BOARD + " (1 m²)"),
    "sensors.cue_min_area_mm2": Limit("number", "mm²", 0.0, 1e6, _BOARD + " (1 m²)"),
    "sensors.controller_min_pads": _count(100_000, 2.0),
    **{f"sensors.{key}": _mm(1000.0) for key in (
        "proximity_diameter_mm", "neighbour_distance_mm", "gap_search_mm", "ground_ring_mm",
        "parts_radius_mm", "floating_radius_mm")},
}

_THRESHOLDS: dict[str, Limit] = {
    **{key: _mm(1000.0) for key in (
        "pad_min_diameter_mm", "pad_max_diameter_mm", "electrode_min_spacing_mm",
        "ground_gap_min_mm", "ground_gap_max_mm", "segment_gap_min_mm",
        "floating_copper_min_mm", "noisy_part_min_mm", "trace_max_width_mm",
        "noisy_net_min_mm", "series_max_to_pin_mm", "max_linearity_error_mm")},
    **{key: _mm(10_000.0, "common practice, no source: a trace may meander longer than "
                          "the board; 10 m is past any") for key in (
        "trace_max_length_mm", "parallel_max_mm", "segment_trace_max_spread_mm")},
    **{key: _mm(100.0, "common practice, no source: nothing 10 cm away is beside a pad")
       for key in ("parallel_distance_mm", "nearby_radius_mm")},
    "pad_diameter_per_electrical_mm": Limit("number", "mm per mm of t/er", 0.0, 1000.0,
                                            "common practice, no source"),
    "electrode_must_be_covered": Limit("flag", "", 0.0, 1.0, "on or off"),
    "under_shadow_min_fraction": _ratio(),
    "under_fill_max_ratio": _ratio(),
    "min_delta_ratio": _ratio(why="dC/Cp as a fraction; 1 is more than any pad gives"),
    "max_crosstalk_ratio": _ratio(why="in a Maxwell capacitance matrix C_ii is at "
                                      "least the sum of |C_ij| (physics.md §1.12; from memory)"),
    "max_ratio_loss": _ratio(why="a loss of dC/Cp as a fraction of it"),
    "segment_area_max_spread": _ratio(10.0, "a spread as a fraction of the mean area"),
    "ground_to_pad_min_ratio": _ratio(1000.0, "an area ratio; common practice, no source"),
    "sense_spacing_widths": Limit("number", "trace widths", 0.0, 1000.0,
                                  "common practice, no source"),
    "trace_max_vias": _count(1000),
    "trace_max_crossings": _count(100_000),
    **{key: Limit("number", "pF", 0.0, 100_000.0,
                  "common practice, no source: past any controller input")
       for key in ("controller_max_cp_pf", "large_electrode_max_cp_pf")},
    "pin_pf": Limit("number", "pF", 0.0, 50.0,
                    "a controller pin of more than 50 pF is a typing error, not a pin"),
    "min_delta_c_pf": Limit("number", "pF", 0.0, 1000.0,
                            "common practice, no source: past any finger's effect"),
    "trace_wide_max_added_pf": Limit("number", "pF", 0.0, 100_000.0,
                                     "common practice, no source: past any controller input"),
}

_ESTIMATE: dict[str, Limit] = {
    "pad_diameter_mm": _mm(1000.0, _MESH, above=True, option="--pad-diameter"),
    "gap_mm": _mm(1000.0, _MESH, above=True, option="--gap"),
    "ground_width_mm": _mm(1000.0, _MESH, above=True, option="--ground-width"),
    "ground_fill": Limit("number", "", 0.0, 1.0, "copper coverage, 1 = solid",
                         option="--ground-fill"),
    "plane_depth_mm": Limit("number", "mm", 0.001, 1000.0, "below 1 µm the graded mesh "
                            "cannot resolve the dielectric; above, " + _MESH,
                            option="--plane-below"),
    "plane_fill": Limit("number", "", 0.0, 1.0, "copper coverage, 1 = solid",
                        option="--plane-fill"),
    "hatch_pitch_mm": _mm(1000.0, _MESH, above=True, option="--hatch-pitch"),
    "board_er": Limit("number", "", 1.0, 100.0, _ER, option="--board-er"),
    "board_thickness_mm": _mm(1000.0, _MESH, above=True, option="--board-thickness"),
    "finger_diameter_mm": _mm(1000.0, _MESH, above=True, option="--finger"),
    "finger_height_mm": _mm(1000.0, _MESH, option="--finger-height"),
    "body_to_earth_pf": Limit("number", "pF", 0.0, 1000.0, "about 150 pF is usual (IEC "
                              "61000-4-2); 1000 pF is past any body", above=True,
                              option="--body-pf"),
    "cell_mm": _mm(1000.0, _MESH, above=True, option="--cell"),
}

#: Every value padaudit reads, by its dotted name.
LIMITS: Mapping[str, Limit] = {
    **_CONFIG,
    **{f"thresholds.{k}": v for k, v in _THRESHOLDS.items()},
    **{f"estimate.{k}": v for k, v in _ESTIMATE.items()},
}

#: For a threshold a rule declares and the table does not know (a new rule):
#: a finite non-negative number or a flag, small enough to stay in floating point.
GENERIC_THRESHOLD = Limit("number", "", 0.0, 1e9, "no range known: any finite number "
                          "from 0 (rule thresholds are sizes, counts and ratios)")


def threshold_problem(name: str, value: Any) -> str | None:
    """What is wrong with ``value`` for threshold ``name`` (``None``: fine)."""
    limit = LIMITS.get(f"thresholds.{name}")
    if limit is None:
        return None if isinstance(value, bool) else GENERIC_THRESHOLD.problem(value)
    return limit.problem(value)


#: Threshold pairs that must be ordered, lower first: the limits two rules
#: set on one quantity from either side. Out of order, every electrode
#: between them fails one rule or the other whatever its layout.
ORDERED_THRESHOLDS: tuple[tuple[str, str, str], ...] = (
    ("pad_min_diameter_mm", "pad_max_diameter_mm",
     "electrode-too-small and electrode-too-large"),
    ("ground_gap_min_mm", "ground_gap_max_mm", "ground-gap-tight and ground-gap-wide"),
    ("min_delta_ratio", "max_plausible_ratio", "ratio-low and model-implausible"),
)


@dataclass(frozen=True)
class OrderProblem:
    """Two thresholds out of order: ``lower`` is above ``upper``."""

    lower: str
    upper: str
    message: str


def order_problems(values: Mapping[str, Any]) -> tuple[OrderProblem, ...]:
    """The pairs of :data:`ORDERED_THRESHOLDS` that ``values`` (the merged
    thresholds of a run) put out of order; pairs with a value missing or not
    a number are left to the per-value checks.

    Examples
    --------
    >>> [(p.lower, p.upper) for p in order_problems(
    ...     {"ground_gap_min_mm": 3.0, "ground_gap_max_mm": 2.0})]
    [('ground_gap_min_mm', 'ground_gap_max_mm')]
    """
    found = []
    for lower, upper, rules in ORDERED_THRESHOLDS:
        low, high = values.get(lower), values.get(upper)
        if not all(isinstance(v, int | float) and not isinstance(v, bool) for v in (low, high)):
            continue
        if low > high:  # type: ignore[operator]
            found.append(OrderProblem(lower, upper, (
                f"{lower} = {_num(float(low))} is more than {upper} = {_num(float(high))}: "  # type: ignore[arg-type]
                f"{rules} would leave no value that passes both; the lower limit must not "
                "exceed the upper")))
    return tuple(found)


__all__ = ["GENERIC_THRESHOLD", "LIMITS", "ORDERED_THRESHOLDS", "Limit", "OrderProblem",
           "order_problems", "shown", "threshold_problem"]
