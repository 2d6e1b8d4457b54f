"""Generated benchmark layouts: a grid of crossing taxiways for the TDG-5 theoretical airplane.

``grid_layout(junction_count)`` lays ``rows`` east-west taxiways across ``columns`` north-south
taxiways (``rows * columns == junction_count``, as square as the count allows), spaced
:data:`GRID_SPACING_FT` apart, in a layout whose units are feet and whose rule set is FAA. Every
east-west line has a vertex at each crossing, so a junction can be dragged by one vertex
(``app.model.edits.move_vertex``): that changes the junction and the legs of its two neighbours
on the same line, and nothing else, whatever the size of the grid.

The layout is fictional (no real airport); the only aircraft is the theoretical airplane of TDG 5
(``geometry.theoretical``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from app.model.elements import Centerline, DesignGroup, Layout, Vertex
from geometry.theoretical import theoretical_airplane
from geometry.units import to_metres

# 1,200 ft between crossings: more than a turn's tangent length plus the 8-CMG lead-out the
# analysis follows for the TDG-5 airplane (CMG 100 ft), so each junction is analysed on its own.
# A benchmark choice, not a standard.
GRID_SPACING_FT = 1200.0
OVERHANG_FT = 600.0  # every line runs this far past its outermost crossing


@dataclass(frozen=True, slots=True)
class DragTarget:
    """A vertex to drag, where it starts, and the direction it is dragged in (along the other
    line through its junction, so the junction stays a junction of the same lines)."""

    centerline_id: str
    vertex_index: int
    x_m: float
    y_m: float
    heading_rad: float


def grid_shape(junction_count: int) -> tuple[int, int]:
    """(rows, columns) with rows * columns == junction_count and rows <= columns, nearest square."""
    if junction_count < 1:
        raise ValueError(f"a grid needs at least one junction, got {junction_count}")
    rows = max(r for r in range(1, math.isqrt(junction_count) + 1) if junction_count % r == 0)
    return rows, junction_count // rows


def _vertex_ft(x_ft: float, y_ft: float) -> Vertex:
    return Vertex(to_metres(x_ft, "ft"), to_metres(y_ft, "ft"))


def grid_layout(junction_count: int) -> Layout:
    """A layout of crossing taxiways with exactly ``junction_count`` crossings."""
    rows, columns = grid_shape(junction_count)
    xs_ft = [column * GRID_SPACING_FT for column in range(columns)]
    ys_ft = [row * GRID_SPACING_FT for row in range(rows)]
    group = DesignGroup(tdg="5", adg="V")
    across = tuple(
        Centerline(f"ew-{row}", f"E{row}",
                   (_vertex_ft(-OVERHANG_FT, y), *(_vertex_ft(x, y) for x in xs_ft),
                    _vertex_ft(xs_ft[-1] + OVERHANG_FT, y)), group=group)
        for row, y in enumerate(ys_ft))
    along = tuple(
        Centerline(f"ns-{column}", f"N{column}",
                   (_vertex_ft(x, -OVERHANG_FT), _vertex_ft(x, ys_ft[-1] + OVERHANG_FT)), group=group)
        for column, x in enumerate(xs_ft))
    return Layout(title=f"Benchmark grid, {junction_count} crossings", rule_set="FAA", units="ft",
                  fleet=(theoretical_airplane("5"),), centerlines=across + along)


def drag_target(junction_count: int) -> DragTarget:
    """The middle crossing of the middle east-west line (vertex 0 is the west overhang)."""
    rows, columns = grid_shape(junction_count)
    row, column = rows // 2, columns // 2
    return DragTarget(f"ew-{row}", column + 1, to_metres(column * GRID_SPACING_FT, "ft"),
                      to_metres(row * GRID_SPACING_FT, "ft"), math.pi / 2.0)


DRAG_STEP_M = 0.3  # how far the pointer moves between two frames of a drag


def drag_positions_m(target: DragTarget, frame_count: int) -> list[tuple[float, float]]:
    """Where the dragged vertex is at each frame: :data:`DRAG_STEP_M` further along the target's
    heading every frame, a new place each time so that no frame is answered from the cache."""
    step_x, step_y = DRAG_STEP_M * math.cos(target.heading_rad), DRAG_STEP_M * math.sin(target.heading_rad)
    return [(target.x_m + step_x * (frame + 1), target.y_m + step_y * (frame + 1))
            for frame in range(frame_count)]
