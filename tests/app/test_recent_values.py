"""Turns and fillets remembered by their inputs: bounded, and a warm analysis equals a fresh one."""

from __future__ import annotations

import numpy as np
import shapely

from app.model import edits
from app.model.analysis import LayoutAnalyzer
from app.model.recent_values import RecentValues
from app.model.results import JunctionResult
from tests.benchmarks.layouts import drag_positions_m, drag_target, grid_layout


def test_the_memory_keeps_the_most_recently_used_values() -> None:
    memory: RecentValues[str] = RecentValues(kept=2)
    memory.put("a", "A")
    memory.put("b", "B")
    assert memory.get("a") == "A"  # identity (stored)
    memory.put("c", "C")  # "b" was used least recently
    assert memory.get("b") is None and memory.get("c") == "C" and len(memory) == 2  # invariant (bounded)
    assert memory.hits == 2  # identity (two answered look-ups)


def _same(warm: JunctionResult, fresh: JunctionResult) -> None:
    assert warm.buildable_area_m2 == fresh.buildable_area_m2  # identity (same computation)
    assert shapely.equals_exact(warm.buildable_area, fresh.buildable_area, 0.0)  # identity
    for fillet, same in zip(warm.fillets, fresh.fillets, strict=True):
        assert (fillet.corner_key, fillet.fillet_radius_m, fillet.taper_a_m, fillet.taper_b_m) == (
            same.corner_key, same.fillet_radius_m, same.taper_a_m, same.taper_b_m)  # identity
        assert np.array_equal(fillet.edge_xy, same.edge_xy)  # identity
    for one, other in zip(warm.movements, fresh.movements, strict=True):
        assert one.key == other.key and one.required_area_m2 == other.required_area_m2  # identity
        for track, same in zip(one.tracks, other.tracks, strict=True):
            assert np.array_equal(track.gear_left_edge_xy, same.gear_left_edge_xy)  # identity
            assert np.array_equal(track.edge_margin_m, same.edge_margin_m)  # identity


def test_a_drag_answers_the_neighbours_unchanged_turns_and_corners_from_memory() -> None:
    # Dragging a crossing's vertex turns one leg of each neighbouring crossing on that line; the
    # turns between their other legs, and the corners only those turns sweep, are taken from memory
    # and every result equals a fresh analysis.
    layout = grid_layout(3)
    target = drag_target(3)
    warm = LayoutAnalyzer()
    warm.analyze(layout)
    for x_m, y_m in drag_positions_m(target, 2):
        moved = edits.move_vertex(layout, target.centerline_id, target.vertex_index, x_m, y_m)
        result = warm.analyze(moved)
    assert warm.turns_from_memory > 0  # invariant (a neighbour's turns between unchanged legs)
    assert warm.fillets_from_memory > 0  # invariant (a neighbour's corners between unchanged legs)
    fresh = LayoutAnalyzer().analyze(moved)
    assert result.junctions.keys() == fresh.junctions.keys()  # identity
    for junction_id, junction in result.junctions.items():
        _same(junction, fresh.junctions[junction_id])
