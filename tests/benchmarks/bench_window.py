"""Figure 4: one drag frame in the desktop program, offscreen, on the main sample layout.

Run by run.py as ``python -m tests.benchmarks.bench_window SAMPLE [--frames N]``; prints one JSON
object. The window is built as the program builds it (app/cli_commands.py), with one
``LayoutAnalyzer`` kept between frames: its full pass, and its live pass while a drag previews.
The dragged vertex is the end of a line at a tee, moved along the through line, so the tee stays
a tee (or, in a layout without tees, a vertex at a crossing, moved along the crossing line). A
frame is timed from the edit (``move_vertex`` and ``Document.preview``) through the recompute
and scene rebuild (``MainWindow.refresh_now``) to a synchronous repaint of the plan view. The
CPU time of each frame is also split: the analysis pass (``analysis_cpu_*``) and the rest, the
window's own work on the scene, the canvas items and the repaint (``ui_cpu_median_ms``).
"""

from __future__ import annotations

import argparse
import json
import math
import os
import statistics
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

from app.model.elements import Layout
from app.model.results import LayoutResult
from tests.benchmarks.layouts import DragTarget, drag_positions_m
from tests.benchmarks.timing import wall_and_cpu

SCREEN_SIZE = (1600, 1000)


def _through_heading_rad(layout: Layout, line_id: str, point: tuple[float, float]) -> float | None:
    """Heading of the piece of centerline ``line_id`` that passes nearest ``point``."""
    for line in layout.centerlines:
        if line.id != line_id:
            continue
        pieces = list(zip(line.vertices, line.vertices[1:], strict=False))
        a, b = min(pieces, key=lambda ab: _distance_to_piece(point, ab[0].xy, ab[1].xy))
        return math.atan2(b.y_m - a.y_m, b.x_m - a.x_m)
    return None


def _distance_to_piece(p: tuple[float, float], a: tuple[float, float], b: tuple[float, float]) -> float:
    ax, ay, bx, by = *a, *b
    length2 = (bx - ax) ** 2 + (by - ay) ** 2
    t = max(0.0, min(1.0, ((p[0] - ax) * (bx - ax) + (p[1] - ay) * (by - ay)) / length2))
    return math.dist(p, (ax + t * (bx - ax), ay + t * (by - ay)))


def sample_drag_target(layout: Layout, result: LayoutResult) -> DragTarget:
    """A centerline vertex that lies on a junction of two lines, dragged along the other line; the
    end of a line at a tee first (by junction id), else a vertex at a crossing."""
    junctions = sorted(result.junctions.values(), key=lambda j: (j.kind != "tee", j.junction_id))
    for junction in junctions:
        for line in layout.centerlines:
            others = [i for i in junction.line_ids if i != line.id]
            if len(others) != 1:
                continue
            for index, vertex in enumerate(line.vertices):
                if math.dist(vertex.xy, junction.point_m) > 1e-6:
                    continue
                heading = _through_heading_rad(layout, others[0], junction.point_m)
                if heading is not None:
                    return DragTarget(line.id, index, vertex.x_m, vertex.y_m, heading)
    raise SystemExit("the layout has no centerline vertex on a junction of two lines to drag")


class _TimedCalls:
    """Wraps the analysis passes given to the window and adds up their CPU time, so that a frame
    splits into the analysis and the UI's own work."""

    def __init__(self) -> None:
        self.cpu_s = 0.0

    def wrap(self, call: Callable[[Layout], LayoutResult]) -> Callable[[Layout], LayoutResult]:
        def timed_call(layout: Layout) -> LayoutResult:
            _, cpu_s, result = wall_and_cpu(lambda: call(layout))
            self.cpu_s += cpu_s
            return result
        return timed_call


class _Breakdown:
    """CPU time of the parts of a frame, printed to stderr (the JSON on stdout stays as it was):
    the scene build, the canvas update (``show_scene``), the rest of ``refresh_now`` less the
    analysis, and the event-loop paint of the changed items."""

    def __init__(self, window: object) -> None:
        import app.ui.main_window as main_window

        self._parts: dict[str, list[float]] = {}
        self._frame: dict[str, float] = {}
        self._last = 0.0
        self._wrap(main_window, "build_scene", "scene")
        self._wrap(window.canvas, "show_scene", "show_scene")  # type: ignore[attr-defined]

    def _wrap(self, owner: object, name: str, part: str) -> None:
        call = getattr(owner, name)

        def timed(*args: object, **kwargs: object) -> object:
            _, cpu_s, result = wall_and_cpu(lambda: call(*args, **kwargs))
            self._frame[part] = self._frame.get(part, 0.0) + cpu_s
            return result
        setattr(owner, name, timed)

    def start(self) -> None:
        self._last = time.process_time()

    def mark(self, part: str) -> None:
        now = time.process_time()
        self._frame[part] = self._frame.get(part, 0.0) + now - self._last
        self._last = now

    def end_frame(self, analysis_s: float) -> None:
        frame = self._frame
        frame["refresh"] -= analysis_s + frame.get("scene", 0.0) + frame.get("show_scene", 0.0)
        for part, seconds in frame.items():
            self._parts.setdefault(part, []).append(1e3 * seconds)
        self._frame = {}

    def report(self) -> None:
        names = {"scene": "build_scene", "show_scene": "show_scene", "refresh": "rest of refresh",
                 "events": "event-loop paint"}
        text = ", ".join(f"{names[part]} {statistics.median(ms):.1f}" for part, ms in self._parts.items())
        print(f"UI part of a frame, CPU ms medians: {text}", file=sys.stderr)


def _paint_counter_class() -> type:
    from PySide6 import QtCore

    class PaintCounter(QtCore.QObject):
        """Counts the paint events of the widget it filters (a frame must paint once at least)."""

        def __init__(self) -> None:
            super().__init__()
            self.count = 0

        def eventFilter(self, watched: QtCore.QObject, event: QtCore.QEvent) -> bool:
            if event.type() == QtCore.QEvent.Type.Paint:
                self.count += 1
            return False

    return PaintCounter


def measure(sample: Path, frames: int) -> dict[str, object]:
    from PySide6 import QtCore, QtWidgets

    from app.fileio.layout_json import load_layout
    from app.model import edits
    from app.model.analysis import LayoutAnalyzer
    from app.model.document import Document
    from app.ui.launch import settle
    from app.ui.main_window import MainWindow

    app = QtWidgets.QApplication.instance() or QtWidgets.QApplication(["taxiwright-benchmark"])
    settings_file = str(Path(tempfile.mkdtemp()) / "settings.ini")
    settings = QtCore.QSettings(settings_file, QtCore.QSettings.Format.IniFormat)
    document = Document(load_layout(sample), sample)
    analyzer = LayoutAnalyzer()
    analysis = _TimedCalls()
    full = analysis.wrap(analyzer.analyze)
    live = getattr(analyzer, "analyze_live", None)  # the cheaper pass the program runs during a drag
    window = (MainWindow(document, full, settings, analyze_live=analysis.wrap(live)) if live is not None
              else MainWindow(document, full, settings))
    window.resize(*SCREEN_SIZE)
    window.show()
    settle(window)
    assert window.result is not None, "the sample layout could not be analysed"
    target = sample_drag_target(document.layout, window.result)
    start = document.layout
    walls, cpus, analysis_cpus = [], [], []
    breakdown = _Breakdown(window)
    paints = _paint_counter_class()()
    window.canvas.viewport().installEventFilter(paints)
    document.begin_preview()
    for x_m, y_m in drag_positions_m(target, frames):
        def frame(x_m: float = x_m, y_m: float = y_m) -> None:
            document.preview(edits.move_vertex(start, target.centerline_id, target.vertex_index, x_m, y_m))
            window.refresh_now()
            breakdown.mark("refresh")
            app.processEvents()
            breakdown.mark("events")
        analysis.cpu_s = 0.0
        breakdown.start()
        wall, cpu, _ = wall_and_cpu(frame)
        walls.append(1e3 * wall)
        cpus.append(1e3 * cpu)
        analysis_cpus.append(1e3 * analysis.cpu_s)
        breakdown.end_frame(analysis.cpu_s)
    document.cancel_preview()
    breakdown.report()
    window.close()
    return {"drag_frame_ms": walls, "drag_frame_cpu_ms": cpus,
            "drag_frame_median_ms": statistics.median(walls),
            "drag_frame_cpu_median_ms": statistics.median(cpus),
            # the frame split in CPU time: the analysis pass, and the rest (scene, items, repaint)
            "analysis_cpu_ms": analysis_cpus,
            "analysis_cpu_median_ms": statistics.median(analysis_cpus),
            "ui_cpu_median_ms": statistics.median(c - a for c, a in zip(cpus, analysis_cpus, strict=True)),
            "paints_per_frame": paints.count / max(frames, 1),
            "dragged": f"{target.centerline_id} vertex {target.vertex_index}"}


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("sample", type=Path)
    parser.add_argument("--frames", type=int, default=10)
    args = parser.parse_args(argv)
    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    os.environ.setdefault("TAXIWRIGHT_STATE_DIR", tempfile.mkdtemp())  # no recovery files of ours elsewhere
    json.dump(measure(args.sample, args.frames), sys.stdout)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
