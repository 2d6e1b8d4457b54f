"""The families of design checks, each split into items that :mod:`.incremental` remembers.

A family is a function of one run's inputs (a :class:`~.family_items.Frame`) and its remembered
outcomes, returning a :class:`~.family_items.Plan`: a key (a change of key forgets every
remembered outcome of the family), every item in order, and the items that changed. An item
names its key, the input objects its findings depend on (its signature) and how to evaluate it.
What each family's items read:

* the movements of one junction (edge margin, steering, turn fit, wingtip to object): those
  movements and the junction (its legs bound where the wingtip tracks count);
* one junction (paths per approach): the junction; one line (width, object separation): the line;
* a pair of lines within reach of each other (line separation, overlap): the two lines and the
  junctions they share (:mod:`.pair_families`);
* the movements of one junction against other taxiways (wingtip to taxiway): the movements, the
  junction, and the other lines and their junctions near the movements' tracks
  (:mod:`.wingtip_family`);
* the rest (crossovers, runway connections, wide throats, which read the whole pavement): run
  every time; they visit the few runway junctions and crossovers only.

:class:`CheckFamilies` keeps what the families remember besides outcomes (steering radii, near
pairs of lines, separation findings per pair of pieces, the wingtip query boxes).
"""

from __future__ import annotations

from collections.abc import Callable, Hashable, Iterable, Iterator
from functools import partial

import shapely

from geometry.checks.common import usable_objects
from geometry.checks.crossovers import ReversalSteering, check_crossover_spacing, check_reversal_steering
from geometry.checks.family_items import (
    NOTHING,
    Family,
    Frame,
    Group,
    Item,
    Outcome,
    Plan,
    Signature,
    by_group,
    per_line,
    plain,
    whole,
)
from geometry.checks.inputs import ObjectInfo
from geometry.checks.junction_rules import paths_findings
from geometry.checks.pair_families import LineSeparations, Overlaps
from geometry.checks.runways import check_runway_connections, check_wide_throats
from geometry.checks.separations import object_separation_findings
from geometry.checks.steering import SteeringRadii, steering_findings, turn_fit_findings
from geometry.checks.widths import edge_margin_findings, width_findings
from geometry.checks.wingtip_family import WingtipTaxiways
from geometry.checks.wingtips import object_wingtip_findings
from geometry.network import Junction

__all__ = ["CheckFamilies", "Family", "Frame", "Group", "Item", "Outcome", "Plan", "Signature"]


class CheckFamilies:
    """Every family of checks, in the fixed order of their findings and skipped rules."""

    def __init__(self) -> None:
        self._separations = LineSeparations()
        self._overlaps = Overlaps()
        self._wingtip_taxiways = WingtipTaxiways()
        self._radii = SteeringRadii()
        self._reversals = ReversalSteering()

    def named(self) -> tuple[tuple[str, Family], ...]:
        return (("straight width", widths), ("edge margin", edge_margins),
                ("steering", self.steering), ("turn fit", turn_fit),
                ("line separation", self._separations), ("object separation", object_separations),
                ("wingtip to object", wingtip_objects), ("wingtip to taxiway", self._wingtip_taxiways),
                ("paths per approach", paths), ("crossover spacing", self.crossover_spacing),
                ("reversal steering", self.reversal_steering), ("wide throat", wide_throats),
                ("runway connection", runway_connections), ("overlapping centerlines", self._overlaps))

    def forget_pair_pieces_beyond(self, count: int) -> None:
        self._separations.forget_pair_pieces_beyond(count)

    def steering(self, frame: Frame, _: object) -> Plan:
        return by_group(frame, partial(steering_findings, frame.context, self._radii))

    def crossover_spacing(self, frame: Frame, _: object) -> Plan:
        return whole(partial(check_crossover_spacing, frame.context, self._radii))

    def reversal_steering(self, frame: Frame, _: object) -> Plan:
        return whole(partial(check_reversal_steering, frame.context, self._radii, self._reversals))


def widths(frame: Frame, _: object) -> Plan:
    return per_line(frame, partial(width_findings, frame.context))


def edge_margins(frame: Frame, _: object) -> Plan:
    return by_group(frame, partial(edge_margin_findings, frame.context))


def turn_fit(frame: Frame, _: object) -> Plan:
    return by_group(frame, partial(turn_fit_findings, frame.context))


def _over_objects(frame: Frame, plan_of: Callable[[list[ObjectInfo], shapely.STRtree, Signature], Plan]
                  ) -> Plan:
    """A family over the usable objects (``plan_of`` gets them, a tree over their geometries and
    the family's key); no items without any."""
    objects = usable_objects(frame.context.inputs.objects)
    if not objects:
        return NOTHING
    tree = shapely.STRtree([item.geometry for item in objects])
    return plan_of(objects, tree, (frame.context.inputs.objects,))


def object_separations(frame: Frame, _: object) -> Plan:
    context = frame.context
    return _over_objects(frame, lambda objects, tree, key: per_line(
        frame, partial(object_separation_findings, context, objects=objects, tree=tree), key))


def wingtip_objects(frame: Frame, _: object) -> Plan:
    context = frame.context
    return _over_objects(frame, lambda objects, tree, key: by_group(
        frame, partial(object_wingtip_findings, context, objects=objects, tree=tree), True, key))


def paths(frame: Frame, _: object) -> Plan:
    context = frame.context

    def item(junction: Junction) -> Item:
        evaluate = partial(plain, paths_findings, context, junction)
        return Item(junction.id, (frame.shape_of(junction),), evaluate)

    def every(memory: dict[Hashable, Outcome]) -> Iterator[Item | Outcome]:
        for junction in context.inputs.junctions:
            shape = frame.shape_of(junction)
            known = memory.get(junction.id)
            yield known if known is not None and known.signature[0] is shape else item(junction)

    def changed(_: dict[Hashable, Outcome]) -> tuple[Iterable[Item | Outcome], Iterable[Hashable]]:
        return ([item(new) for _, new in frame.junction_changes if new is not None],
                [old.id for old, new in frame.junction_changes if new is None and old is not None])
    return Plan((), every, changed)


def wide_throats(frame: Frame, _: object) -> Plan:
    return whole(partial(check_wide_throats, frame.context))


def runway_connections(frame: Frame, _: object) -> Plan:
    return whole(partial(check_runway_connections, frame.context))
