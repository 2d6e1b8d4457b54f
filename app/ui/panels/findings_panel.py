"""Findings of the design checks in a table, sortable by severity; activating a row asks the
window to select what the finding concerns and zoom to it."""

from __future__ import annotations

from PySide6 import QtCore, QtWidgets

from geometry.findings import Finding, Severity

COLUMNS = ("Severity", "Code", "Finding", "Concerns", "Source")
SEVERITY_NAMES = {Severity.ERROR: "Error", Severity.WARNING: "Warning", Severity.INFO: "Note"}
SORT_ROLE = QtCore.Qt.ItemDataRole.UserRole
INDEX_ROLE = QtCore.Qt.ItemDataRole.UserRole + 1


class _SortableItem(QtWidgets.QTableWidgetItem):
    """Sorts by the number in SORT_ROLE (severity) rather than by its text."""

    def __lt__(self, other: QtWidgets.QTableWidgetItem) -> bool:
        mine, theirs = self.data(SORT_ROLE), other.data(SORT_ROLE)
        if mine is None or theirs is None:
            return super().__lt__(other)
        return bool(mine < theirs)


class FindingsPanel(QtWidgets.QDockWidget):
    finding_activated = QtCore.Signal(object)  # Finding

    def __init__(self, parent: QtWidgets.QWidget | None = None) -> None:
        super().__init__("Findings", parent)
        self.setObjectName("findings")
        self.table = QtWidgets.QTableWidget(0, len(COLUMNS))
        self.table.setHorizontalHeaderLabels(COLUMNS)
        self.table.verticalHeader().setVisible(False)
        self.table.setSelectionBehavior(QtWidgets.QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setEditTriggers(QtWidgets.QAbstractItemView.EditTrigger.NoEditTriggers)
        self.table.horizontalHeader().setStretchLastSection(True)
        self.table.setSortingEnabled(True)
        self.summary = QtWidgets.QLabel("No findings yet: the checks run once the layout is analysed.")
        body = QtWidgets.QWidget()
        layout = QtWidgets.QVBoxLayout(body)
        layout.addWidget(self.summary)
        layout.addWidget(self.table)
        self.setWidget(body)
        self._findings: tuple[Finding, ...] = ()
        self.table.cellClicked.connect(self._on_clicked)

    @property
    def findings(self) -> tuple[Finding, ...]:
        return self._findings

    def show_findings(self, findings: tuple[Finding, ...] | None) -> None:
        if findings is not None and findings == self._findings and self.table.rowCount() == len(findings):
            return
        self._findings = findings or ()
        self.table.setSortingEnabled(False)
        self.table.setRowCount(len(self._findings))
        for row, finding in enumerate(self._findings):
            texts = (SEVERITY_NAMES[finding.severity], finding.code, finding.message,
                     ", ".join(finding.element_ids), f"{finding.rule}: {finding.source}")
            for column, text in enumerate(texts):
                item = _SortableItem(text)
                item.setData(INDEX_ROLE, row)
                if column == 0:
                    item.setData(SORT_ROLE, int(finding.severity))
                item.setToolTip(finding.message if column != 4 else text)
                self.table.setItem(row, column, item)
        self.table.setSortingEnabled(True)
        self.table.sortItems(0, QtCore.Qt.SortOrder.DescendingOrder)
        self.table.resizeColumnsToContents()
        counts = {name: sum(1 for f in self._findings if f.severity == severity)
                  for severity, name in SEVERITY_NAMES.items()}
        self.summary.setText(", ".join(f"{count} {name.lower()}{'s' if count != 1 else ''}"
                                       for name, count in counts.items()) if findings is not None else
                             "No findings yet: the checks run once the layout is analysed.")

    def finding_at_row(self, row: int) -> Finding:
        return self._findings[int(self.table.item(row, 0).data(INDEX_ROLE))]

    def _on_clicked(self, row: int, _column: int) -> None:
        self.finding_activated.emit(self.finding_at_row(row))
