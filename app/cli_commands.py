"""The work behind each command-line command. Imports of heavy parts (Qt, ezdxf) stay inside."""

from __future__ import annotations

import argparse
import json
import math
import sys
from dataclasses import replace
from typing import Any

from geometry.aircraft import DesignAircraft
from geometry.errors import GeometryError
from geometry.units import from_metres, to_metres

USAGE_ERROR = 2
SETTLE_LENGTH_IN_CMG = 15.0  # tan(alpha/2) decays as exp(-s/CMG): 15 CMG leaves < 1e-6 of the offset
LEAD_IN_LENGTH_IN_CMG = 2.0


def fail(message: str) -> int:
    sys.stderr.write(f"taxiwright: {message}\n")
    return USAGE_ERROR


def _aircraft_from_args(args: argparse.Namespace) -> DesignAircraft:
    """The theoretical airplane of a TDG, or an aircraft from the given dimensions (metres out)."""
    if args.tdg is not None:
        from geometry.theoretical import theoretical_airplane

        aircraft = theoretical_airplane(args.tdg.upper())
    else:
        missing = [name for name in ("wheelbase", "mgw") if getattr(args, name) is None]
        if missing:
            raise GeometryError("--cmg needs " + " and ".join(f"--{name}" for name in missing))
        aircraft = _custom_aircraft(args)
    if args.max_steering is not None:
        aircraft = replace(aircraft, max_steering_deg=args.max_steering)
    return aircraft


def _custom_aircraft(args: argparse.Namespace) -> DesignAircraft:
    cmg_m = to_metres(args.cmg, args.units)
    mgw_m = to_metres(args.mgw, args.units)
    # Without --span the wingtips are not reported; the body values below only keep the record valid.
    span_m = to_metres(args.span, args.units) if args.span is not None else mgw_m
    wing_x_m = to_metres(args.wing_x, args.units) if args.wing_x is not None else 0.0
    return DesignAircraft(name="command-line aircraft", cmg_m=cmg_m,
                          wheelbase_m=to_metres(args.wheelbase, args.units), mgw_m=mgw_m,
                          tyre_width_m=mgw_m / 10.0, wingspan_m=span_m, wingtip_x_m=wing_x_m,
                          nose_x_m=cmg_m * 1.1, tail_x_m=-cmg_m, tail_height_m=1.0)


def sweep_summary(aircraft: DesignAircraft, radius_m: float, delta_deg: float, side: str,
                  with_wingtips: bool) -> dict[str, Any]:
    """Analyse one standard turn; all lengths in metres."""
    from geometry.path import standard_turn_path
    from geometry.sweep import min_radius_for_steering_limit, sweep

    if not (math.isfinite(delta_deg) and 0.0 < delta_deg <= 180.0):
        raise GeometryError(f"--delta must lie in (0, 180] degrees, got {delta_deg}")
    turn_rad = math.radians(delta_deg) * (1.0 if side == "left" else -1.0)
    path = standard_turn_path(radius_m, turn_rad, LEAD_IN_LENGTH_IN_CMG * aircraft.cmg_m,
                              SETTLE_LENGTH_IN_CMG * aircraft.cmg_m)
    swept = sweep(path, aircraft)
    summary: dict[str, Any] = {
        "aircraft": aircraft.name,
        "radius": radius_m,
        "delta_deg": delta_deg,
        "side": side,
        "max_inner_wheel_offset": swept.max_edge_offset_m,
        "max_gear_deviation": float(max(abs(swept.gear_offset_m.min()), abs(swept.gear_offset_m.max()))),
        "max_steering_deg": math.degrees(swept.max_steering_rad),
        "max_steering_station": swept.max_steering_station_m - path.segments[0].length_m,
        "steering_limit_deg": aircraft.max_steering_deg,
        "within_steering_limit": math.degrees(swept.max_steering_rad) <= aircraft.max_steering_deg,
        "min_radius_for_steering_limit": min_radius_for_steering_limit(aircraft, abs(turn_rad)),
    }
    if with_wingtips:
        inside = swept.wingtip_left_xy if side == "left" else swept.wingtip_right_xy
        from geometry.offsets import lateral_offset_m

        offsets = lateral_offset_m(path, inside)
        summary["max_wingtip_offset"] = float(abs(offsets).max())
    return summary


LENGTH_KEYS = ("radius", "max_inner_wheel_offset", "max_gear_deviation", "max_steering_station",
               "min_radius_for_steering_limit", "max_wingtip_offset")


def _in_units(summary: dict[str, Any], units: str) -> dict[str, Any]:
    converted = {key: (from_metres(value, units) if key in LENGTH_KEYS else value)
                 for key, value in summary.items()}
    converted["units"] = units
    return converted


def _print_sweep(result: dict[str, Any]) -> None:
    u = result["units"]
    verdict = "within" if result["within_steering_limit"] else "EXCEEDS"
    lines = [
        f"Turn: {result['delta_deg']:g} deg {result['side']}, centerline radius {result['radius']:.2f} {u}, "
        f"design aircraft: {result['aircraft']}",
        f"  largest inner tyre edge offset from centerline: {result['max_inner_wheel_offset']:.3f} {u}",
        f"  largest main-gear centre deviation:             {result['max_gear_deviation']:.3f} {u}",
        f"  largest nose-gear steering angle: {result['max_steering_deg']:.2f} deg at "
        f"{result['max_steering_station']:.1f} {u} from the start of the arc ({verdict} the "
        f"{result['steering_limit_deg']:g} deg limit)",
        f"  smallest radius within the steering limit: {result['min_radius_for_steering_limit']:.2f} {u}",
    ]
    if "max_wingtip_offset" in result:
        offset = result["max_wingtip_offset"]
        lines.append(f"  largest inner wingtip offset from centerline: {offset:.2f} {u}")
    lines.append("Preliminary planning values only; verify against the governing standard and the aircraft "
                 "manufacturer's data.")
    print("\n".join(lines))


def run_sweep(args: argparse.Namespace) -> int:
    try:
        aircraft = _aircraft_from_args(args)
        summary = sweep_summary(aircraft, to_metres(args.radius, args.units), args.delta, args.side,
                                with_wingtips=args.span is not None or args.tdg is not None)
    except (GeometryError, KeyError) as error:
        message = error.args[0] if error.args else str(error)
        return fail(str(message))
    result = _in_units(summary, args.units)
    if args.json:
        print(json.dumps(result, indent=2))
    else:
        _print_sweep(result)
    return 0


def display_problem(environ: dict[str, str] | None = None) -> str | None:
    """Why a window cannot open here (one line for the planner), or None."""
    import ctypes.util
    import os

    env = os.environ if environ is None else environ
    if not sys.platform.startswith("linux") or env.get("QT_QPA_PLATFORM"):
        return None
    if not (env.get("DISPLAY") or env.get("WAYLAND_DISPLAY")):
        return ("there is no display to open the window on (to run without one: QT_QPA_PLATFORM=offscreen "
                "taxiwright open LAYOUT --screenshot OUT.png)")
    if not env.get("WAYLAND_DISPLAY") and ctypes.util.find_library("xcb-cursor") is None:
        return ("Qt needs the system library libxcb-cursor0 to open a window on X11; install it "
                "(Debian/Ubuntu: sudo apt-get install libxcb-cursor0) and try again")
    return None


def run_open(args: argparse.Namespace) -> int:
    problem = display_problem()
    if problem is not None:
        return fail(problem)
    from app.model.analysis import LayoutAnalyzer
    from app.ui.launch import run

    analyzer = LayoutAnalyzer()
    return run(args.layout, getattr(args, "screenshot", None), analyze=analyzer.analyze,
               analyze_live=analyzer.analyze_live)


def run_check(args: argparse.Namespace) -> int:
    from app.cli_check import check_command

    return check_command(args.layout, as_json=args.json)


def run_export(args: argparse.Namespace) -> int:
    from app.cli_check import export_command

    return export_command(args.layout, args.output, args.layers)
