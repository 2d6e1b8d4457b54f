"""The families of design checks, each split into items that :mod:`.incremental` remembers.

A family is a function of one run's inputs (a :class:`Frame`) and its remembered outcomes. It
returns a key (a change of key forgets every remembered outcome of the family) and the family's
items: an :class:`Item` names its key, the input objects its findings depend on (its signature)
and how to evaluate it; a remembered :class:`Outcome` stands for an item the family found
unchanged. What each family's items read:

* the movements of one junction (edge margin, steering, turn fit, wingtip to object): those
  movements and the junction (its legs bound where the wingtip tracks count);
* one junction (paths per approach): the junction; one line (width, object separation): the line;
* a pair of lines within reach of each other (line separation, overlap): the two lines and the
  junctions they share;
* the movements of one junction against other taxiways (wingtip to taxiway): the movements, the
  junction, and each line checked against with the junctions on it; a line that changes within
  reach of the movements' tracks redoes them;
* the rest (crossovers, runway connections, wide throats, which read the whole pavement): run
  every time; they visit the few runway junctions and crossovers only.

:class:`CheckFamilies` keeps what the families remember besides outcomes (steering radii, near
pairs of lines, separation findings per pair of pieces).
"""

from __future__ import annotations

from collections.abc import Callable, Hashable, Iterable, Iterator
from dataclasses import dataclass
from functools import partial

import numpy as np
import shapely

from geometry.aircraft import DesignAircraft
from geometry.checks.common import CheckContext, usable_objects
from geometry.checks.crossovers import ReversalSteering, check_crossover_spacing, check_reversal_steering
from geometry.checks.inputs import LineInfo, MovementInfo, ObjectInfo
from geometry.checks.junction_rules import paths_findings
from geometry.checks.near_pairs import NearPairs
from geometry.checks.overlaps import OVERLAP_DISTANCE_M, overlap_findings
from geometry.checks.pair_memory import PairPieceMemory
from geometry.checks.parallel_pieces import Pieces, joined_pieces, pieces_near, segments_at_junctions
from geometry.checks.runways import check_runway_connections, check_wide_throats
from geometry.checks.separations import (
    object_separation_findings,
    pair_separation_findings,
    separation_reach_m,
)
from geometry.checks.steering import SteeringRadii, steering_findings, turn_fit_findings
from geometry.checks.widths import edge_margin_findings, width_findings
from geometry.checks.wingtips import (
    TaxiwayOutcome,
    object_wingtip_findings,
    taxiway_scene,
    taxiway_wingtip_findings,
)
from geometry.findings import Finding
from geometry.network import Junction, NetworkLine

Signature = tuple[object, ...]
Group = tuple[MovementInfo, ...]
Evaluate = Callable[[], tuple[Iterable[Finding], object]]


@dataclass(frozen=True, slots=True, eq=False)
class Outcome:
    key: Hashable
    signature: Signature
    findings: tuple[Finding, ...]
    skipped: tuple[tuple[tuple[str, str], Finding], ...]
    error: str | None        # why the item (so its family) could not run
    extra: object            # what the family keeps besides the findings


@dataclass(frozen=True, slots=True, eq=False)
class Item:
    key: Hashable
    signature: Signature     # the input objects the findings depend on (compared with ==)
    evaluate: Evaluate
    force: bool = False      # recompute whatever the signature


@dataclass(frozen=True, slots=True, eq=False)
class Frame:
    """One run's inputs, indexed the ways the families need."""

    context: CheckContext
    groups: tuple[tuple[str, Group], ...]           # the movements of each junction, in input order
    by_line: dict[str, tuple[Junction, ...]]        # the junctions on each line
    shared: dict[tuple[str, str], tuple[Junction, ...]]  # the junctions two lines share
    changed_line_ids: frozenset[str]                # lines that are not the previous run's objects
    # Per junction with movements: (its movements) and (its movements, its shape), the very same
    # tuples as in the previous run when neither changed, so an unchanged item is told by identity.
    signatures: dict[str, tuple[Signature, Signature]]
    # Lines that changed, or whose junctions did, since the previous run (or that are gone).
    moved_line_ids: frozenset[str]
    # The runner's look-ups, remembered by the identity of what they read: a junction's shape (the
    # same tuple while the junction is the same object), a line's pieces, every tracked aircraft.
    shape_of: Callable[[Junction | None], Signature]
    pieces_of: Callable[[NetworkLine], Pieces]
    track_aircraft: Callable[[], frozenset[DesignAircraft]]


Items = Callable[[dict[Hashable, Outcome]], Iterable[Item | Outcome]]
Family = Callable[[Frame, dict[Hashable, Outcome]], tuple[Signature, Items]]


def plain(function: Callable[..., list[Finding]], *arguments: object) -> tuple[list[Finding], None]:
    return function(*arguments), None


def no_items(_: dict[Hashable, Outcome]) -> Iterable[Item | Outcome]:
    return ()


def per_line(context: CheckContext, findings: Callable[[LineInfo], list[Finding]]) -> Items:
    """One item per line, redone when the line is not the remembered one."""
    def items(memory: dict[Hashable, Outcome]) -> Iterator[Item | Outcome]:
        for info in context.inputs.lines:
            known = memory.get(info.line.id)
            if known is not None and known.signature[0] is info:
                yield known
            else:
                yield Item(info.line.id, (info,), partial(plain, findings, info))
    return items


def by_group(frame: Frame, findings: Callable[[Group], list[Finding]], with_junction: bool = False) -> Items:
    """One item per junction's movements (less the excluded ones), redone when the movements, or
    with ``with_junction`` the junction's shape, are not the remembered ones."""
    excluded = frame.context.inputs.excluded_movement_keys
    which = 1 if with_junction else 0

    def evaluate(group: Group) -> tuple[list[Finding], None]:
        return findings(tuple(movement for movement in group if movement.key not in excluded)), None

    def items(memory: dict[Hashable, Outcome]) -> Iterator[Item | Outcome]:
        for junction_id, group in frame.groups:
            signature = frame.signatures[junction_id][which]
            known = memory.get(junction_id)
            if known is not None and known.signature is signature:
                yield known
            else:
                yield Item(junction_id, signature, partial(evaluate, group))
    return items


def whole(run: Callable[[], list[Finding]]) -> tuple[Signature, Items]:
    """One item over the whole layout, run every time."""
    return (), lambda _: (Item("all", (), partial(plain, run), force=True),)


class CheckFamilies:
    """Every family of checks, in the fixed order of their findings and skipped rules."""

    def __init__(self) -> None:
        self._pair_pieces = PairPieceMemory()
        self._separation_pairs = NearPairs()
        self._overlap_pairs = NearPairs()
        self._radii = SteeringRadii()
        self._reversals = ReversalSteering()

    def named(self) -> tuple[tuple[str, Family], ...]:
        return (("straight width", widths), ("edge margin", edge_margins),
                ("steering", self.steering), ("turn fit", turn_fit),
                ("line separation", self.line_separations), ("object separation", object_separations),
                ("wingtip to object", wingtip_objects), ("wingtip to taxiway", wingtip_taxiways),
                ("paths per approach", paths), ("crossover spacing", self.crossover_spacing),
                ("reversal steering", self.reversal_steering), ("wide throat", wide_throats),
                ("runway connection", runway_connections), ("overlapping centerlines", self.overlaps))

    def forget_pair_pieces_beyond(self, count: int) -> None:
        self._pair_pieces.forget_beyond(count)

    def steering(self, frame: Frame, _: object) -> tuple[Signature, Items]:
        return (), by_group(frame, partial(steering_findings, frame.context, self._radii))

    def line_separations(self, frame: Frame, _: object) -> tuple[Signature, Items]:
        context = frame.context
        infos = context.inputs.lines
        if len(infos) < 2:
            return (), no_items
        reach_m = separation_reach_m(context)
        geometries = [context.geometry(info.line.id) for info in infos]
        pairs = self._separation_pairs.pairs([info.line.id for info in infos], geometries, reach_m)
        pair_pieces = self._pair_pieces

        def evaluate(a: LineInfo, b: LineInfo, junctions: tuple[Junction, ...]) -> tuple[list[Finding], None]:
            box_a, box_b = (tuple(shapely.bounds(context.geometry(info.line.id)).tolist()) for info in (a, b))
            pieces = joined_pieces(pieces_near(frame.pieces_of(a.line), box_b, reach_m),
                                   pieces_near(frame.pieces_of(b.line), box_a, reach_m))
            excluded = segments_at_junctions((a.line, b.line), junctions)
            compute = partial(pair_separation_findings, context, pieces, reach_m, excluded)
            return pair_pieces.findings(context, a, b, pieces, excluded, compute), None

        def items(memory: dict[Hashable, Outcome]) -> Iterator[Item | Outcome]:
            for i, j in pairs:
                a, b = infos[i], infos[j]
                ids = (a.line.id, b.line.id) if a.line.id < b.line.id else (b.line.id, a.line.id)
                junctions = frame.shared.get(ids, ())
                key, signature = (a.line.id, b.line.id), (a, b, junctions)
                known = memory.get(key)
                if known is not None and known.signature == signature:
                    yield known
                else:
                    yield Item(key, signature, partial(evaluate, a, b, junctions))
        return (reach_m,), items

    def crossover_spacing(self, frame: Frame, _: object) -> tuple[Signature, Items]:
        return whole(partial(check_crossover_spacing, frame.context, self._radii))

    def reversal_steering(self, frame: Frame, _: object) -> tuple[Signature, Items]:
        return whole(partial(check_reversal_steering, frame.context, self._radii, self._reversals))

    def overlaps(self, frame: Frame, _: object) -> tuple[Signature, Items]:
        context = frame.context
        infos = list(context.lines.values())
        if len(infos) < 2:
            return (), no_items
        geometries = [context.geometry(info.line.id) for info in infos]

        def items(memory: dict[Hashable, Outcome]) -> Iterator[Item | Outcome]:
            for i, j in self._overlap_pairs.pairs([info.line.id for info in infos], geometries,
                                                  OVERLAP_DISTANCE_M):
                a, b = infos[i], infos[j]
                key = (a.line.id, b.line.id)
                known = memory.get(key)
                if known is not None and known.signature[0] is a and known.signature[1] is b:
                    yield known
                else:
                    evaluate = partial(plain, overlap_findings, a, b, geometries[i], geometries[j])
                    yield Item(key, (a, b), evaluate)
        return (), items


def widths(frame: Frame, _: object) -> tuple[Signature, Items]:
    context = frame.context
    return (), per_line(context, partial(width_findings, context))


def edge_margins(frame: Frame, _: object) -> tuple[Signature, Items]:
    return (), by_group(frame, partial(edge_margin_findings, frame.context))


def turn_fit(frame: Frame, _: object) -> tuple[Signature, Items]:
    return (), by_group(frame, partial(turn_fit_findings, frame.context))


def _over_objects(frame: Frame, items_of: Callable[[list[ObjectInfo], shapely.STRtree], Items]
                  ) -> tuple[Signature, Items]:
    """A family over the usable objects (``items_of`` gets them and a tree over their geometries);
    no items without any."""
    objects = usable_objects(frame.context.inputs.objects)
    if not objects:
        return (), no_items
    tree = shapely.STRtree([item.geometry for item in objects])
    return (frame.context.inputs.objects,), items_of(objects, tree)


def object_separations(frame: Frame, _: object) -> tuple[Signature, Items]:
    context = frame.context
    return _over_objects(frame, lambda objects, tree: per_line(
        context, partial(object_separation_findings, context, objects=objects, tree=tree)))


def wingtip_objects(frame: Frame, _: object) -> tuple[Signature, Items]:
    context = frame.context
    return _over_objects(frame, lambda objects, tree: by_group(
        frame, partial(object_wingtip_findings, context, objects=objects, tree=tree), with_junction=True))


def wingtip_taxiways(frame: Frame, memory: dict[Hashable, Outcome]) -> tuple[Signature, Items]:
    context = frame.context
    scene = (taxiway_scene(context, frame.by_line, frame.track_aircraft())
             if context.inputs.movements else None)
    if scene is None:
        return (), no_items
    entered = _entered(frame, memory, scene.reach_m)
    excluded = context.inputs.excluded_movement_keys

    def evaluate(junction_id: str, group: Group) -> tuple[tuple[Finding, ...], object]:
        junction = context.junctions.get(junction_id)
        offered = tuple(movement for movement in group if movement.key not in excluded)
        # The lines every movement of the group leaves out (its own and its junction's).
        around = frozenset(junction.line_ids if junction is not None else ())
        left_out = frozenset.intersection(*(around | set(movement.line_ids) for movement in group))
        outcome = taxiway_wingtip_findings(scene, offered)
        return outcome.findings, (outcome, frozenset(outcome.checked_line_ids), left_out)

    def items(memory: dict[Hashable, Outcome]) -> Iterator[Item | Outcome]:
        moved = frame.moved_line_ids
        for junction_id, group in frame.groups:
            signature = frame.signatures[junction_id][1]
            known = memory.get(junction_id)
            if (known is not None and known.signature is signature and junction_id not in entered
                    and isinstance(known.extra, tuple) and moved.isdisjoint(known.extra[1])):
                yield known
            else:
                yield Item(junction_id, signature, partial(evaluate, junction_id, group), force=True)
    others = tuple(info.line.id for info in scene.others)
    return (scene.reach_m, others), items


def _entered(frame: Frame, memory: dict[Hashable, Outcome], reach_m: float) -> set[Hashable]:
    """Items whose query boxes a changed line now reaches (and does not meet at their junction)."""
    if not frame.changed_line_ids or not memory:
        return set()
    keys, bounds, left_outs = [], [], []
    for key, outcome in memory.items():
        extra = outcome.extra
        if (isinstance(extra, tuple) and isinstance(extra[0], TaxiwayOutcome)
                and extra[0].bounds is not None):
            keys.append(key)
            bounds.append(extra[0].bounds)
            left_outs.append(extra[2])
    if not keys:
        return set()
    boxes = np.asarray(bounds, dtype=float)
    entered: set[Hashable] = set()
    for line_id in frame.changed_line_ids:
        info = frame.context.lines[line_id]
        if info.line.kind == "runway":
            continue
        low_x, low_y, high_x, high_y = shapely.bounds(frame.context.geometry(line_id))
        hits = np.flatnonzero((boxes[:, 0] <= high_x) & (boxes[:, 2] >= low_x)
                              & (boxes[:, 1] <= high_y) & (boxes[:, 3] >= low_y))
        entered.update(keys[index] for index in hits.tolist() if line_id not in left_outs[index])
    return entered


def paths(frame: Frame, _: object) -> tuple[Signature, Items]:
    context = frame.context

    def items(memory: dict[Hashable, Outcome]) -> Iterator[Item | Outcome]:
        for junction in context.inputs.junctions:
            shape = frame.shape_of(junction)
            known = memory.get(junction.id)
            if known is not None and known.signature[0] is shape:
                yield known
            else:
                yield Item(junction.id, (shape,), partial(plain, paths_findings, context, junction))
    return (), items


def wide_throats(frame: Frame, _: object) -> tuple[Signature, Items]:
    return whole(partial(check_wide_throats, frame.context))


def runway_connections(frame: Frame, _: object) -> tuple[Signature, Items]:
    return whole(partial(check_runway_connections, frame.context))
