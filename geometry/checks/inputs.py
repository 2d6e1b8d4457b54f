"""What the design checks read (CONTRACT between the analysis and the checks).

The analysis (app/model/analysis.py) fills these from the layout and the computed movements;
the checks (geometry/checks/*) turn them into findings. Everything in metres and radians.
"""

from __future__ import annotations

from dataclasses import dataclass

from shapely.geometry.base import BaseGeometry

from geometry.aircraft import DesignAircraft
from geometry.network import Junction, NetworkLine
from geometry.primitives import FloatArray
from geometry.rulesets import RuleSet
from geometry.special_cases import AcuteExit, Crossover, RightAngleConnection


@dataclass(frozen=True, slots=True, eq=False)
class LineInfo:
    """A taxiway, taxilane or runway with the width it is drawn at and its design aircraft."""

    line: NetworkLine
    name: str
    width_m: float                      # as built in the layout (override or design width)
    design_aircraft: DesignAircraft     # governing aircraft for this line's rules
    width_overridden: bool
    instrument: bool = True             # runways only: instrument runway (runway/taxiway separation)


@dataclass(frozen=True, slots=True, eq=False)
class ObjectInfo:
    id: str
    name: str
    geometry: BaseGeometry              # Point or Polygon
    height_m: float


@dataclass(frozen=True, slots=True, eq=False)
class TrackInfo:
    """One fleet aircraft's computed movement."""

    aircraft: DesignAircraft
    max_steering_rad: float
    max_steering_point_m: tuple[float, float]
    min_edge_margin_m: float            # outer tyre edge to the pavement edge (negative: off pavement)
    min_edge_margin_point_m: tuple[float, float]
    required_edge_margin_m: float
    wingtip_left_xy: FloatArray
    wingtip_right_xy: FloatArray


@dataclass(frozen=True, slots=True, eq=False)
class MovementInfo:
    key: str
    junction_id: str
    line_ids: tuple[str, str]           # from-line, to-line
    turn_rad: float
    radius_m: float | None
    tracks: tuple[TrackInfo, ...]
    problem: str | None                 # why it could not be computed (legs too short, ...)
    location_m: tuple[float, float]


@dataclass(frozen=True, slots=True, eq=False)
class CheckInputs:
    rule_set: RuleSet
    fleet: tuple[DesignAircraft, ...]
    lines: tuple[LineInfo, ...]
    junctions: tuple[Junction, ...]
    movements: tuple[MovementInfo, ...]
    crossovers: tuple[Crossover, ...]
    right_angle_connections: tuple[RightAngleConnection, ...]
    acute_exits: tuple[AcuteExit, ...]
    objects: tuple[ObjectInfo, ...]
    pavement: BaseGeometry              # all pavement of the layout (straights + fillets)
    runway_widths_m: dict[str, float]
    # Movements the planner excluded: the checks skip them and do not count them as paths.
    excluded_movement_keys: frozenset[str] = frozenset()
