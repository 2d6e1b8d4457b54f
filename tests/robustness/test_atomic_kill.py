"""Saves are atomic (app/fileio/atomic.py): a process killed at any moment of a save leaves the
old file or the new one on disk, never a mix.

Child processes save a large layout over and over, alternating between two versions, and are
killed with SIGKILL (no clean-up runs) after random delays. The file must then hold exactly the
bytes of one version (which layout_json's tests show to load). tests/app/test_recovery.py covers
failures that Python sees (a full disk, a refused rename, an interrupt); this covers the ones it
does not. Expected values are identities of the module's definition (its docstring).
"""

from __future__ import annotations

import os
import random
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from app.fileio.layout_json import layout_to_bytes
from app.model.elements import Centerline, ExistingPavement, Layout, Vertex

REPO = Path(__file__).resolve().parents[2]
VERTICES = 15_000       # about 0.9 MB of JSON: a write takes long enough to be caught in the middle
ROUNDS = 8              # children killed, two of them in the full save path, all started together
FULL_SAVE_ROUNDS = 2
MAX_DELAY_S = 0.4

# The child: "save" builds both layouts and alternates save_layout; "bytes" alternates write_atomic
# of the same bytes (the same write path without the heavy imports, so more rounds stay cheap).
CHILD = """
import sys
from pathlib import Path
mode, target, first, second = sys.argv[1], Path(sys.argv[2]), Path(sys.argv[3]), Path(sys.argv[4])
if mode == "save":
    from app.fileio.layout_json import save_layout
    from tests.robustness.test_atomic_kill import VERSIONS, big_layout
    versions = [big_layout(*version) for version in VERSIONS]
    write = save_layout
else:
    from app.fileio.atomic import write_atomic
    versions = [first.read_bytes(), second.read_bytes()]
    def write(data, path):
        write_atomic(path, data)
print("ready", flush=True)
count = 0
while True:
    write(versions[count % 2], target)
    count += 1
"""


VERSIONS = (("Version one", 0.0), ("Version two", 0.25))


def big_layout(title: str, shift_m: float) -> Layout:
    vertices = tuple(Vertex(float(i) + shift_m, float(i % 13) * 0.7) for i in range(VERTICES))
    outline = tuple((float(i), float(i % 7) + shift_m) for i in range(VERTICES // 4))
    return Layout(title=title, units="m", centerlines=(Centerline("twy-1", "A", vertices),),
                  existing_pavements=(ExistingPavement("pav-1", "Old", outline),))


def start_child(mode: str, target: Path, first: Path, second: Path) -> subprocess.Popen[str]:
    return subprocess.Popen([sys.executable, "-c", CHILD, mode, str(target), str(first), str(second)],
                            cwd=REPO, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)


@pytest.mark.skipif(not hasattr(signal, "SIGKILL"), reason="needs SIGKILL")
def test_a_save_killed_at_random_moments_leaves_the_old_or_the_new_layout(tmp_path: Path) -> None:
    old, new = (big_layout(*version) for version in VERSIONS)
    old_bytes, new_bytes = layout_to_bytes(old), layout_to_bytes(new)  # what save_layout writes
    assert old_bytes != new_bytes and len(old_bytes) > 800_000
    sources = (tmp_path / "old-source.json", tmp_path / "new-source.json")
    sources[0].write_bytes(old_bytes)
    sources[1].write_bytes(new_bytes)
    rng = random.Random(20261201)  # a fixed seed: the same delays on every run
    rounds = []
    for number in range(ROUNDS):
        folder = tmp_path / f"round-{number}"
        folder.mkdir()
        target = folder / "layout.json"
        target.write_bytes(old_bytes)
        mode = "save" if number >= ROUNDS - FULL_SAVE_ROUNDS else "bytes"  # the slow starters last
        rounds.append((target, mode, start_child(mode, target, *sources), rng.uniform(0.0, MAX_DELAY_S)))
    torn_writes = 0
    for target, _mode, child, delay_s in rounds:
        assert child.stdout is not None and child.stdout.readline() == "ready\n", child.stderr
        time.sleep(delay_s)
        child.send_signal(signal.SIGKILL)
        child.communicate(timeout=60)
        assert child.returncode == -signal.SIGKILL  # identity: it was still saving when killed
        content = target.read_bytes()
        assert content in (old_bytes, new_bytes), f"{target}: {len(content)} bytes, neither version"
        leftovers = [p.name for p in target.parent.iterdir() if p != target]
        # A kill in the middle leaves the hidden temporary beside the file, never in its place.
        assert all(name.startswith(".layout.json.") and name.endswith(".tmp") for name in leftovers)
        torn_writes += bool(leftovers)
    print(f"{ROUNDS} kills, {torn_writes} in the middle of writing a temporary file")


def test_the_child_really_writes_both_versions(tmp_path: Path) -> None:
    """Without this, a child that never wrote would pass the test above."""
    first, second = tmp_path / "a.bin", tmp_path / "b.bin"
    first.write_bytes(b"A" * 1000)
    second.write_bytes(b"B" * 1000)
    target = tmp_path / "out.bin"
    child = start_child("bytes", target, first, second)
    assert child.stdout is not None and child.stdout.readline() == "ready\n"
    seen: set[bytes] = set()
    deadline = time.monotonic() + 30.0
    while len(seen) < 2 and time.monotonic() < deadline:
        if target.exists():
            seen.add(target.read_bytes())
    os.kill(child.pid, signal.SIGKILL)
    child.communicate(timeout=60)
    assert seen == {b"A" * 1000, b"B" * 1000}  # identity: a reader sees whole versions only
