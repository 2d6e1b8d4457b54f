"""The documentation stays true: the validation report is the script's current output and every
row of it is within its tolerance; every relative link of docs/*.md and README.md points to a
file that exists; the user guide's pictures exist and stay small."""

from __future__ import annotations

import importlib.util
import re
import sys
from pathlib import Path
from types import ModuleType
from typing import Any

import pytest

ROOT = Path(__file__).resolve().parents[1]
DOCS = ROOT / "docs"
REPORT_SCRIPT = DOCS / "scripts" / "make_validation_report.py"
LINK = re.compile(r"!?\[[^\]]*\]\(([^)\s]+)(?:\s+\"[^\"]*\")?\)")
EXTERNAL = ("http://", "https://", "mailto:")
MAX_PNG_BYTES = 400_000  # the documentation brief's limit per picture


def _load_report_script() -> ModuleType:
    spec = importlib.util.spec_from_file_location("make_validation_report", REPORT_SCRIPT)
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # dataclasses look their module up by name
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def report(tmp_path_factory: pytest.TempPathFactory) -> tuple[str, list[Any]]:
    """Run the report script's writer once: (the text it writes, its rows)."""
    path = tmp_path_factory.mktemp("report") / "validation.md"
    rows = _load_report_script().write_report(path)
    return path.read_text(encoding="utf-8"), rows


def test_committed_validation_report_is_the_scripts_current_output(report: tuple[str, list[Any]]) -> None:
    text, _ = report
    committed = (DOCS / "validation.md").read_text(encoding="utf-8")
    assert committed == text, "docs/validation.md is stale: run python docs/scripts/make_validation_report.py"


def test_every_validation_row_is_within_its_tolerance(report: tuple[str, list[Any]]) -> None:
    _, rows = report
    assert len(rows) >= 40  # identity: the sections of the brief hold more than 40 rows
    outside = [(row.quantity, row.difference) for row in rows if not row.within_tolerance]
    assert outside == []


def test_the_report_covers_the_briefs_rows(report: tuple[str, list[Any]]) -> None:
    text, _ = report
    for needle in ("eq. 6-9", "eq. 6-11", "eq. 6-12", "Example 6-3", "scipy", "TESM", "ADG", "code letter",
                   "Table 3-1", "Table 6-22", "fitted fillet radius"):
        assert needle in text, needle


def test_the_report_row_check_can_fail() -> None:
    module = _load_report_script()
    wrong = module.row("a value off by two", 10.0, "m", "test", 12.0, 1.0, "identity", 1)
    assert not wrong.within_tolerance
    one_sided = module.row("below a one-sided band", [5.0, 5.0], "m", "test", [4.8, 5.1], (0.1, 0.5),
                           "identity", 1)
    assert not one_sided.within_tolerance  # -0.2 is below -0.1, though +0.1 is the larger in size


def _markdown_files() -> list[Path]:
    return [*sorted(DOCS.glob("*.md")), ROOT / "README.md"]


def _relative_links(path: Path) -> list[str]:
    text = re.sub(r"```.*?```", "", path.read_text(encoding="utf-8"), flags=re.S)  # code blocks hold no links
    text = re.sub(r"`[^`\n]*`", "", text)
    return [target for target in LINK.findall(text) if not target.startswith(EXTERNAL)
            and not target.startswith("#")]


@pytest.mark.parametrize("path", _markdown_files(), ids=lambda p: p.name)
def test_every_relative_link_points_to_an_existing_file(path: Path) -> None:
    missing = [target for target in _relative_links(path)
               if not (path.parent / target.split("#", 1)[0]).exists()]
    assert missing == []


def test_the_link_check_finds_links_and_would_catch_a_broken_one(tmp_path: Path) -> None:
    page = tmp_path / "page.md"
    page.write_text("See [the method](method.md#model), ![shot](images/x.png) and "
                    "[the web](https://example.org). `[not](code.md)`\n", encoding="utf-8")
    assert _relative_links(page) == ["method.md#model", "images/x.png"]
    # identity: the user guide links its five pictures and several pages
    assert len(_relative_links(DOCS / "user_guide.md")) >= 10


def test_user_guide_pictures_exist_and_are_small() -> None:
    pictures = sorted((DOCS / "images").glob("*.png"))
    assert len(pictures) >= 5  # the five screenshots of docs/scripts/make_screenshots.py
    for picture in pictures:
        assert picture.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n", picture.name
        assert picture.stat().st_size < MAX_PNG_BYTES, picture.name


@pytest.mark.parametrize("command", [
    "sweep --tdg 5 --radius 150 --delta 90",
    "sweep --cmg 20 --wheelbase 18 --mgw 9 --radius 30 --delta 90 --units m",
])
def test_user_guide_shows_the_current_output_of_its_sweep_examples(
        command: str, capsys: pytest.CaptureFixture[str]) -> None:
    from app.cli import main

    assert main(command.split()) == 0
    printed = capsys.readouterr().out
    guide = (DOCS / "user_guide.md").read_text(encoding="utf-8")
    assert f"$ taxiwright {command}\n{printed}" in guide
