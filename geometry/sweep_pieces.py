"""The swept-path closed form chained along a path piece by piece, and the sweep's stations.

Internal to :mod:`geometry.sweep` (its module docstring states the model and the closed form).
A path is cut into pieces of constant curvature, short enough that the flow coefficients stay of
order one and alpha moves by less than a radian per piece. Everything per piece (a handful of
pieces per path) is plain Python floats; everything per station is a few whole-array numpy
operations, so a sweep costs a fixed number of numpy calls however many stations it has; and
several sweeps (a :class:`SweepPlan` each) share those calls (:func:`at_stations_of_many`), every
station still evaluated on its own, with the values it gets alone.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from geometry.aircraft import DesignAircraft
from geometry.path import CenterlinePath
from geometry.primitives import FloatArray, Segment, Straight

HALF_PI = math.pi / 2.0
IntArray = npt.NDArray[np.intp]


@dataclass(frozen=True, slots=True, eq=False)
class Pieces:
    """Pieces of constant curvature and the body angle alpha at each piece boundary.

    ``table`` holds, per piece, what a station needs (one row per piece, one column per value):
    the closed form's constants (start alpha, m2 = (1/d^2 - kappa^2)/4, k = sqrt|m2|, 1/k (0 where
    m2 == 0), (kappa - sin(alpha0)/d)/2, cos(alpha0)/(2 d)) and the cockpit's start (x, y,
    heading), kappa/2, 2/kappa (0 on a straight) and 1 on a straight (0 on an arc), from which the
    cockpit anywhere on the piece follows exactly (the chord of an arc, or a straight).
    """

    starts_m: list[float]
    lengths_m: list[float]
    curvatures_per_m: list[float]
    alphas_rad: list[float]  # one more than pieces: every piece boundary, in order
    cmg_m: float
    path_length_m: float
    table: FloatArray        # shape (pieces, 12)
    all_hyperbolic: bool     # m2 > 0 on every piece (straights, arcs wider than d): the usual case


@dataclass(frozen=True, slots=True, eq=False)
class SweepPlan:
    """One sweep before it is evaluated: the path cut into pieces with alpha chained along them, and
    the cockpit stations, each with its piece and its distance into that piece."""

    path: CenterlinePath
    aircraft: DesignAircraft
    pieces: Pieces
    station_m: FloatArray
    which: IntArray
    local_m: FloatArray

    def from_station(self, first_m: float) -> SweepPlan:
        """The plan without its stations before ``first_m``: every value it gives is the whole
        plan's own at the stations kept (each station is evaluated on its own)."""
        keep = self.station_m >= first_m
        first = int(np.argmax(keep))
        rows: slice | np.ndarray = keep
        if keep[first:].all():  # stations increase along the path: the kept ones are a tail
            if first == 0:
                return self
            rows = slice(first, None)
        return SweepPlan(self.path, self.aircraft, self.pieces, self.station_m[rows], self.which[rows],
                         self.local_m[rows])


def piece_limit_m(curvature_per_m: float, cmg_m: float) -> float:
    """Longest piece: keeps c, g of order one and the change of alpha below one radian."""
    if abs(curvature_per_m) * cmg_m <= 1.0:
        return 2.0 * cmg_m
    return cmg_m / (1.0 + abs(curvature_per_m) * cmg_m)


def _segment_flow(kappa: float, d: float, piece_m: float) -> tuple[float, float, float, float, float]:
    """What the closed form needs on every piece of one segment, whatever alpha: m2, k, 1/k (0
    where m2 == 0), and c, g over a whole piece: exp(A s) = c I + g A at s = ``piece_m``."""
    inverse_d, kappa_abs = 1.0 / d, abs(kappa)
    m2 = (inverse_d - kappa_abs) * (inverse_d + kappa_abs) / 4.0  # factored: R == d gives exactly zero
    root = math.sqrt(abs(m2))
    inverse_root = 1.0 / root if root > 0.0 else 0.0
    if m2 > 0.0:
        c, g = math.cosh(root * piece_m), math.sinh(root * piece_m) * inverse_root
    elif m2 < 0.0:
        c, g = math.cos(root * piece_m), math.sin(root * piece_m) * inverse_root
    else:
        c, g = 1.0, piece_m
    return m2, root, inverse_root, c, g


def _piece_start(segment: Segment, center: tuple[float, float], local_m: float) -> tuple[float, float, float]:
    """Point and heading at ``local_m`` into a segment (``center``: an arc's centre, computed once
    per segment), by the segment's own formulas."""
    if isinstance(segment, Straight):
        return (segment.start[0] + local_m * math.cos(segment.heading_rad),
                segment.start[1] + local_m * math.sin(segment.heading_rad), segment.heading_rad)
    heading = segment.start_heading_rad + local_m * segment.curvature_per_m
    polar = heading - segment.side * math.pi / 2.0
    cx, cy = center
    return cx + segment.radius_m * math.cos(polar), cy + segment.radius_m * math.sin(polar), heading


def _chord_columns(kappa: float) -> tuple[float, float, float]:
    """kappa/2, 2/kappa (0 on a straight) and 1 on a straight (0 on an arc): the chord of a piece
    at distance s is (2/kappa) sin(kappa s/2) on an arc and s on a straight, one formula for both."""
    if kappa == 0.0:
        return 0.0, 0.0, 1.0
    return 0.5 * kappa, 2.0 / kappa, 0.0


def _segment_pieces(kappa: float, segment_length_m: float, cmg_m: float
                    ) -> tuple[int, float, tuple[float, float, float, float, float]]:
    """How many pieces a segment is cut into, their length, and their flow (:func:`_segment_flow`)."""
    count = max(1, math.ceil(segment_length_m / piece_limit_m(kappa, cmg_m)))
    piece_m = segment_length_m / count
    return count, piece_m, _segment_flow(kappa, cmg_m, piece_m)


def _piece_end_alpha(alpha0: float, kappa: float, cmg_m: float, c: float, g: float
                     ) -> tuple[float, float, float]:
    """Alpha at a piece's end from alpha at its start, and the two half-angle rates of the start:
    exp(A s) = c I + g A applied to the half angle."""
    rate_half, cos_half = (kappa - math.sin(alpha0) / cmg_m) / 2.0, math.cos(alpha0) / (2.0 * cmg_m)
    return alpha0 + 2.0 * math.atan2(g * rate_half, c + g * cos_half), rate_half, cos_half


def peak_alpha_rad(path: CenterlinePath, cmg_m: float) -> float | None:
    """The largest |alpha| at any piece boundary of ``path`` from an aligned start, exactly as
    :func:`chain_pieces` would find it (the same pieces and arithmetic, without the table), or
    None where alpha reaches 90 degrees (the aircraft would roll backwards)."""
    segments = [(segment.curvature_per_m, segment.length_m) for segment in path.segments]
    return peak_alpha_on_segments_rad(segments, cmg_m)


def peak_alpha_on_segments_rad(segments: Iterable[tuple[float, float]], cmg_m: float) -> float | None:
    """:func:`peak_alpha_rad` of a path given by the (curvature, length) of its segments, in order:
    all it reads of them, so a caller can skip building the path."""
    alpha, peak = 0.0, 0.0
    for kappa, length_m in segments:
        count, _, (_, _, _, c, g) = _segment_pieces(kappa, length_m, cmg_m)
        for _ in range(count):  # _piece_end_alpha, written out: this loop is the steering bisection's
            rate_half, cos_half = (kappa - math.sin(alpha) / cmg_m) / 2.0, math.cos(alpha) / (2.0 * cmg_m)
            alpha = alpha + 2.0 * math.atan2(g * rate_half, c + g * cos_half)
            magnitude = abs(alpha)
            if magnitude >= HALF_PI:
                return None
            peak = max(peak, magnitude)
    return peak


def chain_pieces(path: CenterlinePath, cmg_m: float, alpha0_rad: float,
                 rolls_backwards: Callable[[Segment], Exception]) -> Pieces:
    """Cut the path into pieces and carry alpha from each piece's start to its end; raise
    ``rolls_backwards(segment)`` where alpha reaches 90 degrees."""
    starts: list[float] = []
    lengths: list[float] = []
    curvatures: list[float] = []
    rows: list[tuple[float, ...]] = []
    alphas = [alpha0_rad]
    segment_start_m = 0.0  # a running sum, as np.cumsum gives it: the path's own segment starts
    for segment in path.segments:
        kappa, segment_length_m = segment.curvature_per_m, segment.length_m
        center = (0.0, 0.0) if isinstance(segment, Straight) else segment.center
        chord_columns = _chord_columns(kappa)
        count, piece_m, (m2, root, inverse_root, c, g) = _segment_pieces(kappa, segment_length_m, cmg_m)
        for index in range(count):
            starts.append(segment_start_m + index * piece_m)
            lengths.append(piece_m)
            curvatures.append(kappa)
            alpha0 = alphas[-1]
            alpha1, rate_half, cos_half = _piece_end_alpha(alpha0, kappa, cmg_m, c, g)
            rows.append((alpha0, m2, root, inverse_root, rate_half, cos_half,
                         *_piece_start(segment, center, index * piece_m), *chord_columns))
            alphas.append(alpha1)
            if abs(alpha1) >= HALF_PI:
                raise rolls_backwards(segment)
        segment_start_m += segment_length_m
    table = np.array(rows, dtype=float)
    return Pieces(starts, lengths, curvatures, alphas, cmg_m, path.length_m, table,
                  all(row[1] > 0.0 for row in rows))


def _piece_counts(pieces: Pieces, reach_m: float, chord_tolerance_m: float) -> list[int]:
    """Steps per piece, so that step^2 * bound / 8 <= tolerance (the sagitta of a chord).

    ``bound`` bounds |d^2 P/ds^2| over every tracked point P = M + a e + b n on the piece:
    P'' = (-sin(alpha) alpha' - b w') e - a w^2 e + ((cos(alpha) - b w) w + a w') n, with
    w = sin(alpha)/d and w' = cos(alpha) alpha'/d. alpha is monotone on a piece and within
    (-pi/2, pi/2), so |alpha'| <= r = max |kappa - sin(alpha)/d| and |w| <= t = max |sin(alpha)|/d
    over its ends. Term by term, |P''| <= r (1 + (|a| + |b|)/d) + t (1 + |b| t) + |a| t^2
    <= r + t + reach (r/d + t^2), reach the largest |a| + |b| of the tracked points.
    """
    d = pieces.cmg_m
    sines = [math.sin(alpha) for alpha in pieces.alphas_rad]  # once per piece boundary
    counts = []
    for kappa, length_m, sin0, sin1 in zip(pieces.curvatures_per_m, pieces.lengths_m, sines, sines[1:],
                                           strict=False):
        rate = max(abs(kappa - sin0 / d), abs(kappa - sin1 / d))
        turn = max(abs(sin0), abs(sin1)) / d
        bound = rate + turn + reach_m * (rate / d + turn * turn)
        counts.append(max(1, math.ceil(length_m * math.sqrt(bound / (8.0 * chord_tolerance_m)))))
    return counts


def sample_stations(pieces: Pieces, reach_m: float, chord_tolerance_m: float
                    ) -> tuple[FloatArray, IntArray, FloatArray]:
    """Stations: every piece start, evenly stepped pieces, and the path end; with each station's
    piece and its distance into that piece (the path end closes the last piece)."""
    counts = _piece_counts(pieces, reach_m, chord_tolerance_m)
    firsts = [0]
    for count in counts[:-1]:
        firsts.append(firsts[-1] + count)
    steps = [length / count for length, count in zip(pieces.lengths_m, counts, strict=True)]
    counts[-1] += 1  # the path end: one step past the last piece's last station
    # One repeat of a (3, pieces) table: each station's piece start, first station and step.
    start_m, first, step_m = np.repeat(np.array((pieces.starts_m, firsts, steps)), counts, axis=1)
    local_m = np.arange(len(first), dtype=float)
    local_m -= first
    local_m *= step_m
    stations = start_m + local_m
    stations[-1] = pieces.path_length_m
    return stations, np.repeat(np.arange(len(counts)), counts), local_m


def stations_on_pieces(pieces: Pieces, station_m: FloatArray) -> tuple[IntArray, FloatArray]:
    """Each station's piece (a piece start belongs to that piece) and its distance into it."""
    starts, lengths = np.array(pieces.starts_m), np.array(pieces.lengths_m)
    which = np.searchsorted(starts, station_m, side="right") - 1
    np.clip(which, 0, len(starts) - 1, out=which)
    return which, np.clip(station_m - starts[which], 0.0, lengths[which])


def at_stations(pieces: Pieces, which: IntArray,
                local_m: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Body angle alpha, cockpit point (n, 2) and path heading at stations given by their piece
    and distance into it: :func:`at_stations_of_many` of one path."""
    return at_stations_of_many([pieces], [which], [local_m])


def at_stations_of_many(pieces: Sequence[Pieces], which: Sequence[IntArray],
                        local_m: Sequence[FloatArray]) -> tuple[FloatArray, FloatArray, FloatArray]:
    """:func:`at_stations` of several paths at once, their stations one after the other: every
    station is evaluated on its own, so each gets the very values it gets alone."""
    if len(pieces) == 1:
        return _at_stations(pieces[0].table, pieces[0].all_hyperbolic, which[0], local_m[0])
    firsts = np.cumsum([0] + [len(each.starts_m) for each in pieces[:-1]])
    rows = np.concatenate(which) + np.repeat(firsts, [len(each) for each in which])
    return _at_stations(np.concatenate([each.table for each in pieces]),
                        all(each.all_hyperbolic for each in pieces), rows, np.concatenate(local_m))


def _at_stations(table: FloatArray, all_hyperbolic: bool, which: IntArray,
                 local_m: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Alpha, cockpit and heading at stations given by their row of the piece table ``table`` and
    their distance into that piece, from the closed form and the piece's start.

    g = sinh(k s)/k (m2 = k^2 > 0), sin(k s)/k (m2 = -k^2 < 0) or s (m2 = 0): written with 1/k
    per piece, so there is no 0/0 at a piece start. The cockpit moves by the chord of its piece:
    length (2/kappa) sin(kappa s/2) (s when kappa = 0) along the heading at mid-piece,
    h0 + kappa s/2. Stations are gathered once from the piece table; the rest is whole-array
    arithmetic, in place where an intermediate is not needed again.
    """
    (alpha0, m2, root, inverse_root, rate_half, cos_half, x0, y0, h0, half_kappa, chord_scale,
     straight) = table.take(which, axis=0).T
    angle = root * local_m
    if all_hyperbolic:
        c, g = np.cosh(angle), np.sinh(angle)
        g *= inverse_root
    else:
        c, g = np.ones_like(local_m), local_m.copy()  # the m2 == 0 case
        for family, cos_like, sin_like in ((m2 > 0.0, np.cosh, np.sinh), (m2 < 0.0, np.cos, np.sin)):
            np.copyto(c, cos_like(angle), where=family)
            np.copyto(g, sin_like(angle) * inverse_root, where=family)
    # Denominator > 0 on every piece (c > 0, g >= 0, |alpha0| < pi/2): atan2 stays unambiguous.
    c += g * cos_half
    g *= rate_half
    alpha = np.arctan2(g, c)
    alpha *= 2.0
    alpha += alpha0
    half_turn = half_kappa * local_m
    chord = np.sin(half_turn)
    chord *= chord_scale
    chord += straight * local_m
    cockpit = np.empty((len(local_m), 2))
    mid_heading = h0 + half_turn
    np.add(x0, chord * np.cos(mid_heading), out=cockpit[:, 0])
    np.add(y0, chord * np.sin(mid_heading), out=cockpit[:, 1])
    mid_heading += half_turn
    return alpha, cockpit, mid_heading
