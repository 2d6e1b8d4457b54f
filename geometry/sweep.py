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

Signs: alpha > 0 and steering > 0 in a left turn; offsets are positive to the left of travel.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from geometry.aircraft import DesignAircraft
from geometry.errors import (
    GeometryError,
    InvalidPathError,
    InvalidSweepSettingError,
    NonFiniteInputError,
    RadiusTooSmallError,
)
from geometry.offsets import lateral_offset_m
from geometry.path import CenterlinePath, standard_turn_path
from geometry.primitives import Arc, FloatArray

DEFAULT_CHORD_TOLERANCE_M = 0.003  # a track polyline stays within 3 mm of the exact curve
MIN_CHORD_TOLERANCE_M = 1e-6  # finer tolerances only multiply stations without meaning
MIN_RADIUS_FLOOR_M = 0.5  # min_radius_for_steering_limit never answers below this
RADIUS_TOLERANCE_M = 1e-3  # bisection tolerance of min_radius_for_steering_limit
SETTLING_LENGTH_CMG = 10.0  # lead-in/out of the standard turn, in CMG: e^-10 of any transient left
_HALF_PI = math.pi / 2.0


@dataclass(frozen=True, slots=True, eq=False)
class SweptPath:
    """Tracks of one aircraft along one centerline path, sampled at cockpit stations.

    Every array has one row per station. ``*_xy`` arrays have shape (n, 2). Offsets are
    signed lateral distances from the centerline path, positive to the left of travel,
    measured with the path continued along its end tangents (see :mod:`geometry.offsets`).
    """

    path: CenterlinePath
    aircraft: DesignAircraft
    station_m: FloatArray            # cockpit distance along the path
    cockpit_xy: FloatArray
    body_heading_rad: FloatArray     # heading of the body axis
    body_angle_rad: FloatArray       # path tangent heading minus body heading (alpha)
    main_gear_xy: FloatArray         # main-gear centre (pursuit curve)
    gear_left_edge_xy: FloatArray    # outer edge of the left outermost main-gear tyre
    gear_right_edge_xy: FloatArray   # outer edge of the right outermost main-gear tyre
    nose_gear_xy: FloatArray
    nose_xy: FloatArray
    tail_xy: FloatArray
    wingtip_left_xy: FloatArray
    wingtip_right_xy: FloatArray
    steering_rad: FloatArray         # nose-gear steering angle, signed (+ left)
    gear_offset_m: FloatArray        # main-gear centre offset from the centerline
    left_edge_offset_m: FloatArray   # offset of gear_left_edge_xy from the centerline
    right_edge_offset_m: FloatArray  # offset of gear_right_edge_xy from the centerline

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


@dataclass(frozen=True, slots=True, eq=False)
class _Pieces:
    """The closed form chained along the path: each piece has constant curvature. Besides each
    piece's start, length, curvature and end angles it keeps the per-piece constants of the flow
    (m2, sqrt|m2| and its inverse) and of the half-angle formula, so stations only gather them."""

    start_m: FloatArray
    length_m: FloatArray
    curvature_per_m: FloatArray
    start_alpha_rad: FloatArray
    end_alpha_rad: FloatArray
    cmg_m: float
    path_length_m: float
    m2: FloatArray               # (1/d^2 - kappa^2) / 4
    root_m2: FloatArray          # sqrt(|m2|)
    inverse_root_m2: FloatArray  # 1 / sqrt(|m2|), 0 where m2 == 0 (that case uses g = s)
    rate_half: FloatArray        # (kappa - sin(alpha0) / d) / 2
    cos_half: FloatArray         # cos(alpha0) / (2 d)

    @staticmethod
    def build(start_m: FloatArray, length_m: FloatArray, curvature_per_m: FloatArray,
              alphas_rad: FloatArray, cmg_m: float, path_length_m: float) -> _Pieces:
        start_alpha = alphas_rad[:-1]
        inverse_d = 1.0 / cmg_m
        kappa = np.abs(curvature_per_m)
        m2 = (inverse_d - kappa) * (inverse_d + kappa) / 4.0  # factored: R == d gives exactly zero
        root = np.sqrt(np.abs(m2))
        inverse_root = np.divide(1.0, root, out=np.zeros_like(root), where=root > 0.0)
        rate_half = (curvature_per_m - np.sin(start_alpha) / cmg_m) / 2.0
        return _Pieces(start_m, length_m, curvature_per_m, start_alpha, alphas_rad[1:], cmg_m, path_length_m,
                       m2, root, inverse_root, rate_half, np.cos(start_alpha) / (2.0 * cmg_m))

    def all_alphas_rad(self) -> FloatArray:
        return np.append(self.start_alpha_rad, self.end_alpha_rad[-1])


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
    _check_chord_tolerance(chord_tolerance_m)
    pieces = _chain_pieces(path, aircraft, initial_body_angle_rad)
    station_m, which, local_m = _sample_stations(pieces, _body_points(aircraft), chord_tolerance_m)
    return _swept_path(path, aircraft, station_m, _alpha_at(pieces, which, local_m))


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
    which = np.searchsorted(pieces.start_m, stations, side="right") - 1
    np.clip(which, 0, len(pieces.start_m) - 1, out=which)
    local_m = np.clip(stations - pieces.start_m[which], 0.0, pieces.length_m[which])
    return _swept_path(path, aircraft, stations, _alpha_at(pieces, which, local_m))


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
    path = standard_turn_path(radius_m, turn_rad, lead_m, lead_m)
    try:
        pieces = _chain_pieces(path, aircraft, 0.0)
    except RadiusTooSmallError:
        return _HALF_PI
    # alpha is monotone on each piece, so its extreme lies on a piece boundary.
    peak_alpha = float(np.max(np.abs(pieces.all_alphas_rad())))
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


def _piece_limit_m(curvature_per_m: float, cmg_m: float) -> float:
    """Longest piece: keeps c, g of order one and the change of alpha below one radian."""
    if abs(curvature_per_m) * cmg_m <= 1.0:
        return 2.0 * cmg_m
    return cmg_m / (1.0 + abs(curvature_per_m) * cmg_m)


def _flow_scalar(m2: float, s_m: float) -> tuple[float, float]:
    """c(s), g(s) of exp(A s) = c I + g A, where A^2 = m2 I (scalar version)."""
    root = math.sqrt(abs(m2)) * s_m
    if root == 0.0:
        return 1.0, s_m
    if m2 > 0.0:
        return math.cosh(root), s_m * math.sinh(root) / root
    return math.cos(root), s_m * math.sin(root) / root


def _alpha_after_scalar(alpha0_rad: float, curvature_per_m: float, cmg_m: float, s_m: float) -> float:
    inverse_d, kappa = 1.0 / cmg_m, abs(curvature_per_m)
    c, g = _flow_scalar((inverse_d - kappa) * (inverse_d + kappa) / 4.0, s_m)  # m2, as in _Pieces.build
    return alpha0_rad + 2.0 * math.atan2(g * (curvature_per_m - math.sin(alpha0_rad) / cmg_m) / 2.0,
                                         c + g * math.cos(alpha0_rad) / (2.0 * cmg_m))


def _flow(pieces: _Pieces, which: npt.NDArray[np.intp], local_m: FloatArray) -> tuple[FloatArray, FloatArray]:
    """c, g of exp(A s) = c I + g A (A^2 = m2 I) at each station, from its piece and local distance.

    g = sinh(k s)/k (m2 = k^2 > 0), sin(k s)/k (m2 = -k^2 < 0) or s (m2 = 0): written with 1/k
    per piece, so there is no 0/0 at a piece start. Each family is evaluated only if some piece
    needs it (on most paths every piece is hyperbolic: straights, and arcs wider than d).
    """
    m2 = pieces.m2[which]
    root = pieces.root_m2[which] * local_m
    hyperbolic, circular = m2 > 0.0, m2 < 0.0
    c = np.ones_like(local_m)
    g = local_m.copy()  # the m2 == 0 case
    inverse_root = pieces.inverse_root_m2[which]
    for family, (cos_like, sin_like) in ((hyperbolic, (np.cosh, np.sinh)), (circular, (np.cos, np.sin))):
        if family.all():
            return cos_like(root), sin_like(root) * inverse_root
        if family.any():
            np.copyto(c, cos_like(root), where=family)
            np.copyto(g, sin_like(root) * inverse_root, where=family)
    return c, g


def _alpha_at(pieces: _Pieces, which: npt.NDArray[np.intp], local_m: FloatArray) -> FloatArray:
    """Body angle at stations given by their piece and distance into it, from the closed form."""
    c, g = _flow(pieces, which, local_m)
    # Denominator > 0 on every piece (c > 0, g >= 0, |alpha0| < pi/2): atan2 stays unambiguous.
    half_turn = np.arctan2(g * pieces.rate_half[which], c + g * pieces.cos_half[which])
    return np.asarray(pieces.start_alpha_rad[which] + 2.0 * half_turn, dtype=float)


def _chain_pieces(path: CenterlinePath, aircraft: DesignAircraft, alpha0_rad: float) -> _Pieces:
    """Cut the path into pieces and carry alpha from each piece's start to its end."""
    _check_initial_body_angle(alpha0_rad)
    d = aircraft.cmg_m
    starts: list[float] = []
    lengths: list[float] = []
    curvatures: list[float] = []
    alphas = [alpha0_rad]
    for segment, segment_start_m in zip(path.segments, path.arrays.starts_m.tolist(), strict=True):
        kappa = segment.curvature_per_m
        count = max(1, math.ceil(segment.length_m / _piece_limit_m(kappa, d)))
        piece_m = segment.length_m / count
        for index in range(count):
            starts.append(segment_start_m + index * piece_m)
            lengths.append(piece_m)
            curvatures.append(kappa)
            alphas.append(_alpha_after_scalar(alphas[-1], kappa, d, piece_m))
            if abs(alphas[-1]) >= _HALF_PI:
                raise _gear_rolls_backwards(aircraft, segment)
    return _Pieces.build(np.array(starts), np.array(lengths), np.array(curvatures), np.array(alphas), d,
                         path.length_m)


def _gear_rolls_backwards(aircraft: DesignAircraft, segment: object) -> RadiusTooSmallError:
    radius = f"a {segment.radius_m:.1f} m radius" if isinstance(segment, Arc) else "this path"
    return RadiusTooSmallError(
        f"the design aircraft {aircraft.name!r} cannot follow {radius}: its main gear would have to "
        f"roll backwards (cockpit-to-main-gear distance {aircraft.cmg_m:.1f} m). Use a larger radius "
        f"or a smaller turn angle.")


def _body_points(aircraft: DesignAircraft) -> FloatArray:
    """Body-frame (forward, left) positions of every tracked point, from the main-gear centre, in
    the order of :data:`_TRACKS` (the three whose offsets are measured come first)."""
    half_gear, half_span = aircraft.mgw_m / 2.0, aircraft.wingspan_m / 2.0
    return np.array([[0.0, 0.0], [0.0, half_gear], [0.0, -half_gear], [aircraft.wheelbase_m, 0.0],
                     [aircraft.nose_x_m, 0.0], [aircraft.tail_x_m, 0.0], [aircraft.wingtip_x_m, half_span],
                     [aircraft.wingtip_x_m, -half_span], [aircraft.cmg_m, 0.0]])


# The tracks built from body points, in _body_points order; the cockpit (last body point) is not
# among them: it is the path's own point.
_TRACKS = ("main_gear_xy", "gear_left_edge_xy", "gear_right_edge_xy", "nose_gear_xy", "nose_xy", "tail_xy",
           "wingtip_left_xy", "wingtip_right_xy")
_OFFSET_TRACKS = 3  # main gear centre and the two outer tyre edges


def _track_acceleration_bound(pieces: _Pieces, body_points: FloatArray) -> FloatArray:
    """Per piece, an upper bound of |d^2 P/ds^2| over all tracked points P = M + a e + b n.

    P'' = (-sin(alpha) alpha' - b w') e - a w^2 e + ((cos(alpha) - b w) w + a w') n, with
    w = sin(alpha)/d and w' = cos(alpha) alpha'/d. alpha is monotone on a piece and within
    (-pi/2, pi/2), so |alpha'| <= r = max |kappa - sin(alpha)/d| and |w| <= t = max |sin(alpha)|/d
    over its ends. Term by term, |P''| <= r (1 + (|a| + |b|)/d) + t (1 + |b| t) + |a| t^2
    = r + t + (|a| + |b|) (r/d + t^2): the largest |a| + |b| of the body points bounds them all.
    """
    d = pieces.cmg_m
    sin_start, sin_end = np.sin(pieces.start_alpha_rad), np.sin(pieces.end_alpha_rad)
    kappa = pieces.curvature_per_m
    rate = np.maximum(np.abs(kappa - sin_start / d), np.abs(kappa - sin_end / d))
    turn_rate = np.maximum(np.abs(sin_start), np.abs(sin_end)) / d
    reach_m = float(np.max(np.abs(body_points).sum(axis=1)))
    return np.asarray(rate + turn_rate + reach_m * (rate / d + turn_rate * turn_rate), dtype=float)


def _sample_stations(pieces: _Pieces, body_points: FloatArray, chord_tolerance_m: float
                     ) -> tuple[FloatArray, npt.NDArray[np.intp], FloatArray]:
    """Stations: every piece start, then steps with sagitta step^2 * bound / 8 <= tolerance; with
    each station's piece and its distance into that piece (the path end closes the last piece)."""
    bound = _track_acceleration_bound(pieces, body_points)
    counts = np.maximum(1, np.ceil(pieces.length_m * np.sqrt(bound / (8.0 * chord_tolerance_m)))).astype(int)
    which = np.repeat(np.arange(len(counts)), counts)
    first_of_piece = np.repeat(np.cumsum(counts) - counts, counts)
    fraction = (np.arange(counts.sum()) - first_of_piece) / counts[which]
    local_m = fraction * pieces.length_m[which]
    stations = np.append(pieces.start_m[which] + local_m, pieces.path_length_m)
    last = len(counts) - 1
    return stations, np.append(which, last), np.append(local_m, pieces.length_m[last])


def _swept_path(path: CenterlinePath, aircraft: DesignAircraft, station_m: FloatArray,
                alpha_rad: FloatArray) -> SweptPath:
    cockpit_xy, tangent_heading_rad, _ = path.evaluate(station_m)
    body_heading_rad = tangent_heading_rad - alpha_rad
    count = len(station_m)
    # The body frame at every station: basis[0] forward (cos, sin), basis[1] left (-sin, cos).
    basis = np.empty((2, count, 2))
    np.cos(body_heading_rad, out=basis[0, :, 0])
    np.sin(body_heading_rad, out=basis[0, :, 1])
    np.negative(basis[0, :, 1], out=basis[1, :, 0])
    basis[1, :, 1] = basis[0, :, 0]
    main_gear_xy = cockpit_xy - aircraft.cmg_m * basis[0]
    # Every tracked point at once, one small matrix product: (tracks, stations, 2), each track a
    # contiguous slice.
    tracks = (_body_points(aircraft)[:-1] @ basis.reshape(2, -1)).reshape(-1, count, 2)
    tracks += main_gear_xy
    tracks[0] = main_gear_xy
    offsets = lateral_offset_m(path, tracks[:_OFFSET_TRACKS].reshape(-1, 2), extend_ends=True)
    return SweptPath(
        path=path, aircraft=aircraft, station_m=station_m, cockpit_xy=cockpit_xy,
        body_heading_rad=body_heading_rad, body_angle_rad=alpha_rad,
        steering_rad=steering_angle_rad(aircraft, alpha_rad),
        gear_offset_m=offsets[:count], left_edge_offset_m=offsets[count:2 * count],
        right_edge_offset_m=offsets[2 * count:], **dict(zip(_TRACKS, tracks, strict=True)))
