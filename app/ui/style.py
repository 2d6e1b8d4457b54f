"""taxiwright's own visual language: one look per style key of :mod:`app.model.scene`.

Colours are mid-tone and saturated so that each reads on the light ("paper") and the dark
background; text and the few neutral strokes take the theme's foreground. docs/legend.md
describes the same table in words: change both together.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import pyqtgraph as pg
from PySide6 import QtCore, QtGui


@dataclass(frozen=True, slots=True)
class Theme:
    name: str
    background: str
    foreground: str
    grid_alpha: float


LIGHT = Theme("light", "#f4f1ea", "#212529", 0.22)
DARK = Theme("dark", "#1b1f24", "#e9ecef", 0.18)

# Line dash patterns in pen widths: our own rhythm, long for plan lines, short for derived ones.
DASH_LONG = (8.0, 4.0)
DASH_CENTER = (10.0, 6.0)
DASH_SHORT = (4.0, 3.0)
DOTTED = (1.0, 3.0)
DASH_DOT = (6.0, 3.0, 1.0, 3.0)


@dataclass(frozen=True, slots=True)
class Look:
    """How one style key is drawn. ``colour`` "fg" means the theme's foreground."""

    colour: str = "fg"
    width: float = 1.0
    dash: tuple[float, ...] | None = None
    alpha: int = 255
    fill: str | None = None       # brush colour for filled shapes and symbols
    fill_alpha: int = 255
    symbol: str = "o"
    size: float = 8.0


ORANGE = "#d9480f"
VIOLET = "#7048e8"
GREEN = "#2f9e44"
BLUE = "#1c7ed6"
RASPBERRY = "#c2255c"
RED = "#e03131"
PURPLE = "#9c36b5"
BROWN = "#a0522d"
AMBER = "#f59f00"
TEAL = "#0ca678"
CYAN = "#15aabf"
SLATE = "#6c7580"
OCHRE = "#c77d3a"
SAND = "#b59f6b"

LOOKS: dict[str, Look] = {
    "centerline.taxiway": Look(ORANGE, 2.0),
    "centerline.taxilane": Look(ORANGE, 2.0, DASH_LONG),
    "centerline.label": Look(ORANGE),
    "vertex": Look(ORANGE, 1.5, fill="bg", symbol="s", size=7.0),
    "vertex.rounded": Look(ORANGE, 1.5, fill=ORANGE, symbol="o", size=8.0),
    "junction": Look(VIOLET, 2.0, fill=None, symbol="o", size=15.0),
    "runway.surface": Look(SLATE, 1.0, fill=SLATE, fill_alpha=150),
    "runway.edge": Look(SLATE, 1.5),
    "runway.centerline": Look("#f8f9fa", 1.5, DASH_CENTER),
    "runway.label": Look("fg"),
    "pavement.existing": Look("#8d8d8d", fill="#8d8d8d", fill_alpha=80),
    "pavement.shoulder": Look(SAND, fill=SAND, fill_alpha=90),
    "pavement.new": Look(GREEN, fill=GREEN, fill_alpha=70),
    "pavement.fillet": Look(BLUE, fill=BLUE, fill_alpha=110),
    "pavement.edge": Look("#5c7080", 1.0),
    "pavement.required": Look(RASPBERRY, 1.5, DASH_SHORT),
    "track.gear": Look(RED, 1.0),
    "track.gear.excluded": Look(RED, 1.0, DOTTED, alpha=110),
    "track.wingtip": Look(PURPLE, 1.0, DASH_DOT),
    "track.wingtip.excluded": Look(PURPLE, 1.0, DOTTED, alpha=110),
    "object.body": Look(BROWN, fill=BROWN, fill_alpha=90),
    "object.outline": Look(BROWN, 1.5),
    "object.point": Look("fg", 1.0, fill=BROWN, symbol="t1", size=12.0),
    "object.label": Look("fg"),
    "object.clearance": Look(OCHRE, 1.5, DOTTED),
    "finding.error": Look("#ffffff", 1.5, fill=RED, symbol="d", size=15.0),
    "finding.warning": Look("#ffffff", 1.5, fill=AMBER, symbol="t", size=14.0),
    "finding.info": Look("#ffffff", 1.5, fill=BLUE, symbol="o", size=11.0),
    # overlays (not scene layers)
    "sketch": Look(ORANGE, 1.5, DASH_SHORT),
    "sketch.point": Look(ORANGE, 1.5, fill="bg", symbol="s", size=7.0),
    "snap.vertex": Look(TEAL, 2.0, fill=None, symbol="s", size=15.0),
    "snap.line": Look(TEAL, 2.0, fill=None, symbol="d", size=15.0),
    "snap.angle": Look(TEAL, 1.0, DASH_SHORT, fill=TEAL, symbol="+", size=13.0),
    "selection": Look(CYAN, 6.0, alpha=120),
    "selection.vertex": Look(CYAN, 2.5, fill=None, symbol="s", size=13.0),
    "movement": Look(AMBER, 3.0),
}


def _colour(name: str, theme: Theme, alpha: int) -> QtGui.QColor:
    colour = QtGui.QColor(theme.foreground if name == "fg" else
                          theme.background if name == "bg" else name)
    colour.setAlpha(alpha)
    return colour


def look(style: str) -> Look:
    return LOOKS[style]


def pen(style: str, theme: Theme) -> QtGui.QPen:
    """A cosmetic pen (width in pixels, whatever the zoom)."""
    spec = LOOKS[style]
    result = pg.mkPen(_colour(spec.colour, theme, spec.alpha), width=spec.width)
    result.setCosmetic(True)
    if spec.dash is not None:
        result.setStyle(QtCore.Qt.PenStyle.CustomDashLine)
        result.setDashPattern(list(spec.dash))
    return result


def brush(style: str, theme: Theme) -> QtGui.QBrush:
    spec = LOOKS[style]
    if spec.fill is None:
        return QtGui.QBrush(QtCore.Qt.BrushStyle.NoBrush)
    return QtGui.QBrush(_colour(spec.fill, theme, spec.fill_alpha))


# Long dashed outlines that a drag redraws every frame. Qt strokes a cosmetic pen wider than a
# pixel through its general stroker, dash by dash (about 5 ms a frame for the main sample's
# required pavement); one pixel wide it takes the fast cosmetic line path. While a drag previews,
# these are drawn one pixel wide with the same dash lengths; the drag's end restores the look.
DRAFT_STYLES = frozenset({"pavement.required", "object.clearance"})


def draft_pen(style: str, theme: Theme) -> QtGui.QPen:
    """:func:`pen` one pixel wide, its dashes as long on screen as at the full width."""
    result = pen(style, theme)
    width = result.widthF()
    if width > 1.0:
        if result.style() == QtCore.Qt.PenStyle.CustomDashLine:
            result.setDashPattern([length * width for length in result.dashPattern()])
        result.setWidthF(1.0)
    return result


@lru_cache(maxsize=256)
def shared_pen(style: str, theme: Theme) -> QtGui.QPen:
    """:func:`pen`, one object per style and theme, never to be modified: pyqtgraph's symbol atlas
    keys its pictures by the pen and brush objects, so a new pen for every update renders every
    symbol again (and grows the atlas)."""
    return pen(style, theme)


@lru_cache(maxsize=256)
def shared_brush(style: str, theme: Theme) -> QtGui.QBrush:
    """:func:`brush`, one object per style and theme, never to be modified (see :func:`shared_pen`)."""
    return brush(style, theme)


def text_colour(style: str, theme: Theme) -> QtGui.QColor:
    return _colour(LOOKS[style].colour, theme, 255)


CAUTION = ("Preliminary planning layout only — verify against the governing standard, local codes "
           "and aircraft manufacturers' data; final design by a licensed engineer.")
