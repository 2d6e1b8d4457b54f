"""The layout file: versioned JSON (docs/file_format.md). Only ``json`` parses it; never eval or pickle.

Lengths and coordinates are written in the layout's own ``units`` and converted to metres (the
model's unit) on loading; fleet aircraft keep their field names and so stay in metres. A file
of an older format version is upgraded step by step through :data:`UPGRADES` before it is read.
Loading either returns a whole, valid :class:`Layout` or raises :class:`LayoutFileError` whose
message starts with the path of the offending field, e.g. ``centerlines[2].vertices[5].x``.
"""

from __future__ import annotations

import json
import math
import os
import stat
from collections.abc import Callable
from pathlib import Path
from typing import Any, TypeVar

from app.fileio.aircraft_library import (
    AIRCRAFT_FIELDS,
    NUMBER_FIELDS,
    AircraftDataError,
    aircraft_from_dict,
    aircraft_to_dict,
)
from app.fileio.atomic import write_atomic
from app.model.edits import EditError, check_layout
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
    ExistingPavement,
    FixedObject,
    Layout,
    Runway,
    Vertex,
)
from app.model.underlays import UNDERLAY_KINDS, Placement, Underlay, UnderlayError, underlay_problem
from geometry.aircraft import DesignAircraft
from geometry.units import LENGTH_UNITS, from_metres, to_metres

FORMAT_VERSION = 1
APPLICATION = "taxiwright"
MAX_FILE_BYTES = 64 * 1024 * 1024
MAX_ELEMENTS = 100_000
MAX_VERTICES = 1_000_000  # centerline and runway vertices plus outline and hole points
# Counted in the raw bytes before parsing, so that a small file of "[{},{},...]" cannot make the
# parser build tens of millions of objects (a 64 MiB one takes 1.7 GB; docs/robustness.md). A file
# at MAX_VERTICES, as written by save_layout, holds about 1.5 million brackets and 3 million commas.
MAX_JSON_CONTAINERS = 3 * MAX_VERTICES
MAX_JSON_ITEMS = 8 * MAX_VERTICES

JsonObject = dict[str, Any]
_T = TypeVar("_T")


class LayoutFileError(ValueError):
    """A layout file cannot be read: the message names the field (or position) and the problem."""


# --- writing -----------------------------------------------------------------------------------

def layout_to_dict(layout: Layout, base_dir: Path | None = None) -> JsonObject:
    """The JSON object of ``layout``, lengths in ``layout.units``; underlay paths relative to
    ``base_dir`` (the layout file's folder) when possible."""
    def length(value_m: float) -> float:
        return from_metres(value_m, layout.units)

    def pairs(points: tuple[XY, ...]) -> list[list[float]]:
        return [[length(x), length(y)] for x, y in points]

    def vertex(v: Vertex) -> JsonObject:
        radius = {} if v.corner_radius_m is None else {"corner_radius": length(v.corner_radius_m)}
        return {"x": length(v.x_m), "y": length(v.y_m), **radius}

    return {
        "format_version": FORMAT_VERSION, "application": APPLICATION, "units": layout.units,
        "title": layout.title, "notes": layout.notes, "rule_set": layout.rule_set,
        "fleet": [aircraft_to_dict(aircraft) for aircraft in layout.fleet],
        "centerlines": [{
            "id": c.id, "name": c.name, "kind": c.kind,
            "group": {"tdg": c.group.tdg, "adg": c.group.adg, "code_letter": c.group.code_letter},
            "width_override": None if c.width_override_m is None else length(c.width_override_m),
            "vertices": [vertex(v) for v in c.vertices]} for c in layout.centerlines],
        "runways": [{"id": r.id, "designation": r.designation, "width": length(r.width_m),
                     "instrument": r.instrument, "vertices": [vertex(v) for v in r.vertices]}
                    for r in layout.runways],
        "objects": [{"id": o.id, "name": o.name, "kind": o.kind, "height": length(o.height_m),
                     "outline": pairs(o.outline)} for o in layout.objects],
        "existing_pavements": [{"id": p.id, "name": p.name, "outline": pairs(p.outline),
                                "holes": [pairs(hole) for hole in p.holes]}
                               for p in layout.existing_pavements],
        "excluded_movements": sorted(layout.excluded_movements),
        "turn_radius_overrides": [{"corner": key, "radius": length(radius_m)}
                                  for key, radius_m in layout.turn_radius_overrides_m],
        "underlays": [_underlay_to_dict(u, length, base_dir) for u in layout.underlays],
    }


def _underlay_to_dict(u: Underlay, length: Callable[[float], float], base_dir: Path | None) -> JsonObject:
    relative = _relative_path(u.path, base_dir)
    return {"id": u.id, "name": u.name, "kind": u.kind, "path": relative,
            **({"absolute_path": u.path} if relative != u.path else {}),
            "visible": u.visible, "locked": u.locked, "opacity": u.opacity,
            "hidden_layers": sorted(u.hidden_layers), "assumed_units": u.assumed_units,
            "placement": None if u.placement is None else [length(t) for t in u.placement.terms()]}


def _relative_path(path: str, base_dir: Path | None) -> str:
    if base_dir is None:
        return path
    try:
        return Path(os.path.relpath(path, base_dir)).as_posix()
    except ValueError:  # another drive (Windows): only the absolute path can find it
        return path


def layout_to_bytes(layout: Layout, base_dir: Path | None = None) -> bytes:
    try:
        text = json.dumps(layout_to_dict(layout, base_dir), indent=1, ensure_ascii=False, allow_nan=False)
        return (text + "\n").encode("utf-8")  # UnicodeEncodeError (a lone surrogate) is a ValueError
    except ValueError as error:
        raise LayoutFileError(f"cannot save the layout: {error}") from error


def save_layout(layout: Layout, path: Path | str) -> None:
    """Write ``layout`` to ``path`` atomically (raises ``FileWriteError`` if it cannot)."""
    write_atomic(path, layout_to_bytes(layout, Path(path).absolute().parent))


# --- reading: file and JSON ----------------------------------------------------------------------

def load_layout(path: Path | str) -> Layout:
    """Read a layout file of any known format version."""
    return layout_from_dict(_parse_json(_read_bytes(Path(path))), Path(path).absolute().parent)


def _read_bytes(path: Path) -> bytes:
    try:
        if not stat.S_ISREG(os.stat(path).st_mode):  # before open(): a FIFO would block it
            raise LayoutFileError(f"{path}: not a regular file")
        # Checked again on the open file: the name may have been swapped for a FIFO or a device
        # since; O_NONBLOCK keeps the open of such a swapped-in FIFO from waiting for a writer.
        with os.fdopen(os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_BINARY", 0)),
                       "rb") as stream:
            opened = os.fstat(stream.fileno())
            if not stat.S_ISREG(opened.st_mode):
                raise LayoutFileError(f"{path}: not a regular file")
            if opened.st_size > MAX_FILE_BYTES:
                raise LayoutFileError(f"{path}: larger than {MAX_FILE_BYTES // 2**20} MiB; "
                                      f"not a layout file")
            data = stream.read(MAX_FILE_BYTES + 1)
    except OSError as error:
        raise LayoutFileError(f"{path}: cannot read the file ({error.strerror or error})") from error
    if len(data) > MAX_FILE_BYTES:
        raise LayoutFileError(f"{path}: larger than {MAX_FILE_BYTES // 2**20} MiB; not a layout file")
    return data


def _parse_json(data: bytes) -> Any:
    _check_json_size(data)
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError as error:
        raise LayoutFileError(f"byte {error.start}: not UTF-8 text, so not a layout file") from error
    try:
        # NaN and Infinity parse as floats here so that the field check names where they are.
        return json.loads(text, parse_constant=float, object_pairs_hook=_object_without_duplicates)
    except json.JSONDecodeError as error:
        raise LayoutFileError(f"line {error.lineno} column {error.colno}: not valid JSON "
                              f"({error.msg})") from error
    except RecursionError as error:
        raise LayoutFileError("the JSON is nested too deeply to be a layout file") from error
    except LayoutFileError:
        raise
    except ValueError as error:  # e.g. an integer with thousands of digits
        raise LayoutFileError(f"not valid JSON ({error})") from error


def _check_json_size(data: bytes) -> None:
    """Refuse, before parsing, bytes that would make more JSON values than any layout file holds.
    Brackets and commas inside strings count too: an over-count, harmless at these limits."""
    containers = data.count(b"{") + data.count(b"[")
    if containers > MAX_JSON_CONTAINERS:
        raise LayoutFileError(f"the file holds more than {MAX_JSON_CONTAINERS:,} JSON objects and lists; "
                              f"not a layout file")
    if data.count(b",") > MAX_JSON_ITEMS:
        raise LayoutFileError(f"the file holds more than {MAX_JSON_ITEMS:,} JSON values; not a layout file")


def _object_without_duplicates(pairs: list[tuple[str, Any]]) -> JsonObject:
    result: JsonObject = {}
    for key, value in pairs:
        if key in result:
            raise LayoutFileError(f"the key {key!r} appears twice in one JSON object")
        result[key] = value
    return result


# --- reading: versions -------------------------------------------------------------------------

def _upgrade_0_to_1(data: JsonObject) -> JsonObject:
    """Draft format 0: centerlines had ``"points": [[x, y], ...]`` and no corner radii."""
    upgraded = dict(data, format_version=1)
    centerlines = data.get("centerlines")
    if isinstance(centerlines, list):
        upgraded["centerlines"] = [_centerline_0_to_1(c, f"centerlines[{i}]")
                                   for i, c in enumerate(centerlines)]
    return upgraded


def _centerline_0_to_1(centerline: Any, path: str) -> Any:
    if not isinstance(centerline, dict) or "points" not in centerline:
        return centerline  # the version-1 reader reports what is wrong with it
    points = _list(centerline["points"], f"{path}.points")
    vertices = []
    for index, point in enumerate(points):
        where = f"{path}.points[{index}]"
        if not isinstance(point, list) or len(point) != 2:
            raise LayoutFileError(f"{where}: expected an [x, y] pair, got {_show(point)}")
        vertices.append({"x": _number(point[0], f"{where}[0]"), "y": _number(point[1], f"{where}[1]")})
    upgraded = {key: value for key, value in centerline.items() if key != "points"}
    upgraded["vertices"] = vertices
    return upgraded


# UPGRADES[n] turns a format-n object into a format-(n + 1) object without changing its input.
UPGRADES: dict[int, Callable[[JsonObject], JsonObject]] = {0: _upgrade_0_to_1}


def _upgraded(data: JsonObject) -> JsonObject:
    version = _field(data, "format_version", "")
    if isinstance(version, bool) or not isinstance(version, int):
        raise LayoutFileError(f"format_version: expected a whole number, got {_show(version)}")
    if version > FORMAT_VERSION:
        raise LayoutFileError(f"format_version: the file was made by a newer taxiwright (format "
                              f"{version}); this one reads formats up to {FORMAT_VERSION}")
    while version < FORMAT_VERSION:
        if version not in UPGRADES:
            raise LayoutFileError(f"format_version: unknown format version {version}")
        data = UPGRADES[version](data)
        version += 1
    return data


# --- reading: values ---------------------------------------------------------------------------

def _show(value: Any) -> str:
    if value is None or isinstance(value, bool):
        return json.dumps(value)
    if isinstance(value, (dict, list)):
        return "an object" if isinstance(value, dict) else "a list"
    text = repr(value)
    return text if len(text) <= 40 else text[:37] + "..."


def _at(path: str, key: str) -> str:
    return f"{path}.{key}" if path else key


def _field(data: JsonObject, key: str, path: str, default: Any = ...) -> Any:
    if key in data:
        return data[key]
    if default is ...:
        raise LayoutFileError(f"{_at(path, key)}: missing required field")
    return default


def _object(value: Any, path: str) -> JsonObject:
    if not isinstance(value, dict):
        raise LayoutFileError(f"{path or 'the file'}: expected a JSON object, got {_show(value)}")
    return value


def _list(value: Any, path: str) -> list[Any]:
    if not isinstance(value, list):
        raise LayoutFileError(f"{path}: expected a list, got {_show(value)}")
    return value


def _string(value: Any, path: str) -> str:
    if not isinstance(value, str):
        raise LayoutFileError(f"{path}: expected text, got {_show(value)}")
    try:
        value.encode("utf-8")
    except UnicodeEncodeError as error:  # JSON allows "\ud800" escapes; such text could never be saved
        raise LayoutFileError(f"{path}: character {error.start + 1} is half of a UTF-16 pair, "
                              f"not text") from error
    return value


def _choice(value: Any, allowed: tuple[_T, ...], path: str) -> _T:
    for candidate in allowed:
        if value == candidate and isinstance(value, str):
            return candidate
    raise LayoutFileError(f"{path}: expected one of {', '.join(map(str, allowed))}, got {_show(value)}")


def _number(value: Any, path: str) -> float:
    try:
        number = float(value) if isinstance(value, (int, float)) and not isinstance(value, bool) else None
    except OverflowError:  # an integer literal beyond the float range
        number = None
    if number is None or not math.isfinite(number):
        raise LayoutFileError(f"{path}: expected a finite number, got {_show(value)}")
    return number


def _metres(value: Any, path: str, units: str, *, positive: bool = False) -> float:
    value_m = to_metres(_number(value, path), units)
    if abs(value_m) > MAX_COORDINATE_M:
        raise LayoutFileError(f"{path}: {value:g} {units} is beyond the {MAX_COORDINATE_M:g} m limit")
    if positive and value_m <= 0.0:
        raise LayoutFileError(f"{path}: expected a length greater than zero, got {value:g}")
    return value_m


class _Reader:
    """Reads the version-1 object, remembering where each id was seen."""

    def __init__(self, units: str) -> None:
        self.units = units
        self.id_paths: dict[str, str] = {}

    def length(self, data: JsonObject, key: str, path: str) -> float:
        return _metres(_field(data, key, path), _at(path, key), self.units, positive=True)

    def optional_length(self, data: JsonObject, key: str, path: str) -> float | None:
        value = _field(data, key, path, None)
        return None if value is None else _metres(value, _at(path, key), self.units, positive=True)

    def element_id(self, data: JsonObject, path: str) -> str:
        element_id = _string(_field(data, "id", path), f"{path}.id")
        if not element_id.strip():
            raise LayoutFileError(f"{path}.id: an element id must not be empty")
        if element_id in self.id_paths:
            raise LayoutFileError(f"{path}.id: duplicate id {element_id!r} "
                                  f"(also used by {self.id_paths[element_id]})")
        self.id_paths[element_id] = path
        return element_id

    def vertices(self, data: JsonObject, path: str, minimum: int) -> tuple[Vertex, ...]:
        items = _list(_field(data, "vertices", path), f"{path}.vertices")
        if len(items) < minimum:
            raise LayoutFileError(f"{path}.vertices: expected at least {minimum} vertices, got {len(items)}")
        vertices = []
        for index, item in enumerate(items):
            where = f"{path}.vertices[{index}]"
            vertex = _object(item, where)
            radius_m = self.optional_length(vertex, "corner_radius", where)
            if radius_m is not None and index in (0, len(items) - 1):
                raise LayoutFileError(f"{where}.corner_radius: an end vertex has no corner to round")
            vertices.append(Vertex(_metres(_field(vertex, "x", where), f"{where}.x", self.units),
                                   _metres(_field(vertex, "y", where), f"{where}.y", self.units),
                                   radius_m))
        return tuple(vertices)

    def points(self, value: Any, path: str, minimum: int) -> tuple[XY, ...]:
        items = _list(value, path)
        if len(items) < minimum:
            raise LayoutFileError(f"{path}: expected at least {minimum} points, got {len(items)}")
        points = []
        for index, item in enumerate(items):
            where = f"{path}[{index}]"
            if not isinstance(item, list) or len(item) != 2:
                raise LayoutFileError(f"{where}: expected an [x, y] pair, got {_show(item)}")
            points.append((_metres(item[0], f"{where}[0]", self.units),
                           _metres(item[1], f"{where}[1]", self.units)))
        return tuple(points)

    def centerline(self, data: JsonObject, path: str) -> Centerline:
        group = _object(_field(data, "group", path, {}), f"{path}.group")
        return Centerline(
            id=self.element_id(data, path), name=_string(_field(data, "name", path, ""), f"{path}.name"),
            vertices=self.vertices(data, path, 2),
            kind=_choice(_field(data, "kind", path, "taxiway"), CENTERLINE_KINDS, f"{path}.kind"),
            group=DesignGroup(*(_optional_choice(group, key, allowed, f"{path}.group")
                                for key, allowed in (("tdg", TDG_VALUES), ("adg", ADG_VALUES),
                                                     ("code_letter", CODE_LETTERS)))),
            width_override_m=self.optional_length(data, "width_override", path))

    def runway(self, data: JsonObject, path: str) -> Runway:
        element_id = self.element_id(data, path)
        first, second, *rest = self.vertices(data, path, 2)
        if rest:
            raise LayoutFileError(f"{path}.vertices: a runway has exactly 2 vertices, got {2 + len(rest)}")
        instrument = _field(data, "instrument", path, True)
        if not isinstance(instrument, bool):
            raise LayoutFileError(f"{path}.instrument: expected true or false, got {_show(instrument)}")
        return Runway(element_id, _string(_field(data, "designation", path, ""), f"{path}.designation"),
                      (first, second), self.length(data, "width", path), instrument)

    def fixed_object(self, data: JsonObject, path: str) -> FixedObject:
        height = _field(data, "height", path)
        height_m = _metres(height, f"{path}.height", self.units)
        if height_m < 0.0:
            raise LayoutFileError(f"{path}.height: expected a height of zero or more, got {height:g}")
        return FixedObject(self.element_id(data, path),
                           _string(_field(data, "name", path, ""), f"{path}.name"),
                           self.points(_field(data, "outline", path), f"{path}.outline", 1), height_m,
                           _choice(_field(data, "kind", path, "building"), OBJECT_KINDS, f"{path}.kind"))

    def pavement(self, data: JsonObject, path: str) -> ExistingPavement:
        holes = _list(_field(data, "holes", path, []), f"{path}.holes")
        return ExistingPavement(
            self.element_id(data, path), _string(_field(data, "name", path, ""), f"{path}.name"),
            self.points(_field(data, "outline", path), f"{path}.outline", 3),
            tuple(self.points(hole, f"{path}.holes[{i}]", 3) for i, hole in enumerate(holes)))


def _bool(data: JsonObject, key: str, path: str, default: bool) -> bool:
    value = _field(data, key, path, default)
    if not isinstance(value, bool):
        raise LayoutFileError(f"{_at(path, key)}: expected true or false, got {_show(value)}")
    return value


def _underlay(data: JsonObject, path: str, units: str, base_dir: Path | None) -> Underlay:
    kind = _choice(_field(data, "kind", path), UNDERLAY_KINDS, f"{path}.kind")
    opacity = _number(_field(data, "opacity", path, 0.6), f"{path}.opacity")
    hidden = _list(_field(data, "hidden_layers", path, []), f"{path}.hidden_layers")
    assumed = _field(data, "assumed_units", path, None)
    terms = _field(data, "placement", path, None)
    if terms is not None and (not isinstance(terms, list) or len(terms) != 6):
        raise LayoutFileError(f"{path}.placement: expected the 6 terms A, D, B, E, C, F, got {_show(terms)}")
    try:
        underlay = Underlay(
            _string(_field(data, "id", path), f"{path}.id"),
            _string(_field(data, "name", path, ""), f"{path}.name"), kind,
            _file_path(data, path, base_dir), _bool(data, "visible", path, True),
            _bool(data, "locked", path, True), opacity,
            frozenset(_string(name, f"{path}.hidden_layers[{i}]") for i, name in enumerate(hidden)),
            None if assumed is None else _choice(assumed, LENGTH_UNITS, f"{path}.assumed_units"),
            None if terms is None else Placement(*(_metres(t, f"{path}.placement[{i}]", units)
                                                  for i, t in enumerate(terms))))
    except UnderlayError as error:
        raise LayoutFileError(f"{path}.placement: {error}") from error
    problem = underlay_problem(underlay)
    if problem is not None:
        raise LayoutFileError(f"{path}: {problem}")
    return underlay


def _file_path(data: JsonObject, path: str, base_dir: Path | None) -> str:
    """The underlay's absolute path: the stored path against the layout's folder; if no file is
    there, the absolute path saved beside it (the layout file was moved without its underlays)."""
    stored = Path(_string(_field(data, "path", path), f"{path}.path"))
    resolved = stored if stored.is_absolute() or base_dir is None else base_dir / stored
    fallback = _field(data, "absolute_path", path, None)
    fallback_path = None if fallback is None else Path(_string(fallback, f"{path}.absolute_path"))
    if fallback_path is not None and not resolved.exists() and fallback_path.exists():
        resolved = fallback_path
    return os.path.normpath(os.path.abspath(resolved))


def _optional_choice(data: JsonObject, key: str, allowed: tuple[str, ...], path: str) -> str | None:
    value = _field(data, key, path, None)
    return None if value is None else _choice(value, allowed, _at(path, key))


def _aircraft_from_dict(value: Any, path: str) -> DesignAircraft:
    data = _object(value, path)
    # Keys this version does not know are left out (forward compatibility), unlike in a library file.
    known = {key: data[key] for key in AIRCRAFT_FIELDS if key in data}
    if isinstance(known.get("name"), str):
        _string(known["name"], _at(path, "name"))
    for key in NUMBER_FIELDS:
        if key in known:
            known[key] = (_metres(known[key], _at(path, key), "m") if key.endswith("_m")
                          else _number(known[key], _at(path, key)))
    try:
        return aircraft_from_dict(known, path)
    except AircraftDataError as error:
        raise LayoutFileError(str(error)) from error


def _elements(data: JsonObject, key: str, read: Callable[[JsonObject, str], _T]) -> tuple[_T, ...]:
    return tuple(read(_object(item, f"{key}[{i}]"), f"{key}[{i}]")
                 for i, item in enumerate(_list(_field(data, key, "", []), key)))


def _check_counts(data: JsonObject) -> None:
    """Refuse absurd sizes before reading any element (lists of the wrong type are reported later)."""
    elements = vertices = 0
    for key in ("centerlines", "runways", "objects", "existing_pavements"):
        items = data.get(key, [])
        elements += len(items) if isinstance(items, list) else 0
        if elements > MAX_ELEMENTS:
            raise LayoutFileError(f"{key}: the file holds more than {MAX_ELEMENTS:,} elements")
        for index, item in enumerate(items if isinstance(items, list) else ()):
            for name, points in _point_lists(item):
                vertices += len(points)
                if vertices > MAX_VERTICES:
                    raise LayoutFileError(f"{key}[{index}].{name}: the file holds more than "
                                          f"{MAX_VERTICES:,} vertices")


def _point_lists(item: Any) -> list[tuple[str, list[Any]]]:
    if not isinstance(item, dict):
        return []
    found = [(name, item[name]) for name in ("vertices", "outline") if isinstance(item.get(name), list)]
    holes = item.get("holes")
    if isinstance(holes, list):
        found += [(f"holes[{i}]", hole) for i, hole in enumerate(holes) if isinstance(hole, list)]
    return found


def _settings(data: JsonObject, units: str) -> dict[str, Any]:
    fleet = tuple(_aircraft_from_dict(item, f"fleet[{i}]")
                  for i, item in enumerate(_list(_field(data, "fleet", "", []), "fleet")))
    names = [aircraft.name for aircraft in fleet]
    for index, name in enumerate(names):
        if name in names[:index]:
            raise LayoutFileError(f"fleet[{index}].name: the fleet already has an aircraft {name!r}")
    excluded = _list(_field(data, "excluded_movements", "", []), "excluded_movements")
    overrides: dict[str, float] = {}
    items = _list(_field(data, "turn_radius_overrides", "", []), "turn_radius_overrides")
    for index, item in enumerate(items):
        where = f"turn_radius_overrides[{index}]"
        entry = _object(item, where)
        key = _string(_field(entry, "corner", where), f"{where}.corner")
        if key in overrides:
            raise LayoutFileError(f"{where}.corner: a second override for corner {key!r}")
        overrides[key] = _metres(_field(entry, "radius", where), f"{where}.radius", units, positive=True)
    return {"fleet": fleet,
            "excluded_movements": frozenset(_string(key, f"excluded_movements[{i}]")
                                            for i, key in enumerate(excluded)),
            "turn_radius_overrides_m": tuple(sorted(overrides.items()))}


def layout_from_dict(data: Any, base_dir: Path | None = None) -> Layout:
    """The layout of a parsed layout file (of any known version); ``data`` is not changed.
    Relative underlay paths are taken from ``base_dir`` (the layout file's folder)."""
    data = _object(data, "")
    application = _field(data, "application", "")
    if application != APPLICATION:
        raise LayoutFileError(f"application: not a taxiwright layout (got {_show(application)})")
    data = _upgraded(data)
    units = _choice(_field(data, "units", ""), LENGTH_UNITS, "units")
    _check_counts(data)
    reader = _Reader(units)
    layout = Layout(
        title=_string(_field(data, "title", "", "Untitled layout"), "title"),
        notes=_string(_field(data, "notes", "", ""), "notes"),
        rule_set=_choice(_field(data, "rule_set", ""), RULE_SET_NAMES, "rule_set"), units=units,
        centerlines=_elements(data, "centerlines", reader.centerline),
        runways=_elements(data, "runways", reader.runway),
        objects=_elements(data, "objects", reader.fixed_object),
        existing_pavements=_elements(data, "existing_pavements", reader.pavement),
        underlays=tuple(_underlay(_object(item, f"underlays[{i}]"), f"underlays[{i}]", units, base_dir)
                        for i, item in enumerate(_list(_field(data, "underlays", "", []), "underlays"))),
        **_settings(data, units))
    try:
        check_layout(layout)  # the model's own rules, in case the reader missed one
    except EditError as error:
        raise LayoutFileError(f"invalid layout: {error}") from error
    return layout
