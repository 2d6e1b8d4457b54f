"""Exporting with and without the base drawing (issue 9: the export does not repeat it unless asked)."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import ezdxf

from app.fileio.dxf_export import export_dxf
from app.model.underlays import Underlay
from tests.app.dxf_fixtures import sample_layout, sample_result


def _base_drawing(folder: Path) -> Path:
    doc = ezdxf.new("R2018")
    doc.header["$INSUNITS"] = 2  # feet
    doc.layers.add("SURVEY-EDGE")
    doc.modelspace().add_line((0, 0), (100, 0), dxfattribs={"layer": "SURVEY-EDGE"})
    path = folder / "base.dxf"
    doc.saveas(path)
    return path


def _layers(path: Path) -> set[str]:
    return {entity.dxf.layer for entity in ezdxf.readfile(path).modelspace()}


def test_base_drawing_is_exported_only_when_asked(tmp_path: Path) -> None:
    base = _base_drawing(tmp_path)
    layout = replace(sample_layout("ft"),
                     underlays=(Underlay("und-1", "survey", "drawing", str(base)),))
    without = tmp_path / "plain.dxf"
    export_dxf(layout, sample_result(), without)
    assert not any(name.startswith("UNDERLAY") for name in _layers(without))
    with_base = tmp_path / "with_base.dxf"
    summary = export_dxf(layout, sample_result(), with_base, include_underlays=True)
    assert any(name.startswith("UNDERLAY") and "SURVEY-EDGE" in name for name in _layers(with_base))
    assert not summary.warnings or all("left out" not in w for w in summary.warnings)
    auditor = ezdxf.readfile(with_base).audit()
    assert not auditor.has_errors
