"""The layering of STYLE.md, checked by import-linter's contracts in pyproject.toml."""

import shutil
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def test_import_contracts_are_kept() -> None:
    exe = shutil.which("lint-imports") or str(Path(sys.executable).parent / "lint-imports")
    result = subprocess.run([exe, "--config", str(ROOT / "pyproject.toml")], cwd=ROOT,
                            capture_output=True, text=True, timeout=300)
    assert result.returncode == 0, result.stdout + result.stderr
    assert "broken" in result.stdout and "0 broken" in result.stdout


def _tool(name: str) -> str:
    return shutil.which(name) or str(Path(sys.executable).parent / name)


def test_ruff_finds_nothing() -> None:
    result = subprocess.run([_tool("ruff"), "check", "."], cwd=ROOT, capture_output=True, text=True,
                            timeout=300)
    assert result.returncode == 0, result.stdout + result.stderr


def test_the_engine_passes_mypy_strict() -> None:
    result = subprocess.run([sys.executable, "-m", "mypy", "geometry"], cwd=ROOT, capture_output=True,
                            text=True, timeout=600)
    assert result.returncode == 0, result.stdout + result.stderr
