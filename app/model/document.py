"""The observable document: the current layout, its file, its undo stack, and change callbacks.

Views never change the layout themselves: they call :meth:`Document.execute` with a new layout
built by :mod:`app.model.edits`, and redraw when the document calls them back.

Notification rules
------------------
* Every change of ``layout`` calls each subscriber once with a :class:`LayoutChange`, after the
  document's state (layout, stack, dirty flag) is already updated.
* A drag calls back with reason ``"preview"`` for every intermediate layout (and for
  :meth:`Document.cancel_preview`), then :meth:`Document.end_preview` calls back once with reason
  ``"execute"``, before = the pre-drag layout: a subscriber that skips costly work during
  previews does it there.
* A subscriber that raises does not stop the others: every subscriber is called, then the
  failure is raised again to the caller of the edit (one failure as itself, several as an
  ``ExceptionGroup``). The edit itself stands: the document is consistent whatever a view did.
* ``subscribe_status`` callbacks (no arguments) run after anything that may change the dirty
  flag, the path or the undo/redo labels, including :meth:`Document.mark_saved`.
"""

from __future__ import annotations

from collections.abc import Callable, Hashable
from dataclasses import dataclass
from functools import partial
from pathlib import Path
from typing import Literal

from app.model.commands import Command, CommandStack
from app.model.elements import Element, Layout, element_tuples, settings_differ

ChangeReason = Literal["execute", "undo", "redo", "preview", "replace"]


class DocumentStateError(RuntimeError):
    """A document method was called in a state where it makes no sense (a programming error)."""


@dataclass(frozen=True, slots=True)
class LayoutChange:
    """What changed: element ids added, removed or different, and whether settings changed."""

    before: Layout
    after: Layout
    changed_ids: frozenset[str]
    settings_changed: bool
    reason: ChangeReason


def changed_element_ids(before: Layout, after: Layout) -> frozenset[str]:
    """Ids of the elements added, removed or different between two layouts.

    Elements that edits carry over are the same objects, so identity decides most of them and a
    drag costs one equality test per moved element.
    """
    if before is after:
        return frozenset()
    changed: set[str] = set()
    for old_elements, new_elements in zip(element_tuples(before), element_tuples(after), strict=True):
        if old_elements is not new_elements:
            changed.update(_differing_ids(old_elements, new_elements))
    return frozenset(changed)


def _differing_ids(old: tuple[Element, ...], new: tuple[Element, ...]) -> set[str]:
    old_by_id = {element.id: element for element in old}
    new_by_id = {element.id: element for element in new}
    differing = set(old_by_id.keys() ^ new_by_id.keys())
    for element_id in old_by_id.keys() & new_by_id.keys():
        old_element, new_element = old_by_id[element_id], new_by_id[element_id]
        if old_element is not new_element and old_element != new_element:
            differing.add(element_id)
    return differing


class Document:
    """The layout being edited, with undo, live previews for drags, and change callbacks."""

    def __init__(self, layout: Layout | None = None, path: Path | None = None) -> None:
        self._layout = layout if layout is not None else Layout()
        self._path = path
        self._stack = CommandStack()
        self._preview_start: Layout | None = None
        self._subscribers: list[Callable[[LayoutChange], None]] = []
        self._status_subscribers: list[Callable[[], None]] = []

    @property
    def layout(self) -> Layout:
        return self._layout

    @property
    def path(self) -> Path | None:
        return self._path

    @property
    def is_dirty(self) -> bool:
        return not self._stack.is_clean

    @property
    def stack(self) -> CommandStack:
        return self._stack

    @property
    def is_previewing(self) -> bool:
        return self._preview_start is not None

    # --- edits -----------------------------------------------------------------------------------

    def execute(self, label: str, after: Layout, merge_key: Hashable | None = None) -> None:
        """Make ``after`` the layout, as one undoable command (nothing if it equals the layout)."""
        if self._preview_start is not None:
            raise DocumentStateError("finish or cancel the preview before executing a command")
        if after is self._layout or after == self._layout:
            return
        before = self._layout
        self._stack.push(Command(label, before, after, merge_key))
        self._change(before, after, "execute")

    def undo(self) -> bool:
        """Undo the last command; during a preview, only cancel the preview. True if it changed."""
        if self._preview_start is not None:
            return self.cancel_preview()
        layout = self._stack.undo()
        return layout is not None and self._change(self._layout, layout, "undo")

    def redo(self) -> bool:
        """Redo the last undone command; during a preview, only cancel it. True if it changed."""
        if self._preview_start is not None:
            return self.cancel_preview()
        layout = self._stack.redo()
        return layout is not None and self._change(self._layout, layout, "redo")

    # --- live previews (drags) -----------------------------------------------------------------

    def begin_preview(self) -> None:
        if self._preview_start is not None:
            raise DocumentStateError("a preview is already running")
        self._preview_start = self._layout

    def preview(self, after: Layout) -> None:
        """Show ``after`` now without recording it (called for every mouse move of a drag)."""
        if self._preview_start is None:
            raise DocumentStateError("call begin_preview() before preview()")
        if after is not self._layout:
            self._change(self._layout, after, "preview", status=False)

    def end_preview(self, label: str, merge_key: Hashable | None = None) -> None:
        """Record the whole drag as one command (none if the layout is back where it started)."""
        start = self._preview_start
        if start is None:
            raise DocumentStateError("end_preview() without begin_preview()")
        self._preview_start = None
        if self._layout is start or self._layout == start:
            self._layout = start  # an equal copy would defeat identity checks of later changes
            return
        self._stack.push(Command(label, start, self._layout, merge_key))
        self._change(start, self._layout, "execute")

    def cancel_preview(self) -> bool:
        """Go back to the layout at :meth:`begin_preview`; True if a preview was running."""
        start = self._preview_start
        if start is None:
            return False
        self._preview_start = None
        if start is not self._layout:
            self._change(self._layout, start, "preview", status=False)
        return True

    # --- files ---------------------------------------------------------------------------------

    def replace_all(self, layout: Layout, path: Path | None) -> None:
        """A new or opened layout: any preview is dropped, the undo stack cleared, clean."""
        self._preview_start = None
        self._stack.clear()
        self._path = path
        self._change(self._layout, layout, "replace")

    def mark_saved(self, path: Path | None = None) -> None:
        """The layout was written to ``path`` (None: to the current path)."""
        if path is not None:
            self._path = path
        self._stack.mark_clean()
        self._notify_status()

    # --- callbacks -----------------------------------------------------------------------------

    def subscribe(self, callback: Callable[[LayoutChange], None]) -> Callable[[], None]:
        """Call ``callback`` on every layout change; returns the function that unsubscribes."""
        self._subscribers.append(callback)
        return lambda: _remove_if_present(self._subscribers, callback)

    def subscribe_status(self, callback: Callable[[], None]) -> Callable[[], None]:
        """Call ``callback`` when the dirty flag, path or undo/redo state may have changed."""
        self._status_subscribers.append(callback)
        return lambda: _remove_if_present(self._status_subscribers, callback)

    def _change(self, before: Layout, after: Layout, reason: ChangeReason, *,
                status: bool = True) -> bool:
        self._layout = after
        change = LayoutChange(before, after, changed_element_ids(before, after),
                              settings_differ(before, after), reason)
        calls: list[Callable[[], None]] = [partial(callback, change) for callback in self._subscribers]
        if status:
            calls += self._status_subscribers
        _call_all(calls)
        return True

    def _notify_status(self) -> None:
        _call_all(list(self._status_subscribers))


def _remove_if_present(callbacks: list[Callable[..., None]], callback: Callable[..., None]) -> None:
    if callback in callbacks:
        callbacks.remove(callback)


def _call_all(calls: list[Callable[[], None]]) -> None:
    """Call every function, then raise what they raised (one error as itself, more as a group)."""
    errors: list[Exception] = []
    for call in calls:
        try:
            call()
        except Exception as error:  # re-raised below, once the other views have run
            errors.append(error)
    if len(errors) == 1:
        raise errors[0]
    if errors:
        raise ExceptionGroup(f"{len(errors)} document subscribers failed", errors)
