"""A Qt-free undo stack of commands. A command is the layout before and after one user action.

Because layouts are immutable values, undo is "go back to ``before``" and redo is "go to
``after``": nothing is recomputed and undo restores the old value exactly.

Merging: a command pushed on top of one with the same non-None ``merge_key`` replaces it by one
command (the top's ``before`` and label, the new ``after``), so the arrow-key nudges of one
vertex, keyed ``("move-vertex", element_id, index)``, undo in one step. No merge happens across
a save, so undo still reaches the saved state.
"""

from __future__ import annotations

from collections.abc import Hashable
from dataclasses import dataclass

from app.model.elements import Layout

DEFAULT_UNDO_LIMIT = 500


def move_vertex_merge_key(element_id: str, index: int) -> tuple[str, str, int]:
    """The merge key of consecutive moves of one vertex."""
    return ("move-vertex", element_id, index)


@dataclass(frozen=True, slots=True)
class Command:
    label: str
    before: Layout
    after: Layout
    merge_key: Hashable | None = None


class CommandStack:
    """Done commands below an index, undone (redoable) commands above it.

    ``is_clean`` is True when the current position is the one last marked clean (saved); it
    survives undo and redo back to that position and is lost for good once the saved position
    is discarded (a new command pushed after undoing past it, or the limit dropping it).
    """

    def __init__(self, limit: int = DEFAULT_UNDO_LIMIT) -> None:
        if limit < 1:
            raise ValueError(f"the undo limit must be at least 1, got {limit}")
        self._limit = limit
        self._commands: list[Command] = []
        self._index = 0                      # commands[:index] are done
        self._clean_index: int | None = 0    # None: the saved state is no longer on the stack

    @property
    def limit(self) -> int:
        return self._limit

    def __len__(self) -> int:
        return len(self._commands)

    def push(self, command: Command) -> None:
        """Record a done command; drops the redo branch, merges or trims to the limit."""
        del self._commands[self._index:]
        if self._clean_index is not None and self._clean_index > self._index:
            self._clean_index = None
        if self._can_merge(command):
            top = self._commands[-1]
            self._commands[-1] = Command(top.label, top.before, command.after, top.merge_key)
            return
        self._commands.append(command)
        self._index += 1
        if len(self._commands) > self._limit:
            del self._commands[0]
            self._index -= 1
            if self._clean_index is not None:
                self._clean_index = self._clean_index - 1 if self._clean_index > 0 else None

    def _can_merge(self, command: Command) -> bool:
        if command.merge_key is None or not self._commands or self._clean_index == self._index:
            return False
        top = self._commands[-1]
        return top.merge_key == command.merge_key and (top.after is command.before
                                                       or top.after == command.before)

    def undo(self) -> Layout | None:
        """Step back; the layout to show, or None when there is nothing to undo."""
        if not self.can_undo:
            return None
        self._index -= 1
        return self._commands[self._index].before

    def redo(self) -> Layout | None:
        """Step forward; the layout to show, or None when there is nothing to redo."""
        if not self.can_redo:
            return None
        self._index += 1
        return self._commands[self._index - 1].after

    @property
    def can_undo(self) -> bool:
        return self._index > 0

    @property
    def can_redo(self) -> bool:
        return self._index < len(self._commands)

    @property
    def undo_label(self) -> str | None:
        return self._commands[self._index - 1].label if self.can_undo else None

    @property
    def redo_label(self) -> str | None:
        return self._commands[self._index].label if self.can_redo else None

    def clear(self) -> None:
        """Forget every command; the current state counts as saved."""
        self._commands.clear()
        self._index = 0
        self._clean_index = 0

    def mark_clean(self) -> None:
        self._clean_index = self._index

    @property
    def is_clean(self) -> bool:
        return self._clean_index == self._index
