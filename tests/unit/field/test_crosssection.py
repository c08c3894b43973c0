"""Planar cross-section solver against closed forms (sources per test)."""

from __future__ import annotations

import math

import pytest
from scipy.constants import c as light_speed
from scipy.constants import epsilon_0, mu_0
from scipy.special import ellipk

from auditor.field.crosssection import (
    CrossSection,
    DielectricSlab,
    Strip,
    TraceSection,
    solve_cross_section,
    trace_pf_per_mm,
    via_pf,
)

PF_PER_M_TO_PF_PER_MM = 1e-3


def hammerstad_jensen_pf_per_m(u: float, er: float) -> float:
    """Microstrip C' (zero thickness) by Hammerstad & Jensen, IEEE MTT-S Digest 1980,
    407-409, as reproduced in physics reference 1.8: C' = eps_eff / (c Z01)."""
    eta0 = mu_0 * light_speed
    f_u = 6 + (2 * math.pi - 6) * math.exp(-((30.666 / u) ** 0.7528))
    z01 = eta0 / (2 * math.pi) * math.log(f_u / u + math.sqrt(1 + (2 / u) ** 2))
    a = (1 + math.log((u ** 4 + (u / 52) ** 2) / (u ** 4 + 0.432)) / 49
         + math.log(1 + (u / 18.1) ** 3) / 18.7)
    b = 0.564 * ((er - 0.9) / (er + 3)) ** 0.053
    eps_eff = (er + 1) / 2 + (er - 1) / 2 * (1 + 10 / u) ** (-a * b)
    return eps_eff / (light_speed * z01) * 1e12


def _kk(k: float) -> float:
    """K(k)/K(k') with scipy's parameter m = k^2 (physics reference 1.9 pitfall)."""
    return float(ellipk(k * k) / ellipk(1 - k * k))


def _microstrip(u: float, er: float) -> CrossSection:
    return CrossSection((Strip("strip", -u / 2, u / 2, 1.0),
                         Strip("ground", -math.inf, math.inf, 0.0)),
                        "ground", (DielectricSlab(0.0, 1.0, er),))


@pytest.mark.parametrize("er", [1.0, 4.4, 10.0])
@pytest.mark.parametrize("u", [0.1, 0.3, 1.0, 3.0, 10.0])
def test_microstrip_matches_hammerstad_jensen(u: float, er: float) -> None:
    # HJ 1980: Z01 within 0.03 %, eps_eff within 0.2 % (their stated accuracy).
    value = solve_cross_section(_microstrip(u, er)).entry("strip", "strip")
    expected = hammerstad_jensen_pf_per_m(u, er) * PF_PER_M_TO_PF_PER_MM
    assert value == pytest.approx(expected, rel=0.01)


def test_hammerstad_jensen_reimplementation_matches_reference_table() -> None:
    # Guard on the oracle itself: physics reference 1.8 table, w/h = 1:
    # 26.3846 pF/m (air) and 83.5817 pF/m (er 4.4).
    assert hammerstad_jensen_pf_per_m(1.0, 1.0) == pytest.approx(26.3846, rel=1e-4)
    assert hammerstad_jensen_pf_per_m(1.0, 4.4) == pytest.approx(83.5817, rel=1e-4)


@pytest.mark.parametrize(("gap", "width"), [(1.0, 1.0), (0.5, 2.0), (2.0, 0.5)])
def test_coplanar_strips_match_conformal_map(gap: float, width: float) -> None:
    # Two strips, zero thickness, air: C' = eps0 K(k')/K(k), k = S/(S+2W)
    # (Simons, Coplanar Waveguide Circuits 2001 ch. 2; exact).
    section = CrossSection((Strip("a", -gap / 2 - width, -gap / 2, 0.0),
                            Strip("b", gap / 2, gap / 2 + width, 0.0)), "b")
    k = gap / (gap + 2 * width)
    expected = epsilon_0 / _kk(k) * 1e12 * PF_PER_M_TO_PF_PER_MM
    assert solve_cross_section(section).entry("a", "a") == pytest.approx(expected, rel=0.005)


def test_coplanar_strips_on_half_space() -> None:
    # On an infinitely thick substrate eps_eff = (er + 1)/2 exactly (Wen 1969):
    # k = 1/sqrt(2), er = 4.4 gives 23.906 pF/m (physics reference 1.9).
    gap = 1.0
    width = (gap * math.sqrt(2) - gap) / 2
    section = CrossSection((Strip("a", -gap / 2 - width, -gap / 2, 0.0),
                            Strip("b", gap / 2, gap / 2 + width, 0.0)), "b",
                           (DielectricSlab(-math.inf, 0.0, 4.4),))
    value = solve_cross_section(section).entry("a", "a")
    assert value == pytest.approx(23.906 * PF_PER_M_TO_PF_PER_MM, rel=0.005)


def test_cpw_with_finite_grounds_matches_conformal_map() -> None:
    # CPW S = 1, W = 0.5, ground width 3, air: k = (a/b) sqrt((c^2-b^2)/(c^2-a^2)),
    # C' = 4 eps0 K(k)/K(k') = 27.303153 pF/m (Veyres & Fouad Hanna 1980).
    a, b, c = 0.5, 1.0, 4.0
    k = (a / b) * math.sqrt((c * c - b * b) / (c * c - a * a))
    expected = 4 * epsilon_0 * _kk(k) * 1e12
    assert expected == pytest.approx(27.303153, rel=1e-6)
    section = CrossSection((Strip("signal", -a, a, 0.0), Strip("ground", b, c, 0.0),
                            Strip("ground", -c, -b, 0.0)), "ground")
    value = solve_cross_section(section).entry("signal", "signal")
    assert value == pytest.approx(expected * PF_PER_M_TO_PF_PER_MM, rel=0.005)


@pytest.mark.parametrize("slab_bottom", [0.2, 0.5])
def test_floating_slab_between_plates_gives_series_result(slab_bottom: float) -> None:
    # Parallel plates without fringing with a floating metal slab of thickness t:
    # C = eps0 A / (d - t), independent of position (physics reference 1.12).
    # Full-width plates; the ratio removes the width.
    d, t = 1.0, 0.3
    plates = (Strip("top", -math.inf, math.inf, d), Strip("bottom", -math.inf, math.inf, 0.0))
    plain = solve_cross_section(CrossSection(plates, "bottom")).entry("top", "top")
    slab = Strip("float", -math.inf, math.inf, slab_bottom, slab_bottom + t)
    matrix = solve_cross_section(CrossSection((*plates, slab), "bottom"))
    from auditor.field.circuit import reduced
    series = reduced(matrix, None, ["top"]).entry("top", "top")
    assert series / plain == pytest.approx(d / (d - t), rel=1e-6)


def test_trace_over_plane_against_reference_value() -> None:
    # Physics reference 1.8 (MoM there): w 0.2 mm, h 1.6 mm, er 4.4 -> 0.0392 pF/mm;
    # with coplanar pour at 0.5 mm -> 0.0487 pF/mm.
    assert trace_pf_per_mm(TraceSection(0.2, 1.6, None)) == pytest.approx(0.0392, rel=0.01)
    assert trace_pf_per_mm(TraceSection(0.2, 1.6, 0.5)) == pytest.approx(0.0487, rel=0.015)


def test_trace_sections_are_cached() -> None:
    key = TraceSection(0.1234, 1.0, 0.3)
    trace_pf_per_mm.cache_clear()
    trace_pf_per_mm(key)
    trace_pf_per_mm(TraceSection(0.1234, 1.0, 0.3))
    info = trace_pf_per_mm.cache_info()
    assert (info.hits, info.misses) == (1, 1)


def test_trace_without_any_ground_is_refused() -> None:
    with pytest.raises(ValueError, match="needs a plane"):
        trace_pf_per_mm(TraceSection(0.2, None, None))


def test_via_formula_reference_value() -> None:
    # Johnson & Graham 1993 (from memory) as evaluated in physics reference 4.1:
    # 1.6 mm board, 0.71 mm pad, 1.27 mm antipad, er 4.4 -> 0.50 pF.
    assert via_pf(1.6, 4.4) == pytest.approx(0.50, abs=0.005)


def test_cross_section_error_falls_as_eta_squared() -> None:
    # Coplanar strips W = S = 1 in air, exact 13.842654 pF/m (conformal map,
    # physics reference 1.9); bilinear elements on the radically graded mesh
    # converge at O(h^2) in capacitance.
    section = CrossSection((Strip("a", -1.5, -0.5, 0.0), Strip("b", 0.5, 1.5, 0.0)), "b")
    exact = epsilon_0 / _kk(1 / 3) * 1e9
    errors = [solve_cross_section(section, eta=eta, extrapolate=False).entry("a", "a") / exact - 1
              for eta in (0.2, 0.1, 0.05)]
    assert all(e > 0 for e in errors)
    orders = [math.log2(errors[i] / errors[i + 1]) for i in range(2)]
    assert all(1.7 < order < 2.5 for order in orders), orders
