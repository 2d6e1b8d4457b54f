"""Theoretical design airplanes: one per FAA Taxiway Design Group, at the group's upper corner.

Used as turn and fillet defaults when the planner designs for a group rather than a fleet.
Only the main gear width (MGW) and cockpit-to-main-gear distance (CMG) come from the standard
(the TDG chart's upper limits, :data:`geometry.standards.TDG_CHART`, themselves from memory).
Every other dimension is an ASSUMPTION with no source, chosen to be typical of tricycle-gear
transport aircraft whose cockpit sits a little ahead of the nose gear:

* wheelbase = 0.9 x CMG (``WHEELBASE_PER_CMG``);
* nose 8 % of CMG ahead of the cockpit; tail tip 1.15 x CMG behind the main gear;
* tyre width 10 % of MGW, at most 0.55 m;
* wingspan and tail height 1 ft below the upper edges of the ADG usually paired with the TDG
  (``PAIRED_ADG``), so the airplane classifies into that ADG; wingtips 15 % of the span behind
  the main gear (swept wing);
* nose-gear steering limit 50 degrees (the design criterion, Horonjeff pp. 86, 287).

docs/standards.md repeats these assumptions.
"""

from __future__ import annotations

from geometry.aircraft import DEFAULT_MAX_STEERING_DEG, DesignAircraft
from geometry.errors import UnknownRuleError
from geometry.standards import (
    ADG_NAMES,
    ADG_TAIL_HEIGHT_EDGES_FT,
    ADG_WINGSPAN_EDGES_FT,
    TDG_CHART,
    TDG_NAMES,
)
from geometry.units import to_metres

__all__ = ["PAIRED_ADG", "TDG_NAMES", "WHEELBASE_PER_CMG", "theoretical_airplane"]

# Assumptions, common practice with no source (see the module docstring).
WHEELBASE_PER_CMG = 0.9
NOSE_AHEAD_OF_COCKPIT_PER_CMG = 0.08
TAIL_BEHIND_GEAR_PER_CMG = 1.15
TYRE_WIDTH_PER_MGW = 0.10
MAX_TYRE_WIDTH_M = 0.55
WINGTIP_BEHIND_GEAR_PER_SPAN = 0.15
BELOW_ADG_EDGE_FT = 1.0
PAIRED_ADG: dict[str, str] = {"1A": "I", "1B": "I", "2A": "II", "2B": "II", "3": "III",
                              "4": "IV", "5": "V", "6": "V", "7": "VI"}


def theoretical_airplane(tdg: str) -> DesignAircraft:
    """The theoretical design airplane of ``tdg`` (``"1A"`` .. ``"7"``).

    Examples
    --------
    >>> from geometry.classify import tdg_of_aircraft
    >>> tdg_of_aircraft(theoretical_airplane("5"))
    '5'
    """
    if tdg not in TDG_NAMES:
        raise UnknownRuleError(f"unknown TDG {tdg!r}: use one of {', '.join(TDG_NAMES)}")
    box = TDG_CHART[TDG_NAMES.index(tdg)]
    cmg_m = box.max_cmg.value_m
    mgw_m = box.max_mgw.value_m
    adg_index = ADG_NAMES.index(PAIRED_ADG[tdg])
    wingspan_m = to_metres(ADG_WINGSPAN_EDGES_FT[adg_index].value - BELOW_ADG_EDGE_FT, "ft")
    tail_height_m = to_metres(ADG_TAIL_HEIGHT_EDGES_FT[adg_index].value - BELOW_ADG_EDGE_FT, "ft")
    return DesignAircraft(
        name=f"Theoretical TDG {tdg}",
        cmg_m=cmg_m,
        wheelbase_m=WHEELBASE_PER_CMG * cmg_m,
        mgw_m=mgw_m,
        tyre_width_m=min(TYRE_WIDTH_PER_MGW * mgw_m, MAX_TYRE_WIDTH_M),
        wingspan_m=wingspan_m,
        wingtip_x_m=-WINGTIP_BEHIND_GEAR_PER_SPAN * wingspan_m,
        nose_x_m=(1.0 + NOSE_AHEAD_OF_COCKPIT_PER_CMG) * cmg_m,
        tail_x_m=-TAIL_BEHIND_GEAR_PER_CMG * cmg_m,
        tail_height_m=tail_height_m,
        max_steering_deg=DEFAULT_MAX_STEERING_DEG,
    )
