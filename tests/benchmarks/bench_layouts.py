"""Figures 2, 3, 5 (DXF) and 6: one generated grid layout, measured in a process of its own.

Run by run.py as ``python -m tests.benchmarks.bench_layouts SIZE [options]``; prints one JSON
object. In order: a warm-up analysis of a one-crossing grid (imports and the per-aircraft steering
radii, which every later analysis reuses, are paid there), ``--full-repeats`` full recomputations
of the SIZE-crossing grid with a fresh ``LayoutAnalyzer`` each, the peak resident memory after
them, a drag of ``--frames`` frames with the last (warm) analyzer, each frame timed from
``move_vertex`` to the returned result (the full pass, then the live pass the window runs during
a drag), and with ``--dxf-repeats`` the DXF export of the full result.
"""

from __future__ import annotations

import argparse
import json
import math
import statistics
import sys
import tempfile
from dataclasses import replace
from pathlib import Path

from app.model import edits
from app.model.analysis import LayoutAnalyzer
from app.model.elements import Layout
from app.model.results import LayoutResult
from tests.benchmarks.layouts import drag_positions_m, drag_target, grid_layout
from tests.benchmarks.timing import peak_rss_mb, timed, wall_and_cpu


def _full(layout: Layout, repeats: int) -> tuple[dict[str, object], LayoutAnalyzer, LayoutResult]:
    walls, cpus = [], []
    analyzer, result = LayoutAnalyzer(), None
    for _ in range(repeats):
        analyzer = LayoutAnalyzer()
        wall, cpu, result = wall_and_cpu(lambda analyzer=analyzer: analyzer.analyze(layout))
        walls.append(wall)
        cpus.append(cpu)
    assert result is not None
    junctions = len(result.junctions)
    figures = {"junctions": junctions, "full_s": walls, "full_cpu_s": cpus,
               "full_median_s": statistics.median(walls),
               "per_junction_ms": 1e3 * statistics.median(walls) / junctions,
               "per_junction_cpu_ms": 1e3 * statistics.median(cpus) / junctions,
               "findings": len(result.findings)}
    return figures, analyzer, result


def _drag(layout: Layout, size: int, analyzer: LayoutAnalyzer, frames: int, *, live: bool = False,
          prefix: str = "incremental") -> dict[str, object]:
    """Frames of a drag, each from ``move_vertex`` to the returned result. ``live``: the pass the
    window runs while a drag previews (``analyze_live``: no design checks), dragged the other way
    so that no frame is answered from the cache of the full pass."""
    target = drag_target(size)
    if live:
        target = replace(target, heading_rad=target.heading_rad + math.pi)
    walls, cpus, recomputed = [], [], []
    for x_m, y_m in drag_positions_m(target, frames):
        def frame(x_m: float = x_m, y_m: float = y_m) -> LayoutResult:
            moved = edits.move_vertex(layout, target.centerline_id, target.vertex_index, x_m, y_m)
            return analyzer.analyze_live(moved) if live else analyzer.analyze(moved)
        wall, cpu, _ = wall_and_cpu(frame)
        walls.append(1e3 * wall)
        cpus.append(1e3 * cpu)
        recomputed.append(analyzer.last_recomputed_junctions)
    return {f"{prefix}_ms": walls, f"{prefix}_cpu_ms": cpus, f"{prefix}_median_ms": statistics.median(walls),
            f"{prefix}_cpu_median_ms": statistics.median(cpus), f"{prefix}_recomputed_junctions": recomputed}


def _dxf(layout: Layout, result: LayoutResult, repeats: int) -> dict[str, object]:
    try:  # the exporter is being written by another engineer: a broken import is reported, not fatal
        from app.fileio.dxf_export import export_dxf
    except ImportError as error:
        return {"dxf_export_s": None, "dxf_error": f"app.fileio.dxf_export does not import: {error}"}
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "grid.dxf"
        seconds = [timed(lambda: export_dxf(layout, result, path))[0] for _ in range(repeats)]
        size_mb = path.stat().st_size / 1e6
    return {"dxf_export_s": statistics.median(seconds), "dxf_size_mb": size_mb}


def measure(size: int, full_repeats: int, frames: int, dxf_repeats: int) -> dict[str, object]:
    LayoutAnalyzer().analyze(grid_layout(1))  # warm-up, see the module notes
    layout = grid_layout(size)
    figures: dict[str, object] = {"size": size}
    full, analyzer, result = _full(layout, full_repeats)
    figures.update(full)
    figures["peak_rss_mb"] = peak_rss_mb()
    figures.update(_drag(layout, size, analyzer, frames))
    if hasattr(analyzer, "analyze_live"):
        figures.update(_drag(layout, size, analyzer, frames, live=True, prefix="live_drag"))
    if dxf_repeats > 0:
        figures.update(_dxf(layout, result, dxf_repeats))
    return figures


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("size", type=int, help="number of crossings of the grid")
    parser.add_argument("--full-repeats", type=int, default=1)
    parser.add_argument("--frames", type=int, default=10)
    parser.add_argument("--dxf-repeats", type=int, default=0, help="0: no DXF export")
    args = parser.parse_args(argv)
    json.dump(measure(args.size, args.full_repeats, args.frames, args.dxf_repeats), sys.stdout)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
