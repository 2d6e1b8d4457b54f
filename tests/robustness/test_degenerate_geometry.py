"""Degenerate geometry from normal editing never crashes the analysis or leaks NaN.

Zero-length segments, duplicate vertices, centerlines that double back or lie on each other, legs
too short for the turn, turns of nearly 0 or 180 degrees, radii no aircraft can follow, and
state-plane coordinates (about 10^7 ft from the origin): each gives a finding or a precise
``EditError``, and ``app.model.analysis.analyze`` returns a result whose every number is finite,
but for the one documented infinity (docs/robustness.md): ``MovementResult.min_edge_margin_m`` is
``+inf`` for a movement without tracks (straight on, excluded, or not computable), the minimum
over no track at all. Expected values are identities of the model's definitions unless marked.
"""

from __future__ import annotations

import math
import re
from collections.abc import Iterator
from dataclasses import fields, is_dataclass, replace

import numpy as np
import pytest
import shapely
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from shapely.geometry.base import BaseGeometry

from app.fileio.aircraft_library import load_demo_library
from app.model import edits
from app.model.analysis import analyze
from app.model.edits import EditError
from app.model.elements import Centerline, ExistingPavement, FixedObject, Layout, Runway, Vertex
from app.model.results import LayoutResult, MovementResult
from geometry.findings import Severity

LIBRARY = {aircraft.name: aircraft for aircraft in load_demo_library()}  # fictional demo aircraft
NON_FINITE_WORD = re.compile(r"\b(nan|inf|infinity)\b", re.IGNORECASE)
STATE_PLANE_M = (3_048_000.0, 1_524_000.0)  # 10^7 ft and 5 x 10^6 ft east and north (1 ft = 0.3048 m)


# --- the checks every result must pass -------------------------------------------------------------

def non_finite_places(value: object, where: str = "result") -> Iterator[str]:
    """Where ``value`` holds a NaN or an infinity: floats, arrays, shapely coordinates, fields."""
    if isinstance(value, MovementResult) and not value.tracks and value.min_edge_margin_m == math.inf:
        value = replace(value, min_edge_margin_m=0.0)  # the documented +inf of a movement without tracks
    if is_dataclass(value):
        for field in fields(value):
            yield from non_finite_places(getattr(value, field.name), f"{where}.{field.name}")
    elif isinstance(value, dict):
        for key, item in value.items():
            yield from non_finite_places(item, f"{where}[{key!r}]")
    elif isinstance(value, (tuple, list)):
        for index, item in enumerate(value):
            yield from non_finite_places(item, f"{where}[{index}]")
    elif isinstance(value, np.ndarray):
        if value.dtype.kind in "fc" and not np.all(np.isfinite(value)):
            yield where
    elif isinstance(value, BaseGeometry):
        if not np.all(np.isfinite(shapely.get_coordinates(value))):
            yield where
    elif isinstance(value, float) and not math.isfinite(value):
        yield f"{where} = {value}"


def assert_clean(result: LayoutResult, layout: Layout) -> None:
    assert list(non_finite_places(result)) == []
    for finding in result.findings:
        assert finding.message and not NON_FINITE_WORD.search(finding.message), finding.message
        assert all(math.isfinite(value) for value in finding.location_m), finding
    assert 0.0 <= result.new_area_m2 <= result.total_area_m2 + 1e-6  # identity: new = total - existing
    # identity: the total is the straights plus fillets and required areas (to shapely's precision)
    assert result.total_area_m2 >= result.straight_pavement.area * (1.0 - 1e-9) - 1e-6
    lines = {line.id for line in (*layout.centerlines, *layout.runways)}
    assert set(result.centerline_polylines) == lines  # identity: every line is drawn


def analysed(layout: Layout) -> LayoutResult:
    result = analyze(layout)
    assert_clean(result, layout)
    return result


def line(line_id: str, *points: tuple[float, float], radii: tuple[float | None, ...] = (),
         **extra: object) -> Centerline:
    radii = radii or (None,) * len(points)
    vertices = tuple(Vertex(x, y, r) for (x, y), r in zip(points, radii, strict=True))
    return Centerline(line_id, line_id.upper(), vertices, **extra)  # type: ignore[arg-type]


def layout_of(*centerlines: Centerline, **settings_: object) -> Layout:
    layout = Layout(**{"title": "degenerate", "units": "m", **settings_})  # type: ignore[arg-type]
    for centerline in centerlines:
        layout = edits.add_centerline(layout, centerline)
    return layout


def codes(result: LayoutResult) -> list[str]:
    return sorted(finding.code for finding in result.findings)


def flags(result: LayoutResult, *ids: str) -> bool:
    """A warning or error names every one of ``ids``."""
    return any(finding.severity >= Severity.WARNING and set(ids) <= set(finding.element_ids)
               for finding in result.findings)


CROSS_B = line("b", (50.0, -150.0), (50.0, 150.0))


# --- named cases ---------------------------------------------------------------------------------------

def test_duplicate_vertices_and_zero_length_segments_are_merged_away() -> None:
    plain = analysed(layout_of(line("a", (-150.0, 0.0), (250.0, 0.0)), CROSS_B))
    doubled = analysed(layout_of(line("a", (-150.0, 0.0), (-150.0, 0.0), (100.0, 0.0), (100.0, 4e-7),
                                      (250.0, 0.0), (250.0, 0.0)), CROSS_B))
    # identity: vertices within 1e-6 m are one vertex (geometry/centerline.py), collinear ones no corner
    assert doubled.total_area_m2 == pytest.approx(plain.total_area_m2, rel=1e-9)
    assert codes(doubled) == codes(plain)


@pytest.mark.parametrize("points", [((10.0, 10.0), (10.0, 10.0)),
                                    ((10.0, 10.0), (10.0 + 5e-7, 10.0), (10.0, 10.0 - 5e-7))])
def test_a_centerline_on_one_point_is_refused_by_the_edit(points: tuple[tuple[float, float], ...]) -> None:
    with pytest.raises(EditError, match=r"centerline 'a' has all its vertices at one point \(10, 10\) m"):
        layout_of(line("a", *points))


def test_dragging_the_last_distinct_vertex_onto_the_other_is_refused() -> None:
    layout = layout_of(line("a", (0.0, 0.0), (80.0, 0.0)))
    with pytest.raises(EditError, match="all its vertices at one point"):
        edits.move_vertex(layout, "a", 1, 0.0, 0.0)
    thresholds = (Vertex(0.0, -300.0), Vertex(900.0, -300.0))
    runway = edits.add_runway(layout, Runway("rwy", "09/27", thresholds, 45.0))
    with pytest.raises(EditError, match="runway 'rwy' has all its vertices at one point"):
        edits.move_vertex(runway, "rwy", 0, 900.0, -300.0)


def test_legs_too_short_for_the_turn_arc_give_turn_fit_findings() -> None:
    result = analysed(layout_of(line("a", (0.0, 0.0), (6.0, 0.0)), line("b", (6.0, 0.0), (6.0, 6.0))))
    assert "E-TURN-FIT" in codes(result)
    problems = [m.problem for j in result.junctions.values() for m in j.movements if m.problem]
    assert problems and all("legs too short" in problem for problem in problems)


def test_corner_radii_that_overlap_on_a_doubled_back_line_give_a_corner_fit_finding() -> None:
    result = analysed(layout_of(line("a", (0.0, 0.0), (100.0, 0.0), (0.0, 0.0), radii=(None, 20.0, None)),
                                CROSS_B))
    assert "E-CORNER-FIT" in codes(result) and flags(result, "a")


@pytest.mark.parametrize("radius_m", [1.0, 5.0])
def test_a_turn_radius_no_aircraft_can_follow_gives_steering_findings(radius_m: float) -> None:
    layout = layout_of(line("a", (-200.0, 0.0), (200.0, 0.0)), line("b", (0.0, -200.0), (0.0, 200.0)))
    corner = next(iter(analyze(layout).junctions.values())).fillets[0].corner_key
    result = analysed(edits.set_turn_radius_override(layout, corner, radius_m))
    steering = [m.max_steering_deg for j in result.junctions.values() for m in j.movements
                if m.radius_m == radius_m]
    # 50 degrees: the design steering limit, Horonjeff, Planning and Design of Airports, pp. 86 and 287
    assert steering and min(steering) > 50.0 and "E-STEERING" in codes(result)


@pytest.mark.parametrize("end", [(400.0, 0.01), (400.0, 1.0), (400.0, 4.0), (0.0, 0.5), (0.0, 4.0)],
                         ids=["0.003-deg", "0.3-deg", "1.1-deg", "179.9-deg", "178.9-deg"])
def test_turns_near_0_and_180_degrees_stay_finite(end: tuple[float, float]) -> None:
    analysed(layout_of(line("a", (0.0, 0.0), (200.0, 0.0)), line("b", (200.0, 0.0), end)))


def test_a_170_degree_hairpin_gives_turn_fit_findings() -> None:
    result = analysed(layout_of(line("a", (0.0, 0.0), (200.0, 0.0)), line("b", (200.0, 0.0), (0.0, 35.0))))
    assert "E-TURN-FIT" in codes(result)  # identity: the tangent length R tan(85 deg) exceeds the legs


def test_state_plane_coordinates_give_the_same_result_as_near_the_origin() -> None:
    def sketch(dx: float, dy: float) -> Layout:
        bend = line("a", (dx, dy), (dx + 400.0, dy), (dx + 400.0, dy + 300.0), radii=(None, 60.0, None))
        return layout_of(bend,
                         line("b", (dx + 200.0, dy - 200.0), (dx + 200.0, dy + 200.0)), units="ft")

    near, far = analysed(sketch(0.0, 0.0)), analysed(sketch(*STATE_PLANE_M))
    # identity: the analysis is invariant under translation; float64 keeps ~1e-9 m at 3e6 m
    assert far.total_area_m2 == pytest.approx(near.total_area_m2, rel=1e-9)
    assert codes(far) == codes(near)
    margins = [[m.min_edge_margin_m for j in r.junctions.values() for m in j.movements if m.tracks]
               for r in (near, far)]
    assert np.allclose(margins[0], margins[1], rtol=0.0, atol=1e-5)


def test_every_movement_without_tracks_has_the_documented_infinite_margin() -> None:
    layout = layout_of(line("a", (-200.0, 0.0), (200.0, 0.0)), line("b", (0.0, -200.0), (0.0, 200.0)))
    (junction,) = analysed(layout).junctions.values()
    for movement in junction.movements:
        if movement.kind == "straight":
            assert movement.min_edge_margin_m == math.inf and movement.max_steering_deg == 0.0  # docs
        else:
            assert math.isfinite(movement.min_edge_margin_m) and movement.tracks


@pytest.mark.parametrize("second", [line("b", (0.0, 0.0), (100.0, 0.0)), line("b", (50.0, 0.0), (150.0, 0.0)),
                                    line("b", (100.0, 0.0), (0.0, 0.5))],
                         ids=["identical", "collinear-overlap", "hairpin-179.7-deg"])
def test_centerlines_lying_on_each_other_are_flagged(second: Centerline) -> None:
    result = analysed(layout_of(line("a", (0.0, 0.0), (100.0, 0.0)), second))
    assert "E-OVERLAP" in codes(result) and flags(result, "a", "b")  # geometry/checks/overlaps.py


def test_a_centerline_that_doubles_back_is_flagged() -> None:
    result = analysed(layout_of(line("a", (0.0, 0.0), (100.0, 0.0), (0.0, 0.0))))
    assert "E-CENTERLINE-REVERSAL" in codes(result) and flags(result, "a")


def test_a_corner_radius_no_aircraft_can_follow_is_flagged() -> None:
    result = analysed(layout_of(line("a", (0.0, 0.0), (200.0, 0.0), (200.0, 200.0), radii=(None, 0.5, None))))
    assert "E-STEERING" in codes(result) and flags(result, "a")  # the bend is a turn like any other


# GEOS divides by zero when a mitred buffer meets an exact reversal of direction at this width (the
# result stays finite and valid); geometry/pavement.py silences that warning, and this test keeps it so.
REVERSAL_WARNINGS = ("ignore:divide by zero encountered in buffer:RuntimeWarning",
                     "ignore:invalid value encountered in buffer:RuntimeWarning")


def test_an_exact_reversal_buffers_without_a_floating_point_warning() -> None:
    sketch = line("a", (0.0, -150.0), (60.3, 60.0000004), (0.0, -150.0))
    analysed(layout_of(sketch, rule_set="ICAO"))  # ICAO width for the default airplane: 23 m


# --- random sketches -------------------------------------------------------------------------------------

GRID_M = (-150.0, -60.0, 0.0, 60.0, 150.0)
NUDGE_M = (0.0, 0.0, 0.0, 4e-7, 0.3, 2.0)        # none, below the duplicate tolerance, small, moderate
RADII_M = (None, None, None, 0.5, 15.0, 45.0, 400.0)
FLEETS = ((), (LIBRARY["Larchmere 9"],), (LIBRARY["Ostrander 240"],), (LIBRARY["Thundervale 900"],))
coordinate = st.builds(lambda g, n: g + n, st.sampled_from(GRID_M), st.sampled_from(NUDGE_M))


@st.composite
def sketches(draw: st.DrawFn) -> tuple[Layout, list[tuple[str, object]]]:
    """A base layout and a list of edits to apply to it (each may be refused)."""
    ox, oy = draw(st.sampled_from([(0.0, 0.0), STATE_PLANE_M]))
    layout = Layout(title="random", units=draw(st.sampled_from(["ft", "m"])),
                    rule_set=draw(st.sampled_from(["FAA", "ICAO"])), fleet=draw(st.sampled_from(FLEETS)))
    steps: list[tuple[str, object]] = []
    ids = [f"twy-{n}" for n in range(1, draw(st.integers(1, 3)) + 1)]
    for line_id in ids:
        count = draw(st.integers(2, 4))
        points = [(ox + draw(coordinate), oy + draw(coordinate)) for _ in range(count)]
        radii = (None, *(draw(st.sampled_from(RADII_M)) for _ in range(count - 2)), None)
        steps.append(("add", line(line_id, *points, radii=radii,
                                  kind=draw(st.sampled_from(["taxiway", "taxilane"])),
                                  width_override_m=draw(st.sampled_from([None, None, 3.0, 30.0])))))
    if draw(st.booleans()):
        steps.append(("runway", Runway("rwy-1", "18/36", (Vertex(ox + draw(coordinate), oy - 250.0),
                                                        Vertex(ox + draw(coordinate), oy + 250.0)), 45.0)))
    if draw(st.booleans()):
        mast = ((ox + draw(coordinate), oy + draw(coordinate)),)
        steps.append(("object", FixedObject("obj-1", "Mast", mast, 9.0)))
        patch = ((ox - 70.0, oy - 70.0), (ox + 70.0, oy - 70.0), (ox, oy + 70.0))
        steps.append(("pavement", ExistingPavement("pav-1", "Old", patch)))
    if len(ids) > 1:
        junction = f"J:{ids[0]}/{ids[1]}#0"
        sides = draw(st.sampled_from(["+~", "-~"])) + ids[1] + draw(st.sampled_from(["+", "-"]))
        steps.append(("override", (f"{junction}|{ids[0]}{sides}", draw(st.sampled_from([1.0, 30.0, 300.0])))))
        steps.append(("exclude", f"{junction}|{ids[0]}+>{junction}|{ids[1]}+"))
    return layout, steps


def apply_steps(layout: Layout, steps: list[tuple[str, object]]) -> Layout:
    build = {"add": edits.add_centerline, "runway": edits.add_runway, "object": edits.add_object,
             "pavement": edits.add_existing_pavement,
             "override": lambda lay, arg: edits.set_turn_radius_override(lay, *arg),
             "exclude": lambda lay, key: edits.set_movement_excluded(lay, key, True)}
    for kind, argument in steps:
        try:
            layout = build[kind](layout, argument)  # type: ignore[operator]
        except EditError as error:  # a precise refusal is an allowed outcome: the layout stays as it was
            assert str(error) and "\n" not in str(error)
    return layout


@pytest.mark.filterwarnings(*REVERSAL_WARNINGS)
@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(sketches())
def test_random_sketches_analyse_without_error_or_nan(sketch: tuple[Layout, list[tuple[str, object]]]
                                                       ) -> None:
    layout = apply_steps(*sketch)
    analysed(layout)
