"""DXF export for the drafting team: a layout and its derived results as an R2018 drawing.

The drawing is in the layout's units (feet or metres; the model is in metres). Exact curves
stay exact: centerline corners are LWPOLYLINE bulges, turn and fillet arcs are ARC entities.
Dense arrays (pavement outlines) become LWPOLYLINEs simplified with half of
:data:`CHORD_TOLERANCE`, so they stay within it of the curves they stand for. Tyre and wingtip
tracks are guides: they are drawn within the coarser :data:`TRACK_TOLERANCE`. The file is
rendered in memory and written atomically. Layers, styles and sizes: docs/dxf.md.
"""

from __future__ import annotations

import io
import math
from collections.abc import Callable, Collection
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
from shapely.geometry.base import BaseGeometry

from app.fileio import dxf_content as content
from app.fileio.atomic import write_atomic
from app.fileio.dxf_content import FloatArray
from app.fileio.dxf_layers import DXF_LAYERS, aircraft_tokens, select_layers
from app.fileio.dxf_style import DxfSheet, drawing_scale, format_length, new_drawing
from app.model.elements import Layout
from app.model.results import AircraftTracks, ArcRecord, LayoutResult
from geometry.sweep import DEFAULT_CHORD_TOLERANCE_M
from geometry.units import LengthUnit, from_metres

CHORD_TOLERANCE = {"ft": 0.01, "m": 0.003}  # drawing units: polyline to true curve, at most
SIMPLIFY_SHARE = 0.5  # the input arrays may already carry the other half from their own sampling
# Tracks are guides, not edges a contractor sets out: 0.03 ft (9 mm) or 10 mm from the true curve,
# far below a pen width on any sheet that holds a layout (common practice, no source). The engine
# samples them within DEFAULT_CHORD_TOLERANCE_M; the simplification takes the rest.
TRACK_TOLERANCE = {"ft": 0.03, "m": 0.01}  # drawing units: drawn track to true track, at most
SAFETY_CAUTION = ("Preliminary planning layout only. Verify against the governing standard, local codes "
                  "and the aircraft manufacturers' data. Final design by a licensed engineer.")
UNIT_NAMES = {"ft": "feet (international foot, 0.3048 m)", "m": "metres"}
AREA_UNITS = {"ft": ("sq ft", 0.3048 ** 2), "m": ("m2", 1.0)}
NOTES_WIDTH_IN_TEXT_HEIGHTS = 60.0
LABEL_JUNCTION_CLEARANCE_IN_TEXT_HEIGHTS = 10.0  # names stay out of the crowd at junctions


class DxfExportError(OSError):
    """The DXF file could not be written; no partial file is left behind."""


@dataclass(frozen=True, slots=True)
class RenderedDxf:
    """A drawing rendered in memory: the file's bytes and what it holds."""

    data: bytes
    units: LengthUnit
    entity_counts: tuple[tuple[str, int], ...]  # (DXF layer name, entities), in layer order
    warnings: tuple[str, ...]

    @property
    def layers(self) -> tuple[str, ...]:
        return tuple(name for name, _count in self.entity_counts)


@dataclass(frozen=True, slots=True)
class ExportSummary:
    """What :func:`export_dxf` wrote."""

    path: Path
    units: LengthUnit
    layers: tuple[str, ...]                     # DXF layer names written, in drawing order
    entity_counts: tuple[tuple[str, int], ...]  # (DXF layer name, entities on it)
    warnings: tuple[str, ...] = ()              # what was drawn differently from the model, and why

    @property
    def total_entities(self) -> int:
        return sum(count for _name, count in self.entity_counts)

    def count(self, layer_name: str) -> int:
        """Entities on the DXF layer ``layer_name`` (0 when the layer was not written)."""
        return dict(self.entity_counts).get(layer_name, 0)


def export_dxf(layout: Layout, result: LayoutResult, path: Path | str, *,
               layers: Collection[str] | None = None, include_underlays: bool = False) -> ExportSummary:
    """Write ``layout`` and ``result`` to the DXF file ``path``, replacing it atomically.

    Parameters
    ----------
    layers : keys of :data:`~app.fileio.dxf_layers.DXF_LAYERS` (or their DXF names) to write;
        None writes them all. A layer with nothing to draw is left out of the file.
    include_underlays : also copy the visible base drawings (DXF underlays) into the file, on
        layers of their own; by default the drafter's base drawing is not repeated.

    Raises
    ------
    UnknownLayerError : ``layers`` names a layer the exporter does not know (a ValueError).
    DxfExportError : the file cannot be written; the old file, if any, is untouched.
    """
    rendered = render_dxf(layout, result, layers=layers, include_underlays=include_underlays)
    try:
        write_atomic(path, rendered.data)
    except OSError as error:
        reason = " ".join(str(error).split()) or type(error).__name__
        raise DxfExportError(f"DXF export failed: {reason}") from error
    return ExportSummary(Path(path), rendered.units, rendered.layers, rendered.entity_counts,
                         rendered.warnings)


def render_dxf(layout: Layout, result: LayoutResult, *,
               layers: Collection[str] | None = None, include_underlays: bool = False) -> RenderedDxf:
    """The DXF file for ``layout`` and ``result`` as bytes (UTF-8, as R2018 requires)."""
    selected = select_layers(layers)
    units = layout.units
    units_per_m = from_metres(1.0, units)
    scale = drawing_scale(content.model_extent_size_m(layout, result) * units_per_m)
    doc = new_drawing(units, scale)
    drafting = _Drafting(DxfSheet(doc, units, scale, selected), units_per_m,
                         aircraft_tokens(content.aircraft_names(layout, result)))
    for key in DXF_LAYERS:
        if drafting.sheet.wants(key):
            _WRITERS[key](drafting, layout, result)
    if include_underlays and layout.underlays:
        from app.fileio.underlay_dxf import add_base_drawings

        drafting.warnings.extend(add_base_drawings(doc, layout.underlays, units_per_m))
    xmin, ymin, xmax, ymax = drafting.sheet.bounds() or (0.0, 0.0, 0.0, 0.0)
    # ezdxf copies the model space's extents into the header on writing: set both.
    doc.header["$EXTMIN"] = doc.modelspace().dxf.extmin = (xmin, ymin, 0.0)
    doc.header["$EXTMAX"] = doc.modelspace().dxf.extmax = (xmax, ymax, 0.0)
    stream = io.StringIO()
    doc.write(stream)
    return RenderedDxf(doc.encode(stream.getvalue()), units, drafting.sheet.entity_counts(),
                       tuple(drafting.warnings))


@dataclass(frozen=True, slots=True)
class _Drafting:
    """What every writer needs: the sheet, metres to drawing units, aircraft layer tokens."""

    sheet: DxfSheet
    units_per_m: float
    tokens: dict[str, str]
    warnings: list[str] = field(default_factory=list)

    @property
    def text_height(self) -> float:
        return self.sheet.scale.text_height

    @property
    def tolerance(self) -> float:
        """Simplification tolerance, drawing units."""
        return CHORD_TOLERANCE[self.sheet.units] * SIMPLIFY_SHARE

    @property
    def track_tolerance(self) -> float:
        """Simplification tolerance of the tracks, drawing units: what the sampling leaves."""
        return track_simplify_tolerance(self.sheet.units)

    def xy(self, points_m: object) -> FloatArray:
        return np.asarray(points_m, dtype=float).reshape(-1, 2) * self.units_per_m

    def point(self, point_m: tuple[float, float]) -> tuple[float, float]:
        return (point_m[0] * self.units_per_m, point_m[1] * self.units_per_m)

    def length(self, length_m: float) -> str:
        return format_length(length_m * self.units_per_m, self.sheet.units)


# ---------------------------------------------------------------- linework

def _hatch(key: str, geometry: BaseGeometry | None, drafting: _Drafting) -> None:
    for polygon in content.polygon_rings(geometry, drafting.units_per_m, drafting.tolerance):
        drafting.sheet.hatch(key, polygon)


def _outline(key: str, geometry: BaseGeometry | None, drafting: _Drafting) -> None:
    for exterior, holes in content.polygon_rings(geometry, drafting.units_per_m, drafting.tolerance):
        for ring in (exterior, *holes):
            drafting.sheet.polyline(key, ring, closed=True)


def track_simplify_tolerance(units: LengthUnit) -> float:
    """How far the simplification may move a track, drawing units: :data:`TRACK_TOLERANCE` less
    the engine's own sampling (geometry.sweep.DEFAULT_CHORD_TOLERANCE_M)."""
    return TRACK_TOLERANCE[units] - from_metres(DEFAULT_CHORD_TOLERANCE_M, units)


def _polyline_simplified(key: str, xy: FloatArray, drafting: _Drafting, aircraft: str | None = None,
                         tolerance: float | None = None) -> None:
    for run in content.finite_runs(xy):
        line = content.simplified(run, drafting.tolerance if tolerance is None else tolerance)
        if line is not None:
            drafting.sheet.polyline(key, line, aircraft=aircraft)


def _arc(key: str, arc: ArcRecord, drafting: _Drafting) -> None:
    drafting.sheet.arc(key, drafting.point(arc.center_m), arc.radius_m * drafting.units_per_m,
                       arc.start_angle_rad, arc.start_angle_rad + content.arc_span_rad(arc))


def _write_existing_hatch(drafting: _Drafting, layout: Layout, result: LayoutResult) -> None:
    for polygon in content.existing_polygons(layout):
        _hatch("existing_pavement_hatch", polygon, drafting)


def _write_existing_outline(drafting: _Drafting, layout: Layout, result: LayoutResult) -> None:
    for polygon in content.existing_polygons(layout):
        _outline("existing_pavement", polygon, drafting)


def _write_required(drafting: _Drafting, layout: Layout, result: LayoutResult) -> None:
    for junction_id in content.junction_ids(result):
        _outline("required_pavement", result.junctions[junction_id].required_area, drafting)


def _write_clearance_zones(drafting: _Drafting, layout: Layout, result: LayoutResult) -> None:
    tolerance_m = drafting.tolerance / drafting.units_per_m
    _outline("clearance_zones", content.clearance_zones(layout, tolerance_m), drafting)


def _write_fillets(drafting: _Drafting, layout: Layout, result: LayoutResult) -> None:
    """Tapers as polylines, the fillet arc as an ARC: the edge a contractor sets out."""
    tolerance_m = CHORD_TOLERANCE[drafting.sheet.units] / drafting.units_per_m
    for junction_id in content.junction_ids(result):
        for fillet in sorted(result.junctions[junction_id].fillets, key=lambda f: f.corner_key):
            edge_m = np.asarray(fillet.edge_xy, dtype=float).reshape(-1, 2)
            edge_m = edge_m[np.all(np.isfinite(edge_m), axis=1)]
            if fillet.arc is None:
                _polyline_simplified("fillets", drafting.xy(edge_m), drafting)
                continue
            for run in content.off_arc_runs(edge_m, fillet.arc, tolerance_m):
                _polyline_simplified("fillets", drafting.xy(run), drafting)
            _arc("fillets", fillet.arc, drafting)


def _write_runway_centerlines(drafting: _Drafting, layout: Layout, result: LayoutResult) -> None:
    for runway in layout.runways:
        for run in content.finite_runs(drafting.xy([vertex.xy for vertex in runway.vertices])):
            drafting.sheet.polyline("runway_centerlines", run)


def _write_taxiway_centerlines(drafting: _Drafting, layout: Layout, result: LayoutResult) -> None:
    for centerline in layout.centerlines:
        rows, warning = content.centerline_rows(centerline, drafting.units_per_m)
        if warning is not None:
            drafting.warnings.append(warning)
        if rows is not None:
            drafting.sheet.polyline("taxiway_centerlines", rows)


def _write_turn_centerlines(drafting: _Drafting, layout: Layout, result: LayoutResult) -> None:
    for arc in content.turn_arcs(result):
        _arc("turn_centerlines", arc, drafting)


def _write_tracks(key: str, drafting: _Drafting, result: LayoutResult,
                  pick: Callable[[AircraftTracks], tuple[FloatArray, FloatArray]]) -> None:
    for aircraft_name, token in drafting.tokens.items():
        for tracks in content.tracks_of(result, aircraft_name):
            for track in pick(tracks):
                _polyline_simplified(key, drafting.xy(track), drafting, aircraft=token,
                                     tolerance=drafting.track_tolerance)


def _write_objects(drafting: _Drafting, layout: Layout, result: LayoutResult) -> None:
    for fixed_object in layout.objects:
        runs = content.finite_runs(drafting.xy(fixed_object.outline))
        if runs:
            drafting.sheet.polyline("objects", runs[0], closed=len(runs[0]) >= 3)
        elif len(fixed_object.outline) == 1 and all(map(math.isfinite, fixed_object.outline[0])):
            # A point object (a sign, a navaid): a small circle a drafter can find and snap to.
            drafting.sheet.circle("objects", drafting.point(fixed_object.outline[0]),
                                  drafting.text_height / 2.0)


# ---------------------------------------------------------------- annotation

def _upright_deg(heading_rad: float) -> float:
    """Text angle along ``heading_rad``, turned so it never reads upside down: (-90, 90]."""
    angle = math.degrees(heading_rad) % 180.0
    return angle - 180.0 if angle > 90.0 else angle


def _label_along(text: str, points_m: list[tuple[float, float]], result: LayoutResult,
                 drafting: _Drafting) -> None:
    """``text`` along a line, above it, away from its junctions."""
    avoid_m = [result.junctions[junction_id].point_m for junction_id in content.junction_ids(result)]
    clearance_m = LABEL_JUNCTION_CLEARANCE_IN_TEXT_HEIGHTS * drafting.text_height / drafting.units_per_m
    anchor = content.label_anchor(points_m, avoid_m, clearance_m)
    if not text.strip() or anchor is None:
        return
    (x, y), heading_rad = drafting.point(anchor[0]), anchor[1]
    angle = math.radians(_upright_deg(heading_rad))
    lift = 0.9 * drafting.text_height  # clear of the line, on the reader's upper side
    drafting.sheet.text("labels", text, (x - lift * math.sin(angle), y + lift * math.cos(angle)),
                        math.degrees(angle))


def _write_labels(drafting: _Drafting, layout: Layout, result: LayoutResult) -> None:
    for centerline in layout.centerlines:
        _label_along(centerline.name, [v.xy for v in centerline.vertices], result, drafting)
    for runway in layout.runways:
        _label_along(f"RWY {runway.designation}", [v.xy for v in runway.vertices], result, drafting)
    for fixed_object in layout.objects:
        finite = [xy for xy in fixed_object.outline if all(map(math.isfinite, xy))]
        if fixed_object.name.strip() and finite:
            x, y = np.mean(drafting.xy(finite), axis=0)
            above = float(y) + 1.5 * drafting.text_height  # clear of a point object's marker circle
            drafting.sheet.text("labels", fixed_object.name, (float(x), above))
    for junction_id in content.junction_ids(result):
        for fillet in sorted(result.junctions[junction_id].fillets, key=lambda f: f.corner_key):
            _fillet_label(fillet.fillet_radius_m, fillet.taper_a_m, fillet.taper_b_m, fillet.arc,
                          fillet.edge_xy, drafting)


def _fillet_label(radius_m: float, taper_a_m: float, taper_b_m: float, arc: ArcRecord | None,
                  edge_xy_m: FloatArray, drafting: _Drafting) -> None:
    """Fillet radius and taper lengths, set off the pavement on the inside of the corner."""
    text = (f"FILLET R{drafting.length(radius_m)} TAPERS {drafting.length(taper_a_m)}"
            f"/{drafting.length(taper_b_m)}")
    if arc is not None:
        middle = arc.start_angle_rad + content.arc_span_rad(arc) / 2.0
        inset_m = arc.radius_m - 2.0 * drafting.text_height / drafting.units_per_m
        anchor_m = (arc.center_m[0] + inset_m * math.cos(middle),
                    arc.center_m[1] + inset_m * math.sin(middle))
        # The text runs from the arc towards its centre, away from the pavement.
        side = "left" if math.cos(middle) > 0.0 else "right"
    else:
        edge = content.finite_runs(np.asarray(edge_xy_m, dtype=float))
        if not edge:
            return
        x, y = edge[0][len(edge[0]) // 2]
        anchor_m, side = (float(x), float(y)), "center"
    drafting.sheet.text("labels", text, drafting.point(anchor_m), side=side)


def _radius_dimension(arc: ArcRecord, share: float, drafting: _Drafting) -> None:
    angle_rad = arc.start_angle_rad + share * content.arc_span_rad(arc)
    drafting.sheet.radius_dimension("dimensions", drafting.point(arc.center_m),
                                    arc.radius_m * drafting.units_per_m, math.degrees(angle_rad))


def _write_dimensions(drafting: _Drafting, layout: Layout, result: LayoutResult) -> None:
    # Turn and fillet arcs are concentric: their leaders sit at a third and two thirds of the arc.
    for arc in content.turn_arcs(result):
        _radius_dimension(arc, 1.0 / 3.0, drafting)
    for arc in content.fillet_arcs(result):
        _radius_dimension(arc, 2.0 / 3.0, drafting)


def _write_findings(drafting: _Drafting, layout: Layout, result: LayoutResult) -> None:
    height = drafting.text_height
    for finding in result.findings:
        if not all(map(math.isfinite, finding.location_m)):
            continue
        x, y = drafting.point(finding.location_m)
        drafting.sheet.circle("findings", (x, y), height)
        drafting.sheet.text("findings", finding.code, (x, y + 2.0 * height))


def notes_lines(layout: Layout, result: LayoutResult) -> list[str]:
    """The notes block: title, units, rule set, design aircraft, pavement areas, the caution."""
    units = layout.units

    def length(value_m: float) -> str:
        return format_length(from_metres(value_m, units), units)

    area_name, m2_per_unit = AREA_UNITS[units]
    lines = [layout.title, f"Units: {UNIT_NAMES[units]}", f"Rule set: {layout.rule_set}",
             "Design aircraft:"]
    lines += [f"  {a.name}: wingspan {length(a.wingspan_m)}, main gear width {length(a.mgw_m)}, "
              f"cockpit to main gear {length(a.cmg_m)}, wheelbase {length(a.wheelbase_m)}"
              for a in layout.fleet] or ["  none"]
    lines += [f"Total pavement {result.total_area_m2 / m2_per_unit:,.0f} {area_name}; "
              f"new pavement {result.new_area_m2 / m2_per_unit:,.0f} {area_name}"]
    lines += [f"Drafting accuracy: pavement, fillets and centerlines within {CHORD_TOLERANCE[units]:g} "
              f"{units} of the design, arcs exact; tyre and wingtip tracks (guides) within "
              f"{TRACK_TOLERANCE[units]:g} {units}"]
    lines += [line for line in layout.notes.splitlines() if line.strip()]
    return [*lines, f"CAUTION: {SAFETY_CAUTION}"]


def _write_notes(drafting: _Drafting, layout: Layout, result: LayoutResult) -> None:
    height = drafting.text_height
    _xmin, _ymin, xmax, ymax = drafting.sheet.bounds() or (0.0, 0.0, 0.0, 0.0)
    drafting.sheet.mtext("notes", notes_lines(layout, result), (xmax + 3.0 * height, ymax),
                         NOTES_WIDTH_IN_TEXT_HEIGHTS * height)


def _on(key: str, pick: Callable[[LayoutResult], BaseGeometry | None],
        draw: Callable[[str, BaseGeometry | None, _Drafting], None]) -> Writer:
    return lambda drafting, layout, result: draw(key, pick(result), drafting)


def _tracks_on(key: str, pick: Callable[[AircraftTracks], tuple[FloatArray, FloatArray]]) -> Writer:
    return lambda drafting, layout, result: _write_tracks(key, drafting, result, pick)


Writer = Callable[[_Drafting, Layout, LayoutResult], None]

_WRITERS: dict[str, Writer] = {
    "new_pavement_hatch": _on("new_pavement_hatch", lambda r: r.new_pavement, _hatch),
    "existing_pavement_hatch": _write_existing_hatch,
    "existing_pavement": _write_existing_outline,
    "shoulders": _on("shoulders", lambda r: r.shoulders, _outline),
    "pavement_edges": _on("pavement_edges", lambda r: r.total_pavement, _outline),
    "fillets": _write_fillets,
    "required_pavement": _write_required,
    "runway_centerlines": _write_runway_centerlines,
    "taxiway_centerlines": _write_taxiway_centerlines,
    "turn_centerlines": _write_turn_centerlines,
    "gear_tracks": _tracks_on("gear_tracks", lambda t: (t.gear_left_edge_xy, t.gear_right_edge_xy)),
    "wingtip_tracks": _tracks_on("wingtip_tracks", lambda t: (t.wingtip_left_xy, t.wingtip_right_xy)),
    "objects": _write_objects,
    "clearance_zones": _write_clearance_zones,
    "labels": _write_labels,
    "dimensions": _write_dimensions,
    "findings": _write_findings,
    "notes": _write_notes,
}
