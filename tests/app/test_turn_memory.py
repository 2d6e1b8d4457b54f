"""Swept turns remembered by their inputs: bounded, and a warm analysis equals a fresh one."""

from __future__ import annotations

import numpy as np
import shapely

from app.model import edits
from app.model.analysis import LayoutAnalyzer
from app.model.results import JunctionResult
from app.model.turn_memory import TurnMemory
from tests.benchmarks.layouts import drag_positions_m, drag_target, grid_layout


def test_the_memory_keeps_the_most_recently_used_values() -> None:
    memory: TurnMemory[str] = TurnMemory(kept=2)
    memory.put("a", "A")
    memory.put("b", "B")
    assert memory.get("a") == "A"  # identity (stored)
    memory.put("c", "C")  # "b" was used least recently
    assert memory.get("b") is None and memory.get("c") == "C" and len(memory) == 2  # invariant (bounded)
    assert memory.hits == 2  # identity (two answered look-ups)


def _same(warm: JunctionResult, fresh: JunctionResult) -> None:
    assert warm.buildable_area_m2 == fresh.buildable_area_m2  # identity (same computation)
    assert shapely.equals_exact(warm.buildable_area, fresh.buildable_area, 0.0)  # identity
    assert [f.fillet_radius_m for f in warm.fillets] == [f.fillet_radius_m for f in fresh.fillets]  # identity
    for one, other in zip(warm.movements, fresh.movements, strict=True):
        assert one.key == other.key and one.required_area_m2 == other.required_area_m2  # identity
        for track, same in zip(one.tracks, other.tracks, strict=True):
            assert np.array_equal(track.gear_left_edge_xy, same.gear_left_edge_xy)  # identity
            assert np.array_equal(track.edge_margin_m, same.edge_margin_m)  # identity


def test_a_drag_answers_the_neighbours_unchanged_turns_from_memory() -> None:
    # Dragging a crossing's vertex turns one leg of each neighbouring crossing on that line; the
    # turns between their other legs are taken from memory and every result equals a fresh analysis.
    layout = grid_layout(3)
    target = drag_target(3)
    warm = LayoutAnalyzer()
    warm.analyze(layout)
    for x_m, y_m in drag_positions_m(target, 2):
        moved = edits.move_vertex(layout, target.centerline_id, target.vertex_index, x_m, y_m)
        result = warm.analyze(moved)
    hits = warm.turns_from_memory
    assert hits > 0  # invariant (a neighbour's turns between unchanged legs were remembered)
    fresh = LayoutAnalyzer().analyze(moved)
    assert result.junctions.keys() == fresh.junctions.keys()  # identity
    for junction_id, junction in result.junctions.items():
        _same(junction, fresh.junctions[junction_id])
