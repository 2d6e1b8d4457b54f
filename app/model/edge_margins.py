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


def _squared_distances(x: FloatArray, y: FloatArray, table: FloatArray) -> FloatArray:
    """Squared point-to-segment distances; ``x`` and ``y`` broadcast against the rows of ``table``."""
    start_x, start_y, delta_x, delta_y, inverse_length2 = table
    rel_x: FloatArray = x - start_x
    rel_y = y - start_y
    along = rel_x * delta_x
    along += rel_y * delta_y
    along *= inverse_length2
    np.clip(along, 0.0, 1.0, out=along)
    rel_x -= along * delta_x
    rel_y -= along * delta_y
    rel_x *= rel_x
    rel_y *= rel_y
    rel_x += rel_y
    return rel_x


def _block_distances(points: FloatArray, segments: EdgeSegments) -> FloatArray:
    """Exact nearest-segment distance of each point, for points that fill whole blocks.

    Every array the arithmetic runs on is flat and contiguous (numpy is several times slower on
    broadcast operands and on short rows)."""
    blocks = points.reshape(-1, BLOCK_POINTS, 2)
    count = len(blocks)
    centre = blocks[:, BLOCK_POINTS // 2]
    offset = (blocks - centre[:, None, :]).reshape(-1)
    offset *= offset
    rho = np.sqrt(np.max((offset[0::2] + offset[1::2]).reshape(count, BLOCK_POINTS), axis=1))
    every = segments.count
    every_segment = np.broadcast_to(segments.table[:, None, :], (5, count, every)).reshape(5, -1)
    from_centre = _squared_distances(centre[:, 0].repeat(every), centre[:, 1].repeat(every), every_segment)
    from_centre = np.sqrt(from_centre, out=from_centre).reshape(count, every)
    # Every point of the block is within `bound` of the segment nearest the centre, and a segment
    # farther than bound + rho from the centre is farther than that from every point.
    nearest = from_centre.argmin(axis=1)
    to_nearest = _squared_distances(blocks[:, :, 0].reshape(-1), blocks[:, :, 1].reshape(-1),
                                    segments.table[:, nearest].repeat(BLOCK_POINTS, axis=1))
    bound = np.sqrt(np.max(to_nearest.reshape(count, BLOCK_POINTS), axis=1))
    limit = bound + rho + SLACK_M
    candidate = from_centre <= limit[:, None]  # each block has one at least: its nearest
    block, segment = np.nonzero(candidate)  # ordered by block
    near = blocks[block].reshape(-1, 2)
    pairs = segments.table[:, segment].repeat(BLOCK_POINTS, axis=1)
    exact = _squared_distances(near[:, 0], near[:, 1], pairs)
    runs = np.count_nonzero(candidate, axis=1)
    first = np.cumsum(runs) - runs
    return np.sqrt(np.minimum.reduceat(exact.reshape(-1, BLOCK_POINTS), first, axis=0)).reshape(-1)


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
    padded = points[np.repeat(np.arange(count), copies)]
    rows = BLOCK_POINTS * max(1, PAIRS_PER_CHUNK // segments.count)
    distance = np.concatenate([_block_distances(padded[first:first + rows], segments)
                               for first in range(0, len(padded), rows)])
    capped: FloatArray = np.minimum(distance[np.cumsum(copies) - copies], MARGIN_REACH_M)
    return capped


def signed_margins(points: FloatArray, pavement: BaseGeometry, segments: EdgeSegments,
                   track_lengths: Sequence[int] | None = None) -> FloatArray:
    """Distance from each point to the pavement edge: positive inside ``pavement``, negative outside.
    ``track_lengths`` as for :func:`edge_distances_m`."""
    distance = edge_distances_m(points, segments, track_lengths)
    inside = shapely.contains_xy(pavement, points[:, 0], points[:, 1])
    return np.where(inside, distance, -distance)
