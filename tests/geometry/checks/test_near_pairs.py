"""NearPairs: the pairs kept between runs equal a fresh query's after every change."""

from __future__ import annotations

import random

import shapely

from geometry.checks.near_pairs import NearPairs


def _fresh(geometries: list[shapely.Geometry], distance_m: float) -> list[tuple[int, int]]:
    left, right = shapely.STRtree(geometries).query(geometries, predicate="dwithin", distance=distance_m)
    return sorted((i, j) for i, j in zip(left.tolist(), right.tolist(), strict=True) if i < j)


def _line(rng: random.Random) -> shapely.LineString:
    x, y = rng.uniform(0.0, 500.0), rng.uniform(0.0, 500.0)
    return shapely.LineString([(x, y), (x + rng.uniform(-200.0, 200.0), y + rng.uniform(-200.0, 200.0))])


def test_kept_pairs_equal_a_fresh_query_through_random_changes() -> None:
    rng = random.Random(7)
    lines = {f"l{k}": _line(rng) for k in range(30)}
    near = NearPairs()
    for step in range(60):
        action = rng.random()
        if action < 0.6:  # move one line (a new geometry object)
            lines[rng.choice(sorted(lines))] = _line(rng)
        elif action < 0.8 and len(lines) > 3:
            del lines[rng.choice(sorted(lines))]
        else:
            lines[f"n{step}"] = _line(rng)
        distance_m = 40.0 if step < 45 else 25.0  # a changed distance re-queries everything
        ids = sorted(lines)
        geometries = [lines[line_id] for line_id in ids]
        assert near.pairs(ids, geometries, distance_m) == _fresh(geometries, distance_m)  # identity


def _polyline(rng: random.Random) -> list[tuple[float, float]]:
    x, y = rng.uniform(0.0, 500.0), rng.uniform(0.0, 500.0)
    points = [(x, y)]
    for _ in range(5):
        x, y = x + rng.uniform(-80.0, 80.0), y + rng.uniform(-80.0, 80.0)
        points.append((x, y))
    return points


def _box(points: list[tuple[float, float]]) -> tuple[float, float, float, float]:
    xs, ys = [x for x, _ in points], [y for _, y in points]
    return (min(xs), min(ys), max(xs), max(ys))


def test_pairs_measured_only_near_what_changed_equal_a_fresh_query() -> None:
    rng = random.Random(11)
    points = {f"l{k}": _polyline(rng) for k in range(25)}
    near = NearPairs()
    ids = sorted(points)
    near.update(ids, [shapely.LineString(points[line_id]) for line_id in ids], 30.0)
    geometries = {line_id: shapely.LineString(points[line_id]) for line_id in ids}
    for _ in range(80):
        line_id = rng.choice(ids)
        index = rng.randrange(6)
        before = points[line_id]
        after = list(before)
        x, y = before[index]
        after[index] = (x + rng.uniform(-40.0, 40.0), y + rng.uniform(-40.0, 40.0))
        points[line_id] = after
        geometries[line_id] = shapely.LineString(after)
        # The boxes of the two segments at the moved vertex, before and after the move.
        around = slice(max(index - 1, 0), index + 2)
        regions = (_box(before[around]), _box(after[around]))
        ordered = [geometries[name] for name in ids]
        near.update(ids, ordered, 30.0, {line_id: regions})
        assert near.pairs(ids, ordered, 30.0) == _fresh(ordered, 30.0)  # identity
