"""Rule values with sources: formulas against the rounded tables, identities between tables,
and the published values we could read.

Each check value names its source and confidence beside it.
"""

from __future__ import annotations

import math
from itertools import pairwise

import pytest

from geometry import standards as st
from geometry.errors import RuleInputError, UnknownRuleError
from geometry.standards import RuleValue

FT = 0.3048  # identity: the international foot, exact by definition


def _all_rule_values() -> list[RuleValue]:
    found: list[RuleValue] = []
    for value in vars(st).values():
        items = value.values() if isinstance(value, dict) else (
            value if isinstance(value, tuple) else (value,))
        for item in items:
            if isinstance(item, RuleValue):
                found.append(item)
            elif isinstance(item, tuple):
                found.extend(v for v in item if isinstance(v, RuleValue))
            elif isinstance(item, st.TdgBox):
                found.extend((item.max_mgw, item.max_cmg))
    return found


# --- RuleValue ---------------------------------------------------------------------------------

def test_rule_value_converts_feet_to_metres() -> None:
    value = RuleValue(35.0, "ft", "test", "published")
    assert value.value_m == pytest.approx(10.668)  # identity: 35 ft x 0.3048 m/ft


def test_rule_value_keeps_metres_and_gives_radians_for_angles() -> None:
    assert RuleValue(23.0, "m", "test", "from memory").value_m == 23.0  # identity
    angle = RuleValue(50.0, "deg", "test", "published")
    assert angle.value_rad == pytest.approx(math.radians(50.0))  # identity


@pytest.mark.parametrize("value, unit, source, confidence", [
    (math.nan, "m", "s", "published"), (math.inf, "ft", "s", "published"),
    (1.0, "yd", "s", "published"), (1.0, "m", "s", "sure"), (1.0, "m", "  ", "published"),
])
def test_malformed_rule_values_are_refused(value: float, unit: str, source: str,
                                           confidence: str) -> None:
    with pytest.raises(RuleInputError):
        RuleValue(value, unit, source, confidence)  # type: ignore[arg-type]


def test_an_angle_has_no_metres_and_a_length_no_radians() -> None:
    with pytest.raises(RuleInputError, match="angle"):
        _ = RuleValue(50.0, "deg", "test", "published").value_m
    with pytest.raises(RuleInputError, match="length"):
        _ = RuleValue(5.0, "m", "test", "published").value_rad


def test_describe_names_value_unit_source_and_confidence() -> None:
    text = RuleValue(7.5, "ft", "AC X", "from memory").describe()
    assert text == "7.5 ft (AC X; from memory)"


def test_weakest_confidence_of_a_derived_value() -> None:
    assert st.weakest("published", "from memory") == "from memory"
    assert st.weakest("published", "common practice") == "common practice"
    assert st.weakest("published") == "published"


def test_every_rule_value_names_a_source_and_a_known_confidence() -> None:
    values = _all_rule_values()
    assert len(values) > 60  # identity: the tables above hold more than 60 values
    for value in values:
        assert value.source.strip()
        assert value.confidence in st.CONFIDENCES
        assert value.unit in st.RULE_UNITS


# --- FAA: formulas against the rounded table -----------------------------------------------------

def test_faa_adg_upper_wingspan_edges() -> None:
    # AC 150/5300-13B Table 1-1 (published; read in two public copies, shared/REFERENCES.md).
    assert [v.value for v in st.ADG_WINGSPAN_EDGES_FT] == [49, 79, 118, 171, 214, 262]
    # AC 150/5300-13B Table 1-1 tail heights (published, same copies).
    assert [v.value for v in st.ADG_TAIL_HEIGHT_EDGES_FT] == [20, 30, 45, 60, 66, 80]


@pytest.mark.parametrize("row", list(st.FAA_ADG_TABLE))
def test_faa_formulas_agree_with_the_tables_within_their_rounding(row: st.FaaAdgRow) -> None:
    # The table is rounded to whole (or half) feet from the formula with the group's largest
    # wingspan; rounding and the AC's choice to round up stay within 1 ft (identity).
    table = st.FAA_ADG_TABLE[row]
    for edge, tabulated_ft in zip(st.ADG_WINGSPAN_EDGES_FT, table.values_ft, strict=True):
        assert abs(st.faa_formula_ft(row, edge.value) - tabulated_ft) <= 1.0


def test_faa_separation_formulas() -> None:
    # From memory, verify against AC 150/5300-13B Table 4-1 (formulas behind the table).
    assert st.faa_formula_ft("taxiway_taxiway", 100.0) == pytest.approx(130.0)  # 1.2 WS + 10
    assert st.faa_formula_ft("taxiway_object", 100.0) == pytest.approx(80.0)  # 0.7 WS + 10
    assert st.faa_formula_ft("taxilane_taxilane", 100.0) == pytest.approx(120.0)  # 1.1 WS + 10
    assert st.faa_formula_ft("taxilane_object", 100.0) == pytest.approx(70.0)  # 0.6 WS + 10
    # 0.2 WS read in Horonjeff p. 230 (published); + 10 ft from memory.
    assert st.faa_formula_ft("wingtip_taxiway", 100.0) == pytest.approx(30.0)
    assert st.faa_formula_ft("wingtip_taxilane", 100.0) == pytest.approx(20.0)  # 0.1 WS + 10


def test_faa_table_rows_are_consistent_with_each_other() -> None:
    table = st.FAA_ADG_TABLE
    spans = [v.value for v in st.ADG_WINGSPAN_EDGES_FT]
    for i, span in enumerate(spans):
        # identity: centerline separation = wingspan + wingtip clearance
        assert table["taxiway_taxiway"].values_ft[i] == span + table["wingtip_taxiway"].values_ft[i]
        assert (table["taxilane_taxilane"].values_ft[i]
                == span + table["wingtip_taxilane"].values_ft[i])
        # identity: centerline-to-object = half span + wingtip clearance
        assert (table["taxiway_object"].values_ft[i]
                == span / 2 + table["wingtip_taxiway"].values_ft[i])
        assert (table["taxilane_object"].values_ft[i]
                == span / 2 + table["wingtip_taxilane"].values_ft[i])
        # identity: an object free area is twice the centerline-to-object separation
        assert (table["taxiway_object_free_area"].values_ft[i]
                == 2 * table["taxiway_object"].values_ft[i])
        assert (table["taxilane_object_free_area"].values_ft[i]
                == 2 * table["taxilane_object"].values_ft[i])


def test_faa_taxiway_safety_area_is_the_largest_wingspan() -> None:
    # AC 150/5300-13B Table 4-1: TSA 49/79/118/171/214/262 ft (published, REFERENCES.md 3).
    assert st.FAA_ADG_TABLE["taxiway_safety_area"].values_ft == (49, 79, 118, 171, 214, 262)
    assert st.faa_adg_rule("taxiway_safety_area", "V").value == 214  # same source


def test_faa_adg_rule_lookup_and_unknowns() -> None:
    # From memory, verify against AC 150/5300-13B Table 4-1 (taxiway CL to taxiway CL, ADG IV).
    assert st.faa_adg_rule("taxiway_taxiway", "IV").value == 215
    with pytest.raises(UnknownRuleError, match="ADG"):
        st.faa_adg_rule("taxiway_taxiway", "VII")
    with pytest.raises(UnknownRuleError):
        st.faa_adg_rule("apron_edge", "I")  # type: ignore[arg-type]


def test_faa_published_taxiway_widths() -> None:
    # An airport master plan (2020) citing AC 150/5300-13: TDG 2 35 ft, TDG 3 50 ft, TDG 5 75 ft
    # (published); TDG 7 82 ft read in a design note citing AC 150/5300-13A (published).
    widths = {tdg: st.tdg_rule(st.FAA_TAXIWAY_WIDTH_FT, tdg) for tdg in st.TDG_NAMES}
    assert widths["2A"].value == 35 and widths["2B"].value == 35
    assert widths["3"].value == 50
    assert widths["5"].value == 75
    assert widths["7"].value == 82
    assert {widths[t].confidence for t in ("2A", "2B", "3", "5", "7")} == {"published"}
    # From memory, verify against AC 150/5300-13B (design standards by TDG).
    assert (widths["1A"].value, widths["4"].value, widths["6"].value) == (25, 50, 75)


def test_faa_width_holds_the_widest_gear_of_the_group_with_its_tesm() -> None:
    # identity: straight width = MGW + 2 x TESM; the chart's MGW limits were set from it.
    for box in st.TDG_CHART:
        width = st.tdg_rule(st.FAA_TAXIWAY_WIDTH_FT, box.tdg).value
        tesm = st.tdg_rule(st.FAA_TESM_FT, box.tdg).value
        assert width == pytest.approx(box.max_mgw.value + 2 * tesm)


def test_tdg_chart_is_nested_and_in_order() -> None:
    # identity: each group's box contains the previous one, so the first match is the group.
    assert tuple(box.tdg for box in st.TDG_CHART) == st.TDG_NAMES
    for lower, upper in pairwise(st.TDG_CHART):
        assert upper.max_mgw.value >= lower.max_mgw.value
        assert upper.max_cmg.value >= lower.max_cmg.value
        assert (upper.max_mgw.value, upper.max_cmg.value) != (lower.max_mgw.value,
                                                              lower.max_cmg.value)


def test_tdg_lookup_refuses_unknown_groups() -> None:
    with pytest.raises(UnknownRuleError, match="TDG"):
        st.tdg_rule(st.FAA_TESM_FT, "8")


def test_max_steering_design_criterion() -> None:
    # Horonjeff pp. 86 and 287: 50 degrees (published).
    assert st.FAA_MAX_STEERING.value == 50.0
    assert st.ICAO_MAX_STEERING.value == 50.0
    assert st.FAA_MAX_STEERING.unit == "deg"


# --- ICAO --------------------------------------------------------------------------------------

def test_icao_code_letter_and_omgws_edges() -> None:
    # Annex 14 Table 1-1 via Horonjeff Table 6-3: 15/24/36/52/65/80 m (published).
    assert [v.value for v in st.CODE_LETTER_WINGSPAN_EDGES_M] == [15, 24, 36, 52, 65, 80]
    # CS-ADR-DSN Issue 6 D.240(a), mirroring Annex 14 3.9.3: 4.5/6/9/15 m (published).
    assert [v.value for v in st.OMGWS_EDGES_M] == [4.5, 6, 9, 15]


def test_icao_wheel_to_edge_clearances() -> None:
    # CS-ADR-DSN Issue 6 D.240(a): 1.5, 2.25, 3 (or 4 on curves, wheelbase >= 18 m), 4 m
    # (published).
    assert [v.value for v in st.ICAO_EDGE_CLEARANCE_M] == [1.5, 2.25, 3, 4]
    assert st.ICAO_CURVE_CLEARANCE_LONG_WHEELBASE_M.value == 4
    assert st.ICAO_LONG_WHEELBASE_M.value == 18


def test_icao_width_is_the_widest_gear_of_the_band_plus_two_clearances() -> None:
    # Widths 7.5/10.5/15/23 m from memory (verify against Annex 14 3.9.5, 8th ed.);
    # identity: width = upper OMGWS edge + 2 x straight clearance.
    for width, edge, clearance in zip(st.ICAO_TAXIWAY_WIDTH_M, st.OMGWS_EDGES_M,
                                      st.ICAO_EDGE_CLEARANCE_M, strict=True):
        assert width.value == pytest.approx(edge.value + 2 * clearance.value)


def test_icao_separations_follow_wingspan_plus_margin() -> None:
    # Annex 14 Table 3-1 (8th ed. 2018), from memory; identity with the code's largest wingspan:
    # taxiway-taxiway WS + 8 m (A-C) or WS + 11 m (D-F); object rows WS/2 + the same margin;
    # stand taxilanes WS + 4.5 m (A-C) or + 7.5 m (D-F) (shared/REFERENCES.md 4).
    spans = [v.value for v in st.CODE_LETTER_WINGSPAN_EDGES_M]
    for i, span in enumerate(spans):
        taxiway_margin = st.ICAO_WINGTIP_CLEARANCE_M["taxiway"][i]
        taxilane_margin = st.ICAO_WINGTIP_CLEARANCE_M["taxilane"][i]
        assert st.ICAO_SEPARATION_M["taxiway_taxiway"][i] == span + taxiway_margin
        assert st.ICAO_SEPARATION_M["taxiway_object"][i] == span / 2 + taxiway_margin
        assert st.ICAO_SEPARATION_M["taxilane_taxilane"][i] == span + taxilane_margin
        assert st.ICAO_SEPARATION_M["taxilane_object"][i] == span / 2 + taxilane_margin
    # Annex 14 Table 3-1 code F taxiway-taxiway 91 m, from memory; equals the ADM formula below.
    assert st.ICAO_SEPARATION_M["taxiway_taxiway"][5] == 91


def test_icao_mixed_code_separation() -> None:
    # ADM Part 2 1.2.72 (published, quoted in a public forum): (WS_E/2 + WS_F/2) + C + Z_F with
    # C = 4.5 m and Z_F = 6.5 m; code E span 65 m, code F span 80 m (Annex 14 Table 1-1).
    c = st.ICAO_MIXED_CODE_CLEARANCE_M.value
    z = st.ICAO_SAFETY_MARGIN_F_M.value
    assert st.icao_mixed_code_separation_m(65.0, 80.0, c, z) == pytest.approx(83.5)
    # F with F gives the Table 3-1 value, 91 m (published formula, REFERENCES.md 4).
    assert st.icao_mixed_code_separation_m(80.0, 80.0, c, z) == pytest.approx(91.0)
    with pytest.raises(RuleInputError):
        st.icao_mixed_code_separation_m(-1.0, 80.0, c, z)


def test_icao_runway_taxiway_rule_reproduces_the_published_code_f_values() -> None:
    # Older Annex 14 strips, read in Horonjeff Table 6-9: 300 m (instrument, code 3-4) and 150 m
    # (visual, code 3-4) wide (published). Half strip + half the 80 m code F span gives the
    # published Table 3-1 code F values: 190 m instrument, 115 m non-instrument (ICAO NLA
    # circular, published).
    assert 300 / 2 + 80 / 2 == 190  # identity with the published pair
    non_instrument = st.ICAO_STRIP_HALF_WIDTH_M["non_instrument"][3]
    assert non_instrument.value + 80 / 2 == 115
    assert non_instrument.confidence == "published"
    # 8th ed. (2018) narrowed the instrument strip to 280 m: 140 m half width (from memory,
    # verify against Annex 14 3.4.3).
    assert st.ICAO_STRIP_HALF_WIDTH_M["instrument"][3].value == 140


def test_icao_shoulder_overall_widths() -> None:
    # Annex 14 3.10.1 as summarised from the 5th ed. (2009): C 25, E 44, F 60 m (published);
    # D 38 m from memory, verify against Annex 14 3.10.1.
    widths = {k: v.value for k, v in st.ICAO_TAXIWAY_AND_SHOULDERS_M.items()}
    assert widths == {"C": 25, "D": 38, "E": 44, "F": 60}


# --- taxiing speed on curves -------------------------------------------------------------------

@pytest.mark.parametrize("speed_kmh, radius_m", [
    (16, 15), (32, 60), (48, 135), (64, 240), (80, 375), (96, 540),
])
def test_turn_radius_for_speed_matches_the_published_table(speed_kmh: float,
                                                           radius_m: float) -> None:
    # Horonjeff Table 6-22 citing the ICAO ADM (published): speeds in km/h, radii in m, the
    # table rounded to 5 m.
    assert st.turn_radius_for_speed_m(speed_kmh) == pytest.approx(radius_m, abs=0.5)


@pytest.mark.parametrize("speed_kmh", [0.0, -10.0, math.nan, math.inf])
def test_turn_radius_for_speed_refuses_bad_speeds(speed_kmh: float) -> None:
    with pytest.raises(RuleInputError, match="km/h"):
        st.turn_radius_for_speed_m(speed_kmh)
