"""The layout's elements as frozen values. A :class:`Layout` is replaced, never mutated.

Coordinates and lengths are stored in metres, whatever the layout's display units; see
``geometry`` for the plan conventions (x east, y north, headings counter-clockwise from +x).
Each element carries a stable ``id`` (unique within the layout) that commands, findings and
views use to refer to it.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Literal

from geometry.aircraft import DesignAircraft
from geometry.units import LengthUnit

RuleSetName = Literal["FAA", "ICAO"]
CenterlineKind = Literal["taxiway", "taxilane"]
ObjectKind = Literal["building", "sign", "navaid", "other"]
XY = tuple[float, float]


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
    turn_radius_overrides_m: tuple[tuple[str, float], ...] = ()
