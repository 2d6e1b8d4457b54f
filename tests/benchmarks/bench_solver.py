"""Figure 1: the swept-path solver against scipy's DOP853 on the same 180-degree turn.

Ours is ``geometry.sweep.sweep`` (every track, offsets included). The reference is the independent
integrator of tests/geometry/scipy_reference.py (the pursuit equation in plan coordinates of the
main gear, restarted at every segment end), run at rtol = atol = 1e-10 and asked for the main gear
at exactly our stations. The two are timed in alternation, round after round, and the speed ratio
is the median of the per-round ratios, so both see the same load on a shared machine.
"""

from __future__ import annotations

import contextlib
import math
import statistics
from collections.abc import Iterator
from dataclasses import dataclass

import numpy as np

from geometry.path import CenterlinePath, standard_turn_path
from geometry.sweep import sweep
from geometry.theoretical import theoretical_airplane
from geometry.units import from_metres, to_metres
from tests.benchmarks.timing import timed
from tests.geometry import scipy_reference

SCIPY_TOLERANCE = 1e-10
# A 150 ft radius is Horonjeff's Example 6-3 radius; the leads are those the layout analysis uses
# (1.5 CMG in, 8 CMG out, app/model/junction_analysis.py) for the TDG-5 airplane's 100 ft CMG.
TURN_RADIUS_FT, LEAD_IN_FT, LEAD_OUT_FT = 150.0, 150.0, 800.0


@dataclass(frozen=True, slots=True)
class SolverFigures:
    speedup_vs_scipy: float     # median over rounds of scipy time / our time
    max_error_ft: float         # largest main-gear position difference, ours vs scipy
    ours_ms: float              # median time of one sweep
    scipy_ms: float             # median time of one reference integration
    stations: int


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


def measure_solver(rounds: int, sweeps_per_round: int) -> SolverFigures:
    aircraft, path = theoretical_airplane("5"), turn_path()
    swept = sweep(path, aircraft)
    ours_s: list[float] = []
    scipy_s: list[float] = []
    with _reference_tolerance(SCIPY_TOLERANCE):
        reference = scipy_reference.reference_main_gear_xy(path, aircraft, swept.station_m)
        for _ in range(rounds):
            ours_s.append(statistics.median(timed(lambda: sweep(path, aircraft))[0]
                                            for _ in range(sweeps_per_round)))
            scipy_s.append(timed(lambda: scipy_reference.reference_main_gear_xy(
                path, aircraft, swept.station_m))[0])
    error_m = float(np.max(np.linalg.norm(swept.main_gear_xy - reference, axis=1)))
    ratios = [theirs / ours for ours, theirs in zip(ours_s, scipy_s, strict=True)]
    return SolverFigures(statistics.median(ratios), from_metres(error_m, "ft"),
                         1e3 * statistics.median(ours_s), 1e3 * statistics.median(scipy_s),
                         len(swept.station_m))
