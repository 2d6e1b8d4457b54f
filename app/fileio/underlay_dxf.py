"""Read a DXF base drawing (the existing airfield) into per-layer linework in plan metres.

Drawn: LINE, LWPOLYLINE and POLYLINE (bulged segments are exact arcs until they are flattened
here), ARC, CIRCLE, ELLIPSE, SPLINE, HATCH boundaries, and the same inside block references
(INSERT, nested up to :data:`MAX_BLOCK_DEPTH`). TEXT and MTEXT keep their position and string.
Everything else is counted in ``skipped_count``. Arcs are flattened so that no chord strays more
than ``chord_tolerance_m`` from the true arc (the sagitta), :data:`UNDERLAY_CHORD_TOLERANCE_M`
by default: far finer than a screen pixel at plan scales.

Units come from the drawing's ``$INSUNITS`` header variable; a drawing that states none (0, or
no header) is read in the layout's units and the note says so. A damaged file is read again in
ezdxf's recovery mode and the note says it may be incomplete.
"""

from __future__ import annotations

import math
import os
import stat
from collections.abc import Iterable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import ezdxf.filemanagement
import ezdxf.path
import numpy as np
from ezdxf import recover
from ezdxf.lldxf.const import DXFError, DXFStructureError
from ezdxf.math import Vec3, arc_angle_span_deg

from app.model.underlays import (
    BaseDrawing,
    DrawingText,
    FloatArray,
    LayerLinework,
    Underlay,
    UnderlayFileError,
    join_pieces,
)
from geometry.units import to_metres

UNDERLAY_CHORD_TOLERANCE_M = 0.05
MAX_DXF_BYTES = 256 * 1024 * 1024
MAX_BLOCK_DEPTH = 8
MAX_ARC_SEGMENTS = 4096
SNIFF_BYTES = 4096
BINARY_DXF_SENTINEL = b"AutoCAD Binary DXF"
Z_AXIS = Vec3(0.0, 0.0, 1.0)
PATH_TYPES = frozenset({"POLYLINE", "ELLIPSE", "SPLINE", "HATCH", "LWPOLYLINE", "ARC", "CIRCLE"})

# $INSUNITS codes (Autodesk help, "INSUNITS (System Variable)": 0 unspecified, 1 inches, 2 feet,
# ... 20 parsecs, 21 US survey feet; the DXF header variable stores the same code) and metres per
# unit (the inch, foot, yard and mile are the exact international units, 1959; the US survey foot
# is 1200/3937 m). Codes 18 to 20 (astronomical units, light years, parsecs) are not plan units
# and count as unknown.
INSUNITS_METRES: dict[int, tuple[str, float]] = {
    1: ("inches", 0.0254), 2: ("feet", 0.3048), 3: ("miles", 1609.344), 4: ("millimetres", 0.001),
    5: ("centimetres", 0.01), 6: ("metres", 1.0), 7: ("kilometres", 1000.0),
    8: ("microinches", 0.0254e-6), 9: ("mils", 0.0254e-3), 10: ("yards", 0.9144),
    11: ("angstroms", 1e-10), 12: ("nanometres", 1e-9), 13: ("microns", 1e-6), 14: ("decimetres", 0.1),
    15: ("decametres", 10.0), 16: ("hectometres", 100.0), 17: ("gigametres", 1e9),
    21: ("US survey feet", 1200.0 / 3937.0),
}
UNIT_WORDS = {"ft": "feet", "m": "metres"}


# --- flattening exact arcs -----------------------------------------------------------------------

def arc_segments(radius: float, sweep_rad: float, chord_tolerance: float) -> int:
    """Chords needed so that none strays more than ``chord_tolerance`` from the arc: a chord
    spanning angle t has sagitta r (1 - cos(t / 2))."""
    # A tolerance beyond the radius would allow any chord: a quarter turn keeps the shape round.
    step = math.pi / 2.0 if radius <= chord_tolerance else 2.0 * math.acos(1.0 - chord_tolerance / radius)
    return int(min(MAX_ARC_SEGMENTS, max(1, math.ceil(abs(sweep_rad) / step))))


def arc_xy(center: tuple[float, float], radius: float, start_rad: float, sweep_rad: float,
           chord_tolerance: float) -> FloatArray:
    """Points along a circular arc, counter-clockwise for a positive sweep, ends included."""
    count = arc_segments(radius, sweep_rad, chord_tolerance)
    angles = start_rad + np.linspace(0.0, sweep_rad, count + 1)
    return np.column_stack((center[0] + radius * np.cos(angles), center[1] + radius * np.sin(angles)))


def bulge_arc_xy(start: FloatArray, end: FloatArray, bulge: float, chord_tolerance: float) -> FloatArray:
    """The points of one bulged polyline segment, ``start`` included, ``end`` excluded.

    The bulge (LWPOLYLINE group code 42) is tan(sweep / 4), negative for a clockwise arc
    (Autodesk ActiveX reference, "GetBulge Method"). The centre lies (1 - b^2) / (4 b) chord
    lengths to the left of the chord's middle and the radius is c (1 + b^2) / (4 |b|) (both
    follow from the sagitta s = b c / 2).
    """
    chord = end - start
    length = float(np.hypot(*chord))
    if bulge == 0.0 or length == 0.0:
        return start.reshape(1, 2)
    left = np.array((-chord[1], chord[0]))
    center = (start + end) / 2.0 + left * (1.0 - bulge * bulge) / (4.0 * bulge)
    radius = length * (1.0 + bulge * bulge) / (4.0 * abs(bulge))
    start_rad = math.atan2(start[1] - center[1], start[0] - center[0])
    points = arc_xy((float(center[0]), float(center[1])), radius, start_rad, 4.0 * math.atan(bulge),
                    chord_tolerance)
    points[0] = start  # exact end points: the arc's own would differ in the last bits
    return points[:-1]


def bulge_polyline_xy(xy: FloatArray, bulges: FloatArray, closed: bool, chord_tolerance: float) -> FloatArray:
    """A polyline with bulges as points; a closed one repeats its first point at the end."""
    count = len(xy)
    segments = count if closed else count - 1
    pieces = []
    straight_from = 0
    for index in np.flatnonzero(bulges[:segments]):
        pieces.append(xy[straight_from:index])
        pieces.append(bulge_arc_xy(xy[index], xy[(index + 1) % count], float(bulges[index]), chord_tolerance))
        straight_from = int(index) + 1
    pieces.append(xy[straight_from:])
    if closed:
        pieces.append(xy[:1])
    return np.vstack(pieces)


# --- collecting linework -------------------------------------------------------------------------

@dataclass
class _Layer:
    """One layer's content while reading, in drawing units. Lines, arcs and circles are kept as
    numbers and flattened together at the end (one numpy pass instead of one per entity)."""

    lines: list[tuple[float, float, float, float]] = field(default_factory=list)
    arcs: list[tuple[float, float, float, float, float]] = field(default_factory=list)  # cx cy r start sweep
    circles: list[tuple[float, float, float]] = field(default_factory=list)
    pieces: list[FloatArray] = field(default_factory=list)
    closed: list[FloatArray] = field(default_factory=list)
    texts: list[DrawingText] = field(default_factory=list)
    entity_count: int = 0


@dataclass
class _Collector:
    tolerance: float  # chord tolerance in drawing units
    include_texts: bool
    layers: dict[str, _Layer] = field(default_factory=dict)
    entity_count: int = 0
    skipped_count: int = 0

    def layer(self, name: str) -> _Layer:
        found = self.layers.get(name)
        if found is None:
            found = self.layers[name] = _Layer()
        return found

    def add(self, layer: str, xy: FloatArray, closed: bool) -> None:
        xy = np.asarray(xy, dtype=float)[:, :2]
        if len(xy) < 2 or not np.isfinite(xy).all():
            return
        target = self.layer(layer)
        if closed:
            ring = xy[:-1] if np.array_equal(xy[0], xy[-1]) else xy
            if len(ring) >= 3:
                target.closed.append(ring)
            xy = np.vstack((ring, ring[:1]))
        target.pieces.append(xy)


def _default_extrusion(entity: Any) -> bool:
    return not entity.dxf.hasattr("extrusion") or Vec3(entity.dxf.extrusion).isclose(Z_AXIS)


def _collect_entity(entity: Any, out: _Collector, depth: int) -> None:
    kind = entity.dxftype()
    if kind == "INSERT":
        _collect_insert(entity, out, depth)
        return
    out.entity_count += 1
    layer_name = entity.dxf.layer
    layer = out.layer(layer_name)
    layer.entity_count += 1
    if kind == "LINE":
        start, end = entity.dxf.start, entity.dxf.end
        layer.lines.append((start.x, start.y, end.x, end.y))
    elif kind in ("LWPOLYLINE", "ARC", "CIRCLE") and _default_extrusion(entity):
        _collect_plain_curve(entity, kind, layer_name, out)
    elif kind in ("TEXT", "MTEXT"):
        if out.include_texts:
            layer.texts.append(_text(entity, kind))
    elif kind in PATH_TYPES:
        _collect_path(entity, layer_name, out)
    else:
        out.skipped_count += 1


def _collect_plain_curve(entity: Any, kind: str, layer: str, out: _Collector) -> None:
    dxf = entity.dxf
    if kind == "CIRCLE":
        out.layer(layer).circles.append((dxf.center.x, dxf.center.y, dxf.radius))
    elif kind == "ARC":
        sweep_deg = arc_angle_span_deg(dxf.start_angle, dxf.end_angle)
        out.layer(layer).arcs.append((dxf.center.x, dxf.center.y, dxf.radius,
                                      math.radians(dxf.start_angle), math.radians(sweep_deg)))
    else:
        points = np.array(entity.get_points("xyb"), dtype=float).reshape(-1, 3)
        if len(points) < 2:
            out.skipped_count += 1
            return
        closed = bool(entity.closed)
        if points[:, 2].any():
            xy = bulge_polyline_xy(points[:, :2], points[:, 2], closed, out.tolerance)
        else:
            xy = np.vstack((points[:, :2], points[:1, :2])) if closed else points[:, :2]
        out.add(layer, xy, closed or (len(points) > 2 and np.array_equal(points[0, :2], points[-1, :2])))


def _flatten_batched(layer: _Layer, tolerance: float) -> None:
    """Lines, arcs and circles of ``layer`` as pieces, computed a batch of equal size at a time."""
    if layer.lines:
        ends = np.array(layer.lines, dtype=float).reshape(-1, 2, 2)
        layer.pieces.extend(ends[np.isfinite(ends).all(axis=(1, 2))])
    arcs = np.array(layer.arcs, dtype=float).reshape(-1, 5)
    circles = np.array(layer.circles, dtype=float).reshape(-1, 3)
    arcs = arcs[np.isfinite(arcs).all(axis=1) & (arcs[:, 2] > 0.0) & (arcs[:, 4] > 0.0)]
    circles = circles[np.isfinite(circles).all(axis=1) & (circles[:, 2] > 0.0)]
    layer.pieces.extend(_arc_batch(arcs, tolerance))
    full_turns = np.column_stack((circles, np.zeros(len(circles)), np.full(len(circles), 2.0 * math.pi)))
    for ring in _arc_batch(full_turns, tolerance):
        layer.closed.append(ring[:-1])
        layer.pieces.append(ring)


def _arc_batch(arcs: FloatArray, tolerance: float) -> list[FloatArray]:
    """Each arc (cx, cy, r, start_rad, sweep_rad) as points, grouped by chord count."""
    radius, sweep = arcs[:, 2], arcs[:, 4]
    # as arc_segments, for all arcs at once
    ratio = np.clip(1.0 - tolerance / np.maximum(radius, tolerance), -1.0, 1.0)
    step = np.where(radius <= tolerance, math.pi / 2.0, 2.0 * np.arccos(ratio))
    counts = np.clip(np.ceil(np.abs(sweep) / step), 1, MAX_ARC_SEGMENTS).astype(int)
    pieces: list[FloatArray] = []
    for count in np.unique(counts):
        group = arcs[counts == count]
        angles = group[:, 3:4] + group[:, 4:5] * np.linspace(0.0, 1.0, count + 1)
        xy = np.stack((group[:, 0:1] + group[:, 2:3] * np.cos(angles),
                       group[:, 1:2] + group[:, 2:3] * np.sin(angles)), axis=-1)
        pieces.extend(xy)
    return pieces


def _collect_path(entity: Any, layer: str, out: _Collector) -> None:
    try:
        path = ezdxf.path.make_path(entity)
        pieces = [(np.array([(v.x, v.y) for v in sub.flattening(out.tolerance)]), sub.is_closed)
                  for sub in path.sub_paths() if len(sub)]
    except (TypeError, ValueError, DXFError, ZeroDivisionError):  # polyface meshes, broken splines
        out.skipped_count += 1
        return
    for xy, closed in pieces:
        out.add(layer, xy, closed or entity.dxftype() == "HATCH")


def _text(entity: Any, kind: str) -> DrawingText:
    insert = entity.dxf.insert
    if kind == "TEXT":
        height, rotation_deg = entity.dxf.height, entity.dxf.rotation
    else:
        height, rotation_deg = entity.dxf.char_height, entity.get_rotation()
    return DrawingText(float(insert.x), float(insert.y), entity.plain_text(), float(height),
                       math.radians(rotation_deg))


def _collect_insert(insert: Any, out: _Collector, depth: int) -> None:
    if depth >= MAX_BLOCK_DEPTH:
        out.skipped_count += 1
        return
    try:
        virtual = list(insert.virtual_entities())
    except (DXFError, ValueError, KeyError, ZeroDivisionError):  # a missing or broken block
        out.skipped_count += 1
        return
    for entity in virtual:
        if entity.dxf.layer == "0":  # block content on layer 0 takes the reference's layer
            entity.dxf.layer = insert.dxf.layer
        _collect_entity(entity, out, depth + 1)


# --- reading the file ----------------------------------------------------------------------------

def read_base_drawing(path: Path | str, *, assumed_units: str = "m",
                      chord_tolerance_m: float = UNDERLAY_CHORD_TOLERANCE_M,
                      include_texts: bool = True) -> BaseDrawing:
    """The linework of the DXF drawing at ``path``, in metres, by layer.

    ``assumed_units`` ("ft" or "m", normally the layout's) is used only when the drawing states
    no units. Raises :class:`UnderlayFileError` when the file is missing, is not a DXF drawing,
    or is too damaged to read at all.
    """
    if not (math.isfinite(chord_tolerance_m) and chord_tolerance_m > 0.0):
        raise ValueError(f"the chord tolerance must be a positive length, got {chord_tolerance_m!r}")
    path = Path(path)
    _check_file(path)
    doc, partial_note = _read_document(path)
    metres_per_unit, units_note = _units(doc.header.get("$INSUNITS", 0), assumed_units)
    out = _Collector(chord_tolerance_m / metres_per_unit, include_texts)
    for entity in doc.modelspace():
        _collect_entity(entity, out, 0)
    for layer in out.layers.values():
        _flatten_batched(layer, out.tolerance)
    hidden = frozenset(layer.dxf.name for layer in doc.layers
                       if layer.is_off() or layer.is_frozen()) & out.layers.keys()
    layers = {name: _linework(layer, metres_per_unit) for name, layer in sorted(out.layers.items())}
    return BaseDrawing(layers, units_note, out.entity_count, out.skipped_count, metres_per_unit,
                       partial_note, frozenset(hidden))


def _check_file(path: Path) -> None:
    try:
        status = os.stat(path)
        if not stat.S_ISREG(status.st_mode):
            raise UnderlayFileError(f"{path}: not a regular file")
        if status.st_size > MAX_DXF_BYTES:
            raise UnderlayFileError(f"{path}: larger than {MAX_DXF_BYTES // 2**20} MiB; "
                                    f"split the drawing or purge it before importing")
        with open(path, "rb") as stream:
            head = stream.read(SNIFF_BYTES)
    except FileNotFoundError as error:
        raise UnderlayFileError(f"{path}: the file does not exist (moved or renamed?)") from error
    except OSError as error:
        raise UnderlayFileError(f"{path}: cannot read the file ({error.strerror or error})") from error
    if not (head.startswith(BINARY_DXF_SENTINEL) or b"SECTION" in head.upper()):
        raise UnderlayFileError(f"{path}: not a DXF drawing (no DXF section near the start)")


def _read_document(path: Path) -> tuple[Any, str | None]:
    """The document and, when the file was damaged and only recovered, a note saying so."""
    try:
        return ezdxf.filemanagement.readfile(path), None
    except DXFStructureError as error:
        first_problem = str(error)
    except Exception as error:  # the parser meets arbitrary bytes: any failure means unreadable
        raise UnderlayFileError(f"{path}: cannot read the drawing ({error})") from error
    try:
        doc, auditor = recover.readfile(path)
    except Exception as error:  # recovery gave up too: nothing usable in the file
        raise UnderlayFileError(f"{path}: the drawing is damaged beyond repair ({error})") from error
    if len(doc.modelspace()) == 0:
        raise UnderlayFileError(f"{path}: the drawing is damaged ({first_problem}) and recovery found "
                                f"nothing to draw in it")
    repaired = len(auditor.fixes) + len(auditor.errors)
    note = (f"The drawing is damaged ({first_problem}); it was read in recovery mode and may be "
            f"incomplete" + (f" ({repaired} problem(s) repaired or dropped)." if repaired else "."))
    return doc, note


def _units(code: object, assumed_units: str) -> tuple[float, str]:
    known = INSUNITS_METRES.get(code) if isinstance(code, int) else None
    if known is not None:
        name, metres = known
        return metres, f"Units from the drawing: {name} ($INSUNITS {code})."
    assumed = UNIT_WORDS.get(assumed_units)
    if assumed is None:
        raise ValueError(f"assumed units must be 'ft' or 'm', got {assumed_units!r}")
    why = "states no units" if code in (0, None) else f"has an unknown unit code ($INSUNITS {code})"
    return (to_metres(1.0, assumed_units),
            f"The drawing {why}: it was read in {assumed}, the layout's units. "
            f"If it looks too large or too small, set its units in the CAD program and import it again.")


def _linework(layer: _Layer, metres_per_unit: float) -> LayerLinework:
    texts = tuple(DrawingText(t.x_m * metres_per_unit, t.y_m * metres_per_unit, t.text,
                              t.height_m * metres_per_unit, t.rotation_rad) for t in layer.texts)
    return LayerLinework(join_pieces(layer.pieces) * metres_per_unit,
                         tuple(ring * metres_per_unit for ring in layer.closed), texts, layer.entity_count)


# --- writing base drawings into an exported DXF (for export_dxf(include_underlays=True)) ----------

UNDERLAY_LAYER_PREFIX = "UNDERLAY-"
UNDERLAY_LAYER_COLOUR = 8  # ACI 8, a grey: the base drawing stays in the background
INVALID_LAYER_CHARACTERS = str.maketrans({c: "_" for c in '<>/\\":;?*|=`,'})


def add_base_drawings(doc: Any, underlays: Iterable[Underlay], units_per_m: float) -> tuple[str, ...]:
    """Copy the shown layers of the visible base drawings among ``underlays`` into ``doc``'s model
    space: one LWPOLYLINE per piece (flattened as drawn), in drawing units (``units_per_m``), on
    layers named ``UNDERLAY-<layer>``. Returns a note per drawing that could not be read."""
    notes = []
    msp = doc.modelspace()
    for underlay in underlays:
        if underlay.kind != "drawing" or not underlay.visible:
            continue
        try:
            drawing = read_base_drawing(underlay.path, assumed_units=underlay.assumed_units or "m")
        except UnderlayFileError as error:
            notes.append(f"base drawing {underlay.name!r} left out: {error}")
            continue
        for name, layer in drawing.layers.items():
            if name in underlay.hidden_layers or not len(layer.polylines):
                continue
            layer_name = (UNDERLAY_LAYER_PREFIX + name).translate(INVALID_LAYER_CHARACTERS)
            if layer_name not in doc.layers:
                doc.layers.add(layer_name, color=UNDERLAY_LAYER_COLOUR)
            for piece in split_pieces(layer.polylines):
                msp.add_lwpolyline((piece * units_per_m).tolist(), dxfattribs={"layer": layer_name})
    return tuple(notes)


def split_pieces(xy: FloatArray) -> list[FloatArray]:
    """The pieces of a NaN-separated array (the inverse of ``join_pieces``)."""
    breaks = np.flatnonzero(~np.isfinite(xy).all(axis=1))
    kept = [piece[np.isfinite(piece).all(axis=1)] for piece in np.split(xy, breaks)]
    return [piece for piece in kept if len(piece) >= 2]
