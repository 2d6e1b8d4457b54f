"""Random edits of a layout for the tests that compare a warm analysis with a fresh one."""

from __future__ import annotations

import random

from app.model import edits
from app.model.elements import Layout

# A move of a few metres keeps most junctions but changes their legs (common practice, no source).
MOVE_M = 6.0


def random_move(layout: Layout, rng: random.Random) -> Layout:
    """One vertex of a line (or point of an object) moved by up to MOVE_M in x and y."""
    movable = [(element.id, len(element.vertices), [v.xy for v in element.vertices])
               for element in (*layout.centerlines, *layout.runways)]
    movable += [(obj.id, len(obj.outline), list(obj.outline)) for obj in layout.objects]
    element_id, count, points = rng.choice(movable)
    index = rng.randrange(count)
    x_m, y_m = points[index]
    return edits.move_vertex(layout, element_id, index, x_m + rng.uniform(-MOVE_M, MOVE_M),
                             y_m + rng.uniform(-MOVE_M, MOVE_M))


def random_edit(layout: Layout, rng: random.Random) -> Layout:
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
    return random_move(layout, rng)
