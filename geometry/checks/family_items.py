"""The pieces a family of checks is made of (see :mod:`.check_families`): items, their remembered
outcomes, one run's inputs (:class:`Frame`) and a family's :class:`Plan` for a run.

A plan lists the family's items two ways: ``every`` item in the fixed order (a first run, or a
run that needs that order: rule look-ups that could not be made, a failed item), and, when the
family can tell, only what ``changed`` since the remembered outcomes, with the keys that are gone.
Both give the same outcomes; the second costs what changed.
"""

from __future__ import annotations

from collections.abc import Callable, Hashable, Iterable, Iterator
from dataclasses import dataclass
from functools import partial

import shapely
from shapely.geometry.base import BaseGeometry

from geometry.checks.changes import Bounds, GroupIndex, JunctionChange, JunctionIndex, LineChange
from geometry.checks.common import CheckContext
from geometry.checks.inputs import CheckInputs, LineInfo, MovementInfo
from geometry.checks.parallel_pieces import Pieces
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

    @property
    def special(self) -> bool:
        """Whether the family's order matters to it (a skipped look-up or a failure)."""
        return bool(self.skipped) or self.error is not None


@dataclass(frozen=True, slots=True, eq=False)
class Item:
    key: Hashable
    signature: Signature     # the input objects the findings depend on (compared with ==)
    evaluate: Evaluate
    force: bool = False      # recompute whatever the signature


@dataclass(frozen=True, slots=True, eq=False)
class Frame:
    """One run's inputs, indexed the ways the families need, and what changed since the last run."""

    context: CheckContext
    groups: tuple[tuple[str, Group], ...]           # the movements of each junction, in input order
    group_index: GroupIndex                         # the same by junction id, with their signatures
    junction_index: JunctionIndex                   # the junctions on each line and shared by two
    line_changes: dict[str, LineChange]             # lines that are not the previous run's objects
    junction_changes: list[JunctionChange]          # junctions that are not the previous run's
    signature_changes: set[str]                     # groups whose signatures are not the previous
    # The runner's look-ups, remembered by the identity of what they read: a junction's shape (the
    # same tuple while the junction is the same object), a line's pieces, a line's bounds.
    shape_of: Callable[[Junction | None], Signature]
    pieces_of: Callable[[NetworkLine], Pieces]
    bounds_of: Callable[[str], Bounds]
    geometries: Callable[[], list[BaseGeometry]]   # every line's centerline, in input order

    @property
    def by_line(self) -> dict[str, tuple[Junction, ...]]:
        return self.junction_index.by_line

    @property
    def shared(self) -> dict[tuple[str, str], tuple[Junction, ...]]:
        return self.junction_index.shared

    @property
    def signatures(self) -> dict[str, tuple[Signature, Signature]]:
        return self.group_index.signatures


Items = Callable[[dict[Hashable, Outcome]], Iterable[Item | Outcome]]
Changed = Callable[[dict[Hashable, Outcome]], tuple[Iterable[Item | Outcome], Iterable[Hashable]]]


@dataclass(frozen=True, slots=True, eq=False)
class Plan:
    key: Signature            # a change of key forgets every remembered outcome of the family
    every: Items              # every item (or remembered outcome), in order
    changed: Changed | None = None  # (items to store, keys gone) from the remembered outcomes


Family = Callable[[Frame, dict[Hashable, Outcome]], Plan]


class SameRules:
    """Whether the rule set is the very object of the last call and every line's design aircraft
    equal: what a family derived from them alone (a reach) still holds."""

    def __init__(self) -> None:
        self._rule_set: object = None
        self._aircraft: list[object] = []

    def __call__(self, inputs: CheckInputs) -> bool:
        aircraft: list[object] = [info.design_aircraft for info in inputs.lines]
        same = inputs.rule_set is self._rule_set and aircraft == self._aircraft
        self._rule_set, self._aircraft = inputs.rule_set, aircraft
        return same


def plain(function: Callable[..., list[Finding]], *arguments: object) -> tuple[list[Finding], None]:
    return function(*arguments), None


def no_items(_: dict[Hashable, Outcome]) -> Iterable[Item | Outcome]:
    return ()


NOTHING = Plan(("no items",), no_items, lambda _: ((), ()))


def whole(run: Callable[[], list[Finding]]) -> Plan:
    """One item over the whole layout, run every time."""
    return Plan((), lambda _: (Item("all", (), partial(plain, run), force=True),))


def per_line(frame: Frame, findings: Callable[[LineInfo], list[Finding]], key: Signature = ()) -> Plan:
    """One item per line, redone when the line is not the remembered one."""
    def item(info: LineInfo) -> Item:
        return Item(info.line.id, (info,), partial(plain, findings, info))

    def every(memory: dict[Hashable, Outcome]) -> Iterator[Item | Outcome]:
        for info in frame.context.inputs.lines:
            known = memory.get(info.line.id)
            yield known if known is not None and known.signature[0] is info else item(info)

    def changed(_: dict[Hashable, Outcome]) -> tuple[Iterable[Item | Outcome], Iterable[Hashable]]:
        return [item(change.current) for change in frame.line_changes.values()], ()
    return Plan(key, every, changed)


def by_group(frame: Frame, findings: Callable[[Group], list[Finding]], with_junction: bool = False,
             key: Signature = ()) -> Plan:
    """One item per junction's movements (less the excluded ones), redone when the movements, or
    with ``with_junction`` the junction's shape, are not the remembered ones."""
    excluded = frame.context.inputs.excluded_movement_keys
    which = 1 if with_junction else 0
    signatures = frame.signatures

    def evaluate(group: Group) -> tuple[list[Finding], None]:
        return findings(tuple(movement for movement in group if movement.key not in excluded)), None

    def every(memory: dict[Hashable, Outcome]) -> Iterator[Item | Outcome]:
        for junction_id, group in frame.groups:
            signature = signatures[junction_id][which]
            known = memory.get(junction_id)
            if known is not None and known.signature is signature:
                yield known
            else:
                yield Item(junction_id, signature, partial(evaluate, group))

    def changed(_: dict[Hashable, Outcome]) -> tuple[Iterable[Item | Outcome], Iterable[Hashable]]:
        groups = frame.group_index.by_id
        present = [junction_id for junction_id in frame.signature_changes if junction_id in groups]
        items = [Item(junction_id, signatures[junction_id][which], partial(evaluate, groups[junction_id]))
                 for junction_id in present]
        return items, [junction_id for junction_id in frame.signature_changes if junction_id not in groups]
    return Plan(key, every, changed)


def line_bounds(geometry: shapely.Geometry) -> Bounds:
    low_x, low_y, high_x, high_y = shapely.bounds(geometry).tolist()
    return (low_x, low_y, high_x, high_y)
