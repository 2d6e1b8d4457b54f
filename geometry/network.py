"""Junctions of a line network, found on the exact centerlines (straights and true arcs).

Where two lines meet they make a *contact*: a crossing, or a line end within the snap tolerance
of another line (a T), or of another line's end (an L). Contacts closer together than the snap
tolerance merge, transitively, into one junction, so several lines through one point make one
junction. A line's own interior vertex is a corner of that line, never a junction; a line
crossing itself is not looked for. Two lines that run side by side within the tolerance without
crossing meet only where an end comes near the other line.

Junction kinds: ``"runway_runway"`` (runways only: kept so it can be drawn and checked, but it
offers no taxi movements, see geometry.movements), ``"taxiway_runway"`` (a taxiway or taxilane
meets or crosses a runway), ``"multi"`` (three or more lines), and for two lines ``"crossing"``
(both pass through), ``"tee"`` (one ends on the other) or ``"elbow"`` (both end there).

Ids are stable under small moves: a junction is ``"J:<line ids, sorted, joined by '/'>#<n>"``
where ``n`` counts the junctions of that same set of lines in order of their station along the
first line of the set (e.g. ``"J:twy-1/twy-2#0"``). A leg is ``"<junction id>|<line id>+"``
(leaving along the line's direction) or ``"-"`` (against it); should one line pass the same
junction twice, the second pass adds ``"#1"``.

The network is a value: :func:`build_network` makes one, :func:`update_network` makes the next
one after some lines changed, recomputing only the contacts of the changed lines and reusing every
junction whose contacts and neighbours did not change.
"""

from __future__ import annotations

import math
from bisect import bisect_left
from collections import defaultdict
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from itertools import pairwise
from typing import Literal

import shapely

from geometry import centerline
from geometry.errors import InvalidPathError, NetworkError
from geometry.path import JOIN_TOLERANCE_M
from geometry.primitives import Point, Segment

LineKind = Literal["taxiway", "taxilane", "runway"]
LINE_KINDS: tuple[LineKind, ...] = ("taxiway", "taxilane", "runway")
DEFAULT_SNAP_TOLERANCE_M = 0.5
CANDIDATE_CHORD_TOLERANCE_M = 0.05  # chords only pick candidate pairs; contacts use exact pieces
END_TOLERANCE_M = 1e-6              # a station this close to a line's end is that end

Pair = tuple[str, str]
_Neighbours = tuple[str, float, float, float]  # line id, previous, own and next station


@dataclass(frozen=True, slots=True)
class NetworkLine:
    """One centerline or runway of the network, as exact segments joined end to start."""

    id: str
    kind: LineKind
    segments: tuple[Segment, ...]

    def __post_init__(self) -> None:
        if not self.id:
            raise NetworkError("every line of the network needs an id")
        if self.kind not in LINE_KINDS:
            raise NetworkError(f"line {self.id}: unknown kind {self.kind!r}, use one of {LINE_KINDS}")
        if not self.segments:
            raise InvalidPathError(f"line {self.id} has no segments")
        for number, (before, after) in enumerate(pairwise(self.segments), start=2):
            if math.dist(before.end, after.start) > JOIN_TOLERANCE_M:
                raise InvalidPathError(f"line {self.id}: segment {number} does not start where "
                                       f"the previous one ends")

    @property
    def length_m(self) -> float:
        return float(sum(segment.length_m for segment in self.segments))


@dataclass(frozen=True, slots=True)
class Leg:
    """One way out of a junction along one line.

    heading_rad: direction away from the junction, at the junction point.
    length_m: along the line to the next junction or to the line's end.
    straight_length_m: of the first straight piece away from the junction, up to the first
        corner (arc or sharp) or the next junction; 0 when the line curves at the junction.
    station_m: the junction's distance along its line. direction: +1 along the line, -1 against.
    """

    id: str
    line_id: str
    line_kind: LineKind
    heading_rad: float
    length_m: float
    straight_length_m: float
    station_m: float
    direction: Literal[1, -1]


@dataclass(frozen=True, slots=True)
class Junction:
    id: str
    point: Point
    legs: tuple[Leg, ...]
    kind: str

    @property
    def line_ids(self) -> tuple[str, ...]:
        return tuple(sorted({leg.line_id for leg in self.legs}))

    def leg(self, leg_id: str) -> Leg:
        for leg in self.legs:
            if leg.id == leg_id:
                return leg
        raise NetworkError(f"junction {self.id} has no leg {leg_id}")


@dataclass(frozen=True, slots=True)
class Contact:
    """Where two lines meet (``line_a`` < ``line_b``), before nearby contacts are merged."""

    line_a: str
    line_b: str
    point: Point
    station_a_m: float
    station_b_m: float
    a_ends_here: bool
    b_ends_here: bool
    crossing: bool


@dataclass(frozen=True, slots=True, eq=False)
class JunctionNetwork:
    """Lines, their junctions, and what :func:`update_network` needs to work incrementally.

    recomputed_ids: the junctions built afresh (all of them for :func:`build_network`); every
    other junction is the very object of the previous network.
    """

    lines: tuple[NetworkLine, ...]
    snap_tolerance_m: float
    junctions: tuple[Junction, ...]
    recomputed_ids: frozenset[str]
    contacts_by_pair: Mapping[Pair, tuple[Contact, ...]]
    contacts_by_junction: Mapping[str, tuple[Contact, ...]]
    neighbours_by_junction: Mapping[str, tuple[_Neighbours, ...]]


@dataclass(frozen=True, slots=True, eq=False)
class _IndexedLine:
    line: NetworkLine
    along: centerline.SegmentStations

    def is_end(self, station_m: float) -> bool:
        return station_m <= END_TOLERANCE_M or station_m >= self.along.length_m - END_TOLERANCE_M

    def point_at_end(self, at_start: bool) -> Point:
        return self.line.segments[0].start if at_start else self.line.segments[-1].end


@dataclass(slots=True)
class _Candidates:
    """Pieces of two lines close enough to meet: segment pairs and (end, segment) pairs."""

    segment_pairs: set[tuple[int, int]]
    ends_near: set[tuple[bool, bool, int]]  # (the end belongs to line a, at its start, other segment)


def _candidate_pairs(indexed: Sequence[_IndexedLine], snap_m: float) -> dict[Pair, _Candidates]:
    owners: list[int] = []
    pieces: list[int] = []
    geometries = []
    for number, item in enumerate(indexed):
        for piece, segment in enumerate(item.line.segments):
            owners.append(number)
            pieces.append(piece)
            geometries.append(shapely.linestrings(centerline.flatten([segment], CANDIDATE_CHORD_TOLERANCE_M)))
    tree = shapely.STRtree(geometries)
    reach_m = snap_m + CANDIDATE_CHORD_TOLERANCE_M
    found: dict[Pair, _Candidates] = defaultdict(lambda: _Candidates(set(), set()))
    left, right = tree.query(geometries, predicate="dwithin", distance=reach_m)
    for i, j in zip(left.tolist(), right.tolist(), strict=True):
        if owners[i] < owners[j]:
            pair = (indexed[owners[i]].line.id, indexed[owners[j]].line.id)
            found[pair].segment_pairs.add((pieces[i], pieces[j]))
    ends = [(number, at_start) for number in range(len(indexed)) for at_start in (True, False)]
    end_points = shapely.points([indexed[n].point_at_end(s) for n, s in ends])
    end_index, piece_index = tree.query(end_points, predicate="dwithin", distance=reach_m)
    for e, j in zip(end_index.tolist(), piece_index.tolist(), strict=True):
        owner, at_start = ends[e]
        if owner != owners[j]:
            a, b = sorted((owner, owners[j]))
            pair = (indexed[a].line.id, indexed[b].line.id)
            found[pair].ends_near.add((owner == a, at_start, pieces[j]))
    return dict(found)


def _contacts_between(a: _IndexedLine, b: _IndexedLine, candidates: _Candidates,
                      snap_m: float) -> tuple[Contact, ...]:
    """Exact crossings of two lines, and each end of one lying within the snap tolerance of the other."""
    contacts = []
    for piece_a, piece_b in sorted(candidates.segment_pairs):
        for local_a, local_b, point in centerline.segment_intersections(a.line.segments[piece_a],
                                                                        b.line.segments[piece_b]):
            station_a, station_b = a.along.starts_m[piece_a] + local_a, b.along.starts_m[piece_b] + local_b
            contacts.append(Contact(a.line.id, b.line.id, point, station_a, station_b,
                                    a.is_end(station_a), b.is_end(station_b), crossing=True))
    pieces_by_end: dict[tuple[bool, bool], list[int]] = defaultdict(list)
    for end_on_a, at_start, piece in candidates.ends_near:
        pieces_by_end[(end_on_a, at_start)].append(piece)
    for (end_on_a, at_start), pieces in sorted(pieces_by_end.items()):
        ending, other = (a, b) if end_on_a else (b, a)
        end_point = ending.point_at_end(at_start)
        (local, point, distance), piece = min(
            ((centerline.closest_point_on_segment(other.line.segments[piece], end_point), piece)
             for piece in sorted(pieces)), key=lambda nearest: nearest[0][2])
        if distance > snap_m:
            continue
        end_station = 0.0 if at_start else ending.along.length_m
        other_station = other.along.starts_m[piece] + local
        stations, ends = ((end_station, other_station), (True, other.is_end(other_station)))
        if not end_on_a:
            stations, ends = stations[::-1], ends[::-1]
        contacts.append(Contact(a.line.id, b.line.id, point, *stations, *ends, crossing=False))
    return tuple(sorted(contacts, key=_contact_order))


def _contact_order(contact: Contact) -> tuple[str, str, float, float, float, float]:
    return (contact.line_a, contact.line_b, contact.station_a_m, contact.station_b_m,
            contact.point[0], contact.point[1])


def _merge_groups(contacts: Sequence[Contact], snap_m: float) -> list[tuple[Contact, ...]]:
    """Contacts within the snap tolerance of each other, transitively, as groups."""
    if not contacts:
        return []
    points = shapely.points([contact.point for contact in contacts])
    left, right = shapely.STRtree(points).query(points, predicate="dwithin", distance=snap_m)
    parent = list(range(len(contacts)))

    def root(i: int) -> int:
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    for i, j in zip(left.tolist(), right.tolist(), strict=True):
        ri, rj = root(i), root(j)
        if ri != rj:
            parent[max(ri, rj)] = min(ri, rj)
    groups: dict[int, list[Contact]] = defaultdict(list)
    for i, contact in enumerate(contacts):
        groups[root(i)].append(contact)
    return [tuple(group) for _, group in sorted(groups.items())]


@dataclass(frozen=True, slots=True)
class _Site:
    """One merged group of contacts: where a junction will be."""

    contacts: tuple[Contact, ...]
    point: Point
    passes: tuple[tuple[str, float], ...]  # (line id, station), one per pass of a line
    line_ids: tuple[str, ...]


def _pass_stations(hits: list[tuple[float, bool]], length_m: float, snap_m: float) -> list[float]:
    """One station per pass of a line through a site; a pass that touches the line's end is
    snapped to it, so a line ending at a junction has no stub leg."""
    runs: list[list[tuple[float, bool]]] = []
    for hit in sorted(hits):
        if runs and hit[0] - runs[-1][-1][0] <= 2.0 * snap_m:
            runs[-1].append(hit)
        else:
            runs.append([hit])
    stations = []
    for run in runs:
        ends = [station for station, at_end in run if at_end]
        if ends:
            stations.append(0.0 if sum(ends) / len(ends) < length_m / 2.0 else length_m)
        else:
            stations.append(sum(station for station, _ in run) / len(run))
    return stations


def _site(group: tuple[Contact, ...], indexed: dict[str, _IndexedLine], snap_m: float) -> _Site:
    hits: dict[str, list[tuple[float, bool]]] = defaultdict(list)
    for contact in group:
        hits[contact.line_a].append((contact.station_a_m, contact.a_ends_here))
        hits[contact.line_b].append((contact.station_b_m, contact.b_ends_here))
    passes = tuple((line_id, station) for line_id in sorted(hits)
                   for station in _pass_stations(hits[line_id], indexed[line_id].along.length_m, snap_m))
    # A true crossing is exact; the nearest points of ends only say where the junction roughly is.
    located = [contact.point for contact in group if contact.crossing] or [c.point for c in group]
    point = (math.fsum(x for x, _ in located) / len(located), math.fsum(y for _, y in located) / len(located))
    return _Site(group, point, passes, tuple(sorted(hits)))


def _site_ids(sites: Sequence[_Site]) -> list[str]:
    by_lines: dict[tuple[str, ...], list[int]] = defaultdict(list)
    for number, site in enumerate(sites):
        by_lines[site.line_ids].append(number)
    ids = [""] * len(sites)
    for line_ids, members in by_lines.items():
        def along_first_line(number: int, first: str = line_ids[0]) -> tuple[float, Point]:
            site = sites[number]
            return min(station for line_id, station in site.passes if line_id == first), site.point
        for ordinal, number in enumerate(sorted(members, key=along_first_line)):
            ids[number] = f"J:{'/'.join(line_ids)}#{ordinal}"
    return ids


def _stations_by_line(sites: Sequence[_Site]) -> dict[str, tuple[float, ...]]:
    stations: dict[str, list[float]] = defaultdict(list)
    for site in sites:
        for line_id, station in site.passes:
            stations[line_id].append(station)
    return {line_id: tuple(sorted(values)) for line_id, values in stations.items()}


def _leg(junction_id: str, item: _IndexedLine, station_m: float, direction: Literal[1, -1],
         limit_m: float, ordinal: int) -> Leg | None:
    length_m = (limit_m - station_m) * direction
    index = item.along.segment_index(station_m, direction)
    if length_m <= END_TOLERANCE_M or index is None:
        return None
    heading = centerline.wrap_angle(item.along.heading_rad(index, station_m)
                                     + (0.0 if direction > 0 else math.pi))
    line = item.line
    suffix = ("+" if direction > 0 else "-") + (f"#{ordinal}" if ordinal else "")
    return Leg(f"{junction_id}|{line.id}{suffix}", line.id, line.kind, heading, length_m,
               item.along.straight_run_m(index, station_m, direction, limit_m), station_m, direction)


def _neighbourhood(site: _Site, indexed: dict[str, _IndexedLine],
                   stations_by_line: dict[str, tuple[float, ...]]) -> tuple[_Neighbours, ...]:
    """Each pass of the site with the stations of the previous and next junctions (or the line's
    ends) along its line: everything a junction's legs depend on besides the line itself."""
    found = []
    for line_id, station in site.passes:
        stations = stations_by_line[line_id]
        position = bisect_left(stations, station)
        before = stations[position - 1] if position > 0 else 0.0
        after = stations[position + 1] if position + 1 < len(stations) else indexed[line_id].along.length_m
        found.append((line_id, before, station, after))
    return tuple(found)


def _legs(junction_id: str, neighbourhood: tuple[_Neighbours, ...],
          indexed: dict[str, _IndexedLine]) -> tuple[Leg, ...]:
    legs: list[Leg] = []
    ordinals: dict[str, int] = defaultdict(int)
    for line_id, before, station, after in neighbourhood:
        sides: tuple[tuple[Literal[1, -1], float], ...] = ((1, after), (-1, before))
        for direction, limit in sides:
            leg = _leg(junction_id, indexed[line_id], station, direction, limit, ordinals[line_id])
            if leg is not None:
                legs.append(leg)
        ordinals[line_id] += 1
    return tuple(legs)


def _kind(site: _Site, legs: Sequence[Leg], indexed: dict[str, _IndexedLine]) -> str:
    kinds = {indexed[line_id].line.kind for line_id in site.line_ids}
    if kinds == {"runway"}:
        return "runway_runway"
    if "runway" in kinds:
        return "taxiway_runway"
    if len(site.line_ids) >= 3:
        return "multi"
    through = sum(1 for line_id in site.line_ids
                  if {leg.direction for leg in legs if leg.line_id == line_id} == {1, -1})
    return ("elbow", "tee", "crossing")[min(through, 2)]


def _index_lines(lines: Sequence[NetworkLine]) -> dict[str, _IndexedLine]:
    indexed: dict[str, _IndexedLine] = {}
    for line in sorted(lines, key=lambda line: line.id):
        if line.id in indexed:
            raise NetworkError(f"two lines share the id {line.id}: every line needs its own id")
        indexed[line.id] = _IndexedLine(line, centerline.SegmentStations.of(line.segments))
    return indexed


def _pair_contacts(indexed: dict[str, _IndexedLine], snap_m: float, previous: JunctionNetwork | None,
                   changed: set[str]) -> dict[Pair, tuple[Contact, ...]]:
    contacts_by_pair: dict[Pair, tuple[Contact, ...]] = {}
    for pair, candidates in sorted(_candidate_pairs(list(indexed.values()), snap_m).items()):
        if previous is not None and pair[0] not in changed and pair[1] not in changed:
            found = previous.contacts_by_pair.get(pair, ())
        else:
            a, b = indexed[pair[0]], indexed[pair[1]]
            found = _contacts_between(a, b, candidates, snap_m)
        if found:
            contacts_by_pair[pair] = found
    return contacts_by_pair


def _reusable(previous: JunctionNetwork | None, previous_by_id: dict[str, Junction], junction_id: str,
              site: _Site, neighbourhood: tuple[_Neighbours, ...], changed: set[str]) -> Junction | None:
    """The previous network's junction, if nothing it was built from has changed."""
    if (previous is None or previous.contacts_by_junction.get(junction_id) != site.contacts
            or previous.neighbours_by_junction.get(junction_id) != neighbourhood
            or any(line_id in changed for line_id in site.line_ids)):
        return None
    return previous_by_id.get(junction_id)


def _assemble(lines: Sequence[NetworkLine], snap_m: float, previous: JunctionNetwork | None,
              changed: set[str]) -> JunctionNetwork:
    if not math.isfinite(snap_m) or snap_m <= 0.0:
        raise NetworkError(f"the snap tolerance must be a positive number of metres, got {snap_m!r}")
    indexed = _index_lines(lines)
    contacts_by_pair = _pair_contacts(indexed, snap_m, previous, changed) if indexed else {}
    contacts = sorted((c for found in contacts_by_pair.values() for c in found), key=_contact_order)
    sites = [_site(group, indexed, snap_m) for group in _merge_groups(contacts, snap_m)]
    ids = _site_ids(sites)
    stations_by_line = _stations_by_line(sites)
    neighbourhoods = [_neighbourhood(site, indexed, stations_by_line) for site in sites]
    previous_by_id = {junction.id: junction for junction in previous.junctions} if previous else {}
    junctions: list[Junction] = []
    recomputed: set[str] = set()
    for junction_id, site, neighbourhood in zip(ids, sites, neighbourhoods, strict=True):
        junction = _reusable(previous, previous_by_id, junction_id, site, neighbourhood, changed)
        if junction is None:
            legs = _legs(junction_id, neighbourhood, indexed)
            junction = Junction(junction_id, site.point, legs, _kind(site, legs, indexed))
            recomputed.add(junction_id)
        junctions.append(junction)
    return JunctionNetwork(tuple(item.line for item in indexed.values()), snap_m, tuple(junctions),
                           frozenset(recomputed), contacts_by_pair,
                           {junction_id: site.contacts for junction_id, site in zip(ids, sites, strict=True)},
                           dict(zip(ids, neighbourhoods, strict=True)))


def build_network(lines: Sequence[NetworkLine],
                  snap_tolerance_m: float = DEFAULT_SNAP_TOLERANCE_M) -> JunctionNetwork:
    """Find every junction of ``lines`` (see the module docstring for the rules)."""
    return _assemble(lines, snap_tolerance_m, None, set())


def update_network(previous: JunctionNetwork, lines: Sequence[NetworkLine],
                   changed_ids: Iterable[str] = ()) -> JunctionNetwork:
    """The network after some lines were moved, added or removed.

    Only contacts of changed lines are recomputed; a junction is rebuilt only if its contacts or
    the junction stations along one of its lines changed, else the previous object is kept. The
    result equals :func:`build_network` on the same lines. ``changed_ids`` may name lines the
    caller knows to have changed; lines whose value differs from ``previous`` are found anyway.
    """
    before = {line.id: line for line in previous.lines}
    changed = set(changed_ids)
    for line in lines:
        old = before.pop(line.id, None)
        if old is None or (old is not line and old != line):
            changed.add(line.id)
    changed.update(before)  # lines that were removed
    return _assemble(lines, previous.snap_tolerance_m, previous, changed)


def find_junctions(lines: Sequence[NetworkLine],
                   snap_tolerance_m: float = DEFAULT_SNAP_TOLERANCE_M) -> tuple[Junction, ...]:
    """The junctions of ``lines``.

    Examples
    --------
    >>> from geometry.primitives import Straight
    >>> east = NetworkLine("twy-1", "taxiway", (Straight((0.0, 0.0), 0.0, 200.0),))
    >>> north = NetworkLine("twy-2", "taxiway", (Straight((100.0, -100.0), math.pi / 2, 200.0),))
    >>> [(junction.id, junction.kind, len(junction.legs)) for junction in find_junctions([east, north])]
    [('J:twy-1/twy-2#0', 'crossing', 4)]
    """
    return build_network(lines, snap_tolerance_m).junctions


def junctions_touching(network: JunctionNetwork, line_ids: Iterable[str]) -> tuple[Junction, ...]:
    """The junctions of ``network`` that lie on any of ``line_ids``."""
    wanted = set(line_ids)
    return tuple(junction for junction in network.junctions
                 if any(leg.line_id in wanted for leg in junction.legs))
