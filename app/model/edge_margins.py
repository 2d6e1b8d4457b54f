"""Edge margins: signed distances from tyre-edge points to a junction's pavement edge.

The pavement edge is cut into its straight segments once per junction (:func:`edge_segments`);
every track of every movement is then measured against them with whole-array numpy operations
(:func:`signed_margins`). The distance from a point to a segment is the Euclidean distance to its
nearest point, the segment parameter clamped to [0, 1] (identity).

Measuring every point against every segment costs points x segments; instead the points (in track
order, so neighbours are close) are grouped in blocks of :data:`BLOCK_POINTS`, each block within one
track (a track's last point is repeated to fill its last block: a block spanning the end of one
track and the start of the next would be wide, and its wide bound would keep many segments). A
block's points lie within rho of one of them, its centre c, so for any segment s and point p of the
block, d(p, s) >= d(c, s) - rho (triangle inequality). Measure every point of the block against the
segment nearest the centre; the largest of those distances, U, bounds each point's own nearest
distance, so a segment with d(c, s) > U + rho is nearest to none of them. Only the others are
measured exactly: the result is the exact minimum, whatever the shape of the edge. Distances are
capped at :data:`MARGIN_REACH_M`: a farther edge means, to a planner, no edge near this track.

Every exact distance goes through the one formula of :func:`_squared_distances`, in the same order
of operations, so how the pairs are chosen and laid out changes no bit of the result, only its cost.
Blocks are the columns of a (BLOCK_POINTS, blocks) array: a block's candidate segments become a run
of columns (the block's column repeated, the segments' columns gathered), and the arithmetic runs on
whole rows with every intermediate written into preallocated arrays (1.4-2 times faster than a flat
pair list of repeated segment rows with fresh temporaries, measured on the 10-crossing drag and on
marrowby_field; the number of pairs measured is the same).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry.base import BaseGeometry

FloatArray = npt.NDArray[np.float64]

MARGIN_REACH_M = 60.0    # pavement edges farther than this from a track do not set its margin
BLOCK_POINTS = 16        # consecutive points sharing one choice of candidate segments
PAIRS_PER_CHUNK = 16384  # block-segment pairs measured at once: bounds the temporary arrays
SLACK_M = 1e-9           # rounding allowance when discarding a segment
# Above this many segments GEOS's tree search wins (measured: 800 points against a 3,000-segment ring,
# 16.5 ms against 35.8 ms; at a junction's usual 100-250 segments the blocks win, 11 ms against 37 ms).
TREE_ABOVE_SEGMENTS = 1000


@dataclass(frozen=True, slots=True, eq=False)
class EdgeSegments:
    """The straight segments of a pavement edge, one column each, as rows of ``table``: start x,
    start y, delta x, delta y (end minus start), and the reciprocal of the squared length (0 for a
    zero-length segment, which then acts as a point)."""

    table: FloatArray  # (5, s)

    @property
    def count(self) -> int:
        return int(self.table.shape[1])


def edge_segments(edge: BaseGeometry) -> EdgeSegments:
    """The segments of ``edge`` (a line, a ring, or a collection of them)."""
    parts = shapely.get_parts(edge)
    coordinates, part = shapely.get_coordinates(parts, return_index=True)
    coordinates = np.asarray(coordinates, dtype=float).reshape(-1, 2)
    same_part = part[1:] == part[:-1]
    start, end = coordinates[:-1][same_part], coordinates[1:][same_part]
    delta = end - start
    length2 = np.einsum("ij,ij->i", delta, delta)
    inverse = np.divide(1.0, length2, out=np.zeros_like(length2), where=length2 > 0.0)
    return EdgeSegments(np.vstack((start.T, delta.T, inverse)))


def _squared_distances(x: FloatArray, y: FloatArray, table: FloatArray, work: FloatArray) -> FloatArray:
    """Squared point-to-segment distances, written into ``work[0]``; ``x`` and ``y`` broadcast against
    the rows of ``table`` to the shape of ``work[0]`` (``work`` holds four arrays of that shape, so no
    temporary is allocated: at these sizes allocating is as slow as the arithmetic)."""
    start_x, start_y, delta_x, delta_y, inverse_length2 = table
    rel_x: FloatArray
    rel_x, rel_y, along, product = work
    np.subtract(x, start_x, out=rel_x)
    np.subtract(y, start_y, out=rel_y)
    np.multiply(rel_x, delta_x, out=along)
    np.multiply(rel_y, delta_y, out=product)
    along += product
    along *= inverse_length2
    np.clip(along, 0.0, 1.0, out=along)
    np.multiply(along, delta_x, out=product)
    rel_x -= product
    np.multiply(along, delta_y, out=product)
    rel_y -= product
    rel_x *= rel_x
    rel_y *= rel_y
    rel_x += rel_y
    return rel_x


def _block_radii_m(x: FloatArray, y: FloatArray) -> FloatArray:
    """Per block (a column of ``x`` and ``y``), the largest distance of its points from its centre."""
    offset_x = x - x[BLOCK_POINTS // 2]
    offset_y = y - y[BLOCK_POINTS // 2]
    offset_x *= offset_x
    offset_y *= offset_y
    offset_x += offset_y
    radii: FloatArray = np.sqrt(offset_x.max(axis=0))
    return radii


def _block_distances(x: FloatArray, y: FloatArray, table: FloatArray) -> FloatArray:
    """Exact squared nearest-segment distance of each point; a block of points is a column of ``x``
    and ``y`` (BLOCK_POINTS rows).

    The arithmetic runs on rows as long as the candidate list, never on short rows or columns (numpy
    is several times slower there): a candidate's segment is one column of the segment rows, its
    block one column of the point rows."""
    count, every = x.shape[1], table.shape[1]
    centre_x, centre_y = x[BLOCK_POINTS // 2], y[BLOCK_POINTS // 2]
    from_centre = _squared_distances(centre_x[:, None], centre_y[:, None], table, np.empty((4, count, every)))
    # Every point of the block is within U of the segment nearest the centre, and a segment farther
    # than U + rho from the centre is farther than that from every point (compared squared).
    nearest = from_centre.argmin(axis=1)
    to_nearest = _squared_distances(x, y, table[:, nearest], np.empty((4, BLOCK_POINTS, count)))
    limit = np.sqrt(to_nearest.max(axis=0))
    limit += _block_radii_m(x, y)
    limit += SLACK_M
    limit *= limit
    candidate = from_centre <= limit[:, None]  # each block has one at least: its nearest
    runs = np.count_nonzero(candidate, axis=1)
    segment = np.flatnonzero(candidate)  # ordered by block
    segment -= np.repeat(np.arange(0, count * every, every), runs)
    exact = _squared_distances(np.repeat(x, runs, axis=1), np.repeat(y, runs, axis=1), table[:, segment],
                               np.empty((4, BLOCK_POINTS, len(segment))))
    nearest_squared: FloatArray = np.minimum.reduceat(exact, np.cumsum(runs) - runs, axis=1)
    return nearest_squared


def _tree_distances_m(points: FloatArray, segments: EdgeSegments) -> FloatArray:
    """The same distances through GEOS's nearest-neighbour search over a tree of the segments."""
    start_x, start_y, delta_x, delta_y, _ = segments.table
    start = np.column_stack((start_x, start_y))
    ends = np.stack((start, start + np.column_stack((delta_x, delta_y))), axis=1)
    tree = shapely.STRtree(shapely.linestrings(ends))
    (which, _), distance = tree.query_nearest(shapely.points(points), max_distance=MARGIN_REACH_M,
                                              return_distance=True, all_matches=False)
    found = np.full(len(points), MARGIN_REACH_M)
    found[which] = distance
    return found


def edge_distances_m(points: FloatArray, segments: EdgeSegments,
                     track_lengths: Sequence[int] | None = None) -> FloatArray:
    """Distance from each point to the nearest segment, capped at :data:`MARGIN_REACH_M`.

    ``track_lengths``: the points are that many consecutive tracks (default: one track); a block of
    points never spans two tracks (see the module notes)."""
    count = len(points)
    if count == 0 or segments.count == 0:
        return np.full(count, MARGIN_REACH_M)
    if segments.count > TREE_ABOVE_SEGMENTS:
        return np.minimum(_tree_distances_m(points, segments), MARGIN_REACH_M)
    lengths = np.asarray(track_lengths if track_lengths is not None else [count], dtype=np.int64)
    lengths = lengths[lengths > 0]
    # Each point once, and a track's last point again until its track fills whole blocks.
    copies = np.ones(count, dtype=np.int64)
    copies[np.cumsum(lengths) - 1] += -lengths % BLOCK_POINTS
    in_blocks = np.repeat(np.arange(count), copies).reshape(-1, BLOCK_POINTS).T  # a block a column
    x, y = points[:, 0][in_blocks], points[:, 1][in_blocks]
    per_chunk = max(1, PAIRS_PER_CHUNK // segments.count)
    squared = np.concatenate([_block_distances(x[:, first:first + per_chunk], y[:, first:first + per_chunk],
                                               segments.table)
                              for first in range(0, x.shape[1], per_chunk)], axis=1)
    distance = np.sqrt(squared.T.reshape(-1))
    capped: FloatArray = np.minimum(distance[np.cumsum(copies) - copies], MARGIN_REACH_M)
    return capped


def signed_margins(points: FloatArray, pavement: BaseGeometry, segments: EdgeSegments,
                   track_lengths: Sequence[int] | None = None) -> FloatArray:
    """Distance from each point to the pavement edge: positive inside ``pavement``, negative outside.
    ``track_lengths`` as for :func:`edge_distances_m`."""
    distance = edge_distances_m(points, segments, track_lengths)
    inside = shapely.contains_xy(pavement, points[:, 0], points[:, 1])
    return np.where(inside, distance, -distance)
