"""Atomic writes (app/fileio/atomic.py) and recovery copies (app/fileio/recovery.py).

Expected values are identities of these modules' own definitions.
"""

import errno
import json
import os
import stat
from pathlib import Path

import pytest

from app.fileio import atomic
from app.fileio.atomic import FileWriteError, write_atomic
from app.fileio.layout_json import load_layout, save_layout
from app.fileio.recovery import discard_recovery, find_recovery, recovery_path_for, write_recovery
from app.model.elements import Centerline, Layout, Vertex

LAYOUT = Layout(title="Unsaved", units="m",
                centerlines=(Centerline("twy-1", "A", (Vertex(0.0, 0.0), Vertex(80.0, 0.0))),))


@pytest.fixture(autouse=True)
def state_dir(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    folder = tmp_path / "state"
    monkeypatch.setenv("TAXIWRIGHT_STATE_DIR", str(folder))
    return folder


# --- atomic writes -------------------------------------------------------------------------------

def test_write_atomic_creates_and_replaces(tmp_path: Path) -> None:
    target = tmp_path / "a.json"
    write_atomic(target, b"first")
    write_atomic(target, b"second")
    assert target.read_bytes() == b"second"  # identity
    assert [p.name for p in tmp_path.iterdir() if p.name != "state"] == ["a.json"]  # identity: no temp left


def test_write_atomic_keeps_the_permissions_of_the_replaced_file(tmp_path: Path) -> None:
    target = tmp_path / "a.json"
    target.write_bytes(b"old")
    os.chmod(target, 0o640)
    write_atomic(target, b"new")
    assert stat.S_IMODE(target.stat().st_mode) == 0o640  # identity
    write_atomic(tmp_path / "b.json", b"new")
    assert stat.S_IMODE((tmp_path / "b.json").stat().st_mode) == atomic.NEW_FILE_MODE  # identity


def leftovers(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".tmp"))


def test_failing_replace_leaves_the_old_file_and_no_temporary(tmp_path: Path,
                                                              monkeypatch: pytest.MonkeyPatch) -> None:
    target = tmp_path / "a.json"
    target.write_bytes(b"old content")

    def refuse(source: str, destination: object) -> None:
        raise PermissionError(errno.EACCES, "Permission denied")

    monkeypatch.setattr(atomic.os, "replace", refuse)
    with pytest.raises(FileWriteError) as caught:
        write_atomic(target, b"new content")
    assert target.read_bytes() == b"old content" and leftovers(tmp_path) == []  # identity
    assert "\n" not in str(caught.value) and "Permission denied" in str(caught.value)  # identity: one line


def test_failure_midway_through_writing_leaves_the_old_file(tmp_path: Path,
                                                            monkeypatch: pytest.MonkeyPatch) -> None:
    target = tmp_path / "a.json"
    target.write_bytes(b"old content")

    def disk_full(fd: int) -> None:
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(atomic.os, "fsync", disk_full)
    with pytest.raises(FileWriteError, match="No space left on device"):
        save_layout(LAYOUT, target)
    assert target.read_bytes() == b"old content" and leftovers(tmp_path) == []  # identity


def test_interruption_removes_the_temporary_and_propagates(tmp_path: Path,
                                                            monkeypatch: pytest.MonkeyPatch) -> None:
    target = tmp_path / "a.json"
    target.write_bytes(b"old content")

    def interrupted(path: str, mode: int) -> None:
        raise KeyboardInterrupt

    monkeypatch.setattr(atomic.os, "chmod", interrupted)
    with pytest.raises(KeyboardInterrupt):
        write_atomic(target, b"new content")
    assert target.read_bytes() == b"old content" and leftovers(tmp_path) == []  # identity


def test_write_atomic_into_a_missing_folder_or_onto_a_folder(tmp_path: Path) -> None:
    with pytest.raises(FileWriteError, match="cannot write"):
        write_atomic(tmp_path / "missing" / "a.json", b"x")
    (tmp_path / "folder").mkdir()
    with pytest.raises(FileWriteError, match="cannot write"):
        write_atomic(tmp_path / "folder", b"x")
    assert leftovers(tmp_path) == []  # identity


def test_a_folder_that_cannot_be_fsynced_is_not_an_error(tmp_path: Path,
                                                          monkeypatch: pytest.MonkeyPatch) -> None:
    real_fsync = os.fsync

    def fsync_files_only(fd: int) -> None:
        if stat.S_ISDIR(os.fstat(fd).st_mode):
            raise OSError(errno.EINVAL, "Invalid argument")
        real_fsync(fd)

    monkeypatch.setattr(atomic.os, "fsync", fsync_files_only)
    write_atomic(tmp_path / "a.json", b"x")
    assert (tmp_path / "a.json").read_bytes() == b"x"  # identity


# --- recovery ------------------------------------------------------------------------------------

def test_recovery_paths_live_in_the_state_folder_and_differ_per_layout(tmp_path: Path,
                                                                       state_dir: Path) -> None:
    one = recovery_path_for(tmp_path / "a" / "plan.json")
    other = recovery_path_for(tmp_path / "b" / "plan.json")
    assert one.parent == other.parent == state_dir / "recovery"  # identity
    assert one != other and one.name.startswith("plan-")  # identity
    assert recovery_path_for(None).name == "untitled.recovery.json"  # identity
    assert recovery_path_for(str(tmp_path / "a" / "plan.json")) == one  # identity


def test_default_folder_follows_xdg_state_home(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.delenv("TAXIWRIGHT_STATE_DIR")
    monkeypatch.setenv("XDG_STATE_HOME", str(tmp_path / "xdg"))
    assert recovery_path_for(None).parent == tmp_path / "xdg" / "taxiwright" / "recovery"  # identity


def test_write_find_load_and_discard(tmp_path: Path) -> None:
    layout_path = tmp_path / "plan.json"
    written = write_recovery(LAYOUT, layout_path)
    assert find_recovery(layout_path) == written  # identity
    assert load_layout(written) == LAYOUT  # identity: a recovery file is a layout file
    assert json.loads(written.read_text(encoding="utf-8"))["recovery_of"] == str(layout_path)  # identity
    assert stat.S_IMODE(written.stat().st_mode) == 0o600  # identity: PRIVATE_MODE
    discard_recovery(layout_path)
    assert find_recovery(layout_path) is None  # identity
    discard_recovery(layout_path)  # nothing to discard is fine


def test_untitled_recovery(tmp_path: Path) -> None:
    written = write_recovery(LAYOUT, None)
    assert find_recovery(None) == written  # identity
    assert json.loads(written.read_text(encoding="utf-8"))["recovery_of"] is None  # identity


def test_a_recovery_copy_older_than_the_saved_file_is_not_offered(tmp_path: Path) -> None:
    layout_path = tmp_path / "plan.json"
    written = write_recovery(LAYOUT, layout_path)
    save_layout(LAYOUT, layout_path)
    os.utime(written, ns=(1_000_000_000, 1_000_000_000))
    os.utime(layout_path, ns=(2_000_000_000, 2_000_000_000))
    assert find_recovery(layout_path) is None  # identity
    os.utime(written, ns=(3_000_000_000, 3_000_000_000))
    assert find_recovery(layout_path) == written  # identity


def test_recovery_folder_that_cannot_be_made_raises_file_write_error(tmp_path: Path,
                                                                     monkeypatch: pytest.MonkeyPatch) -> None:
    blocker = tmp_path / "blocker"
    blocker.write_text("a file where the folder should be")
    monkeypatch.setenv("TAXIWRIGHT_STATE_DIR", str(blocker))
    with pytest.raises(FileWriteError, match="recovery folder"):
        write_recovery(LAYOUT, None)
