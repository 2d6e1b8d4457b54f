"""E-SEP-TWY-TWY, E-SEP-TXL-TXL, E-SEP-RWY-TWY, E-SEP-TWY-OBJ, E-SEP-TXL-OBJ."""

from __future__ import annotations

import math

import pytest
import shapely

from geometry.checks import run_checks
from geometry.checks.inputs import CheckInputs
from geometry.findings import Finding
from geometry.network import LineKind
from geometry.rulesets import RuleSetName, get_rule_set
from geometry.units import to_metres
from tests.geometry.checks.builders import adg3, info, line, make_inputs, obstacle

# Check values (the aircraft is the theoretical TDG 3 airplane: ADG III, ICAO code C, 117 ft span).
# FAA rows: AC 150/5300-13A Table 4-1, ADG III (from memory, verify against AC 150/5300-13B Table 4-1).
FAA_TWY_TWY_M = to_metres(152.0, "ft")  # taxiway CL to parallel taxiway CL
FAA_TXL_TXL_M = to_metres(140.0, "ft")  # taxilane CL to parallel taxilane CL
FAA_TWY_OBJ_M = to_metres(93.0, "ft")   # taxiway CL to fixed or movable object
FAA_TXL_OBJ_M = to_metres(81.0, "ft")   # taxilane CL to fixed or movable object
# AC 150/5300-13B runway design standards, C/D-III, lower than 3/4 mile and not: 400 ft both
# (from memory, verify against AC 150/5300-13B runway design standards).
FAA_RWY_TWY_M = to_metres(400.0, "ft")
# ICAO rows: Annex 14 Vol I Table 3-1 (8th ed.), code C (from memory, verify against Table 3-1).
ICAO_TWY_TWY_M = 44.0   # taxiway CL to taxiway CL
ICAO_TXL_TXL_M = 40.5   # aircraft stand taxilane CL to aircraft stand taxilane CL
ICAO_TWY_OBJ_M = 26.0   # taxiway CL to object
ICAO_TXL_OBJ_M = 22.5   # aircraft stand taxilane CL to object
# Half the code 3/4 instrument strip, 140 m (Annex 14 3.4.3, from memory), plus half the code C
# wingspan edge, 36 m / 2 (Annex 14 Table 1-1, published): identity of Table 3-1's note.
ICAO_RWY_TWY_M = 140.0 + 18.0
# Non-instrument: half the 150 m strip (Horonjeff Table 6-9, published) + 18 m.
ICAO_RWY_TWY_VISUAL_M = 75.0 + 18.0


def two_parallels(spacing_m: float, kinds: tuple[LineKind, LineKind], rule_set: RuleSetName,
                  instrument: bool = True) -> CheckInputs:
    first = line("P", [(-500, 0), (500, 0)], kinds[0])
    second = line("Q", [(-300, spacing_m), (700, spacing_m)], kinds[1])
    lines = [info(first, adg3(), rule_set=rule_set, instrument=instrument),
             info(second, adg3(), rule_set=rule_set, instrument=instrument)]
    return make_inputs(lines, rule_set=rule_set)


def with_code(inputs: CheckInputs, code: str) -> list[Finding]:
    return [finding for finding in run_checks(inputs) if finding.code == code]


LINE_CASES = [
    ("FAA", ("taxiway", "taxiway"), True, FAA_TWY_TWY_M, "E-SEP-TWY-TWY"),
    ("FAA", ("taxilane", "taxilane"), True, FAA_TXL_TXL_M, "E-SEP-TXL-TXL"),
    ("FAA", ("taxiway", "taxilane"), True, FAA_TWY_TWY_M, "E-SEP-TWY-TWY"),
    ("FAA", ("runway", "taxiway"), True, FAA_RWY_TWY_M, "E-SEP-RWY-TWY"),
    ("FAA", ("runway", "taxiway"), False, FAA_RWY_TWY_M, "E-SEP-RWY-TWY"),
    ("ICAO", ("taxiway", "taxiway"), True, ICAO_TWY_TWY_M, "E-SEP-TWY-TWY"),
    ("ICAO", ("taxilane", "taxilane"), True, ICAO_TXL_TXL_M, "E-SEP-TXL-TXL"),
    ("ICAO", ("runway", "taxiway"), True, ICAO_RWY_TWY_M, "E-SEP-RWY-TWY"),
    ("ICAO", ("taxiway", "runway"), False, ICAO_RWY_TWY_VISUAL_M, "E-SEP-RWY-TWY"),
]


@pytest.mark.parametrize(("rule_set", "kinds", "instrument", "required_m", "code"), LINE_CASES)
def test_parallel_lines_at_the_rule_value_minus_and_plus_a_decimetre(
        rule_set: RuleSetName, kinds: tuple[LineKind, LineKind], instrument: bool, required_m: float,
        code: str) -> None:
    (finding,) = with_code(two_parallels(required_m - 0.1, kinds, rule_set, instrument), code)
    assert f"{required_m - 0.1:.1f} m" in finding.message and f"{required_m:.1f} m" in finding.message
    # They overlap from x = -300 to 500 (identity).
    assert "over 800.0 m" in finding.message
    assert finding.location_m[1] == pytest.approx((required_m - 0.1) / 2.0)
    assert set(finding.element_ids) == {"P", "Q"}
    assert not [f for f in run_checks(two_parallels(required_m + 0.1, kinds, rule_set, instrument))
                if f.code.startswith("E-SEP")]


def test_two_runways_are_not_checked_against_each_other() -> None:
    assert not with_code(two_parallels(50.0, ("runway", "runway"), "FAA"), "E-SEP-RWY-TWY")


def test_the_more_demanding_aircraft_of_the_two_lines_governs() -> None:
    from tests.geometry.checks.builders import demo_aircraft
    small = demo_aircraft("Demo commuter", cmg_m=8.0, mgw_m=4.0, wingspan_m=14.0, tail_height_m=5.0)  # ADG I
    lines = [info(line("P", [(-500, 0), (500, 0)]), small),
             info(line("Q", [(-500, FAA_TWY_TWY_M - 0.1), (500, FAA_TWY_TWY_M - 0.1)]), adg3())]
    (finding,) = with_code(make_inputs(lines), "E-SEP-TWY-TWY")
    assert "ADG III" in finding.rule


@pytest.mark.parametrize("angle_deg", [9.0, 11.0])
def test_only_pieces_within_10_degrees_of_parallel_count(angle_deg: float) -> None:
    # 10 degrees: the brief's house tolerance for "near-parallel" (common practice, no source).
    rise = 300.0 * math.tan(math.radians(angle_deg))
    lines = [info(line("P", [(-500, 0), (500, 0)]), adg3()),
             info(line("Q", [(0, 30), (300, 30 + rise)]), adg3())]
    assert bool(with_code(make_inputs(lines), "E-SEP-TWY-TWY")) is (angle_deg < 10.0)


def test_lines_converging_on_a_shared_junction_are_not_reported_there() -> None:
    # Q meets P at a 5 degree angle at (0, 0): its straight reaches the junction, so it is ignored.
    far = (400 * math.cos(math.radians(5)), 400 * math.sin(math.radians(5)))
    lines = [info(line("P", [(-500, 0), (500, 0)]), adg3()), info(line("Q", [(0, 0), far]), adg3())]
    inputs = make_inputs(lines)
    assert len(inputs.junctions) == 1 and not with_code(inputs, "E-SEP-TWY-TWY")


def test_lines_end_to_end_do_not_overlap() -> None:
    lines = [info(line("P", [(-500, 0), (0, 0)]), adg3()), info(line("Q", [(10, 5), (500, 5)]), adg3())]
    assert not with_code(make_inputs(lines), "E-SEP-TWY-TWY")


@pytest.mark.parametrize(("offset_m", "fires"), [(-0.2, True), (0.2, False)])
def test_concentric_arcs_are_measured_along_the_curve(offset_m: float, fires: bool) -> None:
    # Two concentric 90-degree corners (radius 100 m and 100 m + s) are s apart all round (identity);
    # arcs are chorded with a 5 cm sagitta, hence the 0.2 m margin here.
    spacing = FAA_TWY_TWY_M + offset_m
    inner = line("P", [(0, 0), (200, 0), (200, 200)], radii=[None, 100.0, None])
    outer = line("Q", [(0, -spacing), (200 + spacing, -spacing), (200 + spacing, 200)],
                 radii=[None, 100.0 + spacing, None])
    found = with_code(make_inputs([info(inner, adg3()), info(outer, adg3())]), "E-SEP-TWY-TWY")
    assert bool(found) is fires
    if fires:
        assert f"{spacing:.1f} m" in found[0].message


OBJECT_CASES = [("FAA", "taxiway", FAA_TWY_OBJ_M, "E-SEP-TWY-OBJ"),
                ("FAA", "taxilane", FAA_TXL_OBJ_M, "E-SEP-TXL-OBJ"),
                ("ICAO", "taxiway", ICAO_TWY_OBJ_M, "E-SEP-TWY-OBJ"),
                ("ICAO", "taxilane", ICAO_TXL_OBJ_M, "E-SEP-TXL-OBJ")]


@pytest.mark.parametrize(("rule_set", "kind", "required_m", "code"), OBJECT_CASES)
def test_object_at_the_rule_value_minus_and_plus_a_decimetre(rule_set: RuleSetName, kind: LineKind,
                                                             required_m: float, code: str) -> None:
    lines = [info(line("P", [(-500, 0), (500, 0)], kind), adg3(), rule_set=rule_set)]
    near = obstacle("o1", shapely.box(100, required_m - 0.1, 120, required_m + 20))
    (finding,) = with_code(make_inputs(lines, rule_set=rule_set, objects=[near]), code)
    assert finding.element_ids == ("P", "o1")
    # Midway between the centerline and the object's nearest side (any point along that side).
    assert 100.0 <= finding.location_m[0] <= 120.0
    assert finding.location_m[1] == pytest.approx((required_m - 0.1) / 2.0)
    assert get_rule_set(rule_set).name in ("FAA", "ICAO") and "from memory" in finding.source
    far = obstacle("o2", shapely.Point(100, -(required_m + 0.1)))
    assert not with_code(make_inputs(lines, rule_set=rule_set, objects=[far]), code)


def test_runways_are_not_checked_against_objects_here() -> None:
    lines = [info(line("R", [(-500, 0), (500, 0)], "runway"), adg3())]
    assert not [f for f in run_checks(make_inputs(lines, objects=[obstacle("o", shapely.Point(0, 5))]))
                if f.code.startswith("E-SEP")]
