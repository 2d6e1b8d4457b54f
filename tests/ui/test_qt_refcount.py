"""Guard against the PySide6 6.12.0 / Python 3.11 bug (shared/ECOSYSTEM.md): each Qt call that
returns nothing dropped one reference to None (signals: to True) until the interpreter aborted."""

from __future__ import annotations

import sys

from PySide6 import QtWidgets


def test_void_qt_calls_keep_their_reference_to_none(qapp: QtWidgets.QApplication) -> None:
    item = QtWidgets.QGraphicsRectItem(0.0, 0.0, 1.0, 1.0)
    before = sys.getrefcount(None)
    for _ in range(1000):
        item.update()
    assert sys.getrefcount(None) >= before


def test_signals_with_true_keep_their_reference_to_true(qapp: QtWidgets.QApplication) -> None:
    box = QtWidgets.QCheckBox()
    seen: list[bool] = []
    box.toggled.connect(seen.append)
    before = sys.getrefcount(True)
    for index in range(1000):
        box.setChecked(index % 2 == 0)
    seen.clear()
    assert sys.getrefcount(True) >= before
