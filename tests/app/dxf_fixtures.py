"""Hand-built inputs for the DXF exporter's tests: a fictional layout and its derived results.

Two crossing taxiways ("A" east-west, "B" north-south with a rounded corner), a runway, a
building and a sign, an existing pavement patch with a grass island, two fictional design
aircraft, and a LayoutResult holding one junction with a left turn (both directions share
one centerline arc), an excluded straight movement, dense tyre and wingtip tracks, one fillet
with tapers and an arc, pavement polygons and two findings. All coordinates in metres.

The geometry is made to look like a real junction but is not computed by the analysis: the
exporter must draw what it is given, whatever made it.
"""

from __future__ import annotations

import math

import numpy as np
import shapely
from shapely.geometry.base import BaseGeometry

from app.model.elements import Centerline, ExistingPavement, FixedObject, Layout, Runway, Vertex
from app.model.results import (
    AircraftTracks,
    ArcRecord,
    FilletResult,
    JunctionResult,
    LayoutResult,
    MovementResult,
)
from geometry.aircraft import DesignAircraft
from geometry.centerline import centerline_segments, flatten
from geometry.findings import Finding, Severity

TAXIWAY_WIDTH_M = 23.0
RUNWAY_WIDTH_M = 45.0
JUNCTION_M = (300.0, 0.0)
TURN_RADIUS_M = 45.0
TURN_CENTER_M = (JUNCTION_M[0] - TURN_RADIUS_M, JUNCTION_M[1] + TURN_RADIUS_M)  # left turn east -> north
CORNER_RADIUS_M = 60.0    # TWY B's own corner at (300, 150)
FILLET_RADIUS_M = 30.0
TAPER_A_M = 40.0
TAPER_B_M = 35.0
TRACK_STEP_M = 0.05       # dense, like the engine's output, so simplification has work to do

FLEET = (
    DesignAircraft(name="Demo Twin 36", cmg_m=18.0, wheelbase_m=16.0, mgw_m=8.0, tyre_width_m=0.5,
                   wingspan_m=36.0, wingtip_x_m=-4.0, nose_x_m=20.0, tail_x_m=-20.0, tail_height_m=12.0),
    DesignAircraft(name="Demo Regional/2", cmg_m=11.0, wheelbase_m=10.0, mgw_m=5.0, tyre_width_m=0.4,
                   wingspan_m=26.0, wingtip_x_m=-2.0, nose_x_m=13.0, tail_x_m=-12.0, tail_height_m=7.0),
)

TWY_A = Centerline("twy-a", "A", (Vertex(0.0, 0.0), Vertex(600.0, 0.0)))
TWY_B = Centerline("twy-b", "B", (Vertex(300.0, -200.0), Vertex(300.0, 150.0, CORNER_RADIUS_M),
                                  Vertex(450.0, 300.0)))
RUNWAY = Runway("rwy-1", "09/27", (Vertex(-100.0, -250.0), Vertex(900.0, -250.0)), RUNWAY_WIDTH_M)
BUILDING = FixedObject("obj-1", "Hangar 3", ((450.0, 60.0), (490.0, 60.0), (490.0, 100.0), (450.0, 100.0)),
                       height_m=15.0)
SIGN = FixedObject("obj-2", "Sign B1", ((200.0, 30.0),), height_m=1.5, kind="sign")
EXISTING = ExistingPavement("pave-1", "Old stub", ((100.0, -8.0), (140.0, -8.0), (140.0, 8.0), (100.0, 8.0)),
                            holes=(((115.0, -3.0), (125.0, -3.0), (125.0, 3.0), (115.0, 3.0)),))


def sample_layout(units: str = "ft") -> Layout:
    return Layout(title="Demo Field: north cross {draft}", notes="Phase 1 sketch", rule_set="FAA",
                  units="ft" if units == "ft" else "m", fleet=FLEET, centerlines=(TWY_A, TWY_B),
                  runways=(RUNWAY,), objects=(BUILDING, SIGN), existing_pavements=(EXISTING,))


def twy_b_segments() -> tuple:
    return centerline_segments([v.xy for v in TWY_B.vertices], [v.corner_radius_m for v in TWY_B.vertices])


def _turn_points(radius_m: float) -> np.ndarray:
    """A line parallel to the turn (lead-in along y = -offset, arc, lead-out) at ``radius_m``
    from the turn centre, sampled every TRACK_STEP_M."""
    cx, cy = TURN_CENTER_M
    lead_in_x = np.arange(cx - 80.0, cx, TRACK_STEP_M)
    lead_in = np.column_stack((lead_in_x, np.full(lead_in_x.size, cy - radius_m)))
    angles = np.linspace(-math.pi / 2.0, 0.0, max(3, int(radius_m * math.pi / 2.0 / TRACK_STEP_M)))
    arc = np.column_stack((cx + radius_m * np.cos(angles), cy + radius_m * np.sin(angles)))
    lead_out_y = np.arange(cy + TRACK_STEP_M, cy + 80.0, TRACK_STEP_M)
    lead_out = np.column_stack((np.full(lead_out_y.size, cx + radius_m), lead_out_y))
    return np.vstack((lead_in, arc, lead_out))


def _tracks(aircraft: DesignAircraft) -> AircraftTracks:
    gear_radius_m = TURN_RADIUS_M - 2.0  # the gear cuts the corner a little: looks like offtracking
    left = _turn_points(gear_radius_m - aircraft.mgw_m / 2.0)
    right = _turn_points(gear_radius_m + aircraft.mgw_m / 2.0)
    count = min(len(left), len(right))
    return AircraftTracks(
        aircraft_name=aircraft.name, gear_left_edge_xy=left[:count], gear_right_edge_xy=right[:count],
        main_gear_xy=_turn_points(gear_radius_m)[:count],
        wingtip_left_xy=_turn_points(TURN_RADIUS_M - aircraft.wingspan_m / 2.0),
        wingtip_right_xy=_turn_points(TURN_RADIUS_M + aircraft.wingspan_m / 2.0),
        station_m=np.arange(count) * TRACK_STEP_M, steering_deg=np.zeros(count),
        edge_margin_m=np.full(count, 4.0), max_steering_deg=30.0, min_edge_margin_m=4.0)


def turn_arc() -> ArcRecord:
    return ArcRecord(TURN_CENTER_M, TURN_RADIUS_M, -math.pi / 2.0, 0.0)


def _tangent_point(external: tuple[float, float], corner: tuple[float, float]) -> tuple[float, float]:
    """The point where a line from ``external`` touches the fillet circle, on the corner's side."""
    cx, cy = TURN_CENTER_M
    distance = math.dist(external, TURN_CENTER_M)
    towards = math.atan2(external[1] - cy, external[0] - cx)
    spread = math.acos(FILLET_RADIUS_M / distance)
    candidates = [(cx + FILLET_RADIUS_M * math.cos(towards + sign * spread),
                   cy + FILLET_RADIUS_M * math.sin(towards + sign * spread)) for sign in (-1.0, 1.0)]
    return min(candidates, key=lambda point: math.dist(point, corner))


def fillet_edge() -> tuple[np.ndarray, ArcRecord]:
    """Taper from leg A's inner edge, the fillet arc (sampled within 1 mm), taper to leg B."""
    half = TAXIWAY_WIDTH_M / 2.0
    corner = (JUNCTION_M[0] - half, JUNCTION_M[1] + half)
    start_a = (JUNCTION_M[0] - TAPER_A_M, corner[1])
    start_b = (corner[0], JUNCTION_M[1] + TAPER_B_M)
    touch_a, touch_b = _tangent_point(start_a, corner), _tangent_point(start_b, corner)
    cx, cy = TURN_CENTER_M
    angle_a = math.atan2(touch_a[1] - cy, touch_a[0] - cx)
    angle_b = math.atan2(touch_b[1] - cy, touch_b[0] - cx)
    arc = ArcRecord(TURN_CENTER_M, FILLET_RADIUS_M, angle_a, angle_b)
    pieces = math.ceil((angle_b - angle_a) / (2.0 * math.acos(1.0 - 0.001 / FILLET_RADIUS_M)))
    angles = np.linspace(angle_a, angle_b, pieces + 1)
    arc_xy = np.column_stack((cx + FILLET_RADIUS_M * np.cos(angles), cy + FILLET_RADIUS_M * np.sin(angles)))
    return np.vstack(([start_a], arc_xy, [start_b])), arc


def _strip(points: np.ndarray, width_m: float) -> BaseGeometry:
    return shapely.LineString(points).buffer(width_m / 2.0, cap_style="flat", join_style="round",
                                             quad_segs=64)


def straight_pavement() -> BaseGeometry:
    twy_b = flatten(twy_b_segments(), 0.001)
    return shapely.union_all([
        _strip(np.array([v.xy for v in TWY_A.vertices]), TAXIWAY_WIDTH_M),
        _strip(twy_b, TAXIWAY_WIDTH_M),
        _strip(np.array([v.xy for v in RUNWAY.vertices]), RUNWAY_WIDTH_M),
    ])


def _required_area(tracks: tuple[AircraftTracks, ...]) -> BaseGeometry:
    bands = [shapely.Polygon(np.vstack((t.gear_left_edge_xy, t.gear_right_edge_xy[::-1]))).buffer(3.0)
             for t in tracks]
    return shapely.union_all(bands)


def sample_result(*, shoulders: bool = False) -> LayoutResult:
    tracks = tuple(_tracks(aircraft) for aircraft in FLEET)
    required = _required_area(tracks)
    edge, arc = fillet_edge()
    half = TAXIWAY_WIDTH_M / 2.0
    fillet_outline = shapely.Polygon(np.vstack((edge, [(JUNCTION_M[0] - half, JUNCTION_M[1] + half)])))
    fillet = FilletResult("J:twy-a/twy-b#0|NW", FILLET_RADIUS_M, TAPER_A_M, TAPER_B_M, arc, edge,
                          fillet_outline, fillet_outline.area)
    turn = turn_arc()
    movements = (
        MovementResult("J:twy-a/twy-b#0|A-W>B-N", "J:twy-a/twy-b#0", "a-w", "b-n", 90.0, "turn", False,
                       TURN_RADIUS_M, turn, tracks, required, required.area, 30.0, 4.0),
        MovementResult("J:twy-a/twy-b#0|B-N>A-W", "J:twy-a/twy-b#0", "b-n", "a-w", -90.0, "turn", False,
                       TURN_RADIUS_M, turn, (), None, 0.0, 30.0, 4.0),
        MovementResult("J:twy-a/twy-b#0|A-W>A-E", "J:twy-a/twy-b#0", "a-w", "a-e", 0.0, "straight", True,
                       None, None, (), None, 0.0, 0.0, 7.0),
    )
    straight = straight_pavement()
    total = shapely.union_all([straight, fillet_outline])
    existing = shapely.Polygon(EXISTING.outline, EXISTING.holes)
    new = total.difference(existing)
    junction = JunctionResult("J:twy-a/twy-b#0", JUNCTION_M, "cross", ("twy-a", "twy-b"), movements,
                              (fillet,), required, shapely.union_all([straight, fillet_outline]),
                              required.area, total.area)
    findings = (
        Finding("W-EDGE-MARGIN", Severity.WARNING, "Edge margin 2.9 m is below the 3.0 m required.",
                ("J:twy-a/twy-b#0",), (290.0, 20.0), "edge margin", "identity"),
        Finding("E-STEERING", Severity.ERROR, "Steering angle 55 deg exceeds 50 deg.",
                ("J:twy-a/twy-b#0",), (260.0, 60.0), "steering limit", "Horonjeff p. 86"),
    )
    ring = total.buffer(7.5, quad_segs=32).difference(total) if shoulders else None
    return LayoutResult({junction.junction_id: junction}, straight, total, new, total.area, new.area,
                        findings, shoulders=ring)


def empty_result() -> LayoutResult:
    empty = shapely.Polygon()
    return LayoutResult({}, empty, empty, empty, 0.0, 0.0, ())
