"""Ground copper of the axisymmetric pad model as concentric sheets.

A whole plane is one disk; a hatched one (fill < 1) is rings of the hatch's
pitch covering the same share of each pitch; copper that covers a plane
only in part is given ring by ring (a radial profile) and keeps, per ring,
one annulus of that share of the ring's width. Shared by
:mod:`auditor.field.pad_model`; the modelling choices are described in
``docs/physics-model.md``.
"""

from __future__ import annotations

from auditor.field.axisym import Sheet

#: Mesh length scale at hatch-ring edges, in pitches: about one or two cells
#: per ring and per opening (measured in bench_field: as accurate as finer
#: spacing against an eta = 0.05 run, and 35-45 % faster).
HATCH_SCALE = 3.0


def plane_sheets(depth_mm: float, radius_mm: float, fill: float,
                 pitch_mm: float) -> tuple[Sheet, ...]:
    """A solid plane disk, or rings of the same fill for a hatched plane."""
    return _hatched(-depth_mm, 0.0, radius_mm, fill, pitch_mm)


def _hatched(z_mm: float, inner_mm: float, outer_mm: float, fill: float,
             pitch_mm: float) -> tuple[Sheet, ...]:
    """Rings covering ``fill`` of each pitch from inner to outer radius."""
    if fill >= 1.0:
        return (Sheet("ground", z_mm, outer_mm, inner_mm),)
    if fill <= 0.0:
        return ()
    width = fill * pitch_mm
    sheets = []
    start = inner_mm
    while start < outer_mm - 1e-9:
        centre = start + 0.5 * pitch_mm
        inner, outer = max(centre - 0.5 * width, inner_mm), min(centre + 0.5 * width, outer_mm)
        if outer > inner:
            sheets.append(Sheet("ground", z_mm, outer, inner,
                                edge_scale_mm=HATCH_SCALE * pitch_mm))
        start += pitch_mm
    return tuple(sheets)


def profile_sheets(z_mm: float, profile: tuple[tuple[float, float], ...], fill: float,
                   pitch_mm: float) -> tuple[Sheet, ...]:
    """Copper of a given coverage per ring, as concentric sheets.

    Neighbouring whole rings are joined into one annulus (fewer mesh edges);
    a ring covered in part keeps one annulus of that share of its width at
    its middle radius, so sparse copper stays sparse (its rings lie a ring
    width apart, not a hatch pitch); inside it the plane's own hatch
    (``fill`` < 1) becomes rings of ``pitch_mm`` as for a whole plane.
    """
    spans: list[tuple[float, float]] = []
    inner = 0.0
    for outer, coverage in profile:
        width = coverage * (outer - inner)
        middle = 0.5 * (inner + outer)
        if width > 1e-6:
            start, stop = (inner, outer) if coverage >= 1.0 else (middle - 0.5 * width,
                                                                   middle + 0.5 * width)
            if spans and abs(spans[-1][1] - start) < 1e-9:
                start = spans.pop()[0]
            spans.append((start, stop))
        inner = outer
    return tuple(sheet for start, stop in spans
                 for sheet in _hatched(z_mm, start, stop, fill, min(pitch_mm, stop - start)))


def coplanar_sheets(inner_mm: float, outer_mm: float, fill: float,
                    pitch_mm: float) -> tuple[Sheet, ...]:
    """Coplanar ground: solid, or a solid border at the gap (a hatched pour's
    outline, one hatch line wide) followed by rings of the same fill."""
    if fill >= 1.0 or fill <= 0.0:
        return _hatched(0.0, inner_mm, outer_mm, max(fill, 1.0), pitch_mm)
    border = min(inner_mm + fill * pitch_mm, outer_mm)
    return (Sheet("ground", 0.0, border, inner_mm),
            *_hatched(0.0, border + 0.5 * (1.0 - fill) * pitch_mm, outer_mm, fill, pitch_mm))
