"""Derived results of a layout (CONTRACT): what the analysis computes and views and exporters read.

All geometry in metres. Polygons are shapely geometries; tracks are (n, 2) numpy arrays.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt
from shapely.geometry.base import BaseGeometry

from app.model.unions import LazyGeometry, TiledGeometry
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
    """The pavement geometries are built on first use (the analysis keeps them per tile, see
    app/model/unions.py); a plain geometry given instead is held as is."""

    junctions: dict[str, JunctionResult]
    straight_source: BaseGeometry | LazyGeometry  # all centerlines at design width, runways at theirs
    total_source: BaseGeometry | TiledGeometry    # straights + fillets (+ required areas no fillet form fits)
    new_source: BaseGeometry | TiledGeometry      # total minus existing pavement
    total_area_m2: float
    new_area_m2: float
    findings: tuple[Finding, ...]
    centerline_polylines: dict[str, FloatArray] = field(default_factory=dict)  # flattened, for drawing
    shoulders: BaseGeometry | None = None                    # paved shoulders, when the rule set has them

    def __post_init__(self) -> None:
        for name in ("total_source", "new_source"):
            value = getattr(self, name)
            if isinstance(value, BaseGeometry):
                object.__setattr__(self, name, TiledGeometry.whole_of(value))

    @property
    def straight_pavement(self) -> BaseGeometry:
        source = self.straight_source
        return source.get() if isinstance(source, LazyGeometry) else source

    @property
    def total_pavement(self) -> BaseGeometry:
        return self._tiled(self.total_source).whole()

    @property
    def new_pavement(self) -> BaseGeometry:
        return self._tiled(self.new_source).whole()

    def pavement_near(self, bounds_m: tuple[float, float, float, float]) -> BaseGeometry:
        """The total pavement within the rectangle (xmin, ymin, xmax, ymax), exactly."""
        return self._tiled(self.total_source).near(bounds_m)

    def pavement_edges_xy(self) -> tuple[FloatArray, ...]:
        """The edges of the total pavement as (n, 2) arrays with NaN rows between lines (one array
        per tile, the same array object while its tile is unchanged), without tile seams."""
        return self._tiled(self.total_source).edge_parts_xy()

    def new_pavement_rings_xy(self) -> tuple[FloatArray, ...]:
        """The rings of the new pavement, one array per tile (NaN rows between rings), to fill by
        the even-odd rule: tiles do not overlap, so the fill is the new pavement's."""
        return self._tiled(self.new_source).fill_parts_xy()

    @staticmethod
    def _tiled(source: BaseGeometry | TiledGeometry) -> TiledGeometry:
        return source if isinstance(source, TiledGeometry) else TiledGeometry.whole_of(source)
