"""Contacts between the lines of a junction network, merged into sites, and the sites an update
of the network reuses.

Internal to :mod:`geometry.network` (its module docstring states the rules: what a contact is,
how contacts merge into one junction, how junctions are named). A contact is where two lines
cross, or where a line end lies within the snap tolerance of another line; contacts within the
snap tolerance of each other, transitively, make one :class:`Site`, where one junction will be.
:class:`NetworkSites` holds what :func:`geometry.network.update_network` reuses from one network
to the next (the sites, the candidate index, the junction stations along each line), and
:class:`SitesUpdate` makes the next of them by changing copies.
"""

from __future__ import annotations

import math
from bisect import bisect_left, insort
from collections import defaultdict
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

import shapely

from geometry import centerline
from geometry.network_candidates import CandidateIndex, Candidates
from geometry.primitives import Point

if TYPE_CHECKING:  # geometry.network imports this module
    from geometry.network import Junction, JunctionNetwork, NetworkLine

END_TOLERANCE_M = 1e-6              # a station this close to a line's end is that end

Pair = tuple[str, str]


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
class IndexedLine:
    line: NetworkLine
    along: centerline.SegmentStations

    def is_end(self, station_m: float) -> bool:
        return station_m <= END_TOLERANCE_M or station_m >= self.along.length_m - END_TOLERANCE_M

    def point_at_end(self, at_start: bool) -> Point:
        return self.line.segments[0].start if at_start else self.line.segments[-1].end


def _contacts_between(a: IndexedLine, b: IndexedLine, candidates: Candidates,
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
    return tuple(sorted(contacts, key=contact_order))


def contact_order(contact: Contact) -> tuple[str, str, float, float, float, float]:
    return (contact.line_a, contact.line_b, contact.station_a_m, contact.station_b_m,
            contact.point[0], contact.point[1])


def merge_groups(contacts: Sequence[Contact], snap_m: float) -> list[tuple[Contact, ...]]:
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
class Site:
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


def site_of(group: tuple[Contact, ...], indexed: dict[str, IndexedLine], snap_m: float) -> Site:
    """The site of one merged group of contacts: its point and one station per pass of each line."""
    hits: dict[str, list[tuple[float, bool]]] = defaultdict(list)
    for contact in group:
        hits[contact.line_a].append((contact.station_a_m, contact.a_ends_here))
        hits[contact.line_b].append((contact.station_b_m, contact.b_ends_here))
    passes = tuple((line_id, station) for line_id in sorted(hits)
                   for station in _pass_stations(hits[line_id], indexed[line_id].along.length_m, snap_m))
    # A true crossing is exact; the nearest points of ends only say where the junction roughly is.
    located = [contact.point for contact in group if contact.crossing] or [c.point for c in group]
    point = (math.fsum(x for x, _ in located) / len(located), math.fsum(y for _, y in located) / len(located))
    return Site(group, point, passes, tuple(sorted(hits)))


_Order = tuple[tuple[str, str, float, float, float, float], str]


@dataclass(frozen=True, slots=True, eq=False)
class NetworkSites:
    """What :func:`update_network` reuses: every value here is shared between successive networks
    and never changed once made (an update changes copies)."""

    indexed: Mapping[str, IndexedLine]
    candidates: CandidateIndex
    by_id: Mapping[str, Site]                        # the site of each junction
    ids_by_line: Mapping[str, frozenset[str]]         # the junctions on each line
    cells: Mapping[tuple[int, int], frozenset[str]]   # the junctions with a contact in each cell
    stations_by_line: Mapping[str, tuple[float, ...]]
    order: tuple[_Order, ...]                         # the junctions in network order
    pairs_by_line: Mapping[str, frozenset[Pair]]      # the pairs with contacts, by line
    junctions: Mapping[str, Junction]


def _cell(point: Point, snap_m: float) -> tuple[int, int]:
    return math.floor(point[0] / snap_m), math.floor(point[1] / snap_m)


def _along_first_line(site: Site) -> tuple[float, Point]:
    return min(station for line_id, station in site.passes if line_id == site.line_ids[0]), site.point


def _order_of(site: Site, junction_id: str) -> _Order:
    """Junctions follow their first contact (contacts sort by lines, then stations)."""
    return contact_order(site.contacts[0]), junction_id


class SitesUpdate:
    """One update of the sites: copies of the previous maps, changed in place, then frozen."""

    def __init__(self, previous: NetworkSites | None, indexed: dict[str, IndexedLine],
                 snap_m: float) -> None:
        self.indexed, self.snap_m = indexed, snap_m
        self.by_id: dict[str, Site] = dict(previous.by_id) if previous else {}
        self.ids_by_line: dict[str, frozenset[str]] = dict(previous.ids_by_line) if previous else {}
        self.cells: dict[tuple[int, int], frozenset[str]] = dict(previous.cells) if previous else {}
        self.stations: dict[str, tuple[float, ...]] = dict(previous.stations_by_line) if previous else {}
        self.order: list[_Order] = list(previous.order) if previous else []
        self.pairs_by_line: dict[str, frozenset[Pair]] = dict(previous.pairs_by_line) if previous else {}
        self.junctions: dict[str, Junction] = dict(previous.junctions) if previous else {}
        self.touched_lines: set[str] = set()
        self.gone: set[str] = set()  # ids of the sites removed (some come back)

    def near(self, contact: Contact) -> set[str]:
        x, y = _cell(contact.point, self.snap_m)
        found: set[str] = set()
        for cell in ((x + dx, y + dy) for dx in (-1, 0, 1) for dy in (-1, 0, 1)):
            found.update(self.cells.get(cell, ()))
        return found

    def remove(self, junction_id: str) -> Site:
        site = self.by_id.pop(junction_id)
        for line_id in site.line_ids:
            self.ids_by_line[line_id] = self.ids_by_line[line_id] - {junction_id}
            self.touched_lines.add(line_id)
        for cell in {_cell(contact.point, self.snap_m) for contact in site.contacts}:
            left = self.cells[cell] - {junction_id}
            if left:
                self.cells[cell] = left
            else:
                del self.cells[cell]
        position = bisect_left(self.order, _order_of(site, junction_id))
        del self.order[position]
        self.junctions.pop(junction_id, None)
        self.gone.add(junction_id)
        return site

    def add(self, junction_id: str, site: Site) -> None:
        self.by_id[junction_id] = site
        for line_id in site.line_ids:
            self.ids_by_line[line_id] = self.ids_by_line.get(line_id, frozenset()) | {junction_id}
            self.touched_lines.add(line_id)
        for contact in site.contacts:
            cell = _cell(contact.point, self.snap_m)
            self.cells[cell] = self.cells.get(cell, frozenset()) | {junction_id}
        insort(self.order, _order_of(site, junction_id))

    def name(self, fresh: Sequence[Site], removed: Sequence[Site]) -> list[str]:
        """Adds the fresh sites under their ids; renames kept sites whose ordinal moved. The ids of
        every site added (fresh or renamed)."""
        line_sets = {site.line_ids for site in (*fresh, *removed)}
        fresh_by_set: dict[tuple[str, ...], list[Site]] = defaultdict(list)
        for site in fresh:
            fresh_by_set[site.line_ids].append(site)
        moves: list[tuple[str | None, str, Site]] = []
        for line_ids in sorted(line_sets):
            on_first = self.ids_by_line.get(line_ids[0], ())
            members: list[tuple[str | None, Site]] = [
                (junction_id, self.by_id[junction_id]) for junction_id in on_first
                if self.by_id[junction_id].line_ids == line_ids]
            members += [(None, site) for site in fresh_by_set[line_ids]]
            members.sort(key=lambda member: _along_first_line(member[1]))
            for ordinal, (old_id, site) in enumerate(members):
                new_id = f"J:{'/'.join(line_ids)}#{ordinal}"
                if old_id != new_id:
                    moves.append((old_id, new_id, site))
        for old_id, _, _ in moves:
            if old_id is not None:
                self.remove(old_id)
        for _, new_id, site in moves:
            self.add(new_id, site)
        return [new_id for _, new_id, _ in moves]

    def restation(self, changed: set[str]) -> set[str]:
        """The junction stations of every line a site was added to or removed from; the lines
        whose stations (or whose own geometry) changed."""
        moved = {line_id for line_id in changed if line_id in self.indexed}
        for line_id in self.touched_lines:
            passes = (self.by_id[junction_id].passes for junction_id in self.ids_by_line.get(line_id, ()))
            stations = tuple(sorted(station for found in passes for on_line, station in found
                                    if on_line == line_id))
            if stations != self.stations.get(line_id):
                moved.add(line_id)
            if stations:
                self.stations[line_id] = stations
            else:
                self.stations.pop(line_id, None)
                self.ids_by_line.pop(line_id, None)
        return moved


def new_contacts(update: SitesUpdate, previous: JunctionNetwork | None, changed: set[str],
                 candidates: dict[Pair, Candidates]
                 ) -> tuple[dict[Pair, tuple[Contact, ...]], list[Contact]]:
    """The contacts of every pair, recomputing those of pairs with a changed line."""
    contacts_by_pair = dict(previous.contacts_by_pair) if previous is not None else {}
    pairs_by_line = update.pairs_by_line
    for line_id in changed:
        for pair in pairs_by_line.pop(line_id, frozenset()):
            contacts_by_pair.pop(pair, None)
            other = pair[1] if pair[0] == line_id else pair[0]
            if other in pairs_by_line:
                pairs_by_line[other] = pairs_by_line[other] - {pair}
    fresh: list[Contact] = []
    for pair, found in sorted(candidates.items()):
        contacts = _contacts_between(update.indexed[pair[0]], update.indexed[pair[1]], found, update.snap_m)
        if contacts:
            contacts_by_pair[pair] = contacts
            fresh.extend(contacts)
            for line_id in pair:
                pairs_by_line[line_id] = pairs_by_line.get(line_id, frozenset()) | {pair}
    return contacts_by_pair, fresh
