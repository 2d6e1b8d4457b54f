"""taxiwright's benchmark suite: ``python tests/benchmarks/run.py [--json FILE] [--quick]``.

Prints a table of the figures of issue 7 (docs/performance.md) and, with ``--json``, writes them.
The solver comparison runs here; each layout size, the drag frame in the window and the start-up
run in processes of their own (bench_layouts.py, bench_window.py, the ``taxiwright`` command), so
one cannot warm the caches or the memory peak of another. ``--quick`` is a smoke run on tiny
layouts: its numbers say nothing about speed.

A figure that cannot be measured (a module another engineer is still writing) is written as
null, and ``not_available`` says why. Times are wall-clock; the ``details`` also give the CPU
time of the measuring process, which other work on a shared machine disturbs less.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import platform
import shutil
import statistics
import subprocess
import sys
import tempfile
from dataclasses import asdict, dataclass
from pathlib import Path

REPOSITORY = Path(__file__).resolve().parents[2]
if str(REPOSITORY) not in sys.path:  # run as a script: make ``tests.benchmarks`` importable
    sys.path.insert(0, str(REPOSITORY))

from tests.benchmarks.bench_solver import measure_solver  # noqa: E402
from tests.benchmarks.timing import timed  # noqa: E402

MAIN_SAMPLE = REPOSITORY / "sample_layouts" / "marrowby_field.json"
SAMPLE_SCRIPT = REPOSITORY / "docs" / "scripts" / "make_samples.py"
TARGETS = {"solver_speedup_vs_scipy": ">= 50", "incremental_median_ms": "< 8 each",
           "incremental_growth_ratio": "<= 1.5", "drag_frame_median_ms": "< 16.7"}
KEYS = ("solver_speedup_vs_scipy", "solver_max_error_ft", "incremental_median_ms", "incremental_growth_ratio",
        "full_per_junction_ratio", "drag_frame_median_ms", "dxf_export_s", "startup_s", "peak_rss_mb")
# Reported beside the figures: the pass the window runs while a drag previews (no checks).
EXTRA_KEYS = ("live_drag_median_ms",)


@dataclass(frozen=True, slots=True)
class Plan:
    sizes: tuple[int, ...]
    full_repeats: tuple[int, ...]  # per size
    frames: int
    dxf_repeats: int
    solver_rounds: int
    startup_repeats: int
    main_sample: bool  # False: the window figures use a small generated grid (a smoke run)


FULL = Plan((10, 100, 1000), (5, 3, 1), 15, 1, 7, 3, True)
QUICK = Plan((1, 2), (1, 1), 3, 1, 2, 1, False)


def _environment() -> dict[str, str]:
    env = dict(os.environ, QT_QPA_PLATFORM="offscreen", TAXIWRIGHT_STATE_DIR=tempfile.mkdtemp())
    env["PYTHONPATH"] = os.pathsep.join(filter(None, (str(REPOSITORY), env.get("PYTHONPATH"))))
    return env


def _run_json(arguments: list[str]) -> dict[str, object]:
    """Run a benchmark module in a fresh interpreter; its stdout is one JSON object."""
    done = subprocess.run([sys.executable, "-m", *arguments], cwd=REPOSITORY, env=_environment(),
                          capture_output=True, text=True, check=False)
    if done.returncode != 0:
        raise RuntimeError(f"{arguments[0]} failed: {done.stderr.strip().splitlines()[-1:]}")
    return dict(json.loads(done.stdout))


def _main_sample(folder: Path) -> tuple[Path | None, str]:
    """The main sample, or one built by its script into ``folder`` when the file is not there yet."""
    if MAIN_SAMPLE.exists():
        return MAIN_SAMPLE, str(MAIN_SAMPLE.relative_to(REPOSITORY))
    done = subprocess.run([sys.executable, str(SAMPLE_SCRIPT), "--out", str(folder)], cwd=REPOSITORY,
                          env=_environment(), capture_output=True, text=True, check=False)
    built = folder / MAIN_SAMPLE.name
    if done.returncode == 0 and built.exists():
        return built, f"built by {SAMPLE_SCRIPT.relative_to(REPOSITORY)} (sample_layouts/ has no copy yet)"
    return None, f"{MAIN_SAMPLE.relative_to(REPOSITORY)} is missing and its script failed"


def _startup_seconds(sample: Path, repeats: int) -> float:
    command = shutil.which("taxiwright")
    program = [command] if command else [sys.executable, "-m", "app.cli"]
    seconds = []
    with tempfile.TemporaryDirectory() as folder:
        picture = Path(folder) / "x.png"
        for _ in range(repeats):
            wall, done = timed(lambda: subprocess.run(
                [*program, "open", str(sample), "--screenshot", str(picture)], cwd=REPOSITORY,
                env=_environment(), capture_output=True, text=True, check=False))
            if done.returncode != 0 or not picture.exists():
                raise RuntimeError(f"taxiwright open failed: {done.stderr.strip().splitlines()[-1:]}")
            seconds.append(wall)
    return statistics.median(seconds)


Figures = dict[str, object]


def _layouts(plan: Plan, figures: Figures, missing: dict[str, str], details: Figures) -> None:
    runs = []
    for size, repeats in zip(plan.sizes, plan.full_repeats, strict=True):
        dxf = plan.dxf_repeats if size == plan.sizes[-1] else 0
        runs.append(_run_json(["tests.benchmarks.bench_layouts", str(size), "--full-repeats", str(repeats),
                               "--frames", str(plan.frames), "--dxf-repeats", str(dxf)]))
    details["layouts"] = runs
    small, large = runs[0], runs[-1]
    figures["incremental_median_ms"] = {str(r["size"]): r["incremental_median_ms"] for r in runs}
    figures["live_drag_median_ms"] = {str(r["size"]): r.get("live_drag_median_ms") for r in runs}
    figures["incremental_growth_ratio"] = _ratio(large["incremental_median_ms"],
                                                 small["incremental_median_ms"])
    figures["full_per_junction_ratio"] = _ratio(large["per_junction_ms"], small["per_junction_ms"])
    figures["peak_rss_mb"] = large["peak_rss_mb"]
    figures["dxf_export_s"] = large.get("dxf_export_s")
    if figures["dxf_export_s"] is None:
        missing["dxf_export_s"] = str(large.get("dxf_error", "not measured"))


def _ratio(numerator: object, denominator: object) -> float:
    return float(numerator) / float(denominator)  # type: ignore[arg-type]


def _small_grid(folder: Path) -> tuple[Path | None, str]:
    from app.fileio.layout_json import save_layout
    from tests.benchmarks.layouts import grid_layout

    path = folder / "grid_2.json"
    save_layout(grid_layout(2), path)
    return path, "a generated grid of 2 crossings (--quick)"


def _window(plan: Plan, figures: Figures, missing: dict[str, str], details: Figures) -> None:
    with tempfile.TemporaryDirectory() as folder:
        sample, source = (_main_sample if plan.main_sample else _small_grid)(Path(folder))
        details["main_sample"] = source
        if sample is None:
            missing["drag_frame_median_ms"] = missing["startup_s"] = source
            figures["drag_frame_median_ms"] = figures["startup_s"] = None
            return
        for key, measure in (("drag_frame_median_ms", lambda: _run_json(
                ["tests.benchmarks.bench_window", str(sample), "--frames", str(plan.frames)])),
                ("startup_s", lambda: {"startup_s": _startup_seconds(sample, plan.startup_repeats)})):
            try:
                result = measure()
            except (RuntimeError, ValueError) as error:  # the desktop program is being written too
                figures[key], missing[key] = None, str(error)
                continue
            details[key] = result
            figures[key] = result[key]


def machine() -> dict[str, object]:
    import numpy
    import scipy
    import shapely

    model = next((line.split(":", 1)[1].strip() for line in Path("/proc/cpuinfo").read_text().splitlines()
                  if line.startswith("model name")), platform.processor()) if Path("/proc/cpuinfo").exists() \
        else platform.processor()
    return {"cpus": os.cpu_count(), "cpu_model": model, "python": platform.python_version(),
            "numpy": numpy.__version__, "scipy": scipy.__version__, "shapely": shapely.__version__,
            "load_average_at_start": os.getloadavg()}


def run(plan: Plan) -> dict[str, object]:
    figures: dict[str, object] = {}
    missing: dict[str, str] = {}
    details: dict[str, object] = {"machine": machine()}
    solver = measure_solver(plan.solver_rounds, 20)
    details["solver"] = asdict(solver)
    figures["solver_speedup_vs_scipy"] = solver.speedup_vs_scipy
    figures["solver_max_error_ft"] = solver.max_error_ft
    _layouts(plan, figures, missing, details)
    _window(plan, figures, missing, details)
    details["load_average_at_end"] = os.getloadavg()
    return {**{key: figures.get(key) for key in (*KEYS, *EXTRA_KEYS)}, "not_available": missing,
            "details": details}


def _shown(value: object) -> str:
    if isinstance(value, dict):
        return ", ".join(f"{k}: {_shown(v)}" for k, v in value.items())
    if isinstance(value, float) and math.isfinite(value):
        return f"{value:.4g}"
    return "n/a" if value is None else str(value)


def print_table(report: dict[str, object]) -> None:
    missing = report["not_available"]
    assert isinstance(missing, dict)
    print(f"{'figure':28} {'value':44} target")
    for key in (*KEYS, *EXTRA_KEYS):
        print(f"{key:28} {_shown(report[key]):44} {TARGETS.get(key, '')}")
    for key, reason in missing.items():
        print(f"  {key} not available: {reason}")


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="taxiwright benchmarks (docs/performance.md)")
    parser.add_argument("--json", type=Path, metavar="FILE", help="also write the figures to FILE")
    parser.add_argument("--quick", action="store_true", help="a fast smoke run on tiny layouts")
    args = parser.parse_args(argv)
    report = run(QUICK if args.quick else FULL)
    print_table(report)
    if args.json is not None:
        args.json.write_text(json.dumps(report, indent=2) + "\n")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
