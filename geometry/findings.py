"""Findings: what a design check reports. Checks return findings; they never raise."""

from __future__ import annotations

from dataclasses import dataclass
from enum import IntEnum


class Severity(IntEnum):
    INFO = 0
    WARNING = 1
    ERROR = 2


@dataclass(frozen=True, slots=True)
class Finding:
    """One result of a design check.

    code: stable identifier such as ``"W-EDGE-MARGIN"`` (documented in docs/checks.md).
    message: a sentence for the planner, with numbers and units.
    element_ids: the layout elements (centerline, junction, movement, object ids) concerned.
    location_m: where to zoom to, plan coordinates in metres.
    rule: the rule's short name; source: where its value comes from, with confidence.
    """

    code: str
    severity: Severity
    message: str
    element_ids: tuple[str, ...]
    location_m: tuple[float, float]
    rule: str
    source: str
