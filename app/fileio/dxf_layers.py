"""The DXF layer table of taxiwright's export: one layer per kind of linework.

Names follow the discipline-major-minor(-status) pattern of the US National CAD Standard / AIA
CAD layer guidelines: discipline ``C`` (civil), a four-letter major group, a four-letter minor
group and, where it matters, a status letter (``N`` new, ``E`` existing). The names themselves are
taxiwright's own choice within that open convention (see docs/dxf.md).

Colours are AutoCAD Color Index (ACI) numbers; line types are defined in :mod:`app.fileio.dxf_style`.
This module is plain data and string handling: it does not import ezdxf.
"""

from __future__ import annotations

import re
from collections.abc import Collection, Iterable, Mapping
from dataclasses import dataclass
from types import MappingProxyType

AIRCRAFT_PLACEHOLDER = "{aircraft}"
MAX_AIRCRAFT_TOKEN_CHARS = 24  # keeps layer names short enough to read in a layer list


@dataclass(frozen=True, slots=True)
class LayerSpec:
    """How one kind of linework is drawn.

    name: the DXF layer name; per-aircraft layers hold ``{aircraft}``, replaced by the sanitized
        aircraft name (:func:`aircraft_token`).
    aci: colour, AutoCAD Color Index 1..255.
    linetype: a line type defined in :data:`app.fileio.dxf_style.LINETYPES` or ``"Continuous"``.
    description: what the layer holds, written into the DXF layer table.
    """

    name: str
    aci: int
    linetype: str
    description: str

    @property
    def per_aircraft(self) -> bool:
        return AIRCRAFT_PLACEHOLDER in self.name

    def layer_name(self, aircraft_token_text: str | None = None) -> str:
        """The DXF layer name, with the aircraft token filled in for per-aircraft layers."""
        if not self.per_aircraft:
            return self.name
        if not aircraft_token_text:
            raise ValueError(f"layer {self.name} is drawn per design aircraft: give the aircraft")
        return self.name.replace(AIRCRAFT_PLACEHOLDER, aircraft_token_text)


# Ordered as drawn: hatches first so the lines that sit on them stay visible (shared/ECOSYSTEM.md).
DXF_LAYERS: Mapping[str, LayerSpec] = MappingProxyType({
    "new_pavement_hatch": LayerSpec(
        "C-PVMT-PATT-N", 8, "Continuous", "New pavement hatch (total pavement less existing)"),
    "existing_pavement_hatch": LayerSpec(
        "C-PVMT-PATT-E", 9, "Continuous", "Existing pavement hatch"),
    "existing_pavement": LayerSpec(
        "C-PVMT-EDGE-E", 8, "Continuous", "Existing pavement outlines"),
    "shoulders": LayerSpec(
        "C-PVMT-SHLD-N", 30, "Continuous", "Paved shoulder outlines"),
    "pavement_edges": LayerSpec(
        "C-PVMT-EDGE-N", 7, "Continuous", "Pavement edges: straights, fillets and junction areas"),
    "fillets": LayerSpec(
        "C-PVMT-FLLT-N", 3, "Continuous", "Buildable fillet edges: tapers and fillet arcs"),
    "required_pavement": LayerSpec(
        "C-PVMT-RQRD", 1, "HIDDEN", "Required pavement outline at junctions (analysis only)"),
    "runway_centerlines": LayerSpec(
        "C-RUNW-CNTR", 7, "CENTER", "Runway centerlines, threshold to threshold"),
    "taxiway_centerlines": LayerSpec(
        "C-TAXI-CNTR", 2, "CENTER", "Taxiway and taxilane centerlines with corner arcs"),
    "turn_centerlines": LayerSpec(
        "C-TAXI-TURN", 40, "CENTER", "Centerline turn arcs of the junction movements"),
    "gear_tracks": LayerSpec(
        f"C-TAXI-GEAR-{AIRCRAFT_PLACEHOLDER}", 5, "Continuous",
        "Outer main-gear tyre edge tracks of one design aircraft"),
    "wingtip_tracks": LayerSpec(
        f"C-TAXI-WING-{AIRCRAFT_PLACEHOLDER}", 6, "DASHED", "Wingtip tracks of one design aircraft"),
    "objects": LayerSpec(
        "C-SITE-OBJT", 7, "Continuous", "Fixed objects: buildings, signs, navaids"),
    "clearance_zones": LayerSpec(
        "C-SITE-CLRZ", 210, "PHANTOM", "Object clearance zones to keep free of objects"),
    "labels": LayerSpec(
        "C-ANNO-TEXT", 7, "Continuous", "Labels: taxiway and runway names, fillet dimensions"),
    "dimensions": LayerSpec(
        "C-ANNO-DIMS", 7, "Continuous", "Radius dimensions of turn and fillet arcs"),
    "findings": LayerSpec(
        "C-ANNO-FIND", 1, "Continuous", "Design check finding markers with their codes"),
    "notes": LayerSpec(
        "C-ANNO-NOTE", 7, "Continuous", "Notes block: title, units, rule set, aircraft, caution"),
})


class UnknownLayerError(ValueError):
    """A layer selection names a layer key the exporter does not know."""


def select_layers(layers: Collection[str] | None) -> frozenset[str]:
    """The layer keys to write: all of :data:`DXF_LAYERS` for ``None``, else the given keys.

    Keys are the names of :data:`DXF_LAYERS` (``"pavement_edges"``...), or the DXF layer
    names of the layers that are not per aircraft (``"C-PVMT-EDGE-N"``), in any case.
    """
    if layers is None:
        return frozenset(DXF_LAYERS)
    requested = (layers,) if isinstance(layers, str) else tuple(layers)
    by_dxf_name = {spec.name.upper(): key for key, spec in DXF_LAYERS.items() if not spec.per_aircraft}
    chosen: set[str] = set()
    for item in requested:
        key = item.strip()
        if key.lower() in DXF_LAYERS:
            chosen.add(key.lower())
        elif key.upper() in by_dxf_name:
            chosen.add(by_dxf_name[key.upper()])
        else:
            raise UnknownLayerError(f"unknown DXF layer {item!r}: choose from {', '.join(DXF_LAYERS)}")
    return frozenset(chosen)


def aircraft_token(aircraft_name: str) -> str:
    """An aircraft name made safe for a DXF layer name: upper case letters, digits and ``_``."""
    token = re.sub(r"[^A-Z0-9]+", "_", aircraft_name.upper()).strip("_")
    return token[:MAX_AIRCRAFT_TOKEN_CHARS].rstrip("_") or "AIRCRAFT"


def aircraft_tokens(aircraft_names: Iterable[str]) -> dict[str, str]:
    """A distinct layer token per distinct aircraft name, in the order first seen.

    Names that sanitize alike ("Jet-1" and "Jet 1") get ``_2``, ``_3``... so their tracks stay
    on separate layers.
    """
    tokens: dict[str, str] = {}
    used: set[str] = set()
    for name in aircraft_names:
        if name in tokens:
            continue
        base = aircraft_token(name)
        token, suffix = base, 2
        while token in used:
            token, suffix = f"{base}_{suffix}", suffix + 1
        tokens[name] = token
        used.add(token)
    return tokens
