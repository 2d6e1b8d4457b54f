"""One style drawn as one pre-built path (app/ui/items/shape_item.py)."""

from __future__ import annotations

import numpy as np
import pyqtgraph as pg
import pytest
from PySide6 import QtGui, QtWidgets

from app.model.scene import join_pieces
from app.ui.items.shape_item import ShapeItem, _path_of


def arc(radius_m: float, count: int) -> np.ndarray:
    angles = np.linspace(0.0, np.pi, count)
    return np.column_stack((radius_m * np.cos(angles), radius_m * np.sin(angles)))


def shown(qtbot, parts: tuple[np.ndarray, ...]) -> tuple[pg.PlotWidget, ShapeItem]:  # type: ignore[no-untyped-def]
    widget = pg.PlotWidget()
    qtbot.addWidget(widget)
    widget.resize(600, 400)
    widget.show()
    qtbot.waitExposed(widget)
    item = ShapeItem(filled=False)
    item.set_look(pg.mkPen("k", width=1.0, cosmetic=True), None)
    widget.getViewBox().addItem(item)
    widget.getViewBox().setRange(xRange=(-120.0, 120.0), yRange=(-10.0, 120.0), padding=0.0)
    QtWidgets.QApplication.processEvents()  # the view takes its new range
    item.set_parts(parts)
    return widget, item


def test_a_part_shown_again_keeps_its_drawn_copy_and_a_new_one_is_drawn(qtbot) -> None:  # type: ignore[no-untyped-def]
    first, second = arc(100.0, 2000), arc(50.0, 2000)
    _, item = shown(qtbot, (first, second))
    path = item.path()
    assert path.elementCount() < 400  # common practice, no source: 4,000 points thinned to the screen
    item.set_parts((first.copy(), second.copy()))  # equal points: nothing to redraw
    # check value: identity
    assert item.path() is path
    moved = second + np.array([0.0, 1.0])
    item.set_parts((first, moved))
    # check value: identity
    assert item.path() is not path
    # identity: the copy of the part shown before is kept by identity, the replaced one is gone
    assert item._drawn[id(first)].part is first and id(second) not in item._drawn


def test_the_bounds_hold_the_exact_outline(qtbot) -> None:  # type: ignore[no-untyped-def]
    pieces = (join_pieces([arc(100.0, 3000), arc(20.0, 50) + np.array([0.0, -5.0])]),)
    _, item = shown(qtbot, pieces)
    bounds = item.boundingRect()
    xy = pieces[0][~np.isnan(pieces[0][:, 0])]
    # identity: every exact point lies inside the drawn item's bounds
    assert bounds.left() <= xy[:, 0].min() and xy[:, 0].max() <= bounds.right()
    # check value: identity
    assert bounds.top() <= xy[:, 1].min() and xy[:, 1].max() <= bounds.bottom()
    item.set_parts(())
    # check value: identity
    assert not item.has_content() and item.boundingRect().isEmpty()


def elements(path: QtGui.QPainterPath) -> list[tuple[object, float, float]]:
    found = (path.elementAt(i) for i in range(path.elementCount()))
    return [(element.type, element.x, element.y) for element in found]


@pytest.mark.parametrize("lengths", [(300, 120, 2), (64, 64), (5, 5, 5), (200, 1, 200), (1,)])
def test_a_part_gives_the_elements_pyqtgraph_gives_however_it_is_built(lengths: tuple[int, ...]) -> None:
    rng = np.random.default_rng(3)
    points = rng.random((sum(lengths), 2)) * 1000.0
    connect = np.ones(len(points), dtype=bool)
    connect[np.cumsum(lengths) - 1] = False
    expected = pg.arrayToQPath(np.ascontiguousarray(points[:, 0]), np.ascontiguousarray(points[:, 1]),
                               connect=connect.astype(np.int32), finiteCheck=False)
    # identity: long pieces are added as polygons, short ones and lone points through pyqtgraph
    assert elements(_path_of(points, connect)) == elements(expected)
    # identity: the same fill rule (even-odd: holes stay open)
    assert _path_of(points, connect).fillRule() == expected.fillRule()
