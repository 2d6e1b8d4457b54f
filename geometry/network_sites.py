"""Contacts between the lines of a junction network, merged into sites, and the sites an update
of the network reuses.

Internal to :mod:`geometry.network` (its module docstring states the rules: what a contact is,
how contacts merge into one junction, how junctions are named). A contact is where two lines
cross, or where a line end lies within the snap tolerance of another line; contacts within the
snap tolerance of each other, transitively, make one :class:`Site`, where one junction will be.
:class:`NetworkSites` holds what :func:`geometry.network.update_network` reuses from one network
to the next (the sites, the candidate index, the junctions' places along each line), and
:class:`SitesUpdate` makes the next of them by changing copies. An update recomputes the contacts
of a pair of lines only where one of them changed (:func:`new_contacts`), and merges again only
the sites those contacts belong to or come near.
"""

from __future__ import annotations

import math
from bisect import bisect_left, bisect_right, insort
from collections import defaultdict
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

import shapely

from geometry import centerline
from geometry.network_candidates import (
    CandidateIndex,
    Candidates,
    ChangedPieces,
    IndexedLine,
    LineSegments,
    Position,
    pair_candidates,
)
from geometry.primitives import Point

if TYPE_CHECKING:  # geometry.network imports this module
    from geometry.network import Junction, JunctionNetwork

Pair = tuple[str, str]
Place = tuple[Position, str]        # a junction's pass along a line, and the junction's id


@dataclass(frozen=True, slots=True)
class Contact:
    """Where two lines meet (``line_a`` < ``line_b``), before nearby contacts are merged."""

    line_a: str
    line_b: str
    point: Point
    at_a: Position
    at_b: Position
    a_ends_here: bool
    b_ends_here: bool
    crossing: bool


def _contacts_between(a: IndexedLine, b: IndexedLine, candidates: Candidates,
                      snap_m: float) -> tuple[Contact, ...]:
    """Exact crossings of two lines, and each end of one lying within the snap tolerance of the other."""
    contacts = []
    for piece_a, piece_b in sorted(candidates.segment_pairs):
        for local_a, local_b, point in centerline.segment_intersections(a.line.segments[piece_a],
                                                                        b.line.segments[piece_b]):
            at_a, at_b = (piece_a, local_a), (piece_b, local_b)
            contacts.append(Contact(a.line.id, b.line.id, point, at_a, at_b, a.is_end(at_a), b.is_end(at_b),
                                    crossing=True))
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
        places, ends = (ending.end(at_start), (piece, local)), (True, other.is_end((piece, local)))
        if not end_on_a:
            places, ends = places[::-1], ends[::-1]
        contacts.append(Contact(a.line.id, b.line.id, point, *places, *ends, crossing=False))
    return tuple(sorted(contacts, key=contact_order))


def contact_order(contact: Contact) -> tuple[str, str, Position, Position, float, float]:
    return (contact.line_a, contact.line_b, contact.at_a, contact.at_b, contact.point[0], contact.point[1])


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
    passes: tuple[tuple[str, Position], ...]  # (line id, where along it), one per pass of a line
    line_ids: tuple[str, ...]


def _pass_places(hits: list[tuple[Position, bool]], line: IndexedLine, snap_m: float) -> list[Position]:
    """One place per pass of a line through a site (hits within twice the snap tolerance of each
    other, along the line, are one pass, at their mean); a pass that touches the line's end is
    snapped to it, so a line ending at a junction has no stub leg."""
    runs: list[list[tuple[Position, bool]]] = []
    for hit in sorted(hits):
        if runs and line.distance_m(runs[-1][-1][0], hit[0]) <= 2.0 * snap_m:
            runs[-1].append(hit)
        else:
            runs.append([hit])
    places = []
    for run in runs:
        ends = [line.station_m(at) for at, at_end in run if at_end]
        if ends:
            places.append(line.end(sum(ends) / len(ends) < line.along.length_m / 2.0))
        else:
            first = run[0][0]
            mean_m = sum(line.distance_m(first, at) for at, _ in run) / len(run)
            places.append(line.normalised((first[0], first[1] + mean_m)))
    return places


def site_of(group: tuple[Contact, ...], indexed: Mapping[str, IndexedLine], snap_m: float) -> Site:
    """The site of one merged group of contacts: its point and one place per pass of each line."""
    hits: dict[str, list[tuple[Position, bool]]] = defaultdict(list)
    for contact in group:
        hits[contact.line_a].append((contact.at_a, contact.a_ends_here))
        hits[contact.line_b].append((contact.at_b, contact.b_ends_here))
    passes = tuple((line_id, at) for line_id in sorted(hits)
                   for at in _pass_places(hits[line_id], indexed[line_id], snap_m))
    # A true crossing is exact; the nearest points of ends only say where the junction roughly is.
    located = [contact.point for contact in group if contact.crossing] or [c.point for c in group]
    point = (math.fsum(x for x, _ in located) / len(located), math.fsum(y for _, y in located) / len(located))
    return Site(group, point, passes, tuple(sorted(hits)))


_Order = tuple[tuple[str, str, Position, Position, float, float], str]


@dataclass(frozen=True, slots=True, eq=False)
class NetworkSites:
    """What :func:`update_network` reuses: every value here is shared between successive networks
    and never changed once made (an update changes copies)."""

    indexed: Mapping[str, IndexedLine]
    candidates: CandidateIndex
    by_id: Mapping[str, Site]                        # the site of each junction
    ids_by_line: Mapping[str, frozenset[str]]         # the junctions on each line
    cells: Mapping[tuple[int, int], frozenset[str]]   # the junctions with a contact in each cell
    places_by_line: Mapping[str, tuple[Place, ...]]     # the junctions' passes along each line, in order
    order: tuple[_Order, ...]                         # the junctions in network order
    pairs_by_line: Mapping[str, frozenset[Pair]]      # the pairs with contacts, by line
    junctions: Mapping[str, Junction]


def _cell(point: Point, snap_m: float) -> tuple[int, int]:
    return math.floor(point[0] / snap_m), math.floor(point[1] / snap_m)


def _along_first_line(site: Site) -> tuple[Position, Point]:
    return min(at for line_id, at in site.passes if line_id == site.line_ids[0]), site.point


def _order_of(site: Site, junction_id: str) -> _Order:
    """Junctions follow their first contact (contacts sort by lines, then places along them)."""
    return contact_order(site.contacts[0]), junction_id


class SitesUpdate:
    """One update of the sites: copies of the previous maps, changed in place, then frozen."""

    def __init__(self, previous: NetworkSites | None, indexed: dict[str, IndexedLine],
                 snap_m: float) -> None:
        self.indexed, self.snap_m = indexed, snap_m
        self.by_id: dict[str, Site] = dict(previous.by_id) if previous else {}
        self.ids_by_line: dict[str, frozenset[str]] = dict(previous.ids_by_line) if previous else {}
        self.cells: dict[tuple[int, int], frozenset[str]] = dict(previous.cells) if previous else {}
        self.places: dict[str, tuple[Place, ...]] = dict(previous.places_by_line) if previous else {}
        self.order: list[_Order] = list(previous.order) if previous else []
        self.pairs_by_line: dict[str, frozenset[Pair]] = dict(previous.pairs_by_line) if previous else {}
        self.junctions: dict[str, Junction] = dict(previous.junctions) if previous else {}
        self.editing: dict[str, list[Place]] = {}  # the places of the lines being changed
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
        for line_id, at in site.passes:
            places = self._places_to_edit(line_id)
            del places[bisect_left(places, (at, junction_id))]
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
        for line_id, at in site.passes:
            insort(self._places_to_edit(line_id), (at, junction_id))
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

    def _places_to_edit(self, line_id: str) -> list[Place]:
        places = self.editing.get(line_id)
        if places is None:
            places = self.editing[line_id] = list(self.places.get(line_id, ()))
        return places

    def restation(self, changed: ChangedPieces) -> set[str]:
        """Finishes the places along the lines; the junctions whose legs may have changed: those
        next to a place added or removed, and those reaching a changed segment."""
        dirty: set[str] = set()
        for line_id, editing in self.editing.items():
            before, places = self.places.get(line_id, ()), tuple(editing)
            if places:
                self.places[line_id] = places
            else:
                self.places.pop(line_id, None)
                self.ids_by_line.pop(line_id, None)
            if places != before:
                for place in set(places) ^ set(before):
                    index = bisect_left(places, place)
                    dirty.update(_ids_around(places, index - 1, index + 2))
        for line_id, pieces in changed.items():
            places = self.places.get(line_id, ())
            if pieces is None:
                dirty.update(junction_id for _, junction_id in places)
            for piece in pieces or ():
                # A junction's legs reach from the place before it to the place after it.
                first = bisect_left(places, ((piece - 1, -math.inf), ""))
                last = bisect_right(places, ((piece + 1, math.inf), ""))
                dirty.update(_ids_around(places, first - 1, last + 1))
        return dirty


def _ids_around(places: tuple[Place, ...], start: int, stop: int) -> list[str]:
    """The junctions of ``places[start:stop]`` and of every place at the same position as one of
    them (junctions at one position share their neighbours)."""
    start, stop = max(0, start), min(len(places), stop)
    while 0 < start < len(places) and places[start - 1][0] == places[start][0]:
        start -= 1
    while 0 < stop < len(places) and places[stop][0] == places[stop - 1][0]:
        stop += 1
    return [junction_id for _, junction_id in places[start:stop]]


def _contacts_hold(pair: Pair, contacts: Sequence[Contact], changed: ChangedPieces) -> bool:
    """Whether neither line of ``pair`` changed where the two met."""
    pieces_a, pieces_b = (changed.get(line_id, frozenset()) for line_id in pair)
    if pieces_a is None or pieces_b is None:
        return False
    return not any(contact.at_a[0] in pieces_a or contact.at_b[0] in pieces_b for contact in contacts)


def _as_before(line: IndexedLine, previous: JunctionNetwork | None, changed: ChangedPieces) -> LineSegments:
    """A line with its previous segments and the indices of those that changed, if known."""
    old = previous.sites.indexed.get(line.line.id) if previous is not None and previous.sites else None
    pieces = changed.get(line.line.id, frozenset())
    prior = (old.line.segments, pieces) if old is not None and pieces is not None else None
    return line.line.id, line.line.segments, prior


def new_contacts(update: SitesUpdate, previous: JunctionNetwork | None, changed: ChangedPieces,
                 found: dict[Pair, Candidates], index: CandidateIndex, reach_m: float
                 ) -> tuple[dict[Pair, tuple[Contact, ...]], list[Contact], set[Pair]]:
    """The contacts of every pair, recomputing those of pairs whose lines changed where they meet
    or come within reach (``found``: the candidates of the changed segments); the fresh contacts,
    and the pairs whose previous contacts were dropped."""
    contacts_by_pair = dict(previous.contacts_by_pair) if previous is not None else {}
    pairs_by_line = update.pairs_by_line
    dropped = {pair for line_id in changed for pair in pairs_by_line.get(line_id, frozenset())
               if pair in found or not _contacts_hold(pair, contacts_by_pair[pair], changed)}
    for pair in dropped:
        del contacts_by_pair[pair]
        for line_id in pair:
            left = pairs_by_line[line_id] - {pair}
            if left:
                pairs_by_line[line_id] = left
            else:
                del pairs_by_line[line_id]
    fresh: list[Contact] = []
    for pair in sorted(dropped | found.keys()):
        a, b = (update.indexed.get(line_id) for line_id in pair)
        if a is None or b is None:
            continue
        # A line queried whole (new, or changed throughout) has all its candidates in ``found``.
        whole = changed.get(pair[0], frozenset()) is None or changed.get(pair[1], frozenset()) is None
        candidates = found.get(pair) if whole else pair_candidates(
            _as_before(a, previous, changed), _as_before(b, previous, changed), index, reach_m)
        contacts = _contacts_between(a, b, candidates, update.snap_m) if candidates is not None else ()
        if contacts:
            contacts_by_pair[pair] = contacts
            fresh.extend(contacts)
            for line_id in pair:
                pairs_by_line[line_id] = pairs_by_line.get(line_id, frozenset()) | {pair}
    return contacts_by_pair, fresh, dropped
