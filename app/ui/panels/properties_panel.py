"""Properties of the selection, edited in place; every change is one undoable command built by
:mod:`app.model.edits`. With nothing selected the panel shows the layout's own settings."""

from __future__ import annotations

from collections.abc import Callable

from PySide6 import QtWidgets

from app.model import edits
from app.model.elements import (
    ADG_VALUES,
    CENTERLINE_KINDS,
    CODE_LETTERS,
    OBJECT_KINDS,
    RULE_SET_NAMES,
    TDG_VALUES,
    Centerline,
    DesignGroup,
    ExistingPavement,
    FixedObject,
    Layout,
    Runway,
)
from app.model.ids import element_by_id
from app.model.tools import Selection
from geometry.units import LENGTH_UNITS, LengthUnit, from_metres, to_metres

Build = Callable[[Layout], Layout]
EditRequest = Callable[[str, Build], object]
AUTO = "auto (from fleet)"


class LengthBox(QtWidgets.QDoubleSpinBox):
    """A length shown in the layout's units; 0 shows ``special`` (auto, sharp) and means None."""

    def __init__(self, special: str = "") -> None:
        super().__init__()
        self.setRange(0.0, 99_999.0)
        self.setDecimals(1)
        self.setSpecialValueText(special)
        self.setKeyboardTracking(False)
        self._units: LengthUnit = "ft"
        self._shown = 0.0

    def show_metres(self, value_m: float | None, units: LengthUnit) -> None:
        self._units = units
        self.setSuffix(f" {units}")
        self._shown = round(from_metres(value_m, units), 1) if value_m is not None else 0.0
        self.blockSignals(True)
        self.setValue(self._shown)
        self.blockSignals(False)

    def changed_metres(self) -> tuple[bool, float | None]:
        """(whether the planner changed the value, the new value in metres or None)."""
        value = self.value()
        if abs(value - self._shown) < 1e-9:
            return False, None
        return True, (to_metres(value, self._units) if value > 0.0 else None)


def _combo(values: tuple[str, ...], auto: bool = False) -> QtWidgets.QComboBox:
    box = QtWidgets.QComboBox()
    box.addItems(((AUTO,) if auto else ()) + values)
    return box


def _choose(box: QtWidgets.QComboBox, value: str | None) -> None:
    box.blockSignals(True)
    box.setCurrentText(value if value is not None else AUTO)
    box.blockSignals(False)


def _text(box: QtWidgets.QComboBox) -> str | None:
    return None if box.currentText() == AUTO else box.currentText()


class PropertiesPanel(QtWidgets.QDockWidget):
    def __init__(self, edit: EditRequest, parent: QtWidgets.QWidget | None = None) -> None:
        super().__init__("Properties", parent)
        self.setObjectName("properties")
        self._edit = edit
        self._layout = Layout()
        self._selection = Selection()
        self.pages = QtWidgets.QStackedWidget()
        self.setWidget(self.pages)
        self._build_layout_page()
        self._build_centerline_page()
        self._build_runway_page()
        self._build_object_page()

    def _page(self, title: str) -> QtWidgets.QFormLayout:
        page = QtWidgets.QWidget()
        form = QtWidgets.QFormLayout(page)
        heading = QtWidgets.QLabel(f"<b>{title}</b>")
        form.addRow(heading)
        self.pages.addWidget(page)
        return form

    # --- pages -------------------------------------------------------------------------------------

    def _build_layout_page(self) -> None:
        form = self._page("Layout")
        self.title = QtWidgets.QLineEdit()
        self.rule_set = _combo(RULE_SET_NAMES)
        self.units = _combo(LENGTH_UNITS)
        form.addRow("Title", self.title)
        form.addRow("Rule set", self.rule_set)
        form.addRow("Units", self.units)
        self.title.editingFinished.connect(lambda: self._edit_if(
            self.title.text() != self._layout.title, "Rename layout",
            lambda lay: edits.set_title_notes(lay, self.title.text(), lay.notes)))
        self.rule_set.activated.connect(lambda _: self._edit(
            "Change rule set", lambda lay: edits.set_rule_set(lay, self.rule_set.currentText())))
        self.units.activated.connect(lambda _: self._edit(
            "Change units", lambda lay: edits.set_units(lay, self.units.currentText())))  # type: ignore[arg-type]

    def _build_centerline_page(self) -> None:
        self.line_form = form = self._page("Centerline")
        self.line_name = QtWidgets.QLineEdit()
        self.line_kind = _combo(CENTERLINE_KINDS)
        self.tdg, self.adg = _combo(TDG_VALUES, True), _combo(ADG_VALUES, True)
        self.code = _combo(CODE_LETTERS, True)
        self.line_width = LengthBox("auto (rule set)")
        self.corner = LengthBox("sharp")
        for label, widget in (("Name", self.line_name), ("Kind", self.line_kind), ("TDG", self.tdg),
                              ("ADG", self.adg), ("Code letter", self.code), ("Width", self.line_width),
                              ("Corner radius", self.corner)):
            form.addRow(label, widget)
        self.line_name.editingFinished.connect(lambda: self._update_line("Rename centerline",
                                                                         name=self.line_name.text()))
        self.line_kind.activated.connect(lambda _: self._update_line("Change centerline kind",
                                                                     kind=self.line_kind.currentText()))
        for box in (self.tdg, self.adg, self.code):
            box.activated.connect(lambda _: self._update_line("Change design group", group=DesignGroup(
                _text(self.tdg), _text(self.adg), _text(self.code))))
        self.line_width.editingFinished.connect(self._width_edited)
        self.corner.editingFinished.connect(self._corner_edited)

    def _build_runway_page(self) -> None:
        form = self._page("Runway")
        self.designation = QtWidgets.QLineEdit()
        self.runway_width = LengthBox()
        self.instrument = QtWidgets.QCheckBox("Instrument runway")
        form.addRow("Designation", self.designation)
        form.addRow("Width", self.runway_width)
        form.addRow(self.instrument)
        self.designation.editingFinished.connect(lambda: self._update(
            edits.update_runway, "Rename runway", designation=self.designation.text()))
        self.runway_width.editingFinished.connect(self._runway_width_edited)
        self.instrument.toggled.connect(lambda on: self._update(
            edits.update_runway, "Change runway approach", instrument=on))

    def _build_object_page(self) -> None:
        form = self._page("Object")
        self.object_name = QtWidgets.QLineEdit()
        self.object_kind = _combo(OBJECT_KINDS)
        self.object_height = LengthBox()
        form.addRow("Name", self.object_name)
        form.addRow("Kind", self.object_kind)
        form.addRow("Height", self.object_height)
        self.object_name.editingFinished.connect(
            lambda: self._update_named("Rename", self.object_name.text()))
        self.object_kind.activated.connect(lambda _: self._update(
            edits.update_object, "Change object kind", kind=self.object_kind.currentText()))
        self.object_height.editingFinished.connect(self._height_edited)

    # --- showing -------------------------------------------------------------------------------------

    def show_selection(self, layout: Layout, selection: Selection) -> None:
        self._layout, self._selection = layout, selection
        element = self._element()
        if isinstance(element, Centerline):
            self._show_centerline(element, layout.units)
        elif isinstance(element, Runway):
            self.pages.setCurrentIndex(2)
            self._set_line_edit(self.designation, element.designation)
            self.runway_width.show_metres(element.width_m, layout.units)
            self.instrument.blockSignals(True)
            self.instrument.setChecked(element.instrument)
            self.instrument.blockSignals(False)
        elif isinstance(element, (FixedObject, ExistingPavement)):
            self.pages.setCurrentIndex(3)
            self._set_line_edit(self.object_name, element.name)
            is_object = isinstance(element, FixedObject)
            self.object_kind.setEnabled(is_object)
            self.object_height.setEnabled(is_object)
            if isinstance(element, FixedObject):
                _choose(self.object_kind, element.kind)
                self.object_height.show_metres(element.height_m, layout.units)
        else:
            self.pages.setCurrentIndex(0)
            self._set_line_edit(self.title, layout.title)
            _choose(self.rule_set, layout.rule_set)
            _choose(self.units, layout.units)

    def _show_centerline(self, line: Centerline, units: LengthUnit) -> None:
        self.pages.setCurrentIndex(1)
        self._set_line_edit(self.line_name, line.name)
        _choose(self.line_kind, line.kind)
        _choose(self.tdg, line.group.tdg)
        _choose(self.adg, line.group.adg)
        _choose(self.code, line.group.code_letter)
        faa = self._layout.rule_set == "FAA"
        for widget, shown in ((self.tdg, faa), (self.adg, faa), (self.code, not faa)):
            self.line_form.setRowVisible(widget, shown)
        self.line_width.show_metres(line.width_override_m, units)
        index = self._corner_index(line)
        self.line_form.setRowVisible(self.corner, index is not None)
        if index is not None:
            label = self.line_form.labelForField(self.corner)
            if isinstance(label, QtWidgets.QLabel):
                label.setText(f"Corner radius at point {index + 1}")
            self.corner.show_metres(line.vertices[index].corner_radius_m, units)

    @staticmethod
    def _set_line_edit(edit: QtWidgets.QLineEdit, text: str) -> None:
        if not edit.hasFocus():
            edit.setText(text)

    def _element(self) -> Centerline | Runway | FixedObject | ExistingPavement | None:
        ids = self._selection.element_ids
        return element_by_id(self._layout, ids[0]) if len(ids) == 1 else None

    def _corner_index(self, line: Centerline) -> int | None:
        vertex = self._selection.vertex
        if vertex is None or vertex[0] != line.id or not 0 < vertex[1] < len(line.vertices) - 1:
            return None
        return vertex[1]

    # --- edits ----------------------------------------------------------------------------------------

    def _edit_if(self, changed: bool, label: str, build: Build) -> None:
        if changed:
            self._edit(label, build)

    def _update(self, update: Callable[..., Layout], label: str, **fields: object) -> None:
        element = self._element()
        if element is not None and any(getattr(element, k) != v for k, v in fields.items()):
            element_id = element.id
            self._edit(label, lambda lay: update(lay, element_id, **fields))

    def _update_line(self, label: str, **fields: object) -> None:
        self._update(edits.update_centerline, label, **fields)

    def _update_named(self, label: str, name: str) -> None:
        element = self._element()
        if isinstance(element, ExistingPavement):
            self._update(edits.update_existing_pavement, f"{label} pavement", name=name)
        else:
            self._update(edits.update_object, f"{label} object", name=name)

    def _width_edited(self) -> None:
        changed, value_m = self.line_width.changed_metres()
        if changed:
            self._update_line("Change centerline width", width_override_m=value_m)

    def _runway_width_edited(self) -> None:
        changed, value_m = self.runway_width.changed_metres()
        if changed and value_m is not None:
            self._update(edits.update_runway, "Change runway width", width_m=value_m)

    def _height_edited(self) -> None:
        changed, value_m = self.object_height.changed_metres()
        if changed:
            self._update(edits.update_object, "Change object height", height_m=value_m or 0.0)

    def _corner_edited(self) -> None:
        changed, value_m = self.corner.changed_metres()
        element, vertex = self._element(), self._selection.vertex
        if changed and isinstance(element, Centerline) and vertex is not None:
            line_id, index = element.id, vertex[1]
            self._edit("Set corner radius", lambda lay: edits.set_corner_radius(lay, line_id, index, value_m))

