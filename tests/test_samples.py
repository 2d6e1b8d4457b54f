"""The Marrowby Field sample layouts in sample_layouts/, made by docs/scripts/make_samples.py.

The samples are fictional (docs/demo_airfield.md). These tests check that they load, that the
script rebuilds them byte for byte, that their geometry is tidy (lines meet exactly), that each
shows what its notes promise, and that the analysis finds in them what it should: nothing wrong
in the clean samples, each intended fault in rule_breaker.json.
"""

from __future__ import annotations

import math
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
import shapely

from app.fileio.layout_json import load_layout
from app.model.analysis import LayoutAnalyzer
from app.model.elements import Centerline, Layout, Runway
from app.model.results import LayoutResult
from geometry.centerline import centerline_segments
from geometry.findings import Severity
from geometry.network import LineKind, NetworkLine, build_network
from geometry.special_cases import find_crossovers
from geometry.units import to_metres

REPOSITORY = Path(__file__).resolve().parents[1]
SAMPLE_FOLDER = REPOSITORY / "sample_layouts"
SCRIPT = REPOSITORY / "docs" / "scripts" / "make_samples.py"
SAMPLE_NAMES = (
    "marrowby_field.json", "four_way_and_tee_tdg3.json", "four_way_and_tee_tdg5.json",
    "skewed_junctions.json", "crossovers.json", "runway_connections.json",
    "existing_and_proposed.json", "rule_breaker.json",
)
CLEAN_NAMES = tuple(name for name in SAMPLE_NAMES if name != "rule_breaker.json")
# An end this close to another line counts as meeting it: the junction snap tolerance
# (geometry.network.DEFAULT_SNAP_TOLERANCE_M, 0.5 m), doubled so near misses are caught too.
MEETING_REACH_M = 1.0


def _load(name: str) -> Layout:
    return load_layout(SAMPLE_FOLDER / name)


@pytest.fixture(scope="module")
def results() -> dict[str, LayoutResult]:
    """Every sample analysed once for the whole module (the analysis is the slow part)."""
    return {name: LayoutAnalyzer().analyze(_load(name)) for name in SAMPLE_NAMES}


def _lines(layout: Layout) -> list[Centerline | Runway]:
    return [*layout.centerlines, *layout.runways]


def _network_line(element: Centerline | Runway) -> NetworkLine:
    kind: LineKind = element.kind if isinstance(element, Centerline) else "runway"
    radii = [vertex.corner_radius_m for vertex in element.vertices]
    return NetworkLine(element.id, kind, centerline_segments([v.xy for v in element.vertices], radii))


def _points(layout: Layout) -> list[tuple[float, float]]:
    points = [vertex.xy for line in _lines(layout) for vertex in line.vertices]
    points += [xy for obj in layout.objects for xy in obj.outline]
    for pavement in layout.existing_pavements:
        points += [*pavement.outline, *(xy for hole in pavement.holes for xy in hole)]
    return points


# --- the files ---------------------------------------------------------------------------------

def test_the_sample_folder_holds_exactly_the_samples() -> None:
    assert sorted(path.name for path in SAMPLE_FOLDER.glob("*.json")) == sorted(SAMPLE_NAMES)


@pytest.mark.parametrize("name", SAMPLE_NAMES)
def test_every_sample_loads_with_a_title_notes_and_the_caution(name: str) -> None:
    layout = _load(name)
    assert layout.title.startswith("Marrowby Field - ")
    assert "licensed engineer" in layout.notes  # the safety caution closes every sample's notes
    assert layout.fleet and layout.centerlines


@pytest.mark.parametrize("name", SAMPLE_NAMES)
def test_every_coordinate_is_finite(name: str) -> None:
    layout = _load(name)
    assert np.isfinite(np.array(_points(layout), dtype=float)).all()
    lengths = [line.width_override_m for line in layout.centerlines if line.width_override_m is not None]
    lengths += [runway.width_m for runway in layout.runways] + [obj.height_m for obj in layout.objects]
    lengths += [radius_m for _, radius_m in layout.turn_radius_overrides_m]
    assert all(math.isfinite(value) for value in lengths)


def test_make_samples_writes_the_same_bytes_again_and_prints_the_spacings(tmp_path: Path) -> None:
    run = subprocess.run([sys.executable, str(SCRIPT), "--out", str(tmp_path)], cwd=REPOSITORY,
                         capture_output=True, text=True, timeout=300, check=False)
    assert run.returncode == 0, run.stderr
    for name in SAMPLE_NAMES:
        assert (tmp_path / name).read_bytes() == (SAMPLE_FOLDER / name).read_bytes(), name
    # Both spacings of each crossover pair, from geometry.checks.crossovers (identity); 215 ft is
    # the ADG IV taxiway/taxiway separation of docs/standards.md (from memory, verify against AC
    # 150/5300-13B Table 4-1, as that document says).
    assert "Pair A-B" in run.stdout and "the turn requirement governs; built 240 ft apart" in run.stdout
    assert "separation 215 ft; the ADG separation governs; built 215 ft apart" in run.stdout


# --- the geometry --------------------------------------------------------------------------------

@pytest.mark.parametrize("name", SAMPLE_NAMES)
def test_line_ends_lie_exactly_on_the_lines_they_meet(name: str) -> None:
    """A centerline end near another line lies on it exactly (identity: the samples build every
    T-junction on an axis-aligned through line), never a few centimetres off."""
    layout = _load(name)
    shapes = {line.id: shapely.LineString([v.xy for v in line.vertices]) for line in _lines(layout)}
    for line in layout.centerlines:
        for end in (line.vertices[0], line.vertices[-1]):
            for other_id, other in shapes.items():
                distance_m = other.distance(shapely.Point(end.xy)) if other_id != line.id else math.inf
                assert distance_m == 0.0 or distance_m > MEETING_REACH_M, (line.id, other_id, distance_m)


def test_units_rule_sets_and_the_large_coordinates() -> None:
    assert {(name, _load(name).units, _load(name).rule_set) for name in SAMPLE_NAMES
            if _load(name).units == "m"} == {("runway_connections.json", "m", "ICAO")}
    far = np.array(_points(_load("existing_and_proposed.json")))
    # The false origin of make_samples.py, 2,104,000 ft east and 731,000 ft north (identity).
    assert far[:, 0].min() > to_metres(2_100_000.0, "ft") and far[:, 1].min() > to_metres(730_000.0, "ft")


def test_crossovers_b1_and_d1_allow_reversal_and_f1_does_not() -> None:
    layout = _load("crossovers.json")
    junctions = build_network([_network_line(line) for line in _lines(layout)]).junctions
    planned = {c.connector_id: c for c in find_crossovers(junctions, layout.excluded_movements)}
    unrestricted = {c.connector_id: c for c in find_crossovers(junctions)}
    assert set(planned) == {"twy-b1", "twy-d1", "twy-f1"}
    assert planned["twy-b1"].reversal_possible and planned["twy-d1"].reversal_possible
    assert not planned["twy-f1"].reversal_possible
    assert unrestricted["twy-f1"].reversal_possible  # only the excluded 135-degree turns stop it


# --- the analysis ----------------------------------------------------------------------------------

def _finite_geometry(geometry: shapely.Geometry | None) -> bool:
    return geometry is None or bool(np.isfinite(shapely.get_coordinates(geometry)).all())


@pytest.mark.parametrize("name", SAMPLE_NAMES)
def test_every_sample_analyses_without_nan(name: str, results: dict[str, LayoutResult]) -> None:
    result = results[name]
    assert result.junctions and math.isfinite(result.total_area_m2) and math.isfinite(result.new_area_m2)
    assert 0.0 < result.new_area_m2 <= result.total_area_m2
    assert all(_finite_geometry(g) for g in (result.total_pavement, result.new_pavement))
    assert all(np.isfinite(finding.location_m).all() for finding in result.findings)
    for junction in result.junctions.values():
        assert np.isfinite(junction.point_m).all() and _finite_geometry(junction.buildable_area)
        for movement in junction.movements:
            assert movement.problem is None, movement.problem
            assert _finite_geometry(movement.required_area)
            for track in movement.tracks:
                arrays = (track.gear_left_edge_xy, track.gear_right_edge_xy, track.wingtip_left_xy,
                          track.wingtip_right_xy, track.steering_deg, track.edge_margin_m)
                assert all(np.isfinite(array).all() for array in arrays)


def test_most_pavement_of_the_existing_and_proposed_sample_exists(results: dict[str, LayoutResult]) -> None:
    result = results["existing_and_proposed.json"]
    # The existing pavement covers most of the layout (identity of the sample: runway, A, A1, A2, A4).
    assert result.new_area_m2 < 0.25 * result.total_area_m2


def _codes_about(result: LayoutResult, element_id: str) -> set[str]:
    return {f.code for f in result.findings if any(element_id in ref for ref in f.element_ids)}


def test_the_rule_breaker_breaks_each_rule_it_names(results: dict[str, LayoutResult]) -> None:
    """One finding of each intended kind, on the element the notes name (codes: docs/checks.md)."""
    result = results["rule_breaker.json"]
    separation = [f for f in result.findings if f.code == "E-SEP-TWY-TWY"]
    assert any({"twy-a", "twy-b"} <= set(f.element_ids) for f in separation)
    assert "E-WIDTH" in _codes_about(result, "twy-a3")
    assert "E-STEERING" in _codes_about(result, "twy-a2")
    assert "E-SEP-TWY-OBJ" in _codes_about(result, "bldg-fuel")
    assert "W-PATHS" in _codes_about(result, "twy-a5")
    assert "W-WIDE-THROAT" in _codes_about(result, "rwy-09-27/twy-a6")


# The crossovers sample still draws errors that come from the wingtip check, not from the layout
# (reported to the lead): E-WINGTIP-TAXIWAY for the 45-degree connector F1, 0.2 to 1.2 ft inside
# the clearance exactly where the check stops leaving out the other parallel near F1's far
# junction (at the edge of that zone an aligned wingtip is at the required distance by
# construction, whatever the spacing). Strict: the test fails once the check is fixed.
_CLEAN = list(CLEAN_NAMES)


@pytest.mark.parametrize("name", _CLEAN)
def test_the_clean_samples_have_no_error_findings(name: str, results: dict[str, LayoutResult]) -> None:
    errors = [f"{f.code}: {f.message}" for f in results[name].findings if f.severity == Severity.ERROR]
    assert errors == []


def test_crossover_spacing_is_governed_once_by_the_turn_and_once_by_the_wingtips(
        results: dict[str, LayoutResult]) -> None:
    spacing = {f.element_ids[0]: f.rule for f in results["crossovers.json"].findings
               if f.code == "I-CROSSOVER-SPACING"}
    assert spacing["twy-b1"] == "crossover spacing (turn governs)"
    assert spacing["twy-d1"] == "crossover spacing (wingtip governs)"
