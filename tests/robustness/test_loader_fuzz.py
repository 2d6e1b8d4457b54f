"""Bad layout files (app/fileio/layout_json.py) and the command line that reads them (app/cli.py).

Every input either loads into a whole, valid layout or raises ``LayoutFileError`` whose one-line
message starts by saying where the problem is; never another exception, never a layout that the
model's own checks refuse or that cannot be saved again. tests/app/test_layout_json.py holds the
hand-picked bad inputs; this module throws random ones. Expected values are identities of the
loader's definitions (its docstring, docs/file_format.md, docs/robustness.md) unless marked.
"""

from __future__ import annotations

import ast
import copy
import json
import math
import os
import re
import socket
import subprocess
import sys
from collections.abc import Iterator
from dataclasses import fields, is_dataclass, replace
from pathlib import Path
from typing import Any

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from app import cli_check
from app.cli import build_parser, main
from app.fileio import layout_json
from app.fileio.atomic import FileWriteError
from app.fileio.layout_json import (
    MAX_JSON_CONTAINERS,
    MAX_JSON_ITEMS,
    LayoutFileError,
    layout_from_dict,
    layout_to_bytes,
    load_layout,
)
from app.fileio.recovery import write_recovery
from app.model import edits
from app.model.edits import EditError, check_layout
from app.model.elements import Layout
from geometry.errors import InvalidPathError

REPO = Path(__file__).resolve().parents[2]
FIXTURE = REPO / "tests" / "app" / "fixtures" / "layout_v1_ft.json"
UNDERLAYS = [
    {"id": "ulay-1", "name": "Base drawing", "kind": "drawing", "path": "base.dxf", "visible": True,
     "locked": True, "opacity": 0.6, "hidden_layers": ["GRID"], "assumed_units": "ft", "placement": None},
    {"id": "ulay-2", "name": "Photo", "kind": "image", "path": "photo.png", "visible": True,
     "locked": False, "opacity": 0.7, "hidden_layers": [], "assumed_units": None,
     "placement": [0.5, 0.0, 0.0, -0.5, 100.0, 900.0]},
]
BASE: dict[str, Any] = {**json.loads(FIXTURE.read_text(encoding="utf-8")), "underlays": UNDERLAYS}
BASE_BYTES = json.dumps(BASE, indent=1).encode("utf-8")

# Values a JSON file can hold that json.dumps cannot make from Python values: spliced in as text.
RAW_VALUES = {
    "<<NaN>>": "NaN", "<<Infinity>>": "Infinity", "<<-Infinity>>": "-Infinity", "<<1e999>>": "1e999",
    "<<huge-integer>>": "9" * 5000,
    "<<too-deep>>": "[" * 100_000 + "]" * 100_000,
    "<<deep>>": "[" * 300 + "]" * 300,
    "<<long-list>>": "[" + ", ".join(["[1, 2]"] * 5000) + "]",
    "<<lone-surrogate>>": '"twy \\ud800"',
    "<<nul-character>>": '"a\\u0000b"',
}
RAW_PATTERN = re.compile("|".join(re.escape(json.dumps(key)) for key in RAW_VALUES))

# Where a message may say the problem is: a field path such as "centerlines[2].vertices[5].x", a
# position in the text, or the whole file (layout_json.py messages).
FIELD_PATH = r"[A-Za-z_]+(?:\[\d+\])*(?:\.[A-Za-z_]+(?:\[\d+\])*)*"
LOCATION = re.compile(rf"^(?:{FIELD_PATH}: |line \d+ column \d+: |byte \d+: |the file: |the file holds "
                      r"|the key .+ appears twice|the JSON is nested too deeply|not valid JSON "
                      r"|invalid layout: )")


# --- what every outcome must satisfy ---------------------------------------------------------------

def floats_in(value: Any) -> Iterator[float]:
    if is_dataclass(value):
        for field in fields(value):
            yield from floats_in(getattr(value, field.name))
    elif isinstance(value, (tuple, frozenset, list)):
        for item in value:
            yield from floats_in(item)
    elif isinstance(value, float):
        yield value


def assert_close(a: Any, b: Any, where: str = "layout") -> None:
    """Equal, floats within 1e-9 relative (a value in feet is converted twice on a round trip)."""
    if is_dataclass(a):
        assert type(a) is type(b), where
        for field in fields(a):
            assert_close(getattr(a, field.name), getattr(b, field.name), f"{where}.{field.name}")
    elif isinstance(a, tuple) and isinstance(b, tuple) and len(a) == len(b):
        for index, (x, y) in enumerate(zip(a, b, strict=True)):
            assert_close(x, y, f"{where}[{index}]")
    elif isinstance(a, float) and isinstance(b, float):
        assert math.isclose(a, b, rel_tol=1e-9, abs_tol=1e-300), f"{where}: {a!r} != {b!r}"
    else:
        assert a == b, where


def assert_whole_and_valid(layout: Layout, folder: Path) -> None:
    """Half a layout would fail one of these: the model's checks, finiteness, a save and reload."""
    assert isinstance(layout, Layout)
    check_layout(layout)
    assert all(math.isfinite(value) for value in floats_in(layout))
    again = layout_from_dict(json.loads(layout_to_bytes(layout, folder)), folder)
    assert_close(again, layout)


def assert_names_the_problem(message: str) -> None:
    assert message and "\n" not in message and len(message) < 400, message
    assert LOCATION.match(message), f"the message does not say where: {message!r}"
    assert "Traceback" not in message and "object at 0x" not in message, message


def outcome(data: bytes, folder: Path) -> Layout | str:
    """The loaded layout, or the loader's message; any other exception fails the test."""
    path = folder / "fuzzed.json"
    path.write_bytes(data)
    try:
        layout = load_layout(path)
    except LayoutFileError as error:
        assert_names_the_problem(str(error))
        return str(error)
    assert_whole_and_valid(layout, folder)
    return layout


@pytest.fixture(scope="module")
def folder(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return tmp_path_factory.mktemp("fuzz")


FUZZ = settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def test_the_base_file_loads(folder: Path) -> None:
    layout = outcome(BASE_BYTES, folder)
    assert isinstance(layout, Layout) and len(layout.underlays) == 2  # identity: the base is valid


# --- random bytes and truncated files ----------------------------------------------------------------

@FUZZ
@given(st.binary(max_size=300) | st.builds(lambda head, tail: head + tail,
                                           st.sampled_from([b"{", b'{"application": "taxiwright", ',
                                                            BASE_BYTES[:200]]),
                                           st.binary(max_size=100)))
def test_random_bytes_never_raise_anything_else(folder: Path, data: bytes) -> None:
    outcome(data, folder)


@FUZZ
@given(st.integers(0, len(BASE_BYTES) - 1))
def test_every_truncation_is_refused_with_a_position(folder: Path, cut: int) -> None:
    message = outcome(BASE_BYTES[:cut], folder)
    # identity: a strict prefix of one JSON object is never a complete JSON text
    assert isinstance(message, str) and re.match(r"line \d+ column \d+: not valid JSON", message)


# --- structural mutations of a valid file --------------------------------------------------------------

Path_ = tuple[str | int, ...]


def node_paths(value: Any, prefix: Path_ = ()) -> list[Path_]:
    found: list[Path_] = [prefix] if prefix else []
    items = value.items() if isinstance(value, dict) else enumerate(value) if isinstance(value, list) else ()
    for key, child in items:
        found += node_paths(child, (*prefix, key))
    return found


def parent_of(data: Any, path: Path_) -> Any:
    for key in path[:-1]:
        data = data[key]
    return data


def dotted(path: Path_) -> str:
    text = ""
    for key in path:
        text += f"[{key}]" if isinstance(key, int) else (f".{key}" if text else key)
    return text


scalars = (st.none() | st.booleans() | st.integers(-(10**20), 10**20) | st.floats()
           | st.text(max_size=12) | st.sampled_from(sorted(RAW_VALUES)))
json_values = st.recursive(scalars, lambda inner: st.lists(inner, max_size=3)
                           | st.dictionaries(st.text(max_size=6), inner, max_size=3), max_leaves=6)


@st.composite
def mutated_files(draw: st.DrawFn) -> tuple[bytes, list[str]]:
    """The base file after one to three random changes, and the dotted paths of what changed."""
    data = copy.deepcopy(BASE)
    changed: list[str] = []
    for _ in range(draw(st.integers(1, 3))):
        path = draw(st.sampled_from(node_paths(data)))
        parent, key = parent_of(data, path), path[-1]
        action = draw(st.sampled_from(["replace", "replace", "delete", "extra", "duplicate", "version"]))
        if action == "replace":
            parent[key] = draw(json_values)
        elif action == "delete":
            del parent[key]
        elif action == "extra" and isinstance(parent[key], dict):
            parent[key][draw(st.text(min_size=1, max_size=8))] = draw(json_values)
        elif action == "duplicate" and isinstance(parent, list):
            parent.insert(key, copy.deepcopy(parent[key]))
        else:
            path, data["format_version"] = ("format_version",), draw(st.integers(-3, 4))
        changed.append(dotted(path))
    text = RAW_PATTERN.sub(lambda match: RAW_VALUES[json.loads(match.group(0))], json.dumps(data, indent=1))
    return text.encode("utf-8"), changed


def related(named: str, changed: list[str]) -> bool:
    """The field a message names is one that changed, inside one, or holds one."""
    def stem(path: str) -> str:
        return re.sub(r"\[\d+\]$", "", path)
    return any(named.startswith(stem(path)) or path.startswith(stem(named)) for path in changed)


@settings(FUZZ, max_examples=150)
@given(mutated_files())
def test_mutated_files_load_whole_or_name_what_is_wrong(folder: Path,
                                                        mutated: tuple[bytes, list[str]]) -> None:
    data, changed = mutated
    result = outcome(data, folder)
    if isinstance(result, str):
        named = re.match(rf"({FIELD_PATH}): ", result)
        if named and named.group(1) not in ("line", "byte"):
            # the message points at (or into) a field that changed, or quotes where the other one is
            assert related(named.group(1), changed) or any(path in result for path in changed), (
                result, changed)


# --- hand-made worst cases --------------------------------------------------------------------------

def with_value(path: Path_, raw: str) -> bytes:
    data = copy.deepcopy(BASE)
    parent_of(data, path)[path[-1]] = "<<here>>"
    return json.dumps(data, indent=1).replace('"<<here>>"', raw).encode("utf-8")


@pytest.mark.parametrize("path, raw, message", [
    (("title",), '"Apron \\ud83d"', "title: character 7 is half of a UTF-16 pair"),
    (("fleet", 0, "name"), '"\\udfff"', "fleet[0].name: character 1 is half of a UTF-16 pair"),
    (("centerlines", 0, "vertices", 1, "x"), "-Infinity", "centerlines[0].vertices[1].x: expected a finite"),
    (("runways", 0, "vertices"), "[" * 50 + "]" * 50, "runways[0].vertices: expected at least 2"),
    (("objects",), "[" + ", ".join(["{}"] * 20) + "]", "objects[0].height: missing required field"),
    (("underlays", 1, "placement"), "[1, 0, 2, 0, 0, 0]",
     "underlays[1].placement: the image placement has zero"),
    (("underlays", 0, "opacity"), "1.5", "underlays[0]: underlay 'ulay-1': opacity must be between 0 and 1"),
], ids=["surrogate-title", "surrogate-aircraft", "minus-infinity", "nested-lists", "empty-objects",
        "flat-image", "opacity"])
def test_worst_cases_name_their_field(folder: Path, path: Path_, raw: str, message: str) -> None:
    result = outcome(with_value(path, raw), folder)
    assert isinstance(result, str) and result.startswith(message)  # identity: layout_json.py messages


def test_text_that_could_never_be_saved_is_refused_everywhere(folder: Path,
                                                              monkeypatch: pytest.MonkeyPatch) -> None:
    with pytest.raises(EditError, match="title holds a character that is not valid text, at position 2"):
        edits.set_title_notes(Layout(), "A\ud800", "")
    layout = replace(load_layout(FIXTURE), title="\ud800")  # built around the edits' check
    with pytest.raises(LayoutFileError, match="cannot save the layout"):
        layout_to_bytes(layout)
    monkeypatch.setenv("TAXIWRIGHT_STATE_DIR", str(folder / "state"))
    with pytest.raises(FileWriteError, match="cannot write the recovery copy"):
        write_recovery(layout, None)


# --- sizes are limited before anything is built --------------------------------------------------------

@pytest.mark.parametrize("data, message", [
    (b"[" + b"{}," * MAX_JSON_CONTAINERS + b"{}]", "the file holds more than 3,000,000 JSON objects"),
    (b"[" + b"0," * (MAX_JSON_ITEMS + 1) + b"0]", "the file holds more than 8,000,000 JSON values"),
], ids=["objects", "values"])
def test_value_bombs_are_refused_before_parsing(folder: Path, monkeypatch: pytest.MonkeyPatch,
                                                data: bytes, message: str) -> None:
    def never(*args: object, **kwargs: object) -> None:
        raise AssertionError("json.loads was reached")

    monkeypatch.setattr(layout_json.json, "loads", never)
    result = outcome(data, folder)
    assert isinstance(result, str) and result.startswith(message)  # identity


def test_the_limits_leave_room_for_the_largest_layout_file() -> None:
    # identity: a saved vertex holds one object and at most 3 commas; a saved element adds at most
    # 5 brackets and 12 commas (measured on save_layout's output, docs/robustness.md)
    largest = {"containers": layout_json.MAX_VERTICES + 5 * layout_json.MAX_ELEMENTS,
               "items": 3 * layout_json.MAX_VERTICES + 12 * layout_json.MAX_ELEMENTS}
    assert largest["containers"] < MAX_JSON_CONTAINERS and largest["items"] < MAX_JSON_ITEMS


# --- nothing in a file is ever executed -----------------------------------------------------------------

LOADER_MODULES = ("layout_json.py", "aircraft_library.py", "recovery.py", "atomic.py")
# (importlib.resources, which reads the packaged aircraft library as text, is allowed.)
FORBIDDEN_NAMES = {"eval", "exec", "compile", "__import__", "import_module", "exec_module", "pickle",
                   "marshal", "shelve", "yaml", "runpy", "subprocess", "system", "object_hook"}


@pytest.mark.parametrize("module", LOADER_MODULES)
def test_loader_modules_use_no_code_loading_facility(module: str) -> None:
    tree = ast.parse((REPO / "app" / "fileio" / module).read_text(encoding="utf-8"))
    used = {node.id for node in ast.walk(tree) if isinstance(node, ast.Name)}
    used |= {node.attr for node in ast.walk(tree) if isinstance(node, ast.Attribute)}
    nodes = list(ast.walk(tree))
    used |= {alias.name.split(".")[0] for node in nodes if isinstance(node, (ast.Import, ast.ImportFrom))
             for alias in node.names}
    used |= {node.module.split(".")[0] for node in nodes if isinstance(node, ast.ImportFrom) and node.module}
    used |= {kw.arg for node in nodes if isinstance(node, ast.Call) for kw in node.keywords if kw.arg}
    assert used.isdisjoint(FORBIDDEN_NAMES), used & FORBIDDEN_NAMES  # JSON only: module docstring


def test_code_and_pickles_in_a_file_stay_inert_text(folder: Path) -> None:
    marker = folder / "executed"
    code = f"__import__('pathlib').Path({str(marker)!r}).touch()"
    data = copy.deepcopy(BASE)
    data["title"], data["notes"] = code, "cos\nsystem\n(S'touch executed'\ntR."  # a pickle opcode stream
    layout = outcome(json.dumps(data).encode("utf-8"), folder)
    assert isinstance(layout, Layout) and layout.title == code and not marker.exists()  # identity
    real_pickle = b"\x80\x04\x95\x05\x00\x00\x00\x00\x00\x00\x00N."  # pickle.dumps(None, protocol=4)
    assert isinstance(outcome(real_pickle, folder), str)


# --- paths that are not regular files ---------------------------------------------------------------

def special_path(kind: str, folder: Path) -> Path:
    target = folder / f"special-{kind}"
    if target.exists() or target.is_symlink():
        return target
    if kind == "socket":
        with socket.socket(socket.AF_UNIX) as server:
            server.bind(str(target))
    elif kind == "link-to-folder":
        target.symlink_to(folder)
    elif kind == "link-to-device":
        target.symlink_to("/dev/zero")
    elif kind == "fifo":
        os.mkfifo(target)
    return target


@pytest.mark.parametrize("kind", ["socket", "link-to-folder", "link-to-device", "fifo"])
def test_special_files_are_refused_without_reading(folder: Path, kind: str) -> None:
    with pytest.raises(LayoutFileError, match="not a regular file"):
        load_layout(special_path(kind, folder))  # a FIFO or /dev/zero would block or never end


@pytest.mark.skipif(not Path("/dev/null").exists(), reason="needs /dev/null")
def test_a_character_device_is_refused() -> None:
    with pytest.raises(LayoutFileError, match="/dev/null: not a regular file"):
        load_layout("/dev/null")


def test_a_link_to_a_layout_file_loads(folder: Path) -> None:
    link = folder / "link.json"
    if not link.is_symlink():
        link.symlink_to(FIXTURE)
    assert load_layout(link) == load_layout(FIXTURE)  # identity: links are followed to regular files


# --- the command line: one line on stderr, exit status 2, no traceback --------------------------------

BAD_FILES = {
    "truncated": BASE_BYTES[:500],
    "binary": b"\x89PNG\r\n\x1a\n\x00\x00",
    "nan": with_value(("runways", 0, "width"), "NaN"),
    "wrong-type": with_value(("centerlines",), '{"twy-1": []}'),
    "newer-version": with_value(("format_version",), "99"),
    "missing-field": with_value(("rule_set",), "null").replace(b'"rule_set": null,', b""),
    "too-deep": with_value(("notes",), RAW_VALUES["<<too-deep>>"]),
}


def write_bad(folder: Path, name: str) -> Path:
    path = folder / f"bad-{name}.json"
    path.write_bytes(BAD_FILES[name])
    return path


def assert_one_line_failure(status: int, out: str, err: str) -> None:
    assert status == 2, (status, err)  # app/cli.py: bad input exits with status 2
    assert out == "" and err.endswith("\n") and err.count("\n") == 1, err
    assert err.startswith("taxiwright: ") and "Traceback" not in err, err


@pytest.mark.parametrize("name", sorted(BAD_FILES))
def test_check_and_export_of_a_bad_file(folder: Path, capsys: pytest.CaptureFixture[str], name: str) -> None:
    bad, output = write_bad(folder, name), folder / f"{name}.dxf"
    assert_one_line_failure(main(["check", str(bad)]), *capsys.readouterr())
    assert_one_line_failure(main(["export", str(bad), "-o", str(output)]), *capsys.readouterr())
    assert not output.exists()  # identity: nothing is written for a file that did not load


@pytest.mark.parametrize("target", ["missing.json", "folder", "fifo"])
def test_check_of_a_path_that_is_no_file(folder: Path, capsys: pytest.CaptureFixture[str],
                                         target: str) -> None:
    path = {"missing.json": folder / "missing.json", "folder": folder,
            "fifo": special_path("fifo", folder)}[target]
    assert_one_line_failure(main(["check", str(path)]), *capsys.readouterr())


def test_the_installed_command_fails_cleanly_in_a_real_process(folder: Path) -> None:
    runs = []
    for name, command in (("truncated", "check"), ("nan", "export")):
        output = folder / f"process-{name}.dxf"
        argv = [sys.executable, "-m", "app.cli", command, str(write_bad(folder, name))]
        argv += ["-o", str(output)] if command == "export" else []
        runs.append((output, subprocess.Popen(argv, cwd=REPO, stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                                              text=True, env={**os.environ, "PYTHONWARNINGS": "error"})))
    for output, process in runs:  # started together: the interpreter start-up is the slow part
        out, err = process.communicate(timeout=120)
        assert_one_line_failure(process.returncode, out, err)
        assert not output.exists()  # identity


def test_the_command_names_are_not_taken_for_a_layout_file() -> None:
    # identity: app/cli.py, "taxiwright check LAYOUT" and "taxiwright LAYOUT" (= open LAYOUT)
    parser = build_parser()
    expected = {"command": "check", "layout": "a.json", "json": False}
    assert vars(parser.parse_args(["check", "a.json"])) == expected
    assert parser.parse_args(["export", "a.json", "-o", "b.dxf"]).output == "b.dxf"
    assert parser.parse_args(["sweep", "--tdg", "3", "--radius", "30", "--delta", "90"]).tdg == "3"


def test_check_of_a_good_file_reports_and_an_engine_error_is_one_line(
        capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch) -> None:
    assert main(["check", str(FIXTURE), "--json"]) in (0, 1)  # 1: the layout has error findings
    report = json.loads(capsys.readouterr().out)
    assert report["title"] == BASE["title"] and report["units"] == "ft"  # identity: the fixture's own

    def broken(layout: Layout) -> None:
        raise InvalidPathError("a segment of centerline 'twy-1' has no length")

    monkeypatch.setattr(cli_check, "analyze", broken)
    assert_one_line_failure(main(["check", str(FIXTURE)]), *capsys.readouterr())


def test_a_fifo_swapped_in_after_the_check_is_still_refused(folder: Path,
                                                            monkeypatch: pytest.MonkeyPatch) -> None:
    fifo = special_path("fifo", folder)
    real_stat = os.stat
    monkeypatch.setattr(layout_json.os, "stat", lambda *args, **kwargs: real_stat(FIXTURE))  # sees a file
    with pytest.raises(LayoutFileError, match="not a regular file"):
        load_layout(fifo)  # the open does not wait for a writer, and the open file is checked again
