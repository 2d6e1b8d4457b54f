"""Test helpers for the pavement and fillet tests: corner layouts and an independent swept path.

``rk4_swept_path`` integrates the same kinematic model as geometry.sweep with a slow, fixed-step
classical Runge-Kutta scheme (cockpit on the centerline at station s, body angle alpha:
d(alpha)/ds = kappa - sin(alpha)/d; main gear M = C - d e(phi), phi = psi - alpha; tyre edges
M +/- mgw/2 n). It fills a SweptPath, so the pavement code can be checked on tracks sampled
differently from the engine's. Steps never straddle a segment end (kappa jumps there). Offsets
come from geometry.offsets (they are not what these tests check).

All demo aircraft are fictional.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from shapely.geometry import LineString

from geometry.aircraft import DesignAircraft
from geometry.path import CenterlinePath
from geometry.primitives import Arc, FloatArray, Point, Straight
from geometry.sweep import SweptPath


def demo_aircraft(cmg_m: float = 25.0, mgw_m: float = 12.0, wheelbase_m: float | None = None,
                  name: str = "Demo wide twin") -> DesignAircraft:
    """A fictional aircraft; only CMG, wheelbase and MGW matter to the pavement."""
    wheelbase = 0.92 * cmg_m if wheelbase_m is None else wheelbase_m
    return DesignAircraft(name=name, cmg_m=cmg_m, wheelbase_m=wheelbase, mgw_m=mgw_m,
                          tyre_width_m=min(1.2, mgw_m / 4.0), wingspan_m=3.0 * mgw_m,
                          wingtip_x_m=-0.1 * cmg_m, nose_x_m=cmg_m + 3.0, tail_x_m=-1.2 * cmg_m,
                          tail_height_m=12.0)


@dataclass(frozen=True, slots=True)
class Corner:
    """Two legs leaving ``junction`` along ``heading_a_rad`` and ``heading_b_rad`` and the turn arc
    of ``radius_m`` tangent to both (centre ``center``, tangent length ``tangent_m``)."""

    junction: Point
    heading_a_rad: float
    heading_b_rad: float
    radius_m: float

    @property
    def angle_rad(self) -> float:
        return abs(math.remainder(self.heading_b_rad - self.heading_a_rad, 2.0 * math.pi))

    @property
    def tangent_m(self) -> float:
        return self.radius_m / math.tan(self.angle_rad / 2.0)

    @property
    def center(self) -> Point:
        bisector = self.heading_a_rad + math.remainder(self.heading_b_rad - self.heading_a_rad,
                                                       2.0 * math.pi) / 2.0
        reach = self.radius_m / math.sin(self.angle_rad / 2.0)
        return (self.junction[0] + reach * math.cos(bisector), self.junction[1] + reach * math.sin(bisector))

    def along(self, heading_rad: float, distance_m: float) -> Point:
        return (self.junction[0] + distance_m * math.cos(heading_rad),
                self.junction[1] + distance_m * math.sin(heading_rad))

    def turn_path(self, lead_m: float, from_a: bool = True) -> CenterlinePath:
        """Cockpit path from ``lead_m`` before the arc on one leg, round the arc, ``lead_m`` out."""
        first, second = (self.heading_a_rad, self.heading_b_rad) if from_a else \
            (self.heading_b_rad, self.heading_a_rad)
        arrival = first + math.pi
        turn = math.remainder(second - arrival, 2.0 * math.pi)
        start = self.along(first, self.tangent_m + lead_m)
        lead_in = Straight(start, arrival, lead_m)
        arc = Arc(lead_in.end, arrival, self.radius_m, turn)
        return CenterlinePath((lead_in, arc, Straight(arc.end, arc.end_heading_rad, lead_m)))

    def leg_centerline(self, heading_rad: float, behind_m: float, length_m: float) -> LineString:
        """A leg's centerline from ``behind_m`` behind the junction out to ``length_m``."""
        return LineString([self.along(heading_rad, -behind_m), self.along(heading_rad, length_m)])

    def mirrored(self) -> Corner:
        """The same corner reflected in the x axis."""
        return Corner((self.junction[0], -self.junction[1]), -self.heading_a_rad, -self.heading_b_rad,
                      self.radius_m)


def _alpha_rate(alpha: float, curvature: float, cmg_m: float) -> float:
    return curvature - math.sin(alpha) / cmg_m


def _rk4_alphas(path: CenterlinePath, cmg_m: float, step_m: float) -> tuple[FloatArray, FloatArray]:
    stations, alphas, alpha, origin = [0.0], [0.0], 0.0, 0.0
    for segment in path.segments:
        count = max(1, math.ceil(segment.length_m / step_m))
        h = segment.length_m / count
        kappa = segment.curvature_per_m
        for index in range(1, count + 1):
            k1 = _alpha_rate(alpha, kappa, cmg_m)
            k2 = _alpha_rate(alpha + h * k1 / 2.0, kappa, cmg_m)
            k3 = _alpha_rate(alpha + h * k2 / 2.0, kappa, cmg_m)
            k4 = _alpha_rate(alpha + h * k3, kappa, cmg_m)
            alpha += h * (k1 + 2.0 * k2 + 2.0 * k3 + k4) / 6.0
            stations.append(origin + index * h)
            alphas.append(alpha)
        origin += segment.length_m
    return np.array(stations), np.array(alphas)


def rk4_swept_path(path: CenterlinePath, aircraft: DesignAircraft, step_m: float = 0.25) -> SweptPath:
    """Swept path by fixed-step RK4 (slow, accurate: the test reference)."""
    station_m, alpha = _rk4_alphas(path, aircraft.cmg_m, step_m)
    cockpit, psi, _ = path.evaluate(station_m)
    phi = psi - alpha
    forward = np.column_stack((np.cos(phi), np.sin(phi)))
    left = np.column_stack((-np.sin(phi), np.cos(phi)))
    gear = cockpit - aircraft.cmg_m * forward

    def body(forward_m: float, left_m: float = 0.0) -> FloatArray:
        return np.asarray(gear + forward_m * forward + left_m * left)

    half_gear, half_span = aircraft.mgw_m / 2.0, aircraft.wingspan_m / 2.0
    left_edge, right_edge = body(0.0, half_gear), body(0.0, -half_gear)
    return SweptPath(
        path=path, aircraft=aircraft, station_m=station_m, cockpit_xy=cockpit, body_heading_rad=phi,
        body_angle_rad=alpha, main_gear_xy=gear, gear_left_edge_xy=left_edge, gear_right_edge_xy=right_edge,
        nose_gear_xy=body(aircraft.wheelbase_m), nose_xy=body(aircraft.nose_x_m),
        tail_xy=body(aircraft.tail_x_m),
        wingtip_left_xy=body(aircraft.wingtip_x_m, half_span),
        wingtip_right_xy=body(aircraft.wingtip_x_m, -half_span),
        steering_rad=np.arctan2(aircraft.wheelbase_m * np.sin(alpha), aircraft.cmg_m * np.cos(alpha)))
    # The offsets are the SweptPath's own: geometry.offsets.lateral_offset_m of the gear and the two
    # tyre edges, with the path extended along its end tangents, measured on first use.
