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
one after some lines changed, recomputing only the contacts on the segments that changed and
keeping every junction whose value did not change as the very same object: along a line whose
vertex was dragged, all but the junctions next to that vertex. A junction's distance along a line
(its *station*, which a change anywhere before it on the line moves) is therefore not part of the
junction: :meth:`JunctionNetwork.station_m` gives it.
"""

from __future__ import annotations

import math
from bisect import bisect_left
from collections import defaultdict
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from itertools import pairwise
from operator import itemgetter
from typing import Literal

import shapely

from geometry import centerline
from geometry.errors import InvalidPathError, NetworkError
from geometry.network_candidates import (
    CANDIDATE_CHORD_TOLERANCE_M,
    END_TOLERANCE_M,
    CandidateIndex,
    Candidates,
    ChangedPieces,
    IndexedLine,
    Position,
    candidates_of,
    changed_pieces,
    index_lines,
)
from geometry.network_sites import (
    Contact,
    NetworkSites,
    Pair,
    Place,
    Site,
    SitesUpdate,
    contact_order,
    merge_groups,
    new_contacts,
    site_of,
)
from geometry.path import JOIN_TOLERANCE_M
from geometry.primitives import Point, Segment

LineKind = Literal["taxiway", "taxilane", "runway"]
LINE_KINDS: tuple[LineKind, ...] = ("taxiway", "taxilane", "runway")
DEFAULT_SNAP_TOLERANCE_M = 0.5

_Neighbours = tuple[str, Position, Position, Position]  # line id, previous, own and next place


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
    direction: +1 along the line, -1 against.

    A leg holds nothing that depends on where along its line the junction lies (the network
    keeps that: :meth:`JunctionNetwork.station_m`), so a junction whose surroundings did not
    change stays the same value, and the same object, when its line changes farther away.
    """

    id: str
    line_id: str
    line_kind: LineKind
    heading_rad: float
    length_m: float
    straight_length_m: float
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
    # Each segment's candidate chords, by the segment's value: a changed line keeps most of its
    # segments, so the next update flattens only the lines that changed.
    chords_by_segment: Mapping[Segment, shapely.Geometry] = field(default_factory=dict)
    # What the next update reuses: sites, candidate trees, stations (shared, never changed).
    sites: NetworkSites | None = None

    def station_m(self, junction: Junction, leg: Leg) -> float:
        """Where ``junction`` (one of this network's) lies along the line of its ``leg``: its
        distance from the line's start.

        Kept here, not in the leg, because it moves whenever the line changes before the junction,
        however far away. It depends only on the line and the contacts of the junction.
        """
        prefix = f"{junction.id}|{leg.line_id}{'+' if leg.direction > 0 else '-'}"
        suffix = leg.id[len(prefix):] if leg.id.startswith(prefix) else None
        site = self.sites.by_id.get(junction.id) if self.sites is not None else None
        if self.sites is None or site is None or suffix is None or suffix[:1] not in ("", "#"):
            raise NetworkError(f"leg {leg.id} is not a leg of junction {junction.id} of this network")
        ordinal = int(suffix[1:]) if suffix else 0  # which pass of the line, see the leg ids above
        places = [at for line_id, at in site.passes if line_id == leg.line_id]
        if ordinal >= len(places):
            raise NetworkError(f"leg {leg.id} is not a leg of junction {junction.id} of this network")
        return self.sites.indexed[leg.line_id].station_m(places[ordinal])


def _leg(junction_id: str, item: IndexedLine, at: Position, direction: Literal[1, -1],
         limit: Position, ordinal: int) -> Leg | None:
    length_m = item.distance_m(at, limit) if direction > 0 else item.distance_m(limit, at)
    leaving = item.leaving(at, direction)
    if length_m <= END_TOLERANCE_M or leaving is None:
        return None
    heading = centerline.wrap_angle(item.heading_rad(leaving) + (0.0 if direction > 0 else math.pi))
    line = item.line
    suffix = ("+" if direction > 0 else "-") + (f"#{ordinal}" if ordinal else "")
    return Leg(f"{junction_id}|{line.id}{suffix}", line.id, line.kind, heading, length_m,
               item.straight_run_m(leaving, direction, length_m), direction)


def _neighbourhood(site: Site, indexed: dict[str, IndexedLine],
                   places_by_line: Mapping[str, tuple[Place, ...]]) -> tuple[_Neighbours, ...]:
    """Each pass of the site with the places of the previous and next junctions (or the line's
    ends) along its line: with the segments between them, all a junction's legs depend on."""
    found = []
    for line_id, at in site.passes:
        places = places_by_line[line_id]
        position = bisect_left(places, (at, ""))  # the first of the junctions at the same place
        before = places[position - 1][0] if position > 0 else (0, 0.0)
        after = places[position + 1][0] if position + 1 < len(places) else indexed[line_id].end(False)
        found.append((line_id, before, at, after))
    return tuple(found)


def _legs(junction_id: str, neighbourhood: tuple[_Neighbours, ...],
          indexed: dict[str, IndexedLine]) -> tuple[Leg, ...]:
    legs: list[Leg] = []
    ordinals: dict[str, int] = defaultdict(int)
    for line_id, before, at, after in neighbourhood:
        sides: tuple[tuple[Literal[1, -1], Position], ...] = ((1, after), (-1, before))
        for direction, limit in sides:
            leg = _leg(junction_id, indexed[line_id], at, direction, limit, ordinals[line_id])
            if leg is not None:
                legs.append(leg)
        ordinals[line_id] += 1
    return tuple(legs)


def _kind(site: Site, legs: Sequence[Leg], indexed: dict[str, IndexedLine]) -> str:
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


def _reusable(previous: JunctionNetwork | None, junction_id: str, site: Site,
              neighbourhood: tuple[_Neighbours, ...], changed: ChangedPieces) -> Junction | None:
    """The previous network's junction, if nothing it was built from has changed (then it needs
    no building): its contacts, the places of its neighbours and the segments up to them."""
    if (previous is None or previous.contacts_by_junction.get(junction_id) != site.contacts
            or previous.neighbours_by_junction.get(junction_id) != neighbourhood):
        return None
    for line_id, before, _, after in neighbourhood:
        pieces = changed.get(line_id, frozenset())
        if pieces is None or any(before[0] - 1 <= piece <= after[0] + 1 for piece in pieces):
            return None
    return previous.sites.junctions.get(junction_id) if previous.sites is not None else None


def _junction(junction_id: str, site: Site, neighbourhood: tuple[_Neighbours, ...],
              indexed: dict[str, IndexedLine], previous: Junction | None) -> Junction:
    """The junction of ``site``; ``previous`` itself when it has the very same value, as for a
    junction on a changed line whose own stretch of the line did not change."""
    legs = _legs(junction_id, neighbourhood, indexed)
    junction = Junction(junction_id, site.point, legs, _kind(site, legs, indexed))
    return previous if previous == junction else junction


def _merge_again(update: SitesUpdate, previous: JunctionNetwork | None, changed: ChangedPieces,
                 candidates: tuple[dict[Pair, Candidates], CandidateIndex]
                 ) -> tuple[dict[Pair, tuple[Contact, ...]], set[str]]:
    """The contacts of every pair, with the sites changed to match them; the junctions to look at
    again (those of changed sites, and all on a line that changed or whose junctions moved)."""
    contacts_by_pair, fresh_contacts, dropped = new_contacts(
        update, previous, changed, *candidates, update.snap_m + CANDIDATE_CHORD_TOLERANCE_M)
    # Sites that lose a contact, or that a new contact comes within the snap tolerance of, merge again.
    affected: set[str] = set()
    for line_a, line_b in dropped:
        affected.update(junction_id for junction_id in update.ids_by_line.get(line_a, ())
                        if line_b in update.by_id[junction_id].line_ids)
    for contact in fresh_contacts:
        affected.update(update.near(contact))
    removed = [update.remove(junction_id) for junction_id in sorted(affected)]
    pool = [contact for site in removed for contact in site.contacts
            if (contact.line_a, contact.line_b) not in dropped] + fresh_contacts
    groups = merge_groups(sorted(pool, key=contact_order), update.snap_m)
    dirty = set(update.name([site_of(group, update.indexed, update.snap_m) for group in groups], removed))
    return contacts_by_pair, dirty | update.restation(changed)


def _look_again(update: SitesUpdate, previous: JunctionNetwork | None, dirty: set[str],
                changed: ChangedPieces
                ) -> tuple[dict[str, tuple[Contact, ...]], dict[str, tuple[_Neighbours, ...]], set[str]]:
    """Puts the junctions of ``dirty`` into ``update``: the previous objects where nothing they
    depend on changed or their value is the same, else new ones (the third value names them)."""
    contacts_by_junction = dict(previous.contacts_by_junction) if previous is not None else {}
    neighbours_by_junction = dict(previous.neighbours_by_junction) if previous is not None else {}
    for junction_id in update.gone - update.by_id.keys():
        contacts_by_junction.pop(junction_id, None)
        neighbours_by_junction.pop(junction_id, None)
    previous_junctions = previous.sites.junctions if previous is not None and previous.sites else {}
    recomputed: set[str] = set()
    for junction_id in sorted(dirty):
        site = update.by_id[junction_id]
        neighbourhood = _neighbourhood(site, update.indexed, update.places)
        junction = _reusable(previous, junction_id, site, neighbourhood, changed)
        if junction is None:
            before = previous_junctions.get(junction_id)
            junction = _junction(junction_id, site, neighbourhood, update.indexed, before)
            if junction is not before:
                recomputed.add(junction_id)
        update.junctions[junction_id] = junction
        contacts_by_junction[junction_id] = site.contacts
        neighbours_by_junction[junction_id] = neighbourhood
    return contacts_by_junction, neighbours_by_junction, recomputed


def _assemble(lines: Sequence[NetworkLine], snap_m: float, previous: JunctionNetwork | None,
              changed_ids: set[str]) -> JunctionNetwork:
    if not math.isfinite(snap_m) or snap_m <= 0.0:
        raise NetworkError(f"the snap tolerance must be a positive number of metres, got {snap_m!r}")
    state = previous.sites if previous is not None else None
    previous = previous if state is not None else None
    indexed = index_lines(lines, state.indexed if state is not None else {})
    changed = changed_pieces(state.indexed if state is not None else {}, indexed,
                             changed_ids if state is not None else set(indexed), snap_m)
    segments = {line_id: item.line.segments for line_id, item in indexed.items()}
    candidates = candidates_of(changed, segments, state.candidates if state is not None else None,
                               snap_m + CANDIDATE_CHORD_TOLERANCE_M)
    update = SitesUpdate(state, indexed, snap_m)
    contacts_by_pair, dirty = _merge_again(update, previous, changed, candidates)
    contacts_by_junction, neighbours_by_junction, recomputed = _look_again(update, previous, dirty, changed)
    sites = NetworkSites(indexed, candidates[1], update.by_id, update.ids_by_line, update.cells,
                         update.places, tuple(update.order), update.pairs_by_line, update.junctions)
    return JunctionNetwork(tuple(item.line for item in indexed.values()), snap_m,
                           tuple(map(update.junctions.__getitem__, map(itemgetter(1), update.order))),
                           frozenset(recomputed), contacts_by_pair, contacts_by_junction,
                           neighbours_by_junction, candidates[1].chords, sites)


def build_network(lines: Sequence[NetworkLine],
                  snap_tolerance_m: float = DEFAULT_SNAP_TOLERANCE_M) -> JunctionNetwork:
    """Find every junction of ``lines`` (see the module docstring for the rules)."""
    return _assemble(lines, snap_tolerance_m, None, set())


def update_network(previous: JunctionNetwork, lines: Sequence[NetworkLine],
                   changed_ids: Iterable[str] = ()) -> JunctionNetwork:
    """The network after some lines were moved, added or removed.

    Only contacts on the changed segments of changed lines are recomputed; a junction is looked at
    again only if its contacts, its neighbours along one of its lines or the segments up to them
    changed, and the previous object is kept whenever the junction has the same value
    (``recomputed_ids`` names the others). The result equals :func:`build_network` on the same
    lines. ``changed_ids`` may name lines the
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
