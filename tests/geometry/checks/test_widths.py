"""E-WIDTH and E-EDGE-MARGIN."""

from __future__ import annotations

import numpy as np
import pytest
import shapely

from geometry.checks import TrackInfo, run_checks
from geometry.checks.inputs import CheckInputs
from geometry.units import to_metres
from tests.geometry.checks.builders import (
    adg3,
    find_movement,
    info,
    junctions_of,
    line,
    make_inputs,
    plain_movement,
    straight_pavement,
    swept_movement,
)

TDG3_WIDTH_M = to_metres(50.0, "ft")  # AC 150/5300-13B TDG table, TDG 3: 50 ft (published, via a master plan)
TDG3_TESM_M = to_metres(10.0, "ft")   # AC 150/5300-13B TDG table, TDG 3 TESM 10 ft (from memory, verify)


def codes(inputs: CheckInputs) -> list[str]:
    return [finding.code for finding in run_checks(inputs)]


@pytest.mark.parametrize(("width_m", "fires"), [(TDG3_WIDTH_M - 0.1, True), (TDG3_WIDTH_M + 0.1, False)])
def test_a_width_override_below_the_design_width_is_an_error(width_m: float, fires: bool) -> None:
    taxiway = info(line("A", [(0, 0), (300, 0)]), adg3(), width_m=width_m, name="Alpha")
    findings = [f for f in run_checks(make_inputs([taxiway])) if f.code == "E-WIDTH"]
    assert bool(findings) is fires
    if fires:
        assert "Taxiway Alpha (A)" in findings[0].message and "width override" in findings[0].message
        assert "15.2 m (50.0 ft)" in findings[0].message
        assert findings[0].element_ids == ("A",) and findings[0].location_m == pytest.approx((150.0, 0.0))
        assert "published" in findings[0].source


def test_a_line_at_its_design_width_passes() -> None:
    assert "E-WIDTH" not in codes(make_inputs([info(line("A", [(0, 0), (300, 0)]), adg3())]))


def track_with_margin(margin_m: float) -> TrackInfo:
    xy = np.array([[0.0, 5.0], [10.0, 5.0]])
    return TrackInfo(adg3(), 0.3, (5.0, 0.0), margin_m, (4.0, -3.0), TDG3_TESM_M, xy, -xy)


@pytest.mark.parametrize(("margin_m", "fires"), [(TDG3_TESM_M - 0.1, True), (TDG3_TESM_M, False),
                                                 (-0.5, True)])
def test_edge_margin_below_the_required_margin(margin_m: float, fires: bool) -> None:
    lines = [info(line("A", [(-200, 0), (200, 0)]), adg3()), info(line("B", [(0, 0), (0, 200)]), adg3())]
    (junction,) = junctions_of(lines)
    movement = plain_movement(junction, find_movement(junction, "A", "B", turn_sign=1), 30.0,
                              tracks=[track_with_margin(margin_m)])
    findings = [f for f in run_checks(make_inputs(lines, movements=[movement])) if f.code == "E-EDGE-MARGIN"]
    assert bool(findings) is fires
    if fires:
        assert findings[0].location_m == (4.0, -3.0)
        assert ("off the pavement" in findings[0].message) is (margin_m < 0)
        assert "TDG 3" in findings[0].rule and "from memory" in findings[0].source


def test_a_turn_without_fillet_cuts_the_corner_and_a_wide_pavement_does_not() -> None:
    """The inner gear of a 90-degree turn leaves the straight pavement (identity: steady-state
    offtracking of the gear centre R - sqrt(R^2 - d^2) > 0, Horonjeff eq. 6-11 form), so the
    margin along a movement over straights alone falls short; a generous apron does not."""
    lines = [info(line("A", [(-300, 0), (300, 0)]), adg3()), info(line("B", [(0, 0), (0, 300)]), adg3())]
    (junction,) = junctions_of(lines)
    movement = find_movement(junction, "A", "B", turn_sign=1)
    straights = straight_pavement(lines)
    narrow = swept_movement(junction, movement, [adg3()], 30.0, pavement=straights,
                            required_edge_margin_m=TDG3_TESM_M)
    apron = shapely.union(straights, shapely.box(-150, -60, 60, 150))
    wide = swept_movement(junction, movement, [adg3()], 30.0, pavement=apron,
                          required_edge_margin_m=TDG3_TESM_M)
    assert "E-EDGE-MARGIN" in codes(make_inputs(lines, movements=[narrow], pavement=straights))
    assert "E-EDGE-MARGIN" not in codes(make_inputs(lines, movements=[wide], pavement=apron))


def test_excluded_movements_are_not_checked() -> None:
    lines = [info(line("A", [(-200, 0), (200, 0)]), adg3()), info(line("B", [(0, 0), (0, 200)]), adg3())]
    (junction,) = junctions_of(lines)
    movement = plain_movement(junction, find_movement(junction, "A", "B", turn_sign=1), 30.0,
                              tracks=[track_with_margin(0.0)])
    assert "E-EDGE-MARGIN" not in codes(make_inputs(lines, movements=[movement],
                                                    excluded=frozenset({movement.key})))
