"""A GEOS overlay failure on odd real copper never stops a run: the operation
is retried on a snap grid, then on repaired inputs (shapely's ``make_valid``
and zero buffer, as the shapely manual recommends for invalid polygons)."""

from __future__ import annotations

from typing import Any

from shapely.errors import GEOSException
from shapely.geometry import Polygon, box

from auditor.sensors import robust


def test_failed_overlay_is_retried_on_a_grid(monkeypatch: Any) -> None:
    calls: list[dict[str, Any]] = []
    real = robust.shapely.intersection

    def flaky(a: Any, b: Any, **kw: Any) -> Any:
        calls.append(kw)
        if not kw:
            raise GEOSException("Unable to determine overlay result geometry dimension")
        return real(a, b, **kw)

    monkeypatch.setattr(robust.shapely, "intersection", flaky)
    got = robust.intersection(box(0, 0, 2, 2), box(1, 1, 3, 3))
    assert abs(got.area - 1.0) < 1e-6
    assert calls == [{}, {"grid_size": robust.GRID_MM}]


def test_invalid_bow_tie_is_repaired() -> None:
    bow_tie = Polygon([(0, 0), (2, 2), (2, 0), (0, 2)])
    assert not bow_tie.is_valid
    fixed = robust.repaired(bow_tie)
    assert fixed.is_valid and abs(fixed.area - 2.0) < 1e-9  # two triangles of area 1


def test_hopeless_overlay_gives_empty_not_an_error(monkeypatch: Any) -> None:
    def broken(a: Any, b: Any, **kw: Any) -> Any:
        raise GEOSException("TopologyException")

    monkeypatch.setattr(robust.shapely, "difference", broken)
    assert robust.difference(box(0, 0, 1, 1), box(0, 0, 2, 2)).is_empty
