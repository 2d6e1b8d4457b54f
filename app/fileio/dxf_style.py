"""Drawing setup of the DXF export: header, line types, text and dimension styles, sizes.

Sizes follow the drawing's extent so an airfield-sized sketch plots readably (docs/dxf.md):

* one line type pattern repeats every ``ltscale`` drawing units, a round number between 1/100
  and 1/50 of the larger side of the extent (closest to 1/75);
* text is a round number between 1/400 and 1/200 of that side (closest to 1/300): about
  2.5 mm high when the drawing fills an ARCH D / A1 sheet;
* hatch lines are half a line type repeat apart.

Round numbers are 1, 2, 2.5 or 5 times a power of ten, so the values read well in a
drafter's properties panel.
"""

from __future__ import annotations

import math
import textwrap
from collections.abc import Iterator, Sequence
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
from ezdxf import const
from ezdxf.document import Drawing
from ezdxf.entities.lwpolyline import LWPolylinePoints
from ezdxf.enums import MTextEntityAlignment, TextEntityAlignment
from ezdxf.filemanagement import new as new_document
from ezdxf.lldxf.types import DXFTag
from ezdxf.tools import pattern

from app.fileio.dxf_content import PolygonRings
from app.fileio.dxf_layers import DXF_LAYERS
from geometry.units import LengthUnit

DXF_VERSION = "R2018"
TEXT_STYLE = "TW-TEXT"
DIM_STYLE = "TW-DIM"
TEXT_FONT = "DejaVuSans.ttf"  # the font installed everywhere we run; CAD programs substitute
MIN_EXTENT_SIZE = 100.0       # drawing units; an empty or tiny layout still gets legible text
NICE_MANTISSAS = (1.0, 2.0, 2.5, 5.0)

# Line type patterns for one repeat of length 1.0, scaled by $LTSCALE: dashes > 0, gaps < 0.
LINETYPES: dict[str, tuple[str, tuple[float, ...]]] = {
    "CENTER": ("Center ____ _ ____ _ ____", (0.625, -0.125, 0.125, -0.125)),
    "DASHED": ("Dashed __ __ __ __", (0.75, -0.25)),
    "HIDDEN": ("Hidden _ _ _ _ _", (0.375, -0.125, 0.375, -0.125)),
    "PHANTOM": ("Phantom _____ _ _ _____", (0.5, -0.1, 0.1, -0.1, 0.1, -0.1)),
}

INSUNITS = {"ft": 2, "m": 6}      # DXF $INSUNITS codes: 2 feet, 6 metres
MEASUREMENT = {"ft": 0, "m": 1}   # DXF $MEASUREMENT: 0 imperial, 1 metric
DECIMALS = {"ft": 1, "m": 2}      # label precision: 0.1 ft, 0.01 m
UNIT_SUFFIX = {"ft": "'", "m": " m"}
HATCH_PATTERNS = {"new_pavement_hatch": "ANSI31", "existing_pavement_hatch": "ANSI37"}
AVERAGE_CHAR_WIDTH = 0.6  # of the text height, for a sans-serif font; sizes the notes block
LINE_PITCH = 1.7          # MTEXT line spacing at factor 1.0, in text heights (5/3, rounded up)
TEXT_SIDES = {"center": TextEntityAlignment.MIDDLE_CENTER, "left": TextEntityAlignment.MIDDLE_RIGHT,
              "right": TextEntityAlignment.MIDDLE_LEFT}
ARC_BOUND_SAMPLES = 33  # points per arc for the drawing extent: plenty for a bounding box


@dataclass(frozen=True, slots=True)
class DrawingScale:
    """Sizes of the drawing, all in drawing units (feet or metres)."""

    extent_size: float
    ltscale: float
    text_height: float
    hatch_spacing: float


def nice_number(low: float, high: float, target: float) -> float:
    """The round number in ``[low, high]`` closest to ``target`` on a log scale.

    ``high`` must be at least twice ``low``: round numbers are never more than a factor 2 apart,
    so one always lies in the interval.
    """
    exponent = math.floor(math.log10(low))
    candidates = [mantissa * 10.0 ** power for power in range(exponent - 1, exponent + 2)
                  for mantissa in NICE_MANTISSAS]
    inside = [value for value in candidates if low * (1 - 1e-12) <= value <= high * (1 + 1e-12)]
    return min(inside, key=lambda value: abs(math.log(value / target)))


def drawing_scale(extent_size: float) -> DrawingScale:
    """Line type scale, text height and hatch spacing for a drawing whose larger side is
    ``extent_size`` drawing units."""
    size = max(extent_size, MIN_EXTENT_SIZE) if math.isfinite(extent_size) else MIN_EXTENT_SIZE
    ltscale = nice_number(size / 100.0, size / 50.0, size / 75.0)
    text_height = nice_number(size / 400.0, size / 200.0, size / 300.0)
    return DrawingScale(size, ltscale, text_height, ltscale / 2.0)


def format_length(value: float, units: LengthUnit) -> str:
    """A length in drawing units as a label: ``150.0'`` or ``45.72 m``."""
    return f"{value:.{DECIMALS[units]}f}{UNIT_SUFFIX[units]}"


def new_drawing(units: LengthUnit, scale: DrawingScale) -> Drawing:
    """An empty R2018 drawing with our header values, line types and styles."""
    doc = new_document(DXF_VERSION, setup=False, units=INSUNITS[units])
    header = doc.header
    header["$MEASUREMENT"] = MEASUREMENT[units]
    header["$LUNITS"] = 2  # decimal
    header["$LUPREC"] = DECIMALS[units] + 1
    header["$LTSCALE"] = scale.ltscale
    header["$CELTSCALE"] = 1.0
    header["$PSLTSCALE"] = 1
    for name, (description, elements) in LINETYPES.items():
        doc.linetypes.add(name, pattern=[sum(abs(e) for e in elements), *elements],
                          description=description)
    doc.styles.add(TEXT_STYLE, font=TEXT_FONT)
    header["$TEXTSTYLE"] = TEXT_STYLE
    header["$TEXTSIZE"] = scale.text_height
    _add_dimension_style(doc, units, scale)
    return doc


def _add_dimension_style(doc: Drawing, units: LengthUnit, scale: DrawingScale) -> None:
    """Our own dimension style, mirrored in the header: some readers rebuild dimensions from the
    header's $DIM* values rather than the style (shared/ECOSYSTEM.md)."""
    height = scale.text_height
    values = {
        "dimtxsty": TEXT_STYLE, "dimtxt": height, "dimasz": height, "dimgap": height / 4.0,
        "dimexo": height / 2.0, "dimexe": height / 2.0, "dimdec": DECIMALS[units],
        "dimlunit": 2, "dimpost": f"<>{UNIT_SUFFIX[units]}", "dimscale": 1.0, "dimtad": 1,
        "dimzin": 0, "dimtih": 1, "dimtoh": 1, "dimdsep": ord("."),
    }
    style = doc.dimstyles.new(DIM_STYLE)
    for name, value in values.items():
        style.dxf.set(name, value)
        doc.header[f"${name.upper()}"] = value
    doc.header["$DIMSTYLE"] = DIM_STYLE


def wrap_lines(lines: list[str], max_chars: int) -> list[str]:
    """Lines wrapped at ``max_chars``; a wrapped line's continuation is indented two more spaces."""
    wrapped: list[str] = []
    for line in lines:
        indent = " " * (len(line) - len(line.lstrip()))
        wrapped += textwrap.wrap(line.strip(), max_chars, initial_indent=indent,
                                 subsequent_indent=indent + "  ") or [""]
    return wrapped


def _drop_control_characters(text: str) -> str:
    """Tabs and line breaks become spaces; other control characters are dropped."""
    spaced = text.replace("\t", " ").replace("\r", " ").replace("\n", " ")
    return "".join(char for char in spaced if char >= " ")


def text_content(text: str, max_chars: int = 250) -> str:
    """One line of plain text safe for a TEXT entity: no control characters, ``%%`` and ``^``
    kept literal (TEXT reads ``%%d``, ``%%c``... as symbols and ``^X`` as a control code)."""
    line = " ".join(_drop_control_characters(text).split())
    if "%%" in line:
        line = line.replace("%", "%%%")
    return line.replace("^", "^ ")[:max_chars]


def mtext_content(lines: list[str]) -> str:
    """Lines of plain text as MTEXT content: backslashes and braces kept literal, ``\\P``
    between lines."""
    escaped = []
    for line in lines:
        clean = _drop_control_characters(line)
        clean = clean.replace("\\", "\\\\").replace("{", "\\{").replace("}", "\\}")
        escaped.append(clean.replace("^", "^ "))
    return "\\P".join(escaped)


class _VertexText(DXFTag):
    """The group codes of many vertices as one piece of DXF text, written as it is."""

    __slots__ = ()

    def dxfstr(self) -> str:
        return str(self.value)


class PackedPolylinePoints(LWPolylinePoints):
    """LWPOLYLINE vertices that write their tags (10, 20 and, where not 0, 42) as one string.

    ezdxf writes a vertex through a DXFVertex and two DXFTag objects, about 13 us a vertex: 99 %
    of a large layout's export. This writes the same text ("%3d\n%s\n" per tag, floats as
    ``repr``) from one list. Vertices with widths (we never write any) go ezdxf's own way.
    tests/app/test_dxf_export.py checks that both give the same text.
    """

    __slots__ = ()

    def dxftags(self) -> Iterator[DXFTag]:
        rows = self.values
        if rows[:, 2:4].any():
            yield from super().dxftags()
            return
        if rows[:, 4].any():
            text = "".join([f" 10\n{x!r}\n 20\n{y!r}\n" + (f" 42\n{bulge!r}\n" if bulge else "")
                            for x, y, bulge in rows[:, (0, 1, 4)].tolist()])
        else:  # the usual case: one template for the whole polyline
            text = (" 10\n%r\n 20\n%r\n" * len(rows)) % tuple(rows[:, :2].ravel().tolist())
        yield _VertexText(self.VERTEX_CODE, text)


PatternLine = tuple[float, tuple[float, float], tuple[float, float], Sequence[float]]


def _pattern_spacing(definition: Sequence[PatternLine]) -> float:
    """Distance between the parallel lines of a hatch pattern's first line family at scale 1."""
    angle_deg, _base, (offset_x, offset_y), _dashes = definition[0]
    angle = math.radians(angle_deg)
    return float(abs(-offset_x * math.sin(angle) + offset_y * math.cos(angle)))


class DxfSheet:
    """The model space being drawn: adds entities on our layers and keeps count.

    Coordinates are drawing units. A layer enters the layer table with its first entity, so
    the file lists only layers that hold something; :meth:`wants` tells whether the caller
    selected a layer at all.
    """

    def __init__(self, doc: Drawing, units: LengthUnit, scale: DrawingScale,
                 selected: frozenset[str]) -> None:
        self.doc = doc
        self.units: LengthUnit = units
        self.scale = scale
        self._selected = selected
        self._msp = doc.modelspace()
        self._counts: dict[str, int] = {}
        self._low = np.array([math.inf, math.inf])
        self._high = np.array([-math.inf, -math.inf])

    def wants(self, key: str) -> bool:
        return key in self._selected

    def entity_counts(self) -> tuple[tuple[str, int], ...]:
        """(DXF layer name, number of entities) in the order the layers were created."""
        return tuple(self._counts.items())

    def bounds(self) -> tuple[float, float, float, float] | None:
        """(xmin, ymin, xmax, ymax) of everything drawn so far, or None for an empty sheet."""
        if not np.all(np.isfinite(self._low)):
            return None
        return (float(self._low[0]), float(self._low[1]), float(self._high[0]), float(self._high[1]))

    def include(self, points: npt.ArrayLike) -> None:
        """Grow the drawing extent to hold ``points`` (n, 2 or more columns)."""
        xy = np.asarray(points, dtype=float).reshape(-1, np.shape(points)[-1])[:, :2]
        if xy.size:
            self._low = np.minimum(self._low, xy.min(axis=0))
            self._high = np.maximum(self._high, xy.max(axis=0))

    def _attribs(self, key: str, aircraft: str | None) -> dict[str, object]:
        spec = DXF_LAYERS[key]
        name = spec.layer_name(aircraft)
        if name not in self._counts:
            layer = self.doc.layers.add(name, color=spec.aci, linetype=spec.linetype)
            layer.description = spec.description
            self._counts[name] = 0
        self._counts[name] += 1
        return {"layer": name}

    def polyline(self, key: str, points: npt.ArrayLike, *, closed: bool = False,
                 aircraft: str | None = None) -> None:
        """An LWPOLYLINE through rows (x, y) or (x, y, bulge)."""
        rows = np.asarray(points, dtype=float)
        self.include(rows)
        table = np.zeros((len(rows), PackedPolylinePoints.VERTEX_SIZE))  # x, y, widths, bulge
        table[:, :2] = rows[:, :2]
        if rows.shape[1] > 2:
            table[:, 4] = rows[:, 2]
        entity = self._msp.add_lwpolyline([], close=closed, dxfattribs=self._attribs(key, aircraft))
        # ezdxf appends point by point (a copy of the whole array each time); one table instead.
        entity.lwpoints = PackedPolylinePoints()
        entity.lwpoints.set(table)

    def arc(self, key: str, center: tuple[float, float], radius: float,
            start_rad: float, end_rad: float) -> None:
        """A counter-clockwise ARC from ``start_rad`` to ``end_rad``."""
        span = (end_rad - start_rad) % (2.0 * math.pi) or 2.0 * math.pi
        angles = start_rad + np.linspace(0.0, span, ARC_BOUND_SAMPLES)
        self.include(np.column_stack((center[0] + radius * np.cos(angles),
                                      center[1] + radius * np.sin(angles))))
        self._msp.add_arc(center, radius, math.degrees(start_rad) % 360.0,
                          math.degrees(start_rad + span) % 360.0, dxfattribs=self._attribs(key, None))

    def circle(self, key: str, center: tuple[float, float], radius: float) -> None:
        self.include([(center[0] - radius, center[1] - radius), (center[0] + radius, center[1] + radius)])
        self._msp.add_circle(center, radius, dxfattribs=self._attribs(key, None))

    def hatch(self, key: str, polygon: PolygonRings) -> None:
        """A pattern HATCH of one polygon; holes are left unhatched."""
        exterior, holes = polygon
        self.include(exterior)
        hatch = self._msp.add_hatch(dxfattribs=self._attribs(key, None))
        name = HATCH_PATTERNS[key]
        # The imperial definitions at an explicit scale give the same spacing in feet and metres.
        definition = pattern.IMPERIAL_PATTERN[name]
        hatch.set_pattern_fill(name, color=const.BYLAYER, scale=self.scale.hatch_spacing
                               / _pattern_spacing(definition), style=0, definition=definition)
        hatch.paths.add_polyline_path(exterior.tolist(), is_closed=True,
                                      flags=const.BOUNDARY_PATH_EXTERNAL)
        for hole in holes:
            hatch.paths.add_polyline_path(hole.tolist(), is_closed=True,
                                          flags=const.BOUNDARY_PATH_OUTERMOST)

    def text(self, key: str, content: str, at: tuple[float, float], rotation_deg: float = 0.0,
             *, side: str = "center") -> None:
        """One line of text at ``at``: centred on it, or ending (``side="left"``: the text lies
        left of ``at``) or starting (``"right"``) there."""
        height = self.scale.text_height
        reach = height * AVERAGE_CHAR_WIDTH * max(len(content), 1)  # generous: rotation unknown here
        self.include([(at[0] - reach, at[1] - reach), (at[0] + reach, at[1] + reach)])
        entity = self._msp.add_text(text_content(content), height=height, rotation=rotation_deg,
                                    dxfattribs={"style": TEXT_STYLE, **self._attribs(key, None)})
        entity.set_placement(at, align=TEXT_SIDES[side])

    def mtext(self, key: str, lines: list[str], top_left: tuple[float, float], width: float) -> None:
        """A block of lines with its top-left corner at ``top_left``, wrapped to ``width``.

        The lines are wrapped here too: some readers ignore the MTEXT width.
        """
        height = self.scale.text_height
        wrapped = wrap_lines(lines, max(10, int(width / (AVERAGE_CHAR_WIDTH * height))))
        self.include([top_left, (top_left[0] + width, top_left[1] - len(wrapped) * LINE_PITCH * height)])
        self._msp.add_mtext(mtext_content(wrapped), dxfattribs={
            "style": TEXT_STYLE, "char_height": height, "width": width, "insert": top_left,
            "attachment_point": MTextEntityAlignment.TOP_LEFT, **self._attribs(key, None)})

    def radius_dimension(self, key: str, center: tuple[float, float], radius: float,
                         angle_deg: float) -> None:
        """A radius DIMENSION in our dimension style, its leader at ``angle_deg``."""
        angle = math.radians(angle_deg)
        self.include([center, (center[0] + radius * math.cos(angle), center[1] + radius * math.sin(angle))])
        dimension = self._msp.add_radius_dim(center=center, radius=radius, angle=angle_deg,
                                             dimstyle=DIM_STYLE, dxfattribs=self._attribs(key, None))
        dimension.render()
