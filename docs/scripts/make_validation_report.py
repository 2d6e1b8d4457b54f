"""Write docs/validation.md: every quantity the test suite checks against a published value,
recomputed with the program's own engine, beside the value it is checked against.

Run from the repository root::

    python docs/scripts/make_validation_report.py             # rewrites docs/validation.md
    python docs/scripts/make_validation_report.py --out FILE  # writes the same text to FILE

The exit status is 1 when a row's difference lies outside its tolerance. The inputs are taken
from the same places the tests take them: published values held in ``geometry/standards.py`` are
imported from there, the example aircraft and cases from the test modules under
``tests/geometry``; only values that live nowhere else (Horonjeff Example 6-3's printed results,
Table 6-22) are written here, each with its source. tests/test_docs.py checks that the committed
report equals this script's output and that every row is within its tolerance.
"""

from __future__ import annotations

import argparse
import math
import sys
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path

REPOSITORY = Path(__file__).resolve().parents[2]
if str(REPOSITORY) not in sys.path:  # the test modules are not installed: import them from here
    sys.path.insert(0, str(REPOSITORY))

import numpy as np  # noqa: E402

from geometry import standards as st  # noqa: E402
from geometry.aircraft import DesignAircraft  # noqa: E402
from geometry.classify import (  # noqa: E402
    adg_by_tail_height,
    adg_by_wingspan,
    code_letter_of,
    omgws_band_of,
)
from geometry.errors import OutsideDesignGroupsError  # noqa: E402
from geometry.fillets import fit_fillet  # noqa: E402
from geometry.path import standard_turn_path  # noqa: E402
from geometry.primitives import Arc, Straight  # noqa: E402
from geometry.published import (  # noqa: E402
    fillet_radius_m,
    lead_in_length_m,
    max_body_angle_rad,
    steady_state_main_gear_radius_m,
    steady_state_steering_rad,
)
from geometry.rulesets import get_rule_set  # noqa: E402
from geometry.sweep import steering_limited_radius_steady_state, sweep, sweep_at_stations  # noqa: E402
from geometry.theoretical import theoretical_airplane  # noqa: E402
from geometry.turns import speed_radius_m  # noqa: E402
from geometry.units import from_metres  # noqa: E402
from tests.geometry import sweep_fixture, test_sweep  # noqa: E402
from tests.geometry.scipy_reference import reference_tracks  # noqa: E402
from tests.geometry.test_fillets import layout  # noqa: E402
from tests.geometry.test_published import (  # noqa: E402
    A_EXAMPLE_RAD,
    D_FT,
    M_FT,
    R_FT,
    U_FT,
    W_FT,
    example_aircraft,
    m,
)

DEFAULT_OUTPUT = REPOSITORY / "docs" / "validation.md"
HORONJEFF = "Horonjeff et al., Planning and Design of Airports, 5th ed."
# Printed results of Horonjeff Example 6-3 (the inputs live in tests/geometry/test_published.py).
EXAMPLE_6_3_PRINTED = {"body_angle_deg": 29.0, "lead_in_ft": 68.0, "fillet_radius_ft": 100.1}
# Horonjeff Table 6-22, citing the ICAO Aerodrome Design Manual Part 2: taxiing speed (km/h) and
# centerline radius (m), the radii rounded to 5 m.
TABLE_6_22_KMH_M = ((16, 15), (32, 60), (48, 135), (64, 240), (80, 375), (96, 540))


@dataclass(frozen=True)
class Row:
    """One checked quantity. Values are tuples (one entry, or one per design group); the
    difference is computed minus published, the entry farthest from zero."""
    quantity: str
    published: tuple[float, ...]
    unit: str
    source: str
    computed: tuple[float, ...]
    below: float  # tolerance: the difference may be as low as -below ...
    above: float  # ... and as high as +above
    confidence: str
    decimals: int  # display precision of the computed values and the difference

    @property
    def differences(self) -> list[float]:
        return [c - p for c, p in zip(self.computed, self.published, strict=True)]

    @property
    def difference(self) -> float:
        return max(self.differences, key=abs)

    @property
    def within_tolerance(self) -> bool:
        return all(-self.below <= d <= self.above for d in self.differences)  # False for NaN too


def row(quantity: str, published: float | Sequence[float], unit: str, source: str,
        computed: float | Sequence[float], tolerance: float | tuple[float, float], confidence: str,
        decimals: int) -> Row:
    def as_tuple(values: float | Sequence[float]) -> tuple[float, ...]:
        return tuple(float(v) for v in values) if isinstance(values, Sequence) else (float(values),)

    below, above = tolerance if isinstance(tolerance, tuple) else (tolerance, tolerance)
    return Row(quantity, as_tuple(published), unit, source, as_tuple(computed), below, above, confidence,
               decimals)


def ft(metres: float) -> float:
    return from_metres(metres, "ft")


# --- Horonjeff's closed forms against the engine ---------------------------------------------------

def example_6_3_rows() -> list[Row]:
    source = f"{HORONJEFF} Example 6-3 (printed, rounded)"
    body_deg = math.degrees(max_body_angle_rad(m(R_FT), m(D_FT)))
    lead_ft = ft(lead_in_length_m(m(D_FT), A_EXAMPLE_RAD, m(W_FT), m(U_FT), m(M_FT)))
    return [
        row("Example 6-3: largest body angle A, eq. 6-9 (book rounds to whole degrees)",
            EXAMPLE_6_3_PRINTED["body_angle_deg"], "deg", source, body_deg, 0.5, "published", 2),
        row("Example 6-3: lead-in length L, eq. 6-12 with A = 29 deg (book rounds to whole feet)",
            EXAMPLE_6_3_PRINTED["lead_in_ft"], "ft", source, lead_ft, 0.5, "published", 2),
    ]


def long_turn_rows() -> list[Row]:
    """The fictional aircraft of Example 6-3 (d, u) on a 540-degree turn of R = 150 ft."""
    aircraft = example_aircraft()
    lead_m = 10.0 * aircraft.cmg_m
    path = standard_turn_path(m(R_FT), 3.0 * math.pi, lead_m, lead_m)
    arc = path.segments[1]
    assert isinstance(arc, Arc)
    end = sweep_at_stations(path, aircraft, np.array([lead_m + arc.length_m]))
    swept = sweep(path, aircraft)
    eq = f"{HORONJEFF} eq. 6-11 with eq. 6-9's A (geometry/published.py)"
    steering = steady_state_steering_rad(m(R_FT), aircraft.cmg_m, aircraft.wheelbase_m)
    return [
        row("R = 150 ft, d = 72.1 ft: main-gear radius at the end of a long turn, sqrt(R^2 - d^2)",
            ft(steady_state_main_gear_radius_m(m(R_FT), m(D_FT))), "ft", eq,
            ft(math.dist(end.main_gear_xy[0], arc.center)), 1e-5, "published", 6),
        row("same: inner tyre-edge deviation, R - sqrt(R^2 - d^2) + u/2",
            R_FT - math.sqrt(R_FT**2 - D_FT**2) + U_FT / 2, "ft", eq, ft(swept.max_edge_offset_m), 1e-3,
            "published", 4),
        row("same: nose-gear steering angle, atan(WB / sqrt(R^2 - d^2))", math.degrees(steering), "deg",
            f"{HORONJEFF} eq. 2-1 with the steady-state gear radius", math.degrees(end.steering_rad[0]),
            math.degrees(1e-7), "published", 7),
    ]


def lead_in_row() -> Row:
    """Where the main gear's deviation on the exit straight falls to the straight's spare width
    (as tests/geometry/test_published.py measures it) against eq. 6-12."""
    aircraft = example_aircraft()
    radius_m, lead_m = m(R_FT), 10.0 * aircraft.cmg_m
    path = standard_turn_path(radius_m, 3.0 * math.pi, lead_m, 4.0 * aircraft.cmg_m)
    exit_start_m = lead_m + path.segments[1].length_m
    swept = sweep_at_stations(path, aircraft, np.linspace(exit_start_m, path.length_m, 40001))
    exit_straight = path.segments[2]
    assert isinstance(exit_straight, Straight)
    start, heading = np.array(exit_straight.start), exit_straight.heading_rad
    relative = swept.main_gear_xy - start
    along_m = relative @ np.array([math.cos(heading), math.sin(heading)])
    deviation_m = relative @ np.array([-math.sin(heading), math.cos(heading)])
    allowed_m = (m(W_FT) - m(U_FT) - 2.0 * m(M_FT)) / 2.0
    settled = int(np.argmax(np.abs(deviation_m) <= allowed_m))
    published_ft = ft(lead_in_length_m(aircraft.cmg_m, max_body_angle_rad(radius_m, aircraft.cmg_m),
                                       m(W_FT), m(U_FT), m(M_FT)))
    return row("Example 6-3 after a long turn: travel on the exit straight until the gear deviation "
               "falls to (W - u - 2M)/2", published_ft, "ft",
               f"{HORONJEFF} eq. 6-12 with eq. 6-9's A (geometry/published.py)", ft(along_m[settled]), 0.2,
               "published", 3)


def steady_state_rows() -> list[Row]:
    """tests/geometry/test_sweep.py: d = 20 m, WB = 18 m, MGW = 9 m on a 330-degree turn of 60 m."""
    aircraft = test_sweep.demo_aircraft(cmg_m=20.0, wheelbase_m=18.0, mgw_m=9.0)
    radius_m, d = 60.0, 20.0
    lead_m = 15.0 * d
    swept = sweep(standard_turn_path(radius_m, math.radians(330.0), lead_m, lead_m), aircraft)
    at = test_sweep.station_index(swept, lead_m + radius_m * math.radians(330.0))
    gear_radius_m = math.sqrt(radius_m**2 - d**2)
    offtracking = f"{HORONJEFF} eqs. 6-9 and 6-11"
    return [
        row("R = 60 m, d = 20 m: body angle in the steady state, asin(d/R)",
            math.degrees(math.asin(d / radius_m)), "deg", f"{HORONJEFF} eq. 6-9",
            math.degrees(swept.body_angle_rad[at]), math.degrees(1e-7), "published", 7),
        row("same: main-gear offtracking, R - sqrt(R^2 - d^2)", radius_m - gear_radius_m, "m", offtracking,
            swept.gear_offset_m[at], 1e-5, "published", 6),
        row("same: inner tyre-edge offset, offtracking + MGW/2", radius_m - gear_radius_m + 4.5, "m",
            offtracking, swept.left_edge_offset_m[at], 1e-5, "published", 6),
        row("same: steering angle, atan(WB / sqrt(R^2 - d^2))", math.degrees(math.atan(18.0 / gear_radius_m)),
            "deg", f"{HORONJEFF} eq. 2-1 form", math.degrees(swept.steering_rad[at]), math.degrees(1e-7),
            "published", 7),
        steering_limit_row(test_sweep.demo_aircraft()),
        tractrix_row(test_sweep.demo_aircraft()),
    ]


def steering_limit_row(aircraft: DesignAircraft) -> Row:
    radius_m = steering_limited_radius_steady_state(aircraft)
    lead_m = 15.0 * aircraft.cmg_m
    swept = sweep(standard_turn_path(radius_m, 10.0 * math.pi, lead_m, lead_m), aircraft)
    return row("d = 34 m, WB = 32 m: steering on a long turn at the steady-state limit radius",
               st.FAA_MAX_STEERING.value, "deg", st.FAA_MAX_STEERING.source,
               math.degrees(swept.max_steering_rad), 1e-6, st.FAA_MAX_STEERING.confidence, 7)


def tractrix_row(aircraft: DesignAircraft) -> Row:
    alpha0 = 1.2
    swept = sweep(test_sweep.build_path([("S", 300.0, 0.0)]), aircraft, initial_body_angle_rad=alpha0)
    expected = 2.0 * np.arctan(math.tan(alpha0 / 2.0) * np.exp(-swept.station_m / aircraft.cmg_m))
    error_deg = math.degrees(float(np.abs(swept.body_angle_rad - expected).max()))
    return row("d = 34 m: body angle on a straight, largest error against tan(a/2) = tan(a0/2) exp(-s/d)",
               0.0, "deg", "the classical tractrix (shared/REFERENCES.md section 1)", error_deg,
               math.degrees(1e-12), "identity", 12)


def scipy_rows() -> list[Row]:
    rows = []
    for case, (pieces, alpha0) in test_sweep.REFERENCE_CASES.items():
        path = test_sweep.build_path(pieces, start=(3.0, 4.0), heading_rad=0.3)
        aircraft = test_sweep.demo_aircraft()
        swept = sweep(path, aircraft, initial_body_angle_rad=alpha0)
        reference = reference_tracks(path, aircraft, swept.station_m, alpha0)
        error_m = max(float(np.linalg.norm(getattr(swept, track) - reference[track], axis=1).max())
                      for track in test_sweep.TRACKS[1:])
        rows.append(row(f"{case}: largest distance between any track and the reference", 0.0, "mm",
                        "scipy DOP853, rtol = atol = 1e-12 (tests/geometry/scipy_reference.py)",
                        1000.0 * error_m, 1000.0 * test_sweep.FEET_0_001_M, "identity", 3))
    return rows


def fillet_rows() -> list[Row]:
    """tests/geometry/test_fillets.py: a 150-degree turn on R = 4 d, fitted against eq. 6-11/6-12."""
    plane, margin_m = sweep_fixture.demo_aircraft(25.0, 12.0), 4.5
    radius_m = 4.0 * plane.cmg_m
    corner = sweep_fixture.Corner((0.0, 0.0), 0.0, math.radians(30.0), radius_m)
    case = layout(corner, (plane,), margin_m, 2.0)
    fillet = fit_fillet(case.required, list(case.legs), corner.junction, corner.heading_a_rad,
                        corner.heading_b_rad, case.width_m, case.width_m, corner.center, radius_m, "J1|a~b")
    assert fillet is not None
    body_angle_rad = math.asin(plane.cmg_m / radius_m)
    lead_in_m = lead_in_length_m(plane.cmg_m, body_angle_rad, case.width_m, plane.mgw_m, margin_m)
    label = "d = 25 m, MGW = 12 m, M = 4.5 m, 150-degree turn on R = 100 m"
    return [
        row(f"{label}: fitted fillet radius F against eq. 6-11",
            fillet_radius_m(radius_m, plane.cmg_m, plane.mgw_m, margin_m), "m", f"{HORONJEFF} eq. 6-11",
            fillet.fillet_radius_m, (0.0135, 0.001), "published", 4),
        row("same: taper start beyond the tangent point against the lead-in L of eq. 6-12", lead_in_m, "m",
            f"{HORONJEFF} eq. 6-12", fillet.taper_a_m - corner.tangent_m, (0.1, 0.5), "published", 3),
    ]


# --- standards: band edges found by the classifier, tables against their formulas ----------------

def _first_beyond(classify: Callable[[float], object], names: Sequence[object], index: int,
                  high_m: float) -> float:
    """The smallest size (m) that ``classify`` puts beyond group ``index`` (or refuses), by bisection."""
    def beyond(size_m: float) -> bool:
        try:
            return names.index(classify(size_m)) > index
        except OutsideDesignGroupsError:
            return True

    low_m = 1e-3
    for _ in range(200):
        middle_m = 0.5 * (low_m + high_m)
        if middle_m in (low_m, high_m):
            break
        low_m, high_m = (low_m, middle_m) if beyond(middle_m) else (middle_m, high_m)
    return high_m


def band_edge_rows() -> list[Row]:
    cases = (  # quantity, stored edges, classifier, group names, display unit
        ("ADG: upper wingspan edges, I to VI", st.ADG_WINGSPAN_EDGES_FT, adg_by_wingspan, st.ADG_NAMES, "ft"),
        ("ADG: upper tail-height edges, I to VI", st.ADG_TAIL_HEIGHT_EDGES_FT, adg_by_tail_height,
         st.ADG_NAMES, "ft"),
        ("ICAO code letter: upper wingspan edges, A to F", st.CODE_LETTER_WINGSPAN_EDGES_M, code_letter_of,
         st.CODE_LETTERS, "m"),
        ("ICAO OMGWS bands 1 to 4: upper edges", st.OMGWS_EDGES_M, omgws_band_of, (1, 2, 3, 4), "m"),
    )
    rows = []
    for quantity, edges, classify, names, unit in cases:
        found_m = [_first_beyond(classify, names, i, 2.0 * edges[-1].value_m) for i in range(len(edges))]
        rows.append(row(quantity + " (where the classifier changes group)", [e.value for e in edges], unit,
                        edges[0].source, [from_metres(v, unit) for v in found_m], 1e-6,
                        edges[0].confidence, 7))
    return rows


def _grouped(table: dict[str, st.RuleValue]) -> list[tuple[list[str], st.RuleValue]]:
    """Groups that share one source and confidence, in TDG order."""
    groups: dict[tuple[str, str], list[str]] = {}
    for tdg in st.TDG_NAMES:
        value = table[tdg]
        groups.setdefault((value.source, value.confidence), []).append(tdg)
    return [(tdgs, table[tdgs[0]]) for tdgs in groups.values()]


def faa_tdg_rows() -> list[Row]:
    faa = get_rule_set("FAA")
    rows = []
    for label, table, ask in (("straight taxiway width", st.FAA_TAXIWAY_WIDTH_FT, faa.straight_width),
                              ("TESM", st.FAA_TESM_FT, lambda a: faa.edge_margin(a, on_curve=True))):
        for tdgs, first in _grouped(table):
            computed = [ft(ask(theoretical_airplane(tdg)).value_m) for tdg in tdgs]
            rows.append(row(f"FAA {label}, TDG {', '.join(tdgs)} (rule set, for the TDG's theoretical "
                            "airplane)", [table[t].value for t in tdgs], "ft", first.source, computed, 1e-6,
                            first.confidence, 3))
    widths = [st.tdg_rule(st.FAA_TAXIWAY_WIDTH_FT, box.tdg).value for box in st.TDG_CHART]
    held = [box.max_mgw.value + 2.0 * st.tdg_rule(st.FAA_TESM_FT, box.tdg).value for box in st.TDG_CHART]
    rows.append(row("FAA straight width = largest MGW of the TDG + 2 TESM, TDG 1A to 7", widths, "ft",
                    "identity with the TDG chart and the TESM (docs/standards.md)", held, 1e-6, "identity",
                    3))
    return rows


def faa_separation_rows() -> list[Row]:
    spans = [edge.value for edge in st.ADG_WINGSPAN_EDGES_FT]
    rows = []
    for name, entry in st.FAA_ADG_TABLE.items():
        formula = f"{entry.slope:g} WS + {entry.offset_ft:g}" if entry.offset_ft else f"{entry.slope:g} WS"
        rows.append(row(f"FAA {name.replace('_', ' ')}, ADG I to VI: table against {formula}",
                        entry.values_ft, "ft", entry.source, [st.faa_formula_ft(name, s) for s in spans], 1.0,
                        entry.confidence, 1))
    rows.append(row("FAA runway CL to parallel taxiway CL, C/D-II, minimums lower than 3/4 mile (rule set)",
                    st.FAA_RUNWAY_TAXIWAY_FT["lower_than_3_4_mile"][1], "ft",
                    "an airport master plan citing the AC (C/D-II, 1/2 mile minimums)",
                    get_rule_set("FAA").separation("runway_taxiway", theoretical_airplane("2B")).value, 1e-6,
                    "published", 1))
    return rows


def _code_f_aircraft() -> DesignAircraft:
    """A fictional code F aircraft; only its 79 m wingspan matters to the rows below."""
    return DesignAircraft("Demo code F", cmg_m=36.0, wheelbase_m=33.0, mgw_m=14.3, tyre_width_m=1.4,
                          wingspan_m=79.0, wingtip_x_m=-10.0, nose_x_m=40.0, tail_x_m=-45.0,
                          tail_height_m=24.0)


def icao_rows() -> list[Row]:
    spans = [edge.value for edge in st.CODE_LETTER_WINGSPAN_EDGES_M]
    rows = []
    for name, values in st.ICAO_SEPARATION_M.items():
        kind = "taxiway" if name.startswith("taxiway") else "taxilane"
        reach = [s / 2 if name.endswith("object") else s for s in spans]
        margins = st.ICAO_WINGTIP_CLEARANCE_M[kind]
        wording = "WS/2" if name.endswith("object") else "WS"
        rows.append(row(f"ICAO {name.replace('_', ' ')}, codes A to F: Table 3-1 against {wording} + wingtip "
                        "clearance", values, "m", st.ICAO_SEPARATION_SOURCE,
                        [r + c for r, c in zip(reach, margins, strict=True)], 1e-6, "from memory", 1))
    clearance, margin = st.ICAO_MIXED_CODE_CLEARANCE_M, st.ICAO_SAFETY_MARGIN_F_M
    rows.append(row("ICAO taxiway CL to taxiway CL, code F with F: Table 3-1 against the ADM formula "
                    "WS/2 + WS/2 + C + Z", st.ICAO_SEPARATION_M["taxiway_taxiway"][5], "m", clearance.source,
                    st.icao_mixed_code_separation_m(spans[5], spans[5], clearance.value_m, margin.value_m),
                    1e-6, "published", 1))
    non_instrument = get_rule_set("ICAO").separation("runway_taxiway", _code_f_aircraft(),
                                                     instrument_runway=False, code_number=4)
    rows.append(row("ICAO runway CL to parallel taxiway CL, code F, non-instrument (rule set: half strip "
                    "+ half span)", 115.0, "m", "a draft ICAO circular on new larger aeroplanes, Table 3-1 "
                    "(shared/REFERENCES.md section 4)", non_instrument.value, 1e-6, "published", 1))
    widths = [w.value for w in st.ICAO_TAXIWAY_WIDTH_M]
    edges = zip(st.OMGWS_EDGES_M, st.ICAO_EDGE_CLEARANCE_M, strict=True)
    held = [edge.value + 2.0 * clearance.value for edge, clearance in edges]
    rows.append(row("ICAO straight width = largest OMGWS of the band + 2 clearances, bands 1 to 4", widths,
                    "m", st.ICAO_TAXIWAY_WIDTH_M[0].source, held, 1e-6, "from memory", 2))
    return rows


def speed_rows() -> list[Row]:
    from app.model.design_context import DESIGN_TAXI_SPEED_KMH

    speeds = [kmh for kmh, _ in TABLE_6_22_KMH_M]
    table = f"{HORONJEFF} Table 6-22, citing the ICAO ADM Part 2 (radii rounded to 5 m)"
    design = dict(TABLE_6_22_KMH_M)[int(DESIGN_TAXI_SPEED_KMH)]
    radii = [st.turn_radius_for_speed_m(v) for v in speeds]
    return [
        row(f"centerline radius for {'/'.join(map(str, speeds))} km/h, R = V^2 / 17.07",
            [r for _, r in TABLE_6_22_KMH_M], "m", table, radii, 0.5, "published", 1),
        row(f"default radius of turns under 90 degrees: design speed {DESIGN_TAXI_SPEED_KMH:g} km/h "
            "(geometry/turns.py)", design, "m", table, speed_radius_m(DESIGN_TAXI_SPEED_KMH), 0.5,
            "published", 1),
    ]


SECTIONS: tuple[tuple[str, str, Callable[[], list[Row]]], ...] = (
    ("Horonjeff's closed forms and the engine",
     "geometry/published.py evaluates Horonjeff's equations; the engine (geometry/sweep.py) follows the "
     "whole movement. On a long turn the engine reaches the steady state the equations describe.",
     lambda: [*example_6_3_rows(), *long_turn_rows(), lead_in_row(), *steady_state_rows()]),
    ("The engine against an independent integration",
     "The pursuit equation integrated in plan coordinates by scipy (DOP853), sharing nothing with the "
     "engine but the centerline; every track of a fictional widebody-sized aircraft.", scipy_rows),
    ("The buildable fillet on a long turn",
     "geometry/fillets.py fits the least-area fillet to the swept required pavement; on a turn long enough "
     "to settle it must agree with the steady-state fillet of eqs. 6-11 and 6-12.", fillet_rows),
    ("Design groups: where the classifier changes group",
     "Found by bisection on the classification functions (geometry/classify.py), to within 1e-6.",
     band_edge_rows),
    ("FAA widths, edge margins and separations", "Values of geometry/standards.py as the FAA rule set "
     "returns them, and each separation table against the formula behind it.",
     lambda: [*faa_tdg_rows(), *faa_separation_rows()]),
    ("ICAO separations and widths", "Values of geometry/standards.py against the relations that tie them to "
     "the code letter's wingspan and the OMGWS band.", icao_rows),
    ("Taxiing speed and curve radius", "geometry/standards.py and geometry/turns.py against Table 6-22.",
     speed_rows),
)


# --- where the published values and the tool part ways (reported, not checked) --------------------

def discrepancy_notes() -> list[str]:
    with_29_ft = ft(fillet_radius_m(m(R_FT), m(D_FT), m(U_FT), m(M_FT), A_EXAMPLE_RAD))
    exact_ft = ft(fillet_radius_m(m(R_FT), m(D_FT), m(U_FT), m(M_FT)))
    aircraft, steady_ft = example_aircraft(), R_FT - math.sqrt(R_FT**2 - D_FT**2) + U_FT / 2
    lead_m = 10.0 * aircraft.cmg_m
    short = [ft(sweep(standard_turn_path(m(R_FT), math.radians(turn), lead_m, lead_m), aircraft)
                .max_edge_offset_m) for turn in (30, 60, 90)]
    instrument = get_rule_set("ICAO").separation("runway_taxiway", _code_f_aircraft()).value
    return [
        f"Horonjeff Example 6-3 prints a fillet radius F = {EXAMPLE_6_3_PRINTED['fillet_radius_ft']:g} ft. "
        f"Eq. 6-11 with its A = 29 deg gives {with_29_ft:.2f} ft, and with eq. 6-9's exact A "
        f"{exact_ft:.2f} ft: the printed value does not reproduce (shared/REFERENCES.md section 2). The "
        "tests assert on the formula.",
        f"Eq. 6-11 is the steady state. On shorter turns the engine follows the transient, which stays "
        f"inside it: for Example 6-3's R and d the inner tyre edge deviates {short[0]:.2f}, {short[1]:.2f} "
        f"and {short[2]:.2f} ft in turns of 30, 60 and 90 degrees, against {steady_ft:.2f} ft in the "
        "steady state, so the engine's fillets are smaller than eq. 6-11's there.",
        "ICAO runway CL to parallel taxiway CL, code F, instrument runway: the older published value is "
        f"190 m (a 300 m strip). The rule set uses the 280 m strip of the 8th edition (from memory) and "
        f"gives {instrument:g} m. Verify against Annex 14 Table 3-1 before relying on it.",
    ]


# --- the report ------------------------------------------------------------------------------------

def _fixed(value: float, decimals: int) -> str:
    """``value`` at ``decimals``, signless when it rounds to zero (no "-0.00", and no telling an
    exact zero from float noise, which differs from machine to machine)."""
    text = f"{value:.{decimals}f}"
    return text.lstrip("-") if float(text) == 0.0 else text


def _plain(value: float, decimals: int) -> str:
    text = _fixed(value, decimals)
    return text.rstrip("0").rstrip(".") if "." in text else text


def _short(value: float) -> str:
    return f"{value:.0e}" if 0.0 < value < 1e-3 else f"{value:.4g}"


def format_row(r: Row) -> str:
    published = " / ".join(_plain(v, r.decimals) for v in r.published)
    computed = " / ".join(_fixed(v, r.decimals) for v in r.computed)
    difference = _fixed(r.difference, r.decimals)
    if float(difference) > 0.0:
        difference = "+" + difference
    tolerance = f"± {_short(r.below)}" if r.below == r.above else f"−{_short(r.below)} / +{_short(r.above)}"
    cells = (r.quantity, f"{published} {r.unit}", r.source, f"{computed} {r.unit}", difference, tolerance,
             r.confidence)
    return "| " + " | ".join(cell.replace("|", "/") for cell in cells) + " |"


HEADER = """# Validation report

Generated by `docs/scripts/make_validation_report.py` from the program's own engine; do not edit
by hand. `tests/test_docs.py` fails when this file differs from the script's output or when a
row leaves its tolerance.

Each row is a quantity the test suite checks against a published value (or against a relation that
follows from the model's own definitions). **Published value** is the value as published, or as
held in `geometry/standards.py` with its confidence; **taxiwright computes** is what the program
gives for it; **difference** is computed minus published (for a list, the entry farthest from
zero), shown to the row's display precision; **tolerance** is what the test allows. Confidence:

- **published**: read in a public copy of the source named;
- **common practice**: a trade fact or modelling assumption with no document behind it;
- **from memory**: known from practice but not found in a public copy: verify against the
  document named before relying on a result (docs/standards.md lists every such value);
- **identity**: follows from the model's own definitions or from another row.

Where a value is listed per group, the groups are in order (ADG I to VI, code letters A to F,
TDG 1A to 7 as named). All aircraft here are fictional.
"""
COLUMNS = ("| quantity | published value | source | taxiwright computes | difference | tolerance | "
           "confidence |\n|---|---|---|---|---|---|---|")
CAUTION = """> **Caution.** Agreement with these references shows that the program computes what its
> model and rule tables say. It does not make the tables that are marked "from memory" right, nor
> the model complete (docs/method.md says what it leaves out). taxiwright produces preliminary
> planning layouts only; final design is the work of a licensed engineer."""


def build_report() -> tuple[str, list[Row]]:
    parts, every_row = [HEADER], []
    for number, (title, intro, make_rows) in enumerate(SECTIONS, start=1):
        rows = make_rows()
        every_row.extend(rows)
        table = "\n".join(map(format_row, rows))
        parts.append(f"## {number}. {title}\n\n{intro}\n\n{COLUMNS}\n{table}\n")
    notes = "\n".join(f"- {note}" for note in discrepancy_notes())
    parts.append(f"## {len(SECTIONS) + 1}. Where the references and the tool part ways\n\n"
                 f"Reported here, not checked as rows:\n\n{notes}\n")
    outside = sum(not r.within_tolerance for r in every_row)
    parts.insert(1, f"**{len(every_row)} rows, {len(every_row) - outside} within their tolerance.**\n")
    parts.append(CAUTION + "\n")
    return "\n".join(parts), every_row


def write_report(path: Path) -> list[Row]:
    """Compute every row, write the report to ``path`` and return the rows."""
    text, rows = build_report()
    path.write_text(text, encoding="utf-8")
    return rows


def main(argv: Sequence[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Write the validation report (docs/validation.md).")
    parser.add_argument("--out", type=Path, default=DEFAULT_OUTPUT, help="where to write the report")
    args = parser.parse_args(argv)
    rows = write_report(args.out)
    outside = [r.quantity for r in rows if not r.within_tolerance]
    print(f"{args.out}: {len(rows)} rows, {len(rows) - len(outside)} within their tolerance")
    for quantity in outside:
        print(f"  OUTSIDE its tolerance: {quantity}")
    return 1 if outside else 0


if __name__ == "__main__":
    sys.exit(main())
