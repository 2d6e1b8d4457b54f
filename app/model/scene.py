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
    RuleSetName,
    Runway,
    Vertex,
    iter_elements,
)
from app.model.results import LayoutResult
from app.model.scene_arrays import (
    JunctionParts,
    all_junction_parts,
    centerline_xy,
    join_pieces,
    rings_xy,
    runway_outline_xy,
)
from app.model.scene_arrays import (
    corner_arc_xy as corner_arc_xy,  # re-exported: the array helpers live in scene_arrays
)
from geometry.aircraft import DesignAircraft
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

SEVERITY_STYLES: dict[Severity, str] = {Severity.ERROR: "finding.error",
                                        Severity.WARNING: "finding.warning",
                                        Severity.INFO: "finding.info"}


@dataclass(frozen=True, slots=True, eq=False)
class Shape:
    """Outlines of one style: (n, 2) metres, pieces separated by NaN rows; ``filled`` rings are
    filled by the even-odd rule, so holes stay open. ``parts``, when given, are the arrays ``xy``
    joins, one per source (junction); then ``given_xy`` is None and ``xy`` is joined when first
    read (the view draws the parts: joining every track of the layout each frame of a drag cost
    about a millisecond for nothing)."""

    style: str
    given_xy: FloatArray | None
    filled: bool = False
    parts: tuple[FloatArray, ...] = ()
    _joined: list[FloatArray] = field(default_factory=list, repr=False)

    @property
    def xy(self) -> FloatArray:
        if self.given_xy is not None:
            return self.given_xy
        if not self._joined:
            self._joined.append(join_pieces(self.parts))
        return self._joined[0]

    @property
    def drawn_parts(self) -> tuple[FloatArray, ...]:
        """The non-empty arrays to draw: the parts, else ``xy`` as one."""
        return tuple(part for part in (self.parts or (self.xy,)) if len(part))


def joined_shape(style: str, parts: Sequence[FloatArray], filled: bool = False) -> Shape:
    return Shape(style, None, filled, tuple(parts))


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

# --- layers -------------------------------------------------------------------------------------

def _centerlines_layer(layout: Layout, result: LayoutResult | None) -> LayerData:
    drawn = result.centerline_polylines if result is not None else {}
    by_kind: dict[str, list[FloatArray]] = {"taxiway": [], "taxilane": []}
    for centerline in layout.centerlines:
        polyline = drawn.get(centerline.id)
        by_kind[centerline.kind].append(polyline if polyline is not None
                                        else centerline_xy(centerline.vertices))
    # a part per line: a drag changes one line, and the view re-reads only the part that is new
    shapes = tuple(joined_shape(f"centerline.{kind}", pieces) for kind, pieces in by_kind.items())
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


_SHOULDER_RINGS: dict[int, tuple[BaseGeometry, FloatArray]] = {}


def _shoulder_rings_xy(shoulders: BaseGeometry | None) -> FloatArray:
    """:func:`rings_xy` of the shoulders, the same array while they are the same object (a drag's
    live pass hands them back unchanged)."""
    if shoulders is None:
        return rings_xy(None)
    found = _SHOULDER_RINGS.get(id(shoulders))
    if found is None or found[0] is not shoulders:
        _SHOULDER_RINGS.clear()  # one entry: the last result's
        found = _SHOULDER_RINGS[id(shoulders)] = (shoulders, rings_xy(shoulders))
    return found[1]


def _pavement_layer(layout: Layout, result: LayoutResult | None,
                    parts: dict[str, JunctionParts]) -> LayerData:
    shapes = [Shape("pavement.existing", _existing_xy(layout.existing_pavements), filled=True)]
    if result is not None:
        junctions = [parts[junction_id] for junction_id in result.junctions]
        shapes += [Shape("pavement.shoulder", _shoulder_rings_xy(result.shoulders), filled=True),
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
    return dict(_half_widths_m(layout.fleet, layout.rule_set))


@lru_cache(maxsize=64)
def _half_widths_m(fleet: tuple[DesignAircraft, ...], rule_set: RuleSetName) -> tuple[tuple[str, float], ...]:
    """(kind, separation) pairs, cached: classifying the fleet took a fifth of a drag frame's scene."""
    if not fleet:
        return ()
    try:
        rules = get_rule_set(rule_set)
        aircraft = governing_aircraft(fleet, rules)
        return (("taxiway", rules.separation("taxiway_object", aircraft).value_m),
                ("taxilane", rules.separation("taxilane_object", aircraft).value_m))
    except GeometryError:
        return ()


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
    body, outline, points = _object_drawing(layout.objects)
    clearance = Shape("object.clearance", rings_xy(_clearance_zones(layout)))
    return LayerData("objects", (body, outline, clearance), points)


@lru_cache(maxsize=8)
def _object_drawing(objects: tuple[FixedObject, ...]) -> tuple[Shape, Shape, tuple[PointSet, ...]]:
    """The objects' bodies, outlines, symbols and labels, cached: the layer is rebuilt whenever a
    centerline moves (the clearance zones follow the lines), the objects themselves are not."""
    areas = [obj.outline + obj.outline[:1] for obj in objects if len(obj.outline) >= 3]
    lines = [obj.outline for obj in objects if len(obj.outline) == 2]
    spots = [obj for obj in objects if len(obj.outline) == 1]
    labelled = [obj for obj in objects if obj.name]
    arrays = [join_pieces(areas), join_pieces([*areas, *lines]), _xy([obj.outline[0] for obj in spots]),
              _xy([_label_point(obj) for obj in labelled])]
    for array in arrays:
        array.flags.writeable = False  # shared by every scene built from these objects
    body, outline, spot_xy, label_xy = arrays
    return (Shape("object.body", body, filled=True), Shape("object.outline", outline),
            (PointSet("object.point", spot_xy, keys=tuple(obj.id for obj in spots)),
             PointSet("object.label", label_xy, labels=tuple(obj.name for obj in labelled),
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
