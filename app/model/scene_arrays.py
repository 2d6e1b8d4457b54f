"""Arrays the plan view draws, and what each junction result adds to them (Qt-free).

Pieces of one style are joined into one (n, 2) array with a NaN row between pieces. What one
junction contributes (fillets, required pavement, tracks) is kept in :class:`JunctionParts`
while its result is the very same object: the analysis hands back the same object for every
junction a change did not touch, so a drag rebuilds the arrays of 2 or 3 junctions, not all.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry.base import BaseGeometry

from app.model.results import JunctionResult, LayoutResult

FloatArray = npt.NDArray[np.float64]


def join_pieces(pieces: Iterable[npt.ArrayLike]) -> FloatArray:
    """One (n, 2) array of all ``pieces`` with a NaN row between consecutive pieces."""
    arrays = [array for array in map(_as_xy, pieces) if len(array)]
    if not arrays:
        return np.empty((0, 2))
    parts = [_GAP] * (2 * len(arrays) - 1)
    parts[::2] = arrays
    return np.concatenate(parts)


_GAP = np.full((1, 2), np.nan)


def _as_xy(piece: npt.ArrayLike) -> FloatArray:
    if isinstance(piece, np.ndarray) and piece.dtype == np.float64 and piece.shape[1:] == (2,):
        return piece
    return np.asarray(piece, dtype=float).reshape(-1, 2)


def rings_xy(geometry: BaseGeometry | None) -> FloatArray:
    """Every polygon ring (exteriors and holes) of ``geometry`` joined by NaN rows."""
    if geometry is None or geometry.is_empty:
        return np.empty((0, 2))
    polygons = [part for part in shapely.get_parts(geometry) if part.geom_type == "Polygon"]
    rings = shapely.get_rings(np.asarray(polygons, dtype=object)) if polygons else []
    return join_pieces(shapely.get_coordinates(ring) for ring in rings)


@dataclass(frozen=True, slots=True, eq=False)
class JunctionParts:
    """The arrays one junction result adds to the scene, kept while the result is the same object."""

    source: JunctionResult
    fillets: FloatArray
    required: FloatArray
    tracks: dict[str, FloatArray]  # by track style ("track.gear", "track.wingtip.excluded"...)


TRACK_FIELDS: dict[str, tuple[str, str]] = {
    "track.gear": ("gear_left_edge_xy", "gear_right_edge_xy"),
    "track.wingtip": ("wingtip_left_xy", "wingtip_right_xy")}


def junction_parts(junction: JunctionResult) -> JunctionParts:
    """The fillets, required pavement and tracks (kept and excluded movements apart) of ``junction``."""
    tracks: dict[str, FloatArray] = {}
    for style, fields in TRACK_FIELDS.items():
        for excluded, suffix in ((False, ""), (True, ".excluded")):
            tracks[style + suffix] = join_pieces(
                getattr(track, f) for movement in junction.movements if movement.excluded == excluded
                for track in movement.tracks for f in fields)
    return JunctionParts(junction, join_pieces(rings_xy(f.outline) for f in junction.fillets),
                         rings_xy(junction.required_area), tracks)


def all_junction_parts(result: LayoutResult | None,
                       known: dict[str, JunctionParts]) -> dict[str, JunctionParts]:
    """Each junction's parts, taken over from ``known`` where its result is the very same object."""
    if result is None:
        return {}
    parts = {}
    for junction_id, junction in result.junctions.items():
        before = known.get(junction_id)
        parts[junction_id] = before if before is not None and before.source is junction else (
            junction_parts(junction))
    return parts
