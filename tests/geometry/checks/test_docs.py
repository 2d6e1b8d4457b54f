"""docs/checks.md documents every finding code the checks can emit."""

from __future__ import annotations

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[3]


def test_every_code_is_documented() -> None:
    sources = "".join(path.read_text() for path in sorted((ROOT / "geometry" / "checks").glob("*.py")))
    codes = set(re.findall(r'"([EWI]-[A-Z]+(?:-[A-Z]+)*)"', sources))
    documented = set(re.findall(r"^\| `([EWI]-[A-Z-]+)` \|", (ROOT / "docs" / "checks.md").read_text(), re.M))
    assert len(codes) == 20  # identity: the codes of the brief plus W-CHECK-SKIPPED and E-OVERLAP
    assert codes == documented
