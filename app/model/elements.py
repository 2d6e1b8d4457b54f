"""The layout's elements as frozen values. A :class:`Layout` is replaced, never mutated.

Coordinates and lengths are stored in metres, whatever the layout's display units; see
``geometry`` for the plan conventions (x east, y north, headings counter-clockwise from +x).
Each element carries a stable ``id`` (unique within the layout) that commands, findings and
views use to refer to it.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING, Literal, TypeAlias

from geometry.aircraft import DesignAircraft
from geometry.units import LengthUnit

if TYPE_CHECKING:  # app.model.underlays imports this module
    from app.model.underlays import Underlay

RuleSetName = Literal["FAA", "ICAO"]
CenterlineKind = Literal["taxiway", "taxilane"]
ObjectKind = Literal["building", "sign", "navaid", "other"]
XY = tuple[float, float]

# The allowed values of the Literal types above, for checks at the boundaries (edits, files).
RULE_SET_NAMES: tuple[RuleSetName, ...] = ("FAA", "ICAO")
CENTERLINE_KINDS: tuple[CenterlineKind, ...] = ("taxiway", "taxilane")
OBJECT_KINDS: tuple[ObjectKind, ...] = ("building", "sign", "navaid", "other")
# Design-group labels: FAA AC 150/5300-13B taxiway design groups and airplane design groups,
# ICAO Annex 14 Vol I aerodrome reference code letters (see shared/REFERENCES.md).
TDG_VALUES: tuple[str, ...] = ("1A", "1B", "2A", "2B", "3", "4", "5", "6", "7")
ADG_VALUES: tuple[str, ...] = ("I", "II", "III", "IV", "V", "VI")
CODE_LETTERS: tuple[str, ...] = ("A", "B", "C", "D", "E", "F")

# No coordinate or length of a layout may exceed this (a plausibility bound, not a standard: a
# layout is at most a few tens of kilometres across; beyond 1e9 m a typo or a corrupt file).
MAX_COORDINATE_M = 1e9


@dataclass(frozen=True, slots=True)
class Vertex:
    """A centerline vertex; ``corner_radius_m`` rounds the corner with a true arc."""

    x_m: float
    y_m: float
    corner_radius_m: float | None = None

    @property
    def xy(self) -> XY:
        return (self.x_m, self.y_m)


@dataclass(frozen=True, slots=True)
class DesignGroup:
    """The design group a centerline is built for. FAA layouts use ``tdg`` and ``adg``; ICAO
    layouts use ``code_letter``. Unset values are derived from the layout's fleet."""

    tdg: str | None = None
    adg: str | None = None
    code_letter: str | None = None


@dataclass(frozen=True, slots=True)
class Centerline:
    id: str
    name: str
    vertices: tuple[Vertex, ...]
    kind: CenterlineKind = "taxiway"
    group: DesignGroup = field(default_factory=DesignGroup)
    width_override_m: float | None = None

    def with_vertices(self, vertices: tuple[Vertex, ...]) -> Centerline:
        return replace(self, vertices=vertices)


@dataclass(frozen=True, slots=True)
class Runway:
    """A runway by its two threshold points (centerline) and its width."""

    id: str
    designation: str
    vertices: tuple[Vertex, Vertex]
    width_m: float
    instrument: bool = True


@dataclass(frozen=True, slots=True)
class FixedObject:
    """A building, sign, navaid or other object: a point (one vertex) or a polygon outline."""

    id: str
    name: str
    outline: tuple[XY, ...]
    height_m: float
    kind: ObjectKind = "building"


@dataclass(frozen=True, slots=True)
class ExistingPavement:
    """An outline of pavement that exists already (for change layouts)."""

    id: str
    name: str
    outline: tuple[XY, ...]
    holes: tuple[tuple[XY, ...], ...] = ()


@dataclass(frozen=True, slots=True)
class Layout:
    """A whole layout: what is saved, what commands replace, what derived results read."""

    title: str = "Untitled layout"
    notes: str = ""
    rule_set: RuleSetName = "FAA"
    units: LengthUnit = "ft"
    fleet: tuple[DesignAircraft, ...] = ()
    centerlines: tuple[Centerline, ...] = ()
    runways: tuple[Runway, ...] = ()
    objects: tuple[FixedObject, ...] = ()
    existing_pavements: tuple[ExistingPavement, ...] = ()
    excluded_movements: frozenset[str] = frozenset()
    # (corner key, radius) pairs sorted by key, so equal settings compare equal.
    turn_radius_overrides_m: tuple[tuple[str, float], ...] = ()
    # Base drawings and images under the layout, first drawn lowest (app.model.underlays).
    underlays: tuple[Underlay, ...] = ()

    def turn_radius_override_m(self, corner_key: str) -> float | None:
        """The planner's turn radius for ``corner_key``, or None when the rule set decides."""
        for key, radius_m in self.turn_radius_overrides_m:
            if key == corner_key:
                return radius_m
        return None


Element: TypeAlias = Centerline | Runway | FixedObject | ExistingPavement

# The layout fields that hold elements, in drawing and file order.
ELEMENT_FIELDS: tuple[str, ...] = ("centerlines", "runways", "objects", "existing_pavements")

# The layout fields that change derived results for every element (not the element tuples).
SETTINGS_FIELDS: tuple[str, ...] = ("fleet", "rule_set", "units", "excluded_movements",
                                    "turn_radius_overrides_m")


def element_tuples(layout: Layout) -> tuple[tuple[Element, ...], ...]:
    """The layout's element tuples in :data:`ELEMENT_FIELDS` order."""
    return (layout.centerlines, layout.runways, layout.objects, layout.existing_pavements)


def iter_elements(layout: Layout) -> Iterator[Element]:
    """Every element of the layout: centerlines, runways, objects, then existing pavements."""
    for elements in element_tuples(layout):
        yield from elements


def settings_differ(before: Layout, after: Layout) -> bool:
    """True when fleet, rule set, units, exclusions or turn-radius overrides differ."""
    return any(getattr(before, name) != getattr(after, name) for name in SETTINGS_FIELDS)
