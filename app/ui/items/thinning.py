"""The drawn copy of an outline, thinned to the screen (Qt-free, so it is tested without Qt).

The scene keeps the exact arrays (tracks at the analysis' 3 mm, for export and for the panels);
the plan view draws a copy with the points a pixel cannot show left out. Douglas-Peucker keeps
every drawn point on the exact polyline and the exact polyline within ``tolerance_m`` of the
drawn one, so at a tolerance of a fraction of a pixel the two draw the same.
"""

from __future__ import annotations

import math

import numpy as np
import numpy.typing as npt
import shapely

FloatArray = npt.NDArray[np.float64]
BoolArray = npt.NDArray[np.bool_]
FEW_POINTS = 64  # fewer points than this are drawn as they are: thinning them costs more than it saves


def detail_tolerance_m(pixel_m: float, fraction_px: float) -> float:
    """``fraction_px`` of a pixel of ``pixel_m`` metres, rounded down to a power of two of the pixel
    size: zooming changes the tolerance (and so the thinned copies) only at every doubling."""
    if not math.isfinite(pixel_m) or pixel_m <= 0.0:
        return 0.0
    return fraction_px * 2.0 ** math.floor(math.log2(pixel_m))


def thinned_polylines(xy: FloatArray, tolerance_m: float) -> tuple[FloatArray, BoolArray]:
    """The pieces of ``xy`` (NaN rows between them), each thinned to ``tolerance_m`` (0 keeps every
    point), as (points without the NaN rows, ``connect``): ``connect[i]`` is True where point ``i``
    joins point ``i + 1`` of the same piece. A piece of one point draws nothing."""
    count = len(xy)
    is_gap = np.isnan(xy[:, 0])  # a NaN row is NaN in both columns (scene.join_pieces)
    gaps = np.flatnonzero(is_gap)
    if tolerance_m <= 0.0 or count <= FEW_POINTS:
        connect = np.ones(count, dtype=bool)
        connect[gaps[gaps > 0] - 1] = False
        connect[-1:] = False
        if len(gaps) == 0:
            return xy, connect
        return np.compress(~is_gap, xy, axis=0), np.compress(~is_gap, connect)
    lengths = np.diff(gaps, prepend=-1, append=count) - 1  # points of each piece
    drawable = lengths >= 2
    if drawable.all():
        kept_xy = np.compress(~is_gap, xy, axis=0) if len(gaps) else xy
        piece = np.repeat(np.arange(len(lengths)), lengths)
    else:
        row_piece = np.repeat(np.arange(len(lengths)), lengths + 1)[:count]  # a piece and the gap after it
        keep = drawable[row_piece]
        keep[gaps] = False
        kept_xy = np.compress(keep, xy, axis=0)  # (a boolean index of rows took several times longer)
        piece = np.repeat(np.arange(int(drawable.sum())), lengths[drawable])
    lines = shapely.linestrings(kept_xy, indices=piece)
    thinned = shapely.simplify(lines, tolerance_m, preserve_topology=False)
    points, piece = shapely.get_coordinates(thinned, return_index=True)
    connect = np.zeros(len(points), dtype=bool)
    connect[:-1] = piece[1:] == piece[:-1]
    return points, connect
