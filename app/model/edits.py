"""Edits: pure functions ``Layout -> Layout``. Arguments are never mutated; a new layout is returned.

Every function checks its arguments and raises :class:`EditError` with a sentence for the
planner when they are wrong (unknown id, vertex index out of range, non-finite or absurd
coordinate, ...). Coordinates and lengths are in metres. Elements that an edit does not touch
are carried over as the very same objects, so comparing two layouts by identity first is cheap.

Vertex indices are zero-based and never negative (no Python-style counting from the end: a
negative index from the UI is a bug, not a request).
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import replace
from typing import Any, TypeVar

from app.model.elements import (
    ADG_VALUES,
    CENTERLINE_KINDS,
    CODE_LETTERS,
    MAX_COORDINATE_M,
    OBJECT_KINDS,
    RULE_SET_NAMES,
    TDG_VALUES,
    XY,
    Centerline,
    DesignGroup,
    Element,
    ExistingPavement,
    FixedObject,
    Layout,
    Runway,
    Vertex,
    element_tuples,
    iter_elements,
)
from app.model.ids import PAVEMENT_PREFIX, element_by_id, element_ids, new_id
from app.model.underlays import PavementPart, Underlay, pavement_parts, underlay_by_id, underlay_problem
from geometry.aircraft import DesignAircraft
from geometry.centerline import DUPLICATE_VERTEX_TOLERANCE_M
from geometry.units import LENGTH_UNITS, LengthUnit


class EditError(ValueError):
    """An edit was asked with arguments that do not fit the layout."""


_Choice = TypeVar("_Choice", bound=str)


# --- argument checks -------------------------------------------------------------------------

def _finite(value: object, what: str) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise EditError(f"{what} must be a number, got {value!r}")
    if not math.isfinite(value):
        raise EditError(f"{what} must be a finite number, got {value!r}")
    if abs(value) > MAX_COORDINATE_M:
        raise EditError(f"{what} of {value:g} m is beyond the {MAX_COORDINATE_M:g} m limit")
    return float(value)


def _positive(value: object, what: str) -> float:
    number = _finite(value, what)
    if number <= 0.0:
        raise EditError(f"{what} must be greater than zero, got {number:g} m")
    return number


def _optional_positive(value: object, what: str) -> float | None:
    return None if value is None else _positive(value, what)


def _point(xy: object, what: str) -> XY:
    if not isinstance(xy, tuple) or len(xy) != 2:
        raise EditError(f"{what} must be an (x, y) pair, got {xy!r}")
    return (_finite(xy[0], f"{what} x"), _finite(xy[1], f"{what} y"))


def _text(value: object, what: str) -> str:
    if not isinstance(value, str):
        raise EditError(f"{what} must be text, got {value!r}")
    try:
        value.encode("utf-8")
    except UnicodeEncodeError as error:  # a lone UTF-16 surrogate: such text could never be saved
        raise EditError(f"{what} holds a character that is not valid text, at position "
                        f"{error.start + 1}") from error
    return value


def _choice(value: object, allowed: tuple[_Choice, ...], what: str) -> _Choice:
    for candidate in allowed:
        if value == candidate:
            return candidate
    raise EditError(f"{what} must be one of {', '.join(allowed)}; got {value!r}")


def _check_vertices(vertices: tuple[Vertex, ...], owner: str) -> None:
    for index, vertex in enumerate(vertices):
        if not isinstance(vertex, Vertex):
            raise EditError(f"{owner}: vertex {index} is not a Vertex, got {vertex!r}")
        _point((vertex.x_m, vertex.y_m), f"{owner}: vertex {index}")
        _optional_positive(vertex.corner_radius_m, f"{owner}: corner radius at vertex {index}")


def _check_has_length(vertices: tuple[Vertex, ...], owner: str) -> None:
    """Refuse a line whose vertices all lie on one point: it has no direction, so it can make no
    segment, junction or pavement (the engine merges vertices this close; geometry.centerline)."""
    first = vertices[0]
    if all(math.hypot(v.x_m - first.x_m, v.y_m - first.y_m) <= DUPLICATE_VERTEX_TOLERANCE_M
           for v in vertices):
        raise EditError(f"{owner} has all its vertices at one point ({first.x_m:g}, {first.y_m:g}) m: "
                        f"move a vertex away, or delete it")


def _check_centerline(centerline: Centerline) -> None:
    owner = f"centerline {centerline.id!r}"
    if not isinstance(centerline.vertices, tuple) or len(centerline.vertices) < 2:
        raise EditError(f"{owner} needs at least 2 vertices")
    _check_vertices(centerline.vertices, owner)
    _check_has_length(centerline.vertices, owner)
    for end in (centerline.vertices[0], centerline.vertices[-1]):
        if end.corner_radius_m is not None:
            raise EditError(f"{owner}: an end vertex has no corner to round")
    _text(centerline.name, f"{owner}: name")
    _choice(centerline.kind, CENTERLINE_KINDS, f"{owner}: kind")
    _check_group(centerline.group, owner)
    _optional_positive(centerline.width_override_m, f"{owner}: width")


def _check_group(group: DesignGroup, owner: str) -> None:
    if not isinstance(group, DesignGroup):
        raise EditError(f"{owner}: group must be a DesignGroup, got {group!r}")
    for value, allowed, what in ((group.tdg, TDG_VALUES, "TDG"), (group.adg, ADG_VALUES, "ADG"),
                                 (group.code_letter, CODE_LETTERS, "code letter")):
        if value is not None:
            _choice(value, allowed, f"{owner}: {what}")


def _check_runway(runway: Runway) -> None:
    owner = f"runway {runway.id!r}"
    if not isinstance(runway.vertices, tuple) or len(runway.vertices) != 2:
        raise EditError(f"{owner} needs exactly 2 vertices (its two thresholds)")
    _check_vertices(runway.vertices, owner)
    _check_has_length(runway.vertices, owner)
    if any(vertex.corner_radius_m is not None for vertex in runway.vertices):
        raise EditError(f"{owner}: a runway threshold has no corner to round")
    _text(runway.designation, f"{owner}: designation")
    _positive(runway.width_m, f"{owner}: width")
    if not isinstance(runway.instrument, bool):
        raise EditError(f"{owner}: instrument must be True or False, got {runway.instrument!r}")


def _check_outline(outline: tuple[XY, ...], minimum: int, owner: str) -> None:
    if not isinstance(outline, tuple) or len(outline) < minimum:
        raise EditError(f"{owner} needs at least {minimum} outline point(s)")
    for index, xy in enumerate(outline):
        _point(xy, f"{owner}: point {index}")


def _check_object(obj: FixedObject) -> None:
    owner = f"object {obj.id!r}"
    _check_outline(obj.outline, 1, owner)
    _text(obj.name, f"{owner}: name")
    height_m = _finite(obj.height_m, f"{owner}: height")
    if height_m < 0.0:
        raise EditError(f"{owner}: height must not be negative, got {height_m:g} m")
    _choice(obj.kind, OBJECT_KINDS, f"{owner}: kind")


def _check_pavement(pavement: ExistingPavement) -> None:
    owner = f"existing pavement {pavement.id!r}"
    _check_outline(pavement.outline, 3, owner)
    if not isinstance(pavement.holes, tuple):
        raise EditError(f"{owner}: holes must be a tuple of outlines")
    for index, hole in enumerate(pavement.holes):
        _check_outline(hole, 3, f"{owner}: hole {index}")
    _text(pavement.name, f"{owner}: name")


def _check_element(element: Element) -> None:
    if isinstance(element, Centerline):
        _check_centerline(element)
    elif isinstance(element, Runway):
        _check_runway(element)
    elif isinstance(element, FixedObject):
        _check_object(element)
    elif isinstance(element, ExistingPavement):
        _check_pavement(element)
    else:
        raise EditError(f"not a layout element: {element!r}")


# --- finding and replacing elements ----------------------------------------------------------

def _require(layout: Layout, element_id: object, kind: type[Any], what: str) -> Any:
    element = element_by_id(layout, element_id) if isinstance(element_id, str) else None
    if element is None:
        raise EditError(f"the layout has no {what} with id {element_id!r}")
    if not isinstance(element, kind):
        raise EditError(f"{element_id!r} is not a {what}")
    return element


def _with_replaced(layout: Layout, new_elements: dict[str, Element]) -> Layout:
    """``layout`` with the elements whose ids are keys of ``new_elements`` swapped in place."""
    for element in new_elements.values():
        _check_element(element)
    fields: dict[str, Any] = {}
    for name, elements in zip(("centerlines", "runways", "objects", "existing_pavements"),
                              element_tuples(layout), strict=True):
        if any(element.id in new_elements for element in elements):
            fields[name] = tuple(new_elements.get(element.id, element) for element in elements)
    return replace(layout, **fields)


def _add(layout: Layout, element: Element, field_name: str, kind: type[Any], what: str) -> Layout:
    if not isinstance(element, kind):
        raise EditError(f"expected a {what}, got {element!r}")
    if not isinstance(element.id, str) or not element.id.strip():
        raise EditError(f"a {what} needs a non-empty id")
    if element.id in element_ids(layout):
        raise EditError(f"the id {element.id!r} is already used in this layout")
    _check_element(element)
    fields: dict[str, Any] = {field_name: (*getattr(layout, field_name), element)}
    return replace(layout, **fields)


def add_centerline(layout: Layout, centerline: Centerline) -> Layout:
    return _add(layout, centerline, "centerlines", Centerline, "centerline")


def add_runway(layout: Layout, runway: Runway) -> Layout:
    return _add(layout, runway, "runways", Runway, "runway")


def add_object(layout: Layout, obj: FixedObject) -> Layout:
    return _add(layout, obj, "objects", FixedObject, "object")


def add_existing_pavement(layout: Layout, pavement: ExistingPavement) -> Layout:
    return _add(layout, pavement, "existing_pavements", ExistingPavement, "existing pavement")


def remove_elements(layout: Layout, ids: Iterable[str]) -> Layout:
    """``layout`` without the elements ``ids``. Exclusions and radius overrides are kept: their
    keys name movements and corners, which the analysis ignores once they no longer exist."""
    doomed = frozenset(ids)
    unknown = sorted(str(element_id) for element_id in doomed - element_ids(layout))
    if unknown:
        raise EditError(f"the layout has no element with id {', '.join(map(repr, unknown))}")
    fields: dict[str, Any] = {}
    for name, elements in zip(("centerlines", "runways", "objects", "existing_pavements"),
                              element_tuples(layout), strict=True):
        if any(element.id in doomed for element in elements):
            fields[name] = tuple(element for element in elements if element.id not in doomed)
    return replace(layout, **fields)


# --- vertices ----------------------------------------------------------------------------------

def _index(index: object, count: int, owner: str, *, allow_end: bool = False) -> int:
    upper = count if allow_end else count - 1
    if isinstance(index, bool) or not isinstance(index, int) or not 0 <= index <= upper:
        raise EditError(f"{owner} has no vertex {index!r} (valid: 0 to {upper})")
    return index


def _moved(element: Element, index: int, x_m: float, y_m: float) -> Element:
    """``element`` with its vertex (or outline point) ``index`` at (x_m, y_m)."""
    if isinstance(element, (Centerline, Runway)):
        vertices: list[Any] = list(element.vertices)
        _index(index, len(vertices), repr(element.id))
        vertices[index] = replace(vertices[index], x_m=x_m, y_m=y_m)
        return replace(element, vertices=tuple(vertices))
    outline = list(element.outline)
    _index(index, len(outline), repr(element.id))
    outline[index] = (x_m, y_m)
    return replace(element, outline=tuple(outline))


def move_vertex(layout: Layout, element_id: str, index: int, x_m: float, y_m: float) -> Layout:
    """Move vertex ``index`` of a centerline or runway (or outline point of an object or existing
    pavement) to (x_m, y_m); a centerline vertex keeps its corner radius."""
    return move_points(layout, ((element_id, index, x_m, y_m),))


def move_points(layout: Layout, moves: Iterable[tuple[str, int, float, float]]) -> Layout:
    """Several :func:`move_vertex` at once (a junction dragged with every vertex on it)."""
    changed: dict[str, Element] = {}
    seen: set[tuple[str, int]] = set()
    for element_id, index, x_m, y_m in moves:
        element = changed.get(element_id) or _require(layout, element_id, object, "element")
        point = (_finite(x_m, "x"), _finite(y_m, "y"))
        changed[element_id] = _moved(element, index, *point)
        if (element_id, index) in seen:
            raise EditError(f"vertex {index} of {element_id!r} is moved twice in one edit")
        seen.add((element_id, index))
    return _with_replaced(layout, changed) if changed else layout


def insert_vertex(layout: Layout, centerline_id: str, index: int, x_m: float, y_m: float) -> Layout:
    """Insert a vertex (no corner radius) before vertex ``index``; ``index == len`` appends."""
    centerline: Centerline = _require(layout, centerline_id, Centerline, "centerline")
    _index(index, len(centerline.vertices), repr(centerline_id), allow_end=True)
    vertex = Vertex(_finite(x_m, "x"), _finite(y_m, "y"))
    vertices = list(centerline.vertices)
    vertices.insert(index, vertex)
    # A vertex that stops being an end keeps no radius; one that becomes an end loses its radius.
    return _with_replaced(layout, {centerline_id: centerline.with_vertices(_clear_end_radii(vertices))})


def delete_vertex(layout: Layout, centerline_id: str, index: int) -> Layout:
    """Delete vertex ``index``; a centerline keeps at least 2 vertices."""
    centerline: Centerline = _require(layout, centerline_id, Centerline, "centerline")
    _index(index, len(centerline.vertices), repr(centerline_id))
    if len(centerline.vertices) <= 2:
        raise EditError(f"centerline {centerline_id!r} must keep at least 2 vertices: "
                        f"delete the whole centerline instead")
    vertices = [v for i, v in enumerate(centerline.vertices) if i != index]
    return _with_replaced(layout, {centerline_id: centerline.with_vertices(_clear_end_radii(vertices))})


def _clear_end_radii(vertices: list[Vertex]) -> tuple[Vertex, ...]:
    for end in (0, -1):
        if vertices[end].corner_radius_m is not None:
            vertices[end] = replace(vertices[end], corner_radius_m=None)
    return tuple(vertices)


def set_corner_radius(layout: Layout, centerline_id: str, index: int, radius_m: float | None) -> Layout:
    """Round the corner at interior vertex ``index`` with ``radius_m`` (None: no rounding)."""
    centerline: Centerline = _require(layout, centerline_id, Centerline, "centerline")
    _index(index, len(centerline.vertices), repr(centerline_id))
    if index in (0, len(centerline.vertices) - 1):
        raise EditError(f"vertex {index} is an end of centerline {centerline_id!r}: "
                        f"only interior vertices have corners to round")
    radius = _optional_positive(radius_m, "corner radius")
    vertices = list(centerline.vertices)
    vertices[index] = replace(vertices[index], corner_radius_m=radius)
    return _with_replaced(layout, {centerline_id: centerline.with_vertices(tuple(vertices))})


def translate_elements(layout: Layout, ids: Iterable[str], dx_m: float, dy_m: float) -> Layout:
    """Shift the elements ``ids`` by (dx_m, dy_m)."""
    dx, dy = _finite(dx_m, "dx"), _finite(dy_m, "dy")
    changed: dict[str, Element] = {}
    for element_id in ids:
        element = _require(layout, element_id, object, "element")
        changed[element_id] = _shifted(element, dx, dy)
    return _with_replaced(layout, changed) if changed else layout


def _shifted(element: Element, dx: float, dy: float) -> Element:
    def shift(points: tuple[XY, ...]) -> tuple[XY, ...]:
        return tuple((x + dx, y + dy) for x, y in points)

    if isinstance(element, (Centerline, Runway)):
        vertices: Any = tuple(replace(v, x_m=v.x_m + dx, y_m=v.y_m + dy) for v in element.vertices)
        return replace(element, vertices=vertices)
    if isinstance(element, FixedObject):
        return replace(element, outline=shift(element.outline))
    return replace(element, outline=shift(element.outline),
                   holes=tuple(shift(hole) for hole in element.holes))


# --- element properties ------------------------------------------------------------------------

def _update(layout: Layout, element_id: str, kind: type[Any], what: str, allowed: frozenset[str],
            fields: dict[str, Any]) -> Layout:
    element = _require(layout, element_id, kind, what)
    unknown = sorted(set(fields) - allowed)
    if unknown:
        raise EditError(f"a {what} has no editable field {', '.join(unknown)} "
                        f"(editable: {', '.join(sorted(allowed))})")
    return _with_replaced(layout, {element_id: replace(element, **fields)})


def update_centerline(layout: Layout, centerline_id: str, **fields: Any) -> Layout:
    """Change ``name``, ``kind``, ``group`` or ``width_override_m`` of a centerline."""
    allowed = frozenset({"name", "kind", "group", "width_override_m"})
    return _update(layout, centerline_id, Centerline, "centerline", allowed, fields)


def update_runway(layout: Layout, runway_id: str, **fields: Any) -> Layout:
    """Change ``designation``, ``width_m`` or ``instrument`` of a runway."""
    allowed = frozenset({"designation", "width_m", "instrument"})
    return _update(layout, runway_id, Runway, "runway", allowed, fields)


def update_object(layout: Layout, object_id: str, **fields: Any) -> Layout:
    """Change ``name``, ``height_m``, ``kind`` or ``outline`` of a fixed object."""
    allowed = frozenset({"name", "height_m", "kind", "outline"})
    return _update(layout, object_id, FixedObject, "object", allowed, fields)


def update_existing_pavement(layout: Layout, pavement_id: str, **fields: Any) -> Layout:
    """Change ``name``, ``outline`` or ``holes`` of an existing pavement."""
    allowed = frozenset({"name", "outline", "holes"})
    return _update(layout, pavement_id, ExistingPavement, "existing pavement", allowed, fields)


# --- layout settings ---------------------------------------------------------------------------

def set_fleet(layout: Layout, fleet: Iterable[DesignAircraft]) -> Layout:
    """Replace the fleet; aircraft names must be unique (findings and tracks refer to them)."""
    aircraft = tuple(fleet)
    names: set[str] = set()
    for entry in aircraft:
        if not isinstance(entry, DesignAircraft):
            raise EditError(f"the fleet holds design aircraft only, got {entry!r}")
        if not entry.name.strip() or entry.name in names:
            raise EditError(f"each aircraft of the fleet needs its own name; {entry.name!r} "
                            f"is empty or used twice")
        names.add(entry.name)
    return replace(layout, fleet=aircraft)


def set_rule_set(layout: Layout, name: str) -> Layout:
    return replace(layout, rule_set=_choice(name, RULE_SET_NAMES, "rule set"))


def set_units(layout: Layout, units: LengthUnit) -> Layout:
    """Change the display and file units; stored values stay in metres and do not change."""
    return replace(layout, units=_choice(units, LENGTH_UNITS, "units"))


def set_title_notes(layout: Layout, title: str, notes: str) -> Layout:
    return replace(layout, title=_text(title, "title"), notes=_text(notes, "notes"))


def set_movement_excluded(layout: Layout, movement_key: str, excluded: bool) -> Layout:
    """Exclude a movement from the design (or include it again)."""
    key = _text(movement_key, "movement key")
    if not key:
        raise EditError("movement key must not be empty")
    keys = layout.excluded_movements | {key} if excluded else layout.excluded_movements - {key}
    return replace(layout, excluded_movements=frozenset(keys))


def set_turn_radius_override(layout: Layout, corner_key: str, radius_m: float | None) -> Layout:
    """Use ``radius_m`` for the turn at ``corner_key`` instead of the rule set's (None: reset)."""
    key = _text(corner_key, "corner key")
    if not key:
        raise EditError("corner key must not be empty")
    radius = _optional_positive(radius_m, "turn radius")
    overrides = dict(layout.turn_radius_overrides_m)
    if radius is None:
        overrides.pop(key, None)
    else:
        overrides[key] = radius
    return replace(layout, turn_radius_overrides_m=tuple(sorted(overrides.items())))


def check_layout(layout: Layout) -> None:
    """Raise :class:`EditError` unless every element of ``layout`` is valid and ids are unique."""
    seen: set[str] = set()
    for element in iter_elements(layout):
        if element.id in seen:
            raise EditError(f"the id {element.id!r} is used twice")
        seen.add(element.id)
        _check_element(element)
    set_fleet(layout, layout.fleet)
    _check_underlays(layout.underlays)


# --- underlays (app.model.underlays) -----------------------------------------------------------

def _check_underlays(underlays: tuple[Underlay, ...]) -> None:
    ids = [getattr(underlay, "id", None) for underlay in underlays]
    for underlay in underlays:
        problem = underlay_problem(underlay)
        if problem is not None:
            raise EditError(problem)
        if ids.count(underlay.id) > 1:
            raise EditError(f"the underlay id {underlay.id!r} is used twice")


def _require_underlay(layout: Layout, underlay_id: str) -> Underlay:
    underlay = underlay_by_id(layout, underlay_id)
    if underlay is None:
        raise EditError(f"the layout has no underlay with id {underlay_id!r}")
    return underlay


def add_underlay(layout: Layout, underlay: Underlay) -> Layout:
    """Add ``underlay`` on top of the others."""
    underlays = (*layout.underlays, underlay)
    _check_underlays(underlays)
    return replace(layout, underlays=underlays)


def update_underlay(layout: Layout, underlay_id: str, **fields: Any) -> Layout:
    """Change ``name``, ``visible``, ``locked``, ``opacity``, ``hidden_layers``, ``path`` or
    ``placement``. A locked underlay keeps its placement unless the same call unlocks it; its
    file may be relinked (a moved file is the same underlay)."""
    allowed = frozenset({"name", "visible", "locked", "opacity", "hidden_layers", "path", "placement"})
    unknown = sorted(set(fields) - allowed)
    if unknown:
        raise EditError(f"an underlay has no editable field {', '.join(unknown)} "
                        f"(editable: {', '.join(sorted(allowed))})")
    old = _require_underlay(layout, underlay_id)
    new = replace(old, **fields)
    if new.locked and new.placement != old.placement:
        raise EditError(f"underlay {old.name!r} is locked: unlock it to change its placement")
    _check_underlays((new,))
    return replace(layout, underlays=tuple(new if u.id == underlay_id else u for u in layout.underlays))


def remove_underlay(layout: Layout, underlay_id: str) -> Layout:
    """``layout`` without the underlay (the file itself is not touched); refused while locked."""
    underlay = _require_underlay(layout, underlay_id)
    if underlay.locked:
        raise EditError(f"underlay {underlay.name!r} is locked: unlock it before removing it")
    return replace(layout, underlays=tuple(u for u in layout.underlays if u.id != underlay_id))


def move_underlay(layout: Layout, underlay_id: str, index: int) -> Layout:
    """Put the underlay at position ``index`` of the drawing order (0: lowest)."""
    underlay = _require_underlay(layout, underlay_id)
    count = len(layout.underlays)
    if isinstance(index, bool) or not isinstance(index, int) or not 0 <= index < count:
        raise EditError(f"underlay position {index!r} is out of range (valid: 0 to {count - 1})")
    others = [u for u in layout.underlays if u.id != underlay_id]
    others.insert(index, underlay)
    return replace(layout, underlays=tuple(others))


def add_pavements_from_outlines(layout: Layout, outlines: Iterable[Any],
                                name: str = "Existing pavement") -> Layout:
    """Turn closed outlines (picked from a base drawing, in metres) into existing pavement: a
    ring inside another becomes its hole (:func:`app.model.underlays.pavement_parts`)."""
    parts, _skipped = pavement_parts(outlines)
    if not parts:
        raise EditError("none of the outlines encloses an area: pick closed outlines that do not "
                        "cross themselves")
    return add_pavement_parts(layout, parts, name)


def add_pavement_parts(layout: Layout, parts: Iterable[PavementPart], name: str) -> Layout:
    """One ``ExistingPavement`` per part, with new ids; numbered names when there are several."""
    parts = tuple(parts)
    for number, part in enumerate(parts, start=1):
        label = f"{_text(name, 'name')} {number}" if len(parts) > 1 else name
        pavement = ExistingPavement(new_id(layout, PAVEMENT_PREFIX), label, part.outline, part.holes)
        layout = add_existing_pavement(layout, pavement)
    return layout
