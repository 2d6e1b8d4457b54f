"""The wingtip tracks of a movement, limited to where that movement really runs.

The analysis sweeps each movement along a straight lead-in and lead-out long enough for the sweep;
they may run past the far ends of the movement's legs, across the next junction and onto ground
where the line does not go. The wingtip checks keep only the stations at which

* the cockpit is on the turn: within the turn's tangent length (R tan(|turn| / 2)) of the junction
  point, plus :data:`ON_PATH_TOLERANCE_M`;
* or on the departure leg, no further out than the leg's length (the next junction or the line's
  end): the wings trail behind the cockpit, back toward this junction;
* or on the arrival leg, far enough in that the trailing wingtips are on the leg too: out by no
  more than the leg's length less the cockpit-to-wingtip distance along the body. Further out the
  aircraft is still in the previous junction, whose own movements sweep it.

A track carries no cockpit positions, but they follow exactly from the two wingtips (at the same
station): the wingtips lie on a line square to the body axis, ``wingtip_x_m`` from the main gear,
so the cockpit is their midpoint moved forward by ``cmg_m - wingtip_x_m``.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry.base import BaseGeometry

from geometry.aircraft import DesignAircraft
from geometry.checks.common import CheckContext, track_geometry
from geometry.checks.inputs import MovementInfo, TrackInfo
from geometry.network import Leg
from geometry.primitives import FloatArray

ON_PATH_TOLERANCE_M = 1.0  # a cockpit this close to a leg's centerline is on it
BoolArray = npt.NDArray[np.bool_]
MAX_STEP_M = 1.0           # tracks are cut between stations at most this far apart


@dataclass(frozen=True, slots=True, eq=False)
class WingtipTrack:
    side: str                    # "left" or "right"
    geometry: BaseGeometry


def _matching(track: TrackInfo) -> tuple[FloatArray, FloatArray] | None:
    left = np.asarray(track.wingtip_left_xy, dtype=float)
    right = np.asarray(track.wingtip_right_xy, dtype=float)
    if left.ndim != 2 or left.shape != right.shape or left.shape[1:] != (2,):
        return None
    return left, right


def densified(left: FloatArray, right: FloatArray, max_step_m: float = MAX_STEP_M
              ) -> tuple[FloatArray, FloatArray]:
    """Both tracks with stations added by linear interpolation, at most ``max_step_m`` apart.

    The sweep samples a straight sparsely (every tracked point moves in a straight line there),
    so a cut at a leg's end between two stations would otherwise fall up to a whole piece short."""
    if len(left) < 2:
        return left, right
    steps = np.maximum(np.hypot(*np.diff(left, axis=0).T), np.hypot(*np.diff(right, axis=0).T))
    counts = np.where(np.isfinite(steps), np.ceil(steps / max_step_m), 1).astype(int).clip(1, 100_000)
    row = np.repeat(np.arange(len(counts)), counts)
    fraction = (np.arange(counts.sum()) - np.repeat(np.cumsum(counts) - counts, counts)) / counts[row]

    def spread(points: FloatArray) -> FloatArray:
        inner = points[row] + fraction[:, None] * (points[row + 1] - points[row])
        return np.asarray(np.vstack((inner, points[-1:])), dtype=float)

    return spread(left), spread(right)


def cockpit_xy(track: TrackInfo) -> FloatArray | None:
    """Cockpit positions (n, 2) rebuilt from the two wingtip tracks; None if they do not match."""
    pair = _matching(track)
    return None if pair is None else cockpits_from_wingtips(*pair, track.aircraft)


def cockpits_from_wingtips(left: FloatArray, right: FloatArray,
                           aircraft: DesignAircraft) -> FloatArray | None:
    """Cockpit positions from wingtip positions at the same stations (see the module docstring)."""
    if aircraft.wingspan_m <= 0.0:
        return None
    to_left = (left - right) / aircraft.wingspan_m
    forward = np.column_stack((to_left[:, 1], -to_left[:, 0]))
    reach_m = aircraft.cmg_m - aircraft.wingtip_x_m
    return np.asarray((left + right) / 2.0 + reach_m * forward, dtype=float)


def _along_leg(cockpits: FloatArray, origin: tuple[float, float], leg: Leg, limit_m: float) -> FloatArray:
    """True where a cockpit lies on the leg's straight line, between the junction and ``limit_m``."""
    unit = np.array([math.cos(leg.heading_rad), math.sin(leg.heading_rad)])
    offset = cockpits - np.asarray(origin)
    along = offset @ unit
    across = np.abs(offset[:, 0] * unit[1] - offset[:, 1] * unit[0])
    return np.asarray((across <= ON_PATH_TOLERANCE_M) & (along >= -ON_PATH_TOLERANCE_M)
                      & (along <= limit_m + ON_PATH_TOLERANCE_M), dtype=bool)


KeepRule = Callable[[FloatArray, FloatArray], BoolArray]


def _keep_rule(context: CheckContext, movement: MovementInfo, aircraft: DesignAircraft) -> KeepRule | None:
    """Which stations (given by both wingtips) to keep; None when the movement's legs are unknown."""
    legs = context.movement_legs(movement.key, movement.junction_id)
    junction = context.junctions.get(movement.junction_id)
    if legs is None or junction is None or aircraft.wingspan_m <= 0.0:
        return None
    arrival, departure = legs
    point = junction.point
    tangent_m = 0.0
    if movement.radius_m is not None and math.isfinite(movement.radius_m):
        tangent_m = movement.radius_m * math.tan(min(abs(movement.turn_rad), math.radians(179.0)) / 2.0)
    trailing_m = max(0.0, aircraft.cmg_m - aircraft.wingtip_x_m)

    def keep(left: FloatArray, right: FloatArray) -> BoolArray:
        cockpits = cockpits_from_wingtips(left, right, aircraft)
        assert cockpits is not None  # the span is positive
        with np.errstate(invalid="ignore"):
            kept = np.hypot(*(cockpits - np.asarray(point)).T) <= tangent_m + ON_PATH_TOLERANCE_M
            kept |= _along_leg(cockpits, point, arrival, arrival.length_m - trailing_m)
            kept |= _along_leg(cockpits, point, departure, departure.length_m)
        return np.asarray(kept, dtype=bool)

    return keep


def _between(left: FloatArray, right: FloatArray, row: int) -> tuple[FloatArray, FloatArray]:
    """Stations ``row`` and ``row + 1`` with points at most :data:`MAX_STEP_M` apart between them."""
    step_m = max(math.dist(left[row + 1], left[row]), math.dist(right[row + 1], right[row]))
    count = int(min(max(math.ceil(step_m / MAX_STEP_M), 1), 100_000)) if math.isfinite(step_m) else 1
    fraction = np.linspace(0.0, 1.0, count + 1)[:, None]
    return (left[row] + fraction * (left[row + 1] - left[row]),
            right[row] + fraction * (right[row + 1] - right[row]))


def _clipped(left: FloatArray, right: FloatArray, keep: KeepRule) -> tuple[FloatArray, FloatArray]:
    """From the first to the last kept station, each end refined between its two stations."""
    rows = np.flatnonzero(keep(left, right))
    if len(rows) == 0:
        left, right = densified(left, right)
        rows = np.flatnonzero(keep(left, right))
        if len(rows) == 0:
            return left[:0], right[:0]
        return left[rows[0]:rows[-1] + 1], right[rows[0]:rows[-1] + 1]
    first, last = int(rows[0]), int(rows[-1])
    lefts, rights = [left[first:last + 1]], [right[first:last + 1]]
    if first > 0:
        fine_left, fine_right = _between(left, right, first - 1)
        inside = np.flatnonzero(keep(fine_left, fine_right)[:-1])
        if len(inside):
            lefts.insert(0, fine_left[inside[0]:-1])
            rights.insert(0, fine_right[inside[0]:-1])
    if last < len(left) - 1:
        fine_left, fine_right = _between(left, right, last)
        inside = np.flatnonzero(keep(fine_left, fine_right)[1:])
        if len(inside):
            lefts.append(fine_left[1:inside[-1] + 2])
            rights.append(fine_right[1:inside[-1] + 2])
    return np.vstack(lefts), np.vstack(rights)


def track_bounds(track: TrackInfo) -> tuple[float, float, float, float] | None:
    """The bounds (x min, y min, x max, y max) of the finite points of both wingtip tracks."""
    points = np.concatenate([np.asarray(xy, dtype=float).reshape(-1, 2)
                             for xy in (track.wingtip_left_xy, track.wingtip_right_xy)])
    if len(points):
        # A NaN or an infinity shows in the least or the greatest coordinate: all finite, no filter.
        bounds = (*points.min(axis=0).tolist(), *points.max(axis=0).tolist())
        if all(math.isfinite(value) for value in bounds):
            return (bounds[0], bounds[1], bounds[2], bounds[3])
    points = points[np.isfinite(points).all(axis=1)]
    if len(points) == 0:
        return None
    (low_x, low_y), (high_x, high_y) = points.min(axis=0), points.max(axis=0)
    return (float(low_x), float(low_y), float(high_x), float(high_y))


class TrackBounds:
    """:func:`track_bounds` remembered by the identity of the track (an unchanged movement keeps
    its very tracks), for a caller that keeps one between runs."""

    def __init__(self) -> None:
        self._known: dict[int, tuple[TrackInfo, tuple[float, float, float, float] | None]] = {}

    def __call__(self, track: TrackInfo) -> tuple[float, float, float, float] | None:
        known = self._known.get(id(track))
        if known is None or known[0] is not track:
            known = self._known[id(track)] = (track, track_bounds(track))
        return known[1]

    def prepare(self, tracks: list[TrackInfo]) -> None:
        """Work out the bounds of the tracks not known yet together: a few array operations for
        all of them rather than a few for each (the same values: a least or greatest coordinate
        is exact however it is reached)."""
        new = [track for track in tracks
               if (known := self._known.get(id(track))) is None or known[0] is not track]
        arrays = [np.asarray(xy, dtype=float).reshape(-1, 2)
                  for track in new for xy in (track.wingtip_left_xy, track.wingtip_right_xy)]
        counts = [len(left) + len(right) for left, right in zip(arrays[::2], arrays[1::2], strict=True)]
        if len(new) < 2 or not all(counts):
            return
        points = np.concatenate(arrays)
        starts = np.concatenate(([0], np.cumsum(counts)[:-1]))
        lows = np.minimum.reduceat(points, starts).tolist()
        highs = np.maximum.reduceat(points, starts).tolist()
        for track, low, high in zip(new, lows, highs, strict=True):
            bounds = (low[0], low[1], high[0], high[1])
            if all(math.isfinite(value) for value in bounds):
                self._known[id(track)] = (track, bounds)

    def forget_beyond(self, count: int) -> None:
        if len(self._known) > count:
            self._known.clear()


def track_box(track: TrackInfo, margin_m: float,
              bounds_of: Callable[[TrackInfo], tuple[float, float, float, float] | None] = track_bounds
              ) -> BaseGeometry | None:
    """The bounding box of both wingtip tracks grown by ``margin_m``: a cheap first filter."""
    bounds = bounds_of(track)
    if bounds is None or not math.isfinite(margin_m):
        return None
    low_x, low_y, high_x, high_y = bounds
    return shapely.box(low_x - margin_m, low_y - margin_m, high_x + margin_m, high_y + margin_m)


def movement_wingtips(context: CheckContext, movement: MovementInfo, track: TrackInfo) -> list[WingtipTrack]:
    """The wingtip tracks of ``track`` where the movement really runs (module docstring)."""
    pair = _matching(track)
    if pair is None:
        sides = [("left", np.asarray(track.wingtip_left_xy)), ("right", np.asarray(track.wingtip_right_xy))]
    else:
        keep = _keep_rule(context, movement, track.aircraft)
        left, right = pair if keep is None else _clipped(*pair, keep)
        sides = [("left", left), ("right", right)]
    found = []
    for side, points in sides:
        geometry = track_geometry(points)
        if geometry is not None:
            found.append(WingtipTrack(side, geometry))
    return found
