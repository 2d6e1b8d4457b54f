"""Crossovers, runway connections and exits, and the throat of a junction at a runway edge."""

from __future__ import annotations

import math

import pytest
import shapely

from geometry.centerline import centerline_segments, wrap_angle
from geometry.errors import NetworkError, TurnDoesNotFitError
from geometry.network import Junction, LineKind, NetworkLine, find_junctions
from geometry.special_cases import find_crossovers, find_runway_connections, reversal_path, throat_extents


def line(line_id: str, points: list[tuple[float, float]], kind: LineKind = "taxiway") -> NetworkLine:
    return NetworkLine(line_id, kind, centerline_segments(points, [None] * len(points)))


def parallels_with_connector(connector_end: tuple[float, float], skew_deg: float = 0.0) -> list[NetworkLine]:
    tilt = 1000.0 * math.tan(math.radians(skew_deg))
    return [line("a", [(-500, 0), (500, 0)]), line("b", [(-500, 100 - tilt / 2), (500, 100 + tilt / 2)]),
            line("c", [(0, 0), connector_end])]


def test_a_perpendicular_connector_is_a_crossover_with_four_reversals() -> None:
    junctions = find_junctions(parallels_with_connector((0, 100)))
    (crossover,) = find_crossovers(junctions)
    assert crossover.connector_id == "c" and crossover.parallel_ids == ("a", "b")
    assert crossover.spacing_m == pytest.approx(100.0)  # identity
    assert math.degrees(crossover.connector_angle_rad) == pytest.approx(90.0)  # identity
    assert crossover.connector_length_m == pytest.approx(100.0) and crossover.connector_is_straight
    # Either travel direction, starting from either parallel: 2 x 2 reversals (identity).
    assert crossover.reversal_possible and len(crossover.reversals) == 4
    for reversal in crossover.reversals:
        assert reversal.first.turn_rad * reversal.second.turn_rad > 0.0
        total = reversal.first.turn_rad + reversal.second.turn_rad
        assert abs(total) == pytest.approx(math.pi)  # identity: a reversal turns through 180 degrees


def test_an_angled_connector_reports_its_angle() -> None:
    (crossover,) = find_crossovers(find_junctions(parallels_with_connector((100, 100))))
    assert math.degrees(crossover.connector_angle_rad) == pytest.approx(45.0)  # identity
    assert crossover.spacing_m == pytest.approx(100.0)  # identity
    turns = sorted(round(abs(math.degrees(r.first.turn_rad)), 6) for r in crossover.reversals)
    assert turns == [45.0, 45.0, 135.0, 135.0]  # identity: 45 + 135 = 180 either way round


def test_lines_more_than_2_degrees_off_parallel_have_no_crossover() -> None:
    # Parallel within 2 degrees: the house definition in geometry/special_cases.py (from the brief).
    assert len(find_crossovers(find_junctions(parallels_with_connector((0, 100), skew_deg=1.5)))) == 1
    assert find_crossovers(find_junctions(parallels_with_connector((0, 100), skew_deg=3.0))) == ()


def test_a_connector_crossed_by_another_line_is_not_a_crossover() -> None:
    lines = [*parallels_with_connector((0, 100)), line("d", [(-50, 50), (50, 50)])]
    assert find_crossovers(find_junctions(lines)) == ()


def test_excluding_a_movement_removes_the_reversals_that_need_it() -> None:
    junctions = find_junctions(parallels_with_connector((0, 100)))
    (crossover,) = find_crossovers(junctions)
    needed = crossover.reversals[0].first.key
    (fewer,) = find_crossovers(junctions, excluded_movement_keys=[needed])
    assert len(fewer.reversals) == 3  # identity: only one of the four reversals uses that turn


def test_reversal_path_is_two_turns_joined_by_the_connector() -> None:
    (crossover,) = find_crossovers(find_junctions(parallels_with_connector((0, 100))))
    reversal = crossover.reversals[0]
    path = reversal_path(crossover, 30.0, 50.0, 40.0)
    # Two quarter circles of 30 m and 100 - 2 x 30 m of connector between them (identity).
    assert path.length_m == pytest.approx(50.0 + 2 * 15.0 * math.pi + 40.0 + 40.0)
    end_heading = path.segments[-1].end_heading_rad
    assert wrap_angle(end_heading - reversal.first.arrival_heading_rad - math.pi) == pytest.approx(0.0)
    assert abs(path.end[1] - 100.0) < 1e-9 or abs(path.end[1]) < 1e-9  # ends on a parallel
    with pytest.raises(TurnDoesNotFitError, match="too short"):
        reversal_path(crossover, 60.0, 50.0, 40.0)
    with pytest.raises(NetworkError):
        reversal_path(crossover, 30.0, 50.0, 40.0, reversal_index=9)


def ray_end(start: tuple[float, float], heading_deg: float) -> tuple[float, float]:
    heading = math.radians(heading_deg)
    return (start[0] + 200 * math.cos(heading), start[1] + 200 * math.sin(heading))


def test_right_angle_runway_connections() -> None:
    runway = line("rwy", [(-1500, 0), (1500, 0)], kind="runway")
    near_square = line("t1", [(0, 0), ray_end((0, 0), 88.0)])
    skewed = line("t2", [(600, 0), ray_end((600, 0), 80.0)])
    right_angles, _ = find_runway_connections(find_junctions([runway, near_square, skewed]))
    # Within 90 +/- 5 degrees: the house definition in geometry/special_cases.py (from the brief).
    assert [(c.runway_id, c.taxiway_id) for c in right_angles] == [("rwy", "t1")]
    assert math.degrees(right_angles[0].angle_rad) == pytest.approx(88.0)  # identity


def test_acute_angled_exit_is_measured_from_the_direction_of_travel() -> None:
    runway = line("rwy", [(-1500, 0), (1500, 0)], kind="runway")
    exit_line = line("t1", [(0, 0), (300 * math.cos(math.radians(30)), 300 * math.sin(math.radians(30)))])
    _, exits = find_runway_connections(find_junctions([runway, exit_line]))
    # Only landing in the +x direction leaves at 30 degrees (identity); the other way it is 150.
    (exit_found,) = exits  # 20 to 60 degrees: house definition in geometry/special_cases.py
    assert math.degrees(exit_found.exit_angle_rad) == pytest.approx(30.0) and exit_found.side == 1
    assert exit_found.movement_key.endswith("|t1+") and "|rwy-" in exit_found.movement_key


def runway_junction(angle_deg: float) -> tuple[Junction, shapely.Polygon]:
    runway = line("rwy", [(-1500, 0), (1500, 0)], kind="runway")
    heading = math.radians(angle_deg)
    taxiway = line("t1", [(0, 0), (400 * math.cos(heading), 400 * math.sin(heading))])
    (junction,) = find_junctions([runway, taxiway])
    taxiway_pavement = shapely.buffer(shapely.LineString([(0, 0), (400 * math.cos(heading),
                                                                    400 * math.sin(heading))]),
                                      11.5, cap_style="flat")
    runway_pavement = shapely.box(-1500, -22.5, 1500, 22.5)
    return junction, shapely.union(taxiway_pavement, runway_pavement)


@pytest.mark.parametrize("angle_deg", [90.0, 45.0, 30.0])
def test_throat_extent_along_the_runway_edge(angle_deg: float) -> None:
    junction, pavement = runway_junction(angle_deg)
    (throat,) = throat_extents(junction, "rwy", 45.0, pavement)
    assert throat.side == 1  # the taxiway leaves to the left of the runway's direction
    # A 23 m wide straight taxiway meets an edge at angle A over 23 / sin(A) (identity).
    assert throat.extent_m == pytest.approx(23.0 / math.sin(math.radians(angle_deg)), rel=1e-6)
    assert throat.end_station_m - throat.start_station_m == pytest.approx(throat.extent_m)


def test_throat_extents_need_the_runway_at_the_junction() -> None:
    junction, pavement = runway_junction(90.0)
    with pytest.raises(NetworkError):
        throat_extents(junction, "t9", 45.0, pavement)
