"""Theoretical design airplanes: one per TDG, at the chart's upper corner, classifying back into
their own group."""

from __future__ import annotations

from itertools import pairwise

import pytest

from geometry.classify import adg_of_aircraft, tdg_of_aircraft
from geometry.errors import UnknownRuleError
from geometry.theoretical import (
    PAIRED_ADG,
    TDG_NAMES,
    WHEELBASE_PER_CMG,
    theoretical_airplane,
)
from geometry.units import to_metres

# TDG chart upper corners (MGW ft, CMG ft): from memory, verify against the AC 150/5300-13B chart.
CORNERS_FT = {"1A": (15, 20), "1B": (15, 35), "2A": (20, 35), "2B": (20, 50), "3": (30, 65),
              "4": (30, 100), "5": (47, 100), "6": (47, 125), "7": (52, 125)}


def test_tdg_names_in_order() -> None:
    # AC 150/5300-13B groups (REFERENCES.md 3; TDG 7 carried over from 13A).
    assert TDG_NAMES == ("1A", "1B", "2A", "2B", "3", "4", "5", "6", "7")


@pytest.mark.parametrize("tdg", TDG_NAMES)
def test_theoretical_airplane_sits_on_its_group_corner(tdg: str) -> None:
    airplane = theoretical_airplane(tdg)
    mgw_ft, cmg_ft = CORNERS_FT[tdg]
    assert airplane.mgw_m == pytest.approx(to_metres(mgw_ft, "ft"))
    assert airplane.cmg_m == pytest.approx(to_metres(cmg_ft, "ft"))
    assert tdg_of_aircraft(airplane) == tdg
    assert adg_of_aircraft(airplane) == PAIRED_ADG[tdg]
    assert airplane.name == f"Theoretical TDG {tdg}"


@pytest.mark.parametrize("tdg", TDG_NAMES)
def test_theoretical_airplane_assumptions(tdg: str) -> None:
    airplane = theoretical_airplane(tdg)
    # Assumption, common practice with no source: wheelbase 0.9 x CMG.
    assert WHEELBASE_PER_CMG == 0.9
    assert airplane.wheelbase_m == pytest.approx(0.9 * airplane.cmg_m)
    # Horonjeff pp. 86, 287: 50-degree steering design criterion (published).
    assert airplane.max_steering_deg == 50.0
    # identity: a valid aircraft has the nose ahead of the cockpit and the tail behind the gear.
    assert airplane.nose_x_m > airplane.cmg_m > 0.0 > airplane.tail_x_m


def test_larger_groups_have_larger_airplanes() -> None:
    airplanes = [theoretical_airplane(tdg) for tdg in TDG_NAMES]
    for smaller, larger in pairwise(airplanes):
        assert larger.mgw_m >= smaller.mgw_m
        assert larger.cmg_m >= smaller.cmg_m
        assert larger.wingspan_m >= smaller.wingspan_m


def test_unknown_group_is_refused() -> None:
    with pytest.raises(UnknownRuleError, match="1A"):
        theoretical_airplane("8")
