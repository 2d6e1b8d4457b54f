"""Specific exceptions of the engine. Each also inherits ``ValueError`` so callers may catch broadly.

Messages are written for a planner: they say what is wrong and what to change.
"""

from __future__ import annotations


class GeometryError(ValueError):
    """Base of every error the engine raises for bad input."""


class NonFiniteInputError(GeometryError):
    """A coordinate, length or angle is NaN or infinite."""


class InvalidPathError(GeometryError):
    """A centerline path is malformed: zero-length or non-tangent segments, gaps, radius <= 0."""


class InvalidAircraftError(GeometryError):
    """Design-aircraft dimensions are missing, non-positive or inconsistent."""


class RadiusTooSmallError(GeometryError):
    """The aircraft cannot follow the requested radius (steering limit or geometry)."""


class TurnDoesNotFitError(GeometryError):
    """The legs of a junction are too short for the turn arc's tangent length."""


class NetworkError(GeometryError):
    """The line network is malformed (duplicate line ids), or a leg, corner or movement is used
    with a junction it does not belong to."""


class InvalidSweepSettingError(GeometryError):
    """A swept-path setting is out of range: chord tolerance too small, or an initial body angle
    beyond 90 degrees."""


class OutsideDesignGroupsError(GeometryError):
    """A dimension is not positive, or is larger than the largest design group of the standard
    (above ADG VI, code letter F, OMGWS 15 m or TDG 7)."""


class UnknownRuleError(GeometryError):
    """A rule set, design group, separation kind or code number that the standards do not know."""


class RuleInputError(GeometryError):
    """An input to a standards rule is out of range: a malformed rule value, a negative taxiing
    speed, or a metre value asked of an angle."""


class InvalidCornerError(GeometryError):
    """The inside corner of a junction is malformed: legs in line, a turn radius not larger than
    half the pavement width, or a turn-arc centre that is not tangent to both legs."""


class FilletDoesNotFitError(GeometryError):
    """No fillet of the usual form (taper, arc about the turn centre, taper) can contain the
    required pavement at a corner."""
