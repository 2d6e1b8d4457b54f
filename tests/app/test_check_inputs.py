"""CheckInputsBuilder: a warm builder hands the checks what a fresh one builds, and the very same
records (lines, junction groups, movements) for whatever the edit did not touch."""

from __future__ import annotations

import random
from dataclasses import fields
from pathlib import Path

import numpy as np
import pytest

from app.fileio.layout_json import load_layout
from app.model import edits
from app.model.analysis import LayoutAnalyzer
from app.model.check_inputs import CheckInputsBuilder, changed_positions
from geometry.checks import CheckInputs
from tests.app.random_edits import random_edit
from tests.benchmarks.layouts import drag_positions_m, drag_target, grid_layout

SAMPLES = Path(__file__).resolve().parents[2] / "sample_layouts"


def value_of(item: object) -> object:
    """A comparable value of a check input: records (compared by identity) as their fields."""
    if isinstance(item, tuple | list):
        return tuple(value_of(member) for member in item)
    if isinstance(item, np.ndarray):
        return ("array", item.shape, item.tobytes())
    if hasattr(item, "__dataclass_fields__") and type(item).__module__ == "geometry.checks.inputs":
        return (type(item).__name__, tuple(value_of(getattr(item, f.name)) for f in fields(item)))  # type: ignore[arg-type]
    return item


def assert_same_as_fresh(inputs: CheckInputs, args: tuple[object, ...]) -> None:
    fresh = CheckInputsBuilder().build(*args)  # type: ignore[arg-type]
    for field in fields(CheckInputs):
        found, expected = getattr(inputs, field.name), getattr(fresh, field.name)
        assert value_of(found) == value_of(expected), field.name  # identity: a cache must not change a value


class Watched:
    """An analyzer whose builder calls are recorded: (arguments, inputs handed to the checks)."""

    def __init__(self) -> None:
        self.analyzer = LayoutAnalyzer()
        self.calls: list[tuple[tuple[object, ...], CheckInputs]] = []
        build = self.analyzer._check_inputs.build  # watched: what the checks are handed

        def watched(*args: object) -> CheckInputs:
            inputs = build(*args)  # type: ignore[arg-type]
            self.calls.append((args, inputs))
            return inputs
        self.analyzer._check_inputs.build = watched  # type: ignore[method-assign, assignment]


@pytest.mark.parametrize("name", ["runway_connections", "crossovers", "rule_breaker"])
def test_random_edits_hand_the_checks_what_a_fresh_builder_builds(name: str) -> None:
    layout = load_layout(SAMPLES / f"{name}.json")
    rng = random.Random(f"inputs {name}")
    watched = Watched()
    for _ in range(5):  # common practice, no source: enough edits to add, move and drop junctions
        watched.analyzer.analyze(layout)
        assert_same_as_fresh(watched.calls[-1][1], watched.calls[-1][0])
        layout = random_edit(layout, rng)


def test_a_drag_keeps_the_records_of_what_it_did_not_touch() -> None:
    layout = grid_layout(12)
    target = drag_target(12)
    watched = Watched()
    watched.analyzer.analyze(layout)
    for x_m, y_m in drag_positions_m(target, 3):
        moved = edits.move_vertex(layout, target.centerline_id, target.vertex_index, x_m, y_m)
        watched.analyzer.analyze(moved)
    (before_args, before), (args, after) = watched.calls[-2:]
    assert_same_as_fresh(after, args)
    results_before, results_after = before_args[4], args[4]
    groups_before = dict(before.movement_groups)
    for junction_id, group in after.movement_groups:
        if results_after[junction_id] is results_before[junction_id]:  # type: ignore[index]
            assert group is groups_before[junction_id]  # identity: an untouched junction keeps its record
    kept_lines = [a is b for a, b in zip(before.lines, after.lines, strict=True)]
    assert kept_lines.count(False) == 1  # identity: only the dragged line is a new record


def test_the_same_arguments_give_back_the_same_records() -> None:
    layout = load_layout(SAMPLES / "runway_connections.json")
    watched = Watched()
    watched.analyzer.analyze(layout)
    args, first = watched.calls[-1]
    builder = CheckInputsBuilder()
    once, twice = builder.build(*args), builder.build(*args)  # type: ignore[arg-type]
    for name in ("lines", "movements", "movement_groups", "right_angle_connections", "acute_exits",
                 "crossovers", "objects"):
        assert getattr(twice, name) is getattr(once, name)  # identity
    assert value_of(once.lines) == value_of(first.lines)  # identity


def test_results_handed_in_another_order_than_the_junctions_still_find_their_legs() -> None:
    layout = load_layout(SAMPLES / "crossovers.json")
    watched = Watched()
    watched.analyzer.analyze(layout)
    args, _ = watched.calls[-1]
    results = args[4]
    reordered = dict(reversed(list(results.items())))  # type: ignore[attr-defined]
    shuffled_args = (*args[:4], reordered, *args[5:])
    inputs = CheckInputsBuilder().build(*shuffled_args)  # type: ignore[arg-type]
    assert_same_as_fresh(inputs, shuffled_args)
    grouped = dict(inputs.movement_groups)
    assert list(grouped) == [junction_id for junction_id in reordered if junction_id in grouped]  # identity


def test_changed_positions_finds_the_objects_that_are_not_the_previous_ones() -> None:
    first, second, third = object(), object(), object()
    assert changed_positions([first, second], [first, third]) == [1]  # identity
    assert changed_positions([first, second], [first, second]) == []  # identity
    assert changed_positions([first], [first, second]) is None  # identity: another length
