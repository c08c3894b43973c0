"""Which model answers each mutual pair, on the mutual fixtures
(fixtures/make_mutual_boards.py; manifest.json names the expected model),
and what the 3-D answer changes.

The independent answer for the comb keys is the 3-D solve of the real
copper (its pair coupling checked against the coplanar-strip closed form
and the disk-and-ring geometry in test_mutual_precise.py)."""

from __future__ import annotations

import json
from functools import lru_cache
from pathlib import Path

import pytest

from auditor.audit import AuditOptions, _measured, measuring_selection, resolve_setup, run_audit
from auditor.model.results import PadMetrics
from auditor.read import read_board
from auditor.sensors import find_sensors
from auditor.sensors.model import Sensor
from auditor.solve.mutual import mutual_partner
from auditor.solve.mutual_pairs import pair_route

MUTUAL = Path(__file__).resolve().parents[3] / "fixtures" / "mutual"
MANIFEST = json.loads((MUTUAL / "manifest.json").read_text(encoding="utf-8"))


def _sensors(board_name: str, folder: Path = MUTUAL) -> tuple[Sensor, ...]:
    path = folder / board_name
    options = AuditOptions(solve=False)
    setup = resolve_setup(path, options)
    board = read_board(path)
    found, _ = find_sensors(board, measuring_selection(setup))
    return _measured(board, found, measuring_selection(setup), setup, options)[0]


@lru_cache(maxsize=8)
def _metrics(case: str, mode: str) -> dict[str, PadMetrics]:
    options = AuditOptions(quick=mode == "quick", precise=mode == "precise")
    report = run_audit(MUTUAL / f"{case}.kicad_pcb", options)
    return {r.sensor.name: r.metrics for r in report.sensors if r.metrics is not None}


@pytest.mark.parametrize("case", sorted(MANIFEST["cases"]))
def test_automatic_mode_routes_as_the_manifest_says(case: str) -> None:
    sensors = _sensors(MANIFEST["cases"][case]["board"])
    routes = {}
    for rx in (s for s in sensors if s.kind == "mutual-rx"):
        tx = mutual_partner(rx, sensors)
        assert tx is not None
        routes[rx.name] = pair_route(rx, tx, "auto")
    assert {name: r.method for name, r in routes.items()} == MANIFEST["cases"][case]["routes"]
    assert all(r.reason for r in routes.values())


def test_forcing_flags_override_the_automatic_choice() -> None:
    sensors = _sensors("comb-keys.kicad_pcb")
    rx = next(s for s in sensors if s.kind == "mutual-rx")
    tx = mutual_partner(rx, sensors)
    assert tx is not None
    assert pair_route(rx, tx, "auto").reason.startswith("3-D: interleaved")
    assert pair_route(rx, tx, "quick").method == "quick"
    assert "the automatic mode would use 3-D" in pair_route(rx, tx, "quick").reason
    assert pair_route(rx, tx, "precise").reason == "3-D: forced (--precise)"


@pytest.mark.slow
def test_audit_reports_the_model_of_each_pair() -> None:
    """The audit's metrics carry the route: 3-D for the combs in the automatic
    mode, the disk and ring with ``--quick``."""
    auto, quick = _metrics("comb-keys", "auto"), _metrics("comb-keys", "quick")
    for name in MANIFEST["cases"]["comb-keys"]["routes"]:
        assert auto[name].method == "precise"
        assert auto[name].method_reason.startswith("3-D: interleaved")
        assert quick[name].method == "quick"
        assert quick[name].method_reason.startswith("forced (--quick)")


@pytest.mark.slow
def test_disk_and_ring_misses_interleaved_combs() -> None:
    """Combs with four 1 mm teeth 0.5 mm apart: some 70 mm of 0.5 mm gap
    against the ring model's one circle of gap. Measured: 3-D Cm 3.01 pF and
    ΔCm 0.178 pF, the disk and ring 1.29-1.33 pF and 0.112-0.113 pF (the 3-D
    solve is checked in test_mutual_precise.py). The 3-D Cm is at least
    twice the quick one (``--quick``, and the estimate ``--precise`` shows
    beside its answer)."""
    auto, quick, precise = (_metrics("comb-keys", mode) for mode in ("auto", "quick", "precise"))
    for name, metrics in auto.items():
        assert metrics.cp_pad_pf == precise[name].cp_pad_pf  # the same 3-D solve
        assert metrics.cp_pad_pf > 2.0 * quick[name].cp_pad_pf
        assert precise[name].quick_cp_pad_pf == quick[name].cp_pad_pf
        assert metrics.delta_c_pf > 0


@pytest.mark.slow
def test_ring_keys_3d_agrees_with_the_disk_and_ring() -> None:
    """A disk in a ring: the disk model's own shape. Measured with
    ``--precise``: Cm +5 %, ΔCm +6 % against the quick answer (the board's
    pour and tracks, which the quick model maps onto rings); tolerance 8 %."""
    precise, quick = _metrics("ring-keys", "precise"), _metrics("ring-keys", "auto")
    for name, metrics in precise.items():
        assert metrics.method == "precise"
        assert metrics.cp_pad_pf == pytest.approx(quick[name].cp_pad_pf, rel=0.08)
        assert metrics.delta_c_pf == pytest.approx(quick[name].delta_c_pf, rel=0.08)


@pytest.mark.slow
def test_equal_keys_share_one_solve() -> None:
    """The three comb keys are one footprint: one 3-D solve, named in the others' notes."""
    auto = _metrics("comb-keys", "auto")
    first, *others = sorted(auto)
    for name in others:
        assert auto[name].cp_pad_pf == auto[first].cp_pad_pf
        assert any(f"3-D solve shared with {first}" in note for note in auto[name].notes)
    assert not any("shared with" in note for note in auto[first].notes)


def test_stacked_pair_goes_to_3d() -> None:
    """Transmit segments on B.Cu under a receive strip on F.Cu
    (fixtures/make_structure_boards.py, mutual-xy): no coplanar disk and ring."""
    sensors = _sensors("mutual-xy.kicad_pcb", MUTUAL.parent / "structures")
    rx = next(s for s in sensors if s.kind == "mutual-rx")
    tx = mutual_partner(rx, sensors)
    assert tx is not None
    route = pair_route(rx, tx, "auto")
    assert route.method == "precise"
    assert "stacked" in route.reason
