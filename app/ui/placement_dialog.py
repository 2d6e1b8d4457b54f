"""Placing an image that has no world file: the planner clicks two points on the image and types
their plan coordinates; the image gets the similarity (scale, rotation, shift) that puts them
there (:func:`app.model.underlays.placement_from_two_points`)."""

from __future__ import annotations

from pathlib import Path

from PySide6 import QtCore, QtGui, QtWidgets

from app.fileio.raster_image import ImageInfo
from app.model.elements import MAX_COORDINATE_M, XY
from app.model.underlays import Placement, PlacementError, placement_from_two_points
from geometry.units import from_metres, to_metres

PREVIEW_MAX_PX = 2048  # the dialog shows a reduced copy of a large image; clicks are scaled back
MARKER_PX = 12.0
MARKER_COLOURS = ("#e03131", "#1c7ed6")


class TwoPointDialog(QtWidgets.QDialog):
    def __init__(self, image_path: Path, info: ImageInfo, units: str,
                 parent: QtWidgets.QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle(f"Place {image_path.name}")
        self.resize(900, 700)
        self._units = units
        self.placement: Placement | None = None
        self.pixels: list[XY | None] = [None, None]
        self._next = 0
        self._scene = QtWidgets.QGraphicsScene(self)
        self._shrink = self._show_image(image_path, info)
        self.view = QtWidgets.QGraphicsView(self._scene)
        self.view.setRenderHint(QtGui.QPainter.RenderHint.SmoothPixmapTransform)
        self.view.viewport().installEventFilter(self)
        self._markers = [self._marker(colour) for colour in MARKER_COLOURS]
        self.coordinates = [QtWidgets.QDoubleSpinBox() for _ in range(4)]  # x1, y1, x2, y2
        limit = from_metres(MAX_COORDINATE_M, units)
        for box in self.coordinates:
            box.setRange(-limit, limit)
            box.setDecimals(3)
        self.pixel_labels = [QtWidgets.QLabel("not picked") for _ in range(2)]
        self.error = QtWidgets.QLabel()
        self.error.setStyleSheet("color: #c92a2a;")
        self.error.setWordWrap(True)
        self._lay_out()

    def _show_image(self, path: Path, info: ImageInfo) -> tuple[float, float]:
        reader = QtGui.QImageReader(str(path))
        reader.setAutoTransform(False)
        longest = max(info.width_px, info.height_px)
        if longest > PREVIEW_MAX_PX:
            scale = PREVIEW_MAX_PX / longest
            reader.setScaledSize(QtCore.QSize(max(1, round(info.width_px * scale)),
                                              max(1, round(info.height_px * scale))))
        image = reader.read()
        if image.isNull():
            self._scene.addText(f"The image cannot be shown ({reader.errorString()})")
            return (1.0, 1.0)
        self._scene.addPixmap(QtGui.QPixmap.fromImage(image))
        return (info.width_px / image.width(), info.height_px / image.height())

    def _marker(self, colour: str) -> QtWidgets.QGraphicsEllipseItem:
        half = MARKER_PX / 2.0
        pen = QtGui.QPen(QtGui.QColor(colour), 2)
        marker = self._scene.addEllipse(-half, -half, MARKER_PX, MARKER_PX, pen)
        marker.setFlag(QtWidgets.QGraphicsItem.GraphicsItemFlag.ItemIgnoresTransformations)
        marker.setVisible(False)
        return marker

    def _lay_out(self) -> None:
        column = QtWidgets.QVBoxLayout(self)
        column.addWidget(QtWidgets.QLabel(
            "This image has no world file. Click two points on it far apart (red, then blue), and "
            f"type their plan coordinates in {self._units}."))
        column.addWidget(self.view, 1)
        grid = QtWidgets.QGridLayout()
        for index in range(2):
            grid.addWidget(QtWidgets.QLabel(f"Point {index + 1}"), index, 0)
            grid.addWidget(self.pixel_labels[index], index, 1)
            for offset, axis in enumerate(("East", "North")):
                grid.addWidget(QtWidgets.QLabel(f"{axis} ({self._units})"), index, 2 + 2 * offset)
                grid.addWidget(self.coordinates[2 * index + offset], index, 3 + 2 * offset)
        column.addLayout(grid)
        column.addWidget(self.error)
        buttons = QtWidgets.QDialogButtonBox(QtWidgets.QDialogButtonBox.StandardButton.Ok
                                             | QtWidgets.QDialogButtonBox.StandardButton.Cancel)
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        column.addWidget(buttons)

    def eventFilter(self, watched: QtCore.QObject, event: QtCore.QEvent) -> bool:
        if (watched is self.view.viewport() and event.type() == QtCore.QEvent.Type.MouseButtonPress
                and isinstance(event, QtGui.QMouseEvent)
                and event.button() == QtCore.Qt.MouseButton.LeftButton):
            scene = self.view.mapToScene(event.position().toPoint())
            # Scene units are preview pixels with edges at integers; pixel centres sit at +0.5.
            self.set_pixel(self._next, (scene.x() * self._shrink[0] - 0.5, scene.y() * self._shrink[1] - 0.5))
            return True
        return super().eventFilter(watched, event)

    def set_pixel(self, index: int, col_row: XY) -> None:
        """Point ``index`` (0 or 1) is at pixel position ``col_row`` (pixel-centre convention)."""
        self.pixels[index] = col_row
        self._next = 1 - index
        self.pixel_labels[index].setText(f"column {col_row[0]:.1f}, row {col_row[1]:.1f}")
        marker = self._markers[index]
        marker.setPos((col_row[0] + 0.5) / self._shrink[0], (col_row[1] + 0.5) / self._shrink[1])
        marker.setVisible(True)

    def set_coordinates(self, index: int, east: float, north: float) -> None:
        """Point ``index`` is at (east, north) on the plan, in the layout's units."""
        self.coordinates[2 * index].setValue(east)
        self.coordinates[2 * index + 1].setValue(north)

    def _placement(self) -> Placement:
        first, second = self.pixels
        if first is None or second is None:
            raise PlacementError("click two points on the image first")
        x1, y1, x2, y2 = (to_metres(box.value(), self._units) for box in self.coordinates)
        return placement_from_two_points(first, second, (x1, y1), (x2, y2))

    def accept(self) -> None:
        try:
            self.placement = self._placement()
        except PlacementError as error:
            self.error.setText(str(error))
            return
        super().accept()
