"""Atomic file writes: a reader sees the old file or the new one, never half of either.

The bytes go to a temporary file in the target's own folder (so the final rename stays on one
file system), are flushed and fsynced, then ``os.replace`` swaps it in and the folder is
fsynced so the rename itself survives a power cut.
"""

from __future__ import annotations

import contextlib
import os
import stat
import tempfile
from pathlib import Path

NEW_FILE_MODE = 0o644  # a saved layout is the planner's document: readable by others, like an editor's


class FileWriteError(OSError):
    """A file could not be written; the old file, if any, is untouched."""


def write_atomic(path: Path | str, data: bytes, *, mode: int | None = None) -> None:
    """Write ``data`` to ``path`` atomically.

    ``mode``: permissions for the file; None keeps those of the file being replaced, or uses
    0o644 for a new file. On any failure the temporary file is removed, the old file is left as
    it was, and :class:`FileWriteError` is raised with a one-line message.
    """
    target = Path(path)
    try:
        fd, temp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent)
    except OSError as error:
        raise FileWriteError(f"cannot write {target}: {_reason(error)}") from error
    try:
        with os.fdopen(fd, "wb") as stream:
            stream.write(data)
            stream.flush()
            os.fsync(stream.fileno())
        os.chmod(temp_name, _mode_for(target, mode))
        os.replace(temp_name, target)
    except BaseException as error:
        with contextlib.suppress(OSError):
            os.unlink(temp_name)
        if isinstance(error, OSError):
            raise FileWriteError(f"cannot write {target}: {_reason(error)}") from error
        raise
    _fsync_folder(target.parent)


def _mode_for(target: Path, mode: int | None) -> int:
    if mode is not None:
        return mode
    try:
        return stat.S_IMODE(os.stat(target).st_mode)
    except OSError:
        return NEW_FILE_MODE


def _fsync_folder(folder: Path) -> None:
    # Some file systems cannot fsync a folder (EINVAL); the file is already in place and
    # complete, so that only weakens durability after a power cut and is not an error.
    with contextlib.suppress(OSError):
        folder_fd = os.open(folder, os.O_RDONLY)
        try:
            os.fsync(folder_fd)
        finally:
            os.close(folder_fd)


def _reason(error: OSError) -> str:
    reason = error.strerror or str(error) or type(error).__name__
    return " ".join(reason.split())  # one line, whatever the platform's message holds
