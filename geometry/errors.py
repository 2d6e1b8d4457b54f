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
