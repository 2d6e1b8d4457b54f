"""The About box: what taxiwright is, the full caution, and where the rule sets come from."""

from __future__ import annotations

from html import escape

from app.ui.style import CAUTION
from geometry.standards import AC_13A, AC_13B, ADM_2, ANNEX_14, CS_ADR_DSN, HORONJEFF

RULE_SET_SOURCES: tuple[tuple[str, str], ...] = (
    ("FAA rule set", f"{AC_13B} (taxiway design groups, taxiway widths, edge safety margins); "
                     f"{AC_13A} (airplane design groups and separations where 13B was not at hand)"),
    ("ICAO rule set", f"{ANNEX_14} (aerodrome reference code letters, clearances, separations); "
                      f"{ADM_2}; {CS_ADR_DSN}"),
    ("Turns and fillets", f"{HORONJEFF} (offtracking and fillet relations, 50-degree steering "
                          "criterion); the swept path itself follows the cockpit-over-centerline "
                          "pursuit curve"),
)
CONFIDENCE_NOTE = ("Every rule value carries its source and how sure we are of it: published, common "
                   "practice, or from memory (to be verified against the document named). "
                   "docs/standards.md lists them all.")


def about_html() -> str:
    sources = "".join(f"<li><b>{escape(name)}</b>: {escape(text)}</li>" for name, text in RULE_SET_SOURCES)
    return (f"<h3>taxiwright</h3><p>A taxiway layout sketcher for airport planners: turn geometry, "
            f"required pavement, design checks and DXF.</p>"
            f"<p><b>{escape(CAUTION)}</b></p>"
            f"<p>Aircraft in the demo library are fictional. Sources of the rule sets:</p><ul>{sources}</ul>"
            f"<p>{escape(CONFIDENCE_NOTE)}</p>")
