"""The main window: the plan view in the middle, panels around it, the caution line at the bottom.

The window subscribes to the document; after each change it recomputes through ``analyze``
(coalesced by a 0 ms single-shot timer, so a drag recomputes once per frame), rebuilds the scene
(only changed layers are redrawn) and refreshes the panels.
"""

from __future__ import annotations

from collections.abc import Callable

from PySide6 import QtCore, QtGui, QtWidgets

from app.model.document import Document, LayoutChange
from app.model.edits import (
    EditError,
    remove_elements,
    set_movement_excluded,
    set_turn_radius_override,
    set_units,
)
from app.model.elements import Layout
from app.model.ids import element_ids
from app.model.results import LayoutResult, MovementResult
from app.model.scene import Scene, build_scene, join_pieces, layout_bounds, selection_xy
from app.model.tools import Selection
from app.ui import about
from app.ui.actions import WindowActions
from app.ui.canvas import PlanCanvas
from app.ui.export_dialog import export_from_window
from app.ui.files import FileController, display_name
from app.ui.messages import Messages
from app.ui.panels.findings_panel import FindingsPanel
from app.ui.panels.fleet_panel import FleetPanel
from app.ui.panels.junction_panel import JunctionPanel
from app.ui.panels.layers_panel import LayersPanel
from app.ui.panels.properties_panel import PropertiesPanel
from app.ui.style import CAUTION, DARK, LIGHT
from app.ui.tool_controller import ToolController
from app.ui.underlay_controller import UnderlayController, install_underlays
from geometry.findings import Finding
from geometry.units import from_metres, to_metres

Analyze = Callable[[Layout], LayoutResult]
STATUS_MARGIN_PX = 12
STATUS_PAD_PX = 6  # the status bar's own frame above and below its widgets
FINDING_ZOOM_SPAN_M = 150.0  # the view around a finding when it is clicked: a junction and its legs


def pavement_summary(result: LayoutResult | None, units: str) -> str:
    """``"Pavement 12,345 ft² (new 2,345 ft²)"`` for the status bar; empty before any result."""
    if result is None:
        return ""
    per_m2 = from_metres(1.0, units) ** 2
    return (f"Pavement {result.total_area_m2 * per_m2:,.0f} {units}² "
            f"(new {result.new_area_m2 * per_m2:,.0f} {units}²)")


class MainWindow(QtWidgets.QMainWindow):
    computed = QtCore.Signal()  # the scene and panels show the current layout

    def __init__(self, document: Document, analyze: Analyze | None = None,
                 settings: QtCore.QSettings | None = None, *, analyze_live: Analyze | None = None) -> None:
        """``analyze_live``, when given, is used while a drag previews: a cheaper pass (geometry
        and pavement, findings from the last full pass) so that the drag stays fluid."""
        super().__init__()
        self.document = document
        self._analyze = analyze
        self._analyze_live = analyze_live
        self.settings = settings if settings is not None else QtCore.QSettings("taxiwright", "taxiwright")
        self.result: LayoutResult | None = None
        self.scene: Scene | None = None
        self._fit_pending = True
        self._shown_units = ""
        self.resize(1400, 900)
        self.canvas = PlanCanvas(self)
        self.setCentralWidget(self.canvas)
        self._build_status_bar()
        self.messages = Messages(self, self.status_label)
        self.tools = ToolController(document, self.canvas, self.messages)
        self.files = FileController(document, self.messages, self.settings, self)
        self._build_panels()
        self.actions_ = WindowActions(self)
        self.actions_.build_menus(self, [self.layers_panel, self.properties_panel, self.junction_panel,
                                         self.findings_panel, self.fleet_panel])
        self.actions_.build_tool_bar(self)
        self._connect_actions()
        self._refresh_timer = QtCore.QTimer(self)
        self._refresh_timer.setSingleShot(True)
        self._refresh_timer.setInterval(0)
        self._refresh_timer.timeout.connect(self.refresh_now)
        self._unsubscribe = [document.subscribe(self._on_change),
                             document.subscribe_status(self._update_status)]
        self.canvas.cursor_moved.connect(self._show_cursor)
        self.tools.selection_changed.connect(lambda _selection: self._show_selection())
        dark = bool(self.settings.value("view/dark", False, type=bool))
        self.actions_.dark.blockSignals(True)
        self.actions_.dark.setChecked(dark)
        self.actions_.dark.blockSignals(False)
        self._set_dark(dark)
        install_underlays(self)
        self.refresh_now()
        self._update_status()
        self.messages.hint(self.tools.tool.hint)

    # --- building ------------------------------------------------------------------------------------

    def _build_status_bar(self) -> None:
        bar = self.statusBar()
        bar.setSizeGripEnabled(False)
        box = QtWidgets.QWidget()
        rows = QtWidgets.QVBoxLayout(box)
        rows.setContentsMargins(4, 0, 4, 2)
        top = QtWidgets.QHBoxLayout()
        self.status_label = QtWidgets.QLabel()
        self.coords_label = QtWidgets.QLabel()
        self.coords_label.setMinimumWidth(260)
        self.coords_label.setAlignment(QtCore.Qt.AlignmentFlag.AlignRight)
        self.area_label = QtWidgets.QLabel()
        self.area_label.setToolTip("Pavement of the layout: straights and fillets in total, and the part "
                                   "that is new (outside the existing pavement)")
        top.addWidget(self.status_label, 1)
        top.addWidget(self.area_label)
        top.addWidget(self.coords_label)
        self.caution = QtWidgets.QLabel(CAUTION)
        self.caution.setObjectName("caution")
        self.caution.setWordWrap(True)
        self.caution.setStyleSheet("QLabel#caution { color: #b35c00; font-weight: bold; }")
        rows.addLayout(top)
        rows.addWidget(self.caution)
        bar.addWidget(box, 1)
        self._status_box = box

    def _fix_status_height(self, window_width: int | None = None) -> None:
        """The status bar keeps one height for the window's width: left to itself it grows when a
        message changes (the wrapped caution's height is asked at another width), and the plan
        view would change scale under the pointer."""
        layout = self._status_box.layout()
        if layout is not None:
            # the status bar spans the window less its own few pixels of margin
            width = (window_width if window_width is not None else self.width()) - STATUS_MARGIN_PX
            height = layout.totalHeightForWidth(width)
            self._status_box.setFixedHeight(height)
            self.statusBar().setFixedHeight(height + STATUS_PAD_PX)

    def _build_panels(self) -> None:
        dock = QtCore.Qt.DockWidgetArea
        self.layers_panel = LayersPanel(self)
        self.fleet_panel = FleetPanel(self.edit, self)
        self.properties_panel = PropertiesPanel(self.edit, self)
        self.junction_panel = JunctionPanel(self)
        self.findings_panel = FindingsPanel(self)
        self.addDockWidget(dock.LeftDockWidgetArea, self.layers_panel)
        self.addDockWidget(dock.LeftDockWidgetArea, self.fleet_panel)
        self.addDockWidget(dock.RightDockWidgetArea, self.properties_panel)
        self.addDockWidget(dock.RightDockWidgetArea, self.junction_panel)
        self.addDockWidget(dock.BottomDockWidgetArea, self.findings_panel)
        self.tabifyDockWidget(self.properties_panel, self.junction_panel)
        self.properties_panel.raise_()
        orientation = QtCore.Qt.Orientation
        self.resizeDocks([self.layers_panel, self.properties_panel], [250, 420], orientation.Horizontal)
        self.resizeDocks([self.layers_panel, self.findings_panel], [220, 150], orientation.Vertical)
        self.layers_panel.visibility_changed.connect(self.canvas.set_layer_visible)
        self.findings_panel.finding_activated.connect(self.go_to_finding)
        self.junction_panel.exclusion_toggled.connect(self._set_excluded)
        self.junction_panel.radius_requested.connect(self._ask_turn_radius)
        self.junction_panel.movement_selected.connect(self._show_movement)
        self.fleet_panel.problem.connect(self.messages.warn)

    def _connect_actions(self) -> None:
        a = self.actions_
        a.new.triggered.connect(self.files.new)
        a.open.triggered.connect(lambda: self.files.open())
        a.save.triggered.connect(self.files.save)
        a.save_as.triggered.connect(self.files.save_as)
        a.export_dxf.triggered.connect(lambda: export_from_window(self))
        a.quit.triggered.connect(self.close)
        a.undo.triggered.connect(self.document.undo)
        a.redo.triggered.connect(self.document.redo)
        a.delete.triggered.connect(self.delete_selected)
        a.zoom_fit.triggered.connect(self.zoom_to_fit)
        a.units_ft.triggered.connect(lambda: self.edit("Show in feet", lambda lay: set_units(lay, "ft")))
        a.units_m.triggered.connect(lambda: self.edit("Show in metres", lambda lay: set_units(lay, "m")))
        a.dark.toggled.connect(self._set_dark)
        a.dark.toggled.connect(lambda dark: self.settings.setValue("view/dark", dark))
        a.about.triggered.connect(lambda: self.messages.about("About taxiwright", about.about_html()))
        for key, action in a.tools.items():
            action.triggered.connect(lambda _=False, key=key: self.tools.set_tool(key))
        self.tools.tool_changed.connect(lambda key: a.tools[key].setChecked(True))
        self.files.recent_changed.connect(self._fill_recent_menu)
        self._fill_recent_menu()

    def _fill_recent_menu(self) -> None:
        menu = self.actions_.recent_menu
        menu.clear()
        for path in self.files.recent_files():
            action = menu.addAction(path.name)
            action.setToolTip(str(path))
            action.triggered.connect(lambda _=False, path=path: self.files.open(path))
        menu.setEnabled(not menu.isEmpty())

    # --- document changes ----------------------------------------------------------------------------

    def _on_change(self, change: LayoutChange) -> None:
        if change.reason == "replace":
            self._fit_pending = True
            self.tools.reset()
        self._refresh_timer.start()

    def is_settled(self) -> bool:
        """True when the view shows the current layout (no recompute pending)."""
        return not self._refresh_timer.isActive()

    def refresh_now(self) -> None:
        self._refresh_timer.stop()
        layout = self.document.layout
        self.result = self._run_analysis(layout)
        self.scene = build_scene(layout, self.result, self.scene)
        self.canvas.show_scene(self.scene, draft=self.document.is_previewing)
        if layout.units != self._shown_units:
            self._shown_units = layout.units
            self.canvas.set_units(layout.units)
        (self.actions_.units_ft if layout.units == "ft" else self.actions_.units_m).setChecked(True)
        junctions = self.result.junctions if self.result is not None else {}
        self.tools.junction_points = tuple((j.junction_id, j.point_m) for j in junctions.values())
        self.tools.prune_selection(layout, frozenset(junctions) if self.result is not None else None)
        self._show_selection()
        self.findings_panel.show_findings(self.result.findings if self.result is not None else None)
        self.area_label.setText(pavement_summary(self.result, layout.units))
        self.fleet_panel.show_fleet(layout)
        if self._fit_pending:
            self._fit_pending = False
            self.zoom_to_fit()
        self.computed.emit()

    def _run_analysis(self, layout: Layout) -> LayoutResult | None:
        if self._analyze is None:
            return None
        live = self._analyze_live is not None and self.document.is_previewing
        try:
            return (self._analyze_live if live else self._analyze)(layout)  # type: ignore[misc]
        except Exception as error:
            self.messages.warn(f"The layout could not be analysed: {error}")
            return None

    def _update_status(self) -> None:
        document, a = self.document, self.actions_
        self.setWindowTitle(f"{display_name(document.path)}[*] — taxiwright")
        self.setWindowModified(document.is_dirty)
        stack = document.stack
        a.undo.setText(f"&Undo {stack.undo_label}" if stack.can_undo else "&Undo")
        a.redo.setText(f"&Redo {stack.redo_label}" if stack.can_redo else "&Redo")
        a.undo.setEnabled(stack.can_undo)
        a.redo.setEnabled(stack.can_redo)

    # --- editing -------------------------------------------------------------------------------------

    def edit(self, label: str, build: Callable[[Layout], Layout]) -> bool:
        """Build a new layout from the current one and execute it as one command; a refused edit
        goes to the status line. True if the layout changed."""
        if self.document.is_previewing:
            self.document.cancel_preview()
        before = self.document.layout
        try:
            after = build(before)
        except EditError as error:
            self.messages.warn(str(error))
            return False
        self.document.execute(label, after)
        return self.document.layout is not before

    def delete_selected(self) -> None:
        ids = self.tools.selection.element_ids
        if ids:
            self.edit("Delete", lambda lay: remove_elements(lay, ids))

    def _ask_turn_radius(self, movement: MovementResult | None) -> None:
        if movement is None or movement.corner_key is None:
            return
        units = self.document.layout.units
        current = from_metres(movement.radius_m or 0.0, units)
        radius = self.messages.ask_radius(f"Centerline radius of this corner's turns ({units}); "
                                          f"0 goes back to the default", current)
        if radius is None:
            return
        radius_m = to_metres(radius, units) if radius > 0.0 else None
        label = "Set turn radius" if radius_m else "Default turn radius"
        self.edit(label, lambda lay: set_turn_radius_override(lay, movement.corner_key, radius_m))

    def _set_excluded(self, movement_key: str, excluded: bool) -> None:
        label = "Exclude movement" if excluded else "Include movement"
        self.edit(label, lambda lay: set_movement_excluded(lay, movement_key, excluded))

    # --- selection and view --------------------------------------------------------------------------

    def _show_selection(self) -> None:
        layout, selection = self.document.layout, self.tools.selection
        vertex_xy = None
        if selection.vertex is not None:
            vertex_xy = next((v.xy for c in (*layout.centerlines, *layout.runways)
                              if c.id == selection.vertex[0] for i, v in enumerate(c.vertices)
                              if i == selection.vertex[1]), None)
        self.canvas.overlay.set_selection(selection_xy(layout, selection.element_ids), vertex_xy)
        self.properties_panel.show_selection(layout, selection)
        junctions = self.result.junctions if self.result is not None else {}
        junction = junctions.get(selection.junction_id) if selection.junction_id else None
        if junction is not self.junction_panel.junction:
            self.junction_panel.show_junction(junction, layout.units)

    def _show_movement(self, movement: MovementResult | None) -> None:
        tracks = [] if movement is None else [
            xy for t in movement.tracks for xy in (t.gear_left_edge_xy, t.gear_right_edge_xy)]
        self.canvas.overlay.set_movement(join_pieces(tracks))

    def go_to_finding(self, finding: Finding) -> None:
        alive = element_ids(self.document.layout)
        junctions = self.result.junctions if self.result is not None else {}
        junction_id = next((i for i in finding.element_ids if i in junctions), None)
        self.tools.set_selection(Selection(tuple(i for i in finding.element_ids if i in alive), None,
                                           junction_id))
        self.canvas.zoom_to(*finding.location_m, FINDING_ZOOM_SPAN_M)

    def fit_bounds(self) -> tuple[float, float, float, float] | None:
        """What Zoom to fit shows: the layout, its pavement and the shown underlays."""
        boxes = [layout_bounds(self.document.layout)]
        pavement = self.result.total_pavement if self.result is not None else None
        if pavement is not None and not pavement.is_empty:
            xmin, ymin, xmax, ymax = pavement.bounds
            boxes.append((float(xmin), float(ymin), float(xmax), float(ymax)))
        underlays = self.findChild(UnderlayController)
        if underlays is not None:
            boxes.append(underlays.bounds_m())
        found = [box for box in boxes if box is not None]
        if not found:
            return None
        return (min(b[0] for b in found), min(b[1] for b in found), max(b[2] for b in found),
                max(b[3] for b in found))

    def zoom_to_fit(self) -> None:
        self.canvas.zoom_to_fit(self.fit_bounds())

    def _show_cursor(self, x_m: float, y_m: float) -> None:
        units = self.document.layout.units
        self.coords_label.setText(f"E {from_metres(x_m, units):,.1f} {units}   "
                                  f"N {from_metres(y_m, units):,.1f} {units}")

    def _set_dark(self, dark: bool) -> None:
        self.canvas.set_theme(DARK if dark else LIGHT)

    def resizeEvent(self, event: QtGui.QResizeEvent) -> None:
        super().resizeEvent(event)
        self._fix_status_height(event.size().width())

    # --- closing -------------------------------------------------------------------------------------

    def closeEvent(self, event: QtGui.QCloseEvent) -> None:
        if not self.files.confirm_discard():
            event.ignore()
            return
        for unsubscribe in self._unsubscribe:
            unsubscribe()
        self._unsubscribe = []
        self._refresh_timer.stop()
        self.files.autosave_timer.stop()
        event.accept()
