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
from tests.benchmarks.layouts import drag_positions_m, drag_target, grid_layout

SAMPLES = Path(__file__).resolve().parents[2] / "sample_layouts"
EDITS_PER_LAYOUT = 3
# A move of a few metres keeps most junctions but changes their legs (common practice, no source).
MOVE_M = 6.0


def _random_move(layout: Layout, rng: random.Random) -> Layout:
    """One vertex of a line (or point of an object) moved by up to MOVE_M in x and y."""
    movable = [(element.id, len(element.vertices), [v.xy for v in element.vertices])
               for element in (*layout.centerlines, *layout.runways)]
    movable += [(obj.id, len(obj.outline), list(obj.outline)) for obj in layout.objects]
    element_id, count, points = rng.choice(movable)
    index = rng.randrange(count)
    x_m, y_m = points[index]
    return edits.move_vertex(layout, element_id, index, x_m + rng.uniform(-MOVE_M, MOVE_M),
                             y_m + rng.uniform(-MOVE_M, MOVE_M))


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
        layout = _random_move(layout, rng)
        _assert_same_as_fresh(warm, layout)


def test_a_drag_in_a_grid_gives_the_fresh_findings_and_redoes_few_items() -> None:
    layout = grid_layout(6)
    target = drag_target(6)
    warm = LayoutAnalyzer()
    _assert_same_as_fresh(warm, layout)
    for x_m, y_m in drag_positions_m(target, 2):
        moved = edits.move_vertex(layout, target.centerline_id, target.vertex_index, x_m, y_m)
        _assert_same_as_fresh(warm, moved)
    rng = random.Random(6)
    for _ in range(EDITS_PER_LAYOUT):
        layout = _random_move(layout, rng)
        _assert_same_as_fresh(warm, layout)


def test_unchanged_inputs_redo_only_the_families_that_read_everything() -> None:
    layout = load_layout(SAMPLES / "rule_breaker.json")
    analyzer = LayoutAnalyzer()
    analyzer.analyze(layout)
    checks: IncrementalChecks = analyzer._checks  # the count is what this test is about
    analyzer.analyze(edits.move_vertex(layout, layout.centerlines[0].id, 0,
                                       *layout.centerlines[0].vertices[0].xy))
    assert checks.recomputed_items == 4  # identity: crossovers (2 families), wide throats, runway connections


def _random_edit(layout: Layout, rng: random.Random) -> Layout:
    """A vertex move, or (one time in four) an inserted or deleted vertex, or a line removed."""
    roll = rng.random()
    lines = [line for line in layout.centerlines if len(line.vertices) >= 2]
    if roll < 0.1 and len(lines) > 2:
        return edits.remove_elements(layout, [rng.choice(lines).id])
    if roll < 0.2 and lines:
        line = rng.choice(lines)
        index = rng.randrange(1, len(line.vertices))
        (x0, y0), (x1, y1) = line.vertices[index - 1].xy, line.vertices[index].xy
        return edits.insert_vertex(layout, line.id, index, (x0 + x1) / 2.0 + rng.uniform(-MOVE_M, MOVE_M),
                                   (y0 + y1) / 2.0 + rng.uniform(-MOVE_M, MOVE_M))
    if roll < 0.25:
        removable = [line for line in lines if len(line.vertices) > 2]
        if removable:
            line = rng.choice(removable)
            return edits.delete_vertex(layout, line.id, rng.randrange(len(line.vertices)))
    return _random_move(layout, rng)


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
        layout = _random_edit(layout, rng)
        _assert_same_as_fresh(warm, layout)
        network, inputs = handed[-1]
        assert inputs.movement_groups == _grouped(inputs.movements)  # identity: the same split
        assert inputs.crossovers == find_crossovers(network.junctions, layout.excluded_movements)  # identity


def test_a_long_drag_in_a_grid_gives_the_fresh_findings_every_frame() -> None:
    layout = grid_layout(9)
    target = drag_target(9)
    warm = LayoutAnalyzer()
    _assert_same_as_fresh(warm, layout)
    for x_m, y_m in drag_positions_m(target, 4):
        _assert_same_as_fresh(warm, edits.move_vertex(layout, target.centerline_id, target.vertex_index,
                                                      x_m, y_m))
