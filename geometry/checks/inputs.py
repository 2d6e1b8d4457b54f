"""What the design checks read (CONTRACT between the analysis and the checks).

The analysis (app/model/analysis.py) fills these from the layout and the computed movements;
the checks (geometry/checks/*) turn them into findings. Everything in metres and radians.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Protocol, runtime_checkable

from shapely.geometry.base import BaseGeometry

from geometry.aircraft import DesignAircraft
from geometry.network import Junction, NetworkLine
from geometry.primitives import FloatArray
from geometry.rulesets import RuleSet
from geometry.special_cases import AcuteExit, Crossover, RightAngleConnection


@runtime_checkable
class PavementNear(Protocol):
    """The layout's pavement, read one neighbourhood at a time (the analysis keeps it in tiles and
    never unites the whole of it during a drag)."""

    def near(self, bounds_m: tuple[float, float, float, float]) -> BaseGeometry:
        """Exactly the pavement within the rectangle (xmin, ymin, xmax, ymax)."""
        ...


def pavement_near(pavement: BaseGeometry | PavementNear,
                  bounds_m: tuple[float, float, float, float]) -> BaseGeometry:
    """The pavement within ``bounds_m``; a plain geometry is handed back whole."""
    return pavement.near(bounds_m) if isinstance(pavement, PavementNear) else pavement


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
    pavement: BaseGeometry | PavementNear  # all pavement of the layout (straights + fillets)
    runway_widths_m: dict[str, float]
    # Movements the planner excluded: the checks skip them and do not count them as paths.
    excluded_movement_keys: frozenset[str] = frozenset()
    # ``movements`` split by junction, in the same order; empty: the checks split them. A caller
    # that hands back the same tuple for a junction whose movements did not change lets the checks
    # tell the unchanged junctions by identity (geometry/checks/incremental.py).
    movement_groups: tuple[tuple[str, tuple[MovementInfo, ...]], ...] = ()
