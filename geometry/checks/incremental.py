"""The design checks run again after an edit, redoing only what the edit can have changed.

:class:`IncrementalChecks` splits every family of checks into *items* whose findings depend on a
few inputs only (the movements of one junction, one line, one pair of lines), keeps each item's
findings with the very input objects they were computed from, and on the next run recomputes only
the items whose inputs are not those objects any more. The analysis hands back the same objects
for everything an edit did not touch (app/model/check_inputs.py), so a drag redoes a few items.

:func:`geometry.checks.run_checks` is this runner with an empty memory, so a warm runner and a
fresh one give the same findings by construction, as long as every item names what it reads:

* everything: the rule set, the fleet, the excluded movements and each line's id, name and kind
  (they appear in messages); a change to any of them redoes every item;
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

Each item is evaluated alone, with rule look-ups of its own. A rule that cannot be looked up gives
one ``W-CHECK-SKIPPED`` per rule and reason: the first in the fixed order of families and items.
"""

from __future__ import annotations

import itertools
from collections import defaultdict
from collections.abc import Callable, Hashable, Iterable, Iterator
from dataclasses import dataclass
from functools import partial

import numpy as np
import shapely
from shapely.errors import GEOSException
from shapely.geometry.base import BaseGeometry

from geometry.aircraft import DesignAircraft
from geometry.checks.common import CheckContext, usable_objects
from geometry.checks.crossovers import ReversalSteering, check_crossover_spacing, check_reversal_steering
from geometry.checks.inputs import CheckInputs, LineInfo, MovementInfo
from geometry.checks.junction_rules import paths_findings
from geometry.checks.near_pairs import NearPairs
from geometry.checks.overlaps import OVERLAP_DISTANCE_M, overlap_findings
from geometry.checks.pair_memory import PairPieceMemory
from geometry.checks.parallel_pieces import (
    Pieces,
    joined_pieces,
    line_pieces,
    pieces_near,
    segments_at_junctions,
)
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
from geometry.errors import GeometryError
from geometry.findings import Finding
from geometry.network import Junction, NetworkLine

Signature = tuple[object, ...]
Group = tuple[MovementInfo, ...]
Evaluate = Callable[[], tuple[Iterable[Finding], object]]
ByLine = dict[str, tuple[Junction, ...]]             # the junctions on each line
Shared = dict[tuple[str, str], tuple[Junction, ...]]  # the junctions two lines share


def finding_order(finding: Finding) -> tuple[int, str, float, float, tuple[str, ...], str]:
    """Sort key: severity (errors first), code, location x then y, element ids, message."""
    x, y = finding.location_m
    return (-int(finding.severity), finding.code, x, y, finding.element_ids, finding.message)


@dataclass(frozen=True, slots=True, eq=False)
class _Outcome:
    key: Hashable
    signature: Signature
    findings: tuple[Finding, ...]
    skipped: tuple[tuple[tuple[str, str], Finding], ...]
    error: str | None        # why the item (so its family) could not run
    extra: object            # what the family keeps besides the findings


@dataclass(frozen=True, slots=True, eq=False)
class _Item:
    key: Hashable
    signature: Signature     # the input objects the findings depend on (compared with ==)
    evaluate: Evaluate
    force: bool = False      # recompute whatever the signature


@dataclass(frozen=True, slots=True, eq=False)
class _Frame:
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


class _FamilyFailed(Exception):
    pass


def _plain(function: Callable[..., list[Finding]], *arguments: object) -> tuple[list[Finding], None]:
    return function(*arguments), None


def _groups(inputs: CheckInputs) -> tuple[tuple[str, Group], ...]:
    if inputs.movement_groups or not inputs.movements:
        return inputs.movement_groups
    return _grouped(inputs.movements)


def _grouped(movements: Iterable[MovementInfo]) -> tuple[tuple[str, Group], ...]:
    return tuple((junction_id, tuple(members))
                 for junction_id, members in itertools.groupby(movements, key=lambda m: m.junction_id))


def _shape(junction: Junction | None) -> Signature:
    """What the junction-local checks read of a junction: not its stations along its lines, which
    shift whenever a vertex before it moves."""
    if junction is None:
        return ()
    return (junction.id, junction.point, junction.kind,
            tuple((leg.id, leg.line_id, leg.line_kind, leg.heading_rad, leg.length_m, leg.straight_length_m,
                   leg.direction) for leg in junction.legs))


Items = Callable[[dict[Hashable, "_Outcome"]], Iterable["_Item | _Outcome"]]
Family = Callable[[_Frame, dict[Hashable, _Outcome]], tuple[Signature, Items]]


def _none(_: dict[Hashable, _Outcome]) -> Iterable[_Item | _Outcome]:
    return ()


class IncrementalChecks:
    """Every design check over successive inputs, reusing the findings of unchanged items."""

    def __init__(self) -> None:
        self._memory: dict[str, dict[Hashable, _Outcome]] = {}
        self._family_keys: dict[str, Signature] = {}
        self._global_key: Signature | None = None
        self._lines: dict[str, LineInfo] = {}
        self._by_line: dict[str, tuple[Junction, ...]] = {}
        self._signatures: dict[str, tuple[Group, Junction | None, tuple[Signature, Signature]]] = {}
        self._centerlines: dict[int, tuple[object, BaseGeometry]] = {}
        self._pieces: dict[int, tuple[object, Pieces]] = {}
        self._shapes: dict[int, tuple[Junction, Signature]] = {}
        self._line_ids: dict[int, tuple[Junction, tuple[str, ...]]] = {}
        self._aircraft: dict[str, tuple[Group, frozenset[DesignAircraft]]] = {}
        self._pair_pieces = PairPieceMemory()
        self._separation_pairs = NearPairs()
        self._overlap_pairs = NearPairs()
        self._radii = SteeringRadii()
        self._reversals = ReversalSteering()
        self.recomputed_items = 0  # in the last run (for tests and benchmarks)

    def run(self, inputs: CheckInputs) -> tuple[Finding, ...]:
        """The findings of every check over ``inputs``, sorted by :func:`finding_order`."""
        self.recomputed_items = 0
        context = CheckContext(inputs, centerlines=self._centerlines)
        global_key = (inputs.rule_set, inputs.fleet, inputs.excluded_movement_keys,
                      tuple((info.line.id, info.name, info.line.kind) for info in inputs.lines))
        if global_key != self._global_key:
            self._memory.clear()
            self._global_key = global_key
        by_line, shared = self._junction_maps(inputs.junctions)
        changed = frozenset(line_id for line_id, info in context.lines.items()
                            if self._lines.get(line_id) is not info)
        moved = changed | {line_id for line_id in by_line.keys() | self._by_line.keys()
                           if by_line.get(line_id) != self._by_line.get(line_id)}
        groups = _groups(inputs)
        frame = _Frame(context, groups, by_line, shared, changed, self._group_signatures(context, groups),
                       frozenset(moved | (self._lines.keys() - context.lines.keys())))
        findings: list[Finding] = []
        for name, family in self._families():
            findings.extend(self._run_family(frame, name, family))
        findings.extend(context.skipped_findings())
        self._lines = dict(context.lines)
        self._by_line = by_line
        self._forget_old_lines(inputs.lines)
        return tuple(sorted(findings, key=finding_order))

    def _families(self) -> tuple[tuple[str, Family], ...]:
        return (("straight width", self._widths), ("edge margin", self._edge_margins),
                ("steering", self._steering), ("turn fit", self._turn_fit),
                ("line separation", self._line_separations), ("object separation", self._object_separations),
                ("wingtip to object", self._wingtip_objects), ("wingtip to taxiway", self._wingtip_taxiways),
                ("paths per approach", self._paths), ("crossover spacing", self._crossover_spacing),
                ("reversal steering", self._reversal_steering), ("wide throat", self._wide_throats),
                ("runway connection", self._runway_connections), ("overlapping centerlines", self._overlaps))

    # -- running items -------------------------------------------------------------------
    def _run_family(self, frame: _Frame, name: str, family: Family) -> list[Finding]:
        """The family's findings. Its items are either items to look up (and evaluate when their
        signature is not the remembered one) or remembered outcomes the family found unchanged."""
        context = frame.context
        fresh: dict[Hashable, _Outcome] = {}
        findings: list[Finding] = []
        try:
            family_key, items = family(frame, self._memory.get(name, {}))
            memory = self._memory.get(name, {}) if self._family_keys.get(name) == family_key else {}
            self._family_keys[name] = family_key
            for item in items(memory):
                if isinstance(item, _Outcome):
                    outcome = item
                else:
                    known = memory.get(item.key)
                    outcome = (self._evaluate(context, item)
                               if item.force or known is None or known.signature != item.signature else known)
                fresh[outcome.key] = outcome
                for key, skipped in outcome.skipped:
                    context.skipped.setdefault(key, skipped)
                if outcome.error is not None:
                    raise _FamilyFailed(outcome.error)
                findings.extend(outcome.findings)
        except (_FamilyFailed, GeometryError, GEOSException) as error:
            context.skip(name, f"the check could not run on this layout ({error})", (), (0.0, 0.0))
            findings = []
        self._memory[name] = fresh
        return findings

    def _evaluate(self, context: CheckContext, item: _Item) -> _Outcome:
        self.recomputed_items += 1
        saved, context.skipped = context.skipped, {}
        try:
            found, extra = item.evaluate()
            findings, error = tuple(found), None
        except (GeometryError, GEOSException) as failure:
            findings, extra, error = (), None, str(failure)
        finally:
            skipped = tuple(context.skipped.items())
            context.skipped = saved
        return _Outcome(item.key, item.signature, findings, skipped, error, extra)

    def _forget_old_lines(self, lines: tuple[LineInfo, ...]) -> None:
        if len(self._shapes) > 4096 + 2 * len(self._aircraft):
            self._shapes.clear()
        if len(self._line_ids) > 4096 + 2 * len(self._aircraft):
            self._line_ids.clear()
        if len(self._centerlines) + len(self._pieces) > 4 * len(lines) + 16:
            current = {id(info.line.segments) for info in lines}
            for cache in (self._centerlines, self._pieces):
                for key in [key for key in cache if key not in current]:
                    del cache[key]
        self._pair_pieces.forget_beyond(4 * len(lines) + 64)

    def _shape_of(self, junction: Junction | None) -> Signature:
        if junction is None:
            return ()
        known = self._shapes.get(id(junction))
        if known is None or known[0] is not junction:
            known = self._shapes[id(junction)] = (junction, _shape(junction))
        return known[1]

    def _lines_of(self, junction: Junction) -> tuple[str, ...]:
        known = self._line_ids.get(id(junction))
        if known is None or known[0] is not junction:
            known = self._line_ids[id(junction)] = (junction, junction.line_ids)
        return known[1]

    def _junction_maps(self, junctions: Iterable[Junction]) -> tuple[ByLine, Shared]:
        """The junctions on each line and those two lines share, in input order."""
        by_line: dict[str, list[Junction]] = defaultdict(list)
        shared: dict[tuple[str, str], list[Junction]] = defaultdict(list)
        for junction in junctions:
            line_ids = self._lines_of(junction)
            for line_id in line_ids:
                by_line[line_id].append(junction)
            for pair in itertools.combinations(line_ids, 2):
                shared[pair].append(junction)
        return ({key: tuple(value) for key, value in by_line.items()},
                {key: tuple(value) for key, value in shared.items()})

    def _group_signatures(self, context: CheckContext, groups: tuple[tuple[str, Group], ...]
                          ) -> dict[str, tuple[Signature, Signature]]:
        """Each group's signatures, the previous run's tuples for an unchanged group."""
        known, fresh = self._signatures, {}
        junctions = context.junctions
        for junction_id, group in groups:
            junction = junctions.get(junction_id)
            entry = known.get(junction_id)
            if entry is None or entry[0] is not group:
                entry = (group, junction, ((group,), (group, self._shape_of(junction))))
            elif entry[1] is not junction:
                shape = self._shape_of(junction)
                signatures = entry[2] if entry[2][1][1] == shape else (entry[2][0], (group, shape))
                entry = (group, junction, signatures)
            fresh[junction_id] = entry
        self._signatures = fresh
        return {junction_id: entry[2] for junction_id, entry in fresh.items()}

    def _track_aircraft(self, frame: _Frame) -> frozenset[DesignAircraft]:
        """Every aircraft with a track, remembered per junction's movements."""
        known, found = self._aircraft, set[DesignAircraft]()
        self._aircraft = {}
        for junction_id, group in frame.groups:
            entry = known.get(junction_id)
            if entry is None or entry[0] is not group:
                entry = (group, frozenset(track.aircraft for movement in group for track in movement.tracks))
            self._aircraft[junction_id] = entry
            found |= entry[1]
        return frozenset(found)

    def _pieces_of(self, line: NetworkLine) -> Pieces:
        known = self._pieces.get(id(line.segments))
        if known is None or known[0] is not line.segments:
            known = self._pieces[id(line.segments)] = (line.segments, line_pieces([line]))
        return known[1]

    # -- the families ----------------------------------------------------------------------
    def _widths(self, frame: _Frame, _: object) -> tuple[Signature, Items]:
        context = frame.context
        return (), _per_line(context, partial(width_findings, context))

    def _by_group(self, frame: _Frame, findings: Callable[[Group], list[Finding]],
                  with_junction: bool = False) -> Items:
        excluded = frame.context.inputs.excluded_movement_keys
        which = 1 if with_junction else 0

        def evaluate(group: Group) -> tuple[list[Finding], None]:
            return findings(tuple(movement for movement in group if movement.key not in excluded)), None

        def items(memory: dict[Hashable, _Outcome]) -> Iterator[_Item | _Outcome]:
            for junction_id, group in frame.groups:
                signature = frame.signatures[junction_id][which]
                known = memory.get(junction_id)
                if known is not None and known.signature is signature:
                    yield known
                else:
                    yield _Item(junction_id, signature, partial(evaluate, group))
        return items

    def _edge_margins(self, frame: _Frame, _: object) -> tuple[Signature, Items]:
        return (), self._by_group(frame, partial(edge_margin_findings, frame.context))

    def _steering(self, frame: _Frame, _: object) -> tuple[Signature, Items]:
        return (), self._by_group(frame, partial(steering_findings, frame.context, self._radii))

    def _turn_fit(self, frame: _Frame, _: object) -> tuple[Signature, Items]:
        return (), self._by_group(frame, partial(turn_fit_findings, frame.context))

    def _line_separations(self, frame: _Frame, _: object) -> tuple[Signature, Items]:
        context = frame.context
        infos = context.inputs.lines
        if len(infos) < 2:
            return (), _none
        reach_m = separation_reach_m(context)
        geometries = [context.geometry(info.line.id) for info in infos]
        pairs = self._separation_pairs.pairs([info.line.id for info in infos], geometries, reach_m)
        pair_pieces = self._pair_pieces

        def evaluate(a: LineInfo, b: LineInfo, junctions: tuple[Junction, ...]) -> tuple[list[Finding], None]:
            box_a, box_b = (tuple(shapely.bounds(context.geometry(info.line.id)).tolist()) for info in (a, b))
            pieces = joined_pieces(pieces_near(self._pieces_of(a.line), box_b, reach_m),
                                   pieces_near(self._pieces_of(b.line), box_a, reach_m))
            excluded = segments_at_junctions((a.line, b.line), junctions)
            compute = partial(pair_separation_findings, context, pieces, reach_m, excluded)
            return pair_pieces.findings(context, a, b, pieces, excluded, compute), None

        def items(memory: dict[Hashable, _Outcome]) -> Iterator[_Item | _Outcome]:
            for i, j in pairs:
                a, b = infos[i], infos[j]
                ids = (a.line.id, b.line.id) if a.line.id < b.line.id else (b.line.id, a.line.id)
                junctions = frame.shared.get(ids, ())
                key, signature = (a.line.id, b.line.id), (a, b, junctions)
                known = memory.get(key)
                if known is not None and known.signature == signature:
                    yield known
                else:
                    yield _Item(key, signature, partial(evaluate, a, b, junctions))
        return (reach_m,), items

    def _object_separations(self, frame: _Frame, _: object) -> tuple[Signature, Items]:
        context = frame.context
        objects = usable_objects(context.inputs.objects)
        if not objects:
            return (), _none
        tree = shapely.STRtree([item.geometry for item in objects])
        return ((context.inputs.objects,),
                _per_line(context, partial(object_separation_findings, context, objects=objects, tree=tree)))

    def _wingtip_objects(self, frame: _Frame, _: object) -> tuple[Signature, Items]:
        context = frame.context
        objects = usable_objects(context.inputs.objects)
        if not objects:
            return (), _none
        tree = shapely.STRtree([item.geometry for item in objects])
        def findings(movements: Group) -> list[Finding]:
            return object_wingtip_findings(context, movements, objects, tree)
        return (context.inputs.objects,), self._by_group(frame, findings, with_junction=True)

    def _wingtip_taxiways(self, frame: _Frame, memory: dict[Hashable, _Outcome]) -> tuple[Signature, Items]:
        context = frame.context
        scene = (taxiway_scene(context, frame.by_line, self._track_aircraft(frame))
                 if context.inputs.movements else None)
        if scene is None:
            return (), _none
        entered = self._entered(frame, memory, scene.reach_m)
        excluded = context.inputs.excluded_movement_keys

        def evaluate(junction_id: str, group: Group) -> tuple[tuple[Finding, ...], object]:
            junction = context.junctions.get(junction_id)
            offered = tuple(movement for movement in group if movement.key not in excluded)
            # The lines every movement of the group leaves out (its own and its junction's).
            around = frozenset(junction.line_ids if junction is not None else ())
            left_out = frozenset.intersection(*(around | set(movement.line_ids) for movement in group))
            outcome = taxiway_wingtip_findings(scene, offered)
            return outcome.findings, (outcome, frozenset(outcome.checked_line_ids), left_out)

        def items(memory: dict[Hashable, _Outcome]) -> Iterator[_Item | _Outcome]:
            moved = frame.moved_line_ids
            for junction_id, group in frame.groups:
                signature = frame.signatures[junction_id][1]
                known = memory.get(junction_id)
                if (known is not None and known.signature is signature and junction_id not in entered
                        and isinstance(known.extra, tuple) and moved.isdisjoint(known.extra[1])):
                    yield known
                else:
                    yield _Item(junction_id, signature, partial(evaluate, junction_id, group), force=True)
        others = tuple(info.line.id for info in scene.others)
        return (scene.reach_m, others), items

    def _entered(self, frame: _Frame, memory: dict[Hashable, _Outcome], reach_m: float) -> set[Hashable]:
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

    def _paths(self, frame: _Frame, _: object) -> tuple[Signature, Items]:
        context = frame.context

        def items(memory: dict[Hashable, _Outcome]) -> Iterator[_Item | _Outcome]:
            for junction in context.inputs.junctions:
                shape = self._shape_of(junction)
                known = memory.get(junction.id)
                if known is not None and known.signature[0] is shape:
                    yield known
                else:
                    yield _Item(junction.id, (shape,), partial(_plain, paths_findings, context, junction))
        return (), items

    def _whole(self, run: Callable[[], list[Finding]]) -> tuple[Signature, Items]:
        return (), lambda _: (_Item("all", (), partial(_plain, run), force=True),)

    def _crossover_spacing(self, frame: _Frame, _: object) -> tuple[Signature, Items]:
        return self._whole(partial(check_crossover_spacing, frame.context, self._radii))

    def _reversal_steering(self, frame: _Frame, _: object) -> tuple[Signature, Items]:
        return self._whole(partial(check_reversal_steering, frame.context, self._radii, self._reversals))

    def _wide_throats(self, frame: _Frame, _: object) -> tuple[Signature, Items]:
        return self._whole(partial(check_wide_throats, frame.context))

    def _runway_connections(self, frame: _Frame, _: object) -> tuple[Signature, Items]:
        return self._whole(partial(check_runway_connections, frame.context))

    def _overlaps(self, frame: _Frame, _: object) -> tuple[Signature, Items]:
        context = frame.context
        infos = list(context.lines.values())
        if len(infos) < 2:
            return (), _none
        geometries = [context.geometry(info.line.id) for info in infos]

        def items(memory: dict[Hashable, _Outcome]) -> Iterator[_Item | _Outcome]:
            for i, j in self._overlap_pairs.pairs([info.line.id for info in infos], geometries,
                                                  OVERLAP_DISTANCE_M):
                a, b = infos[i], infos[j]
                key = (a.line.id, b.line.id)
                known = memory.get(key)
                if known is not None and known.signature[0] is a and known.signature[1] is b:
                    yield known
                else:
                    evaluate = partial(_plain, overlap_findings, a, b, geometries[i], geometries[j])
                    yield _Item(key, (a, b), evaluate)
        return (), items


def _per_line(context: CheckContext, findings: Callable[[LineInfo], list[Finding]]) -> Items:
    """One item per line, redone when the line is not the remembered one."""
    def items(memory: dict[Hashable, _Outcome]) -> Iterator[_Item | _Outcome]:
        for info in context.inputs.lines:
            known = memory.get(info.line.id)
            if known is not None and known.signature[0] is info:
                yield known
            else:
                yield _Item(info.line.id, (info,), partial(_plain, findings, info))
    return items
