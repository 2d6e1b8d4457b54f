"""Published closed-form relations (Horonjeff et al., Planning and Design of Airports, 5th ed.)
and how the engine compares with them. Lengths in the book's feet, converted at the boundary."""

from __future__ import annotations

import math

import numpy as np
import pytest

from geometry.aircraft import DesignAircraft
from geometry.errors import GeometryError, NonFiniteInputError, RadiusTooSmallError
from geometry.path import standard_turn_path
from geometry.published import (
    fillet_radius_m,
    lead_in_length_m,
    max_body_angle_rad,
    steady_state_main_gear_radius_m,
    steady_state_offtracking_m,
    steady_state_steering_rad,
    turning_radius_m,
)
from geometry.sweep import sweep, sweep_at_stations
from geometry.units import from_metres, to_metres

# Horonjeff et al., Planning and Design of Airports, 5th ed., Example 6-3 (inputs, ft).
R_FT, D_FT, U_FT, M_FT, W_FT = 150.0, 72.1, 34.25, 15.0, 75.0
A_EXAMPLE_RAD = math.radians(29.0)  # Example 6-3 uses A = 29 degrees (eq. 6-9 rounded)


def m(feet: float) -> float:
    return to_metres(feet, "ft")


def ft(metres: float) -> float:
    return from_metres(metres, "ft")


def example_aircraft() -> DesignAircraft:
    """A fictional aircraft with Example 6-3's d and u; the other dimensions are made up."""
    return DesignAircraft("Demo example 6-3", cmg_m=m(D_FT), wheelbase_m=m(66.0), mgw_m=m(U_FT),
                          tyre_width_m=m(4.0), wingspan_m=m(190.0), wingtip_x_m=m(-25.0),
                          nose_x_m=m(D_FT + 12.0), tail_x_m=m(-110.0), tail_height_m=m(55.0))


def test_eq_6_9_body_angle() -> None:
    # Horonjeff eq. 6-9: asin(72.1/150) = 28.73 degrees; Example 6-3 rounds it to 29 degrees.
    assert math.degrees(max_body_angle_rad(m(R_FT), m(D_FT))) == pytest.approx(28.729, abs=1e-3)


def test_eq_6_11_fillet_radius_of_example_6_3() -> None:
    # Horonjeff eq. 6-11 with A = 29 deg gives 99.07 ft; the book prints 100.1 ft, which does not
    # reproduce (REFERENCES.md section 2): we assert on the formula.
    fillet_ft = ft(fillet_radius_m(m(R_FT), m(D_FT), m(U_FT), m(M_FT), A_EXAMPLE_RAD))
    assert fillet_ft == pytest.approx(99.07, abs=0.01)
    # Same equation with eq. 6-9's exact A: the root becomes sqrt(R^2 - d^2) (identity): 99.41 ft.
    assert ft(fillet_radius_m(m(R_FT), m(D_FT), m(U_FT), m(M_FT))) == pytest.approx(99.41, abs=0.01)


def test_eq_6_12_lead_in_of_example_6_3() -> None:
    # Horonjeff eq. 6-12: 67.56 ft; Example 6-3 prints L = 68 ft (REFERENCES.md section 2).
    length_ft = ft(lead_in_length_m(m(D_FT), A_EXAMPLE_RAD, m(W_FT), m(U_FT), m(M_FT)))
    assert length_ft == pytest.approx(67.56, abs=0.01)


def test_steady_state_relations() -> None:
    # Horonjeff eqs. 6-9 and 6-11 (REFERENCES.md section 1): 150 - sqrt(150^2 - 72.1^2) = 18.46 ft.
    assert ft(steady_state_offtracking_m(m(R_FT), m(D_FT))) == pytest.approx(18.464, abs=1e-3)
    gear_radius_m = steady_state_main_gear_radius_m(m(R_FT), m(D_FT))
    steering_rad = steady_state_steering_rad(m(R_FT), m(D_FT), m(66.0))
    # Horonjeff eq. 2-1 with t = 0 inverts the steering relation (identity of the two forms).
    assert turning_radius_m(m(66.0), steering_rad) == pytest.approx(gear_radius_m, rel=1e-12)
    # Horonjeff eq. 2-1: R = b tan(90 deg - beta) + t/2, e.g. b = 60, beta = 45 deg, t = 20 gives 70.
    assert turning_radius_m(60.0, math.radians(45.0), 20.0) == pytest.approx(70.0, rel=1e-12)


def test_engine_main_gear_radius_equals_the_root_of_eq_6_11_in_the_steady_state() -> None:
    aircraft = example_aircraft()
    radius_m, turn_rad, lead_m = m(R_FT), 3.0 * math.pi, 10.0 * aircraft.cmg_m
    path = standard_turn_path(radius_m, turn_rad, lead_m, lead_m)
    arc = path.segments[1]
    end = sweep_at_stations(path, aircraft, np.array([lead_m + arc.length_m]))
    gear_radius_m = math.dist(end.main_gear_xy[0], arc.center)
    # Horonjeff eq. 6-11's root with eq. 6-9's A: sqrt(R^2 - d^2) = 131.27 ft (identity of the steady state).
    assert ft(gear_radius_m) == pytest.approx(math.sqrt(R_FT**2 - D_FT**2), abs=1e-5)
    assert end.steering_rad[0] == pytest.approx(steady_state_steering_rad(radius_m, aircraft.cmg_m,
                                                                          aircraft.wheelbase_m), abs=1e-7)


@pytest.mark.parametrize("turn_deg", [30.0, 60.0, 90.0])
def test_engine_deviation_stays_below_eq_6_11_for_short_turns(turn_deg: float) -> None:
    aircraft = example_aircraft()
    lead_m = 10.0 * aircraft.cmg_m
    swept = sweep(standard_turn_path(m(R_FT), math.radians(turn_deg), lead_m, lead_m), aircraft)
    # Horonjeff eq. 6-11 with eq. 6-9's A puts the inner tyre edge R - F - M from the centerline:
    # the steady-state maximum. The engine follows the transient over the actual turn angle, which
    # never reaches the steady state (identity), so its deviation is smaller.
    published_ft = R_FT - ft(fillet_radius_m(m(R_FT), m(D_FT), m(U_FT), 0.0))
    assert ft(swept.max_edge_offset_m) < published_ft


def test_engine_deviation_reaches_eq_6_11_on_a_long_turn() -> None:
    aircraft = example_aircraft()
    lead_m = 10.0 * aircraft.cmg_m
    swept = sweep(standard_turn_path(m(R_FT), 3.0 * math.pi, lead_m, lead_m), aircraft)
    # Horonjeff eq. 6-11 with eq. 6-9's A: 150 - 131.27 + 34.25/2 = 35.59 ft inner-edge deviation.
    published_ft = R_FT - math.sqrt(R_FT**2 - D_FT**2) + U_FT / 2
    assert ft(swept.max_edge_offset_m) == pytest.approx(published_ft, abs=1e-3)


def test_engine_lead_in_agrees_with_eq_6_12_within_its_approximations() -> None:
    aircraft = example_aircraft()
    radius_m, lead_m = m(R_FT), 10.0 * aircraft.cmg_m
    path = standard_turn_path(radius_m, 3.0 * math.pi, lead_m, 4.0 * aircraft.cmg_m)
    exit_start_m = lead_m + path.segments[1].length_m
    stations = np.linspace(exit_start_m, path.length_m, 40001)
    swept = sweep_at_stations(path, aircraft, stations)
    allowed_m = (m(W_FT) - m(U_FT) - 2.0 * m(M_FT)) / 2.0
    tangent_point = np.array(path.segments[2].start)
    heading = path.segments[2].heading_rad
    relative = swept.main_gear_xy - tangent_point
    along_m = relative @ np.array([math.cos(heading), math.sin(heading)])
    # Eq. 6-12 measures the deviation square to the exit straight (not to the nearest point of the arc):
    # the first gear position where it has fallen to the allowed value.
    deviation_m = relative @ np.array([-math.sin(heading), math.cos(heading)])
    settled = int(np.argmax(np.abs(deviation_m) <= allowed_m))
    engine_ft = ft(along_m[settled])
    published_ft = ft(lead_in_length_m(aircraft.cmg_m, max_body_angle_rad(radius_m, aircraft.cmg_m),
                                       m(W_FT), m(U_FT), m(M_FT)))
    # identity, the exact tractrix on the exit straight: tan(alpha/2) = tan(A/2) exp(-x/d), the gear
    # deviates d sin(alpha) and lies d cos(alpha) behind the cockpit.
    d, a_rad = aircraft.cmg_m, max_body_angle_rad(radius_m, aircraft.cmg_m)
    settled_alpha = math.asin(allowed_m / d)
    travel_m = d * math.log(math.tan(a_rad / 2) / math.tan(settled_alpha / 2))
    exact_ft = ft(travel_m - d * math.cos(settled_alpha))
    assert engine_ft == pytest.approx(exact_ft, abs=0.01)  # 0.01 ft: the station spacing used here
    # Horonjeff eq. 6-12 with eq. 6-9's A: 66.85 ft. It takes sin(alpha) ~ 2 tan(alpha/2) and the gear a
    # full d behind the cockpit, so it differs from the exact tractrix by about a tenth of a foot.
    assert published_ft == pytest.approx(66.85, abs=0.01)
    assert engine_ft == pytest.approx(published_ft, abs=0.2)


@pytest.mark.parametrize(("call", "error"), [
    (lambda: max_body_angle_rad(10.0, 20.0), RadiusTooSmallError),
    (lambda: max_body_angle_rad(math.nan, 20.0), NonFiniteInputError),
    (lambda: fillet_radius_m(50.0, 20.0, 0.0, 3.0), GeometryError),
    (lambda: lead_in_length_m(20.0, 0.4, 10.0, 8.0, 3.0), GeometryError),
    (lambda: turning_radius_m(20.0, math.pi / 2), GeometryError),
    (lambda: steady_state_steering_rad(50.0, 20.0, -1.0), GeometryError),
])
def test_bad_input_raises(call: object, error: type[Exception]) -> None:
    with pytest.raises(error):
        call()  # type: ignore[operator]
