"""An independent reference for the sweep, used by tests only.

It integrates the pursuit equation in plan coordinates of the main gear M,

    dM/ds = (u . T) u,   u = (C - M) / |C - M|,

(REFERENCES.md section 1) with scipy's DOP853 at rtol = atol = 1e-12. It shares nothing with the
engine but the centerline geometry: no body angle, no closed form, no Riccati equation. The
integration restarts at every segment boundary, where the curvature jumps.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.integrate import solve_ivp

from geometry.aircraft import DesignAircraft
from geometry.path import CenterlinePath
from geometry.primitives import Arc, FloatArray, Segment, Straight

TOLERANCE = 1e-12


def _cockpit_and_tangent(segment: Segment, local_m: float) -> tuple[float, float, float, float]:
    if isinstance(segment, Straight):
        heading = segment.heading_rad
        return (segment.start[0] + local_m * math.cos(heading),
                segment.start[1] + local_m * math.sin(heading), math.cos(heading), math.sin(heading))
    assert isinstance(segment, Arc)
    heading = segment.start_heading_rad + local_m * segment.curvature_per_m
    cx, cy = segment.center
    polar = heading - segment.side * math.pi / 2.0
    return (cx + segment.radius_m * math.cos(polar), cy + segment.radius_m * math.sin(polar),
            math.cos(heading), math.sin(heading))


def _main_gear_on_segment(segment: Segment, gear0: FloatArray, local_m: FloatArray) -> FloatArray:
    def pursuit(s: float, gear: FloatArray) -> list[float]:
        cx, cy, tx, ty = _cockpit_and_tangent(segment, s)
        ux, uy = cx - gear[0], cy - gear[1]
        norm = math.hypot(ux, uy)
        ux, uy = ux / norm, uy / norm
        along = ux * tx + uy * ty
        return [along * ux, along * uy]

    # solve_ivp wants strictly increasing output points; repeated stations are mapped back after.
    unique_m, back = np.unique(np.clip(local_m, 0.0, segment.length_m), return_inverse=True)
    solution = solve_ivp(pursuit, (0.0, segment.length_m), gear0, method="DOP853", rtol=TOLERANCE,
                         atol=TOLERANCE, t_eval=unique_m)
    assert solution.success, solution.message
    return np.asarray(solution.y.T[back], dtype=float)


def reference_main_gear_xy(path: CenterlinePath, aircraft: DesignAircraft, station_m: FloatArray,
                           initial_body_angle_rad: float = 0.0) -> FloatArray:
    """Main-gear centre at sorted cockpit stations, by integration segment by segment."""
    first = path.segments[0]
    heading0 = (first.heading_rad if isinstance(first, Straight) else first.start_heading_rad)
    body0 = heading0 - initial_body_angle_rad
    gear = np.array([first.start[0] - aircraft.cmg_m * math.cos(body0),
                     first.start[1] - aircraft.cmg_m * math.sin(body0)])
    result = np.empty((len(station_m), 2))
    segment_start = 0.0
    for index, segment in enumerate(path.segments):
        segment_end = segment_start + segment.length_m
        last = index == len(path.segments) - 1
        before_end = (station_m <= segment_end) if last else (station_m < segment_end)
        inside = (station_m >= segment_start) & before_end
        local = np.append(station_m[inside] - segment_start, segment.length_m)
        gears = _main_gear_on_segment(segment, gear, local)
        result[inside] = gears[:-1]
        gear = gears[-1]
        segment_start = segment_end
    return result


def reference_tracks(path: CenterlinePath, aircraft: DesignAircraft, station_m: FloatArray,
                     initial_body_angle_rad: float = 0.0) -> dict[str, FloatArray]:
    """Every track of the aircraft, built from the integrated main gear and the cockpit."""
    gear = reference_main_gear_xy(path, aircraft, station_m, initial_body_angle_rad)
    cockpit, tangent_heading, _ = path.evaluate(station_m)
    forward = (cockpit - gear) / np.linalg.norm(cockpit - gear, axis=1)[:, None]
    left = np.column_stack((-forward[:, 1], forward[:, 0]))
    tangent = np.column_stack((np.cos(tangent_heading), np.sin(tangent_heading)))
    # Body angle from tangent to body axis, read from the vectors (no angle unwrapping needed).
    alpha = np.arctan2(forward[:, 0] * tangent[:, 1] - forward[:, 1] * tangent[:, 0],
                       np.sum(forward * tangent, axis=1))

    def body_point(forward_m: float, left_m: float = 0.0) -> FloatArray:
        return np.asarray(gear + forward_m * forward + left_m * left, dtype=float)

    half_gear, half_span = aircraft.mgw_m / 2.0, aircraft.wingspan_m / 2.0
    return {
        "main_gear_xy": gear,
        "gear_left_edge_xy": body_point(0.0, half_gear),
        "gear_right_edge_xy": body_point(0.0, -half_gear),
        "nose_gear_xy": body_point(aircraft.wheelbase_m),
        "nose_xy": body_point(aircraft.nose_x_m),
        "tail_xy": body_point(aircraft.tail_x_m),
        "wingtip_left_xy": body_point(aircraft.wingtip_x_m, half_span),
        "wingtip_right_xy": body_point(aircraft.wingtip_x_m, -half_span),
        "body_angle_rad": alpha,
    }
