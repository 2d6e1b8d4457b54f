"""What the plan view draws: a Layout and its LayoutResult turned into arrays per layer (Qt-free).

A layer is a few :class:`Shape` (many outlines joined into one array, pieces separated by a row
of NaN, so a view draws each style as ONE curve) and :class:`PointSet` (symbols, optional labels).
Style keys (``"centerline.taxiway"``...) name the look; the UI maps them to pens and brushes and
docs/legend.md describes them. :func:`build_scene` reuses a layer of the previous scene (the very
same object) when the inputs it was drawn from did not change, so a view redraws only the layers
that are not identical to what it shows. Within a layer, what each junction contributes is kept
while its result is the same object (a drag recomputes 2 or 3 junctions), and a shape lists those
per-junction ``parts``, so a view re-reads only the parts that are not the arrays it drew before.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np
import numpy.typing as npt
import shapely
from shapely.geometry.base import BaseGeometry

from app.model.elements import (
    Centerline,
    ExistingPavement,
    FixedObject,
    Layout,
    Runway,
    Vertex,
    iter_elements,
)
from app.model.results import LayoutResult
from app.model.scene_arrays import JunctionParts, all_junction_parts, join_pieces, rings_xy
from geometry.errors import GeometryError
from geometry.findings import Severity
from geometry.rulesets import get_rule_set, governing_aircraft

FloatArray = npt.NDArray[np.float64]

# Drawing order, bottom to top, and the names the Layers panel shows.
LAYER_TITLES: dict[str, str] = {
    "pavement": "Pavement",
    "runways": "Runways",
    "gear_tracks": "Main-gear tyre tracks",
    "wingtip_tracks": "Wingtip tracks",
    "objects": "Objects and clearance zones",
    "centerlines": "Centerlines",
    "findings": "Finding markers",
}
LAYER_ORDER: tuple[str, ...] = tuple(LAYER_TITLES)

# A drawn corner arc stays within this distance of the true arc; finer than any screen needs
# at plan scales and far coarser than the analysis' own chord tolerance.
DRAW_CHORD_TOLERANCE_M = 0.05
SEVERITY_STYLES: dict[Severity, str] = {Severity.ERROR: "finding.error",
                                        Severity.WARNING: "finding.warning",
                                        Severity.INFO: "finding.info"}


@dataclass(frozen=True, slots=True, eq=False)
class Shape:
    """Outlines of one style: (n, 2) metres, pieces separated by NaN rows; ``filled`` rings are
    filled by the even-odd rule, so holes stay open. ``parts``, when given, are the arrays ``xy``
    joins, one per source (junction)."""

    style: str
    xy: FloatArray
    filled: bool = False
    parts: tuple[FloatArray, ...] = ()

    @property
    def drawn_parts(self) -> tuple[FloatArray, ...]:
        """The non-empty arrays to draw: the parts, else ``xy`` as one."""
        return tuple(part for part in (self.parts or (self.xy,)) if len(part))


def joined_shape(style: str, parts: Sequence[FloatArray], filled: bool = False) -> Shape:
    return Shape(style, join_pieces(parts), filled, tuple(parts))


@dataclass(frozen=True, slots=True, eq=False)
class PointSet:
    """Symbols of one style at (n, 2) points; ``keys`` name what each point is (ids)."""

    style: str
    xy: FloatArray
    labels: tuple[str, ...] = ()
    keys: tuple[str, ...] = ()


@dataclass(frozen=True, slots=True, eq=False)
class LayerData:
    name: str
    shapes: tuple[Shape, ...] = ()
    points: tuple[PointSet, ...] = ()

    def shape(self, style: str) -> Shape | None:
        return next((shape for shape in self.shapes if shape.style == style), None)

    def point_set(self, style: str) -> PointSet | None:
        return next((points for points in self.points if points.style == style), None)


@dataclass(frozen=True, slots=True, eq=False)
class Scene:
    layers: dict[str, LayerData]
    inputs: dict[str, tuple[object, ...]]
    junction_parts: dict[str, JunctionParts] = field(default_factory=dict)


# --- arrays -------------------------------------------------------------------------------------

def corner_arc_xy(before: Sequence[float], corner: Sequence[float], after: Sequence[float],
                  radius_m: float, max_tangent_m: float) -> FloatArray | None:
    """Points of the arc of ``radius_m`` rounding ``corner`` between the legs from ``before`` and to
    ``after``; the tangent length is shortened to ``max_tangent_m`` (a smaller radius) where the legs
    are too short, since a sketch must still draw. None for a straight-through or folded vertex."""
    p0, p1, p2 = (np.asarray(p, dtype=float) for p in (before, corner, after))
    u1, u2 = p1 - p0, p2 - p1
    n1, n2 = float(np.hypot(*u1)), float(np.hypot(*u2))
    if n1 == 0.0 or n2 == 0.0:
        return None
    u1, u2 = u1 / n1, u2 / n2
    turn_rad = math.atan2(u1[0] * u2[1] - u1[1] * u2[0], float(u1 @ u2))
    if abs(turn_rad) < 1e-9 or abs(turn_rad) > math.pi - 1e-6:
        return None
    half_tan = math.tan(abs(turn_rad) / 2.0)
    radius = min(radius_m, max_tangent_m / half_tan)
    start = p1 - u1 * radius * half_tan
    side = 1.0 if turn_rad > 0.0 else -1.0
    centre = start + side * radius * np.array([-u1[1], u1[0]])
    step = 2.0 * math.acos(max(-1.0, 1.0 - DRAW_CHORD_TOLERANCE_M / radius)) if radius > 0 else math.pi
    count = max(2, math.ceil(abs(turn_rad) / max(step, 1e-3)) + 1)
    start_angle = math.atan2(start[1] - centre[1], start[0] - centre[0])
    angles = start_angle + np.linspace(0.0, turn_rad, count)
    return np.column_stack((centre[0] + radius * np.cos(angles), centre[1] + radius * np.sin(angles)))


@lru_cache(maxsize=4096)
def centerline_xy(vertices: tuple[Vertex, ...]) -> FloatArray:
    """The centerline as drawn: straights between vertices, true arcs (flattened) at rounded corners.
    Two rounded corners on one leg share it half and half. Cached by the (immutable) vertices and
    returned read-only, since a drag redraws every line but changes one."""
    points = _centerline_points(vertices)
    points.flags.writeable = False
    return points


def _centerline_points(vertices: Sequence[Vertex]) -> FloatArray:
    points = [np.array([[v.x_m, v.y_m]]) for v in vertices[:1]]
    for index in range(1, len(vertices) - 1):
        before, vertex, after = vertices[index - 1], vertices[index], vertices[index + 1]
        arc = None
        if vertex.corner_radius_m is not None:
            leg_in = math.dist(before.xy, vertex.xy) * (0.5 if before.corner_radius_m else 1.0)
            leg_out = math.dist(vertex.xy, after.xy) * (0.5 if after.corner_radius_m else 1.0)
            arc = corner_arc_xy(before.xy, vertex.xy, after.xy, vertex.corner_radius_m,
                                min(leg_in, leg_out))
        points.append(arc if arc is not None else np.array([vertex.xy]))
    if len(vertices) > 1:
        points.append(np.array([vertices[-1].xy]))
    return np.concatenate(points) if points else np.empty((0, 2))


def runway_outline_xy(runway: Runway) -> FloatArray:
    """The runway's rectangle (closed ring) from its thresholds and width."""
    (x0, y0), (x1, y1) = runway.vertices[0].xy, runway.vertices[1].xy
    length = math.hypot(x1 - x0, y1 - y0) or 1.0
    nx, ny = -(y1 - y0) / length * runway.width_m / 2.0, (x1 - x0) / length * runway.width_m / 2.0
    return np.array([[x0 + nx, y0 + ny], [x1 + nx, y1 + ny], [x1 - nx, y1 - ny],
                     [x0 - nx, y0 - ny], [x0 + nx, y0 + ny]])


# --- layers -------------------------------------------------------------------------------------

def _centerlines_layer(layout: Layout, result: LayoutResult | None) -> LayerData:
    drawn = result.centerline_polylines if result is not None else {}
    by_kind: dict[str, list[FloatArray]] = {"taxiway": [], "taxilane": []}
    for centerline in layout.centerlines:
        polyline = drawn.get(centerline.id)
        by_kind[centerline.kind].append(polyline if polyline is not None
                                        else centerline_xy(centerline.vertices))
    shapes = tuple(Shape(f"centerline.{kind}", join_pieces(pieces)) for kind, pieces in by_kind.items())
    plain = [(c.id, v) for c in layout.centerlines for v in c.vertices if v.corner_radius_m is None]
    rounded = [(c.id, v) for c in layout.centerlines for v in c.vertices if v.corner_radius_m is not None]
    points = [PointSet("vertex", _xy([v.xy for _, v in plain]), keys=tuple(i for i, _ in plain)),
              PointSet("vertex.rounded", _xy([v.xy for _, v in rounded]), keys=tuple(i for i, _ in rounded))]
    if result is not None:
        junctions = list(result.junctions.values())
        points.append(PointSet("junction", _xy([j.point_m for j in junctions]),
                               keys=tuple(j.junction_id for j in junctions)))
    labels = [(c.name, _midpoint(c.vertices[0].xy, c.vertices[1].xy)) for c in layout.centerlines
              if c.name and len(c.vertices) >= 2]
    points.append(PointSet("centerline.label", _xy([xy for _, xy in labels]),
                           labels=tuple(name for name, _ in labels)))
    return LayerData("centerlines", shapes, tuple(points))


def _runways_layer(layout: Layout) -> LayerData:
    outlines = [runway_outline_xy(runway) for runway in layout.runways]
    axes = [np.array([v.xy for v in runway.vertices]) for runway in layout.runways]
    middles = [np.mean(axis, axis=0) for axis in axes]
    return LayerData("runways", (Shape("runway.surface", join_pieces(outlines), filled=True),
                                 Shape("runway.edge", join_pieces(outlines)),
                                 Shape("runway.centerline", join_pieces(axes))),
                     (PointSet("runway.label", _xy(middles),
                               labels=tuple(r.designation for r in layout.runways),
                               keys=tuple(r.id for r in layout.runways)),))


@lru_cache(maxsize=8)
def _existing_xy(pavements: tuple[ExistingPavement, ...]) -> FloatArray:
    """Rings of the existing pavement (cached: a drag does not change it)."""
    existing = shapely.union_all([shapely.Polygon(p.outline, p.holes) for p in pavements
                                  if len(p.outline) >= 3]) if pavements else None
    xy = rings_xy(existing)
    xy.flags.writeable = False
    return xy


def _pavement_layer(layout: Layout, result: LayoutResult | None,
                    parts: dict[str, JunctionParts]) -> LayerData:
    shapes = [Shape("pavement.existing", _existing_xy(layout.existing_pavements), filled=True)]
    if result is not None:
        junctions = [parts[junction_id] for junction_id in result.junctions]
        shapes += [Shape("pavement.shoulder", rings_xy(result.shoulders), filled=True),
                   joined_shape("pavement.new", result.new_pavement_rings_xy(), filled=True),
                   joined_shape("pavement.fillet", [j.fillets for j in junctions], filled=True),
                   joined_shape("pavement.edge", result.pavement_edges_xy()),
                   joined_shape("pavement.required", [j.required for j in junctions])]
    return LayerData("pavement", tuple(shapes))


def _tracks_layer(name: str, result: LayoutResult | None, parts: dict[str, JunctionParts]) -> LayerData:
    if result is None:
        return LayerData(name)
    style = "track.gear" if name == "gear_tracks" else "track.wingtip"
    junctions = [parts[junction_id] for junction_id in result.junctions]
    return LayerData(name, tuple(joined_shape(key, [j.tracks[key] for j in junctions])
                                 for key in (style, f"{style}.excluded")))


def clearance_half_widths_m(layout: Layout) -> dict[str, float]:
    """Centerline-to-object separation by centerline kind, of the layout's rule set for the
    fleet's governing aircraft (empty without a fleet, or when it lies outside the groups)."""
    if not layout.fleet:
        return {}
    try:
        rules = get_rule_set(layout.rule_set)
        aircraft = governing_aircraft(layout.fleet, rules)
        return {"taxiway": rules.separation("taxiway_object", aircraft).value_m,
                "taxilane": rules.separation("taxilane_object", aircraft).value_m}
    except GeometryError:
        return {}


@lru_cache(maxsize=4096)
def _band(vertices: tuple[Vertex, ...], half_width_m: float) -> BaseGeometry:
    """One centerline widened to both sides (cached: a drag changes one line, not the others)."""
    line = shapely.LineString(centerline_xy(vertices))
    return line.buffer(half_width_m, cap_style="flat", join_style="round")


def _clearance_zones(layout: Layout) -> BaseGeometry | None:
    """Where objects must not stand: each centerline widened by its object separation (flat ends)."""
    half_widths_m = clearance_half_widths_m(layout)
    bands = [_band(line.vertices, half_widths_m[line.kind]) for line in layout.centerlines
             if line.kind in half_widths_m and len(line.vertices) >= 2]
    return shapely.union_all(bands) if bands else None


def _objects_layer(layout: Layout) -> LayerData:
    areas = [obj.outline + obj.outline[:1] for obj in layout.objects if len(obj.outline) >= 3]
    lines = [obj.outline for obj in layout.objects if len(obj.outline) == 2]
    spots = [obj for obj in layout.objects if len(obj.outline) == 1]
    labelled = [obj for obj in layout.objects if obj.name]
    return LayerData("objects",
                     (Shape("object.body", join_pieces(areas), filled=True),
                      Shape("object.outline", join_pieces([*areas, *lines])),
                      Shape("object.clearance", rings_xy(_clearance_zones(layout)))),
                     (PointSet("object.point", _xy([obj.outline[0] for obj in spots]),
                               keys=tuple(obj.id for obj in spots)),
                      PointSet("object.label", _xy([_label_point(obj) for obj in labelled]),
                               labels=tuple(obj.name for obj in labelled),
                               keys=tuple(obj.id for obj in labelled))))


def _findings_layer(result: LayoutResult | None) -> LayerData:
    if result is None:
        return LayerData("findings")
    sets = []
    for severity, style in SEVERITY_STYLES.items():
        picked = [(i, f) for i, f in enumerate(result.findings) if f.severity == severity]
        sets.append(PointSet(style, _xy([f.location_m for _, f in picked]),
                             labels=tuple(f.code for _, f in picked),
                             keys=tuple(str(i) for i, _ in picked)))
    return LayerData("findings", points=tuple(sets))


def _midpoint(a: tuple[float, float], b: tuple[float, float]) -> tuple[float, float]:
    return ((a[0] + b[0]) / 2.0, (a[1] + b[1]) / 2.0)


def _label_point(obj: FixedObject) -> tuple[float, float]:
    xs, ys = zip(*obj.outline, strict=True)
    return (max(xs), max(ys))


def _xy(points: Sequence[object]) -> FloatArray:
    return np.asarray(points, dtype=float).reshape(-1, 2)


# --- the scene ------------------------------------------------------------------------------------

def _layer_inputs(layout: Layout, result: LayoutResult | None) -> dict[str, tuple[object, ...]]:
    junctions = tuple(result.junctions.values()) if result is not None else ()
    return {
        "pavement": (layout.existing_pavements, result),
        "runways": (layout.runways,),
        "gear_tracks": junctions,
        "wingtip_tracks": junctions,
        "objects": (layout.objects, layout.centerlines, layout.fleet, (layout.rule_set,)),
        "centerlines": (layout.centerlines, result),
        "findings": (result.findings if result is not None else None,),
    }


def _build_layer(name: str, layout: Layout, result: LayoutResult | None,
                 parts: dict[str, JunctionParts]) -> LayerData:
    if name == "pavement":
        return _pavement_layer(layout, result, parts)
    if name == "runways":
        return _runways_layer(layout)
    if name in ("gear_tracks", "wingtip_tracks"):
        return _tracks_layer(name, result, parts)
    if name == "objects":
        return _objects_layer(layout)
    if name == "centerlines":
        return _centerlines_layer(layout, result)
    return _findings_layer(result)


def _same_inputs(a: tuple[object, ...], b: tuple[object, ...]) -> bool:
    """Identity for derived results (they hold arrays), equality for frozen layout values."""
    if len(a) != len(b):
        return False
    return all(x is y or (isinstance(x, tuple) and isinstance(y, tuple) and x == y)
               for x, y in zip(a, b, strict=True))


def build_scene(layout: Layout, result: LayoutResult | None = None,
                previous: Scene | None = None) -> Scene:
    """Every layer of ``layout`` (and of ``result`` when given); layers whose inputs equal those of
    ``previous`` are taken over from it unchanged (same object)."""
    inputs = _layer_inputs(layout, result)
    parts = all_junction_parts(result, previous.junction_parts if previous is not None else {})
    layers: dict[str, LayerData] = {}
    for name in LAYER_ORDER:
        if previous is not None and _same_inputs(previous.inputs[name], inputs[name]):
            layers[name] = previous.layers[name]
        else:
            layers[name] = _build_layer(name, layout, result, parts)
    return Scene(layers, inputs, parts)


def selection_xy(layout: Layout, element_ids: Iterable[str]) -> FloatArray:
    """Outlines of the elements ``element_ids`` (to highlight a selection), NaN-separated."""
    wanted = set(element_ids)
    pieces: list[FloatArray] = []
    for element in iter_elements(layout):
        if element.id not in wanted:
            continue
        if isinstance(element, Centerline):
            pieces.append(centerline_xy(element.vertices))
        elif isinstance(element, Runway):
            pieces.append(runway_outline_xy(element))
        else:
            pieces.append(_xy([*element.outline, element.outline[0]]))
    return join_pieces(pieces)


def layout_bounds(layout: Layout) -> tuple[float, float, float, float] | None:
    """(xmin, ymin, xmax, ymax) in metres of every element, runways with their width; None if empty."""
    pieces: list[FloatArray] = []
    for element in iter_elements(layout):
        if isinstance(element, Runway):
            pieces.append(runway_outline_xy(element))
        elif isinstance(element, Centerline):
            pieces.append(_xy([v.xy for v in element.vertices]))
        else:
            pieces.append(_xy(list(element.outline)))
    if not pieces:
        return None
    points = np.concatenate(pieces)
    return (float(points[:, 0].min()), float(points[:, 1].min()),
            float(points[:, 0].max()), float(points[:, 1].max()))
