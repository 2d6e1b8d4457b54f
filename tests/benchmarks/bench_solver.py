"""Figure 1: the swept-path solver against scipy's DOP853 on the same 180-degree turn.

The reference is the independent integrator of tests/geometry/scipy_reference.py (the pursuit
equation in plan coordinates of the main gear, restarted at every segment end), run at
rtol = atol = 1e-10 and asked for the main gear at exactly our stations. It computes the main-gear
track and nothing else, so the headline figure compares it with what computes the same thing:

* ``speedup_vs_scipy``: ``geometry.sweep.main_gear_track`` (the main gear alone, at the same
  stations; like with like);
* ``sweep_speedup_vs_scipy``: ``geometry.sweep.sweep`` as the layout analysis calls it (every
  tracked point and the steering angle; the lateral offsets are measured on first use, which the
  analysis never asks for);
* ``sweep_with_offsets_speedup_vs_scipy``: the same sweep with its offsets read as well.

All are timed in alternation, round after round, and each speed ratio is the median of the
per-round ratios, so all see the same load on a shared machine. Wall times, and beside them the
CPU times of this process (steadier when others share the machine).
"""

from __future__ import annotations

import contextlib
import math
import statistics
from collections.abc import Callable, Iterator
from dataclasses import dataclass

import numpy as np

from geometry.aircraft import DesignAircraft
from geometry.path import CenterlinePath, standard_turn_path
from geometry.sweep import main_gear_track, sweep
from geometry.theoretical import theoretical_airplane
from geometry.units import from_metres, to_metres
from tests.benchmarks.timing import wall_and_cpu
from tests.geometry import scipy_reference

SCIPY_TOLERANCE = 1e-10
# A 150 ft radius is Horonjeff's Example 6-3 radius; the leads are those the layout analysis uses
# (1.5 CMG in, 8 CMG out, app/model/junction_analysis.py) for the TDG-5 airplane's 100 ft CMG.
TURN_RADIUS_FT, LEAD_IN_FT, LEAD_OUT_FT = 150.0, 150.0, 800.0


@dataclass(frozen=True, slots=True)
class SolverFigures:
    speedup_vs_scipy: float     # median over rounds of scipy time / main_gear_track time (like with like)
    max_error_ft: float         # largest main-gear position difference, ours vs scipy
    ours_ms: float              # median time of one main_gear_track
    scipy_ms: float             # median time of one reference integration
    stations: int
    sweep_speedup_vs_scipy: float               # the same for sweep() (every track, steering)
    sweep_ms: float
    sweep_with_offsets_speedup_vs_scipy: float  # sweep() and its three lateral offsets
    sweep_with_offsets_ms: float
    cpu_ms: dict[str, float]                    # median CPU time of one call of each, same rounds


def turn_path() -> CenterlinePath:
    return standard_turn_path(to_metres(TURN_RADIUS_FT, "ft"), math.pi, to_metres(LEAD_IN_FT, "ft"),
                              to_metres(LEAD_OUT_FT, "ft"))


@contextlib.contextmanager
def _reference_tolerance(tolerance: float) -> Iterator[None]:
    """The reference module reads its tolerance at call time; set it for the benchmark only."""
    saved = scipy_reference.TOLERANCE
    scipy_reference.TOLERANCE = tolerance
    try:
        yield
    finally:
        scipy_reference.TOLERANCE = saved


def _sweep_with_offsets(path: CenterlinePath, aircraft: DesignAircraft) -> None:
    swept = sweep(path, aircraft)
    swept.gear_offset_m  # noqa: B018 -- reading one offset measures all three


def _median_of(call: Callable[[], object], repeats: int) -> tuple[float, float]:
    """Median wall and CPU seconds of one call, over ``repeats`` calls."""
    samples = [wall_and_cpu(call)[:2] for _ in range(repeats)]
    return statistics.median(wall for wall, _ in samples), statistics.median(cpu for _, cpu in samples)


def measure_solver(rounds: int, sweeps_per_round: int) -> SolverFigures:
    aircraft, path = theoretical_airplane("5"), turn_path()
    gear = main_gear_track(path, aircraft)
    ours: dict[str, Callable[[], object]] = {
        "main_gear_track": lambda: main_gear_track(path, aircraft),
        "sweep": lambda: sweep(path, aircraft),
        "sweep_with_offsets": lambda: _sweep_with_offsets(path, aircraft)}
    wall_s: dict[str, list[float]] = {name: [] for name in (*ours, "scipy")}
    cpu_s: dict[str, list[float]] = {name: [] for name in (*ours, "scipy")}
    with _reference_tolerance(SCIPY_TOLERANCE):
        def reference() -> object:
            return scipy_reference.reference_main_gear_xy(path, aircraft, gear.station_m)

        reference_xy = np.asarray(reference())
        for _ in range(rounds):
            for name, call in (*ours.items(), ("scipy", reference)):
                wall, cpu = _median_of(call, 1 if name == "scipy" else sweeps_per_round)
                wall_s[name].append(wall)
                cpu_s[name].append(cpu)
    error_m = float(np.max(np.linalg.norm(gear.main_gear_xy - reference_xy, axis=1)))

    def speedup(name: str) -> float:
        pairs = zip(wall_s[name], wall_s["scipy"], strict=True)
        return statistics.median(theirs / mine for mine, theirs in pairs)

    def ms(name: str) -> float:
        return 1e3 * statistics.median(wall_s[name])

    return SolverFigures(speedup("main_gear_track"), from_metres(error_m, "ft"), ms("main_gear_track"),
                         ms("scipy"), len(gear.station_m), speedup("sweep"), ms("sweep"),
                         speedup("sweep_with_offsets"), ms("sweep_with_offsets"),
                         {name: 1e3 * statistics.median(samples) for name, samples in cpu_s.items()})


if __name__ == "__main__":  # PYTHONPATH=. python tests/benchmarks/bench_solver.py [rounds]
    import sys

    figures = measure_solver(int(sys.argv[1]) if len(sys.argv) > 1 else 7, 20)
    print(f"stations {figures.stations}, main-gear error vs scipy {figures.max_error_ft:.2g} ft")
    print(f"scipy DOP853 rtol 1e-10, main gear only  {figures.scipy_ms:8.3f} ms wall "
          f"{figures.cpu_ms['scipy']:8.3f} ms CPU")
    for label, name, ratio, wall_ms in (
            ("main_gear_track (like with like)", "main_gear_track", figures.speedup_vs_scipy,
             figures.ours_ms),
            ("sweep (tracks, steering)", "sweep", figures.sweep_speedup_vs_scipy, figures.sweep_ms),
            ("sweep + offsets", "sweep_with_offsets", figures.sweep_with_offsets_speedup_vs_scipy,
             figures.sweep_with_offsets_ms)):
        cpu_ratio = figures.cpu_ms["scipy"] / figures.cpu_ms[name]
        print(f"{label:40} {wall_ms:8.3f} ms wall {figures.cpu_ms[name]:8.3f} ms CPU   "
              f"speed-up {ratio:5.1f}x wall, {cpu_ratio:5.1f}x CPU")
