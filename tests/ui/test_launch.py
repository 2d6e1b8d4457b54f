"""The command-line hook: open a layout and save a picture of the window, offscreen."""

from __future__ import annotations

from pathlib import Path

from PySide6 import QtGui

from app.fileio.layout_json import save_layout
from app.ui.launch import SCREENSHOT_SIZE, run
from tests.ui.conftest import demo_layout
from tests.ui.synthetic import synthetic_result


def test_screenshot_of_a_layout(tmp_path: Path, qapp) -> None:  # type: ignore[no-untyped-def]
    layout_path, picture = tmp_path / "field.json", tmp_path / "field.png"
    save_layout(demo_layout(), layout_path)
    assert run(str(layout_path), str(picture), analyze=synthetic_result) == 0
    image = QtGui.QImage(str(picture))
    assert (image.width(), image.height()) == SCREENSHOT_SIZE
    colours = {image.pixel(x, y) for x in range(0, image.width(), 37) for y in range(0, image.height(), 41)}
    assert len(colours) > 20  # a drawn window, not a blank one


def test_a_layout_that_cannot_be_read_exits_with_status_2(tmp_path: Path, qapp, capsys) -> None:  # type: ignore[no-untyped-def]
    missing = tmp_path / "missing.json"
    assert run(str(missing), str(tmp_path / "x.png")) == 2
    assert "cannot open" in capsys.readouterr().err
    assert not (tmp_path / "x.png").exists()
