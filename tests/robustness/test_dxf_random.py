"""DXF export of random layouts (app/fileio/dxf_export.py): every file passes ezdxf's audit and
reads in GDAL's DXF driver (pyogrio), an independent reader (shared/REFERENCES.md section 5).

The layouts are the random sketches of test_degenerate_geometry.py (their analysis included),
with names and notes of any text, since titles, names and designations reach DXF TEXT and MTEXT.
Expected values are identities of the exporter's documentation (docs/dxf.md) unless marked.
"""

from __future__ import annotations

import math
from dataclasses import replace
from pathlib import Path

import ezdxf
import numpy as np
import pyogrio
import pytest
import shapely
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from app.fileio.dxf_export import export_dxf
from app.model.analysis import analyze
from app.model.elements import Layout
from tests.robustness.test_degenerate_geometry import REVERSAL_WARNINGS, apply_steps, sketches

# Text a planner can type or paste: DXF control codes (%%c, \P, {, ^J), quotes, non-Latin letters,
# control characters and long words.
awkward_text = st.text(st.characters(codec="utf-8"), max_size=30) | st.sampled_from(
    ["%%c%%d%%p", "\\P{\\fArial;x}^J^I", "Line one\nline two\r\n\ttab", "Ünïcödé Ωμέγα 機場", "\x00\x07",
     "W" * 300, ""])


def with_awkward_names(layout: Layout, title: str, notes: str, name: str) -> Layout:
    return replace(layout, title=title, notes=notes,
                   centerlines=tuple(replace(c, name=name) for c in layout.centerlines),
                   runways=tuple(replace(r, designation=name) for r in layout.runways),
                   objects=tuple(replace(o, name=name) for o in layout.objects))


@pytest.fixture(scope="module")
def folder(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return tmp_path_factory.mktemp("dxf-random")


@pytest.mark.filterwarnings(*REVERSAL_WARNINGS)
@settings(max_examples=10, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(sketches(), awkward_text, awkward_text, awkward_text)
def test_random_layouts_export_to_a_file_both_readers_accept(folder: Path, sketch: tuple[Layout, list],
                                                             title: str, notes: str, name: str) -> None:
    layout = with_awkward_names(apply_steps(*sketch), title, notes, name)
    path = folder / "random.dxf"
    summary = export_dxf(layout, analyze(layout), path)

    doc = ezdxf.readfile(path)
    auditor = doc.audit()
    assert not auditor.has_errors, [str(error) for error in auditor.errors]
    assert doc.header["$INSUNITS"] == {"ft": 2, "m": 6}[layout.units]  # DXF reference, $INSUNITS codes
    for entity in doc.modelspace():
        points = entity_points(entity)
        assert np.all(np.isfinite(points)), (entity.dxftype(), entity.dxf.layer)

    _meta, _fids, geometries, fields = pyogrio.raw.read(path, sql="SELECT Layer FROM entities")
    # identity: what was written, and "Defpoints", where DXF puts the definition points of dimensions
    assert len(geometries) > 0 and set(fields[0]) <= {*summary.layers, "Defpoints"}
    for wkb in geometries:
        if wkb is not None:
            assert np.all(np.isfinite(shapely.get_coordinates(shapely.from_wkb(wkb))))


def entity_points(entity: ezdxf.entities.DXFGraphic) -> np.ndarray:
    """The coordinates an entity stores (vertices, centres, insertion points), as (n, 2)."""
    kind = entity.dxftype()
    if kind == "LWPOLYLINE":
        return np.asarray([(x, y) for x, y, *_ in entity.get_points()], dtype=float).reshape(-1, 2)
    if kind == "HATCH":
        rows = [vertex[:2] for path in entity.paths for vertex in getattr(path, "vertices", ())]
        return np.asarray(rows, dtype=float).reshape(-1, 2)
    def attribute(key: str) -> object:
        return entity.dxf.get(key) if entity.dxf.is_supported(key) else None

    found = [attribute(key) for key in ("center", "insert", "start", "end", "defpoint")]
    values = [(v[0], v[1]) for v in found if v is not None]  # type: ignore[index]
    values += [(number, 0.0) for number in map(attribute, ("radius", "height", "char_height", "width"))
               if isinstance(number, float)]
    return np.asarray(values, dtype=float).reshape(-1, 2)


def test_entity_points_sees_a_non_finite_coordinate() -> None:
    """The finiteness check above could not fail if entity_points read nothing."""
    doc = ezdxf.new("R2018")
    line = doc.modelspace().add_lwpolyline([(0.0, 0.0), (math.nan, 1.0)])
    circle = doc.modelspace().add_circle((1.0, 2.0), math.inf)
    assert not np.all(np.isfinite(entity_points(line))) and not np.all(np.isfinite(entity_points(circle)))
