"""Design aircraft as plain dicts, and the demo aircraft library shipped in ``app/data``.

An aircraft dict has exactly the field names of :class:`geometry.aircraft.DesignAircraft` as
keys, lengths in metres and angles in degrees (``max_steering_deg`` may be left out: it defaults
to the 50-degree design criterion). The layout file format uses the same dicts. A ``notes`` key
is allowed and ignored; any other key is refused, so a misspelt field is not silently lost.

Qt-free: this module reads packaged data with :mod:`importlib.resources` only.
"""

from __future__ import annotations

import json
import math
from collections.abc import Mapping
from dataclasses import fields
from importlib import resources

from geometry.aircraft import DEFAULT_MAX_STEERING_DEG, DesignAircraft

AIRCRAFT_FIELDS: tuple[str, ...] = tuple(f.name for f in fields(DesignAircraft))
NUMBER_FIELDS: tuple[str, ...] = tuple(name for name in AIRCRAFT_FIELDS if name != "name")
OPTIONAL_DEFAULTS: dict[str, float] = {"max_steering_deg": DEFAULT_MAX_STEERING_DEG}
IGNORED_KEYS = frozenset({"notes"})
DEMO_LIBRARY_PACKAGE = "app.data"
DEMO_LIBRARY_FILE = "demo_aircraft.json"
LIBRARY_VERSION = 1


class AircraftDataError(ValueError):
    """Aircraft data cannot be read; ``field`` names the offending field when there is one."""

    def __init__(self, message: str, field: str | None = None) -> None:
        super().__init__(message)
        self.field = field


def aircraft_to_dict(aircraft: DesignAircraft) -> dict[str, str | float]:
    """The aircraft as a dict keyed by its field names (metres, degrees)."""
    return {name: getattr(aircraft, name) for name in AIRCRAFT_FIELDS}


def aircraft_from_dict(data: Mapping[str, object], where: str = "aircraft") -> DesignAircraft:
    """A design aircraft from a dict made by :func:`aircraft_to_dict` (or written by hand).

    ``where`` prefixes error messages (e.g. ``"fleet[2]"``) so a planner can find the entry.
    """
    if not isinstance(data, Mapping):
        raise AircraftDataError(f"{where}: an aircraft must be an object of named fields, "
                                f"got {type(data).__name__}")
    unknown = sorted(set(data) - set(AIRCRAFT_FIELDS) - IGNORED_KEYS)
    if unknown:
        raise AircraftDataError(f"{where}.{unknown[0]}: unknown aircraft field; expected "
                                f"{', '.join(AIRCRAFT_FIELDS)}", unknown[0])
    name = _name(data, where)
    numbers = {field: _number(data, field, where) for field in NUMBER_FIELDS}
    try:
        return DesignAircraft(name=name, **numbers)
    except ValueError as error:
        raise AircraftDataError(f"{where}: {error}") from error


def _name(data: Mapping[str, object], where: str) -> str:
    name = data.get("name")
    if not isinstance(name, str) or not name.strip():
        raise AircraftDataError(f"{where}.name: give the aircraft a name (text)", "name")
    return name


def _number(data: Mapping[str, object], field: str, where: str) -> float:
    if field not in data:
        if field in OPTIONAL_DEFAULTS:
            return OPTIONAL_DEFAULTS[field]
        raise AircraftDataError(f"{where}.{field}: missing; every aircraft needs it", field)
    value = data[field]
    # bool is an int in Python, but true/false is never a dimension.
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise AircraftDataError(f"{where}.{field}: must be a number, got {value!r}", field)
    if not math.isfinite(value):
        raise AircraftDataError(f"{where}.{field}: must be a finite number, got {value!r}", field)
    return float(value)


def library_from_json_text(text: str, where: str = "library") -> tuple[DesignAircraft, ...]:
    """Aircraft of a library file: ``{"version": 1, "units": "m", "aircraft": [...]}``."""
    try:
        document = json.loads(text)
    except json.JSONDecodeError as error:
        raise AircraftDataError(f"{where}: not valid JSON ({error})") from error
    if not isinstance(document, dict):
        raise AircraftDataError(f"{where}: the library must be a JSON object")
    if document.get("version") != LIBRARY_VERSION:
        raise AircraftDataError(f"{where}.version: expected {LIBRARY_VERSION}, got "
                                f"{document.get('version')!r}", "version")
    if document.get("units") != "m":
        raise AircraftDataError(f"{where}.units: library dimensions must be in metres ('m')",
                                "units")
    entries = document.get("aircraft")
    if not isinstance(entries, list) or not entries:
        raise AircraftDataError(f"{where}.aircraft: expected a non-empty list", "aircraft")
    library = tuple(aircraft_from_dict(entry, f"{where}.aircraft[{index}]")
                    for index, entry in enumerate(entries))
    _require_unique_names(library, where)
    return library


def _require_unique_names(library: tuple[DesignAircraft, ...], where: str) -> None:
    seen: set[str] = set()
    for index, aircraft in enumerate(library):
        if aircraft.name in seen:
            raise AircraftDataError(f"{where}.aircraft[{index}].name: {aircraft.name!r} appears "
                                    f"twice", "name")
        seen.add(aircraft.name)


def load_demo_library() -> tuple[DesignAircraft, ...]:
    """The fictional demo aircraft shipped with taxiwright, smallest first."""
    text = resources.files(DEMO_LIBRARY_PACKAGE).joinpath(DEMO_LIBRARY_FILE).read_text(
        encoding="utf-8")
    return library_from_json_text(text, DEMO_LIBRARY_FILE)
