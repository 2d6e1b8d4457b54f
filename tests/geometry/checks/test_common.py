"""Shared helpers of the checks: number formatting and swept tracks as shapely geometry."""

from __future__ import annotations

import math

import numpy as np
import shapely

from geometry.checks.common import angle_text, finite_point, length_text, sentence, track_geometry


def test_lengths_are_written_in_metres_and_feet() -> None:
    # 45.2 m / 0.3048 m per ft = 148.29 ft (identity: 1 ft = 0.3048 m exactly, international foot).
    assert length_text(45.2) == "45.2 m (148.3 ft)"
    assert length_text(0.0) == "0.0 m (0.0 ft)"


def test_no_nan_or_infinity_is_ever_printed() -> None:
    for value in (math.nan, math.inf, -math.inf):
        assert length_text(value) == "an unknown length"
        assert angle_text(value) == "an unknown angle"
    assert angle_text(math.pi / 2) == "90.0 degrees"  # identity
    assert finite_point((math.nan, 1.0), fallback=(3.0, 4.0)) == (3.0, 4.0)
    assert finite_point((1.0, 2.0)) == (1.0, 2.0)


def test_sentence_keeps_names_as_written() -> None:
    assert sentence("taxiway A (twy-1)") == "Taxiway A (twy-1)"
    assert sentence("") == ""


def test_track_geometry_drops_stations_that_are_not_finite() -> None:
    track = np.array([[0.0, 0.0], [np.nan, 1.0], [10.0, 0.0]])
    geometry = track_geometry(track)
    assert geometry is not None and geometry.length == 10.0  # identity
    single = track_geometry(np.array([[1.0, 2.0], [np.inf, 0.0]]))
    assert single is not None and shapely.get_type_id(single) == 0  # one station: a point
    assert track_geometry(np.empty((0, 2))) is None
    assert track_geometry(np.array([[np.nan, np.nan]])) is None
