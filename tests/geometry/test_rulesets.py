"""The rule-set interface for both standards, and the choice of the governing aircraft."""

from __future__ import annotations

import pytest

from geometry.aircraft import DesignAircraft
from geometry.errors import InvalidAircraftError, OutsideDesignGroupsError, UnknownRuleError
from geometry.rulesets import (
    SEPARATION_KINDS,
    WINGTIP_KINDS,
    FaaRuleSet,
    IcaoRuleSet,
    RuleSet,
    envelope_aircraft,
    get_rule_set,
    governing_aircraft,
)
from geometry.standards import RuleValue
from geometry.theoretical import theoretical_airplane


def _aircraft(name: str, *, cmg_m: float, wheelbase_m: float, mgw_m: float, wingspan_m: float,
              tail_height_m: float) -> DesignAircraft:
    """A fictional aircraft; dimensions not named are derived plausibly (identity)."""
    return DesignAircraft(name=name, cmg_m=cmg_m, wheelbase_m=wheelbase_m, mgw_m=mgw_m,
                          tyre_width_m=0.1 * mgw_m, wingspan_m=wingspan_m,
                          wingtip_x_m=-0.15 * wingspan_m, nose_x_m=1.1 * cmg_m,
                          tail_x_m=-1.1 * cmg_m, tail_height_m=tail_height_m)


# Groups follow from the classification edges (see test_classify.py for their sources).
NARROWBODY = _aircraft("Test narrowbody", cmg_m=17.4, wheelbase_m=15.8, mgw_m=7.1,
                       wingspan_m=35.0, tail_height_m=12.4)  # TDG 3, ADG III, code C, band 3
LONG_NARROWBODY = _aircraft("Test long narrowbody", cmg_m=23.6, wheelbase_m=22.1, mgw_m=8.7,
                            wingspan_m=38.0, tail_height_m=13.6)  # TDG 4, ADG IV, code D, band 3
WIDEBODY = _aircraft("Test widebody", cmg_m=25.8, wheelbase_m=24.0, mgw_m=11.2,
                     wingspan_m=56.0, tail_height_m=16.9)  # TDG 5, ADG V, code E, band 4
SMALL_TWIN = _aircraft("Test small twin", cmg_m=3.6, wheelbase_m=4.6, mgw_m=5.4,
                       wingspan_m=16.6, tail_height_m=4.4)  # TDG 2A, ADG II, code B, band 2
WIDE_SPAN_SHORT_GEAR = _aircraft("Test glider-like", cmg_m=5.0, wheelbase_m=5.5, mgw_m=4.0,
                                 wingspan_m=60.0, tail_height_m=6.0)  # TDG 1A, ADG V, code E


@pytest.mark.parametrize("name", ["FAA", "ICAO"])
def test_every_question_of_the_interface_gets_a_sourced_answer(name: str) -> None:
    rules: RuleSet = get_rule_set(name)  # type: ignore[arg-type]
    assert rules.name == name
    answers: list[RuleValue | None] = [
        rules.straight_width(WIDEBODY), rules.edge_margin(WIDEBODY, on_curve=False),
        rules.edge_margin(WIDEBODY, on_curve=True), rules.shoulder_width(WIDEBODY),
        rules.max_steering(WIDEBODY)]
    answers += [rules.separation(kind, WIDEBODY) for kind in SEPARATION_KINDS]
    answers += [rules.wingtip_clearance(kind, WIDEBODY) for kind in WINGTIP_KINDS]
    for answer in answers:
        assert isinstance(answer, RuleValue)
        assert answer.source and answer.confidence
        if answer.unit != "deg":
            assert answer.value_m > 0.0


def test_faa_answers_for_a_tdg_5_adg_v_aircraft() -> None:
    rules = get_rule_set("FAA")
    assert rules.group_label(WIDEBODY) == "TDG 5 / ADG V"
    # Master plan (2020) citing AC 150/5300-13: TDG 5 taxiways are 75 ft wide (published).
    assert rules.straight_width(WIDEBODY).value == 75
    assert rules.straight_width(WIDEBODY).value_m == pytest.approx(22.86)  # identity: x 0.3048
    # TESM 14 ft for TDG 5 (from memory, verify against AC 150/5300-13B); same on curves.
    assert rules.edge_margin(WIDEBODY, on_curve=False).value == 14
    assert rules.edge_margin(WIDEBODY, on_curve=True).value == 14
    # AC 150/5300-13A/B Table 4-1 for ADG V (from memory): 267 ft taxiway-taxiway, 160 ft
    # taxiway-object, 245 ft taxilane-taxilane, 138 ft taxilane-object, wingtip 53/31 ft.
    assert rules.separation("taxiway_taxiway", WIDEBODY).value == 267
    assert rules.separation("taxiway_object", WIDEBODY).value == 160
    assert rules.separation("taxilane_taxilane", WIDEBODY).value == 245
    assert rules.separation("taxilane_object", WIDEBODY).value == 138
    assert rules.wingtip_clearance("taxiway", WIDEBODY).value == 53
    assert rules.wingtip_clearance("taxilane", WIDEBODY).value == 31
    # Horonjeff pp. 86, 287: 50 degrees (published).
    assert rules.max_steering(WIDEBODY).value == 50


def test_faa_runway_to_taxiway_by_visibility() -> None:
    rules = get_rule_set("FAA")
    # Approach category C/D, ADG II, minimums lower than 3/4 mile: 400 ft (published: a master
    # plan citing the AC for C/D-II with 1/2 mile minimums).
    assert rules.separation("runway_taxiway", SMALL_TWIN).value == 400
    # Visual / not lower than 3/4 mile, ADG II: 300 ft (from memory, verify against
    # AC 150/5300-13B runway design standards).
    assert rules.separation("runway_taxiway", SMALL_TWIN, instrument_runway=False).value == 300


def test_icao_answers_for_a_code_e_band_4_aircraft() -> None:
    rules = get_rule_set("ICAO")
    assert rules.group_label(WIDEBODY) == "Code E"
    # Annex 14 3.9.5 (8th ed.) by OMGWS band 4: 23 m (from memory, verify).
    assert rules.straight_width(WIDEBODY).value == 23
    # CS-ADR-DSN D.240(a), band 4: 4 m (published).
    assert rules.edge_margin(WIDEBODY, on_curve=True).value == 4
    # Annex 14 Table 3-1 code E: 76 m and 43.5 m (from memory, verify against Table 3-1).
    assert rules.separation("taxiway_taxiway", WIDEBODY).value == 76
    assert rules.separation("taxiway_object", WIDEBODY).value == 43.5
    # identity: Table 3-1 taxiway-taxiway minus the 65 m code E span.
    assert rules.wingtip_clearance("taxiway", WIDEBODY).value == 11
    # Shoulders: (44 m overall, Annex 14 3.10.1, published - 23 m) / 2 = 10.5 m (identity).
    shoulder = rules.shoulder_width(WIDEBODY)
    assert shoulder is not None and shoulder.value == pytest.approx(10.5)
    assert shoulder.confidence == "from memory"  # the 23 m width is from memory


def test_icao_edge_clearance_on_curves_depends_on_the_wheelbase() -> None:
    rules = get_rule_set("ICAO")
    # CS-ADR-DSN D.240(a), band 3 (published): 3 m on straights; 4 m on curves when the
    # wheelbase is 18 m or more; 3 m on curves below 18 m.
    assert rules.edge_margin(LONG_NARROWBODY, on_curve=False).value == 3
    assert rules.edge_margin(LONG_NARROWBODY, on_curve=True).value == 4  # wheelbase 22.1 m
    assert rules.edge_margin(NARROWBODY, on_curve=True).value == 3  # wheelbase 15.8 m


def test_icao_codes_a_and_b_need_no_shoulders() -> None:
    # Annex 14 3.10.1 asks shoulders for code letters C to F only (published, 5th ed. summary).
    assert get_rule_set("ICAO").shoulder_width(SMALL_TWIN) is None


def test_icao_runway_to_taxiway_by_code_number_and_approach() -> None:
    rules = get_rule_set("ICAO")
    # identity: half strip + half the code's largest span. Code E span 65 m (published); strip
    # 140 m half width for instrument code 4 (8th ed., from memory) -> 172.5 m; non-instrument
    # 75 m half width (Horonjeff Table 6-9, published) -> 107.5 m.
    assert rules.separation("runway_taxiway", WIDEBODY).value == pytest.approx(172.5)
    assert rules.separation("runway_taxiway", WIDEBODY,
                            instrument_runway=False).value == pytest.approx(107.5)
    # Code B, non-instrument code number 1: 30 m + 12 m = 42 m (Horonjeff Table 6-9 visual
    # strip 60 m, published; identity).
    assert rules.separation("runway_taxiway", SMALL_TWIN, instrument_runway=False,
                            code_number=1).value == pytest.approx(42.0)
    with pytest.raises(UnknownRuleError, match="code number"):
        rules.separation("runway_taxiway", WIDEBODY, code_number=5)


@pytest.mark.parametrize("rules", [FaaRuleSet(), IcaoRuleSet()])
def test_unknown_kinds_are_refused(rules: RuleSet) -> None:
    with pytest.raises(UnknownRuleError, match="unknown kind"):
        rules.separation("apron_apron", WIDEBODY)  # type: ignore[arg-type]
    with pytest.raises(UnknownRuleError, match="unknown kind"):
        rules.wingtip_clearance("runway", WIDEBODY)  # type: ignore[arg-type]


def test_unknown_rule_set_is_refused() -> None:
    with pytest.raises(UnknownRuleError, match="FAA"):
        get_rule_set("EASA")  # type: ignore[arg-type]


def test_aircraft_beyond_the_groups_raises_a_planner_message() -> None:
    too_wide = _aircraft("Test too wide", cmg_m=30.0, wheelbase_m=28.0, mgw_m=16.0,
                         wingspan_m=70.0, tail_height_m=20.0)
    with pytest.raises(OutsideDesignGroupsError, match="OMGWS"):
        get_rule_set("ICAO").straight_width(too_wide)  # 16 m > 15 m (CS-ADR-DSN, published)


@pytest.mark.parametrize("name", ["FAA", "ICAO"])
def test_governing_aircraft_is_the_fleet_member_in_the_highest_groups(name: str) -> None:
    rules = get_rule_set(name)  # type: ignore[arg-type]
    fleet = (SMALL_TWIN, WIDEBODY, NARROWBODY)
    assert governing_aircraft(fleet, rules) is WIDEBODY
    assert governing_aircraft([NARROWBODY], rules) is NARROWBODY


def test_governing_aircraft_is_an_envelope_when_no_member_governs_every_rule() -> None:
    rules = get_rule_set("FAA")
    fleet = (LONG_NARROWBODY, WIDE_SPAN_SHORT_GEAR)  # TDG 4 / ADG IV and TDG 1A / ADG V
    governing = governing_aircraft(fleet, rules)
    assert governing.name.startswith("Envelope of ")
    assert rules.group_label(governing) == "TDG 4 / ADG V"
    assert governing.wingspan_m == 60.0 and governing.cmg_m == 23.6  # identity: the maxima


def test_envelope_keeps_the_smallest_steering_limit_and_the_longest_tail() -> None:
    limited = DesignAircraft(name="Test limited", cmg_m=10.0, wheelbase_m=9.0, mgw_m=5.0,
                             tyre_width_m=0.4, wingspan_m=20.0, wingtip_x_m=-2.0, nose_x_m=11.0,
                             tail_x_m=-14.0, tail_height_m=5.0, max_steering_deg=45.0)
    envelope = envelope_aircraft((limited, NARROWBODY))
    assert envelope.max_steering_deg == 45.0
    assert envelope.tail_x_m == min(limited.tail_x_m, NARROWBODY.tail_x_m)


def test_an_empty_fleet_has_no_governing_aircraft() -> None:
    with pytest.raises(InvalidAircraftError, match="empty"):
        governing_aircraft((), get_rule_set("ICAO"))


def test_theoretical_airplanes_answer_both_rule_sets() -> None:
    # The TDG 3 airplane is ADG III (PAIRED_ADG, an assumption) and 30 ft wide gear: ICAO code C,
    # OMGWS 9.14 m in band 4 (identity with the edges).
    airplane = theoretical_airplane("3")
    assert get_rule_set("FAA").straight_width(airplane).value == 50  # master plan, published
    assert get_rule_set("ICAO").group_label(airplane) == "Code C"
