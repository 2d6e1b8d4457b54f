"""Published closed-form relations for an aircraft turning with the cockpit over the centerline.

These are references for tests and for explaining results to a planner, not the engine: the
engine (:mod:`geometry.sweep`) follows the whole transient movement, whereas these relations
describe the steady state on a long arc. All lengths in one consistent unit (metres inside
taxiwright; the formulas are homogeneous, so feet in gives feet out). Symbols follow Horonjeff
et al., Planning and Design of Airports, 5th ed., section on taxiway fillets: R centerline
radius, d cockpit to main-gear centre, u main gear width (outside to outside), M edge safety
margin, W taxiway width on the tangent, A largest angle of the body axis to the tangent.
"""

from __future__ import annotations

import math

from geometry.errors import GeometryError, NonFiniteInputError, RadiusTooSmallError


def _require_positive(**values: float) -> None:
    for name, value in values.items():
        if not math.isfinite(value):
            raise NonFiniteInputError(f"{name} must be a finite number, got {value!r}")
        if value <= 0.0:
            raise GeometryError(f"{name} must be positive, got {value}")


def _require_radius_at_least_cmg(radius_m: float, cmg_m: float) -> None:
    _require_positive(radius_m=radius_m, cmg_m=cmg_m)
    if radius_m < cmg_m:
        raise RadiusTooSmallError(f"the steady-state relations need a radius ({radius_m:.2f} m) of at "
                                  f"least the cockpit-to-main-gear distance ({cmg_m:.2f} m)")


def max_body_angle_rad(radius_m: float, cmg_m: float) -> float:
    """Largest angle of the body axis to the centerline tangent, A = asin(d / R).

    Source: Horonjeff et al., Planning and Design of Airports, eq. 6-9.
    """
    _require_radius_at_least_cmg(radius_m, cmg_m)
    return math.asin(cmg_m / radius_m)


def fillet_radius_m(radius_m: float, cmg_m: float, gear_width_m: float, edge_margin_m: float,
                    body_angle_rad: float | None = None) -> float:
    """Fillet radius F = sqrt(R^2 + d^2 - 2 R d sin(A)) - u/2 - M.

    ``body_angle_rad`` defaults to eq. 6-9's A = asin(d/R), which turns the root into the
    steady-state main-gear radius sqrt(R^2 - d^2). Source: Horonjeff et al., Planning and Design
    of Airports, eq. 6-11.
    """
    angle_rad = max_body_angle_rad(radius_m, cmg_m) if body_angle_rad is None else body_angle_rad
    _require_positive(gear_width_m=gear_width_m)
    if not (math.isfinite(edge_margin_m) and math.isfinite(angle_rad)):
        raise NonFiniteInputError("the edge margin and body angle must be finite numbers")
    gear_radius_m = math.sqrt(radius_m**2 + cmg_m**2 - 2.0 * radius_m * cmg_m * math.sin(angle_rad))
    return gear_radius_m - gear_width_m / 2.0 - edge_margin_m


def lead_in_length_m(cmg_m: float, body_angle_rad: float, taxiway_width_m: float, gear_width_m: float,
                     edge_margin_m: float) -> float:
    """Lead-in length L = d ln[4 d tan(A/2) / (W - u - 2M)] - d.

    Why this form (identity, for reading it): on a straight the tractrix gives
    tan(alpha/2) = tan(A/2) exp(-x/d); the main-gear deviation d sin(alpha) ~ 2 d tan(alpha/2)
    falls to the allowed (W - u - 2M)/2 after a cockpit travel x = d ln[4 d tan(A/2)/(W - u - 2M)],
    and the gear is about d behind the cockpit. Source: Horonjeff et al., Planning and Design of
    Airports, eq. 6-12.
    """
    _require_positive(cmg_m=cmg_m, body_angle_rad=body_angle_rad, taxiway_width_m=taxiway_width_m,
                      gear_width_m=gear_width_m)
    allowed_m = taxiway_width_m - gear_width_m - 2.0 * edge_margin_m
    if not allowed_m > 0.0:
        raise GeometryError(f"the taxiway width {taxiway_width_m:.2f} leaves no room for the gear width "
                            f"{gear_width_m:.2f} and two edge margins of {edge_margin_m:.2f}")
    return cmg_m * math.log(4.0 * cmg_m * math.tan(body_angle_rad / 2.0) / allowed_m) - cmg_m


def steady_state_main_gear_radius_m(radius_m: float, cmg_m: float) -> float:
    """Radius of the main-gear centre's circle in the steady state, sqrt(R^2 - d^2).

    Source: the root of Horonjeff eq. 6-11 with eq. 6-9's A = asin(d/R) (REFERENCES.md section 1).
    """
    _require_radius_at_least_cmg(radius_m, cmg_m)
    return math.sqrt((radius_m - cmg_m) * (radius_m + cmg_m))


def steady_state_offtracking_m(radius_m: float, cmg_m: float) -> float:
    """Offtracking of the main-gear centre toward the inside in the steady state, R - sqrt(R^2 - d^2).

    The inner tyre edge lies a further u/2 inside. Source: Horonjeff et al., eqs. 6-9 and 6-11
    (REFERENCES.md section 1); the same steady-state form is used for road vehicles.
    """
    return radius_m - steady_state_main_gear_radius_m(radius_m, cmg_m)


def turning_radius_m(wheelbase_m: float, steering_rad: float, track_m: float = 0.0) -> float:
    """Turning radius from the nose-gear steering angle, R = b tan(90 deg - beta) + t/2.

    b wheelbase, beta steering angle, t main-gear track. With t = 0 this is the main-gear centre's
    radius of the kinematic model, tan(beta) = b / R_M. Source: Horonjeff et al., eq. 2-1.
    """
    _require_positive(wheelbase_m=wheelbase_m, steering_rad=steering_rad)
    if steering_rad >= math.pi / 2.0:
        raise GeometryError("the steering angle must be below 90 degrees")
    return wheelbase_m * math.tan(math.pi / 2.0 - steering_rad) + track_m / 2.0


def steady_state_steering_rad(radius_m: float, cmg_m: float, wheelbase_m: float) -> float:
    """Nose-gear steering angle in the steady state on a long arc, atan(WB / sqrt(R^2 - d^2)).

    Source: Horonjeff eq. 2-1 (t = 0) with the steady-state main-gear radius of eqs. 6-9/6-11.
    """
    _require_positive(wheelbase_m=wheelbase_m)
    return math.atan2(wheelbase_m, steady_state_main_gear_radius_m(radius_m, cmg_m))
