"""Crossovers: the governing spacing of the parallels (turn or wingtip) and reversal steering."""

from __future__ import annotations

import math

import pytest

from geometry.aircraft import DesignAircraft
from geometry.checks import MovementInfo, run_checks
from geometry.checks.crossovers import crossover_spacing, reversal_peak
from geometry.checks.inputs import CheckInputs
from geometry.rulesets import get_rule_set
from geometry.special_cases import Crossover
from geometry.sweep import min_radius_for_steering_limit
from geometry.theoretical import theoretical_airplane
from geometry.units import to_metres
from tests.geometry.checks.builders import (
    adg3,
    demo_aircraft,
    info,
    line,
    make_inputs,
    plain_movement,
)

# A fictional long-bodied, short-winged aircraft: ADG I (14 m span, 5 m tail), TDG 4 (30 m CMG).
LONG_BODY = demo_aircraft("Demo long-body freighter", cmg_m=30.0, mgw_m=8.0, wingspan_m=14.0,
                          tail_height_m=5.0)
FAA_ADG_I_TWY_TWY_M = to_metres(69.0, "ft")   # AC 150/5300-13A Table 4-1, ADG I (from memory, verify vs 13B)
FAA_ADG_V_TWY_TWY_M = to_metres(267.0, "ft")  # AC 150/5300-13A Table 4-1, ADG V (from memory, verify vs 13B)


def crossover_inputs(spacing_m: float, aircraft: DesignAircraft, turn_radius_m: float | None = None
                     ) -> tuple[CheckInputs, Crossover]:
    lines = [info(line("A", [(-600, 0), (600, 0)]), aircraft),
             info(line("B", [(-600, spacing_m), (600, spacing_m)]), aircraft),
             info(line("C", [(0, 0), (0, spacing_m)]), aircraft)]
    movements: list[MovementInfo] = []
    if turn_radius_m is not None:
        bare = make_inputs(lines)
        (crossover,) = bare.crossovers
        for reversal in crossover.reversals:
            for movement in (reversal.first, reversal.second):
                junction = next(j for j in bare.junctions if j.id == movement.junction_id)
                movements.append(plain_movement(junction, movement, turn_radius_m))
    inputs = make_inputs(lines, fleet=[aircraft], movements=list({m.key: m for m in movements}.values()))
    (crossover,) = inputs.crossovers
    return inputs, crossover


def test_the_turn_governs_a_long_body_with_short_wings() -> None:
    spacing = crossover_spacing(LONG_BODY, get_rule_set("FAA"), "taxiway_taxiway")
    assert spacing is not None and spacing.governing == "turn"
    # Our derivation (docs/checks.md): twice the steering-limited radius of a 180-degree turn (identity).
    assert spacing.governing_m == pytest.approx(2.0 * min_radius_for_steering_limit(LONG_BODY, math.pi))
    assert spacing.separation.value_m == pytest.approx(FAA_ADG_I_TWY_TWY_M)
    assert spacing.governing_m > FAA_ADG_I_TWY_TWY_M


def test_the_wingtip_clearance_governs_a_wide_span() -> None:
    wide = theoretical_airplane("5")  # ADG V: 213 ft span (1 ft below the ADG V edge, AC 13B Table 1-1)
    spacing = crossover_spacing(wide, get_rule_set("FAA"), "taxiway_taxiway")
    assert spacing is not None and spacing.governing == "wingtip"
    assert spacing.governing_m == pytest.approx(FAA_ADG_V_TWY_TWY_M)
    assert spacing.turn_spacing_m < FAA_ADG_V_TWY_TWY_M


@pytest.mark.parametrize(("aircraft", "governs"),
                         [(LONG_BODY, "turn"), (theoretical_airplane("5"), "wingtip")])
@pytest.mark.parametrize("offset_m", [-0.1, 0.1])
def test_crossover_spacing_findings_both_ways(aircraft: DesignAircraft, governs: str,
                                              offset_m: float) -> None:
    spacing = crossover_spacing(aircraft, get_rule_set("FAA"), "taxiway_taxiway")
    assert spacing is not None
    inputs, _ = crossover_inputs(spacing.governing_m + offset_m, aircraft)
    findings = run_checks(inputs)
    (note,) = [f for f in findings if f.code == "I-CROSSOVER-SPACING"]
    assert f"set by the {'turn' if governs == 'turn' else 'wingtip clearance'}" in note.message
    assert note.rule == f"crossover spacing ({governs} governs)" and note.element_ids[0] == "C"
    assert bool([f for f in findings if f.code == "E-CROSSOVER-SPACING"]) is (offset_m < 0)


def test_two_90_degree_turns_at_the_90_degree_radius_steer_too_much_back_to_back() -> None:
    # Why the turn requirement is not 2 x R90 (docs/checks.md): the second turn starts before
    # the body has realigned. Identity of the engine's own sweep.
    r90 = min_radius_for_steering_limit(adg3(), math.pi / 2)
    _, crossover = crossover_inputs(2.0 * r90, adg3())
    peak = reversal_peak(crossover, 0, adg3(), (r90, r90))
    assert peak is not None and math.degrees(peak.steering_rad) > 70.0 and not peak.scaled


def test_a_semicircle_at_the_180_degree_radius_stays_within_the_limit() -> None:
    r180 = min_radius_for_steering_limit(adg3(), math.pi)
    _, crossover = crossover_inputs(2.0 * r180, adg3())
    peak = reversal_peak(crossover, 0, adg3(), (r180, r180))
    # 50 deg design criterion: Horonjeff et al., pp. 86 and 287; bisection tolerance 1 mm (identity).
    assert peak is not None and math.degrees(peak.steering_rad) <= 50.0 + 1e-3


def test_radii_too_large_for_the_connector_are_scaled_down_to_fit() -> None:
    _, crossover = crossover_inputs(40.0, adg3())
    peak = reversal_peak(crossover, 0, adg3(), (30.0, 30.0))
    assert peak is not None and peak.scaled
    assert peak.radii_m == pytest.approx((20.0, 20.0))  # identity: 2 R tan(45 deg) = 40 m


def test_a_tight_reversal_is_an_error_and_a_gentle_one_is_not() -> None:
    tight, _ = crossover_inputs(30.0, adg3(), turn_radius_m=14.0)
    (finding,) = [f for f in run_checks(tight) if f.code == "E-REVERSAL-STEERING"]
    assert "limit of 50.0 degrees" in finding.message and finding.element_ids[0] == "C"
    r180 = min_radius_for_steering_limit(adg3(), math.pi)
    gentle, _ = crossover_inputs(2.0 * r180 + 1.0, adg3(), turn_radius_m=r180 + 0.4)
    assert "E-REVERSAL-STEERING" not in [f.code for f in run_checks(gentle)]
