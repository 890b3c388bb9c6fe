"""Analyses built on exact maps: solubility, leach windows, field readings, corrosion readings, comparisons.

Every function here works on :class:`pourbaix.maps.domain_map.DomainMap` objects (or
computes one from an element and the keyword conditions of
:func:`pourbaix.maps.domain_map.compute_map`). Computing only: their figures are
drawn by :mod:`pourbaix.plot.analysis_figures`.
"""

import importlib

# ``solubility`` names both a submodule and its main function; bind the function now,
# before any other import of the submodule can leave the module under that name.
from pourbaix.analyses.solubility import solubility

# Each public name and the submodule that defines it; submodules load on first use so
# the command line (which only registers the analysis commands) stays quick to start.
_WHERE = {
    "BoundaryShift": "compare",
    "CP_CRITERION_V": "reading",
    "CP_REFERENCE": "reading",
    "CorrosionReading": "reading",
    "DEFAULT_LEVELS": "solubility",
    "FieldData": "field",
    "FieldProblem": "field",
    "FieldReading": "field",
    "LeachWindow": "windows",
    "MapComparison": "compare",
    "SolidOnset": "solubility",
    "SolubilityResult": "solubility",
    "compare_maps": "compare",
    "corrosion_reading": "reading",
    "field_readings": "field",
    "immunity_potential": "reading",
    "leach_window": "windows",
    "missing_solid_note": "solubility",
    "place_readings": "field",
    "read_field_csv": "field",
    "solubility_curve": "solubility",
    "solubility_lines": "solubility",
    "solubility_minimum": "solubility",
    "solid_onset": "solubility",
    "solubility_region": "solubility",
}

__all__ = [
    "BoundaryShift",
    "CP_CRITERION_V",
    "CP_REFERENCE",
    "CorrosionReading",
    "DEFAULT_LEVELS",
    "FieldData",
    "FieldProblem",
    "FieldReading",
    "LeachWindow",
    "MapComparison",
    "SolidOnset",
    "SolubilityResult",
    "compare_maps",
    "corrosion_reading",
    "field_readings",
    "immunity_potential",
    "leach_window",
    "missing_solid_note",
    "place_readings",
    "read_field_csv",
    "solubility",
    "solubility_curve",
    "solubility_lines",
    "solubility_minimum",
    "solid_onset",
    "solubility_region",
]


def __getattr__(name):
    try:
        module = _WHERE[name]
    except KeyError:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}") from None
    value = getattr(importlib.import_module(f".{module}", __name__), name)
    globals()[name] = value
    return value


def __dir__():
    return sorted(set(globals()) | set(_WHERE))
