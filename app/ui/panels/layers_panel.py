"""A checkbox per scene layer, top layer first."""

from __future__ import annotations

from PySide6 import QtCore, QtWidgets

from app.model.scene import LAYER_ORDER, LAYER_TITLES


class LayersPanel(QtWidgets.QDockWidget):
    visibility_changed = QtCore.Signal(str, bool)  # layer name, visible

    def __init__(self, parent: QtWidgets.QWidget | None = None) -> None:
        super().__init__("Layers", parent)
        self.setObjectName("layers")
        body = QtWidgets.QWidget()
        layout = QtWidgets.QVBoxLayout(body)
        self.boxes: dict[str, QtWidgets.QCheckBox] = {}
        for name in reversed(LAYER_ORDER):
            box = QtWidgets.QCheckBox(LAYER_TITLES[name])
            box.setChecked(True)
            box.toggled.connect(lambda checked, name=name: self.visibility_changed.emit(name, checked))
            layout.addWidget(box)
            self.boxes[name] = box
        layout.addStretch(1)
        self.setWidget(body)
