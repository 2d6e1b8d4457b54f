"""File > Export DXF…: choose the layers and whether to repeat the base drawings, then write."""

from __future__ import annotations

from collections.abc import Collection
from pathlib import Path
from typing import Any

from PySide6 import QtWidgets

from app.fileio.dxf_layers import DXF_LAYERS


class ExportDialog(QtWidgets.QDialog):
    """The layers to write (all by default), base drawings (off by default) and the file."""

    def __init__(self, parent: QtWidgets.QWidget, start_path: str, has_underlays: bool) -> None:
        super().__init__(parent)
        self.setWindowTitle("Export DXF for drafting")
        form = QtWidgets.QVBoxLayout(self)
        form.addWidget(QtWidgets.QLabel("Layers to write:"))
        self.layer_boxes: dict[str, QtWidgets.QCheckBox] = {}
        grid = QtWidgets.QGridLayout()
        for index, (key, spec) in enumerate(DXF_LAYERS.items()):
            box = QtWidgets.QCheckBox(spec.description[:60] or key)
            box.setToolTip(f"{spec.name}: {spec.description}")
            box.setChecked(True)
            self.layer_boxes[key] = box
            grid.addWidget(box, index // 2, index % 2)
        form.addLayout(grid)
        self.underlays = QtWidgets.QCheckBox("Repeat the base drawings (underlays) in the file")
        self.underlays.setEnabled(has_underlays)
        form.addWidget(self.underlays)
        row = QtWidgets.QHBoxLayout()
        self.path_edit = QtWidgets.QLineEdit(start_path)
        browse = QtWidgets.QPushButton("Choose…")
        browse.clicked.connect(self._choose)
        row.addWidget(self.path_edit)
        row.addWidget(browse)
        form.addLayout(row)
        buttons = QtWidgets.QDialogButtonBox(QtWidgets.QDialogButtonBox.StandardButton.Ok
                                             | QtWidgets.QDialogButtonBox.StandardButton.Cancel)
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        form.addWidget(buttons)

    def _choose(self) -> None:
        path, _ = QtWidgets.QFileDialog.getSaveFileName(self, "Export DXF", self.path_edit.text(),
                                                        "DXF drawings (*.dxf)")
        if path:
            self.path_edit.setText(path if path.lower().endswith(".dxf") else path + ".dxf")

    def chosen_layers(self) -> list[str]:
        return [key for key, box in self.layer_boxes.items() if box.isChecked()]


def write_dxf(window: Any, path: Path, layers: Collection[str] | None, include_underlays: bool) -> bool:
    """Export the window's current layout and results; report the outcome in the window."""
    from app.fileio.dxf_export import DxfExportError, export_dxf  # ezdxf: only when exporting

    window.refresh_now()
    if window.result is None:
        window.messages.error("DXF export", "There is nothing computed to export yet.")
        return False
    try:
        summary = export_dxf(window.document.layout, window.result, path, layers=layers,
                             include_underlays=include_underlays)
    except (DxfExportError, ValueError) as error:
        window.messages.error("DXF export", str(error))
        return False
    window.messages.note(f"Wrote {summary.path.name}: {summary.total_entities} entities on "
                         f"{len(summary.layers)} layers.")
    return True


def export_from_window(window: Any) -> bool:
    layout_path = window.document.path
    start = str(Path(layout_path).with_suffix(".dxf")) if layout_path else "layout.dxf"
    dialog = ExportDialog(window, start, bool(window.document.layout.underlays))
    if dialog.exec() != QtWidgets.QDialog.DialogCode.Accepted or not dialog.path_edit.text().strip():
        return False
    return write_dxf(window, Path(dialog.path_edit.text().strip()), dialog.chosen_layers(),
                     dialog.underlays.isChecked())
