"""The single-element map's public names in one place (kept for existing imports).

The map is built in topic modules: :mod:`pourbaix.conditions` (checked,
frozen conditions), :mod:`pourbaix.maps.result` (result types and export),
:mod:`pourbaix.maps.build` (envelope solve and assembly) and
:mod:`pourbaix.maps.compute` (``compute_map``); this module re-exports them.
"""

from __future__ import annotations

from pourbaix.conditions import Conditions, make_conditions
from pourbaix.maps.build import build_map, dissolved_activity, select_species, to_frame
from pourbaix.maps.compute import compute_map, compute_sweep
from pourbaix.maps.result import (
    CAUTION,
    Boundary,
    Domain,
    DomainMap,
    Entry,
    ProbeResult,
    species_id,
    species_label,
    state_of,
)

__all__ = [
    "Conditions",
    "make_conditions",
    "Entry",
    "Domain",
    "Boundary",
    "ProbeResult",
    "DomainMap",
    "compute_map",
    "compute_sweep",
    "build_map",
    "select_species",
    "to_frame",
    "dissolved_activity",
    "species_id",
    "species_label",
    "state_of",
    "CAUTION",
]
