"""Small timing helpers shared by the benchmark scripts (never imported by the tests)."""

from __future__ import annotations

import resource
import statistics
import sys
import time
from collections.abc import Callable
from typing import TypeVar

_T = TypeVar("_T")


def timed(call: Callable[[], _T]) -> tuple[float, _T]:
    """(wall seconds, result) of one call."""
    start = time.perf_counter()
    result = call()
    return time.perf_counter() - start, result


def wall_and_cpu(call: Callable[[], _T]) -> tuple[float, float, _T]:
    """(wall seconds, CPU seconds of this process, result) of one call. The CPU time is the steadier
    figure on a machine that other work shares."""
    wall_start, cpu_start = time.perf_counter(), time.process_time()
    result = call()
    return time.perf_counter() - wall_start, time.process_time() - cpu_start, result


def median_seconds(call: Callable[[], object], repeats: int) -> float:
    """Median wall time of ``repeats`` calls."""
    return statistics.median(timed(call)[0] for _ in range(repeats))


def peak_rss_mb() -> float:
    """Peak resident set size of this process so far, in MiB (ru_maxrss is KiB on Linux)."""
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    return peak / (1024.0 * 1024.0) if sys.platform == "darwin" else peak / 1024.0
