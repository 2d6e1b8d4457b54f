"""World files: the six-line text file that places an image on the plan.

The lines are A, D, B, E, C, F (GDAL, "WLD -- ESRI World File" driver page): A the pixel size
in x, D and B rotation terms, E the pixel size in y (negative for a north-up image), C and F the
x and y of the CENTRE of the upper-left pixel. A pixel (col, row) lies at
``x = A col + B row + C``, ``y = D col + E row + F``.

A world file states no unit: its numbers are read in the unit the caller names (the layout's
units when the planner says nothing else) and converted to metres.
"""

from __future__ import annotations

import math
from pathlib import Path

from app.model.underlays import Placement, PlacementError, UnderlayFileError
from geometry.units import from_metres, to_metres

MAX_WORLD_FILE_BYTES = 4096  # six numbers; anything longer is not a world file
TERM_NAMES = ("A (pixel size in x)", "D (rotation term)", "B (rotation term)",
              "E (pixel size in y)", "C (x of the upper-left pixel centre)",
              "F (y of the upper-left pixel centre)")


def world_file_candidates(image_path: Path | str) -> tuple[Path, ...]:
    """The sidecar names a world file of ``image_path`` may have, most specific first:
    ``.pgw`` (first and last letter of the suffix + "w"), ``.pngw`` (suffix + "w"), ``.wld``."""
    image = Path(image_path)
    suffix = image.suffix.lower().lstrip(".")
    if not suffix:
        return (image.with_suffix(".wld"),)
    names = [f"{suffix[0]}{suffix[-1]}w", f"{suffix}w", "wld"]
    return tuple(image.with_suffix(f".{name}") for name in dict.fromkeys(names))


def find_world_file(image_path: Path | str) -> Path | None:
    """The world file beside ``image_path`` (suffix compared without case), or None."""
    image = Path(image_path)
    try:
        siblings = {entry.name.lower(): entry for entry in image.parent.iterdir() if entry.is_file()}
    except OSError:
        return None
    for candidate in world_file_candidates(image):
        found = siblings.get(candidate.name.lower())
        if found is not None:
            return found
    return None


def parse_world_file(text: str, source: str = "world file") -> tuple[float, ...]:
    """The six terms (A, D, B, E, C, F) of a world file's text; blank lines are ignored."""
    values: list[float] = []
    for number, line in enumerate(text.splitlines(), start=1):
        if not line.strip():
            continue
        if len(values) == 6:
            raise UnderlayFileError(f"{source}: line {number}: more than six numbers; not a world file")
        try:
            value = float(line.strip())
        except ValueError:
            raise UnderlayFileError(f"{source}: line {number}: {line.strip()[:40]!r} is not a number "
                                    f"(expected {TERM_NAMES[len(values)]})") from None
        if not math.isfinite(value):
            raise UnderlayFileError(f"{source}: line {number}: {TERM_NAMES[len(values)]} is not finite")
        values.append(value)
    if len(values) < 6:
        raise UnderlayFileError(f"{source}: {len(values)} number(s) found; a world file has six "
                                f"(pixel sizes, rotation terms, upper-left pixel centre)")
    return tuple(values)


def read_world_file(path: Path | str) -> tuple[float, ...]:
    path = Path(path)
    try:
        data = path.read_bytes()[: MAX_WORLD_FILE_BYTES + 1]
    except OSError as error:
        raise UnderlayFileError(f"{path}: cannot read the world file ({error.strerror or error})") from error
    if len(data) > MAX_WORLD_FILE_BYTES:
        raise UnderlayFileError(f"{path}: too long for a world file")
    return parse_world_file(data.decode("utf-8", errors="replace"), str(path))


def placement_from_terms(terms: tuple[float, ...], units: str) -> Placement:
    """The :class:`Placement` of world-file terms given in ``units`` ("ft" or "m")."""
    a, d, b, e, c, f = (to_metres(term, units) for term in terms)
    try:
        return Placement(x_per_col_m=a, y_per_col_m=d, x_per_row_m=b, y_per_row_m=e, x0_m=c, y0_m=f)
    except PlacementError as error:
        raise UnderlayFileError(f"the world file cannot place the image: {error}") from error


def placement_for_image(image_path: Path | str, units: str) -> tuple[Placement, Path] | None:
    """The placement of ``image_path`` from its world file and that file's path, or None when
    the image has no world file."""
    world_file = find_world_file(image_path)
    if world_file is None:
        return None
    return placement_from_terms(read_world_file(world_file), units), world_file


def world_file_text(placement: Placement, units: str) -> str:
    """The world file of ``placement`` in ``units`` (for saving a placement made by two points)."""
    return "".join(f"{from_metres(term, units):.10f}\n" for term in placement.terms())
