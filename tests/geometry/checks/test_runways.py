"""W-WIDE-THROAT, I-RUNWAY-CONNECTION and W-ACUTE-EXIT-ANGLE."""

from __future__ import annotations

import math

import pytest

from geometry.checks import run_checks
from geometry.findings import Finding
from tests.geometry.checks.builders import RUNWAY_WIDTH_M, adg3, info, line, make_inputs


def runway_with_taxiway(angle_deg: float, taxiway_width_m: float | None = None) -> list[Finding]:
    heading = math.radians(angle_deg)
    end = (400 * math.cos(heading), 400 * math.sin(heading))
    lines = [info(line("R", [(-2000, 0), (2000, 0)], "runway"), adg3(), name="09-27"),
             info(line("T", [(0, 0), end]), adg3(), width_m=taxiway_width_m)]
    return list(run_checks(make_inputs(lines)))


@pytest.mark.parametrize(("angle_deg", "width_m", "fires"),
                         [(90.0, 46.0, True), (90.0, 23.0, False), (35.0, 23.0, False)])
def test_a_throat_wider_than_the_runway_is_a_warning(angle_deg: float, width_m: float, fires: bool) -> None:
    # A straight taxiway of width w meets the runway edge at angle A over w / sin(A) (identity):
    # 46.0 m at 90 degrees for w = 46 m, against a 45 m runway. At 35 degrees the junction is an
    # acute-angled exit, which the check leaves out (common practice, no source).
    found = [f for f in runway_with_taxiway(angle_deg, width_m) if f.code == "W-WIDE-THROAT"]
    assert bool(found) is fires
    if fires:
        (finding,) = found
        assert "46.0 m" in finding.message and "runway 09-27 (R)" in finding.message
        assert finding.element_ids == ("J:R/T#0", "R")
        # Midway along the opening, on the runway's left edge (identity).
        assert finding.location_m[1] == pytest.approx(RUNWAY_WIDTH_M / 2.0)


def test_a_right_angle_connection_is_recognised() -> None:
    notes = [f for f in runway_with_taxiway(90.0) if f.code == "I-RUNWAY-CONNECTION"]
    assert len(notes) == 1 and "Right-angle" in notes[0].message and "90.0 degrees" in notes[0].message


@pytest.mark.parametrize(("angle_deg", "warns"), [(22.0, True), (25.0, False), (30.0, False), (45.0, False),
                                                  (50.0, True)])
def test_acute_exit_angles_outside_25_to_45_degrees(angle_deg: float, warns: bool) -> None:
    # Rapid exit taxiways meet the runway at 25 to 45 degrees, preferably 30: ICAO Annex 14 Vol I
    # (shared/REFERENCES.md section 4, published).
    findings = runway_with_taxiway(angle_deg)
    notes = [f for f in findings if f.code == "I-RUNWAY-CONNECTION" and "Acute-angled exit" in f.message]
    assert len(notes) == 1 and f"{angle_deg:.1f} degrees" in notes[0].message
    warnings = [f for f in findings if f.code == "W-ACUTE-EXIT-ANGLE"]
    assert bool(warnings) is warns
    if warns:
        assert "25 to 45 degrees, preferably 30" in warnings[0].message
        assert "Annex 14" in warnings[0].source and "published" in warnings[0].source


def test_a_connection_neither_square_nor_acute_is_not_named() -> None:
    # 70 degrees: more than 5 from square and beyond the 20 to 60 degree exits (house definitions).
    named = ("I-RUNWAY-CONNECTION", "W-ACUTE-EXIT-ANGLE")
    assert not [f for f in runway_with_taxiway(70.0) if f.code in named]
