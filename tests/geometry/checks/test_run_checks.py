"""run_checks as a whole: order, degenerate layouts, and never raising (hypothesis)."""

from __future__ import annotations

import itertools
import math
import re

import numpy as np
import shapely
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from geometry.checks import CheckInputs, LineInfo, MovementInfo, TrackInfo, run_checks
from geometry.findings import Finding, Severity
from geometry.movements import junction_movements
from geometry.network import LineKind, NetworkLine
from geometry.primitives import Straight
from geometry.rulesets import RuleSetName, get_rule_set
from geometry.theoretical import theoretical_airplane
from tests.geometry.checks.builders import (
    adg3,
    demo_aircraft,
    info,
    line,
    make_inputs,
    obstacle,
    plain_movement,
)

RULE_SET_NAMES: tuple[RuleSetName, ...] = ("FAA", "ICAO")
NUMBER = re.compile(r"nan|inf", re.IGNORECASE)


def assert_clean(findings: tuple[Finding, ...]) -> None:
    for finding in findings:
        assert not NUMBER.search(finding.message), finding.message
        assert all(math.isfinite(value) for value in finding.location_m)
        assert finding.code and finding.rule and finding.source
        prefix = {Severity.ERROR: "E", Severity.WARNING: "W", Severity.INFO: "I"}[finding.severity]
        assert finding.code.startswith(prefix + "-")


def test_an_empty_layout_has_no_findings() -> None:
    empty = CheckInputs(get_rule_set("FAA"), (), (), (), (), (), (), (), (), shapely.Polygon(), {})
    assert run_checks(empty) == ()


def test_lines_without_junctions_or_objects() -> None:
    lines = [info(line("A", [(0, 0), (100, 0)]), adg3()), info(line("B", [(0, 500), (100, 600)]), adg3())]
    findings = run_checks(make_inputs(lines))
    assert_clean(findings)
    assert findings == ()


def test_findings_are_sorted_errors_first_then_by_code_and_location() -> None:
    lines = [info(line("A", [(-500, 0), (500, 0)]), adg3()), info(line("B", [(-500, 30), (500, 30)]), adg3()),
             info(line("C", [(0, 0), (0, 30)]), adg3())]
    objects = [obstacle("o1", shapely.Point(200, -5)), obstacle("o2", shapely.Point(-200, -5))]
    findings = run_checks(make_inputs(lines, objects=objects))
    keys = [(-int(f.severity), f.code, f.location_m) for f in findings]
    assert keys == sorted(keys)
    assert findings[0].severity == Severity.ERROR and findings[-1].severity == Severity.INFO
    objects_found = [f for f in findings if f.code == "E-SEP-TWY-OBJ"]
    assert [f.element_ids[-1] for f in objects_found] == ["o2", "o1"]  # west before east


def test_an_aircraft_beyond_the_design_groups_skips_its_rules_with_a_warning() -> None:
    # 85 m span: beyond ADG VI (< 262 ft) and code F (< 80 m): Annex 14 Table 1-1 / AC 13B Table 1-1.
    huge = demo_aircraft("Demo oversize", wingspan_m=85.0, tail_height_m=20.0)
    lines = [info(line("A", [(-500, 0), (500, 0)]), huge, width_m=40.0),
             info(line("B", [(-500, 20), (500, 20)]), huge, width_m=40.0)]
    findings = run_checks(make_inputs(lines, objects=[obstacle("o", shapely.Point(0, -5))]))
    assert_clean(findings)
    skipped = [f for f in findings if f.code == "W-CHECK-SKIPPED"]
    assert skipped and all("beyond" in f.message for f in skipped)


def test_tracks_with_nan_or_too_few_stations_do_not_leak_into_messages() -> None:
    lines = [info(line("A", [(-200, 0), (200, 0)]), adg3()), info(line("B", [(0, 0), (0, 200)]), adg3())]
    inputs = make_inputs(lines)
    (junction,) = inputs.junctions
    bad = TrackInfo(adg3(), math.nan, (math.nan, 0.0), math.nan, (0.0, math.inf), 3.0,
                    np.array([[np.nan, 0.0]]), np.empty((0, 2)))
    movements = [plain_movement(junction, m, math.nan, tracks=[bad]) for m in junction_movements(junction)]
    pole = obstacle("o", shapely.Point(5, 5))
    findings = run_checks(make_inputs(lines, movements=movements, objects=[pole]))
    assert_clean(findings)


# --- never raises, never prints a NaN: random small layouts ------------------------------------
coordinate = st.floats(-300.0, 300.0, allow_nan=False).map(lambda value: round(value, 1))
points = st.lists(st.tuples(coordinate, coordinate), min_size=2, max_size=4)
kinds = st.sampled_from(["taxiway", "taxilane", "runway"])


def random_line(number: int, vertices: list[tuple[float, float]], kind: str) -> NetworkLine | None:
    segments = []
    for start, end in itertools.pairwise(vertices):
        length = math.dist(start, end)
        if length > 1.0:
            segments.append(Straight(start, math.atan2(end[1] - start[1], end[0] - start[0]), length))
    chained = [segments[0]] if segments else []
    for segment in segments[1:]:
        if math.dist(chained[-1].end, segment.start) < 1e-9:
            chained.append(segment)
    line_kind: LineKind = "runway" if kind == "runway" else ("taxilane" if kind == "taxilane" else "taxiway")
    return NetworkLine(f"L{number}", line_kind, tuple(chained)) if chained else None


# Not TDG 7: its main gear is wider than ICAO's largest OMGWS band, so its rules would be skipped.
AIRCRAFT = [theoretical_airplane(group) for group in ("1A", "2B", "3", "5")]


def random_movements(inputs: CheckInputs, seed: int) -> list[MovementInfo]:
    """Every movement of every junction, with made-up radii, tracks and problems (numpy's
    generator is far cheaper than a hypothesis draw per value)."""
    rng = np.random.default_rng(seed)
    movements = []
    for junction in inputs.junctions:
        x, y = junction.point
        for movement in junction_movements(junction):
            radius = None if rng.random() < 0.3 else float(rng.uniform(1.0, 80.0))
            wingtip = np.array([[x, y], [x + rng.uniform(-40, 40), y + rng.uniform(-40, 40)]])
            track = TrackInfo(AIRCRAFT[rng.integers(len(AIRCRAFT))], float(rng.uniform(0.0, 0.95)), (x, y),
                              float(rng.uniform(-5.0, 5.0)), (x, y), 3.0, wingtip, wingtip[:1])
            problem = "legs too short for a 30 m radius" if rng.random() < 0.2 else None
            movements.append(plain_movement(junction, movement, radius, tracks=[track], problem=problem))
    return movements


@st.composite
def layouts(draw: st.DrawFn) -> CheckInputs:
    lines: list[LineInfo] = []
    for number, (vertices, kind, group, width) in enumerate(draw(st.lists(
            st.tuples(points, kinds, st.sampled_from(AIRCRAFT), st.one_of(st.none(), st.floats(1.0, 60.0))),
            max_size=4))):
        built = random_line(number, vertices, kind)
        if built is not None:
            lines.append(info(built, group, width_m=width))
    objects = [obstacle(f"o{n}", shapely.Point(x, y).buffer(radius)) for n, (x, y, radius) in enumerate(
        draw(st.lists(st.tuples(coordinate, coordinate, st.sampled_from([0.0, 0.5, 4.0])), max_size=3)))]
    rule_set: RuleSetName = draw(st.sampled_from(RULE_SET_NAMES))
    bare = make_inputs(lines, rule_set=rule_set, objects=objects)
    movements = random_movements(bare, draw(st.integers(0, 2**32 - 1)))
    return make_inputs(lines, rule_set=rule_set, objects=objects, movements=movements)


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(layouts())
def test_random_small_layouts_never_raise_and_never_print_nan(inputs: CheckInputs) -> None:
    findings = run_checks(inputs)
    assert_clean(findings)
    assert not [f for f in findings if f.code == "W-CHECK-SKIPPED"]  # every aircraft is within the groups
