"""Classification at, and either side of, every band edge; errors beyond the largest group.

Edges and their sources:
* ADG wingspan 49/79/118/171/214/262 ft and tail height 20/30/45/60/66/80 ft, lower edge
  inclusive: AC 150/5300-13B Table 1-1 (published, shared/REFERENCES.md 3).
* Code letter 15/24/36/52/65/80 m: Annex 14 Table 1-1, read in Horonjeff Table 6-3 (published).
* OMGWS 4.5/6/9/15 m: CS-ADR-DSN Issue 6 D.240(a) mirroring Annex 14 3.9.3 (published).
* TDG chart limits (ft, inclusive): from memory, verify against the AC 150/5300-13B TDG chart.
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as hs

from geometry.aircraft import DesignAircraft
from geometry.classify import (
    adg_by_tail_height,
    adg_by_wingspan,
    adg_of,
    adg_of_aircraft,
    code_letter_of,
    code_letter_of_aircraft,
    omgws_band_of,
    omgws_band_of_aircraft,
    tdg_of,
    tdg_of_aircraft,
)
from geometry.errors import NonFiniteInputError, OutsideDesignGroupsError
from geometry.units import to_metres

NUDGE_M = 1e-6  # identity: far below any measurement, far above float rounding at these sizes

# AC 150/5300-13B Table 1-1 (published): (lower group, upper group, edge ft).
WINGSPAN_EDGES_FT = [("I", "II", 49), ("II", "III", 79), ("III", "IV", 118),
                     ("IV", "V", 171), ("V", "VI", 214)]
TAIL_EDGES_FT = [("I", "II", 20), ("II", "III", 30), ("III", "IV", 45), ("IV", "V", 60),
                 ("V", "VI", 66)]
# Annex 14 Table 1-1 via Horonjeff Table 6-3 (published).
CODE_EDGES_M = [("A", "B", 15), ("B", "C", 24), ("C", "D", 36), ("D", "E", 52), ("E", "F", 65)]
# CS-ADR-DSN Issue 6 D.240(a) (published).
OMGWS_EDGES_M = [(1, 2, 4.5), (2, 3, 6.0), (3, 4, 9.0)]
# TDG chart (from memory, verify against the AC 150/5300-13B TDG chart): (group, MGW ft, CMG ft)
# upper limits, inclusive.
TDG_CORNERS_FT = [("1A", 15, 20), ("1B", 15, 35), ("2A", 20, 35), ("2B", 20, 50), ("3", 30, 65),
                  ("4", 30, 100), ("5", 47, 100), ("6", 47, 125), ("7", 52, 125)]


@pytest.mark.parametrize("below, above, edge_ft", WINGSPAN_EDGES_FT)
def test_adg_wingspan_edges(below: str, above: str, edge_ft: float) -> None:
    edge_m = to_metres(edge_ft, "ft")
    assert adg_by_wingspan(edge_m - NUDGE_M) == below
    assert adg_by_wingspan(edge_m) == above  # the lower edge belongs to the group
    assert adg_by_wingspan(edge_m + NUDGE_M) == above


@pytest.mark.parametrize("below, above, edge_ft", TAIL_EDGES_FT)
def test_adg_tail_height_edges(below: str, above: str, edge_ft: float) -> None:
    edge_m = to_metres(edge_ft, "ft")
    assert adg_by_tail_height(edge_m - NUDGE_M) == below
    assert adg_by_tail_height(edge_m) == above
    assert adg_by_tail_height(edge_m + NUDGE_M) == above


def test_adg_top_edges_raise_beyond_group_vi() -> None:
    # AC 150/5300-13B Table 1-1: ADG VI is wingspan < 262 ft, tail height < 80 ft (published).
    assert adg_by_wingspan(to_metres(262, "ft") - NUDGE_M) == "VI"
    assert adg_by_tail_height(to_metres(80, "ft") - NUDGE_M) == "VI"
    with pytest.raises(OutsideDesignGroupsError, match="beyond the largest ADG"):
        adg_by_wingspan(to_metres(262, "ft"))
    with pytest.raises(OutsideDesignGroupsError, match="tail height"):
        adg_by_tail_height(to_metres(80, "ft") + NUDGE_M)


def test_adg_more_demanding_of_span_and_tail_governs() -> None:
    # AC 150/5300-13B Table 1-1 (published): span 100 ft is III, tail 50 ft is IV -> IV.
    assert adg_of(to_metres(100, "ft"), to_metres(50, "ft")) == "IV"
    # span 180 ft is V, tail 25 ft is II -> V (same source).
    assert adg_of(to_metres(180, "ft"), to_metres(25, "ft")) == "V"


@pytest.mark.parametrize("below, above, edge_m", CODE_EDGES_M)
def test_code_letter_edges(below: str, above: str, edge_m: float) -> None:
    assert code_letter_of(edge_m - NUDGE_M) == below
    assert code_letter_of(edge_m) == above
    assert code_letter_of(edge_m + NUDGE_M) == above


def test_code_letter_beyond_f_raises() -> None:
    # Annex 14 Table 1-1: code F is 65 m <= span < 80 m (published).
    assert code_letter_of(80.0 - NUDGE_M) == "F"
    with pytest.raises(OutsideDesignGroupsError, match="code letter"):
        code_letter_of(80.0)


@pytest.mark.parametrize("below, above, edge_m", OMGWS_EDGES_M)
def test_omgws_band_edges(below: int, above: int, edge_m: float) -> None:
    assert omgws_band_of(edge_m - NUDGE_M) == below
    assert omgws_band_of(edge_m) == above
    assert omgws_band_of(edge_m + NUDGE_M) == above


def test_omgws_beyond_band_4_raises() -> None:
    # CS-ADR-DSN D.240(a): the last band is 9 m up to but not including 15 m (published).
    assert omgws_band_of(15.0 - NUDGE_M) == 4
    with pytest.raises(OutsideDesignGroupsError, match="OMGWS"):
        omgws_band_of(15.0)


@pytest.mark.parametrize("index", range(len(TDG_CORNERS_FT)))
def test_tdg_corner_belongs_to_its_group(index: int) -> None:
    tdg, mgw_ft, cmg_ft = TDG_CORNERS_FT[index]
    mgw_m, cmg_m = to_metres(mgw_ft, "ft"), to_metres(cmg_ft, "ft")
    assert tdg_of(mgw_m, cmg_m) == tdg  # a point on a chart line belongs to the lower group
    assert tdg_of(mgw_m - NUDGE_M, cmg_m - NUDGE_M) == tdg


@pytest.mark.parametrize("index", range(len(TDG_CORNERS_FT) - 1))
def test_tdg_just_past_a_limit_leaves_the_group(index: int) -> None:
    _, mgw_ft, cmg_ft = TDG_CORNERS_FT[index]
    mgw_m, cmg_m = to_metres(mgw_ft, "ft"), to_metres(cmg_ft, "ft")
    order = [row[0] for row in TDG_CORNERS_FT]
    assert order.index(tdg_of(mgw_m + NUDGE_M, cmg_m)) > index
    if cmg_ft == TDG_CORNERS_FT[-1][2]:
        # No group reaches a longer CMG: past the chart's top line the aircraft is outside it.
        with pytest.raises(OutsideDesignGroupsError):
            tdg_of(mgw_m, cmg_m + NUDGE_M)
    else:
        assert order.index(tdg_of(mgw_m, cmg_m + NUDGE_M)) > index


def test_tdg_beyond_group_7_raises() -> None:
    # TDG 7 limits 52 ft MGW, 125 ft CMG (from memory, verify against the AC 13A/13B TDG chart).
    with pytest.raises(OutsideDesignGroupsError, match="TDG 7"):
        tdg_of(to_metres(52, "ft") + NUDGE_M, 10.0)
    with pytest.raises(OutsideDesignGroupsError, match="no taxiway design group"):
        tdg_of(5.0, to_metres(125, "ft") + NUDGE_M)


@pytest.mark.parametrize("function", [adg_by_wingspan, code_letter_of, omgws_band_of])
@pytest.mark.parametrize("value", [0.0, -3.0])
def test_non_positive_dimensions_are_refused(function: object, value: float) -> None:
    with pytest.raises(OutsideDesignGroupsError, match="positive"):
        function(value)  # type: ignore[operator]


@pytest.mark.parametrize("value", [math.nan, math.inf])
def test_non_finite_dimensions_are_refused(value: float) -> None:
    with pytest.raises(NonFiniteInputError):
        tdg_of(value, 10.0)
    with pytest.raises(NonFiniteInputError):
        code_letter_of(value)


def test_aircraft_convenience_functions() -> None:
    # A fictional single-aisle aircraft; its groups follow from the edges above (identity).
    aircraft = DesignAircraft(name="Test single-aisle", cmg_m=17.4, wheelbase_m=15.8, mgw_m=7.1,
                              tyre_width_m=0.44, wingspan_m=35.0, wingtip_x_m=-6.0,
                              nose_x_m=19.6, tail_x_m=-19.4, tail_height_m=12.4)
    assert tdg_of_aircraft(aircraft) == "3"  # MGW 23.3 ft <= 30, CMG 57.1 ft <= 65
    assert adg_of_aircraft(aircraft) == "III"  # span 114.8 ft, tail 40.7 ft
    assert code_letter_of_aircraft(aircraft) == "C"  # 24 m <= 35 m < 36 m
    assert omgws_band_of_aircraft(aircraft) == 3  # 6 m <= 7.1 m < 9 m


@settings(max_examples=40, deadline=None)
@given(hs.floats(0.5, 14.9), hs.floats(0.5, 14.9), hs.floats(0.5, 38.0), hs.floats(0.5, 38.0))
def test_larger_gear_never_gives_a_lower_tdg(mgw_a: float, mgw_b: float, cmg_a: float,
                                             cmg_b: float) -> None:
    order = [row[0] for row in TDG_CORNERS_FT]
    small = tdg_of(min(mgw_a, mgw_b), min(cmg_a, cmg_b))
    large = tdg_of(max(mgw_a, mgw_b), max(cmg_a, cmg_b))
    assert order.index(large) >= order.index(small)


@settings(max_examples=40, deadline=None)
@given(hs.floats(0.1, 79.9), hs.floats(0.1, 79.9))
def test_larger_wingspan_never_gives_a_lower_code(span_a: float, span_b: float) -> None:
    letters = "ABCDEF"
    assert (letters.index(code_letter_of(max(span_a, span_b)))
            >= letters.index(code_letter_of(min(span_a, span_b))))
