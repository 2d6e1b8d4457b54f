"""The layout file format (app/fileio/layout_json.py, docs/file_format.md).

Expected values follow from the format's own definition ("identity") or from the exact foot:
1 ft = 0.3048 m (international foot, 1959 agreement; geometry/units.py).
"""

import copy
import json
import math
import os
import re
from collections.abc import Callable
from dataclasses import fields, is_dataclass, replace
from pathlib import Path
from typing import Any

import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from app.fileio import layout_json
from app.fileio.atomic import FileWriteError
from app.fileio.layout_json import (
    FORMAT_VERSION,
    UPGRADES,
    LayoutFileError,
    layout_from_dict,
    layout_to_dict,
    load_layout,
    save_layout,
)
from app.model import edits
from app.model.elements import Centerline, ExistingPavement, FixedObject, Layout, Runway, Vertex

FIXTURES = Path(__file__).parent / "fixtures"
DOCS = Path(__file__).resolve().parents[2] / "docs" / "file_format.md"


def fixture_dict(name: str = "layout_v1_ft.json") -> dict[str, Any]:
    result: dict[str, Any] = json.loads((FIXTURES / name).read_text(encoding="utf-8"))
    return result


def assert_close(a: Any, b: Any, rel: float, where: str = "layout") -> None:
    """Equal structure; floats equal within ``rel`` (relative)."""
    if is_dataclass(a):
        assert type(a) is type(b), where
        for f in fields(a):
            assert_close(getattr(a, f.name), getattr(b, f.name), rel, f"{where}.{f.name}")
    elif isinstance(a, tuple):
        assert isinstance(b, tuple) and len(a) == len(b), where
        for index, (x, y) in enumerate(zip(a, b, strict=True)):
            assert_close(x, y, rel, f"{where}[{index}]")
    elif isinstance(a, float) and not isinstance(b, bool):
        assert math.isclose(a, b, rel_tol=rel, abs_tol=0.0), f"{where}: {a!r} != {b!r}"
    else:
        assert a == b, where


# --- reading the fixtures ------------------------------------------------------------------------

def test_version_1_fixture_converts_feet_to_metres() -> None:
    layout = load_layout(FIXTURES / "layout_v1_ft.json")
    bend = layout.centerlines[0].vertices[1]
    assert bend.x_m == pytest.approx(1200.0 * 0.3048, rel=1e-12)  # 1 ft = 0.3048 m exactly (1959)
    assert bend.corner_radius_m == pytest.approx(150.0 * 0.3048, rel=1e-12)  # same
    assert layout.runways[0].width_m == pytest.approx(150.0 * 0.3048, rel=1e-12)  # same
    assert layout.turn_radius_overrides_m == (("J1:twy-1>twy-2", pytest.approx(120.0 * 0.3048)),)  # same
    assert layout.fleet[0].cmg_m == 20.0  # identity: fleet keys say metres, whatever "units" says
    assert layout.excluded_movements == frozenset({"J1:twy-2>twy-1"})  # identity
    assert layout.existing_pavements[0].holes[0][2] == pytest.approx((1600 * 0.3048, 800 * 0.3048))  # same
    assert (layout.units, layout.rule_set, layout.objects[1].kind) == ("ft", "FAA", "sign")  # identity


def test_version_0_draft_fixture_is_upgraded() -> None:
    layout = load_layout(FIXTURES / "layout_v0_draft.json")
    assert layout.centerlines[0].vertices == (  # identity: draft points become plain vertices
        Vertex(0.0, 0.0), Vertex(250.0, 0.0), Vertex(250.0, 180.5))
    assert layout.centerlines[0].group.code_letter == "C"  # identity


def test_upgrade_does_not_change_its_input() -> None:
    data = fixture_dict("layout_v0_draft.json")
    original = copy.deepcopy(data)
    layout_from_dict(data)
    assert data == original  # identity


def test_upgrades_chain_one_version_at_a_time(monkeypatch: pytest.MonkeyPatch) -> None:
    calls: list[int] = []

    def fake_1_to_2(data: dict[str, Any]) -> dict[str, Any]:
        calls.append(data["format_version"])
        return dict(data, format_version=2, notes="upgraded twice")

    monkeypatch.setattr(layout_json, "FORMAT_VERSION", 2)
    monkeypatch.setitem(UPGRADES, 1, fake_1_to_2)
    layout = load_layout(FIXTURES / "layout_v0_draft.json")
    assert calls == [1] and layout.notes == "upgraded twice"  # identity: 0 -> 1 (real) -> 2 (fake)


def test_the_documented_example_is_the_fixture_and_loads() -> None:
    blocks = re.findall(r"```json\n(.*?)```", DOCS.read_text(encoding="utf-8"), flags=re.DOTALL)
    assert len(blocks) == 1  # identity: docs/file_format.md has one complete example
    assert json.loads(blocks[0]) == fixture_dict()  # identity
    layout_from_dict(json.loads(blocks[0]))


# --- round trips ---------------------------------------------------------------------------------

def sample_layout(units: str) -> Layout:
    layout = load_layout(FIXTURES / "layout_v1_ft.json")
    return edits.set_units(edits.move_vertex(layout, "twy-1", 0, 0.1, -1e-7), units)  # type: ignore[arg-type]


def test_metric_round_trip_is_exact(tmp_path: Path) -> None:
    layout = sample_layout("m")
    save_layout(layout, tmp_path / "a.json")
    assert load_layout(tmp_path / "a.json") == layout  # identity: JSON keeps every float's shortest repr
    assert [p.name for p in tmp_path.iterdir()] == ["a.json"]  # identity: no temporary file left


def test_feet_round_trip_within_1e_9(tmp_path: Path) -> None:
    layout = sample_layout("ft")
    save_layout(layout, tmp_path / "a.json")
    assert_close(load_layout(tmp_path / "a.json"), layout, rel=1e-9)  # brief: 1e-9 relative
    saved = json.loads((tmp_path / "a.json").read_text(encoding="utf-8"))
    assert saved["format_version"] == FORMAT_VERSION and saved["application"] == "taxiwright"  # identity


finite = st.floats(min_value=-1e8, max_value=1e8, allow_nan=False, allow_infinity=False)
positive = st.floats(min_value=1e-3, max_value=1e5)


@st.composite
def layouts(draw: st.DrawFn) -> Layout:
    points = draw(st.lists(st.tuples(finite, finite), min_size=3, max_size=6))
    assume(math.dist(points[0], points[-1]) > 1e-6)  # lines and the runway need length (edits.py)
    radius = draw(st.none() | positive)
    vertices = [Vertex(x, y) for x, y in points]
    vertices[1] = replace(vertices[1], corner_radius_m=radius)
    return Layout(
        units=draw(st.sampled_from(["ft", "m"])),
        centerlines=(Centerline("twy-1", draw(st.text(max_size=8)), tuple(vertices),
                                width_override_m=draw(st.none() | positive)),),
        runways=(Runway("rwy-1", "x", (vertices[0], vertices[-1]), draw(positive)),),
        objects=(FixedObject("obj-1", "", tuple(points), draw(st.floats(0.0, 1e3))),),
        existing_pavements=(ExistingPavement("pav-1", "", tuple(points)),),
        turn_radius_overrides_m=(("c", draw(positive)),))


@settings(max_examples=40, deadline=None)
@given(layouts())
def test_any_layout_round_trips(layout: Layout) -> None:
    loaded = layout_from_dict(json.loads(json.dumps(layout_to_dict(layout))))
    if layout.units == "m":
        assert loaded == layout  # identity
    else:
        assert_close(loaded, layout, rel=1e-9)  # brief: 1e-9 relative in feet


def test_save_failure_raises_file_write_error(tmp_path: Path) -> None:
    with pytest.raises(FileWriteError, match="cannot write"):
        save_layout(Layout(), tmp_path / "missing-folder" / "a.json")


# --- bad content ---------------------------------------------------------------------------------

def mutate(change: Callable[[dict[str, Any]], Any]) -> dict[str, Any]:
    data = fixture_dict()
    change(data)
    return data


BAD_CONTENT = [
    (lambda d: d.pop("format_version"), "format_version: missing required field"),
    (lambda d: d.update(format_version="1"), "format_version: expected a whole number"),
    (lambda d: d.update(format_version=True), "format_version: expected a whole number"),
    (lambda d: d.update(format_version=7), "format_version: the file was made by a newer taxiwright"),
    (lambda d: d.update(format_version=-1), "format_version: unknown format version -1"),
    (lambda d: d.pop("application"), "application: missing required field"),
    (lambda d: d.update(application="other"), "application: not a taxiwright layout"),
    (lambda d: d.update(units="yd"), "units: expected one of ft, m, got 'yd'"),
    (lambda d: d.pop("rule_set"), "rule_set: missing required field"),
    (lambda d: d.update(title=3), "title: expected text, got 3"),
    (lambda d: d.update(centerlines={}), "centerlines: expected a list, got an object"),
    (lambda d: d["centerlines"].__setitem__(1, 5), "centerlines[1]: expected a JSON object, got 5"),
    (lambda d: d["centerlines"][1]["vertices"][1].update(x="abc"),
     "centerlines[1].vertices[1].x: expected a finite number, got 'abc'"),
    (lambda d: d["centerlines"][0]["vertices"][2].pop("y"),
     "centerlines[0].vertices[2].y: missing required field"),
    (lambda d: d["centerlines"][0]["vertices"][1].update(x=float("nan")),
     "centerlines[0].vertices[1].x: expected a finite number, got nan"),
    (lambda d: d["centerlines"][0]["vertices"][1].update(x=True),
     "centerlines[0].vertices[1].x: expected a finite number, got true"),
    (lambda d: d["centerlines"][0]["vertices"][1].update(x=None),
     "centerlines[0].vertices[1].x: expected a finite number, got null"),
    (lambda d: d["centerlines"][0]["vertices"][1].update(x=4e9),
     "centerlines[0].vertices[1].x: 4e+09 ft is beyond the 1e+09 m limit"),
    (lambda d: d["centerlines"][0]["vertices"][1].update(corner_radius=0),
     "centerlines[0].vertices[1].corner_radius: expected a length greater than zero"),
    (lambda d: d["centerlines"][0]["vertices"][0].update(corner_radius=10),
     "centerlines[0].vertices[0].corner_radius: an end vertex has no corner"),
    (lambda d: d["centerlines"][1]["vertices"].pop(),
     "centerlines[1].vertices: expected at least 2 vertices, got 1"),
    (lambda d: d["centerlines"][0].pop("id"), "centerlines[0].id: missing required field"),
    (lambda d: d["centerlines"][0].update(id=""), "centerlines[0].id: an element id must not be empty"),
    (lambda d: d["centerlines"][0].update(kind="road"),
     "centerlines[0].kind: expected one of taxiway, taxilane"),
    (lambda d: d["centerlines"][0]["group"].update(tdg="8"), "centerlines[0].group.tdg: expected one of"),
    (lambda d: d["centerlines"][0]["group"].update(adg=3), "centerlines[0].group.adg: expected one of"),
    (lambda d: d["centerlines"][1].update(width_override=-35),
     "centerlines[1].width_override: expected a length"),
    (lambda d: d["runways"][0]["vertices"].append({"x": 0, "y": 0}),
     "runways[0].vertices: a runway has exactly 2"),
    (lambda d: d["runways"][0].pop("width"), "runways[0].width: missing required field"),
    (lambda d: d["runways"][0].update(instrument="yes"), "runways[0].instrument: expected true or false"),
    (lambda d: d["runways"][0].update(id="twy-2"),
     "runways[0].id: duplicate id 'twy-2' (also used by centerlines[1])"),
    (lambda d: d["objects"][0]["outline"][2].pop(),
     "objects[0].outline[2]: expected an [x, y] pair, got a list"),
    (lambda d: d["objects"][0]["outline"][2].__setitem__(0, "1"),
     "objects[0].outline[2][0]: expected a finite number, got '1'"),
    (lambda d: d["objects"][1].update(outline=[]), "objects[1].outline: expected at least 1 points, got 0"),
    (lambda d: d["objects"][1].update(height=-1), "objects[1].height: expected a height of zero or more"),
    (lambda d: d["objects"][1].update(kind="tree"), "objects[1].kind: expected one of building, sign"),
    (lambda d: d["existing_pavements"][0]["holes"][0].pop(),
     "existing_pavements[0].holes[0]: expected at least 3"),
    (lambda d: d["fleet"][0].pop("cmg_m"), "fleet[0].cmg_m: missing"),
    (lambda d: d["fleet"][0].update(mgw_m="wide"), "fleet[0].mgw_m: expected a finite number, got 'wide'"),
    (lambda d: d["fleet"][0].update(wingspan_m=10**400),
     "fleet[0].wingspan_m: expected a finite number, got 1000"),
    (lambda d: d["fleet"][0].update(wingspan_m=2e9), "fleet[0].wingspan_m: 2e+09 m is beyond"),
    (lambda d: d["fleet"][0].update(tail_x_m=5.0), "fleet[0]: Demo twin: the tail must be behind"),
    (lambda d: d["fleet"].append(dict(d["fleet"][0])), "fleet[1].name: the fleet already has an aircraft"),
    (lambda d: d.update(excluded_movements=[1]), "excluded_movements[0]: expected text, got 1"),
    (lambda d: d["turn_radius_overrides"][0].update(radius="big"),
     "turn_radius_overrides[0].radius: expected a finite number, got 'big'"),
    (lambda d: d["turn_radius_overrides"].append(dict(d["turn_radius_overrides"][0])),
     "turn_radius_overrides[1].corner: a second override"),
]


@pytest.mark.parametrize("change, message", BAD_CONTENT)
def test_bad_content_names_the_field(change: Callable[[dict[str, Any]], Any], message: str) -> None:
    with pytest.raises(LayoutFileError) as caught:
        layout_from_dict(mutate(change))
    assert str(caught.value).startswith(message)  # identity: messages of layout_json.py


def test_v0_draft_points_are_checked_under_their_own_names() -> None:
    data = fixture_dict("layout_v0_draft.json")
    data["centerlines"][0]["points"][1] = [1.0]
    with pytest.raises(LayoutFileError, match=re.escape("centerlines[0].points[1]: expected an [x, y] pair")):
        layout_from_dict(data)


def test_unknown_keys_are_ignored() -> None:
    data = mutate(lambda d: d.update(future_feature={"a": 1}))
    data["centerlines"][0]["vertices"][0]["elevation"] = 12.5
    data["fleet"][0]["engine_count"] = 2
    assert layout_from_dict(data) == layout_from_dict(fixture_dict())  # identity


def test_feet_coordinates_up_to_the_metre_limit_are_accepted() -> None:
    data = mutate(lambda d: d["centerlines"][0]["vertices"][1].update(x=3e9))  # 3e9 ft = 9.144e8 m
    assert layout_from_dict(data).centerlines[0].vertices[1].x_m == pytest.approx(9.144e8)  # 1 ft = 0.3048 m


def test_too_many_elements_or_vertices() -> None:
    many = mutate(lambda d: d.update(objects=[{}] * 100_001))
    with pytest.raises(LayoutFileError, match="objects: the file holds more than 100,000 elements"):
        layout_from_dict(many)
    long = mutate(lambda d: d["centerlines"][0].update(vertices=[{"x": 0, "y": 0}] * 1_000_001))
    message = "centerlines[0].vertices: the file holds more than 1,000,000"
    with pytest.raises(LayoutFileError, match=re.escape(message)):
        layout_from_dict(long)
    spread = mutate(lambda d: d.update(objects=[{"id": f"o{i}", "height": 1, "outline": [[0, 0]] * 400_000}
                                               for i in range(3)]))
    with pytest.raises(LayoutFileError, match=re.escape("objects[2].outline: the file holds more than")):
        layout_from_dict(spread)


# --- bad files -----------------------------------------------------------------------------------

def write(tmp_path: Path, data: bytes) -> Path:
    path = tmp_path / "bad.json"
    path.write_bytes(data)
    return path


@pytest.mark.parametrize("data, message", [
    (b"", "line 1 column 1: not valid JSON"),
    (b"{\"format_version\": 1,", "line 1 column 22: not valid JSON"),
    (b"[1, 2]", "the file: expected a JSON object, got a list"),
    (b"\xff\xfe{}", "byte 0: not UTF-8 text"),
    (b"{\"a\": 1, \"a\": 2}", "the key 'a' appears twice"),
    (b"[" * 100_000 + b"]" * 100_000, "the JSON is nested too deeply"),
    (b"{\"x\": " + b"9" * 5000 + b"}", "not valid JSON"),
], ids=["empty", "truncated", "list", "utf-16", "duplicate-key", "deep", "huge-integer"])
def test_unreadable_json(tmp_path: Path, data: bytes, message: str) -> None:
    with pytest.raises(LayoutFileError) as caught:
        load_layout(write(tmp_path, data))
    assert str(caught.value).startswith(message)  # identity


def test_non_finite_json_constants_name_their_field(tmp_path: Path) -> None:
    text = (FIXTURES / "layout_v1_ft.json").read_text(encoding="utf-8")
    for constant in ("NaN", "Infinity", "-Infinity", "1e999"):
        path = write(tmp_path, text.replace('"width": 150.0', f'"width": {constant}').encode())
        with pytest.raises(LayoutFileError, match=re.escape("runways[0].width: expected a finite number")):
            load_layout(path)


def test_byte_order_mark_is_accepted(tmp_path: Path) -> None:
    path = write(tmp_path, b"\xef\xbb\xbf" + (FIXTURES / "layout_v1_ft.json").read_bytes())
    assert load_layout(path) == load_layout(FIXTURES / "layout_v1_ft.json")  # identity


def test_paths_that_are_not_regular_files(tmp_path: Path) -> None:
    with pytest.raises(LayoutFileError, match="not a regular file"):
        load_layout(tmp_path)
    with pytest.raises(LayoutFileError, match="cannot read the file"):
        load_layout(tmp_path / "missing.json")
    fifo = tmp_path / "pipe.json"
    os.mkfifo(fifo)
    with pytest.raises(LayoutFileError, match="not a regular file"):
        load_layout(fifo)  # must not block waiting for a writer


def test_files_over_64_mib_are_refused_unread(tmp_path: Path) -> None:
    path = tmp_path / "huge.json"
    with open(path, "wb") as stream:
        stream.truncate(64 * 2**20 + 1)  # sparse: costs no disk space
    with pytest.raises(LayoutFileError, match="larger than 64 MiB"):
        load_layout(path)
