"""Design-group classification: FAA TDG and ADG, ICAO code letter and OMGWS band.

Inputs are in metres; the FAA edges are stated in feet and compared in metres (1 ft = 0.3048 m
exactly), so a dimension given exactly at an edge lands in the group the standard says.
Band edges are as :mod:`geometry.standards` states them:

* ADG and code letter: lower edge inclusive, upper edge exclusive (ADG II is
  49 ft <= wingspan < 79 ft; code B is 15 m <= wingspan < 24 m); for ADG the more demanding of
  wingspan and tail height governs.
* OMGWS band: lower inclusive, upper exclusive (band 2 is 4.5 m <= OMGWS < 6 m).
* TDG: a point on a chart line belongs to the lower group (see :class:`standards.TdgBox`).

A dimension that is not positive, or beyond the largest group, raises
:class:`~geometry.errors.OutsideDesignGroupsError`.
"""

from __future__ import annotations

import math

from geometry.aircraft import DesignAircraft
from geometry.errors import NonFiniteInputError, OutsideDesignGroupsError
from geometry.standards import (
    ADG_NAMES,
    ADG_TAIL_HEIGHT_EDGES_FT,
    ADG_WINGSPAN_EDGES_FT,
    CODE_LETTER_WINGSPAN_EDGES_M,
    CODE_LETTERS,
    OMGWS_EDGES_M,
    TDG_CHART,
    RuleValue,
)


def _require_positive(name: str, value_m: float) -> None:
    if not isinstance(value_m, (int, float)) or not math.isfinite(value_m):
        raise NonFiniteInputError(f"{name} must be a finite number, got {value_m!r}")
    if value_m <= 0.0:
        raise OutsideDesignGroupsError(f"{name} must be positive, got {value_m} m")


def _band_index(name: str, value_m: float, upper_edges: tuple[RuleValue, ...], what: str) -> int:
    """Index of the first band whose exclusive upper edge lies above ``value_m``."""
    _require_positive(name, value_m)
    for index, edge in enumerate(upper_edges):
        if value_m < edge.value_m:
            return index
    largest = upper_edges[-1]
    raise OutsideDesignGroupsError(
        f"{name} of {value_m:.2f} m is beyond the largest {what} (limit {largest.value:g} "
        f"{largest.unit}, {largest.source}); no design group of the standard covers it")


def adg_by_wingspan(wingspan_m: float) -> str:
    """ADG I..VI from the wingspan alone."""
    return ADG_NAMES[_band_index("wingspan", wingspan_m, ADG_WINGSPAN_EDGES_FT, "ADG (VI)")]


def adg_by_tail_height(tail_height_m: float) -> str:
    """ADG I..VI from the tail height alone."""
    return ADG_NAMES[_band_index("tail height", tail_height_m, ADG_TAIL_HEIGHT_EDGES_FT,
                                 "ADG (VI)")]


def adg_of(wingspan_m: float, tail_height_m: float) -> str:
    """FAA Airplane Design Group: the more demanding of wingspan and tail height governs.

    Examples
    --------
    >>> adg_of(35.0, 12.0)
    'III'
    """
    by_span = ADG_NAMES.index(adg_by_wingspan(wingspan_m))
    by_tail = ADG_NAMES.index(adg_by_tail_height(tail_height_m))
    return ADG_NAMES[max(by_span, by_tail)]


def code_letter_of(wingspan_m: float) -> str:
    """ICAO aerodrome reference code letter A..F from the wingspan.

    Examples
    --------
    >>> code_letter_of(24.0)
    'C'
    """
    return CODE_LETTERS[_band_index("wingspan", wingspan_m, CODE_LETTER_WINGSPAN_EDGES_M,
                                    "code letter (F)")]


def omgws_band_of(mgw_m: float) -> int:
    """ICAO outer main gear wheel span band, 1 (< 4.5 m) to 4 (9 m to < 15 m)."""
    return 1 + _band_index("outer main gear wheel span", mgw_m, OMGWS_EDGES_M, "OMGWS band (4)")


def tdg_of(mgw_m: float, cmg_m: float) -> str:
    """FAA Taxiway Design Group from main gear width and cockpit-to-main-gear distance.

    Examples
    --------
    >>> tdg_of(7.0, 17.0)
    '3'
    """
    _require_positive("main gear width", mgw_m)
    _require_positive("cockpit to main gear distance", cmg_m)
    for box in TDG_CHART:
        if mgw_m <= box.max_mgw.value_m and cmg_m <= box.max_cmg.value_m:
            return box.tdg
    last = TDG_CHART[-1]
    raise OutsideDesignGroupsError(
        f"main gear width {mgw_m:.2f} m and cockpit to main gear {cmg_m:.2f} m lie beyond TDG "
        f"{last.tdg} (MGW up to {last.max_mgw.value:g} ft, CMG up to {last.max_cmg.value:g} ft); "
        f"no taxiway design group covers this aircraft")


def tdg_of_aircraft(aircraft: DesignAircraft) -> str:
    return tdg_of(aircraft.mgw_m, aircraft.cmg_m)


def adg_of_aircraft(aircraft: DesignAircraft) -> str:
    return adg_of(aircraft.wingspan_m, aircraft.tail_height_m)


def code_letter_of_aircraft(aircraft: DesignAircraft) -> str:
    return code_letter_of(aircraft.wingspan_m)


def omgws_band_of_aircraft(aircraft: DesignAircraft) -> int:
    # The OMGWS is the main gear width: both are measured over the outside edges of the tyres.
    return omgws_band_of(aircraft.mgw_m)
