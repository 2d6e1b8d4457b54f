"""Standards as data: every rule value carries its unit, its source and how sure we are of it.

Values are stored in the unit the standard states them in (FAA in feet, ICAO in metres) so they
can be checked against the document line by line; :attr:`RuleValue.value_m` gives metres for
the engine. ``docs/standards.md`` lists every value with its confidence:

* ``"published"``: read in a public copy of the source named;
* ``"common practice"``: a trade fact or modelling assumption with no document behind it;
* ``"from memory"``: known from practice but not found in a public copy; verify against the
  document named in ``source`` before relying on it.

Group tables are tuples in group order (``TDG_NAMES``, ``ADG_NAMES``, ``CODE_LETTERS``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

from geometry.errors import RuleInputError, UnknownRuleError
from geometry.units import METRES_PER_FOOT

Confidence = Literal["published", "common practice", "from memory"]
RuleUnit = Literal["ft", "m", "deg"]
CONFIDENCES: tuple[Confidence, ...] = ("published", "common practice", "from memory")
RULE_UNITS: tuple[RuleUnit, ...] = ("ft", "m", "deg")


@dataclass(frozen=True, slots=True)
class RuleValue:
    """One value of a standard: ``value`` in ``unit``, where it comes from and how sure we are.

    Examples
    --------
    >>> round(RuleValue(35.0, "ft", "AC 150/5300-13B", "published").value_m, 3)
    10.668
    """

    value: float
    unit: RuleUnit
    source: str
    confidence: Confidence

    def __post_init__(self) -> None:
        if not isinstance(self.value, (int, float)) or not math.isfinite(self.value):
            raise RuleInputError(f"a rule value must be a finite number, got {self.value!r}")
        if self.unit not in RULE_UNITS:
            raise RuleInputError(f"unknown rule unit {self.unit!r}: use 'ft', 'm' or 'deg'")
        if self.confidence not in CONFIDENCES:
            raise RuleInputError(f"unknown confidence {self.confidence!r}: use one of {CONFIDENCES}")
        if not self.source.strip():
            raise RuleInputError("a rule value must name its source")

    @property
    def value_m(self) -> float:
        """The value in metres (lengths only)."""
        if self.unit == "deg":
            raise RuleInputError(f"{self.describe()} is an angle, not a length")
        return self.value * METRES_PER_FOOT if self.unit == "ft" else float(self.value)

    @property
    def value_rad(self) -> float:
        """The value in radians (angles only)."""
        if self.unit != "deg":
            raise RuleInputError(f"{self.describe()} is a length, not an angle")
        return math.radians(self.value)

    def describe(self) -> str:
        """Short text for findings and reports, e.g. ``"35 ft (AC ...; published)"``."""
        return f"{self.value:g} {self.unit} ({self.source}; {self.confidence})"


def weakest(*confidences: Confidence) -> Confidence:
    """The least sure of several confidences (for a value derived from several rule values)."""
    return max(confidences, key=CONFIDENCES.index)


def _rule_ft(value: float, source: str, confidence: Confidence) -> RuleValue:
    return RuleValue(float(value), "ft", source, confidence)


def _rule_m(value: float, source: str, confidence: Confidence) -> RuleValue:
    return RuleValue(float(value), "m", source, confidence)


# --- sources ------------------------------------------------------------------------------------
AC_13B = "FAA AC 150/5300-13B"
AC_13A = "FAA AC 150/5300-13A"
HORONJEFF = "Horonjeff et al., Planning and Design of Airports, 5th ed."
ANNEX_14 = "ICAO Annex 14 Vol I"
ADM_2 = "ICAO Aerodrome Design Manual (Doc 9157) Part 2"
CS_ADR_DSN = "EASA CS-ADR-DSN Issue 6, CS ADR-DSN.D.240(a), mirroring Annex 14 Vol I 3.9.3"

# --- FAA: Taxiway Design Groups (pavement: width, TESM, shoulders, fillets) ----------------------
TDG_NAMES: tuple[str, ...] = ("1A", "1B", "2A", "2B", "3", "4", "5", "6", "7")


@dataclass(frozen=True, slots=True)
class TdgBox:
    """One group of the TDG chart: an aircraft is in the first group (in ``TDG_NAMES`` order)
    whose MGW and CMG limits it does not exceed. A point on a chart line belongs to the lower
    group, so a group's upper corner is its largest (theoretical) airplane."""

    tdg: str
    max_mgw: RuleValue
    max_cmg: RuleValue


_TDG_CHART_SOURCE = (f"{AC_13B} TDG chart (chapter 1); CMG limits reconstructed from memory, MGW "
                     "limits = straight width - 2 x TESM; verify against the chart, whose lines "
                     "may not all be straight steps")
_TDG_CHART_FT: tuple[tuple[str, float, float], ...] = (
    ("1A", 15, 20), ("1B", 15, 35), ("2A", 20, 35), ("2B", 20, 50), ("3", 30, 65),
    ("4", 30, 100), ("5", 47, 100), ("6", 47, 125), ("7", 52, 125))
TDG_CHART: tuple[TdgBox, ...] = tuple(
    TdgBox(tdg, _rule_ft(mgw, _TDG_CHART_SOURCE, "from memory"),
           _rule_ft(cmg, _TDG_CHART_SOURCE, "from memory"))
    for tdg, mgw, cmg in _TDG_CHART_FT)

_TDG_TABLE = f"{AC_13B} design standards based on TDG (chapter 4)"
_TDG7_NOTE = (f"{AC_13A} (TDG 7 carried over: a 2022 consultant note on 13B says 13B removed "
              "TDG 7 and widened the MGW limits of TDG 5 and 6)")
_MASTER_PLAN = "an airport master plan (2020) citing AC 150/5300-13, facility requirements"

FAA_TAXIWAY_WIDTH_FT: dict[str, RuleValue] = {
    "1A": _rule_ft(25, _TDG_TABLE, "from memory"),
    "1B": _rule_ft(25, _TDG_TABLE, "from memory"),
    "2A": _rule_ft(35, f"{_TDG_TABLE}; 35 ft for TDG 2 read in {_MASTER_PLAN}", "published"),
    "2B": _rule_ft(35, f"{_TDG_TABLE}; 35 ft for TDG 2 read in {_MASTER_PLAN}", "published"),
    "3": _rule_ft(50, f"{_TDG_TABLE}; 50 ft for TDG 3 read in {_MASTER_PLAN}", "published"),
    "4": _rule_ft(50, _TDG_TABLE, "from memory"),
    "5": _rule_ft(75, f"{_TDG_TABLE}; 75 ft for TDG 5 read in {_MASTER_PLAN}", "published"),
    "6": _rule_ft(75, _TDG_TABLE, "from memory"),
    "7": _rule_ft(82, f"{_TDG7_NOTE}; 82 ft read in a design note citing 13A", "published"),
}
# Taxiway edge safety margin: outside of the main-gear tyres to the pavement edge.
_TESM_5_6 = f"{_TDG_TABLE} (13B reduced TESM for TDG 5 and 6: consultant note, 2022)"
FAA_TESM_FT: dict[str, RuleValue] = {
    "1A": _rule_ft(5, _TDG_TABLE, "from memory"), "1B": _rule_ft(5, _TDG_TABLE, "from memory"),
    "2A": _rule_ft(7.5, _TDG_TABLE, "from memory"), "2B": _rule_ft(7.5, _TDG_TABLE, "from memory"),
    "3": _rule_ft(10, _TDG_TABLE, "from memory"), "4": _rule_ft(10, _TDG_TABLE, "from memory"),
    "5": _rule_ft(14, _TESM_5_6, "from memory"), "6": _rule_ft(14, _TESM_5_6, "from memory"),
    "7": _rule_ft(15, _TDG7_NOTE, "from memory"),
}
FAA_SHOULDER_WIDTH_FT: dict[str, RuleValue] = {
    "1A": _rule_ft(10, _TDG_TABLE, "from memory"), "1B": _rule_ft(10, _TDG_TABLE, "from memory"),
    "2A": _rule_ft(10, _TDG_TABLE, "from memory"), "2B": _rule_ft(10, _TDG_TABLE, "from memory"),
    "3": _rule_ft(20, _TDG_TABLE, "from memory"), "4": _rule_ft(20, _TDG_TABLE, "from memory"),
    "5": _rule_ft(30, _TDG_TABLE, "from memory"), "6": _rule_ft(30, _TDG_TABLE, "from memory"),
    "7": _rule_ft(40, _TDG7_NOTE, "from memory"),
}
FAA_MAX_STEERING = RuleValue(50.0, "deg", f"{HORONJEFF} pp. 86 and 287 (design criterion); "
                             f"{AC_13B} standard turns use 50 deg (from memory)", "published")

# --- FAA: Airplane Design Groups (wingspan, tail height; separations) ---------------------------
ADG_NAMES: tuple[str, ...] = ("I", "II", "III", "IV", "V", "VI")
_ADG_TABLE_1_1 = f"{AC_13B} Table 1-1 (read in two public copies)"
# Upper edges, exclusive: ADG II is 49 ft <= wingspan < 79 ft.
ADG_WINGSPAN_EDGES_FT: tuple[RuleValue, ...] = tuple(
    _rule_ft(v, _ADG_TABLE_1_1, "published") for v in (49, 79, 118, 171, 214, 262))
ADG_TAIL_HEIGHT_EDGES_FT: tuple[RuleValue, ...] = tuple(
    _rule_ft(v, _ADG_TABLE_1_1, "published") for v in (20, 30, 45, 60, 66, 80))

FaaAdgRow = Literal["taxiway_taxiway", "taxiway_object", "taxilane_taxilane", "taxilane_object",
                    "wingtip_taxiway", "wingtip_taxilane", "taxiway_safety_area",
                    "taxiway_object_free_area", "taxilane_object_free_area"]


@dataclass(frozen=True, slots=True)
class AdgRow:
    """One row of the FAA table by ADG: tabulated (rounded) values and the formula behind them,
    ``slope * WS + offset_ft`` with WS the largest wingspan of the group in feet."""

    values_ft: tuple[float, ...]
    slope: float
    offset_ft: float
    source: str
    confidence: Confidence


_ADG_TABLE = (f"{AC_13A} Table 4-1, unchanged in the separations of {AC_13B} Table 4-1 as far as "
              "known")
_OFA_NOTE = "; 13B revised TOFA and TLOFA (consultant note, 2022): verify against 13B Table 4-1"
FAA_ADG_TABLE: dict[FaaAdgRow, AdgRow] = {
    "taxiway_taxiway": AdgRow((69, 105, 152, 215, 267, 324), 1.2, 10, _ADG_TABLE, "from memory"),
    "taxiway_object": AdgRow((44.5, 65.5, 93, 129.5, 160, 193), 0.7, 10, _ADG_TABLE, "from memory"),
    "taxilane_taxilane": AdgRow((64, 97, 140, 198, 245, 298), 1.1, 10, _ADG_TABLE, "from memory"),
    "taxilane_object": AdgRow((39.5, 57.5, 81, 112.5, 138, 167), 0.6, 10, _ADG_TABLE,
                              "from memory"),
    # The 0.2 WS part is read in Horonjeff p. 230; the +10 ft is from memory.
    "wingtip_taxiway": AdgRow((20, 26, 34, 44, 53, 62), 0.2, 10, _ADG_TABLE, "from memory"),
    "wingtip_taxilane": AdgRow((15, 18, 22, 27, 31, 36), 0.1, 10, _ADG_TABLE, "from memory"),
    "taxiway_safety_area": AdgRow((49, 79, 118, 171, 214, 262), 1.0, 0,
                                  f"{AC_13B} Table 4-1 (TSA width = the group's largest wingspan)",
                                  "published"),
    "taxiway_object_free_area": AdgRow((89, 131, 186, 259, 320, 386), 1.4, 20,
                                       _ADG_TABLE + _OFA_NOTE, "from memory"),
    "taxilane_object_free_area": AdgRow((79, 115, 162, 225, 276, 334), 1.2, 20,
                                        _ADG_TABLE + _OFA_NOTE, "from memory"),
}

# Runway CL to parallel taxiway CL, approach category C/D, by ADG, for the two visibility cases.
FAA_RUNWAY_TAXIWAY_SOURCE = f"{AC_13B} runway design standards (approach category C/D)"
FAA_RUNWAY_TAXIWAY_FT: dict[str, tuple[float, ...]] = {
    # Approach visibility minimums lower than 3/4 statute mile (the common instrument case). The
    # 400 ft for ADG II is read in a master plan citing the AC (C/D-II, 1/2 mile minimums).
    "lower_than_3_4_mile": (400, 400, 400, 400, 400, 550),
    # Visual, or minimums not lower than 3/4 statute mile.
    "not_lower_than_3_4_mile": (300, 300, 400, 400, 400, 500),
}


def faa_formula_ft(row: FaaAdgRow, wingspan_ft: float) -> float:
    """The formula behind an FAA ADG table row for a given wingspan (ft), e.g. 1.2 WS + 10.

    The AC lets separations be computed with the design aircraft's actual wingspan instead of
    the group's largest (Horonjeff p. 232)."""
    entry = FAA_ADG_TABLE[row]
    return entry.slope * wingspan_ft + entry.offset_ft


def faa_adg_rule(row: FaaAdgRow, adg: str) -> RuleValue:
    """The tabulated value of ``row`` for group ``adg`` (``"I"`` .. ``"VI"``)."""
    if row not in FAA_ADG_TABLE:
        raise UnknownRuleError(f"no FAA ADG table row {row!r}")
    entry = FAA_ADG_TABLE[row]
    return _rule_ft(entry.values_ft[_index(ADG_NAMES, adg, "ADG")], entry.source, entry.confidence)


def tdg_rule(table: dict[str, RuleValue], tdg: str) -> RuleValue:
    """The value of a TDG table (width, TESM, shoulder) for group ``tdg``."""
    return table[TDG_NAMES[_index(TDG_NAMES, tdg, "TDG")]]


def _index(names: tuple[str, ...], name: str, kind: str) -> int:
    if name not in names:
        raise UnknownRuleError(f"unknown {kind} {name!r}: use one of {', '.join(names)}")
    return names.index(name)


# --- ICAO Annex 14: code letters, OMGWS, widths, clearances, separations -------------------------
CODE_LETTERS: tuple[str, ...] = ("A", "B", "C", "D", "E", "F")
# Upper edges, exclusive: code B is 15 m <= wingspan < 24 m.
CODE_LETTER_WINGSPAN_EDGES_M: tuple[RuleValue, ...] = tuple(
    _rule_m(v, f"{ANNEX_14} Table 1-1; read in {HORONJEFF} Table 6-3", "published")
    for v in (15, 24, 36, 52, 65, 80))
# Outer main gear wheel span bands 1..4, upper edges exclusive.
OMGWS_EDGES_M: tuple[RuleValue, ...] = tuple(
    _rule_m(v, CS_ADR_DSN, "published") for v in (4.5, 6, 9, 15))
# Outer main wheel to taxiway edge, cockpit over the centerline, by OMGWS band.
ICAO_EDGE_CLEARANCE_M: tuple[RuleValue, ...] = tuple(
    _rule_m(v, CS_ADR_DSN, "published") for v in (1.5, 2.25, 3, 4))
# On curves, band 3 needs 4 m when the wheelbase is 18 m or more (same source).
ICAO_CURVE_CLEARANCE_LONG_WHEELBASE_M = _rule_m(4, CS_ADR_DSN, "published")
ICAO_LONG_WHEELBASE_M = _rule_m(18, CS_ADR_DSN, "published")
ICAO_TAXIWAY_WIDTH_M: tuple[RuleValue, ...] = tuple(
    _rule_m(v, f"{ANNEX_14} 3.9.5 (8th ed. 2018, by OMGWS)", "from memory")
    for v in (7.5, 10.5, 15, 23))
# Overall width of taxiway plus shoulders on straights, code letters C..F (A, B: none required).
ICAO_TAXIWAY_AND_SHOULDERS_M: dict[str, RuleValue] = {
    "C": _rule_m(25, f"{ANNEX_14} 3.10.1; read in a summary of the 5th ed. (2009)", "published"),
    "D": _rule_m(38, f"{ANNEX_14} 3.10.1", "from memory"),
    "E": _rule_m(44, f"{ANNEX_14} 3.10.1; read in a summary of the 5th ed. (2009)", "published"),
    "F": _rule_m(60, f"{ANNEX_14} 3.10.1; read in a summary of the 5th ed. (2009)", "published"),
}

IcaoRow = Literal["taxiway_taxiway", "taxiway_object", "taxilane_taxilane", "taxilane_object"]
_TABLE_3_1 = f"{ANNEX_14} Table 3-1 (8th ed. 2018)"
# Taxilane rows are the aircraft stand taxilane columns of Table 3-1.
ICAO_SEPARATION_M: dict[IcaoRow, tuple[float, ...]] = {
    "taxiway_taxiway": (23, 32, 44, 63, 76, 91),
    "taxiway_object": (15.5, 20, 26, 37, 43.5, 51),
    "taxilane_taxilane": (19.5, 28.5, 40.5, 59.5, 72.5, 87.5),
    "taxilane_object": (12, 16.5, 22.5, 33.5, 40, 47.5),
}
ICAO_SEPARATION_SOURCE = f"{_TABLE_3_1}, from memory; consistent with WS + margin by code"
# Wingtip clearance with the aircraft on the centerline: Table 3-1 minus the group's wingspan
# (taxiway-taxiway minus WS; stand taxilane-taxilane minus WS). Identity with the table above.
ICAO_WINGTIP_CLEARANCE_M: dict[str, tuple[float, ...]] = {
    "taxiway": (8, 8, 8, 11, 11, 11),
    "taxilane": (4.5, 4.5, 4.5, 7.5, 7.5, 7.5),
}
# ADM Part 2 mixed-code example: wheel-to-edge clearance C and code F safety margin Z.
ICAO_MIXED_CODE_CLEARANCE_M = _rule_m(4.5, f"{ADM_2} 1.2.72 (quoted in a public forum)",
                                      "published")
ICAO_SAFETY_MARGIN_F_M = _rule_m(6.5, f"{ADM_2} 1.2.72 (quoted in a public forum)", "published")
# Runway strip half-widths by code number (1..4): runway CL to parallel taxiway CL is half the
# strip plus half the wingspan (Table 3-1 note; identity).
ICAO_STRIP_HALF_WIDTH_M: dict[str, tuple[RuleValue, ...]] = {
    "instrument": tuple(_rule_m(v, f"{ANNEX_14} 3.4.3 (8th ed. 2018: 280 m strip for code 3, 4)",
                                "from memory") for v in (70, 70, 140, 140)),
    "non_instrument": tuple(_rule_m(v, f"{ANNEX_14} 3.4.3; read in {HORONJEFF} Table 6-9 "
                                       "(visual strip 60/80/150/150 m)", "published")
                            for v in (30, 40, 75, 75)),
}
ICAO_MAX_STEERING = RuleValue(50.0, "deg", f"{HORONJEFF} pp. 86 and 287 (design criterion)",
                              "published")


def icao_mixed_code_separation_m(wingspan_a_m: float, wingspan_b_m: float,
                                 wheel_edge_clearance_m: float, safety_margin_m: float) -> float:
    """Taxiway CL to taxiway CL for two different codes (ADM Part 2, 1.2.72):
    half span + half span + wheel-to-edge clearance C + safety margin Z of the more demanding
    code."""
    for name, value in (("wingspan_a_m", wingspan_a_m), ("wingspan_b_m", wingspan_b_m),
                        ("wheel_edge_clearance_m", wheel_edge_clearance_m),
                        ("safety_margin_m", safety_margin_m)):
        if not math.isfinite(value) or value < 0.0:
            raise RuleInputError(f"{name} must be a finite, non-negative length, got {value!r}")
    return 0.5 * wingspan_a_m + 0.5 * wingspan_b_m + wheel_edge_clearance_m + safety_margin_m


# --- taxiing speed on curves --------------------------------------------------------------------
# R = V^2 / 17.07 (V in km/h, R in m): Horonjeff Table 6-22 citing the ADM Part 2 (published).
SPEED_RADIUS_DIVISOR_KMH2_PER_M = 17.07
SPEED_RADIUS_SOURCE = f"{HORONJEFF} Table 6-22 citing {ADM_2}; published"


def turn_radius_for_speed_m(speed_kmh: float) -> float:
    """Centerline radius (m) for taxiing at ``speed_kmh`` on a curve: R = V^2 / 17.07.

    Examples
    --------
    >>> round(turn_radius_for_speed_m(48.0), 1)
    135.0
    """
    if not math.isfinite(speed_kmh) or speed_kmh <= 0.0:
        raise RuleInputError(f"the taxiing speed must be a positive number of km/h, "
                             f"got {speed_kmh!r}")
    return speed_kmh**2 / SPEED_RADIUS_DIVISOR_KMH2_PER_M
