"""The fleet: the design aircraft with their derived TDG, ADG and code letter; add from the demo
library or by dimensions, remove. Every change is one undoable ``set_fleet`` command."""

from __future__ import annotations

from collections.abc import Callable

from PySide6 import QtCore, QtWidgets

from app.fileio.aircraft_library import AircraftDataError, load_demo_library
from app.model import edits
from app.model.elements import Layout
from geometry.aircraft import DEFAULT_MAX_STEERING_DEG, DesignAircraft
from geometry.classify import adg_of_aircraft, code_letter_of_aircraft, tdg_of_aircraft
from geometry.errors import GeometryError
from geometry.units import LengthUnit, from_metres, to_metres

EditRequest = Callable[[str, Callable[[Layout], Layout]], object]
COLUMNS = ("Name", "Wingspan", "MGW", "CMG", "Wheelbase", "TDG", "ADG", "Code")
# (field, label, help) of the lengths the dialog asks for, in the layout's units.
DIMENSIONS = (
    ("wingspan_m", "Wingspan", "tip to tip"),
    ("mgw_m", "Main gear width (MGW)", "outer edge to outer edge of the outermost main-gear tyres"),
    ("cmg_m", "Cockpit to main gear (CMG)", "pilot's eye to the main-gear centre, along the body"),
    ("wheelbase_m", "Wheelbase", "nose gear to main-gear centre"),
    ("tyre_width_m", "Tyre width", "one main-gear tyre"),
    ("nose_x_m", "Nose ahead of main gear", "main-gear centre to the nose"),
    ("tail_x_m", "Tail behind main gear", "main-gear centre to the tail tip (entered positive)"),
    ("wingtip_x_m", "Wingtip ahead of main gear", "negative when the tips are behind the gear"),
    ("tail_height_m", "Tail height", "ground to the top of the fin"),
)


def group_or_dash(derive: Callable[[DesignAircraft], str], aircraft: DesignAircraft) -> str:
    try:
        return derive(aircraft)
    except GeometryError:
        return "beyond"  # the aircraft lies outside every group of that scheme


class AircraftDialog(QtWidgets.QDialog):
    """Dimensions of a new design aircraft in the layout's units."""

    def __init__(self, units: LengthUnit, parent: QtWidgets.QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Add a design aircraft")
        self._units = units
        form = QtWidgets.QFormLayout(self)
        self.name = QtWidgets.QLineEdit("New aircraft")
        form.addRow("Name", self.name)
        self.boxes: dict[str, QtWidgets.QDoubleSpinBox] = {}
        for field, label, tip in DIMENSIONS:
            box = QtWidgets.QDoubleSpinBox()
            box.setRange(-9999.0, 9999.0)
            box.setDecimals(2)
            box.setSuffix(f" {units}")
            box.setToolTip(tip)
            form.addRow(label, box)
            self.boxes[field] = box
        self.steering = QtWidgets.QDoubleSpinBox()
        self.steering.setRange(1.0, 89.0)
        self.steering.setValue(DEFAULT_MAX_STEERING_DEG)
        self.steering.setSuffix(" °")
        form.addRow("Max steering angle", self.steering)
        buttons = QtWidgets.QDialogButtonBox(QtWidgets.QDialogButtonBox.StandardButton.Ok
                                             | QtWidgets.QDialogButtonBox.StandardButton.Cancel)
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        form.addRow(buttons)

    def aircraft(self) -> DesignAircraft:
        """The aircraft entered; raises InvalidAircraftError with the reason when it is not valid."""
        values = {field: to_metres(box.value(), self._units) for field, box in self.boxes.items()}
        values["tail_x_m"] = -abs(values["tail_x_m"])
        return DesignAircraft(name=self.name.text().strip(), max_steering_deg=self.steering.value(),
                              **values)


class FleetPanel(QtWidgets.QDockWidget):
    problem = QtCore.Signal(str)

    def __init__(self, edit: EditRequest, parent: QtWidgets.QWidget | None = None) -> None:
        super().__init__("Fleet", parent)
        self.setObjectName("fleet")
        self._edit = edit
        self._layout = Layout()
        self.table = QtWidgets.QTableWidget(0, len(COLUMNS))
        self.table.setHorizontalHeaderLabels(COLUMNS)
        self.table.verticalHeader().setVisible(False)
        self.table.setEditTriggers(QtWidgets.QAbstractItemView.EditTrigger.NoEditTriggers)
        self.table.setSelectionBehavior(QtWidgets.QAbstractItemView.SelectionBehavior.SelectRows)
        self.library_button = QtWidgets.QToolButton()
        self.library_button.setText("Add from library")
        self.library_button.setPopupMode(QtWidgets.QToolButton.ToolButtonPopupMode.InstantPopup)
        self.library_menu = QtWidgets.QMenu(self.library_button)
        self.library_button.setMenu(self.library_menu)
        self.add_button = QtWidgets.QPushButton("Add by dimensions…")
        self.remove_button = QtWidgets.QPushButton("Remove")
        buttons = QtWidgets.QHBoxLayout()
        for widget in (self.library_button, self.add_button, self.remove_button):
            buttons.addWidget(widget)
        body = QtWidgets.QWidget()
        layout = QtWidgets.QVBoxLayout(body)
        layout.addWidget(self.table)
        layout.addLayout(buttons)
        self.setWidget(body)
        self._fill_library_menu()
        self.add_button.clicked.connect(self._ask_dimensions)
        self.remove_button.clicked.connect(self.remove_selected)

    def _fill_library_menu(self) -> None:
        try:
            library = load_demo_library()
        except (AircraftDataError, OSError) as error:
            self.library_button.setEnabled(False)
            self.library_button.setToolTip(f"The demo library could not be read: {error}")
            return
        for aircraft in library:
            action = self.library_menu.addAction(aircraft.name)
            action.triggered.connect(lambda _=False, aircraft=aircraft: self.add(aircraft))

    def show_fleet(self, layout: Layout) -> None:
        if layout.fleet is self._layout.fleet and layout.units == self._layout.units:
            self._layout = layout
            return
        self._layout = layout
        units = layout.units
        self.table.setRowCount(len(layout.fleet))
        for row, aircraft in enumerate(layout.fleet):
            texts = (aircraft.name, *(f"{from_metres(value, units):,.1f} {units}" for value in (
                aircraft.wingspan_m, aircraft.mgw_m, aircraft.cmg_m, aircraft.wheelbase_m)),
                group_or_dash(tdg_of_aircraft, aircraft), group_or_dash(adg_of_aircraft, aircraft),
                group_or_dash(code_letter_of_aircraft, aircraft))
            for column, text in enumerate(texts):
                self.table.setItem(row, column, QtWidgets.QTableWidgetItem(text))
        self.table.resizeColumnsToContents()

    def add(self, aircraft: DesignAircraft) -> None:
        if any(existing.name == aircraft.name for existing in self._layout.fleet):
            self.problem.emit(f"{aircraft.name} is already in the fleet")
            return
        self._edit(f"Add {aircraft.name} to the fleet",
                   lambda lay: edits.set_fleet(lay, (*lay.fleet, aircraft)))

    def remove_selected(self) -> None:
        rows = sorted({index.row() for index in self.table.selectionModel().selectedRows()})
        names = {self._layout.fleet[row].name for row in rows if row < len(self._layout.fleet)}
        if names:
            self._edit("Remove from the fleet",
                       lambda lay: edits.set_fleet(lay, tuple(a for a in lay.fleet if a.name not in names)))

    def _ask_dimensions(self) -> None:
        dialog = AircraftDialog(self._layout.units, self)
        if dialog.exec() != QtWidgets.QDialog.DialogCode.Accepted:
            return
        try:
            self.add(dialog.aircraft())
        except GeometryError as error:
            self.problem.emit(str(error))
