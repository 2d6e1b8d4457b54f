"""The demo aircraft library loads, every aircraft classifies, and bad data names its field."""

from __future__ import annotations

import json
import math
from dataclasses import fields
from typing import Any

import pytest

from app.fileio.aircraft_library import (
    AircraftDataError,
    aircraft_from_dict,
    aircraft_to_dict,
    library_from_json_text,
    load_demo_library,
)
from geometry.aircraft import DesignAircraft
from geometry.classify import (
    adg_of_aircraft,
    code_letter_of_aircraft,
    omgws_band_of_aircraft,
    tdg_of_aircraft,
)
from geometry.rulesets import SEPARATION_KINDS, get_rule_set


def _valid_dict() -> dict[str, Any]:
    return aircraft_to_dict(load_demo_library()[4])


def test_demo_library_loads_about_eight_fictional_aircraft() -> None:
    library = load_demo_library()
    assert 8 <= len(library) <= 10
    assert len({aircraft.name for aircraft in library}) == len(library)
    assert all(isinstance(aircraft, DesignAircraft) for aircraft in library)


def test_every_demo_entry_is_marked_fictional() -> None:
    from importlib import resources
    text = resources.files("app.data").joinpath("demo_aircraft.json").read_text(encoding="utf-8")
    for entry in json.loads(text)["aircraft"]:
        assert entry["notes"].startswith("fictional demo aircraft")


def test_demo_library_spans_small_to_very_large() -> None:
    library = load_demo_library()
    # Groups follow from the classification edges (sources in tests/geometry/test_classify.py).
    assert {tdg_of_aircraft(a) for a in library} >= {"1A", "3", "5", "7"}
    assert {adg_of_aircraft(a) for a in library} == {"I", "II", "III", "IV", "V", "VI"}
    assert {code_letter_of_aircraft(a) for a in library} == set("ABCDEF")
    assert {omgws_band_of_aircraft(a) for a in library} == {1, 2, 3, 4}


@pytest.mark.parametrize("name", ["FAA", "ICAO"])
def test_every_demo_aircraft_gets_answers_from_both_rule_sets(name: str) -> None:
    rules = get_rule_set(name)  # type: ignore[arg-type]
    for aircraft in load_demo_library():
        assert rules.straight_width(aircraft).value_m > aircraft.mgw_m
        assert rules.group_label(aircraft)
        for kind in SEPARATION_KINDS:
            # identity: a centerline separation leaves room for half the wingspan
            assert rules.separation(kind, aircraft).value_m > aircraft.wingspan_m / 2


def test_dict_round_trip_keeps_every_field() -> None:
    for aircraft in load_demo_library():
        data = aircraft_to_dict(aircraft)
        assert set(data) == {f.name for f in fields(DesignAircraft)}
        assert aircraft_from_dict(data) == aircraft


def test_steering_limit_may_be_left_out() -> None:
    data = _valid_dict()
    del data["max_steering_deg"]
    # Horonjeff pp. 86, 287: 50-degree design criterion (published).
    assert aircraft_from_dict(data).max_steering_deg == 50.0


def test_notes_are_ignored_but_unknown_keys_are_refused() -> None:
    data = _valid_dict() | {"notes": "anything"}
    assert aircraft_from_dict(data).name == data["name"]
    with pytest.raises(AircraftDataError, match=r"fleet\[3\]\.wing_span_m: unknown") as info:
        aircraft_from_dict(data | {"wing_span_m": 30.0}, "fleet[3]")
    assert info.value.field == "wing_span_m"


@pytest.mark.parametrize("field, bad", [
    ("wingspan_m", "35"), ("cmg_m", None), ("mgw_m", True), ("tail_x_m", math.nan),
    ("nose_x_m", [1.0]),
])
def test_bad_values_name_their_field(field: str, bad: object) -> None:
    data = _valid_dict() | {field: bad}
    with pytest.raises(AircraftDataError, match=f"aircraft.{field}") as info:
        aircraft_from_dict(data)
    assert info.value.field == field


def test_missing_field_is_named() -> None:
    data = _valid_dict()
    del data["wheelbase_m"]
    with pytest.raises(AircraftDataError, match="wheelbase_m: missing"):
        aircraft_from_dict(data)


def test_missing_or_blank_name_is_refused() -> None:
    with pytest.raises(AircraftDataError, match="name"):
        aircraft_from_dict(_valid_dict() | {"name": "  "})


def test_inconsistent_dimensions_are_reported_with_the_entry() -> None:
    data = _valid_dict() | {"tail_x_m": 5.0}
    with pytest.raises(AircraftDataError, match=r"^entry: .*tail"):
        aircraft_from_dict(data, "entry")


def test_a_non_object_entry_is_refused() -> None:
    with pytest.raises(AircraftDataError, match="object"):
        aircraft_from_dict([1, 2, 3], "fleet[0]")  # type: ignore[arg-type]


@pytest.mark.parametrize("text, message", [
    ("not json", "not valid JSON"),
    ("[]", "JSON object"),
    ('{"version": 2, "units": "m", "aircraft": []}', "version"),
    ('{"version": 1, "units": "ft", "aircraft": []}', "metres"),
    ('{"version": 1, "units": "m", "aircraft": []}', "non-empty list"),
])
def test_malformed_library_files_are_refused(text: str, message: str) -> None:
    with pytest.raises(AircraftDataError, match=message):
        library_from_json_text(text)


def test_duplicate_names_are_refused() -> None:
    entry = _valid_dict()
    text = json.dumps({"version": 1, "units": "m", "aircraft": [entry, entry]})
    with pytest.raises(AircraftDataError, match=r"aircraft\[1\]\.name: .* twice"):
        library_from_json_text(text)
