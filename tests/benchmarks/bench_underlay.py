"""Loading a large base drawing: read time, memory, and the time to draw it.

A fictional 20,000-entity drawing is made with ezdxf (lines, bulged closed polylines, arcs,
circles, texts and hatches on 24 layers) and read with ``read_base_drawing``. Printed: ezdxf's
own parse time, our whole read (parse + flattening to metres), the peak memory Python allocated
during the read (tracemalloc), the process's peak RSS, and the time to build the batched plot
items (one curve per layer) and render the view once offscreen. Run with
``python -m tests.benchmarks.bench_underlay [entities]``.
"""

from __future__ import annotations

import os
import random
import sys
import tempfile
import tracemalloc
from pathlib import Path

import ezdxf

from app.fileio.underlay_dxf import read_base_drawing
from tests.benchmarks.timing import peak_rss_mb, wall_and_cpu

ENTITIES = 20_000
LAYERS = 24
FIELD_SIZE = 3000.0  # metres: a fictional airfield's extent


def make_base_drawing(path: Path, count: int, seed: int = 9) -> None:
    rng = random.Random(seed)
    doc = ezdxf.new("R2018")
    doc.header["$INSUNITS"] = 6
    msp = doc.modelspace()
    for index in range(count):
        attribs = {"layer": f"L{index % LAYERS:02d}"}
        x, y = rng.uniform(0, FIELD_SIZE), rng.uniform(0, FIELD_SIZE)
        kind = index % 20
        if kind < 8:
            msp.add_line((x, y), (x + rng.uniform(-50, 50), y + rng.uniform(-50, 50)), dxfattribs=attribs)
        elif kind < 12:
            w, h = rng.uniform(5, 60), rng.uniform(5, 60)
            msp.add_lwpolyline([(x, y, 0), (x + w, y, 0.4), (x + w, y + h, 0), (x, y + h, 0)], format="xyb",
                               close=True, dxfattribs=attribs)
        elif kind < 15:
            msp.add_arc((x, y), rng.uniform(5, 150), rng.uniform(0, 360), rng.uniform(0, 360),
                        dxfattribs=attribs)
        elif kind < 17:
            msp.add_circle((x, y), rng.uniform(1, 20), dxfattribs=attribs)
        elif kind < 19:
            msp.add_text("LABEL", dxfattribs={**attribs, "insert": (x, y), "height": 2.0})
        else:
            hatch = msp.add_hatch(dxfattribs=attribs)
            corners = [(x, y), (x + 30, y), (x + 30, y + 20), (x, y + 20)]
            hatch.paths.add_polyline_path(corners, is_closed=True)
    doc.saveas(path)


def draw_seconds(drawing: object) -> tuple[float, float]:
    """(seconds to build the plot items, seconds to render the view once), offscreen."""
    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    import pyqtgraph as pg
    from PySide6 import QtWidgets

    from app.ui.underlay_items import UnderlayGraphics

    _app = QtWidgets.QApplication.instance() or QtWidgets.QApplication([])
    widget = pg.PlotWidget()
    widget.resize(1400, 900)
    build, _cpu, _graphics = wall_and_cpu(lambda: UnderlayGraphics(widget.getViewBox(), drawing))  # type: ignore[arg-type]
    widget.getViewBox().setRange(xRange=(0, FIELD_SIZE), yRange=(0, FIELD_SIZE))
    render, _cpu, _image = wall_and_cpu(widget.grab)
    return build, render


def main(count: int) -> None:
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "base.dxf"
        make_base_drawing(path, count)
        size_mb = path.stat().st_size / 2**20
        parse_wall, parse_cpu, _doc = wall_and_cpu(lambda: ezdxf.readfile(path))
        read_wall, read_cpu, drawing = wall_and_cpu(lambda: read_base_drawing(path))
        tracemalloc.start()
        read_base_drawing(path)
        _current, traced_peak = tracemalloc.get_traced_memory()
        tracemalloc.stop()
    points = sum(len(layer.polylines) for layer in drawing.layers.values())
    print(f"base drawing: {count:,} entities, {len(drawing.layers)} layers, {size_mb:.1f} MiB DXF, "
          f"{points:,} points after flattening at 0.05 m")
    print(f"ezdxf parse alone:         {parse_wall:6.2f} s wall  {parse_cpu:6.2f} s CPU")
    print(f"read_base_drawing (all):   {read_wall:6.2f} s wall  {read_cpu:6.2f} s CPU")
    print(f"peak Python allocation during one read (tracemalloc): {traced_peak / 2**20:.0f} MiB")
    kept = sum(layer.polylines.nbytes for layer in drawing.layers.values())
    print(f"linework kept: {kept / 2**20:.1f} MiB")
    build, render = draw_seconds(drawing)
    print(f"plot items built in {build * 1000:.0f} ms ({len(drawing.layers)} curves); "
          f"one offscreen render of the whole field {render * 1000:.0f} ms")
    print(f"peak RSS of this process: {peak_rss_mb():.0f} MiB")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else ENTITIES)
