"""IncrementalUnion always equals the plain union of its pieces."""

from __future__ import annotations

import shapely
from hypothesis import given, settings
from hypothesis import strategies as st

from app.model.unions import IncrementalUnion


def box(key: int, shift: float) -> shapely.Polygon:
    return shapely.box(key * 7.0 + shift, 0.0, key * 7.0 + shift + 10.0, 5.0 + key)


@settings(max_examples=40, deadline=None)
@given(st.lists(st.tuples(st.sets(st.integers(0, 7)), st.floats(-3.0, 3.0), st.booleans()),
                min_size=1, max_size=8))
def test_matches_the_plain_union_after_any_sequence_of_changes(steps) -> None:  # type: ignore[no-untyped-def]
    union = IncrementalUnion()
    pieces = {f"p{k}": box(k, 0.0) for k in range(8)}
    for changed, shift, drop in steps:
        for key in changed:
            pieces[f"p{key}"] = box(key, shift)
        if drop and len(pieces) > 1:
            pieces.pop(sorted(pieces)[0])
        result = union.union(pieces)
        expected = shapely.union_all(list(pieces.values()))
        assert result.symmetric_difference(expected).area < 1e-9  # identity


def test_a_drag_reuses_the_base() -> None:
    union = IncrementalUnion()
    pieces = {f"p{k}": box(k, 0.0) for k in range(8)}
    union.union(pieces)
    pieces["p3"] = box(3, 0.5)
    union.union(pieces)
    assert union.rebuilt  # the first frame of a drag sets the moving piece aside
    for step in range(2, 5):
        pieces["p3"] = box(3, 0.5 * step)
        union.union(pieces)
        assert not union.rebuilt  # later frames only unite the moving piece with the base
