"""The tracks a junction keeps: the plot stations."""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from app.model.junction_tracks import PLOT_STEP_M, plot_stations

FAST = settings(max_examples=40, deadline=None)


@FAST
@given(st.lists(st.floats(0.001, 3.0), min_size=1, max_size=200), st.floats(-50.0, 50.0))
def test_plot_stations_are_the_first_station_at_or_past_each_metre(steps_m: list[float],
                                                                   start_m: float) -> None:
    station_m = start_m + np.concatenate(([0.0], np.cumsum(steps_m)))
    picked = plot_stations(station_m)
    wanted = np.arange(station_m[0], station_m[-1], PLOT_STEP_M)
    # identity: one index per wanted station (the first at or past it), plus the last, without repeats
    expected = np.unique(np.append(np.searchsorted(station_m, wanted), len(station_m) - 1))
    # check value: identity
    assert np.array_equal(picked, expected)
