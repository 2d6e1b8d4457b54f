"""Build every sample layout of the fictional Marrowby Field (docs/demo_airfield.md).

Run from the repository root::

    python docs/scripts/make_samples.py            # writes sample_layouts/*.json
    python docs/scripts/make_samples.py --out DIR  # writes the same files into DIR

Every layout is made with the model's own API (``app.model.elements`` values, ``app.model.edits``
functions) and written with ``app.fileio.layout_json.save_layout``; the aircraft come from the
demo library (``load_demo_library``). Re-running the script writes byte-identical files.

Coordinates are designed in the layout's units and converted to metres once, here. Junctions are
built on axis-aligned through lines wherever a line ends on another, so that end lies exactly on
the through line. Every name, place and aircraft is fictional.
"""

from __future__ import annotations

import argparse
import math
from collections.abc import Callable, Iterable, Iterator, Sequence
from pathlib import Path
from typing import Any

from app.fileio.aircraft_library import load_demo_library
from app.fileio.layout_json import save_layout
from app.model import edits
from app.model.design_context import DesignContext, line_design_aircraft
from app.model.elements import (
    Centerline,
    CenterlineKind,
    DesignGroup,
    Element,
    ExistingPavement,
    FixedObject,
    Layout,
    ObjectKind,
    RuleSetName,
    Runway,
    Vertex,
)
from geometry.aircraft import DesignAircraft
from geometry.centerline import centerline_segments
from geometry.checks.crossovers import crossover_spacing
from geometry.movements import Movement, junction_corners, junction_movements
from geometry.network import Junction, LineKind, NetworkLine, build_network
from geometry.rulesets import get_rule_set
from geometry.units import LengthUnit, from_metres, to_metres

REPOSITORY = Path(__file__).resolve().parents[2]
DEFAULT_FOLDER = REPOSITORY / "sample_layouts"

CAUTION = ("Caution: a preliminary planning layout of a fictional airfield. Verify every result "
           "against the governing standard (FAA AC 150/5300-13B or ICAO Annex 14 and its manuals), "
           "local codes and the aircraft manufacturers' data; final design is the work of a licensed "
           "engineer.")
SPACING_STEP_FT = 5.0  # built crossover spacings are the governing value rounded up to this step

XYs = Sequence[tuple[float, float]]
TIDY_STEP = 0.01  # computed coordinates are rounded to this, in the layout's units


# --- element helpers: coordinates in the layout's units, stored in metres ---------------------

def _metres(value: float, units: LengthUnit) -> float:
    """``value`` in metres; refuses a value the file would not show as written (e.g. 900 ft is
    stored as 274.32 m and saved back as 899.9999999999999 ft): pick another, or :func:`_tidy` it."""
    value_m = to_metres(value, units)
    if from_metres(value_m, units) != value:
        raise ValueError(f"{value!r} {units} does not survive the metre round trip: choose a neighbour")
    return value_m


def _tidy(value: float, units: LengthUnit) -> float:
    """A computed coordinate rounded to TIDY_STEP, moved by a step or two if the plain rounding
    would not survive the metre round trip."""
    nearest = round(value / TIDY_STEP)
    for offset in (0, 1, -1, 2, -2, 3, -3):
        candidate = round((nearest + offset) * TIDY_STEP, 6)
        if from_metres(to_metres(candidate, units), units) == candidate:
            return candidate
    raise ValueError(f"no tidy value near {value!r} {units}")


def _aircraft(*names: str) -> tuple[DesignAircraft, ...]:
    library = {aircraft.name: aircraft for aircraft in load_demo_library()}
    return tuple(library[name] for name in names)


def _vertex(units: LengthUnit, point: tuple[float, float]) -> Vertex:
    return Vertex(_metres(point[0], units), _metres(point[1], units))


def _line(units: LengthUnit, line_id: str, name: str, points: XYs, *, kind: CenterlineKind = "taxiway",
          tdg: str | None = None, width: float | None = None) -> Centerline:
    vertices = tuple(_vertex(units, point) for point in points)
    width_m = None if width is None else _metres(width, units)
    return Centerline(line_id, name, vertices, kind, DesignGroup(tdg=tdg), width_m)


def _runway(units: LengthUnit, runway_id: str, designation: str, first: tuple[float, float],
            second: tuple[float, float], width: float) -> Runway:
    ends = (_vertex(units, first), _vertex(units, second))
    return Runway(runway_id, designation, ends, _metres(width, units))


def _object(units: LengthUnit, object_id: str, name: str, kind: ObjectKind, height: float,
            outline: XYs) -> FixedObject:
    points = tuple((_metres(x, units), _metres(y, units)) for x, y in outline)
    return FixedObject(object_id, name, points, _metres(height, units), kind)


def _box(x0: float, y0: float, x1: float, y1: float) -> tuple[tuple[float, float], ...]:
    return ((x0, y0), (x1, y0), (x1, y1), (x0, y1))


def _pavement(units: LengthUnit, pavement_id: str, name: str, outline: XYs) -> ExistingPavement:
    points = tuple((_metres(x, units), _metres(y, units)) for x, y in outline)
    return ExistingPavement(pavement_id, name, points)


ADDERS: dict[type, Callable[[Layout, Any], Layout]] = {
    Centerline: edits.add_centerline, Runway: edits.add_runway, FixedObject: edits.add_object,
    ExistingPavement: edits.add_existing_pavement}


def _layout(title: str, notes: Iterable[str], rule_set: RuleSetName, units: LengthUnit,
            fleet: Iterable[DesignAircraft], elements: Iterable[Element]) -> Layout:
    """A layout made through the edit functions, with the caution appended to its notes."""
    layout = edits.set_title_notes(Layout(), title, "\n".join([*notes, CAUTION]))
    layout = edits.set_units(edits.set_rule_set(layout, rule_set), units)
    layout = edits.set_fleet(layout, fleet)
    for element in elements:
        layout = ADDERS[type(element)](layout, element)
    edits.check_layout(layout)
    return layout


# --- movement and corner keys, found the way the analysis finds them ---------------------------

def _network_line(element: Centerline | Runway) -> NetworkLine:
    kind: LineKind = element.kind if isinstance(element, Centerline) else "runway"
    radii = [vertex.corner_radius_m for vertex in element.vertices]
    return NetworkLine(element.id, kind, centerline_segments([v.xy for v in element.vertices], radii))


def _junctions(layout: Layout) -> tuple[Junction, ...]:
    elements: list[Centerline | Runway] = [*layout.centerlines, *layout.runways]
    return build_network([_network_line(element) for element in elements]).junctions


def _turns_touching(layout: Layout, line_id: str) -> Iterator[Movement]:
    for junction in _junctions(layout):
        if line_id in junction.line_ids:
            yield from (m for m in junction_movements(junction) if m.kind == "turn")


def _exclude_sharp_turns(layout: Layout, line_id: str, over_deg: float) -> Layout:
    """Leave out the turns sharper than ``over_deg`` at every junction of ``line_id``."""
    for movement in _turns_touching(layout, line_id):
        if abs(math.degrees(movement.turn_rad)) > over_deg:
            layout = edits.set_movement_excluded(layout, movement.key, True)
    return layout


def _corner_between(layout: Layout, line_a: str, heading_a_deg: float, line_b: str,
                    heading_b_deg: float) -> str:
    """Key of the corner bounded by the leg of ``line_a`` leaving at ``heading_a_deg`` and the leg
    of ``line_b`` leaving at ``heading_b_deg`` (headings counter-clockwise from east)."""
    def matches(leg_line: str, heading_rad: float, line_id: str, heading_deg: float) -> bool:
        off_deg = math.remainder(math.degrees(heading_rad) - heading_deg, 360.0)
        return leg_line == line_id and abs(off_deg) < 1.0

    for junction in _junctions(layout):
        for corner in junction_corners(junction):
            first, second = corner.first_leg, corner.second_leg
            for one, other in ((first, second), (second, first)):
                if (matches(one.line_id, one.heading_rad, line_a, heading_a_deg)
                        and matches(other.line_id, other.heading_rad, line_b, heading_b_deg)):
                    return corner.key
    raise LookupError(f"no corner between {line_a} at {heading_a_deg} deg and {line_b} "
                      f"at {heading_b_deg} deg")


def _polar(units: LengthUnit, x: float, y: float, heading_deg: float, length: float) -> tuple[float, float]:
    """The free end of a line leaving (x, y) at ``heading_deg`` for ``length``, tidied."""
    angle = math.radians(heading_deg)
    return (_tidy(x + length * math.cos(angle), units), _tidy(y + length * math.sin(angle), units))


def _with_radius(layout: Layout, radius_m: float, corners: Iterable[tuple[str, float, str, float]]) -> Layout:
    """``layout`` with the turn radius ``radius_m`` set by hand on each corner named by
    (line, leg heading, line, leg heading)."""
    for corner in corners:
        layout = edits.set_turn_radius_override(layout, _corner_between(layout, *corner), radius_m)
    return layout


# A faster turn-off than the 32 km/h default: R = V^2 / 17.07 at 48 km/h gives 135 m (Horonjeff,
# Planning and Design of Airports, Table 6-22, citing the ICAO Aerodrome Design Manual Part 2).
EXIT_RADIUS_M = 135.0
EXIT_RADIUS_NOTE = ("its 30-degree turn off the runway has a 135 m (443 ft) radius set by hand: a turn "
                    "taken at 48 km/h (R = V^2 / 17.07, Horonjeff Table 6-22, citing the ICAO Aerodrome "
                    "Design Manual Part 2)")


# --- 1. the main sample -------------------------------------------------------------------------

def _main_elements(ft: LengthUnit, a_y: float, b_y: float) -> list[Element]:
    exit_end = (_tidy(3200.0 + a_y / math.tan(math.radians(30.0)), ft), a_y)  # on A: y exact
    return [
        _runway(ft, "rwy-09-27", "09/27", (0.0, 0.0), (9000.0, 0.0), 150.0),
        _line(ft, "twy-a", "A", [(0.0, a_y), (9000.0, a_y)]),
        _line(ft, "twy-b", "B", [(2000.0, b_y), (6000.0, b_y)]),
        _line(ft, "twy-a1", "A1", [(0.0, 0.0), (0.0, a_y)]),
        _line(ft, "twy-a2", "A2", [(1500.0, 0.0), (1500.0, a_y)]),
        _line(ft, "twy-a3", "A3", [(3200.0, 0.0), exit_end]),
        _line(ft, "twy-a4", "A4", [(5000.0, 0.0), (5000.0, b_y)]),
        _line(ft, "twy-a5", "A5", [(9000.0, 0.0), (9000.0, a_y)]),
        _line(ft, "twy-b1", "B1", [(2500.0, a_y), (2500.0, b_y)]),
        _line(ft, "tln-c", "C", [(4000.0, b_y), (4000.0, b_y + 600.0)], kind="taxilane"),
        _object(ft, "bldg-terminal", "Terminal", "building", 45.0, _box(4200.0, 1200.0, 4700.0, 1550.0)),
        _object(ft, "bldg-cargo", "Cargo shed", "building", 35.0, _box(3300.0, 1200.0, 3800.0, 1500.0)),
        _object(ft, "bldg-hangar", "Maintenance hangar", "building", 60.0,
                _box(6200.0, 1200.0, 6700.0, 1550.0)),
        _object(ft, "sign-b", "Direction sign B / C", "sign", 4.0, [(3200.0, 1250.0)]),
        _object(ft, "nav-gs", "Glide slope antenna, runway 09", "navaid", 30.0, [(1000.0, -600.0)]),
        _object(ft, "nav-windcone", "Wind cone", "navaid", 15.0, [(2600.0, -700.0)]),
        _object(ft, "nav-beacon", "Airfield beacon", "navaid", 50.0, [(7250.0, 1500.0)]),
    ]


def marrowby_field() -> Layout:
    ft: LengthUnit = "ft"
    notes = [
        "Marrowby Field, the whole airfield: runway 09/27 (9,000 ft x 150 ft) with full-length parallel "
        "taxiway A 600 ft north of it, a partial second parallel B 350 ft further north, and the apron "
        "taxilane C between the cargo shed and the terminal.",
        "Look at: the right-angle entrances A1 (runway 09 end) and A5 (runway 27 end); the right-angle "
        "connector A2 (T-junctions on the runway and on A); the acute-angled exit A3 (30 degrees, for "
        "aircraft landing on runway 09); the four-way 90-degree crossing of A4 and A, and the T of A4 on B; "
        "the crossover B1 between A and B, through which an aircraft can reverse direction; the apron "
        "taxilane C.",
        f"Exit A3: {EXIT_RADIUS_NOTE}. Its 150-degree turns are excluded from the design: A3 is used only "
        "by aircraft leaving runway 09 toward the east end of A.",
        "Design fleet (demo library): Brindleway 50 (TDG 3, ADG III), Ostrander 180 (TDG 3, ADG III) and "
        "Marrowgate 300 (TDG 5, ADG V), which governs: 75 ft taxiways, 267 ft between parallel taxiways "
        "(A to B is 350 ft), 400 ft from an instrument runway to its parallel taxiway (A is at 600 ft, "
        "which leaves room for the exit's turn).",
    ]
    layout = _layout("Marrowby Field - airfield layout", notes, "FAA", ft,
                     _aircraft("Brindleway 50", "Ostrander 180", "Marrowgate 300"),
                     _main_elements(ft, 600.0, 950.0))
    layout = _with_radius(layout, EXIT_RADIUS_M, [("rwy-09-27", 180.0, "twy-a3", 30.0)])
    return _exclude_sharp_turns(layout, "twy-a3", 120.0)


# --- 2. a four-way crossing and a T-junction, for TDG 3 and TDG 5 fleets -----------------------

FOUR_WAY_FLEETS = {"3": ("Brindleway 50", "Ostrander 180"), "5": ("Marrowgate 300",)}
# Runway width by design group: 100 ft for ADG III, 150 ft for ADG V (from memory, verify against
# AC 150/5300-13B). The TDG 3 turn radius (54 ft) must exceed half the runway width for a fillet.
FOUR_WAY_RUNWAY_WIDTH_FT = {"3": 100.0, "5": 150.0}


def four_way_and_tee(tdg: str) -> Layout:
    ft: LengthUnit = "ft"
    other = "5" if tdg == "3" else "3"
    elements: list[Element] = [
        _runway(ft, "rwy-09-27", "09/27", (0.0, 0.0), (5000.0, 0.0), FOUR_WAY_RUNWAY_WIDTH_FT[tdg]),
        _line(ft, "twy-a", "A", [(0.0, 400.0), (5000.0, 400.0)]),
        _line(ft, "twy-a1", "A1", [(1500.0, 0.0), (1500.0, 1000.0)]),
        _line(ft, "twy-a2", "A2", [(3200.0, 400.0), (3200.0, 1000.0)]),
    ]
    notes = [
        f"Marrowby Field, the west end of runway 09/27 ({FOUR_WAY_RUNWAY_WIDTH_FT[tdg]:g} ft wide) and its "
        f"parallel taxiway A, designed for a TDG {tdg} fleet: {' and '.join(FOUR_WAY_FLEETS[tdg])} "
        "(demo library).",
        "Look at: the four-way 90-degree crossing of A1 and A (eight turns, four fillets) and the "
        "T-junction of A2 on A (four turns, two fillets); compare the fillets, the tyre tracks and the "
        f"pavement area with four_way_and_tee_tdg{other}.json, which has the same centerlines and a "
        f"TDG {other} fleet.",
    ]
    return _layout(f"Marrowby Field - four-way crossing and T-junction, TDG {tdg}", notes, "FAA", ft,
                   _aircraft(*FOUR_WAY_FLEETS[tdg]), elements)


# --- 3. skewed junctions ---------------------------------------------------------------------------

SKEW_ANGLES_DEG = (30.0, 45.0, 60.0, 120.0, 135.0, 150.0)
SKEW_CONNECTOR_FT = 800.0
SKEW_STEP_FT = 1600.0


def skewed_junctions() -> Layout:
    ft: LengthUnit = "ft"
    elements: list[Element] = [_line(ft, "twy-a", "A", [(0.0, 0.0), (10000.0, 0.0)])]
    for number, angle_deg in enumerate(SKEW_ANGLES_DEG, start=1):
        start = (1000.0 + (number - 1) * SKEW_STEP_FT, 0.0)  # on A: y exact
        elements.append(_line(ft, f"twy-a{number}", f"A{number}",
                              [start, _polar(ft, *start, angle_deg, SKEW_CONNECTOR_FT)]))
    notes = [
        "Marrowby Field, the north service taxiway A with six connectors A1 to A6 leaving it at 30, 45, "
        "60, 120, 135 and 150 degrees (measured from the eastward direction of A), 1,600 ft apart.",
        "Look at: how the turn radius, the fillet and the added pavement grow with the turn angle; the "
        "acute side of each skewed junction needs a turn of 180 degrees minus the skew, whose tangent "
        "length is the longest of the layout (A1 and A6: 150-degree turns).",
        "Design fleet (demo library): Ostrander 180 (TDG 3) and Marrowgate 300 (TDG 5, governs).",
    ]
    return _layout("Marrowby Field - skewed junctions", notes, "FAA", ft,
                   _aircraft("Ostrander 180", "Marrowgate 300"), elements)


# --- 4. crossovers --------------------------------------------------------------------------------

CROSSOVER_FLEET = ("Ostrander 180", "Ostrander 240")
TURN_GOVERNS_TDG = "4"  # the TDG 4 theoretical airplane: its reversal needs more than ADG IV's separation
ONE_WAY_SPACING_FT = 300.0


def crossover_spacing_ft(fleet: tuple[DesignAircraft, ...], tdg: str | None) -> dict[str, float]:
    """What sets the spacing of a pair of parallels whose lines name ``tdg`` (None: the fleet's
    governing aircraft designs them), in ft, as the crossover check computes it
    (geometry.checks.crossovers.crossover_spacing).

    turn: 2 x the steering-limited radius of a 180-degree turn (a reversal through a 90-degree
    connector is two 90-degree turns the same way); separation: the taxiway/taxiway separation of
    the design aircraft's ADG; governing: the larger; built: governing rounded up to 5 ft.
    """
    context = DesignContext("FAA", fleet)
    probe = Centerline("probe", "", (Vertex(0.0, 0.0), Vertex(1.0, 0.0)), group=DesignGroup(tdg=tdg))
    spacing = crossover_spacing(line_design_aircraft(probe, context), get_rule_set("FAA"), "taxiway_taxiway")
    if spacing is None:
        raise ValueError(f"no crossover spacing rule for TDG {tdg}")
    feet = {name: from_metres(value_m, "ft") for name, value_m in (
        ("turn", spacing.turn_spacing_m), ("separation", spacing.separation.value_m),
        ("governing", spacing.governing_m))}
    feet["built"] = math.ceil(feet["governing"] / SPACING_STEP_FT - 1e-9) * SPACING_STEP_FT
    return feet


def _spacing_note(pair: str, spacing: dict[str, float], design: str) -> str:
    governs = "the turn requirement" if spacing["turn"] > spacing["separation"] else "the ADG separation"
    return (f"Pair {pair}, designed for {design}: turn requirement (2 x the steering-limited radius of "
            f"a 180-degree turn) {spacing['turn']:.1f} ft; taxiway/taxiway separation "
            f"{spacing['separation']:g} ft; {governs} governs; built {spacing['built']:g} ft apart.")


def _crossing_pair(ft: LengthUnit, names: tuple[str, str, str], y: float, spacing: float,
                   connector_x: tuple[float, float], tdg: str | None = None) -> list[Element]:
    """Two parallels 3,000 ft long, ``spacing`` apart, and a straight connector from x =
    ``connector_x[0]`` on the first to ``connector_x[1]`` on the second (ends exactly on them)."""
    first, second, connector = names
    (x, far_x), far_y = connector_x, y + spacing
    return [_line(ft, f"twy-{first.lower()}", first, [(0.0, y), (3000.0, y)], tdg=tdg),
            _line(ft, f"twy-{second.lower()}", second, [(0.0, far_y), (3000.0, far_y)], tdg=tdg),
            _line(ft, f"twy-{connector.lower()}", connector, [(x, y), (far_x, far_y)], tdg=tdg)]


def crossovers() -> Layout:
    ft: LengthUnit = "ft"
    fleet = _aircraft(*CROSSOVER_FLEET)
    turn, wingtip = crossover_spacing_ft(fleet, TURN_GOVERNS_TDG), crossover_spacing_ft(fleet, None)
    square, diagonal = (1500.0, 1500.0), (1200.0, 1200.0 + ONE_WAY_SPACING_FT)  # 90 and 45 degrees
    elements: list[Element] = [
        *_crossing_pair(ft, ("A", "B", "B1"), 0.0, turn["built"], square, TURN_GOVERNS_TDG),
        *_crossing_pair(ft, ("C", "D", "D1"), 1000.0, wingtip["built"], square),
        *_crossing_pair(ft, ("E", "F", "F1"), 2000.0, ONE_WAY_SPACING_FT, diagonal)]
    notes = [
        "Marrowby Field, the east cargo area: three pairs of parallel taxiways with crossovers.",
        f"Design fleet (demo library): {' and '.join(CROSSOVER_FLEET)} (TDG 3 and TDG 4; ADG III and IV). "
        f"A, B and B1 are designed for TDG {TURN_GOVERNS_TDG} (its theoretical airplane); the other lines "
        "for the fleet, whose governing aircraft is the Ostrander 240.",
        _spacing_note("A-B", turn, f"the TDG {TURN_GOVERNS_TDG} theoretical airplane"),
        _spacing_note("C-D", wingtip, "the Ostrander 240"),
        "Look at: crossovers B1 and D1 (90 degrees) let an aircraft reverse direction with two turns the "
        f"same way; crossover F1 (45 degrees, E to F {ONE_WAY_SPACING_FT:g} ft apart) does not: its two "
        "135-degree turns are excluded, so it is used one way, with a 45-degree turn at each end.",
    ]
    layout = _layout("Marrowby Field - crossovers", notes, "FAA", ft, fleet, elements)
    return _exclude_sharp_turns(layout, "twy-f1", 90.0)


# --- 5. runway connections, ICAO in metres ------------------------------------------------------------

def runway_connections() -> Layout:
    m: LengthUnit = "m"
    exit_end = (200.0, _tidy(1800.0 + 200.0 * math.tan(math.radians(60.0)), m))  # 30 deg off the runway; on A
    elements: list[Element] = [
        _runway(m, "rwy-18-36", "18/36", (0.0, 3000.0), (0.0, 0.0), 45.0),
        _line(m, "twy-a", "A", [(200.0, 0.0), (200.0, 3000.0)]),
        _line(m, "twy-a1", "A1", [(0.0, 0.0), (200.0, 0.0)]),
        _line(m, "twy-a2", "A2", [(0.0, 1200.0), (200.0, 1200.0)]),
        _line(m, "twy-a3", "A3", [(0.0, 1800.0), exit_end]),
        _line(m, "twy-a4", "A4", [(0.0, 3000.0), (200.0, 3000.0)]),
        _object(m, "nav-loc", "Localizer, runway 36", "navaid", 4.0, [(0.0, 3300.0)]),
    ]
    notes = [
        "Marrowby Field, the cross-wind runway 18/36 (3,000 m x 45 m, code 4E) and its parallel taxiway A "
        "200 m east of it, checked with the ICAO rule set, in metres.",
        "Look at: the right-angle entrances A1 (runway 36 end) and A4 (runway 18 end), the right-angle "
        "connector A2 (entrance and exit), and the acute-angled exit A3, which leaves the runway 30 degrees "
        f"to the right of aircraft landing on runway 36; {EXIT_RADIUS_NOTE}. The 150-degree turns at both "
        "ends of A3 are excluded.",
        "Design fleet (demo library): Ostrander 180 (code C) and Vastmere 500 (code E, governs).",
    ]
    layout = _layout("Marrowby Field - runway 18/36 connections (ICAO)", notes, "ICAO", m,
                     _aircraft("Ostrander 180", "Vastmere 500"), elements)
    layout = _with_radius(layout, EXIT_RADIUS_M, [("rwy-18-36", 270.0, "twy-a3", 60.0)])
    return _exclude_sharp_turns(layout, "twy-a3", 120.0)


# --- 6. existing and proposed pavement at state-plane-like coordinates --------------------------------

EAST_FT, NORTH_FT = 2_104_000.0, 731_000.0  # a local false origin in the style of a state plane grid


def _grid(points: XYs) -> tuple[tuple[float, float], ...]:
    return tuple((EAST_FT + x, NORTH_FT + y) for x, y in points)


def _old_connector(x: float) -> tuple[tuple[float, float], ...]:
    """A 75 ft connector from the runway edge to taxiway A, with 60 ft chamfers at A."""
    return _grid([(x - 37.5, 75.0), (x + 37.5, 75.0), (x + 37.5, 302.5), (x + 97.5, 362.5),
                  (x - 97.5, 362.5), (x - 37.5, 302.5)])


def existing_and_proposed() -> Layout:
    ft: LengthUnit = "ft"
    elements: list[Element] = [
        _runway(ft, "rwy-09-27", "09/27", (EAST_FT, NORTH_FT), (EAST_FT + 6000.0, NORTH_FT), 150.0),
        _line(ft, "twy-a", "A", _grid([(0.0, 400.0), (6000.0, 400.0)])),
        _line(ft, "twy-a1", "A1", _grid([(0.0, 0.0), (0.0, 400.0)])),
        _line(ft, "twy-a2", "A2", _grid([(2500.0, 0.0), (2500.0, 400.0)])),
        _line(ft, "twy-a3", "A3 (proposed)", _grid([(4000.0, 0.0), (4000.0, 400.0)])),
        _line(ft, "twy-a4", "A4", _grid([(6000.0, 0.0), (6000.0, 400.0)])),
        _pavement(ft, "pav-rwy", "Runway 09/27 (existing)", _grid(_box(0.0, -75.0, 6000.0, 75.0))),
        _pavement(ft, "pav-a", "Taxiway A (existing)", _grid(_box(-37.5, 362.5, 6037.5, 437.5))),
        _pavement(ft, "pav-a1", "Taxiway A1 (existing)", _grid(_box(-37.5, 75.0, 37.5, 362.5))),
        _pavement(ft, "pav-a2", "Taxiway A2 with old chamfered fillets (existing)", _old_connector(2500.0)),
        _pavement(ft, "pav-a4", "Taxiway A4 (existing)", _grid(_box(5962.5, 75.0, 6037.5, 362.5))),
        _object(ft, "bldg-arff", "Fire and rescue station", "building", 30.0,
                _grid(_box(3000.0, 700.0, 3300.0, 900.0))),
    ]
    notes = [
        "Marrowby Field, proposed connector A3 between runway 09/27 and parallel taxiway A, drawn on the "
        "airfield's state-plane-like grid (false origin near x = 2,104,000 ft, y = 731,000 ft) to show that "
        "large coordinates work.",
        "Existing pavement: the runway, taxiway A and connectors A1, A2 and A4, 75 ft wide; A2 keeps its old "
        "60 ft chamfered fillets on the south side of A, A1 and A4 have none.",
        "Look at: the new pavement, against the existing: all of A3 and its fillets, and the fillet widening "
        "the design fleet needs at the old junctions (the chamfers at A2 cover part of it).",
        "Design fleet (demo library): Ostrander 180 (TDG 3) and Marrowgate 300 (TDG 5, governs).",
    ]
    return _layout("Marrowby Field - proposed connector A3 (existing and new pavement)", notes, "FAA", ft,
                   _aircraft("Ostrander 180", "Marrowgate 300"), elements)


# --- 7. a layout that breaks rules on purpose --------------------------------------------------------

TIGHT_RADIUS_FT = 35.0
NARROW_WIDTH_FT = 35.0
WIDE_THROAT_RADIUS_FT = 300.0


def rule_breaker() -> Layout:
    ft: LengthUnit = "ft"
    elements: list[Element] = [
        _runway(ft, "rwy-09-27", "09/27", (0.0, 0.0), (6000.0, 0.0), 100.0),
        _line(ft, "twy-a", "A", [(0.0, 400.0), (6000.0, 400.0)]),
        _line(ft, "twy-b", "B", [(500.0, 500.0), (3300.0, 500.0)]),
        _line(ft, "twy-b1", "B1", [(2000.0, 400.0), (2000.0, 500.0)]),
        _line(ft, "twy-a1", "A1", [(0.0, 0.0), (0.0, 400.0)]),
        _line(ft, "twy-a2", "A2", [(1000.0, 0.0), (1000.0, 400.0)]),
        _line(ft, "twy-a3", "A3", [(3000.0, 0.0), (3000.0, 400.0)], width=NARROW_WIDTH_FT),
        _line(ft, "twy-a4", "A4", [(4500.0, 0.0), (4500.0, 800.0)]),
        _line(ft, "twy-a5", "A5", [(4500.0, 400.0), (4900.0, 800.0)]),
        _line(ft, "twy-a6", "A6", [(6000.0, 0.0), (6000.0, 400.0)]),
        _object(ft, "bldg-fuel", "Fuel shed", "building", 20.0, _box(5400.0, 460.0, 5500.0, 510.0)),
    ]
    notes = [
        "Marrowby Field, a deliberately faulty sketch for trying the checks. It breaks these rules:",
        "1. separation: taxiway B runs 100 ft from its parallel A (ADG III needs 152 ft), so crossover B1 "
        "and the wingtips of aircraft turning near B are flagged too;",
        f"2. width: connector A3 is drawn {NARROW_WIDTH_FT:g} ft wide, below the 50 ft TDG 3 width;",
        f"3. steering: the turn from A2 east onto A has a {TIGHT_RADIUS_FT:g} ft radius set by hand, tighter "
        "than the Ostrander 180 can steer within 50 degrees;",
        "4. junction complexity: A, A4 and A5 meet in one junction with five legs (four paths from one "
        "approach, more than three);",
        "5. object: the fuel shed stands 60 ft from the centerline of A (ADG III needs 93 ft);",
        f"6. wide throat: the turn from the runway onto entrance A6 has a {WIDE_THROAT_RADIUS_FT:g} ft "
        "radius set by hand, and its fillet opens the pavement far along the runway edge.",
        "Design fleet (demo library): Ostrander 180 (TDG 3, ADG III); runway 09/27 is 100 ft wide.",
    ]
    layout = _layout("Marrowby Field - rule breaker (faulty on purpose)", notes, "FAA", ft,
                     _aircraft("Ostrander 180"), elements)
    layout = _with_radius(layout, to_metres(TIGHT_RADIUS_FT, ft), [("twy-a2", 270.0, "twy-a", 0.0)])
    return _with_radius(layout, to_metres(WIDE_THROAT_RADIUS_FT, ft), [("rwy-09-27", 180.0, "twy-a6", 90.0)])


# --- all samples ---------------------------------------------------------------------------------------

SAMPLES: dict[str, Callable[[], Layout]] = {
    "marrowby_field.json": marrowby_field,
    "four_way_and_tee_tdg3.json": lambda: four_way_and_tee("3"),
    "four_way_and_tee_tdg5.json": lambda: four_way_and_tee("5"),
    "skewed_junctions.json": skewed_junctions,
    "crossovers.json": crossovers,
    "runway_connections.json": runway_connections,
    "existing_and_proposed.json": existing_and_proposed,
    "rule_breaker.json": rule_breaker,
}


def write_samples(folder: Path) -> list[Path]:
    folder.mkdir(parents=True, exist_ok=True)
    written = []
    for file_name, build in SAMPLES.items():
        save_layout(build(), folder / file_name)
        written.append(folder / file_name)
    return written


def main(argv: Sequence[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Write the Marrowby Field sample layouts.")
    parser.add_argument("--out", type=Path, default=DEFAULT_FOLDER, help="folder to write into")
    args = parser.parse_args(argv)
    fleet = _aircraft(*CROSSOVER_FLEET)
    for pair, tdg in (("A-B", TURN_GOVERNS_TDG), ("C-D", None)):
        design = f"TDG {tdg}" if tdg else "the fleet"
        print("crossovers.json: " + _spacing_note(pair, crossover_spacing_ft(fleet, tdg), design))
    for path in write_samples(args.out):
        print(f"wrote {path}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
