"""Layout values (app/model/elements.py) and element ids (app/model/ids.py)."""

from dataclasses import FrozenInstanceError, replace

import pytest

from app.model.elements import (
    ELEMENT_FIELDS,
    SETTINGS_FIELDS,
    Centerline,
    ExistingPavement,
    FixedObject,
    Layout,
    Runway,
    Vertex,
    element_tuples,
    iter_elements,
    settings_differ,
)
from app.model.ids import element_by_id, element_ids, new_id
from geometry.aircraft import DesignAircraft

# A fictional demo aircraft (not a check value: only something to put in a fleet).
DEMO_AIRCRAFT = DesignAircraft("Demo twin", cmg_m=20.0, wheelbase_m=18.0, mgw_m=10.0, tyre_width_m=0.5,
                               wingspan_m=34.0, wingtip_x_m=-2.0, nose_x_m=23.0, tail_x_m=-16.0,
                               tail_height_m=12.0)


def sample_layout() -> Layout:
    return Layout(
        centerlines=(Centerline("twy-1", "A", (Vertex(0.0, 0.0), Vertex(100.0, 0.0))),
                     Centerline("twy-7", "B", (Vertex(0.0, 50.0), Vertex(100.0, 50.0)))),
        runways=(Runway("rwy-1", "18/36", (Vertex(0.0, -300.0), Vertex(0.0, 2700.0)), 45.0),),
        objects=(FixedObject("obj-1", "Shed", ((10.0, 10.0),), 5.0),),
        existing_pavements=(ExistingPavement("pav-1", "Apron", ((0.0, 0.0), (9.0, 0.0), (9.0, 9.0))),),
    )


def test_layout_is_an_immutable_value() -> None:
    layout = sample_layout()
    with pytest.raises(FrozenInstanceError):
        layout.title = "changed"  # type: ignore[misc]
    assert layout == sample_layout()  # identity: equal inputs give equal values


def test_iter_elements_visits_every_kind_in_field_order() -> None:
    layout = sample_layout()
    assert [e.id for e in iter_elements(layout)] == ["twy-1", "twy-7", "rwy-1", "obj-1", "pav-1"]  # identity
    assert element_tuples(layout) == tuple(getattr(layout, name) for name in ELEMENT_FIELDS)  # identity


@pytest.mark.parametrize("field_name, value", [
    ("fleet", (DEMO_AIRCRAFT,)),
    ("rule_set", "ICAO"),
    ("units", "m"),
    ("excluded_movements", frozenset({"j1:a>b"})),
    ("turn_radius_overrides_m", (("j1:a>b", 45.0),)),
])
def test_each_setting_counts_as_a_settings_change(field_name: str, value: object) -> None:
    assert field_name in SETTINGS_FIELDS
    before = sample_layout()
    assert settings_differ(before, replace(before, **{field_name: value}))  # identity


def test_title_and_elements_are_not_settings() -> None:
    before = sample_layout()
    assert not settings_differ(before, replace(before, title="Other", notes="n", centerlines=()))  # identity


def test_turn_radius_override_lookup() -> None:
    layout = replace(Layout(), turn_radius_overrides_m=(("a", 30.0), ("b", 60.0)))
    assert layout.turn_radius_override_m("b") == 60.0  # identity
    assert layout.turn_radius_override_m("c") is None  # identity


def test_new_id_counts_on_from_the_highest_number_of_its_prefix() -> None:
    layout = sample_layout()
    assert new_id(Layout(), "twy") == "twy-1"  # identity: naming scheme of app/model/ids.py
    assert new_id(layout, "twy") == "twy-8"  # identity
    assert new_id(layout, "rwy") == "rwy-2"  # identity
    assert new_id(layout, "pav") == "pav-2"  # identity
    assert new_id(layout, "gate") == "gate-1"  # identity


def test_new_id_ignores_ids_that_only_look_alike() -> None:
    odd = Layout(centerlines=(Centerline("twy-x", "", (Vertex(0, 0), Vertex(1, 0))),
                              Centerline("twyy-9", "", (Vertex(0, 0), Vertex(1, 0))),
                              Centerline("twy-²", "", (Vertex(0, 0), Vertex(1, 0)))))
    assert new_id(odd, "twy") == "twy-1"  # identity


def test_new_id_is_never_in_use() -> None:
    layout = sample_layout()
    for prefix in ("twy", "rwy", "obj", "pav"):
        assert new_id(layout, prefix) not in element_ids(layout)  # identity


def test_new_id_needs_a_prefix() -> None:
    with pytest.raises(ValueError, match="prefix"):
        new_id(Layout(), " ")


def test_element_by_id() -> None:
    layout = sample_layout()
    assert element_by_id(layout, "obj-1") is layout.objects[0]  # identity
    assert element_by_id(layout, "rwy-1") is layout.runways[0]  # identity
    assert element_by_id(layout, "nope") is None  # identity
