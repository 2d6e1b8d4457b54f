"""Design checks: turn the analysed layout (:class:`CheckInputs`) into findings. Never raises.

Every family of checks lives in its own module; :func:`run_checks` runs them all and sorts the
findings: errors first, then warnings, then information; within a severity by code, then by
location (x, then y). docs/checks.md lists every code.

A rule that cannot be looked up for an aircraft (one outside the largest design group, say) does
not stop the run: the check is skipped there and a ``W-CHECK-SKIPPED`` finding says why. Should a
family fail on malformed geometry, the same finding names the family. :mod:`.incremental` runs
the families item by item, so that a later run redoes only the items an edit changed.
"""

from __future__ import annotations

from geometry.checks.incremental import IncrementalChecks, finding_order
from geometry.checks.inputs import CheckInputs, LineInfo, MovementInfo, ObjectInfo, TrackInfo
from geometry.findings import Finding

__all__ = ["CheckInputs", "IncrementalChecks", "LineInfo", "MovementInfo", "ObjectInfo", "TrackInfo",
           "finding_order", "run_checks"]


def run_checks(inputs: CheckInputs) -> tuple[Finding, ...]:
    """Every design check over ``inputs``, as findings sorted by :func:`finding_order`.

    The same as a warm :class:`IncrementalChecks` (the analysis keeps one) with an empty memory."""
    return IncrementalChecks().run(inputs)
