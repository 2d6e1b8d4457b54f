"""The command line: ``taxiwright [LAYOUT]``, ``open``, ``sweep``, ``check``, ``export``.

Every command reports bad input as one line on stderr with exit status 2, never a traceback.
"""

from __future__ import annotations

import argparse
import os
import sys
from collections.abc import Sequence

from app.cli_commands import run_check, run_export, run_open, run_sweep

USAGE_ERROR = 2


class _Parser(argparse.ArgumentParser):
    """An argument parser whose errors are one line on stderr and exit status 2."""

    def error(self, message: str) -> None:  # type: ignore[override]
        sys.stderr.write(f"taxiwright: {message}\n")
        raise SystemExit(USAGE_ERROR)


def _add_sweep(commands: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    sweep = commands.add_parser("sweep", help="analyse one standard turn for a design aircraft")
    aircraft = sweep.add_mutually_exclusive_group(required=True)
    aircraft.add_argument("--tdg", help="use the theoretical airplane of this Taxiway Design Group (1A..7)")
    aircraft.add_argument("--cmg", type=float, help="cockpit to main-gear centre distance")
    sweep.add_argument("--wheelbase", type=float, help="nose gear to main-gear centre")
    sweep.add_argument("--mgw", type=float, help="main gear width, outer tyre edge to outer tyre edge")
    sweep.add_argument("--span", type=float, help="wingspan (optional)")
    sweep.add_argument("--wing-x", type=float, dest="wing_x",
                       help="wingtip position along the body from the main gear, + forward (optional)")
    sweep.add_argument("--max-steering", type=float, dest="max_steering", help="steering limit, degrees")
    sweep.add_argument("--radius", type=float, required=True, help="centerline radius")
    sweep.add_argument("--delta", type=float, required=True, help="turn angle, degrees (0 < delta <= 180)")
    sweep.add_argument("--side", choices=("left", "right"), default="left")
    sweep.add_argument("--units", choices=("ft", "m"), default="ft", help="units of all lengths")
    sweep.add_argument("--json", action="store_true", help="print a JSON object instead of a summary")


def build_parser() -> argparse.ArgumentParser:
    # ``taxiwright LAYOUT`` is rewritten to ``taxiwright open LAYOUT`` by main(): a positional here
    # would swallow the command name ("check") and leave its file name to be read as the command.
    parser = _Parser(prog="taxiwright", description="Taxiway layout sketcher (preliminary planning only).",
                     usage="taxiwright [LAYOUT] | taxiwright {open,sweep,check,export} ...")
    commands = parser.add_subparsers(dest="command", parser_class=_Parser)
    opener = commands.add_parser("open", help="open the desktop program on a layout")
    opener.add_argument("layout", nargs="?")
    opener.add_argument("--screenshot", metavar="PNG",
                        help="wait for all geometry, save a picture of the window, and exit")
    _add_sweep(commands)
    check = commands.add_parser("check", help="check a layout and print findings and pavement areas")
    check.add_argument("layout")
    check.add_argument("--json", action="store_true")
    export = commands.add_parser("export", help="export a layout to DXF for drafting")
    export.add_argument("layout")
    export.add_argument("-o", "--output", required=True, metavar="OUT.dxf")
    export.add_argument("--layers", nargs="+", metavar="LAYER", help="only these layers (keys or DXF names)")
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    raw = list(sys.argv[1:] if argv is None else argv)
    known = {"open", "sweep", "check", "export", "-h", "--help"}
    if raw and raw[0] not in known:
        raw = ["open", *raw]
    args = build_parser().parse_args(raw)
    if args.command is None:  # no arguments at all: the desktop program on a new layout
        args = build_parser().parse_args(["open"])
    if args.command == "open":
        return run_open(args)
    runner = {"sweep": run_sweep, "check": run_check, "export": run_export}[args.command]
    try:
        return runner(args)
    except BrokenPipeError:  # the reader (``| head``) stopped early: not an error of ours
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 0


if __name__ == "__main__":
    raise SystemExit(main())
