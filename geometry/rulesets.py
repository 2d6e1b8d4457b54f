"""One interface over the FAA and ICAO rule sets, used by turn defaults and design checks.

Every answer is a :class:`~geometry.standards.RuleValue` (value, unit, source, confidence); use
``.value_m`` for the engine. Rules are keyed by the governing design aircraft: the caller picks
the fleet's most demanding aircraft, or asks :func:`governing_aircraft` for it.

Examples
--------
>>> from geometry.theoretical import theoretical_airplane
>>> rules = get_rule_set("FAA")
>>> rules.straight_width(theoretical_airplane("3")).value
50.0
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal, Protocol

from geometry.aircraft import DesignAircraft
from geometry.classify import (
    adg_of_aircraft,
    code_letter_of_aircraft,
    omgws_band_of_aircraft,
    tdg_of_aircraft,
)
from geometry.errors import InvalidAircraftError, UnknownRuleError
from geometry.standards import (
    ADG_NAMES,
    CODE_LETTER_WINGSPAN_EDGES_M,
    CODE_LETTERS,
    FAA_MAX_STEERING,
    FAA_RUNWAY_TAXIWAY_FT,
    FAA_RUNWAY_TAXIWAY_SOURCE,
    FAA_SHOULDER_WIDTH_FT,
    FAA_TAXIWAY_WIDTH_FT,
    FAA_TESM_FT,
    ICAO_CURVE_CLEARANCE_LONG_WHEELBASE_M,
    ICAO_EDGE_CLEARANCE_M,
    ICAO_LONG_WHEELBASE_M,
    ICAO_MAX_STEERING,
    ICAO_SEPARATION_M,
    ICAO_SEPARATION_SOURCE,
    ICAO_STRIP_HALF_WIDTH_M,
    ICAO_TAXIWAY_AND_SHOULDERS_M,
    ICAO_TAXIWAY_WIDTH_M,
    ICAO_WINGTIP_CLEARANCE_M,
    TDG_NAMES,
    FaaAdgRow,
    IcaoRow,
    RuleValue,
    faa_adg_rule,
    tdg_rule,
    weakest,
)

RuleSetName = Literal["FAA", "ICAO"]
SeparationKind = Literal["taxiway_taxiway", "taxiway_object", "taxilane_taxilane",
                         "taxilane_object", "runway_taxiway"]
WingtipKind = Literal["taxiway", "taxilane"]
SEPARATION_KINDS: tuple[SeparationKind, ...] = (
    "taxiway_taxiway", "taxiway_object", "taxilane_taxilane", "taxilane_object", "runway_taxiway")
WINGTIP_KINDS: tuple[WingtipKind, ...] = ("taxiway", "taxilane")


class RuleSet(Protocol):
    """What turn defaults and checks ask of a standard.

    ``separation(..., instrument_runway=..., code_number=...)`` matters only for
    ``"runway_taxiway"``: FAA reads ``instrument_runway=True`` as approach visibility minimums
    lower than 3/4 statute mile (approach category C/D) and ignores ``code_number``; ICAO uses
    both (code number 1..4 from the runway's reference field length).
    """

    @property
    def name(self) -> RuleSetName: ...

    def straight_width(self, aircraft: DesignAircraft) -> RuleValue: ...

    def edge_margin(self, aircraft: DesignAircraft, on_curve: bool) -> RuleValue: ...

    def shoulder_width(self, aircraft: DesignAircraft) -> RuleValue | None: ...

    def separation(self, kind: SeparationKind, aircraft: DesignAircraft, *,
                   instrument_runway: bool = True, code_number: int = 4) -> RuleValue: ...

    def wingtip_clearance(self, kind: WingtipKind, aircraft: DesignAircraft) -> RuleValue: ...

    def max_steering(self, aircraft: DesignAircraft) -> RuleValue: ...

    def group_label(self, aircraft: DesignAircraft) -> str: ...

    def group_rank(self, aircraft: DesignAircraft) -> tuple[int, ...]: ...


_FAA_ROWS: dict[str, FaaAdgRow] = {
    "taxiway_taxiway": "taxiway_taxiway", "taxiway_object": "taxiway_object",
    "taxilane_taxilane": "taxilane_taxilane", "taxilane_object": "taxilane_object"}
_ICAO_ROWS: dict[str, IcaoRow] = {
    "taxiway_taxiway": "taxiway_taxiway", "taxiway_object": "taxiway_object",
    "taxilane_taxilane": "taxilane_taxilane", "taxilane_object": "taxilane_object"}


def _check_kind(kind: str, kinds: tuple[str, ...]) -> None:
    if kind not in kinds:
        raise UnknownRuleError(f"unknown kind {kind!r}: use one of {', '.join(kinds)}")


@dataclass(frozen=True, slots=True)
class FaaRuleSet:
    """FAA AC 150/5300-13B: pavement by TDG, separations by ADG (tabulated, rounded values)."""

    @property
    def name(self) -> RuleSetName:
        return "FAA"

    def straight_width(self, aircraft: DesignAircraft) -> RuleValue:
        return tdg_rule(FAA_TAXIWAY_WIDTH_FT, tdg_of_aircraft(aircraft))

    def edge_margin(self, aircraft: DesignAircraft, on_curve: bool) -> RuleValue:
        # The taxiway edge safety margin (TESM) is the same on straights and in turns.
        return tdg_rule(FAA_TESM_FT, tdg_of_aircraft(aircraft))

    def shoulder_width(self, aircraft: DesignAircraft) -> RuleValue | None:
        return tdg_rule(FAA_SHOULDER_WIDTH_FT, tdg_of_aircraft(aircraft))

    def separation(self, kind: SeparationKind, aircraft: DesignAircraft, *,
                   instrument_runway: bool = True, code_number: int = 4) -> RuleValue:
        _check_kind(kind, SEPARATION_KINDS)
        adg = adg_of_aircraft(aircraft)
        if kind == "runway_taxiway":
            case = "lower_than_3_4_mile" if instrument_runway else "not_lower_than_3_4_mile"
            value = FAA_RUNWAY_TAXIWAY_FT[case][ADG_NAMES.index(adg)]
            visibility = "lower than" if instrument_runway else "visual or not lower than"
            return RuleValue(value, "ft", f"{FAA_RUNWAY_TAXIWAY_SOURCE}; visibility minimums "
                             f"{visibility} 3/4 statute mile", "from memory")
        return faa_adg_rule(_FAA_ROWS[kind], adg)

    def wingtip_clearance(self, kind: WingtipKind, aircraft: DesignAircraft) -> RuleValue:
        _check_kind(kind, WINGTIP_KINDS)
        row: Literal["wingtip_taxiway", "wingtip_taxilane"] = (
            "wingtip_taxiway" if kind == "taxiway" else "wingtip_taxilane")
        return faa_adg_rule(row, adg_of_aircraft(aircraft))

    def max_steering(self, aircraft: DesignAircraft) -> RuleValue:
        """The standard's design criterion; an aircraft with a lower own limit is held to
        ``aircraft.max_steering_deg`` by the sweep."""
        return FAA_MAX_STEERING

    def group_label(self, aircraft: DesignAircraft) -> str:
        return f"TDG {tdg_of_aircraft(aircraft)} / ADG {adg_of_aircraft(aircraft)}"

    def group_rank(self, aircraft: DesignAircraft) -> tuple[int, ...]:
        return (TDG_NAMES.index(tdg_of_aircraft(aircraft)),
                ADG_NAMES.index(adg_of_aircraft(aircraft)))


@dataclass(frozen=True, slots=True)
class IcaoRuleSet:
    """ICAO Annex 14 Vol I: width and wheel clearance by OMGWS, separations by code letter."""

    @property
    def name(self) -> RuleSetName:
        return "ICAO"

    def straight_width(self, aircraft: DesignAircraft) -> RuleValue:
        return ICAO_TAXIWAY_WIDTH_M[omgws_band_of_aircraft(aircraft) - 1]

    def edge_margin(self, aircraft: DesignAircraft, on_curve: bool) -> RuleValue:
        band = omgws_band_of_aircraft(aircraft)
        if on_curve and band == 3 and aircraft.wheelbase_m >= ICAO_LONG_WHEELBASE_M.value_m:
            return ICAO_CURVE_CLEARANCE_LONG_WHEELBASE_M
        return ICAO_EDGE_CLEARANCE_M[band - 1]

    def shoulder_width(self, aircraft: DesignAircraft) -> RuleValue | None:
        """Shoulder width on each side: (overall width of taxiway and shoulders - taxiway
        width) / 2; ``None`` for code letters A and B, which need no shoulders."""
        overall = ICAO_TAXIWAY_AND_SHOULDERS_M.get(code_letter_of_aircraft(aircraft))
        if overall is None:
            return None
        width = self.straight_width(aircraft)
        per_side_m = max(0.0, (overall.value_m - width.value_m) / 2.0)
        return RuleValue(per_side_m, "m", f"identity: (overall {overall.value:g} m, "
                         f"{overall.source} - width {width.value:g} m, {width.source}) / 2",
                         weakest(overall.confidence, width.confidence))

    def separation(self, kind: SeparationKind, aircraft: DesignAircraft, *,
                   instrument_runway: bool = True, code_number: int = 4) -> RuleValue:
        _check_kind(kind, SEPARATION_KINDS)
        letter_index = CODE_LETTERS.index(code_letter_of_aircraft(aircraft))
        if kind == "runway_taxiway":
            return _icao_runway_taxiway(letter_index, instrument_runway, code_number)
        value = ICAO_SEPARATION_M[_ICAO_ROWS[kind]][letter_index]
        return RuleValue(value, "m", ICAO_SEPARATION_SOURCE, "from memory")

    def wingtip_clearance(self, kind: WingtipKind, aircraft: DesignAircraft) -> RuleValue:
        _check_kind(kind, WINGTIP_KINDS)
        letter_index = CODE_LETTERS.index(code_letter_of_aircraft(aircraft))
        return RuleValue(ICAO_WINGTIP_CLEARANCE_M[kind][letter_index], "m",
                         f"identity: {ICAO_SEPARATION_SOURCE}, minus the code's wingspan",
                         "from memory")

    def max_steering(self, aircraft: DesignAircraft) -> RuleValue:
        return ICAO_MAX_STEERING

    def group_label(self, aircraft: DesignAircraft) -> str:
        return f"Code {code_letter_of_aircraft(aircraft)}"

    def group_rank(self, aircraft: DesignAircraft) -> tuple[int, ...]:
        long_wheelbase = aircraft.wheelbase_m >= ICAO_LONG_WHEELBASE_M.value_m
        return (CODE_LETTERS.index(code_letter_of_aircraft(aircraft)),
                omgws_band_of_aircraft(aircraft), int(long_wheelbase))


def _icao_runway_taxiway(letter_index: int, instrument_runway: bool,
                         code_number: int) -> RuleValue:
    """Half the runway strip plus half the code's largest wingspan (Annex 14 Table 3-1)."""
    if code_number not in (1, 2, 3, 4):
        raise UnknownRuleError(f"unknown ICAO code number {code_number!r}: use 1, 2, 3 or 4")
    strip = ICAO_STRIP_HALF_WIDTH_M["instrument" if instrument_runway else "non_instrument"]
    half_strip = strip[code_number - 1]
    span_edge = CODE_LETTER_WINGSPAN_EDGES_M[letter_index]
    kind = "instrument" if instrument_runway else "non-instrument"
    return RuleValue(half_strip.value_m + 0.5 * span_edge.value_m, "m",
                     f"identity: half strip ({half_strip.source}) + half the code's largest "
                     f"wingspan; {kind} runway, code number {code_number}",
                     weakest(half_strip.confidence, span_edge.confidence))


_RULE_SETS: dict[str, RuleSet] = {"FAA": FaaRuleSet(), "ICAO": IcaoRuleSet()}


def get_rule_set(name: RuleSetName) -> RuleSet:
    """The rule set ``"FAA"`` or ``"ICAO"``."""
    if name not in _RULE_SETS:
        raise UnknownRuleError(f"unknown rule set {name!r}: use 'FAA' or 'ICAO'")
    return _RULE_SETS[name]


def governing_aircraft(fleet: tuple[DesignAircraft, ...] | list[DesignAircraft],
                       rule_set: RuleSet) -> DesignAircraft:
    """The fleet's most demanding aircraft under ``rule_set``.

    If one aircraft is in the highest group on every count the rule set uses (TDG and ADG; or
    code letter, OMGWS band and wheelbase class), it is returned (the largest wingspan wins a
    tie). Otherwise no single aircraft governs every rule, and a composite envelope aircraft is
    returned: the largest of each dimension, the smallest steering limit. It is meant for rule
    look-ups, not for a swept path.
    """
    if not fleet:
        raise InvalidAircraftError("the fleet is empty: add at least one design aircraft")
    ranks = [rule_set.group_rank(aircraft) for aircraft in fleet]
    top = tuple(max(column) for column in zip(*ranks, strict=True))
    candidates = [aircraft for aircraft, rank in zip(fleet, ranks, strict=True) if rank == top]
    if candidates:
        return max(candidates, key=lambda a: (a.wingspan_m, a.cmg_m, a.mgw_m))
    return envelope_aircraft(tuple(fleet))


def envelope_aircraft(fleet: tuple[DesignAircraft, ...]) -> DesignAircraft:
    """A composite aircraft with the largest of each dimension of ``fleet`` (for rule look-ups).

    Each member has its nose ahead of its cockpit and two tyres within its gear, so the largest
    values keep those properties and the composite is a valid design aircraft."""
    if not fleet:
        raise InvalidAircraftError("the fleet is empty: add at least one design aircraft")
    widest = max(fleet, key=lambda a: a.wingspan_m)
    return DesignAircraft(
        name="Envelope of " + ", ".join(a.name for a in fleet),
        cmg_m=max(a.cmg_m for a in fleet), wheelbase_m=max(a.wheelbase_m for a in fleet),
        mgw_m=max(a.mgw_m for a in fleet), tyre_width_m=max(a.tyre_width_m for a in fleet),
        wingspan_m=widest.wingspan_m, wingtip_x_m=widest.wingtip_x_m,
        nose_x_m=max(a.nose_x_m for a in fleet), tail_x_m=min(a.tail_x_m for a in fleet),
        tail_height_m=max(a.tail_height_m for a in fleet),
        max_steering_deg=min(a.max_steering_deg for a in fleet))
