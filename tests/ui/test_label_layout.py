"""Which labels are shown, and where (app/ui/items/label_layout.py). Qt-free."""

from __future__ import annotations

from hypothesis import given
from hypothesis import strategies as st

from app.ui.items.label_layout import (
    ABOVE_RIGHT,
    BELOW_RIGHT,
    LABEL_ANCHORS,
    ScreenRect,
    anchored_rect,
    place_labels,
)

coordinate = st.floats(-200.0, 200.0, allow_nan=False)
extent = st.floats(0.5, 120.0, allow_nan=False)
rects = st.builds(ScreenRect, coordinate, coordinate, extent, extent)
labels = st.lists(st.lists(rects, min_size=1, max_size=3), max_size=25)


def taken(candidates: list[list[ScreenRect]], placed: list[int | None]) -> list[ScreenRect]:
    return [rects[choice] for rects, choice in zip(candidates, placed, strict=True) if choice is not None]


@given(labels)
def test_no_two_shown_labels_overlap(candidates: list[list[ScreenRect]]) -> None:
    shown = taken(candidates, place_labels(candidates))
    for index, rect in enumerate(shown):
        for other in shown[index + 1:]:
            assert not rect.intersects(other)  # invariant: shown labels never overlap


@given(labels)
def test_a_label_with_a_free_place_takes_the_first_one(candidates: list[list[ScreenRect]]) -> None:
    placed = place_labels(candidates)
    for index, rects in enumerate(candidates):
        before = taken(candidates[:index], placed[:index])
        free = [k for k, rect in enumerate(rects) if not any(rect.intersects(other) for other in before)]
        # invariant: a place meeting nothing shown earlier is taken, the first such place of the label
        assert placed[index] == (free[0] if free else None)


@given(labels, labels)
def test_later_labels_never_move_or_hide_earlier_ones(first: list[list[ScreenRect]],
                                                      later: list[list[ScreenRect]]) -> None:
    # invariant: the priority order is kept (a label's place depends on earlier labels only)
    assert place_labels(first + later)[:len(first)] == place_labels(first)


@given(st.lists(rects, max_size=25))
def test_one_place_each_hides_exactly_the_labels_that_meet_an_earlier_shown_one(
        boxes: list[ScreenRect]) -> None:
    placed = place_labels([[box] for box in boxes])
    shown: list[ScreenRect] = []
    for box, choice in zip(boxes, placed, strict=True):
        # invariant: with one place a label, the plain rule: shown unless it meets one shown before
        assert (choice is None) == any(box.intersects(other) for other in shown)
        if choice is not None:
            shown.append(box)


@given(rects, rects)
def test_intersection_is_symmetric_and_touching_is_not_overlapping(a: ScreenRect, b: ScreenRect) -> None:
    assert a.intersects(b) == b.intersects(a)  # invariant: symmetry
    beside = ScreenRect(a.right, a.top, b.width, b.height)
    assert not a.intersects(beside)  # identity: boxes that share only an edge do not overlap
    assert a.intersects(a)  # identity: a box of some area overlaps itself


def test_the_anchor_is_the_point_of_the_text_box_at_the_label_point() -> None:
    above = anchored_rect(10.0, 20.0, 30.0, 8.0, ABOVE_RIGHT)
    below = anchored_rect(10.0, 20.0, 30.0, 8.0, BELOW_RIGHT)
    assert (above.left, above.bottom) == (10.0, 20.0)  # identity: the point at its lower left corner
    assert (below.left, below.top) == (10.0, 20.0)  # identity: the point at its upper left corner
    assert LABEL_ANCHORS[0] == ABOVE_RIGHT  # common practice, no source: above right of the point first


def test_labels_far_apart_are_all_shown_and_a_crowded_one_moves_before_it_hides() -> None:
    first = anchored_rect(0.0, 0.0, 40.0, 10.0, ABOVE_RIGHT)
    crowded = [anchored_rect(5.0, 0.0, 40.0, 10.0, anchor) for anchor in LABEL_ANCHORS]
    assert place_labels([[first], crowded]) == [0, 1]  # identity: below its point, where it is free
    hemmed = [[anchored_rect(5.0, 0.0, 40.0, 10.0, anchor).grown(50.0)] for anchor in LABEL_ANCHORS]
    assert place_labels([[first], *hemmed]) == [0, None, None, None]  # identity: no free place left
    apart = [[anchored_rect(100.0 * k, 0.0, 40.0, 10.0, ABOVE_RIGHT)] for k in range(5)]
    assert place_labels(apart) == [0] * 5  # identity: nothing overlaps, everything is shown
