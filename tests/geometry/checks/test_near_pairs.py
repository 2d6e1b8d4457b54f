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
