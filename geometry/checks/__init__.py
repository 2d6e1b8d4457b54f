"""Design checks: turn the analysed layout (:class:`CheckInputs`) into findings. Never raises.

Every family of checks lives in its own module; :func:`run_checks` runs them all and sorts the
findings: errors first, then warnings, then information; within a severity by code, then by
location (x, then y). docs/checks.md lists every code.

A rule that cannot be looked up for an aircraft (one outside the largest design group, say) does
not stop the run: the check is skipped there and a ``W-CHECK-SKIPPED`` finding says why. Should a
family fail on malformed geometry, the same finding names the family.
"""

from __future__ import annotations

from collections.abc import Callable

from shapely.errors import GEOSException

from geometry.checks.common import CheckContext
from geometry.checks.crossovers import check_crossover_spacing, check_reversal_steering
from geometry.checks.inputs import CheckInputs, LineInfo, MovementInfo, ObjectInfo, TrackInfo
from geometry.checks.junction_rules import check_paths
from geometry.checks.overlaps import check_overlaps
from geometry.checks.runways import check_runway_connections, check_wide_throats
from geometry.checks.separations import check_line_separations, check_object_separations
from geometry.checks.steering import SteeringRadii, check_steering, check_turn_fit
from geometry.checks.widths import check_edge_margins, check_widths
from geometry.checks.wingtips import check_wingtip_objects, check_wingtip_taxiways
from geometry.errors import GeometryError
from geometry.findings import Finding

__all__ = ["CheckInputs", "LineInfo", "MovementInfo", "ObjectInfo", "TrackInfo", "finding_order",
           "run_checks"]


def finding_order(finding: Finding) -> tuple[int, str, float, float, tuple[str, ...], str]:
    """Sort key: severity (errors first), code, location x then y, element ids, message."""
    x, y = finding.location_m
    return (-int(finding.severity), finding.code, x, y, finding.element_ids, finding.message)


def run_checks(inputs: CheckInputs) -> tuple[Finding, ...]:
    """Every design check over ``inputs``, as findings sorted by :func:`finding_order`."""
    context = CheckContext(inputs)
    radii = SteeringRadii()
    families: tuple[tuple[str, Callable[[], list[Finding]]], ...] = (
        ("straight width", lambda: check_widths(context)),
        ("edge margin", lambda: check_edge_margins(context)),
        ("steering", lambda: check_steering(context, radii)),
        ("turn fit", lambda: check_turn_fit(context)),
        ("line separation", lambda: check_line_separations(context)),
        ("object separation", lambda: check_object_separations(context)),
        ("wingtip to object", lambda: check_wingtip_objects(context)),
        ("wingtip to taxiway", lambda: check_wingtip_taxiways(context)),
        ("paths per approach", lambda: check_paths(context)),
        ("crossover spacing", lambda: check_crossover_spacing(context, radii)),
        ("reversal steering", lambda: check_reversal_steering(context, radii)),
        ("wide throat", lambda: check_wide_throats(context)),
        ("runway connection", lambda: check_runway_connections(context)),
        ("overlapping centerlines", lambda: check_overlaps(context)),
    )
    findings: list[Finding] = []
    for name, family in families:
        try:
            findings.extend(family())
        except (GeometryError, GEOSException) as error:
            context.skip(name, f"the check could not run on this layout ({error})", (), (0.0, 0.0))
    findings.extend(context.skipped_findings())
    return tuple(sorted(findings, key=finding_order))
