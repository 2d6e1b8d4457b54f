"""The cached layout analysis: junction results, pavement, margins, caching."""

from __future__ import annotations

import math

import numpy as np
import pytest
from shapely.affinity import scale

from app.fileio.aircraft_library import load_demo_library
from app.model import edits
from app.model.analysis import LayoutAnalyzer, analyze
from app.model.elements import Centerline, Layout, Vertex
from geometry.pavement import containment_gap

LIBRARY = {aircraft.name: aircraft for aircraft in load_demo_library()}
FLEET = (LIBRARY["Brindleway 50"], LIBRARY["Ostrander 240"])


def crossing(half_length_m: float = 400.0, mirror: float = 1.0, **extra: object) -> Layout:
    return Layout(title="crossing", units="m", fleet=FLEET, centerlines=(
        Centerline("twy-1", "A", (Vertex(-half_length_m * mirror, 0.0), Vertex(half_length_m * mirror, 0.0))),
        Centerline("twy-2", "B", (Vertex(0.0, -half_length_m), Vertex(0.0, half_length_m)), **extra)))


@pytest.fixture(scope="module")
def crossing_result():
    return analyze(crossing())


def test_four_way_crossing_has_eight_turns_and_four_fillets(crossing_result) -> None:
    (junction,) = crossing_result.junctions.values()
    kinds = [movement.kind for movement in junction.movements]
    # identity: 12 ordered pairs of 4 legs, 4 of them straight on (geometry/movements.py)
    assert len(kinds) == 12 and kinds.count("turn") == 8
    assert len(junction.fillets) == 4  # one per inside corner (identity)
    radius_m = max(m.radius_m for m in junction.movements if m.radius_m is not None)
    for fillet in junction.fillets:
        # identity: the fillet edge lies inside the turn, nearer its centre than the centerline arc
        assert 0.0 < fillet.fillet_radius_m < radius_m and fillet.area_m2 > 0.0


def test_buildable_pavement_contains_the_required_pavement(crossing_result) -> None:
    (junction,) = crossing_result.junctions.values()
    gap = containment_gap(junction.required_area, junction.buildable_area)
    assert gap.area_m2 < 1e-3 and gap.max_distance_m < 0.002  # identity: fillets are fitted to contain it


def test_every_track_keeps_the_required_edge_margin(crossing_result) -> None:
    (junction,) = crossing_result.junctions.values()
    for movement in junction.movements:
        for track in movement.tracks:
            assert np.all(np.isfinite(track.edge_margin_m))
            # identity: the pavement contains the tyre band widened by the margin (TESM), to 2 mm
            assert track.min_edge_margin_m >= track.required_edge_margin_m - 0.002


def test_default_radius_keeps_steering_within_fifty_degrees(crossing_result) -> None:
    (junction,) = crossing_result.junctions.values()
    for movement in junction.movements:
        if movement.kind == "turn":
            # 50 degrees: Horonjeff, Planning and Design of Airports, pp. 86 and 287
            assert movement.max_steering_deg <= 50.0 + 1e-6


def test_mirrored_layout_gives_mirrored_pavement(crossing_result) -> None:
    mirrored = analyze(crossing(mirror=-1.0))
    assert mirrored.total_area_m2 == pytest.approx(crossing_result.total_area_m2, rel=1e-6)  # identity
    flipped = scale(mirrored.total_pavement, xfact=-1.0, origin=(0.0, 0.0))
    assert flipped.symmetric_difference(crossing_result.total_pavement).area < 1e-2


def test_moving_a_distant_vertex_recomputes_no_junction() -> None:
    analyzer = LayoutAnalyzer()
    layout = crossing(half_length_m=1500.0)
    analyzer.analyze(layout)
    analyzer.analyze(edits.move_vertex(layout, "twy-1", 1, 1600.0, 0.0))
    assert analyzer.last_recomputed_junctions == 0
    analyzer.analyze(edits.move_vertex(layout, "twy-2", 1, 20.0, 1500.0))
    assert analyzer.last_recomputed_junctions == 1


def test_excluded_movement_has_no_tracks(crossing_result) -> None:
    (junction,) = crossing_result.junctions.values()
    key = next(m.key for m in junction.movements if m.kind == "turn")
    result = analyze(edits.set_movement_excluded(crossing(), key, True))
    (after,) = result.junctions.values()
    movement = next(m for m in after.movements if m.key == key)
    assert movement.excluded and not movement.tracks
    assert after.required_area_m2 <= junction.required_area_m2 + 1e-6


def test_corner_radius_override_is_used(crossing_result) -> None:
    (junction,) = crossing_result.junctions.values()
    corner = junction.fillets[0].corner_key
    result = analyze(edits.set_turn_radius_override(crossing(), corner, 80.0))
    (after,) = result.junctions.values()
    radii = {m.radius_m for m in after.movements if m.kind == "turn"}
    assert 80.0 in radii


def test_narrow_width_override_gets_longer_fillets_and_a_width_finding(crossing_result) -> None:
    narrow = analyze(crossing(width_override_m=8.0))
    (junction,) = narrow.junctions.values()
    (normal,) = crossing_result.junctions.values()
    longest = max(max(f.taper_a_m, f.taper_b_m) for f in junction.fillets)
    # identity: the fillet must reach further along the narrow leg to contain the gear path
    assert longest > max(max(f.taper_a_m, f.taper_b_m) for f in normal.fillets) + 1.0
    assert "E-WIDTH" in {finding.code for finding in narrow.findings}


def test_result_has_no_nan_and_consistent_areas(crossing_result) -> None:
    assert math.isfinite(crossing_result.total_area_m2)
    assert crossing_result.new_area_m2 == pytest.approx(crossing_result.total_area_m2)  # no existing pavement
    assert crossing_result.total_area_m2 >= crossing_result.straight_pavement.area
    for polyline in crossing_result.centerline_polylines.values():
        assert np.all(np.isfinite(polyline))


def test_unchanged_layout_reuses_every_junction() -> None:
    analyzer = LayoutAnalyzer()
    first = analyzer.analyze(crossing())
    second = analyzer.analyze(crossing())
    assert analyzer.last_recomputed_junctions == 0
    assert next(iter(first.junctions.values())) is next(iter(second.junctions.values()))


def test_live_pass_updates_geometry_and_keeps_the_last_findings() -> None:
    analyzer = LayoutAnalyzer()
    near = Layout(units="m", fleet=FLEET, centerlines=(
        Centerline("twy-1", "A", (Vertex(-300.0, 0.0), Vertex(300.0, 0.0))),
        Centerline("twy-2", "B", (Vertex(-300.0, 20.0), Vertex(300.0, 20.0)))))
    full = analyzer.analyze(near)
    assert "E-SEP-TWY-TWY" in {f.code for f in full.findings}  # 20 m apart: far too close (identity)
    moved = edits.move_vertex(near, "twy-2", 0, -300.0, 200.0)
    live = analyzer.analyze_live(moved)
    assert live.findings == full.findings  # the checks wait for the end of the drag
    assert live.straight_pavement.symmetric_difference(full.straight_pavement).area > 1.0
    assert analyzer.analyze(moved).findings != full.findings


def test_check_reports_new_fillet_area_against_existing_pavement(tmp_path) -> None:
    import json
    import subprocess
    import sys

    from app.fileio.layout_json import save_layout
    from app.model.elements import ExistingPavement

    layout = crossing()
    corner = ExistingPavement("pav-1", "old apron",
                              ((-300.0, 0.0), (0.0, 0.0), (0.0, 300.0), (-300.0, 300.0)))
    paths = []
    for name, variant in (("bare", layout), ("paved", edits.add_existing_pavement(layout, corner))):
        path = tmp_path / f"{name}.json"
        save_layout(variant, path)
        paths.append(path)
    reports = [json.loads(subprocess.run([sys.executable, "-m", "app.cli", "check", str(p), "--json"],
                                         capture_output=True, text=True, check=False).stdout) for p in paths]
    bare, paved = (report["junctions"][0]["new_fillet_area"] for report in reports)
    # the existing pavement covers one of the four identical fillets exactly (identity)
    assert paved == pytest.approx(bare * 3.0 / 4.0, rel=1e-3)
