"""Swept paths of a taxiing aircraft whose cockpit follows a centerline.

The main-gear centre M trails the cockpit C at the fixed distance d = CMG along the body axis and
moves along that axis (no side slip): the pursuit curve (tractrix). With the body angle alpha
(path tangent heading minus body heading) and the path curvature kappa,

    d(alpha)/ds = kappa - sin(alpha) / d.

On a straight or an arc kappa is constant and the equation has a closed form (docs/kinematics.md):
the half-angle vector w = (cos(alpha/2), sin(alpha/2)) obeys the linear equation dw/ds = A w, so
w(s) = (c(s) I + g(s) A) w(0) with c, g given by cosh/sinh (R > d), 1/s (R = d) or cos/sin
(R < d). This has no singularity at any alpha, whatever the radius. The engine evaluates it
exactly at each station; there is no stepping integrator. Each segment is cut into pieces short
enough that the coefficients stay of order one (no overflow for long straights) and alpha moves
by less than a radian per piece (so its angle is read without ambiguity).

:func:`sweep` gives every tracked point and the steering angle (the lateral offsets of the gear
tracks are measured when first read); :func:`main_gear_track` gives the main gear alone, at the
same stations and with the same values, for a caller that needs nothing else. :func:`plan_sweep`
and :func:`swept_paths` split :func:`sweep` in two, so that many sweeps (a junction's turns, every
aircraft of the fleet) are evaluated in one pass of whole-array operations, with the very values
each sweep alone gives.

Signs: alpha > 0 and steering > 0 in a left turn; offsets are positive to the left of travel.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np

from geometry.aircraft import DesignAircraft
from geometry.errors import (
    GeometryError,
    InvalidPathError,
    InvalidSweepSettingError,
    NonFiniteInputError,
    RadiusTooSmallError,
)
from geometry.offsets import lateral_offset_m
from geometry.path import CenterlinePath
from geometry.primitives import Arc, FloatArray
from geometry.sweep_pieces import (
    Pieces,
    at_stations_of_many,
    chain_pieces,
    peak_alpha_on_segments_rad,
    sample_stations,
    stations_on_pieces,
)
from geometry.sweep_pieces import SweepPlan as SweepPlan  # plan_sweep's value, re-exported

DEFAULT_CHORD_TOLERANCE_M = 0.003  # a track polyline stays within 3 mm of the exact curve
MIN_CHORD_TOLERANCE_M = 1e-6  # finer tolerances only multiply stations without meaning
MIN_RADIUS_FLOOR_M = 0.5  # min_radius_for_steering_limit never answers below this
RADIUS_TOLERANCE_M = 1e-3  # bisection tolerance of min_radius_for_steering_limit
SETTLING_LENGTH_CMG = 10.0  # lead-in/out of the standard turn, in CMG: e^-10 of any transient left
_HALF_PI = math.pi / 2.0


@dataclass(frozen=True, slots=True, eq=False)
class GearTrack:
    """The main-gear centre of one aircraft along one path, with the cockpit and body angle that
    place it: what an integrator of the pursuit equation computes, and nothing else. Stations are
    those :func:`sweep` samples for the same aircraft, so the values are the very ones
    :class:`SweptPath` (a gear track with every other tracked point) holds. Every array has one
    row per station; ``*_xy`` arrays are (n, 2).
    """

    path: CenterlinePath
    aircraft: DesignAircraft
    station_m: FloatArray            # cockpit distance along the path
    cockpit_xy: FloatArray
    body_heading_rad: FloatArray     # heading of the body axis
    body_angle_rad: FloatArray       # path tangent heading minus body heading (alpha)
    main_gear_xy: FloatArray         # main-gear centre (pursuit curve)


@dataclass(frozen=True, slots=True, eq=False)
class SweptPath(GearTrack):
    """Tracks of one aircraft along one centerline path, sampled at cockpit stations: the
    :class:`GearTrack` and every other tracked point, the steering angle and the offsets.

    Every array has one row per station. ``*_xy`` arrays have shape (n, 2). Offsets are
    signed lateral distances from the centerline path, positive to the left of travel,
    measured with the path continued along its end tangents (see :mod:`geometry.offsets`); they
    are measured on first use (the layout analysis never reads them) and kept.
    """

    gear_left_edge_xy: FloatArray    # outer edge of the left outermost main-gear tyre
    gear_right_edge_xy: FloatArray   # outer edge of the right outermost main-gear tyre
    nose_gear_xy: FloatArray
    nose_xy: FloatArray
    tail_xy: FloatArray
    wingtip_left_xy: FloatArray
    wingtip_right_xy: FloatArray
    steering_rad: FloatArray         # nose-gear steering angle, signed (+ left)
    # The three offset arrays below, once measured (not part of the constructor).
    _offsets: list[FloatArray] = field(init=False, repr=False, compare=False, default_factory=list)

    @property
    def gear_offset_m(self) -> FloatArray:
        """Main-gear centre offset from the centerline."""
        return self._measured_offsets()[0]

    @property
    def left_edge_offset_m(self) -> FloatArray:
        """Offset of :attr:`gear_left_edge_xy` from the centerline."""
        return self._measured_offsets()[1]

    @property
    def right_edge_offset_m(self) -> FloatArray:
        """Offset of :attr:`gear_right_edge_xy` from the centerline."""
        return self._measured_offsets()[2]

    def _measured_offsets(self) -> list[FloatArray]:
        if not self._offsets:
            points = np.concatenate((self.main_gear_xy, self.gear_left_edge_xy, self.gear_right_edge_xy))
            offsets = lateral_offset_m(self.path, points, extend_ends=True)
            count = len(self.station_m)
            self._offsets.extend((offsets[:count], offsets[count:2 * count], offsets[2 * count:]))
        return self._offsets

    @property
    def max_steering_rad(self) -> float:
        """Largest nose-gear steering angle over the movement, as a magnitude (>= 0)."""
        return float(np.max(np.abs(self.steering_rad)))

    @property
    def max_steering_station_m(self) -> float:
        """Cockpit station at which :attr:`max_steering_rad` occurs (the first, if several)."""
        return float(self.station_m[int(np.argmax(np.abs(self.steering_rad)))])

    @property
    def max_edge_offset_m(self) -> float:
        """Largest distance of an outer tyre edge from the centerline toward either side, over the
        whole movement: max over stations of max(left edge offset, -right edge offset). In a turn
        this is the inner tyre edge's deviation toward the inside; on a straight it is mgw/2."""
        return float(max(np.max(self.left_edge_offset_m), np.max(-self.right_edge_offset_m)))

    @property
    def max_gear_deviation_m(self) -> float:
        """Largest distance of the main-gear centre from the centerline (zero on a straight)."""
        return float(np.max(np.abs(self.gear_offset_m)))


def main_gear_track(path: CenterlinePath, aircraft: DesignAircraft, *,
                    chord_tolerance_m: float = DEFAULT_CHORD_TOLERANCE_M,
                    initial_body_angle_rad: float = 0.0) -> GearTrack:
    """The main-gear track alone: :func:`sweep` without the other tracked points, the offsets and
    the steering angle, for a caller that needs only where the gear rolls. Same arguments, stations,
    values and errors as :func:`sweep`.

    Examples
    --------
    >>> from geometry.path import standard_turn_path
    >>> from geometry.theoretical import theoretical_airplane
    >>> plane, path = theoretical_airplane("3"), standard_turn_path(40.0, math.pi / 2, 60.0, 200.0)
    >>> gear = main_gear_track(path, plane)
    >>> bool(np.array_equal(gear.main_gear_xy, sweep(path, plane).main_gear_xy))
    True
    """
    plan = plan_sweep(path, aircraft, chord_tolerance_m=chord_tolerance_m,
                      initial_body_angle_rad=initial_body_angle_rad)
    return _body_frames([plan], with_steering=False)[0][0]


def sweep(path: CenterlinePath, aircraft: DesignAircraft, *,
          chord_tolerance_m: float = DEFAULT_CHORD_TOLERANCE_M,
          initial_body_angle_rad: float = 0.0) -> SweptPath:
    """Follow ``path`` with the cockpit over the centerline, starting with the body at
    ``initial_body_angle_rad`` to the first segment's tangent (0: aligned).

    Stations include every segment end. Between them the step is chosen per piece from a bound
    on the second derivative of every tracked point (docs/kinematics.md, "Sampling"), so each
    track polyline stays within ``chord_tolerance_m`` of the exact curve.

    Raises
    ------
    RadiusTooSmallError
        If the body angle reaches 90 degrees: the main gear would have to roll backwards.
    InvalidSweepSettingError, NonFiniteInputError
        For a chord tolerance or initial body angle out of range.

    Examples
    --------
    >>> from geometry.path import standard_turn_path
    >>> plane = DesignAircraft("Demo", cmg_m=20.0, wheelbase_m=18.0, mgw_m=9.0, tyre_width_m=1.0,
    ...                        wingspan_m=36.0, wingtip_x_m=-3.0, nose_x_m=23.0, tail_x_m=-20.0,
    ...                        tail_height_m=12.0)
    >>> swept = sweep(standard_turn_path(60.0, 6.0, 200.0, 200.0), plane)
    >>> round(swept.max_gear_deviation_m, 3)  # settled on the arc: 60 - sqrt(60^2 - 20^2)
    3.431
    """
    return swept_paths([plan_sweep(path, aircraft, chord_tolerance_m=chord_tolerance_m,
                                   initial_body_angle_rad=initial_body_angle_rad)])[0]


def plan_sweep(path: CenterlinePath, aircraft: DesignAircraft, *,
               chord_tolerance_m: float = DEFAULT_CHORD_TOLERANCE_M,
               initial_body_angle_rad: float = 0.0) -> SweepPlan:
    """The stations :func:`sweep` samples, and what evaluating them needs; same arguments and errors."""
    _check_chord_tolerance(chord_tolerance_m)
    pieces = _chain_pieces(path, aircraft, initial_body_angle_rad)
    station_m, which, local_m = sample_stations(pieces, _body_points(aircraft)[1], chord_tolerance_m)
    return SweepPlan(path, aircraft, pieces, station_m, which, local_m)


def swept_paths(plans: Sequence[SweepPlan]) -> list[SweptPath]:
    """Every plan evaluated, all in one pass: the swept path of each, with the very values
    :func:`sweep` gives for its path and aircraft at its stations."""
    return [_swept_path(gear, basis, steering_rad) for gear, basis, steering_rad in _body_frames(plans)]


def sweep_at_stations(path: CenterlinePath, aircraft: DesignAircraft, station_m: FloatArray, *,
                      initial_body_angle_rad: float = 0.0) -> SweptPath:
    """Like :func:`sweep`, evaluated exactly at the given cockpit stations (m, 0..path length)."""
    stations = np.asarray(station_m, dtype=float)
    if stations.ndim != 1 or stations.size == 0:
        raise GeometryError("stations must be a non-empty one-dimensional array")
    if not np.isfinite(stations).all():
        raise NonFiniteInputError("a station is NaN or infinite")
    if stations.min() < 0.0 or stations.max() > path.length_m:
        raise GeometryError(f"stations must lie between 0 and the path length {path.length_m:.3f} m")
    pieces = _chain_pieces(path, aircraft, initial_body_angle_rad)
    which, local_m = stations_on_pieces(pieces, stations)
    return swept_paths([SweepPlan(path, aircraft, pieces, stations, which, local_m)])[0]


def steering_angle_rad(aircraft: DesignAircraft, body_angle_rad: FloatArray) -> FloatArray:
    """Nose-gear steering angle for body angles alpha: atan2(WB sin(alpha), d cos(alpha))."""
    alpha = np.asarray(body_angle_rad, dtype=float)
    return np.asarray(np.arctan2(aircraft.wheelbase_m * np.sin(alpha), aircraft.cmg_m * np.cos(alpha)),
                      dtype=float)


def steering_limited_radius_steady_state(aircraft: DesignAircraft) -> float:
    """Centerline radius (m) at which the steady-state steering equals the aircraft's limit:
    sqrt((WB / tan(theta_max))^2 + d^2) (identity of the steady state, docs/kinematics.md)."""
    return math.hypot(aircraft.wheelbase_m / math.tan(aircraft.max_steering_rad), aircraft.cmg_m)


def min_radius_for_steering_limit(aircraft: DesignAircraft, turn_rad: float) -> float:
    """Smallest centerline radius (m) for a standard turn of ``turn_rad`` (aligned lead-in,
    arc, lead-out long enough to settle) at which the nose-gear steering angle stays within
    ``aircraft.max_steering_deg``.

    The peak steering of a standard turn occurs where the cockpit leaves the arc and falls as the
    radius grows, so a bisection between :data:`MIN_RADIUS_FLOOR_M` and the steady-state limit
    radius (never exceeded by the transient) finds it to :data:`RADIUS_TOLERANCE_M`; the upper
    end of the final bracket is returned. A short turn that stays within the limit even at the
    floor returns the floor. Any finite non-zero turn is accepted; the sign does not matter.
    """
    if not math.isfinite(turn_rad):
        raise NonFiniteInputError(f"the turn angle must be a finite number, got {turn_rad!r}")
    if turn_rad == 0.0:
        raise InvalidPathError("the turn angle must not be zero")
    limit_rad = aircraft.max_steering_rad
    low_m, high_m = MIN_RADIUS_FLOOR_M, steering_limited_radius_steady_state(aircraft)
    if high_m <= low_m or _peak_steering_rad(aircraft, low_m, turn_rad) <= limit_rad:
        return low_m
    while high_m - low_m > RADIUS_TOLERANCE_M:
        middle_m = 0.5 * (low_m + high_m)
        if _peak_steering_rad(aircraft, middle_m, turn_rad) <= limit_rad:
            high_m = middle_m
        else:
            low_m = middle_m
    return high_m


def _peak_steering_rad(aircraft: DesignAircraft, radius_m: float, turn_rad: float) -> float:
    lead_m = SETTLING_LENGTH_CMG * aircraft.cmg_m
    # standard_turn_path(radius_m, turn_rad, lead_m, lead_m), as its segments' curvature and length
    # (the arc's by Arc's own formulas): the path itself is not needed.
    side = 1.0 if turn_rad > 0.0 else -1.0
    segments = ((0.0, lead_m), (side / radius_m, radius_m * abs(turn_rad)), (0.0, lead_m))
    # alpha is monotone on each piece, so its extreme lies on a piece boundary.
    peak_alpha = peak_alpha_on_segments_rad(segments, aircraft.cmg_m)
    if peak_alpha is None:  # the aircraft would roll backwards: the radius is too small
        return _HALF_PI
    return float(steering_angle_rad(aircraft, np.array([peak_alpha]))[0])


def _check_chord_tolerance(chord_tolerance_m: float) -> None:
    if not math.isfinite(chord_tolerance_m):
        raise NonFiniteInputError(f"the chord tolerance must be a finite number, got {chord_tolerance_m!r}")
    if chord_tolerance_m < MIN_CHORD_TOLERANCE_M:
        raise InvalidSweepSettingError(f"the chord tolerance must be at least {MIN_CHORD_TOLERANCE_M} m, "
                                       f"got {chord_tolerance_m} m")


def _check_initial_body_angle(alpha_rad: float) -> None:
    if not math.isfinite(alpha_rad):
        raise NonFiniteInputError(f"the initial body angle must be a finite number, got {alpha_rad!r}")
    if abs(alpha_rad) >= _HALF_PI:
        raise InvalidSweepSettingError(f"the initial body angle must lie strictly between -90 and 90 "
                                       f"degrees, got {math.degrees(alpha_rad):.1f} degrees")


def _chain_pieces(path: CenterlinePath, aircraft: DesignAircraft, alpha0_rad: float) -> Pieces:
    _check_initial_body_angle(alpha0_rad)
    return chain_pieces(path, aircraft.cmg_m, alpha0_rad,
                        lambda segment: _gear_rolls_backwards(aircraft, segment))


def _gear_rolls_backwards(aircraft: DesignAircraft, segment: object) -> RadiusTooSmallError:
    radius = f"a {segment.radius_m:.1f} m radius" if isinstance(segment, Arc) else "this path"
    return RadiusTooSmallError(
        f"the design aircraft {aircraft.name!r} cannot follow {radius}: its main gear would have to "
        f"roll backwards (cockpit-to-main-gear distance {aircraft.cmg_m:.1f} m). Use a larger radius "
        f"or a smaller turn angle.")


@lru_cache(maxsize=256)
def _body_points(aircraft: DesignAircraft) -> tuple[FloatArray, float]:
    """Body-frame (forward, left) positions of every tracked point, from the main-gear centre, in
    the order of :data:`_TRACKS` then the cockpit; and their reach, the largest |forward| + |left|
    (what bounds the tracks' curvature, geometry.sweep_pieces). Read-only, kept per aircraft."""
    half_gear, half_span = aircraft.mgw_m / 2.0, aircraft.wingspan_m / 2.0
    points = np.array([[0.0, 0.0], [0.0, half_gear], [0.0, -half_gear], [aircraft.wheelbase_m, 0.0],
                       [aircraft.nose_x_m, 0.0], [aircraft.tail_x_m, 0.0], [aircraft.wingtip_x_m, half_span],
                       [aircraft.wingtip_x_m, -half_span], [aircraft.cmg_m, 0.0]])
    points.flags.writeable = False
    return points, float(np.max(np.abs(points).sum(axis=1)))


def _body_frames(plans: Sequence[SweepPlan], *,
                 with_steering: bool = True) -> list[tuple[GearTrack, FloatArray, FloatArray]]:
    """The gear track of each plan, its body frame (basis[0] forward (cos, sin), basis[1] left
    (-sin, cos), shape (2, stations, 2)) and its steering angle (empty without ``with_steering``).
    Every station of every plan is evaluated together; each plan's arrays are then its own
    (copies, not views, when there are several plans)."""
    if not plans:
        return []
    counts = [len(plan.station_m) for plan in plans]
    alpha_rad, cockpit_xy, body_heading_rad = at_stations_of_many(
        [plan.pieces for plan in plans], [plan.which for plan in plans], [plan.local_m for plan in plans])
    body_heading_rad -= alpha_rad  # the path tangent's heading, turned into the body's
    basis = np.empty((2, len(alpha_rad), 2))
    np.cos(body_heading_rad, out=basis[0, :, 0])
    np.sin(body_heading_rad, out=basis[0, :, 1])
    np.negative(basis[0, :, 1], out=basis[1, :, 0])
    basis[1, :, 1] = basis[0, :, 0]
    cmg_m = _per_station([plan.aircraft.cmg_m for plan in plans], counts)
    main_gear_xy = cockpit_xy - cmg_m[..., np.newaxis] * basis[0]
    steering_rad = (_steering_within_right_angle_rad(
        _per_station([plan.aircraft.wheelbase_m / plan.aircraft.cmg_m for plan in plans], counts), alpha_rad)
        if with_steering else np.empty(0))
    if len(plans) == 1:  # the arrays are the plan's own already
        plan = plans[0]
        return [(GearTrack(plan.path, plan.aircraft, plan.station_m, cockpit_xy, body_heading_rad, alpha_rad,
                           main_gear_xy), basis, steering_rad)]
    frames, start = [], 0
    for plan, count in zip(plans, counts, strict=True):
        rows = slice(start, start + count)
        gear = GearTrack(plan.path, plan.aircraft, plan.station_m, cockpit_xy[rows].copy(),
                         body_heading_rad[rows].copy(), alpha_rad[rows].copy(), main_gear_xy[rows].copy())
        frames.append((gear, basis[:, rows], steering_rad[rows].copy()))
        start += count
    return frames


def _per_station(values: list[float], counts: list[int]) -> FloatArray:
    """Each plan's value repeated at each of its stations: one array for the whole batch (one plan:
    its value, which broadcasts to the same products)."""
    return np.array(values[0]) if len(values) == 1 else np.repeat(np.array(values), counts)


# The tracks built from body points, in _body_points order; the cockpit (last body point) is not
# among them: it is the path's own point.
_TRACKS = ("main_gear_xy", "gear_left_edge_xy", "gear_right_edge_xy", "nose_gear_xy", "nose_xy", "tail_xy",
           "wingtip_left_xy", "wingtip_right_xy")


def _swept_path(gear: GearTrack, basis: FloatArray, steering_rad: FloatArray) -> SweptPath:
    aircraft, count = gear.aircraft, len(gear.station_m)
    # Every other tracked point at once, one small matrix product: (tracks, stations, 2), each
    # track a contiguous slice; the main gear (the body frame's origin) is the gear track's own.
    tracks = np.empty((len(_TRACKS), count, 2))
    others = tracks[1:].reshape(len(_TRACKS) - 1, -1)  # a view: the product is written into tracks
    np.matmul(_body_points(aircraft)[0][1:-1], basis.reshape(2, -1), out=others)
    tracks[1:] += gear.main_gear_xy
    tracks[0] = gear.main_gear_xy
    return SweptPath(
        path=gear.path, aircraft=aircraft, station_m=gear.station_m, cockpit_xy=gear.cockpit_xy,
        body_heading_rad=gear.body_heading_rad, body_angle_rad=gear.body_angle_rad,
        steering_rad=steering_rad,
        **dict(zip(_TRACKS, tracks, strict=True)))


def _steering_within_right_angle_rad(wheelbase_over_cmg: FloatArray,
                                     body_angle_rad: FloatArray) -> FloatArray:
    """:func:`steering_angle_rad` where |alpha| < 90 degrees (every body angle a sweep reaches):
    d cos(alpha) > 0 there, so atan2(WB sin(alpha), d cos(alpha)) = atan((WB / d) tan(alpha)),
    two transcendental calls instead of three. ``wheelbase_over_cmg``: WB / d at each station."""
    steering = np.tan(body_angle_rad)
    steering *= wheelbase_over_cmg
    return np.asarray(np.arctan(steering, out=steering), dtype=float)
