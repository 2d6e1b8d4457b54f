"""The wingtip-to-taxiway family: one item per junction's movements, against every other taxiway.

An item's findings depend on its movements and junction (its signature) and on the other lines
only where they come within the query reach of its tracks: inside the bounds of its query boxes
(:class:`.wingtips.TaxiwayOutcome`), and through the stretches of those lines left out near their
junctions with the movements' lines (discs of radius (body reach + required distance) /
sin(crossing angle) round each such junction). A run therefore redoes an item when

* its signature is not the remembered one;
* a changed piece of another line (:func:`.changes.changed_line`; the whole line when more than
  its pieces changed) meets the item's bounds, unless every movement of the item leaves that
  line out (its own lines and its junction's);
* a junction that changed shape (or came, or went) has its largest such disc meet the bounds,
  and one of its lines is within the query reach of the item's wingtips (only such lines are
  clipped; whether another line comes within reach is the change of that line).

The bounds of every remembered item are kept in a :class:`BoxIndex`, so finding the items a
change reaches is one array comparison.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Hashable, Iterable, Iterator
from functools import partial

import numpy as np

from geometry.aircraft import DesignAircraft
from geometry.checks.changes import Bounds, LineChange
from geometry.checks.family_items import NOTHING, Frame, Group, Item, Outcome, Plan, SameRules
from geometry.checks.wingtip_tracks import TrackBounds
from geometry.checks.wingtips import (
    SHALLOWEST_CROSSING_RAD,
    TaxiwayScene,
    body_reach_m,
    crossing_angle_rad,
    query_reach_m,
    taxiway_scene,
    taxiway_wingtip_findings,
)
from geometry.findings import Finding
from geometry.network import Junction


class BoxIndex:
    """Bounds per key, with what each key leaves out, searchable in one array comparison."""

    def __init__(self) -> None:
        self._rows: dict[Hashable, int] = {}
        self._keys: list[Hashable] = []
        self._left_out: list[frozenset[str]] = []
        self._reached: list[frozenset[str]] = []
        self._boxes = np.full((0, 4), np.nan)

    def put(self, key: Hashable, bounds: Bounds | None, left_out: frozenset[str],
            reached: frozenset[str]) -> None:
        row = self._rows.get(key)
        if row is None:
            row = self._rows[key] = len(self._keys)
            self._keys.append(key)
            self._left_out.append(left_out)
            self._reached.append(reached)
            if row >= len(self._boxes):
                self._boxes = np.vstack((self._boxes, np.full((max(16, row), 4), np.nan)))
        self._left_out[row], self._reached[row] = left_out, reached
        self._boxes[row] = bounds if bounds is not None else (np.nan,) * 4

    def meeting(self, queries: list[tuple[Bounds, str | None, tuple[str, ...] | None]]) -> set[Hashable]:
        """The keys whose bounds meet those of a query (bounds, line, lines), less those leaving
        the query's line out, and (with its lines) only those whose wingtips reach one of them."""
        if not queries or not self._keys:
            return set()
        boxes = self._boxes[:len(self._keys)]
        query = np.asarray([bounds for bounds, _, _ in queries], dtype=float)
        meets = ((boxes[None, :, 0] <= query[:, None, 2]) & (boxes[None, :, 2] >= query[:, None, 0])
                 & (boxes[None, :, 1] <= query[:, None, 3]) & (boxes[None, :, 3] >= query[:, None, 1]))
        found: set[Hashable] = set()
        for number, row in zip(*(indices.tolist() for indices in np.nonzero(meets)), strict=True):
            _, line_id, reaching = queries[number]
            if ((line_id is None or line_id not in self._left_out[row])
                    and (reaching is None or not self._reached[row].isdisjoint(reaching))):
                found.add(self._keys[row])
        return found


class WingtipTaxiways:
    """E-WINGTIP-TAXIWAY per junction's movements."""

    def __init__(self) -> None:
        self._boxes = BoxIndex()
        self._reach: tuple[object, float] | None = None
        self._track_bounds = TrackBounds()
        self._same_rules = SameRules()

    def __call__(self, frame: Frame, memory: dict[Hashable, Outcome]) -> Plan:
        context = frame.context
        others = tuple(info for info in context.inputs.lines if info.line.kind != "runway")
        if not context.inputs.movements or not others:
            return NOTHING
        aircraft = frame.group_index.track_aircraft()
        self._track_bounds.forget_beyond(4 * len(context.inputs.movements) + 64)
        reach_m = self._reach_m(frame, aircraft)
        dirty = self._dirty(frame, reach_m, max((body_reach_m(member) for member in aircraft), default=0.0))
        evaluate = self._evaluator(frame, aircraft, reach_m)

        def item(junction_id: str, group: Group) -> Item:
            return Item(junction_id, frame.signatures[junction_id][1], partial(evaluate, junction_id, group),
                        force=True)

        def every(memory: dict[Hashable, Outcome]) -> Iterator[Item | Outcome]:
            for junction_id, group in frame.groups:
                known = memory.get(junction_id)
                if (known is not None and known.signature is frame.signatures[junction_id][1]
                        and junction_id not in dirty):
                    yield known
                else:
                    yield item(junction_id, group)

        def changed(_: dict[Hashable, Outcome]) -> tuple[Iterable[Item | Outcome], Iterable[Hashable]]:
            groups = frame.group_index.by_id
            gone = [junction_id for junction_id in dirty if junction_id not in groups]
            for junction_id in gone:
                self._boxes.put(junction_id, None, frozenset(), frozenset())
            present = [junction_id for junction_id in dirty if junction_id in groups]
            return [item(junction_id, groups[junction_id]) for junction_id in present], gone
        return Plan((reach_m, tuple(info.line.id for info in others)), every, changed)

    def _evaluator(self, frame: Frame, aircraft: frozenset[DesignAircraft], reach_m: float
                   ) -> Callable[[str, Group], tuple[tuple[Finding, ...], object]]:
        """How one item is evaluated (the scene of other lines is built for the first)."""
        context = frame.context
        scene: list[TaxiwayScene | None] = []
        excluded = context.inputs.excluded_movement_keys

        def evaluate(junction_id: str, group: Group) -> tuple[tuple[Finding, ...], object]:
            if not scene:
                scene.append(taxiway_scene(context, frame.by_line, aircraft, self._track_bounds, reach_m))
            junction = context.junctions.get(junction_id)
            offered = tuple(movement for movement in group if movement.key not in excluded)
            # The lines every movement of the group leaves out (its own and its junction's).
            around = frozenset(junction.line_ids if junction is not None else ())
            left_out = frozenset.intersection(*(around | set(movement.line_ids) for movement in group))
            assert scene[0] is not None  # there are other lines
            outcome = taxiway_wingtip_findings(scene[0], offered)
            self._boxes.put(junction_id, outcome.bounds, left_out, outcome.reached_line_ids)
            return outcome.findings, None
        return evaluate

    def _reach_m(self, frame: Frame, aircraft: frozenset[DesignAircraft]) -> float:
        """:func:`query_reach_m`, worked out again for other rules, design or track aircraft."""
        inputs = frame.context.inputs
        same = self._same_rules(inputs)
        if self._reach is None or not same or self._reach[0] != aircraft:
            line_infos = [info for info in inputs.lines if info.line.kind != "runway"]
            self._reach = (aircraft, query_reach_m(frame.context, line_infos, aircraft))
        return self._reach[1]

    def _dirty(self, frame: Frame, reach_m: float, body_reach: float) -> set[Hashable]:
        queries: list[tuple[Bounds, str | None, tuple[str, ...] | None]] = []
        for line_id, change in frame.line_changes.items():
            if change.previous.line.kind == "runway" and change.current.line.kind == "runway":
                continue
            queries.extend((region, line_id, None) for region in _regions(frame, change))
        for old, new in frame.junction_changes:
            if old is not None and new is not None and frame.shape_of(old) == frame.shape_of(new):
                continue
            queries.extend((_disc_box(junction, reach_m + body_reach), None, junction.line_ids)
                           for junction in (old, new) if junction is not None)
        return set(frame.signature_changes) | self._boxes.meeting(queries)


def _regions(frame: Frame, change: LineChange) -> tuple[Bounds, ...]:
    if change.regions is not None:
        return change.regions
    boxes = []
    for info in (change.previous, change.current):
        pieces = frame.pieces_of(info.line)
        if pieces.count:
            points = np.vstack((pieces.start, pieces.end))
            (low_x, low_y), (high_x, high_y) = points.min(axis=0), points.max(axis=0)
            boxes.append((float(low_x), float(low_y), float(high_x), float(high_y)))
    return tuple(boxes)


def _disc_box(junction: Junction, reach_m: float) -> Bounds:
    """The box round the largest disc the check leaves out of a line near ``junction``."""
    line_ids = junction.line_ids
    angles = [crossing_angle_rad(junction, a, b) for i, a in enumerate(line_ids) for b in line_ids[i + 1:]]
    radius_m = reach_m / math.sin(max(min(angles, default=math.pi / 2.0), SHALLOWEST_CROSSING_RAD))
    x, y = junction.point
    return (x - radius_m, y - radius_m, x + radius_m, y + radius_m)
