"""Derived results of a layout (CONTRACT): what the analysis computes and views and exporters read.

All geometry in metres. Polygons are shapely geometries; tracks are (n, 2) numpy arrays.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt
from shapely.geometry.base import BaseGeometry

from geometry.findings import Finding

FloatArray = npt.NDArray[np.float64]


@dataclass(frozen=True, slots=True)
class ArcRecord:
    """An exact circular arc for drawing and DXF: counter-clockwise from start to end angle."""

    center_m: tuple[float, float]
    radius_m: float
    start_angle_rad: float
    end_angle_rad: float


@dataclass(frozen=True, slots=True, eq=False)
class AircraftTracks:
    """The swept tracks of one fleet aircraft along one movement."""

    aircraft_name: str
    gear_left_edge_xy: FloatArray
    gear_right_edge_xy: FloatArray
    main_gear_xy: FloatArray
    wingtip_left_xy: FloatArray
    wingtip_right_xy: FloatArray
    station_m: FloatArray
    steering_deg: FloatArray
    edge_margin_m: FloatArray        # distance from the outer tyre edges to the pavement edge, per station
    max_steering_deg: float
    min_edge_margin_m: float
    max_steering_xy: tuple[float, float] = (math.nan, math.nan)    # cockpit position at the peak
    min_edge_margin_xy: tuple[float, float] = (math.nan, math.nan)  # tyre edge point of the least margin
    required_edge_margin_m: float = 0.0                               # TESM or ICAO clearance


@dataclass(frozen=True, slots=True, eq=False)
class MovementResult:
    key: str
    junction_id: str
    from_leg_id: str
    to_leg_id: str
    turn_deg: float                  # signed, + left
    kind: str                        # "turn" or "straight"
    excluded: bool
    radius_m: float | None           # centerline turn radius (None for straight)
    centerline_arc: ArcRecord | None
    tracks: tuple[AircraftTracks, ...]
    required_area: BaseGeometry | None
    required_area_m2: float
    max_steering_deg: float          # 0.0 when the movement has no tracks
    min_edge_margin_m: float         # +inf when it has no tracks (straight on, excluded, not computable):
                                     # the minimum over no track; the one infinity in a result
    problem: str | None = None       # why the movement could not be computed (leg too short...)
    corner_key: str | None = None    # the corner whose turn radius and fillet this turn uses


@dataclass(frozen=True, slots=True, eq=False)
class FilletResult:
    corner_key: str
    fillet_radius_m: float
    taper_a_m: float
    taper_b_m: float
    arc: ArcRecord | None
    edge_xy: FloatArray              # the fillet edge polyline (for drawing)
    outline: BaseGeometry            # the added pavement
    area_m2: float


@dataclass(frozen=True, slots=True, eq=False)
class JunctionResult:
    junction_id: str
    point_m: tuple[float, float]
    kind: str
    line_ids: tuple[str, ...]
    movements: tuple[MovementResult, ...]
    fillets: tuple[FilletResult, ...]
    required_area: BaseGeometry      # union of the movements' required areas near this junction
    buildable_area: BaseGeometry     # straights + fillets
    required_area_m2: float
    buildable_area_m2: float


@dataclass(frozen=True, slots=True, eq=False)
class LayoutResult:
    junctions: dict[str, JunctionResult]
    straight_pavement: BaseGeometry          # all centerlines at design width, runways at their width
    total_pavement: BaseGeometry             # straights + fillets (+ required areas no fillet form fits)
    new_pavement: BaseGeometry               # total minus existing pavement
    total_area_m2: float
    new_area_m2: float
    findings: tuple[Finding, ...]
    centerline_polylines: dict[str, FloatArray] = field(default_factory=dict)  # flattened, for drawing
    shoulders: BaseGeometry | None = None                    # paved shoulders, when the rule set has them
