"""The plane given ring by ring (radial coverage profile) in the quick model."""

from __future__ import annotations

import math

import pytest

from auditor.errors import UsageError
from auditor.field.api import PadSetup, solve_pad
from auditor.field.pad_model import ground_sheets
from auditor.field.sheets import profile_sheets

PAD = PadSetup(pad_area_mm2=math.pi * 36, gap_mm=1.0, plane_depth_mm=1.6)


def test_whole_rings_are_the_old_plane_exactly() -> None:
    """A profile covered everywhere is the uniform plane: same sheets, same Cp."""
    outer = 6.0 + 1.0 + 10.0
    rings = tuple((outer * k / 5, 1.0) for k in range(1, 6))
    profiled = PadSetup(pad_area_mm2=PAD.pad_area_mm2, gap_mm=1.0, plane_depth_mm=1.6,
                        plane_profile=rings)
    assert ground_sheets(profiled, 7.0) == ground_sheets(PAD, 7.0)
    assert solve_pad(profiled).cp_pad_pf == solve_pad(PAD).cp_pad_pf


def test_partial_ring_keeps_its_share_of_width_in_the_middle() -> None:
    sheets = profile_sheets(-1.0, ((2.0, 1.0), (4.0, 1.0), (6.0, 0.5), (8.0, 0.0)), 1.0, 1.5)
    spans = [(s.r_inner_mm, s.r_outer_mm) for s in sheets]
    assert spans == [(0.0, 4.0), (4.5, 5.5)]  # whole rings joined; half of 4..6 centred


def test_hatched_plane_stays_hatched_inside_a_profile() -> None:
    sheets = profile_sheets(-1.0, ((6.0, 1.0),), 0.5, 1.5)
    copper = sum((s.r_outer_mm or 0) - s.r_inner_mm for s in sheets)
    assert copper == pytest.approx(3.0)  # half of 6 mm, as rings of the hatch pitch


def test_opening_under_the_pad_lowers_cp_between_none_and_whole() -> None:
    """Trend (common practice, no source): a plane with an opening under the pad
    couples less than a whole plane and more than none."""
    opened = PadSetup(pad_area_mm2=PAD.pad_area_mm2, gap_mm=1.0, plane_depth_mm=1.6,
                      plane_profile=((7.5, 0.0), (17.0, 1.0)))
    none = PadSetup(pad_area_mm2=PAD.pad_area_mm2, gap_mm=1.0, plane_depth_mm=None)
    assert (solve_pad(none).cp_pad_pf < solve_pad(opened).cp_pad_pf
            < solve_pad(PAD).cp_pad_pf)


@pytest.mark.parametrize("profile", [((2.0, 1.0), (1.0, 1.0)), ((2.0, 1.5),), ((0.0, 1.0),)])
def test_bad_profiles_are_refused(profile: tuple[tuple[float, float], ...]) -> None:
    with pytest.raises(UsageError):
        solve_pad(PadSetup(pad_area_mm2=10.0, plane_depth_mm=1.0, plane_profile=profile))


def test_front_copper_needs_a_height() -> None:
    with pytest.raises(UsageError):
        solve_pad(PadSetup(pad_area_mm2=10.0, front_profile=((5.0, 1.0),)))
