"""Which text labels the plan view shows, and where (Qt-free, so it is tested without Qt).

Labels keep their size in screen pixels while the plan zooms, so zoomed out they run into each
other. :func:`place_labels` takes the labels in priority order, each with the screen rectangles it
may take (its usual place first, then the alternatives), and gives each label the first of them
that meets no rectangle given to a label before it; a label with none left is hidden. Zooming in
moves the anchor points apart while the rectangles keep their size, so hidden labels come back.

Screen coordinates are pixels, x to the right, y down (as on the screen).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

Anchor = tuple[float, float]

# Where the anchor point sits on the text box, as a fraction of its width and height (0, 0 the top
# left corner): the usual place above and to the right of the point, then below it, then to its
# left. The order is the usual preference for labels beside a point symbol.
ABOVE_RIGHT: Anchor = (0.0, 1.0)
BELOW_RIGHT: Anchor = (0.0, 0.0)
ABOVE_LEFT: Anchor = (1.0, 1.0)
LABEL_ANCHORS: tuple[Anchor, ...] = (ABOVE_RIGHT, BELOW_RIGHT, ABOVE_LEFT)


@dataclass(frozen=True, slots=True)
class ScreenRect:
    """An axis-aligned rectangle in screen pixels."""

    left: float
    top: float
    width: float
    height: float

    @property
    def right(self) -> float:
        return self.left + self.width

    @property
    def bottom(self) -> float:
        return self.top + self.height

    def intersects(self, other: ScreenRect) -> bool:
        """True when the two share some area (rectangles that only touch do not intersect)."""
        return (self.left < other.right and other.left < self.right
                and self.top < other.bottom and other.top < self.bottom)

    def grown(self, margin_px: float) -> ScreenRect:
        return ScreenRect(self.left - margin_px, self.top - margin_px,
                          self.width + 2.0 * margin_px, self.height + 2.0 * margin_px)


def anchored_rect(x_px: float, y_px: float, width_px: float, height_px: float, anchor: Anchor) -> ScreenRect:
    """The box of a ``width_px`` by ``height_px`` text whose ``anchor`` sits at (x_px, y_px)."""
    return ScreenRect(x_px - anchor[0] * width_px, y_px - anchor[1] * height_px, width_px, height_px)


def place_labels(candidates: Sequence[Sequence[ScreenRect]]) -> list[int | None]:
    """For each label (in priority order), the index into its ``candidates`` of the place it takes,
    or None when every one of them meets a place taken by an earlier label. An earlier label is never
    moved or hidden by a later one. A pairwise test: meant for tens of labels, not thousands."""
    taken: list[ScreenRect] = []
    placed: list[int | None] = []
    for rects in candidates:
        choice = next((index for index, rect in enumerate(rects)
                       if not any(rect.intersects(other) for other in taken)), None)
        if choice is not None:
            taken.append(rects[choice])
        placed.append(choice)
    return placed
