"""Which KiCad custom rules a board gets: the profile's limits for its sense nets.

For every electrode padaudit found, four kinds of rule, each from one
padaudit rule and its profile threshold:

* ``ground-gap-tight``: clearance from the electrode's copper to any other
  copper (``ground_gap_min_mm``; slider and wheel segments
  ``segment_gap_min_mm``, and ``ground_gap_min_mm`` to the ground net);
* ``copper-under-electrode``: no track or via of another net inside the
  electrode's courtyard (or its named zone), on any layer;
* ``trace-too-wide``: sense trace width at most ``trace_max_width_mm``;
* ``trace-near-noisy-net``: clearance from the sense path's tracks and vias
  to the board's noisy nets (``noisy_net_min_mm``).

Conditions use only what KiCad 6 has (``NetName``, ``Type``, ``Size_X``,
``insideCourtyard``, ``insideArea``); KiCad 7 and later still read them.
KiCad applies the *last* matching rule of a kind, so general rules come
first and the more specific ones (ground, noisy nets) after them.

What cannot be said in KiCad 6 terms (an electrode without a courtyard or
named zone) is not left out silently: it becomes a note at the top of the
file.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass

from auditor.model.board import Board
from auditor.model.items import Pad
from auditor.report.kicad_dru import DruRule, any_of, expr_string, mm, none_of, render_rules
from auditor.rules.context import ThresholdValue
from auditor.sensors.model import Sensor
from auditor.sensors.selection import matches

#: Rule kinds in file order (KiCad: the last matching rule wins).
_ORDER = ("segment-gap", "electrode-gap", "ground-gap", "under", "width", "noisy")
_SEGMENTED = ("slider", "wheel")


@dataclass(frozen=True)
class ExportInputs:
    """What the export reads: the board, its measured sensors, the profile's
    thresholds, the noisy-net patterns and the parts that have a courtyard."""

    board: Board
    sensors: tuple[Sensor, ...]
    thresholds: Mapping[str, ThresholdValue]
    noisy_globs: tuple[str, ...]
    courtyard_refs: frozenset[str] = frozenset()
    profile: str = "default"
    producer: str = "padaudit"
    board_label: str = ""
    #: Things the reader skipped or guessed: the file must say it may be incomplete.
    read_notes: tuple[str, ...] = ()


@dataclass(frozen=True)
class DruExport:
    """The rules for one board and the notes that head the file."""

    rules: tuple[DruRule, ...]
    notes: tuple[str, ...]
    noisy_nets: tuple[str, ...]
    electrodes: tuple[str, ...] = ()  # sensor names, in file order

    def text(self, *, header: bool = True) -> str:
        """The ``.kicad_dru`` text, or with ``header=False`` only what to
        append to an existing rules file (no ``(version 1)`` line)."""
        return render_rules(self.rules, self.notes, header=header)


@dataclass(frozen=True)
class _Where:
    """How KiCad 6 can pick out one electrode: its copper and its area."""

    copper: str  # condition on A selecting the electrode's copper, or ""
    region: str  # condition on A: inside the electrode's outline, or ""
    missing: str  # why region or copper is empty
    who: str = ""  # what the reason is about (parts), when not the sensor


def build_rules(inputs: ExportInputs) -> DruExport:
    """The KiCad rules for every sensor, ordered as KiCad needs them."""
    sense = _all_sense_nets(inputs.sensors)
    noisy = tuple(n for n in inputs.board.nets
                  if n and n not in sense and matches(n, inputs.noisy_globs))
    ranked: list[tuple[int, int, DruRule]] = []
    notes = list(_header(inputs, noisy))
    missing: dict[str, list[str]] = {}
    for index, sensor in enumerate(inputs.sensors):
        where = _locate(sensor, inputs)
        if where.missing:
            missing.setdefault(where.missing, []).append(where.who or sensor.name)
        for kind, rule in _sensor_rules(sensor, where, noisy, inputs, notes):
            ranked.append((_ORDER.index(kind), index, rule))
    notes += [f"{', '.join(names)}: {why}" for why, names in missing.items()]
    ranked.sort(key=lambda r: (r[0], r[1]))
    return DruExport(tuple(r for _, _, r in ranked), tuple(notes), noisy,
                     tuple(s.name for s in inputs.sensors))


def _header(inputs: ExportInputs, noisy: tuple[str, ...]) -> list[str]:
    label = inputs.board_label or inputs.board.path
    lines = [f"Touch-sensing rules exported by {inputs.producer} from {label}, "
             f"profile \"{inputs.profile}\".",
             "Each rule's comment names the padaudit rule and the profile limit it encodes.",
             "KiCad applies the last matching rule: keep these after your own rules.",
             "Conditions use KiCad 6 functions (insideCourtyard, insideArea); KiCad 7 and "
             "later read them too."]
    lines += [f"Reader warning (these rules cover only what padaudit could read): {n}"
              for n in inputs.read_notes]
    if noisy:
        lines.append("Noisy nets on this board: " + ", ".join(noisy) + ".")
    else:
        lines.append("No noisy nets on this board (none matches the noisy-net patterns): "
                     "no noisy-net clearance rules.")
    return lines


def _shown(length_mm: float) -> str:
    """A limit as people read it in a comment: ``0.5 mm``."""
    return mm(length_mm)[:-2] + " mm"


def _all_sense_nets(sensors: tuple[Sensor, ...]) -> frozenset[str]:
    return frozenset(n for s in sensors for n in _sense_nets(s))


def _sense_nets(sensor: Sensor) -> tuple[str, ...]:
    """The electrode's nets, then those of its path after the series part."""
    path_nets = sensor.path.nets if sensor.path else ()
    return tuple(dict.fromkeys(n for n in (*sensor.nets, *path_nets) if n))


def _limit(inputs: ExportInputs, name: str, notes: list[str]) -> float | None:
    value = inputs.thresholds.get(name)
    if value is None or isinstance(value, bool):
        note = f"the profile sets no {name}: its rule is left out."
        if note not in notes:
            notes.append(note)
        return None
    return float(value)


def _sensor_rules(sensor: Sensor, where: _Where, noisy: tuple[str, ...],
                  inputs: ExportInputs, notes: list[str]) -> list[tuple[str, DruRule]]:
    rules = _gap_rules(sensor, where, inputs, notes) + _under_rule(sensor, where)
    nets = _sense_nets(sensor)
    width = _limit(inputs, "trace_max_width_mm", notes)
    if width is not None and nets:
        rules.append(("width", DruRule(
            f"padaudit {sensor.name} sense trace width", "trace-too-wide",
            f"trace_max_width_mm = {_shown(width)} on the sense nets of {sensor.name}",
            any_of("A.NetName", nets), f"track_width (max {mm(width)})")))
    distance = _limit(inputs, "noisy_net_min_mm", notes)
    if distance is not None and noisy and nets:
        rules.append(("noisy", DruRule(
            f"padaudit {sensor.name} sense trace to noisy nets", "trace-near-noisy-net",
            f"noisy_net_min_mm = {_shown(distance)} from the tracks and vias of {sensor.name}'s "
            "sense path to every noisy net",
            f"A.Type != 'Pad' && {any_of('A.NetName', nets)} && {any_of('B.NetName', noisy)}",
            f"clearance (min {mm(distance)})")))
    return rules


def _gap_rules(sensor: Sensor, where: _Where, inputs: ExportInputs,
               notes: list[str]) -> list[tuple[str, DruRule]]:
    if not where.copper:
        return []
    segmented = sensor.kind in _SEGMENTED
    name = "segment_gap_min_mm" if segmented else "ground_gap_min_mm"
    gap = _limit(inputs, name, notes)
    rules: list[tuple[str, DruRule]] = []
    if gap is not None:
        rules.append(("segment-gap" if segmented else "electrode-gap", DruRule(
            f"padaudit {sensor.name} electrode gap", "ground-gap-tight",
            f"{name} = {_shown(gap)} from {sensor.name}'s copper to any other copper",
            where.copper, f"clearance (min {mm(gap)})")))
    ground = sensor.surroundings.ground_net if sensor.surroundings else ""
    ground_gap = _limit(inputs, "ground_gap_min_mm", notes) if segmented and ground else None
    if ground_gap is not None:
        rules.append(("ground-gap", DruRule(
            f"padaudit {sensor.name} electrode gap to ground", "ground-gap-tight",
            f"ground_gap_min_mm = {_shown(ground_gap)} from {sensor.name}'s copper to ground "
            f"{ground}", f"{where.copper} && B.NetName == {expr_string(ground)}",
            f"clearance (min {mm(ground_gap)})")))
    return rules


def _under_rule(sensor: Sensor, where: _Where) -> list[tuple[str, DruRule]]:
    if not where.region:
        return []
    return [("under", DruRule(
        f"padaudit {sensor.name} nothing under electrode", "copper-under-electrode",
        f"no track or via of another net inside {sensor.name}'s outline, on any layer",
        f"{where.region} && {none_of('A.NetName', sensor.nets)}", "disallow track via"))]


def _locate(sensor: Sensor, inputs: ExportInputs) -> _Where:
    nets = any_of("A.NetName", sensor.nets) if sensor.nets else ""
    if not nets:
        return _Where("", "", "electrode without a net, so no rule can name it.")
    if not sensor.refs:
        return _locate_zone(sensor, nets, inputs.board)
    refs = sorted(set(sensor.refs))
    if all(r in inputs.courtyard_refs for r in refs):
        region = _either(f"A.insideCourtyard({expr_string(r)})" for r in refs)
        return _Where(f"A.Type == 'Pad' && {nets} && {region}", region, "")
    lacking = ", ".join(r for r in refs if r not in inputs.courtyard_refs)
    copper = _by_pad_size(sensor, nets, inputs.board)
    why = ("no courtyard, so KiCad 6 cannot tell what lies under these electrodes (no "
           "copper-under-electrode rule); add a courtyard to each footprint and export again.")
    if not copper:
        why = why.replace("(no ", "nor pick their pads apart from other pads of their nets (no "
                          "electrode gap or ")
    return _Where(copper, "", why, lacking)


def _either(tests: Iterable[str]) -> str:
    parts = list(tests)
    return parts[0] if len(parts) == 1 else "(" + " || ".join(parts) + ")"


def _by_pad_size(sensor: Sensor, nets: str, board: Board) -> str:
    """Pick the electrode's pads among the pads of its nets by their size
    (``Size_X``, the unrotated width KiCad 6 exposes), when every electrode
    pad is wider than every other pad on those nets (a series resistor's)."""
    uids = set(sensor.footprint_uids)
    on_nets = [p for p in board.pads if p.net in sensor.nets]
    own = [p for p in on_nets if _belongs(p, uids, sensor.refs)]
    others = [p.width_mm for p in on_nets if not _belongs(p, uids, sensor.refs)]
    if not own:
        return ""
    smallest = min(p.width_mm for p in own)
    largest_other = max(others, default=0.0)
    if smallest <= largest_other:
        return ""
    return f"A.Type == 'Pad' && {nets} && A.Size_X > {mm((smallest + largest_other) / 2)}"


def _belongs(pad: Pad, uids: set[str], refs: tuple[str, ...]) -> bool:
    return pad.footprint_uid in uids if uids else pad.ref in refs


def _locate_zone(sensor: Sensor, nets: str, board: Board) -> _Where:
    zones = [z for z in board.zones
             if not z.is_rule_area and z.net in sensor.nets and sensor.layer in z.layers]
    if not zones:
        return _Where("", "", "copper that is neither a footprint pad nor a zone, so KiCad 6 "
                              "rules cannot pick it out (no electrode gap or "
                              "copper-under-electrode rule).")
    copper = f"A.Type == 'Zone' && {nets}"
    names = sorted({z.name for z in zones if z.name})
    if len(names) < len(zones):
        return _Where(copper, "", "zone without a name, so KiCad 6 cannot tell what lies "
                                  "under it (no copper-under-electrode rule); name the zone "
                                  "and export again.")
    return _Where(copper, _either(f"A.insideArea({expr_string(n)})" for n in names), "")


__all__ = ["DruExport", "ExportInputs", "build_rules"]
