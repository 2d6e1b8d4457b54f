"""Junction arrangements with a name of their own, recognised from the junctions and their legs.

* Crossover: a connector line whose two ends are T-junctions on two *different* lines that are
  parallel within 2 degrees (none of them a runway). An aircraft can reverse direction through
  it, turning onto the connector at one end and onto the other parallel at the other end, when
  both junctions offer those two turns, turning the same way (both left or both right).
* Right-angle runway connection: a taxiway or taxilane meeting a runway at 90 +/- 5 degrees.
* Acute-angled exit: a movement from a runway leg onto a taxiway or taxilane turning 20 to 60
  degrees from the runway direction of travel.
* Throat extent (input to a "wide throat" check): how much of a runway edge a junction's
  pavement opens onto, measured along the edge on each side of the runway.

Angles are in radians; the thresholds above are the module's constants.
"""

from __future__ import annotations

import math
from collections import defaultdict
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from typing import Literal

import shapely
from shapely.geometry.base import BaseGeometry

from geometry.centerline import wrap_angle
from geometry.errors import InvalidPathError, NetworkError, TurnDoesNotFitError
from geometry.movements import Movement, junction_movements
from geometry.network import Junction, Leg
from geometry.path import CenterlinePath
from geometry.primitives import Arc, Point, Segment, Straight
from geometry.turns import check_leg_fits, path_with_leads, turn_arc

PARALLEL_TOLERANCE_RAD = math.radians(2.0)
RIGHT_ANGLE_TOLERANCE_RAD = math.radians(5.0)
ACUTE_EXIT_MIN_RAD = math.radians(20.0)
ACUTE_EXIT_MAX_RAD = math.radians(60.0)
FIT_TOLERANCE_M = 1e-7
THROAT_PROBE_OFFSET_M = 0.1   # measure just outside the runway edge, so runway pavement is not counted


@dataclass(frozen=True, slots=True)
class Reversal:
    """Two turns the same way, onto the connector and then off it, reversing direction."""

    first: Movement
    second: Movement

    @property
    def side(self) -> Literal[1, -1]:
        """+1 for a reversal made with two left turns, -1 with two right turns."""
        return 1 if self.first.turn_rad > 0.0 else -1


@dataclass(frozen=True, slots=True)
class Crossover:
    """A connector between two parallel lines.

    junction_ids / junction_points / parallel_ids: at the connector's start, then at its end.
    spacing_m: between the parallels' centerlines. connector_angle_rad: acute angle between the
    connector (as it leaves its first junction) and the parallels, in (0, pi/2].
    connector_is_straight: a reversal path can be built only through a straight connector.
    """

    connector_id: str
    junction_ids: tuple[str, str]
    junction_points: tuple[Point, Point]
    parallel_ids: tuple[str, str]
    spacing_m: float
    connector_angle_rad: float
    connector_length_m: float
    connector_is_straight: bool
    reversals: tuple[Reversal, ...]

    @property
    def reversal_possible(self) -> bool:
        return bool(self.reversals)


@dataclass(frozen=True, slots=True)
class RightAngleConnection:
    junction_id: str
    runway_id: str
    taxiway_id: str
    angle_rad: float              # acute angle between the two lines, within 5 degrees of pi/2


@dataclass(frozen=True, slots=True)
class AcuteExit:
    junction_id: str
    runway_id: str
    taxiway_id: str
    movement_key: str
    exit_angle_rad: float         # |turn| from the runway direction of travel
    side: Literal[1, -1]          # +1: the exit leaves to the left of the direction of travel


@dataclass(frozen=True, slots=True)
class ThroatExtent:
    """The stretch of one runway edge that a junction's pavement opens onto.

    side: +1 the left edge, -1 the right edge, looking along the runway's own direction.
    start_station_m / end_station_m: along the runway from the junction point.
    """

    junction_id: str
    runway_id: str
    side: Literal[1, -1]
    extent_m: float
    start_station_m: float
    end_station_m: float


def _legs_of(junction: Junction, line_id: str) -> list[Leg]:
    return [leg for leg in junction.legs if leg.line_id == line_id]


def _line_angle_rad(heading_a: float, heading_b: float) -> float:
    """Acute angle between two undirected lines, in [0, pi/2]."""
    angle = abs(wrap_angle(heading_a - heading_b))
    return min(angle, math.pi - angle)


def _through_line(junction: Junction, connector_id: str) -> str | None:
    """The one other line passing straight through a T-junction where the connector ends."""
    if junction.kind != "tee":
        return None
    others = [line_id for line_id in junction.line_ids if line_id != connector_id]
    if len(others) != 1 or {leg.direction for leg in _legs_of(junction, others[0])} != {1, -1}:
        return None
    if any(leg.line_kind == "runway" for leg in junction.legs):
        return None
    return others[0]


def _reversals(ends: tuple[Junction, Junction], connector_id: str, parallel_ids: tuple[str, str],
               excluded: frozenset[str]) -> tuple[Reversal, ...]:
    offered = {movement.key: movement for junction in ends for movement in junction_movements(junction)
               if movement.kind == "turn" and movement.key not in excluded}
    found = []
    for (onto, off), (from_id, to_id) in (((ends[0], ends[1]), parallel_ids),
                                          ((ends[1], ends[0]), parallel_ids[::-1])):
        (leave_onto,) = _legs_of(onto, connector_id)
        (arrive_off,) = _legs_of(off, connector_id)
        for approach in _legs_of(onto, from_id):
            travel_rad = approach.heading_rad + math.pi
            first = offered.get(f"{approach.id}>{leave_onto.id}")
            for departure in _legs_of(off, to_id):
                second = offered.get(f"{arrive_off.id}>{departure.id}")
                # The parallels are parallel, so the departure is either nearly opposite or nearly along.
                opposite = abs(wrap_angle(departure.heading_rad - travel_rad)) > math.pi / 2.0
                if (first is not None and second is not None and opposite
                        and first.turn_rad * second.turn_rad > 0.0):
                    found.append(Reversal(first, second))
    return tuple(found)


def _crossover(ends: tuple[Junction, Junction], connector_id: str,
               excluded: frozenset[str]) -> Crossover | None:
    first_id, second_id = _through_line(ends[0], connector_id), _through_line(ends[1], connector_id)
    if first_id is None or second_id is None or first_id == second_id:
        return None
    parallel_ids = (first_id, second_id)
    headings = [next(leg.heading_rad for leg in _legs_of(junction, line_id) if leg.direction == 1)
                for junction, line_id in zip(ends, parallel_ids, strict=True)]
    if _line_angle_rad(*headings) > PARALLEL_TOLERANCE_RAD:
        return None
    (connector,) = _legs_of(ends[0], connector_id)
    (first_x, first_y), (second_x, second_y) = ends[0].point, ends[1].point
    spacing = abs(math.cos(headings[0]) * (second_y - first_y) - math.sin(headings[0]) * (second_x - first_x))
    straight = connector.straight_length_m >= connector.length_m - FIT_TOLERANCE_M
    return Crossover(connector_id, (ends[0].id, ends[1].id), (ends[0].point, ends[1].point),
                     parallel_ids, spacing,
                     _line_angle_rad(connector.heading_rad, headings[0]), connector.length_m, straight,
                     _reversals(ends, connector_id, parallel_ids, excluded))


def find_crossovers(junctions: Sequence[Junction],
                    excluded_movement_keys: Iterable[str] = ()) -> tuple[Crossover, ...]:
    """Every crossover among ``junctions``, in the order of their connectors' ids; movements in
    ``excluded_movement_keys`` are not offered when deciding whether a reversal is possible."""
    return CrossoverFinder().find(junctions, excluded_movement_keys)


class CrossoverFinder:
    """:func:`find_crossovers` over successive networks: a crossover depends only on the two
    junctions at its connector's ends, so only the lines of junctions that are not the previous
    call's objects are looked at again."""

    def __init__(self) -> None:
        self._excluded: frozenset[str] | None = None
        self._junctions: dict[str, Junction] = {}
        self._ends: dict[str, dict[str, Junction]] = defaultdict(dict)   # line id -> junctions on it
        self._found: dict[str, Crossover] = {}                           # by connector id

    def find(self, junctions: Sequence[Junction],
             excluded_movement_keys: Iterable[str] = ()) -> tuple[Crossover, ...]:
        excluded = frozenset(excluded_movement_keys)
        if excluded != self._excluded:
            self._excluded, self._junctions, self._ends, self._found = excluded, {}, defaultdict(dict), {}
        previous, current = self._junctions, {junction.id: junction for junction in junctions}
        affected: set[str] = set()
        for junction_id in previous.keys() - current.keys():
            self._drop(previous[junction_id], affected)
        for junction_id, junction in current.items():
            old = previous.get(junction_id)
            if old is not junction:
                if old is not None:
                    self._drop(old, affected)
                for leg in junction.legs:
                    self._ends[leg.line_id][junction_id] = junction
                    affected.add(leg.line_id)
        self._junctions = current
        for line_id in affected:
            crossover = self._connector(line_id, excluded)
            if crossover is None:
                self._found.pop(line_id, None)
            else:
                self._found[line_id] = crossover
        return tuple(crossover for _, crossover in sorted(self._found.items()))

    def _drop(self, junction: Junction, affected: set[str]) -> None:
        for leg in junction.legs:
            self._ends[leg.line_id].pop(junction.id, None)
            affected.add(leg.line_id)

    def _connector(self, line_id: str, excluded: frozenset[str]) -> Crossover | None:
        """The crossover ``line_id`` makes, if it is a connector: exactly one leg at each of two
        junctions, leaving the first along the line and the second against it."""
        entries = [(junction, leg) for junction in self._ends.get(line_id, {}).values()
                   for leg in junction.legs if leg.line_id == line_id]
        if len(entries) != 2 or entries[0][0].id == entries[1][0].id:
            return None
        # Leaving one junction along the line and the other against it, the first lies before the
        # second along the line: had it lain after, the second would have a leg along the line too
        # (towards it), and the line three legs. So ordering by direction is ordering by station.
        (start, start_leg), (end, end_leg) = sorted(
            entries, key=lambda entry: (-entry[1].direction, entry[0].id, entry[1].id))
        if start_leg.direction != 1 or end_leg.direction != -1 or start_leg.line_kind == "runway":
            return None
        return _crossover((start, end), line_id, excluded)


def reversal_path(crossover: Crossover, radius_m: float, lead_in_m: float, lead_out_m: float, *,
                  reversal_index: int = 0, second_radius_m: float | None = None) -> CenterlinePath:
    """The cockpit path of one reversal through a crossover: a lead-in along the first parallel,
    the turn onto the connector, the connector's straight, the turn off it (radius
    ``second_radius_m``, default ``radius_m``) and a lead-out along the other parallel.

    Raises
    ------
    NetworkError : the crossover offers no such reversal.
    InvalidPathError : the connector is not straight.
    TurnDoesNotFitError : a parallel's leg or the connector is too short for the turns.
    """
    if not 0 <= reversal_index < len(crossover.reversals):
        raise NetworkError(f"crossover {crossover.connector_id} offers {len(crossover.reversals)} "
                           f"reversals; there is no reversal number {reversal_index}")
    if not crossover.connector_is_straight:
        raise InvalidPathError(f"connector {crossover.connector_id} bends between its junctions: "
                               f"a reversal path is built only through a straight connector")
    reversal = crossover.reversals[reversal_index]
    points = dict(zip(crossover.junction_ids, crossover.junction_points, strict=True))
    second_radius_m = radius_m if second_radius_m is None else second_radius_m
    onto = turn_arc(points[reversal.first.junction_id], reversal.first.arrival_heading_rad,
                    reversal.first.departure_heading_rad, radius_m)
    off = turn_arc(points[reversal.second.junction_id], reversal.second.arrival_heading_rad,
                   reversal.second.departure_heading_rad, second_radius_m)
    check_leg_fits(reversal.first.from_leg, onto.tangent_length_m, radius_m)
    check_leg_fits(reversal.second.to_leg, off.tangent_length_m, second_radius_m)
    along = reversal.first.departure_heading_rad
    (ax, ay), (bx, by) = points[reversal.first.junction_id], points[reversal.second.junction_id]
    between_m = (bx - ax) * math.cos(along) + (by - ay) * math.sin(along)
    middle_m = between_m - onto.tangent_length_m - off.tangent_length_m
    if middle_m < -FIT_TOLERANCE_M:
        raise TurnDoesNotFitError(
            f"connector {crossover.connector_id} is too short for these turns: needs "
            f"{onto.tangent_length_m + off.tangent_length_m:.1f} m of straight, has {between_m:.1f} m")
    pieces: list[Segment] = [onto.arc]
    if middle_m > FIT_TOLERANCE_M:
        pieces.append(Straight(onto.arc.end, along, middle_m))
    pieces.append(Arc(pieces[-1].end, along, second_radius_m, reversal.second.turn_rad))
    return path_with_leads(pieces, lead_in_m, lead_out_m)


def find_runway_connections(junctions: Sequence[Junction]
                            ) -> tuple[tuple[RightAngleConnection, ...], tuple[AcuteExit, ...]]:
    """Right-angle runway connections and acute-angled exits among ``junctions``."""
    right_angles: list[RightAngleConnection] = []
    exits: list[AcuteExit] = []
    for junction in junctions:
        if junction.kind != "taxiway_runway":
            continue
        seen: set[tuple[str, str]] = set()
        for runway in (leg for leg in junction.legs if leg.line_kind == "runway"):
            for taxiway in (leg for leg in junction.legs if leg.line_kind != "runway"):
                angle = _line_angle_rad(runway.heading_rad, taxiway.heading_rad)
                pair = (runway.line_id, taxiway.line_id)
                if pair not in seen and abs(angle - math.pi / 2.0) <= RIGHT_ANGLE_TOLERANCE_RAD:
                    seen.add(pair)
                    right_angles.append(RightAngleConnection(junction.id, *pair, angle))
        for movement in junction_movements(junction):
            exit_angle = abs(movement.turn_rad)
            if (movement.from_leg.line_kind == "runway" and movement.to_leg.line_kind != "runway"
                    and ACUTE_EXIT_MIN_RAD <= exit_angle <= ACUTE_EXIT_MAX_RAD):
                exits.append(AcuteExit(junction.id, movement.from_leg.line_id, movement.to_leg.line_id,
                                       movement.key, exit_angle, 1 if movement.turn_rad > 0.0 else -1))
    return tuple(right_angles), tuple(exits)


def throat_extents(junction: Junction, runway_id: str, runway_width_m: float,
                   pavement: BaseGeometry) -> tuple[ThroatExtent, ...]:
    """Where ``pavement`` (the junction's taxiway pavement: straights and fillets) meets each
    edge of runway ``runway_id``: the stretch of edge nearest the junction that opens onto it.

    The edge is probed 0.1 m outside the runway, so runway pavement in ``pavement`` is not counted,
    over the runway legs' lengths either side of the junction. A side the pavement does not
    reach is left out.
    """
    if not math.isfinite(runway_width_m) or runway_width_m <= 0.0:
        raise InvalidPathError(f"the runway width must be a positive number of metres, "
                               f"got {runway_width_m!r}")
    legs = _legs_of(junction, runway_id)
    if not legs:
        raise NetworkError(f"runway {runway_id} does not pass junction {junction.id}")
    heading = next((leg.heading_rad for leg in legs if leg.direction == 1), legs[0].heading_rad + math.pi)
    behind_m = sum(leg.length_m for leg in legs if leg.direction == -1)
    ahead_m = sum(leg.length_m for leg in legs if leg.direction == 1)
    along, across = (math.cos(heading), math.sin(heading)), (-math.sin(heading), math.cos(heading))
    found = []
    for side in (1, -1):
        offset = side * (runway_width_m / 2.0 + THROAT_PROBE_OFFSET_M)
        edge = [(junction.point[0] + s * along[0] + offset * across[0],
                 junction.point[1] + s * along[1] + offset * across[1]) for s in (-behind_m, ahead_m)]
        opening = _nearest_piece(shapely.intersection(shapely.LineString(edge), pavement), edge[0], behind_m)
        if opening is not None:
            found.append(ThroatExtent(junction.id, runway_id, side, opening[1] - opening[0], *opening))
    return tuple(found)


def _nearest_piece(inside: BaseGeometry, edge_start: Point, behind_m: float) -> tuple[float, float] | None:
    """Stations (from the junction) of the piece of ``inside`` nearest the junction's station."""
    pieces = [piece for piece in shapely.get_parts(shapely.line_merge(inside))
              if isinstance(piece, shapely.LineString) and piece.length > 0.0]
    spans = []
    for piece in pieces:
        stations = [math.dist(edge_start, point) - behind_m for point in piece.coords]
        spans.append((min(stations), max(stations)))
    if not spans:
        return None
    return min(spans, key=lambda span: 0.0 if span[0] <= 0.0 <= span[1] else min(abs(span[0]), abs(span[1])))
