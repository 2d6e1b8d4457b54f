"""Junction inspector: the movements of the selected junction (turn, radius, fillet, required
area, steering, edge margin), a checkbox per movement to exclude it, its fillets, and a plot of
steering angle and edge margin along the selected movement."""

from __future__ import annotations

import math

import numpy as np
import pyqtgraph as pg
from PySide6 import QtCore, QtWidgets

from app.model.results import FilletResult, JunctionResult, MovementResult
from geometry.units import LengthUnit, from_metres

MOVEMENT_COLUMNS = ("Movement", "Turn (°)", "CL radius", "Fillet radius", "Required area",
                    "Max steering (°)", "Smallest edge margin", "Note", "Include")
FILLET_COLUMNS = ("Corner", "Fillet radius", "Taper A", "Taper B", "Area")
TRACK_COLOURS = ("#d9480f", "#1c7ed6", "#2f9e44", "#9c36b5", "#f59f00", "#0ca678")
SQ_FT_PER_SQ_M = 1.0 / 0.3048 ** 2  # identity: 1 ft = 0.3048 m


def _length(value_m: float | None, units: LengthUnit) -> str:
    if value_m is None or not math.isfinite(value_m):
        return "—"
    return f"{from_metres(value_m, units):,.1f} {units}"


def _area(value_m2: float, units: LengthUnit) -> str:
    if units == "ft":
        return f"{value_m2 * SQ_FT_PER_SQ_M:,.0f} ft²"
    return f"{value_m2:,.0f} m²"


def _leg_end(junction_id: str, leg_id: str) -> str:
    return leg_id.removeprefix(f"{junction_id}|")


def fillet_of(movement: MovementResult, junction: JunctionResult) -> FilletResult | None:
    """The fillet on the inside of a turn: the one at the corner the turn sweeps."""
    if movement.corner_key is None:
        return None
    return next((fillet for fillet in junction.fillets if fillet.corner_key == movement.corner_key), None)


def _item(text: str, movement_key: str | None = None) -> QtWidgets.QTableWidgetItem:
    item = QtWidgets.QTableWidgetItem(text)
    item.setFlags(item.flags() & ~QtCore.Qt.ItemFlag.ItemIsEditable)
    if movement_key is not None:
        item.setData(QtCore.Qt.ItemDataRole.UserRole, movement_key)
    return item


class JunctionPanel(QtWidgets.QDockWidget):
    movement_selected = QtCore.Signal(object)   # MovementResult | None
    exclusion_toggled = QtCore.Signal(str, bool)  # movement key, excluded
    radius_requested = QtCore.Signal(object)       # the selected turn (MovementResult)

    def __init__(self, parent: QtWidgets.QWidget | None = None) -> None:
        super().__init__("Junction inspector", parent)
        self.setObjectName("junction_inspector")
        body = QtWidgets.QWidget()
        layout = QtWidgets.QVBoxLayout(body)
        self.heading = QtWidgets.QLabel("Click a junction (violet ring) to inspect it.")
        self.heading.setWordWrap(True)
        self.movements = QtWidgets.QTableWidget(0, len(MOVEMENT_COLUMNS))
        self.movements.setHorizontalHeaderLabels(MOVEMENT_COLUMNS)
        self.movements.setSelectionBehavior(QtWidgets.QAbstractItemView.SelectionBehavior.SelectRows)
        self.movements.setSelectionMode(QtWidgets.QAbstractItemView.SelectionMode.SingleSelection)
        self.movements.verticalHeader().setVisible(False)
        self.fillets = QtWidgets.QTableWidget(0, len(FILLET_COLUMNS))
        self.fillets.setHorizontalHeaderLabels(FILLET_COLUMNS)
        self.fillets.verticalHeader().setVisible(False)
        self.plot = pg.GraphicsLayoutWidget()
        self.plot.setMinimumHeight(180)
        self.plot.setBackground(self.palette().color(self.backgroundRole()))
        self.steering_plot = self.plot.addPlot(row=0, col=0)
        self.margin_plot = self.plot.addPlot(row=1, col=0)
        self.margin_plot.setXLink(self.steering_plot)
        for plot in (self.steering_plot, self.margin_plot):
            plot.showGrid(x=True, y=True, alpha=0.3)
            for side in ("left", "bottom"):
                plot.getAxis(side).setPen(pg.mkPen(self.palette().color(self.foregroundRole())))
                plot.getAxis(side).setTextPen(pg.mkPen(self.palette().color(self.foregroundRole())))
            plot.getAxis("left").enableAutoSIPrefix(False)
            plot.getAxis("bottom").enableAutoSIPrefix(False)
        self.steering_plot.setLabel("left", "Steering (°)")
        self.radius_button = QtWidgets.QPushButton("Set turn radius…")
        self.radius_button.setToolTip("Set the centerline radius of the selected turn's corner (both "
                                      "directions), or go back to the default radius")
        self.radius_button.setEnabled(False)
        self.radius_button.clicked.connect(
            lambda: self.radius_requested.emit(self._movement(self._selected_key())))
        self.steering_plot.addLegend(offset=(-10, 10))
        for widget, stretch in ((self.heading, 0), (self.movements, 3), (self.radius_button, 0),
                                (QtWidgets.QLabel("Fillets"), 0), (self.fillets, 1), (self.plot, 3)):
            layout.addWidget(widget, stretch)
        self.setWidget(body)
        self._junction: JunctionResult | None = None
        self._units: LengthUnit = "ft"
        self.movements.itemSelectionChanged.connect(self._on_row_selected)
        self.movements.itemChanged.connect(self._on_item_changed)

    @property
    def junction(self) -> JunctionResult | None:
        return self._junction

    def show_junction(self, junction: JunctionResult | None, units: LengthUnit) -> None:
        selected_key = self._selected_key()
        self._junction, self._units = junction, units
        self.movements.blockSignals(True)
        self.movements.setRowCount(0)
        self.fillets.setRowCount(0)
        if junction is None:
            self.heading.setText("Click a junction (violet ring) to inspect it.")
        else:
            self.heading.setText(f"Junction {junction.junction_id} ({junction.kind}): "
                                 f"required {_area(junction.required_area_m2, units)}, "
                                 f"buildable {_area(junction.buildable_area_m2, units)}")
            for movement in junction.movements:
                self._add_movement_row(junction, movement)
            for fillet in junction.fillets:
                self._add_fillet_row(fillet)
        self.movements.resizeColumnsToContents()
        self.fillets.resizeColumnsToContents()
        self.movements.blockSignals(False)
        self._reselect(selected_key)

    def _add_movement_row(self, junction: JunctionResult, movement: MovementResult) -> None:
        row = self.movements.rowCount()
        self.movements.insertRow(row)
        fillet = fillet_of(movement, junction)
        name = (f"{_leg_end(junction.junction_id, movement.from_leg_id)} → "
                f"{_leg_end(junction.junction_id, movement.to_leg_id)}")
        texts = (name, f"{movement.turn_deg:+.1f}", _length(movement.radius_m, self._units),
                 _length(fillet.fillet_radius_m if fillet else None, self._units),
                 _area(movement.required_area_m2, self._units) if movement.kind == "turn" else "—",
                 f"{movement.max_steering_deg:.1f}" if math.isfinite(movement.max_steering_deg) else "—",
                 _length(movement.min_edge_margin_m, self._units),
                 movement.problem or "", "")
        for column, text in enumerate(texts):
            self.movements.setItem(row, column, _item(text, movement.key))
        use = _item("", movement.key)
        use.setFlags(use.flags() | QtCore.Qt.ItemFlag.ItemIsUserCheckable)
        checked = QtCore.Qt.CheckState.Checked
        use.setCheckState(QtCore.Qt.CheckState.Unchecked if movement.excluded else checked)
        use.setToolTip("Untick to exclude this movement from the design (its pavement and checks)")
        self.movements.setItem(row, len(texts) - 1, use)

    def _add_fillet_row(self, fillet: FilletResult) -> None:
        row = self.fillets.rowCount()
        self.fillets.insertRow(row)
        texts = (fillet.corner_key, _length(fillet.fillet_radius_m, self._units),
                 _length(fillet.taper_a_m, self._units), _length(fillet.taper_b_m, self._units),
                 _area(fillet.area_m2, self._units))
        for column, text in enumerate(texts):
            self.fillets.setItem(row, column, _item(text))

    def _selected_key(self) -> str | None:
        rows = self.movements.selectionModel().selectedRows()
        item = self.movements.item(rows[0].row(), 0) if rows else None
        return None if item is None else str(item.data(QtCore.Qt.ItemDataRole.UserRole))

    def _reselect(self, key: str | None) -> None:
        for row in range(self.movements.rowCount()):
            if self.movements.item(row, 0).data(QtCore.Qt.ItemDataRole.UserRole) == key:
                self.movements.selectRow(row)
                return
        self._on_row_selected()

    def _movement(self, key: str | None) -> MovementResult | None:
        if self._junction is None or key is None:
            return None
        return next((m for m in self._junction.movements if m.key == key), None)

    def _on_row_selected(self) -> None:
        movement = self._movement(self._selected_key())
        self.radius_button.setEnabled(movement is not None and movement.corner_key is not None)
        self._plot(movement)
        self.movement_selected.emit(movement)

    def _on_item_changed(self, item: QtWidgets.QTableWidgetItem) -> None:
        if item.column() == len(MOVEMENT_COLUMNS) - 1:
            key = str(item.data(QtCore.Qt.ItemDataRole.UserRole))
            self.exclusion_toggled.emit(key, item.checkState() == QtCore.Qt.CheckState.Unchecked)

    def _plot(self, movement: MovementResult | None) -> None:
        self.steering_plot.clear()
        self.margin_plot.clear()
        self.margin_plot.setLabel("left", f"Edge margin ({self._units})")
        self.margin_plot.setLabel("bottom", f"Cockpit station ({self._units})")
        if movement is None:
            return
        for index, tracks in enumerate(movement.tracks):
            colour = TRACK_COLOURS[index % len(TRACK_COLOURS)]
            station = from_metres(1.0, self._units) * np.asarray(tracks.station_m, dtype=float)
            margin = from_metres(1.0, self._units) * np.asarray(tracks.edge_margin_m, dtype=float)
            self.steering_plot.plot(station, np.asarray(tracks.steering_deg, dtype=float),
                                    pen=pg.mkPen(colour, width=1.5), name=tracks.aircraft_name)
            self.margin_plot.plot(station, margin, pen=pg.mkPen(colour, width=1.5))
        self.margin_plot.addLine(y=0.0, pen=pg.mkPen("#c92a2a", style=QtCore.Qt.PenStyle.DashLine))
