"""The design checks run again after an edit, redoing only what the edit can have changed.

:class:`IncrementalChecks` splits every family of checks into *items* whose findings depend on a
few inputs only (the movements of one junction, one line, one pair of lines), keeps each item's
findings with the very input objects they were computed from, and on the next run recomputes only
the items whose inputs are not those objects any more. The analysis hands back the same objects
for everything an edit did not touch (app/model/check_inputs.py), so a drag redoes a few items.

A run costs what changed, not the layout's size: scans of ``is`` tests find the junctions, lines
and movement groups that are not the previous run's objects (:mod:`.changes`); the indexes over
them are patched; each family names only the items those changes reach (:mod:`.check_families`);
and the sorted findings are patched too, the findings of the redone items taken out and put in.

:func:`geometry.checks.run_checks` is this runner with an empty memory, so a warm runner and a
fresh one give the same findings by construction, as long as every item names what it reads:
everything reads the rule set, the fleet, the excluded movements and each line's id, name and kind
(they appear in messages), so a change to any of them redoes every item.

Each item is evaluated alone, with rule look-ups of its own. A rule that cannot be looked up gives
one ``W-CHECK-SKIPPED`` per rule and reason: the first in the fixed order of families and items.
So a family with such an outcome (or a failed item) runs through every item in order, and where
two different findings sort alike the whole run does, as a fresh run would.
"""

from __future__ import annotations

import itertools
from bisect import bisect_left, bisect_right
from collections.abc import Hashable, Iterable

from shapely.errors import GEOSException
from shapely.geometry.base import BaseGeometry

from geometry.checks.changes import (
    Bounds,
    GroupIndex,
    JunctionIndex,
    LineChange,
    changed_line,
    changed_positions,
)
from geometry.checks.check_families import CheckFamilies, Family, Frame, Group, Item, Outcome, Plan, Signature
from geometry.checks.common import CheckContext
from geometry.checks.family_items import line_bounds
from geometry.checks.inputs import CheckInputs, LineInfo, MovementInfo
from geometry.checks.parallel_pieces import Pieces
from geometry.checks.segment_pieces import SegmentPieces
from geometry.errors import GeometryError
from geometry.findings import Finding
from geometry.network import Junction, NetworkLine

Diff = tuple[list[Finding], list[Finding]]  # (findings taken out, findings put in)


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


def _alike(found: list[Finding], finding: Finding) -> tuple[int, int]:
    """The range of ``found`` (sorted) that sorts alike with ``finding``."""
    key = finding_order(finding)
    return bisect_left(found, key, key=finding_order), bisect_right(found, key, key=finding_order)


def _findings_of(outcomes: Iterable[Outcome]) -> list[Finding]:
    return [finding for outcome in outcomes for finding in outcome.findings]


class IncrementalChecks:
    """Every design check over successive inputs, reusing the findings of unchanged items."""

    def __init__(self) -> None:
        self._memory: dict[str, dict[Hashable, Outcome]] = {}
        self._family_keys: dict[str, Signature] = {}
        self._in_order: set[str] = set()     # families whose order matters (skipped look-ups, failures)
        self._failed: set[str] = set()
        self._global_key: Signature | None = None
        self._lines: tuple[LineInfo, ...] = ()
        self._junctions = JunctionIndex()
        self._groups = GroupIndex(self._shape_of)
        self._centerlines: dict[int, tuple[object, BaseGeometry]] = {}
        self._pieces: dict[int, tuple[object, Pieces]] = {}
        self._line_pieces = SegmentPieces()
        self._bounds: dict[int, tuple[BaseGeometry, Bounds]] = {}
        self._shapes: dict[int, tuple[Junction, Signature]] = {}
        self._sorted: list[Finding] = []
        self._skipped: tuple[Finding, ...] = ()
        self._families = CheckFamilies()
        self.recomputed_items = 0  # in the last run (for tests and benchmarks)

    def run(self, inputs: CheckInputs) -> tuple[Finding, ...]:
        """The findings of every check over ``inputs``, sorted by :func:`finding_order`."""
        self.recomputed_items = 0
        global_key = (inputs.rule_set, inputs.fleet, inputs.excluded_movement_keys,
                      tuple((info.line.id, info.name, info.line.kind) for info in inputs.lines))
        in_order = global_key != self._global_key
        if in_order:
            self._memory.clear()
            self._global_key = global_key
        if not self._run(inputs, in_order):
            self._run(inputs, in_order=True)
        self._forget_old_lines(inputs.lines)
        return tuple(self._sorted)

    def _run(self, inputs: CheckInputs, in_order: bool) -> bool:
        """Every family once; False when the sorted findings could not be patched (two different
        findings sort alike, so their order is the fresh run's: run again ``in_order``)."""
        junction_changes = self._junctions.update(inputs.junctions)
        context = CheckContext(inputs, centerlines=self._centerlines, junction_map=self._junctions.by_id)
        groups = _groups(inputs)
        signature_changes = self._groups.update(groups, self._junctions.by_id, junction_changes)
        geometries: list[BaseGeometry] = []

        def every_geometry() -> list[BaseGeometry]:
            if not geometries:
                geometries.extend(context.geometry(info.line.id) for info in inputs.lines)
            return geometries
        frame = Frame(context, groups, self._groups, self._junctions, self._line_changes(inputs.lines),
                      junction_changes, signature_changes, self._shape_of, self._pieces_of,
                      lambda line_id: self._bounds_of(context.geometry(line_id)), every_geometry)
        taken_out: list[Finding] = []
        put_in: list[Finding] = []
        for name, family in self._families.named():
            out, added = self._run_family(frame, name, family, in_order)
            taken_out.extend(out)
            put_in.extend(added)
        skipped = context.skipped_findings()
        if in_order:
            self._skipped = skipped
            self._sorted = sorted((*put_in, *skipped), key=finding_order)
            return True
        if skipped != self._skipped:
            taken_out.extend(self._skipped)
            put_in.extend(skipped)
            self._skipped = skipped
        return self._patch_sorted(taken_out, put_in)

    def _line_changes(self, lines: tuple[LineInfo, ...]) -> dict[str, LineChange]:
        previous, self._lines = self._lines, lines
        positions = changed_positions(lines, previous)
        if positions is None:
            return {}  # other lines: the global key changed, every item is redone
        return {lines[index].line.id: changed_line(previous[index], lines[index], self._pieces_of)
                for index in positions}

    # -- running families ----------------------------------------------------------------
    def _run_family(self, frame: Frame, name: str, family: Family, in_order: bool) -> Diff:
        """The family's findings taken out and put in since the last run."""
        previous = self._memory.get(name, {})
        failed_before = name in self._failed

        def before() -> list[Finding]:
            return [] if failed_before else _findings_of(previous.values())
        try:
            plan = family(frame, previous)
            memory = previous if self._family_keys.get(name) == plan.key else {}
            self._family_keys[name] = plan.key
            if in_order or plan.changed is None or not memory or name in self._in_order:
                return before(), self._run_every(frame.context, name, plan, memory)
            return self._run_changed(frame.context, name, plan, memory)
        except (_FamilyFailed, GeometryError, GEOSException) as error:
            frame.context.skip(name, f"the check could not run on this layout ({error})", (), (0.0, 0.0))
            if self._memory.get(name) is previous:
                self._memory[name] = {}  # this run's changes never reached them
            self._failed.add(name)
            self._in_order.add(name)
            return before(), []

    def _run_every(self, context: CheckContext, name: str, plan: Plan,
                   memory: dict[Hashable, Outcome]) -> list[Finding]:
        """Every item in order (as a fresh run): the family's findings."""
        fresh: dict[Hashable, Outcome] = {}
        self._memory[name] = fresh
        findings: list[Finding] = []
        for item in plan.every(memory):
            outcome = self._outcome(context, item, memory)
            fresh[outcome.key] = outcome
            for key, skipped in outcome.skipped:
                context.skipped.setdefault(key, skipped)
            if outcome.error is not None:
                raise _FamilyFailed(outcome.error)
            findings.extend(outcome.findings)
        self._failed.discard(name)
        if any(outcome.special for outcome in fresh.values()):
            self._in_order.add(name)
        else:
            self._in_order.discard(name)
        return findings

    def _run_changed(self, context: CheckContext, name: str, plan: Plan,
                     memory: dict[Hashable, Outcome]) -> Diff:
        """Only the items that changed; the family keeps its order-free outcomes, else runs every item."""
        assert plan.changed is not None
        items, gone = plan.changed(memory)
        fresh = {outcome.key: outcome for outcome in (self._outcome(context, item, memory) for item in items)}
        if any(outcome.special for outcome in fresh.values()):
            patched = {key: outcome for key, outcome in memory.items() if key not in set(gone)}
            patched.update(fresh)
            return _findings_of(memory.values()), self._run_every(context, name, plan, patched)
        taken_out: list[Finding] = []
        put_in: list[Finding] = []
        for key in gone:
            known = memory.pop(key, None)
            if known is not None:
                taken_out.extend(known.findings)
        for key, outcome in fresh.items():
            known = memory.get(key)
            if known is None or (known.findings is not outcome.findings
                                 and known.findings != outcome.findings):
                taken_out.extend(() if known is None else known.findings)
                put_in.extend(outcome.findings)
            memory[key] = outcome
        self._memory[name] = memory
        return taken_out, put_in

    def _outcome(self, context: CheckContext, item: Item | Outcome,
                 memory: dict[Hashable, Outcome]) -> Outcome:
        if isinstance(item, Outcome):
            return item
        known = memory.get(item.key)
        if item.force or known is None or known.signature != item.signature:
            return self._evaluate(context, item)
        if known.signature is item.signature:
            return known
        return Outcome(known.key, item.signature, known.findings, known.skipped, known.error, known.extra)

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

    # -- the sorted findings -------------------------------------------------------------
    def _patch_sorted(self, taken_out: list[Finding], put_in: list[Finding]) -> bool:
        """Take findings out of the sorted list and put others in; False when one put in sorts
        alike with a different finding (only a fresh run's order tells where it goes)."""
        found = self._sorted
        for finding in taken_out:
            low, high = _alike(found, finding)
            index = next((i for i in range(low, high) if found[i] is finding), None)
            if index is None:
                index = next((i for i in range(low, high) if found[i] == finding), None)
            if index is None:
                return False
            del found[index]
        for finding in put_in:
            low, high = _alike(found, finding)
            if any(found[i] != finding for i in range(low, high)):
                return False
            found.insert(high, finding)
        return True

    # -- look-ups remembered by identity --------------------------------------------------
    def _forget_old_lines(self, lines: tuple[LineInfo, ...]) -> None:
        if len(self._shapes) > 4096 + 4 * len(self._junctions.by_id):
            self._shapes.clear()
        if len(self._centerlines) + len(self._pieces) + len(self._bounds) > 6 * len(lines) + 16:
            current = {id(info.line.segments) for info in lines}
            for cache in (self._centerlines, self._pieces):
                for key in [key for key in cache if key not in current]:
                    del cache[key]
            geometries = {id(known[1]) for known in self._centerlines.values()}
            self._bounds = {key: value for key, value in self._bounds.items() if key in geometries}
        if len(self._line_pieces) > 64 * len(lines):
            self._line_pieces.forget_beyond(16 * sum(len(info.line.segments) for info in lines) + 64)
        self._families.forget_pair_pieces_beyond(4 * len(lines) + 64)

    def _shape_of(self, junction: Junction | None) -> Signature:
        if junction is None:
            return ()
        known = self._shapes.get(id(junction))
        if known is None or known[0] is not junction:
            known = self._shapes[id(junction)] = (junction, _shape(junction))
        return known[1]

    def _pieces_of(self, line: NetworkLine) -> Pieces:
        known = self._pieces.get(id(line.segments))
        if known is None or known[0] is not line.segments:
            known = self._pieces[id(line.segments)] = (line.segments, self._line_pieces.of(line))
        return known[1]

    def _bounds_of(self, geometry: BaseGeometry) -> Bounds:
        known = self._bounds.get(id(geometry))
        if known is None or known[0] is not geometry:
            known = self._bounds[id(geometry)] = (geometry, line_bounds(geometry))
        return known[1]
