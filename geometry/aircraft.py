"""The design aircraft: the dimensions the sweep and the checks need, as a frozen value.

Longitudinal positions are measured along the body axis from the main-gear centre (the
midpoint of the main-gear axle line), positive forward. All lengths in metres.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from geometry.errors import InvalidAircraftError

DEFAULT_MAX_STEERING_DEG = 50.0  # design criterion: Horonjeff pp. 86, 287 (see docs/standards.md)


@dataclass(frozen=True, slots=True)
class DesignAircraft:
    """Dimensions of one design aircraft.

    name: label shown to the planner.
    cmg_m: cockpit (pilot's eye, over the centerline) to main-gear centre, along the body.
    wheelbase_m: nose gear to main-gear centre.
    mgw_m: main gear width, outer edge to outer edge of the outermost main-gear tyres.
    tyre_width_m: width of one main-gear tyre (used to draw the tyre band).
    wingspan_m: tip to tip.
    wingtip_x_m: position of the wingtips along the body, from the main-gear centre (+ forward;
        usually negative or small: swept wings put the tips behind the gear).
    nose_x_m: position of the nose, from the main-gear centre (+ forward, > cmg_m).
    tail_x_m: position of the tail tip, from the main-gear centre (negative: behind).
    tail_height_m: height of the tail (for the ADG).
    max_steering_deg: nose-gear steering limit used for design.
    """

    name: str
    cmg_m: float
    wheelbase_m: float
    mgw_m: float
    tyre_width_m: float
    wingspan_m: float
    wingtip_x_m: float
    nose_x_m: float
    tail_x_m: float
    tail_height_m: float
    max_steering_deg: float = DEFAULT_MAX_STEERING_DEG

    def __post_init__(self) -> None:
        for field_name in ("cmg_m", "wheelbase_m", "mgw_m", "tyre_width_m", "wingspan_m",
                           "wingtip_x_m", "nose_x_m", "tail_x_m", "tail_height_m",
                           "max_steering_deg"):
            value = getattr(self, field_name)
            if not isinstance(value, (int, float)) or not math.isfinite(value):
                raise InvalidAircraftError(f"{self.name}: {field_name} must be a finite number, "
                                           f"got {value!r}")
        for field_name in ("cmg_m", "wheelbase_m", "mgw_m", "tyre_width_m", "wingspan_m",
                           "tail_height_m"):
            if getattr(self, field_name) <= 0.0:
                raise InvalidAircraftError(f"{self.name}: {field_name} must be positive")
        if self.tyre_width_m * 2.0 > self.mgw_m:
            raise InvalidAircraftError(f"{self.name}: two tyre widths exceed the main gear width")
        if not 0.0 < self.max_steering_deg < 90.0:
            raise InvalidAircraftError(f"{self.name}: max steering angle must lie between 0 and "
                                       f"90 degrees, got {self.max_steering_deg}")
        if self.nose_x_m < self.cmg_m:
            raise InvalidAircraftError(f"{self.name}: the nose must be ahead of the cockpit")
        if self.tail_x_m >= 0.0:
            raise InvalidAircraftError(f"{self.name}: the tail must be behind the main gear "
                                       f"(tail_x_m < 0)")

    @property
    def max_steering_rad(self) -> float:
        return math.radians(self.max_steering_deg)
