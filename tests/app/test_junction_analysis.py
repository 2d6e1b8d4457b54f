"""Parts of one junction's analysis: the stations kept once the main gear is on the path."""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from app.model.junction_analysis import _once_gear_is_on_path
from geometry.path import standard_turn_path
from geometry.sweep import plan_sweep, sweep, swept_paths
from tests.geometry.sweep_fixture import demo_aircraft


def test_stations_before_the_gear_reaches_the_path_are_dropped_from_every_array() -> None:
    path, plane = standard_turn_path(40.0, math.pi / 2, 60.0, 80.0), demo_aircraft(25.0, 12.0)
    swept = sweep(path, plane)
    trimmed = swept_paths([_once_gear_is_on_path(plan_sweep(path, plane))])[0]
    keep = swept.station_m >= swept.aircraft.cmg_m  # identity: the gear is CMG behind the cockpit
    assert 0 < np.count_nonzero(keep) < len(keep)
    for field in dataclasses.fields(swept):
        value = getattr(swept, field.name)
        if isinstance(value, np.ndarray):
            # check value: identity
            assert np.array_equal(getattr(trimmed, field.name), value[keep])
    # check value: identity
    assert trimmed.path is swept.path and trimmed.aircraft is swept.aircraft


def test_a_movement_shorter_than_the_gear_distance_keeps_its_last_station() -> None:
    path, plane = standard_turn_path(40.0, math.pi / 4, 1.0, 1.0), demo_aircraft(60.0, 12.0)
    swept = sweep(path, plane)
    trimmed = swept_paths([_once_gear_is_on_path(plan_sweep(path, plane))])[0]
    assert swept.station_m[-1] < swept.aircraft.cmg_m  # the whole path is shorter than CMG
    assert np.array_equal(trimmed.station_m, swept.station_m[-1:])  # identity: only the end is kept
