"""taxiwright's pure geometry engine: numpy and shapely only, no Qt, no ezdxf, no file I/O.

Conventions used everywhere in this package (stated once, here):

* Lengths are in metres (``_m`` suffix where a name could be ambiguous); angles are in radians
  unless a name ends in ``_deg``. Conversion to feet happens only at the boundary
  (:mod:`geometry.units`).
* Plan coordinates: x to the east, y to the north. Headings are measured counter-clockwise from +x.
* A positive turn angle is a left (counter-clockwise) turn; a negative one is a right turn.
* Lateral offsets are positive to the left of the direction of travel.
"""
