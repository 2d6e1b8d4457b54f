"""The design checks run again after an edit, redoing only what the edit can have changed.

:class:`IncrementalChecks` splits every family of checks into *items* whose findings depend on a
few inputs only (the movements of one junction, one line, one pair of lines), keeps each item's
findings with the very input objects they were computed from, and on the next run recomputes only
the items whose inputs are not those objects any more. The analysis hands back the same objects
for everything an edit did not touch (app/model/check_inputs.py), so a drag redoes a few items.

:func:`geometry.checks.run_checks` is this runner with an empty memory, so a warm runner and a
fresh one give the same findings by construction, as long as every item names what it reads:
everything reads the rule set, the fleet, the excluded movements and each line's id, name and kind
(they appear in messages), so a change to any of them redoes every item; what each family's items
read besides is listed in :mod:`.check_families`, which builds the items.

Each item is evaluated alone, with rule look-ups of its own. A rule that cannot be looked up gives
one ``W-CHECK-SKIPPED`` per rule and reason: the first in the fixed order of families and items.
"""

from __future__ import annotations

import itertools
from collections import defaultdict
from collections.abc import Hashable, Iterable
from functools import partial

from shapely.errors import GEOSException
from shapely.geometry.base import BaseGeometry

from geometry.aircraft import DesignAircraft
from geometry.checks.check_families import CheckFamilies, Family, Frame, Group, Item, Outcome, Signature
from geometry.checks.common import CheckContext
from geometry.checks.inputs import CheckInputs, LineInfo, MovementInfo
from geometry.checks.parallel_pieces import Pieces, line_pieces
from geometry.errors import GeometryError
from geometry.findings import Finding
from geometry.network import Junction, NetworkLine

ByLine = dict[str, tuple[Junction, ...]]             # the junctions on each line
Shared = dict[tuple[str, str], tuple[Junction, ...]]  # the junctions two lines share


def finding_order(finding: Finding) -> tuple[int, str, float, float, tuple[str, ...], str]:
    """Sort key: severity (errors first), code, location x then y, element ids, message."""
    x, y = finding.location_m
    return (-int(finding.severity), finding.code, x, y, finding.element_ids, finding.message)


class _FamilyFailed(Exception):
    pass


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


class IncrementalChecks:
    """Every design check over successive inputs, reusing the findings of unchanged items."""

    def __init__(self) -> None:
        self._memory: dict[str, dict[Hashable, Outcome]] = {}
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
        self._families = CheckFamilies()
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
        frame = Frame(context, groups, by_line, shared, changed, self._group_signatures(context, groups),
                      frozenset(moved | (self._lines.keys() - context.lines.keys())),
                      self._shape_of, self._pieces_of, partial(self._track_aircraft, groups))
        findings: list[Finding] = []
        for name, family in self._families.named():
            findings.extend(self._run_family(frame, name, family))
        findings.extend(context.skipped_findings())
        self._lines = dict(context.lines)
        self._by_line = by_line
        self._forget_old_lines(inputs.lines)
        return tuple(sorted(findings, key=finding_order))

    # -- running items -------------------------------------------------------------------
    def _run_family(self, frame: Frame, name: str, family: Family) -> list[Finding]:
        """The family's findings. Its items are either items to look up (and evaluate when their
        signature is not the remembered one) or remembered outcomes the family found unchanged."""
        context = frame.context
        fresh: dict[Hashable, Outcome] = {}
        findings: list[Finding] = []
        try:
            family_key, items = family(frame, self._memory.get(name, {}))
            memory = self._memory.get(name, {}) if self._family_keys.get(name) == family_key else {}
            self._family_keys[name] = family_key
            for item in items(memory):
                if isinstance(item, Outcome):
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

    def _evaluate(self, context: CheckContext, item: Item) -> Outcome:
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
        return Outcome(item.key, item.signature, findings, skipped, error, extra)

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
        self._families.forget_pair_pieces_beyond(4 * len(lines) + 64)

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

    def _track_aircraft(self, groups: tuple[tuple[str, Group], ...]) -> frozenset[DesignAircraft]:
        """Every aircraft with a track, remembered per junction's movements."""
        known, found = self._aircraft, set[DesignAircraft]()
        self._aircraft = {}
        for junction_id, group in groups:
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
