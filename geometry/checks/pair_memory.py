"""The line-separation findings of a pair of lines, remembered by the pieces they were found on.

Dragging a vertex changes the line it belongs to, so every pair of lines that line takes part in
is checked again; yet only the pieces near the vertex moved. :class:`PairPieceMemory` keeps, per
pair of lines, the findings with the pieces they were computed from (coordinates, segment
numbers, the segment pairs left out at shared junctions) and what the messages and rule look-ups
read of the two lines, and hands the findings back when all of that is equal again.

The stations of the pieces along the first line move whenever a vertex before them moves; they
matter only to the length of a too-close stretch, so they are compared only when the pair has
findings. Rule look-ups that could not be made (``W-CHECK-SKIPPED``) are remembered with the
findings and noted again on a hit, as the computation would have noted them.
"""

from __future__ import annotations

from collections.abc import Callable

from geometry.checks.common import CheckContext
from geometry.checks.inputs import LineInfo
from geometry.checks.parallel_pieces import Pieces, SegmentKey
from geometry.findings import Finding

_Key = tuple[object, ...]


def _line_key(info: LineInfo) -> _Key:
    """What the separation rule, its look-up and the messages read of a line."""
    return (info.line.id, info.name, info.line.kind, info.design_aircraft, info.instrument,
            info.line.segments[0].start if info.line.segments else None)


def _pieces_key(pieces: Pieces) -> _Key:
    return (pieces.line_ids, pieces.owner.tobytes(), pieces.segment.tobytes(), pieces.start.tobytes(),
            pieces.end.tobytes())


class PairPieceMemory:
    """The last findings of each pair of lines, by the pieces they were found on."""

    def __init__(self) -> None:
        self._known: dict[tuple[str, str], tuple[_Key, bytes, list[Finding],
                                                 tuple[tuple[tuple[str, str], Finding], ...]]] = {}

    def findings(self, context: CheckContext, a: LineInfo, b: LineInfo, pieces: Pieces,
                 excluded: set[tuple[SegmentKey, SegmentKey]],
                 compute: Callable[[], list[Finding]]) -> list[Finding]:
        """``compute()`` (the findings of ``a`` and ``b`` over ``pieces``), or the remembered
        findings when they were computed from equal pieces and lines."""
        key = (_line_key(a), _line_key(b), _pieces_key(pieces), frozenset(excluded))
        stations = pieces.start_station_m.tobytes()
        known = self._known.get((a.line.id, b.line.id))
        if known is not None and known[0] == key and (not known[2] or known[1] == stations):
            for reason, skipped in known[3]:
                context.skipped.setdefault(reason, skipped)
            return list(known[2])
        before = set(context.skipped)
        found = compute()
        noted = tuple(item for item in context.skipped.items() if item[0] not in before)
        self._known[(a.line.id, b.line.id)] = (key, stations, list(found), noted)
        return found

    def forget_beyond(self, count: int) -> None:
        """Forget everything once more than ``count`` pairs are remembered (lines long gone)."""
        if len(self._known) > count:
            self._known.clear()
