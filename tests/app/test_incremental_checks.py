"""A warm analyzer's findings equal a fresh analyzer's after any sequence of edits.

The analysis keeps the check inputs and the findings of every unchanged item between layouts
(app/model/check_inputs.py, geometry/checks/incremental.py); these tests drive one analyzer
through random vertex and object moves and compare each result with a fresh analysis.
"""

from __future__ import annotations

import random
from pathlib import Path

import pytest

from app.fileio.layout_json import load_layout
from app.model import edits
from app.model.analysis import LayoutAnalyzer
from app.model.elements import Layout
from geometry.checks import CheckInputs, IncrementalChecks
from geometry.checks.incremental import _grouped
from geometry.network import JunctionNetwork
from geometry.special_cases import find_crossovers
from tests.app.random_edits import MOVE_M, random_edit, random_move
from tests.benchmarks.layouts import drag_positions_m, drag_target, grid_layout

SAMPLES = Path(__file__).resolve().parents[2] / "sample_layouts"
EDITS_PER_LAYOUT = 3
def _assert_same_as_fresh(warm: LayoutAnalyzer, layout: Layout) -> None:
    found = warm.analyze(layout).findings
    expected = LayoutAnalyzer().analyze(layout).findings
    assert found == expected  # identity: a cache must not change a result


@pytest.mark.parametrize("name", ["rule_breaker", "crossovers", "runway_connections"])
def test_random_edits_through_a_warm_analyzer_give_the_fresh_findings(name: str) -> None:
    layout = load_layout(SAMPLES / f"{name}.json")
    rng = random.Random(name)
    warm = LayoutAnalyzer()
    _assert_same_as_fresh(warm, layout)
    for _ in range(EDITS_PER_LAYOUT):
        layout = random_move(layout, rng)
        _assert_same_as_fresh(warm, layout)


@pytest.mark.parametrize(("size", "frames", "moves_after"), [(6, 2, EDITS_PER_LAYOUT), (9, 4, 0)])
def test_a_drag_in_a_grid_gives_the_fresh_findings_every_frame(size: int, frames: int,
                                                                moves_after: int) -> None:
    layout = grid_layout(size)
    target = drag_target(size)
    warm = LayoutAnalyzer()
    _assert_same_as_fresh(warm, layout)
    for x_m, y_m in drag_positions_m(target, frames):
        _assert_same_as_fresh(warm, edits.move_vertex(layout, target.centerline_id, target.vertex_index,
                                                      x_m, y_m))
    rng = random.Random(size)
    for _ in range(moves_after):  # then random moves from the start, through the same warm analyzer
        layout = random_move(layout, rng)
        _assert_same_as_fresh(warm, layout)


def test_unchanged_inputs_redo_only_the_families_that_read_everything() -> None:
    layout = load_layout(SAMPLES / "rule_breaker.json")
    analyzer = LayoutAnalyzer()
    analyzer.analyze(layout)
    checks: IncrementalChecks = analyzer._checks  # the count is what this test is about
    analyzer.analyze(edits.move_vertex(layout, layout.centerlines[0].id, 0,
                                       *layout.centerlines[0].vertices[0].xy))
    assert checks.recomputed_items == 4  # identity: crossovers (2 families), wide throats, runway connections


@pytest.mark.parametrize("name", ["crossovers", "skewed_junctions", "four_way_and_tee_tdg5"])
def test_random_edit_sequences_keep_the_fresh_findings_and_inputs(name: str) -> None:
    layout = load_layout(SAMPLES / f"{name}.json")
    rng = random.Random(f"sequence {name}")
    warm = LayoutAnalyzer()
    handed: list[tuple[JunctionNetwork, CheckInputs]] = []
    build = warm._check_inputs.build  # watched: what the checks are handed

    def watched(layout: Layout, context: object, network: JunctionNetwork, *rest: object) -> CheckInputs:
        inputs = build(layout, context, network, *rest)  # type: ignore[arg-type]
        handed.append((network, inputs))
        return inputs
    warm._check_inputs.build = watched  # type: ignore[method-assign]
    _assert_same_as_fresh(warm, layout)
    for _ in range(6):  # common practice, no source: enough edits to revisit remembered items
        layout = random_edit(layout, rng)
        _assert_same_as_fresh(warm, layout)
        network, inputs = handed[-1]
        assert inputs.movement_groups == _grouped(inputs.movements)  # identity: the same split
        assert inputs.crossovers == find_crossovers(network.junctions, layout.excluded_movements)  # identity



def test_a_drag_of_every_line_in_a_layout_with_findings_gives_the_fresh_findings() -> None:
    """Each line's middle vertex dragged a few metres: the pairs and wingtip items the line does
    not reach keep their outcomes, the others are redone (geometry/checks/pair_families.py,
    wingtip_family.py), and the sorted findings are patched rather than rebuilt."""
    layout = load_layout(SAMPLES / "rule_breaker.json")
    warm = LayoutAnalyzer()
    _assert_same_as_fresh(warm, layout)
    for line in layout.centerlines:
        index = len(line.vertices) // 2
        x_m, y_m = line.vertices[index].xy
        for step in (1, 2):  # common practice, no source: a second frame of the same drag
            moved = edits.move_vertex(layout, line.id, index, x_m + MOVE_M * step / 2.0,
                                      y_m - MOVE_M * step / 3.0)
            _assert_same_as_fresh(warm, moved)
