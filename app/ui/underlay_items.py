"""Underlays on the plan view: their file content (read in the background and kept), and their
graphics below every layout layer.

A base drawing is drawn as ONE curve per DXF layer (pieces joined by NaN rows, drawn with
``connect="finite"``), however many entities it holds; an image is one ``ImageItem`` placed by a
``QTransform`` built from its six affine terms. Nothing here takes mouse events: clicks pass
through to the tools.
"""

from __future__ import annotations

import contextlib
import os
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
import pyqtgraph as pg
from PySide6 import QtCore, QtGui

from app.fileio.raster_image import probe_image
from app.model.underlays import (
    BaseDrawing,
    FloatArray,
    OutlinePicker,
    Placement,
    Underlay,
    UnderlayFileError,
    outline_picker,
)

UNDERLAY_Z = -1000.0       # below every layout layer (they start at 0)
UNDERLAY_Z_STEP = 10.0
PICKED_Z = 990.0           # just below the overlay (1000): the picked outlines stay visible
DRAWING_COLOUR = "#7d8590"  # a neutral mid grey, readable on the light and the dark background
PICKED_COLOUR = "#f59f00"
# Above this many pixels an image is decoded at a reduced size (about 200 MB of RGBA at most).
MAX_IMAGE_PIXELS = 50_000_000
QT_ALLOCATION_LIMIT_MB = 1024


@dataclass(frozen=True, slots=True, eq=False)
class ImagePixels:
    """Decoded RGBA rows (row 0 at the top) and the size of the image in the file."""

    rgba: npt.NDArray[np.uint8]
    width_px: int
    height_px: int


Content = BaseDrawing | ImagePixels


@dataclass(frozen=True, slots=True)
class ContentKey:
    """What a file's content depends on: the file's identity and, for drawings, the units used
    when the drawing states none. A changed file gets a new key and is read again."""

    kind: str
    path: str
    assumed_units: str
    modified_ns: int
    size: int


def content_key(underlay: Underlay) -> ContentKey | str:
    """The key of the underlay's content, or a message saying why the file cannot be found."""
    try:
        status = os.stat(underlay.path)
    except FileNotFoundError:
        return f"missing: {underlay.path} does not exist (moved or renamed?)"
    except OSError as error:
        return f"unreadable: {underlay.path} ({error.strerror or error})"
    return ContentKey(underlay.kind, underlay.path, underlay.assumed_units or "m",
                      status.st_mtime_ns, status.st_size)


def load_image_pixels(path: str) -> ImagePixels:
    """Decode an image as RGBA, at a reduced size when it is very large. Safe off the GUI thread."""
    info = probe_image(path)
    reader = QtGui.QImageReader(path)
    reader.setAutoTransform(False)  # a world file refers to the stored pixel grid, not a rotated one
    reader.setAllocationLimit(QT_ALLOCATION_LIMIT_MB)
    pixels = info.width_px * info.height_px
    if pixels > MAX_IMAGE_PIXELS:
        shrink = (MAX_IMAGE_PIXELS / pixels) ** 0.5
        reader.setScaledSize(QtCore.QSize(max(1, int(info.width_px * shrink)),
                                          max(1, int(info.height_px * shrink))))
    image = reader.read()
    if image.isNull():
        raise UnderlayFileError(f"{path}: the image cannot be decoded ({reader.errorString()})")
    image = image.convertToFormat(QtGui.QImage.Format.Format_RGBA8888)
    rows = np.frombuffer(image.constBits(), dtype=np.uint8).reshape(image.height(), image.bytesPerLine())
    rgba = rows[:, : image.width() * 4].reshape(image.height(), image.width(), 4).copy()
    return ImagePixels(rgba, info.width_px, info.height_px)


def image_transform(placement: Placement, pixels: ImagePixels) -> QtGui.QTransform:
    """Item coordinates of an ``ImageItem`` (array column u, row v; pixel (col, row) covers
    [col, col + 1] x [row, row + 1], so its centre is at u = col + 0.5) to plan metres."""
    a, d, b, e, c, f = placement.terms()
    shrink_x = pixels.width_px / pixels.rgba.shape[1]
    shrink_y = pixels.height_px / pixels.rgba.shape[0]
    to_plan = QtGui.QTransform(a, d, b, e, c - 0.5 * (a + b), f - 0.5 * (d + e))
    return QtGui.QTransform.fromScale(shrink_x, shrink_y) * to_plan


def _read(key: ContentKey) -> Content:
    if key.kind == "drawing":
        from app.fileio.underlay_dxf import read_base_drawing  # ezdxf: only for a drawing underlay

        return read_base_drawing(key.path, assumed_units=key.assumed_units)
    return load_image_pixels(key.path)


class _Job(QtCore.QRunnable):
    def __init__(self, key: ContentKey, signals: UnderlayContent) -> None:
        super().__init__()
        self._key = key
        self._signals = signals

    def run(self) -> None:
        try:
            result: Content | str = _read(self._key)
        except (UnderlayFileError, OSError, ValueError) as error:
            result = str(error)
        except Exception as error:  # a worker must report every failure, or the file stays "loading"
            result = f"{self._key.path}: could not be read ({type(error).__name__}: {error})"
        with contextlib.suppress(RuntimeError):  # the window closed while the file was read
            self._signals.finished.emit(self._key, result)


class UnderlayContent(QtCore.QObject):
    """File contents by :class:`ContentKey`, read on a worker thread and kept while in use.

    ``get`` answers at once: the content, an error message (str), or None while it is read;
    ``loaded`` fires (on the GUI thread) when a read ends.
    """

    finished = QtCore.Signal(object, object)  # ContentKey, Content | str  (from the worker)
    loaded = QtCore.Signal(object)            # ContentKey

    def __init__(self, parent: QtCore.QObject | None = None) -> None:
        super().__init__(parent)
        self._done: dict[ContentKey, Content | str] = {}
        self._pending: set[ContentKey] = set()
        self._pickers: dict[ContentKey, OutlinePicker] = {}
        self.held: set[ContentKey] = set()  # kept although no underlay uses them yet (imports)
        self._pool = QtCore.QThreadPool(self)
        self.finished.connect(self._store, QtCore.Qt.ConnectionType.QueuedConnection)

    def get(self, key: ContentKey) -> Content | str | None:
        if key in self._done:
            return self._done[key]
        if key not in self._pending:
            self._pending.add(key)
            self._pool.start(_Job(key, self))
        return None

    def _store(self, key: ContentKey, result: Content | str) -> None:
        self._pending.discard(key)
        self._done[key] = result
        self.loaded.emit(key)

    def picker(self, key: ContentKey) -> OutlinePicker | None:
        drawing = self._done.get(key)
        if not isinstance(drawing, BaseDrawing):
            return None
        if key not in self._pickers:
            self._pickers[key] = outline_picker(drawing)
        return self._pickers[key]

    def forget_except(self, keys: set[ContentKey]) -> None:
        """Drop contents no underlay uses any more (memory of a removed base drawing)."""
        for key in [k for k in self._done if k not in keys and k not in self.held]:
            del self._done[key]
            self._pickers.pop(key, None)

    def wait(self, timeout_ms: int = 60_000) -> bool:
        """Block until every read has ended and its result is stored (tests, benchmarks)."""
        done = self._pool.waitForDone(timeout_ms)
        QtCore.QCoreApplication.sendPostedEvents(self)
        return done and not self._pending


def _curve(xy: FloatArray) -> pg.PlotCurveItem:
    curve = pg.PlotCurveItem(x=np.ascontiguousarray(xy[:, 0]), y=np.ascontiguousarray(xy[:, 1]),
                             connect="finite", pen=pg.mkPen(DRAWING_COLOUR, width=1, cosmetic=True),
                             antialias=False)
    curve.setAcceptedMouseButtons(QtCore.Qt.MouseButton.NoButton)
    return curve


class UnderlayGraphics:
    """The items of one underlay's content: a curve per drawing layer, or one image."""

    def __init__(self, view_box: pg.ViewBox, content: Content) -> None:
        self._view_box = view_box
        self.content = content
        self.items: dict[str, pg.GraphicsObject] = {}
        if isinstance(content, BaseDrawing):
            for name, layer in content.layers.items():
                if len(layer.polylines):
                    self.items[name] = _curve(layer.polylines)
        else:
            image = pg.ImageItem(axisOrder="row-major")
            image.setImage(content.rgba, autoLevels=False, levels=(0, 255))
            image.setAcceptedMouseButtons(QtCore.Qt.MouseButton.NoButton)
            self.items[""] = image
        for item in self.items.values():
            view_box.addItem(item, ignoreBounds=True)

    def show(self, underlay: Underlay, z_value: float) -> None:
        for name, item in self.items.items():
            item.setVisible(underlay.visible and name not in underlay.hidden_layers)
            item.setOpacity(underlay.opacity)
            item.setZValue(z_value)
            if isinstance(item, pg.ImageItem) and underlay.placement is not None:
                assert isinstance(self.content, ImagePixels)
                item.setTransform(image_transform(underlay.placement, self.content))

    def set_opacity(self, opacity: float) -> None:
        for item in self.items.values():
            item.setOpacity(opacity)

    def remove(self) -> None:
        for item in self.items.values():
            self._view_box.removeItem(item)
        self.items.clear()


class UnderlayView(QtCore.QObject):
    """Keeps the view box showing the layout's underlays, in order, and the picked outlines."""

    changed = QtCore.Signal()  # an underlay's content arrived or failed: statuses may differ

    def __init__(self, view_box: pg.ViewBox, content: UnderlayContent | None = None) -> None:
        super().__init__(view_box)
        self._view_box = view_box
        self.content = content if content is not None else UnderlayContent(self)
        self.graphics: dict[str, tuple[ContentKey, UnderlayGraphics]] = {}
        self._underlays: tuple[Underlay, ...] = ()
        self.picked = _curve(np.empty((0, 2)))
        self.picked.setPen(pg.mkPen(PICKED_COLOUR, width=3, cosmetic=True))
        self.picked.setZValue(PICKED_Z)
        view_box.addItem(self.picked, ignoreBounds=True)
        self.content.loaded.connect(lambda _key: self.show(self._underlays))

    def status(self, underlay: Underlay) -> Content | str | None:
        """The underlay's content, a message why there is none, or None while it is read."""
        key = content_key(underlay)
        return key if isinstance(key, str) else self.content.get(key)

    def show(self, underlays: tuple[Underlay, ...]) -> None:
        self._underlays = underlays
        keys: set[ContentKey] = set()
        for order, underlay in enumerate(underlays):
            key = content_key(underlay)
            if isinstance(key, ContentKey):
                keys.add(key)
            self._show_one(underlay, key, UNDERLAY_Z + UNDERLAY_Z_STEP * order)
        for underlay_id in [i for i in self.graphics if i not in {u.id for u in underlays}]:
            self.graphics.pop(underlay_id)[1].remove()
        self.content.forget_except(keys)
        self.changed.emit()

    def _show_one(self, underlay: Underlay, key: ContentKey | str, z_value: float) -> None:
        shown = self.graphics.get(underlay.id)
        content = None if isinstance(key, str) else self.content.get(key)
        if shown is not None and shown[0] != key:
            shown[1].remove()
            del self.graphics[underlay.id]
            shown = None
        if shown is None and isinstance(content, (BaseDrawing, ImagePixels)):
            assert isinstance(key, ContentKey)
            shown = (key, UnderlayGraphics(self._view_box, content))
            self.graphics[underlay.id] = shown
        if shown is not None:
            shown[1].show(underlay, z_value)

    def set_opacity_preview(self, underlay_id: str, opacity: float) -> None:
        shown = self.graphics.get(underlay_id)
        if shown is not None:
            shown[1].set_opacity(opacity)

    def set_picked(self, xy: FloatArray) -> None:
        self.picked.setData(x=np.ascontiguousarray(xy[:, 0]), y=np.ascontiguousarray(xy[:, 1]),
                            connect="finite")
