"""``taxiwright check`` and ``taxiwright export``: load a layout, analyse it, report or write DXF."""

from __future__ import annotations

import json
import sys
from collections.abc import Sequence
from typing import Any

import shapely
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from app.fileio.layout_json import LayoutFileError, load_layout
from app.model.analysis import analyze
from app.model.elements import Layout
from app.model.results import JunctionResult, LayoutResult
from geometry.errors import GeometryError
from geometry.findings import Finding, Severity
from geometry.units import from_metres

USAGE_ERROR = 2
ERRORS_FOUND = 1
CAUTION = ("Preliminary planning layout only: verify against the governing standard, local codes and the "
           "aircraft manufacturers' data; final design by a licensed engineer.")


def _fail(message: str) -> int:
    sys.stderr.write(f"taxiwright: {message}\n")
    return USAGE_ERROR


def _load(path: str) -> Layout:
    return load_layout(path)


def _area(value_m2: float, units: str) -> float:
    return value_m2 * from_metres(1.0, units) ** 2


def _new_fillet_area_m2(junction: JunctionResult, existing: BaseGeometry | None) -> float:
    """The junction's fillet pavement that is not existing pavement already."""
    fillets = shapely.union_all([fillet.outline for fillet in junction.fillets]) if junction.fillets else None
    if fillets is None:
        return 0.0
    return float((fillets.difference(existing) if existing is not None else fillets).area)


def _report(layout: Layout, result: LayoutResult) -> dict[str, Any]:
    units = layout.units
    existing = (shapely.union_all([Polygon(p.outline, p.holes) for p in layout.existing_pavements])
                if layout.existing_pavements else None)
    junctions = [{"id": j.junction_id, "kind": j.kind, "lines": list(j.line_ids),
                  "required_area": _area(j.required_area_m2, units),
                  "buildable_area": _area(j.buildable_area_m2, units),
                  "new_fillet_area": _area(_new_fillet_area_m2(j, existing), units),
                  "fillets": [{"corner": f.corner_key, "fillet_radius": from_metres(f.fillet_radius_m, units),
                               "taper_a": from_metres(f.taper_a_m, units),
                               "taper_b": from_metres(f.taper_b_m, units),
                               "area": _area(f.area_m2, units)} for f in j.fillets]}
                 for j in result.junctions.values()]
    findings = [{"code": f.code, "severity": f.severity.name.lower(), "message": f.message,
                 "elements": list(f.element_ids),
                 "location": [from_metres(f.location_m[0], units), from_metres(f.location_m[1], units)],
                 "rule": f.rule, "source": f.source} for f in result.findings]
    return {"title": layout.title, "units": units, "area_units": f"sq {units}", "rule_set": layout.rule_set,
            "fleet": [a.name for a in layout.fleet],
            "total_pavement_area": _area(result.total_area_m2, units),
            "new_pavement_area": _area(result.new_area_m2, units),
            "junctions": junctions, "findings": findings, "caution": CAUTION}


def _count(number: int, noun: str) -> str:
    return f"{number} {noun}" if number == 1 else f"{number} {noun}s"


def _print_text(report: dict[str, Any]) -> None:
    units, area_units = report["units"], report["area_units"]
    print(f"{report['title']}  ({report['rule_set']} rules, lengths in {units})")
    print(f"Fleet: {', '.join(report['fleet']) or '(theoretical design airplane)'}")
    print(f"Pavement: {report['total_pavement_area']:,.0f} {area_units} in total, "
          f"{report['new_pavement_area']:,.0f} {area_units} new")
    for junction in report["junctions"]:
        print(f"  junction {junction['id']} ({junction['kind']}): required {junction['required_area']:,.0f}, "
              f"buildable {junction['buildable_area']:,.0f} {area_units}, "
              f"{_count(len(junction['fillets']), 'fillet')} ({junction['new_fillet_area']:,.0f} new)")
    counts = {name: sum(1 for f in report["findings"] if f["severity"] == name)
              for name in ("error", "warning", "info")}
    print(f"Findings: {_count(counts['error'], 'error')}, {_count(counts['warning'], 'warning')}, "
          f"{_count(counts['info'], 'note')}")
    for finding in report["findings"]:
        print(f"  [{finding['severity']:7}] {finding['code']}: {finding['message']}")
    print(report["caution"])


def _has_errors(findings: Sequence[Finding]) -> bool:
    return any(f.severity == Severity.ERROR for f in findings)


def _analyze(layout: Layout) -> LayoutResult:
    """The analysis; an engine error (bad input by definition, geometry/errors.py) becomes a
    LayoutFileError so that the command still ends in one line, not a traceback."""
    try:
        return analyze(layout)
    except GeometryError as error:
        raise LayoutFileError(f"cannot analyse the layout: {error}") from error


def check_command(path: str, *, as_json: bool) -> int:
    try:
        layout = _load(path)
        result = _analyze(layout)
    except LayoutFileError as error:
        return _fail(str(error))
    report = _report(layout, result)
    if as_json:
        print(json.dumps(report, indent=2))
    else:
        _print_text(report)
    return ERRORS_FOUND if _has_errors(result.findings) else 0


def export_command(path: str, output: str, layers: Sequence[str] | None) -> int:
    try:
        layout = _load(path)  # first: a bad file is reported without loading the exporter
    except LayoutFileError as error:
        return _fail(str(error))
    from app.fileio.dxf_export import DxfExportError, export_dxf
    from app.fileio.dxf_layers import UnknownLayerError, select_layers

    try:
        select_layers(layers)  # an unknown layer name is reported before the analysis runs
        summary = export_dxf(layout, _analyze(layout), output, layers=layers)
    except (LayoutFileError, DxfExportError, UnknownLayerError) as error:
        return _fail(str(error))
    print(f"Wrote {summary.path}: {summary.total_entities} entities on {len(summary.layers)} layers "
          f"({layout.units}).")
    for warning in summary.warnings:
        print(f"  warning: {warning}")
    return 0
