"""`taxiwright open` explains in one line why no window can open, instead of Qt aborting."""

from __future__ import annotations

import sys

import pytest

from app.cli_commands import display_problem

pytestmark = pytest.mark.skipif(not sys.platform.startswith("linux"), reason="Linux display rules")


def test_no_display_is_explained() -> None:
    assert "no display" in (display_problem({}) or "")


def test_offscreen_platform_needs_no_display() -> None:
    assert display_problem({"QT_QPA_PLATFORM": "offscreen"}) is None


def test_wayland_needs_no_x11_library() -> None:
    assert display_problem({"WAYLAND_DISPLAY": "wayland-0"}) is None
