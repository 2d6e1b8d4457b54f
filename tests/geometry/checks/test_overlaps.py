"""E-OVERLAP: centerlines drawn on each other."""

from __future__ import annotations

import pytest

from geometry.checks import run_checks
from tests.geometry.checks.builders import adg3, info, line, make_inputs


def overlaps(second_points: list[tuple[float, float]]) -> list[str]:
    lines = [info(line("A", [(0.0, 0.0), (100.0, 0.0)]), adg3()),
             info(line("B", second_points), adg3())]
    return [f.message for f in run_checks(make_inputs(lines)) if f.code == "E-OVERLAP"]


@pytest.mark.parametrize("points", [[(0.0, 0.0), (100.0, 0.0)], [(50.0, 0.0), (150.0, 0.0)],
                                    [(100.0, 0.0), (0.0, 0.5)]])
def test_lines_on_each_other_are_an_error(points: list[tuple[float, float]]) -> None:
    (message,) = overlaps(points)
    assert "lie on each other" in message


@pytest.mark.parametrize("points", [[(50.0, -50.0), (50.0, 50.0)], [(100.0, 0.0), (200.0, 0.0)],
                                    [(0.0, 30.0), (100.0, 30.0)]])
def test_crossing_touching_and_parallel_lines_are_not(points: list[tuple[float, float]]) -> None:
    assert overlaps(points) == []  # a crossing, an end-to-end join, a parallel 30 m away (identity)
