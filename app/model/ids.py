"""Element ids: short, readable, unique within a layout ("twy-1", "rwy-2", "obj-3", "pav-1").

An id is never reused while its element exists; once an element is removed its number may be
given again (undo restores the removed element together with the layout it belonged to, so no
two live elements ever share an id).
"""

from __future__ import annotations

from app.model.elements import Element, Layout, iter_elements

CENTERLINE_PREFIX = "twy"
RUNWAY_PREFIX = "rwy"
OBJECT_PREFIX = "obj"
PAVEMENT_PREFIX = "pav"


def new_id(layout: Layout, prefix: str) -> str:
    """An id ``"<prefix>-<n>"`` not used in ``layout``: one more than the highest ``n`` in use.

    Examples
    --------
    >>> new_id(Layout(), "twy")
    'twy-1'
    """
    if not prefix or not prefix.strip():
        raise ValueError("an id prefix must not be empty")
    highest = 0
    for element in iter_elements(layout):
        number = _number_after(element.id, prefix)
        if number is not None:
            highest = max(highest, number)
    return f"{prefix}-{highest + 1}"


def _number_after(element_id: str, prefix: str) -> int | None:
    head, separator, tail = element_id.rpartition("-")
    if separator and head == prefix and tail.isascii() and tail.isdigit():
        return int(tail)
    return None


def element_by_id(layout: Layout, element_id: str) -> Element | None:
    """The element with ``element_id``, or None when the layout has none."""
    for element in iter_elements(layout):
        if element.id == element_id:
            return element
    return None


def element_ids(layout: Layout) -> frozenset[str]:
    """All element ids of the layout."""
    return frozenset(element.id for element in iter_elements(layout))
