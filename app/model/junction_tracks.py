"""The tracks a junction result keeps, for every swept path of the junction at once.

Per swept path: the gear-edge, main-gear and wingtip tracks simplified to TRACK_SIMPLIFY_M, and
per plot station (about one a metre) the steering angle and the edge margin. Every step is one
whole-array call for the whole junction (one simplify of all its tracks, one margin measurement of
all its tyre-edge points), not one per track: the work is the same, the call overhead is paid once.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from shapely.geometry.base import BaseGeometry

from app.model.edge_margins import EdgeSegments, FloatArray, signed_margins
from app.model.results import AircraftTracks
from geometry.pavement import simplified_tracks
from geometry.sweep import SweptPath

TRACK_SIMPLIFY_M = 0.003  # stored tracks stay within 3 mm of the computed ones
# Margins and plotted values every metre of cockpit travel: the tyre edges bend gently (radius of
# 10 m or more), so the least margin between samples is missed by at most 1 / (8 x 10) m ~ 1 cm.
PLOT_STEP_M = 1.0


def plot_stations(station_m: FloatArray) -> np.ndarray:
    """Indices of the stations kept for the per-station plots and margins: about one per
    PLOT_STEP_M, always including the first and the last."""
    wanted = np.arange(station_m[0], station_m[-1], PLOT_STEP_M)
    picked = np.append(np.searchsorted(station_m, wanted), len(station_m) - 1)
    # stations increase, so the picks do too: dropping repeats keeps them sorted and unique
    first_of_run = np.empty(len(picked), dtype=bool)
    first_of_run[0] = True
    np.not_equal(picked[1:], picked[:-1], out=first_of_run[1:])
    return picked[first_of_run]


def _edge_margins(edges: list[FloatArray], pavement: BaseGeometry,
                  segments: EdgeSegments | None) -> list[FloatArray]:
    """Signed margin of every point of every tyre-edge track (NaN without ``segments``)."""
    points = np.concatenate(edges)
    signed = (np.full(len(points), np.nan) if segments is None
              else signed_margins(points, pavement, segments, [len(edge) for edge in edges]))
    return np.split(signed, np.cumsum([len(edge) for edge in edges[:-1]]))


def junction_tracks(swept_paths: Sequence[SweptPath], required_margins_m: Sequence[float],
                    pavement: BaseGeometry, segments: EdgeSegments | None) -> list[AircraftTracks]:
    """The tracks to keep for each swept path; without ``segments`` (the live pass) the margins are
    left unmeasured (NaN)."""
    if not swept_paths:
        return []
    kept = [plot_stations(swept.station_m) for swept in swept_paths]
    edges = [track for swept, rows in zip(swept_paths, kept, strict=True)
             for track in (swept.gear_left_edge_xy[rows], swept.gear_right_edge_xy[rows])]
    margins = _edge_margins(edges, pavement, segments)
    stored = simplified_tracks([track for swept in swept_paths for track in (
        swept.gear_left_edge_xy, swept.gear_right_edge_xy, swept.main_gear_xy,
        swept.wingtip_left_xy, swept.wingtip_right_xy)], TRACK_SIMPLIFY_M)
    return [_aircraft_tracks(swept, rows, edges[2 * i:2 * i + 2], margins[2 * i:2 * i + 2],
                             stored[5 * i:5 * i + 5], required_margins_m[i], segments is not None)
            for i, (swept, rows) in enumerate(zip(swept_paths, kept, strict=True))]


def _aircraft_tracks(swept: SweptPath, rows: np.ndarray, edges: list[FloatArray], sides: list[FloatArray],
                     stored: list[FloatArray], required_margin_m: float, measured: bool) -> AircraftTracks:
    left_xy, right_xy = edges
    left, right = sides
    margins = np.minimum(left, right)
    steering_deg = np.degrees(np.abs(swept.steering_rad))
    peak = int(np.argmax(steering_deg))
    least = int(np.argmin(margins)) if measured else 0
    edge = left_xy if left[least] <= right[least] else right_xy
    gear_left, gear_right, main_gear, wingtip_left, wingtip_right = stored
    return AircraftTracks(swept.aircraft.name, gear_left, gear_right, main_gear, wingtip_left, wingtip_right,
                          swept.station_m[rows], steering_deg[rows], margins,
                          float(steering_deg[peak]), float(margins[least]),
                          (float(swept.cockpit_xy[peak, 0]), float(swept.cockpit_xy[peak, 1])),
                          (float(edge[least, 0]), float(edge[least, 1])), required_margin_m)
