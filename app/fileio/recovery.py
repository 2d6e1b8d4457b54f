"""Crash recovery copies of unsaved layouts, kept in a per-user folder, one per layout file.

The folder is ``$TAXIWRIGHT_STATE_DIR/recovery`` when that variable is set (tests), else
``$XDG_STATE_HOME/taxiwright/recovery``, else ``~/.local/state/taxiwright/recovery``. A recovery
file is an ordinary layout file (same format, loaded with ``load_layout``) with one extra key,
``"recovery_of"``, naming the layout file it belongs to; readers ignore unknown keys.

All unsaved untitled layouts share one recovery file: taxiwright edits one layout per process.
"""

from __future__ import annotations

import contextlib
import hashlib
import json
import os
from pathlib import Path

from app.fileio.atomic import FileWriteError, write_atomic
from app.fileio.layout_json import layout_to_dict
from app.model.elements import Layout

STATE_DIR_VARIABLE = "TAXIWRIGHT_STATE_DIR"
UNTITLED_NAME = "untitled"
RECOVERY_SUFFIX = ".recovery.json"
PRIVATE_MODE = 0o600  # unsaved work may be confidential: only its owner reads it


def recovery_folder() -> Path:
    override = os.environ.get(STATE_DIR_VARIABLE)
    if override:
        return Path(override) / "recovery"
    state_home = os.environ.get("XDG_STATE_HOME") or str(Path.home() / ".local" / "state")
    return Path(state_home) / "taxiwright" / "recovery"


def recovery_path_for(layout_path: Path | str | None) -> Path:
    """Where the recovery copy of ``layout_path`` (None: an untitled layout) is kept.

    The name is the layout's file name plus a hash of its absolute path, so two layouts of the
    same name in different folders do not share a recovery file.
    """
    if layout_path is None:
        return recovery_folder() / f"{UNTITLED_NAME}{RECOVERY_SUFFIX}"
    absolute = Path(layout_path).expanduser().absolute()
    digest = hashlib.sha256(os.fsencode(absolute)).hexdigest()[:16]
    return recovery_folder() / f"{absolute.stem}-{digest}{RECOVERY_SUFFIX}"


def write_recovery(layout: Layout, layout_path: Path | str | None) -> Path:
    """Write the recovery copy of an unsaved ``layout``; returns its path.

    Raises ``FileWriteError`` when it cannot be written.
    """
    target = recovery_path_for(layout_path)
    try:
        target.parent.mkdir(mode=0o700, parents=True, exist_ok=True)
    except OSError as error:
        raise FileWriteError(f"cannot create the recovery folder {target.parent}: "
                             f"{error.strerror or error}") from error
    data = layout_to_dict(layout)
    data["recovery_of"] = None if layout_path is None else str(Path(layout_path).absolute())
    try:
        text = json.dumps(data, indent=1, ensure_ascii=False, allow_nan=False)
        encoded = (text + "\n").encode("utf-8")
    except ValueError as error:  # a NaN or a lone surrogate that slipped past the model's checks
        raise FileWriteError(f"cannot write the recovery copy: {error}") from error
    write_atomic(target, encoded, mode=PRIVATE_MODE)
    return target


def find_recovery(layout_path: Path | str | None) -> Path | None:
    """The recovery copy of ``layout_path`` if one exists and is not older than the layout file
    itself (an older copy predates the last save and would undo saved work)."""
    candidate = recovery_path_for(layout_path)
    try:
        recovery_mtime_ns = candidate.stat().st_mtime_ns
    except OSError:
        return None
    if not candidate.is_file():
        return None
    if layout_path is not None:
        try:
            if Path(layout_path).stat().st_mtime_ns > recovery_mtime_ns:
                return None
        except OSError:
            pass  # the layout file is gone: the recovery copy is all there is
    return candidate


def discard_recovery(layout_path: Path | str | None) -> None:
    """Remove the recovery copy of ``layout_path`` (after a save, or when the planner declines)."""
    with contextlib.suppress(FileNotFoundError):
        recovery_path_for(layout_path).unlink()
