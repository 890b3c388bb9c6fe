"""Analyses built on exact maps: solubility, leach windows, field readings, corrosion readings, comparisons.

Every function here works on :class:`pourbaix.domain_map.DomainMap` objects (or
computes one from an element and the keyword conditions of
:func:`pourbaix.domain_map.compute_map`). Drawing helpers import matplotlib
only when called.
"""

from .compare import BoundaryShift, MapComparison, compare_maps, draw_comparison
from .field import (
    FieldData,
    FieldProblem,
    FieldReading,
    draw_field,
    field_readings,
    place_readings,
    read_field_csv,
)
from .reading import (
    CP_CRITERION_V,
    CP_REFERENCE,
    CorrosionReading,
    corrosion_reading,
    immunity_potential,
)
from .solubility import (
    DEFAULT_LEVELS,
    SolubilityResult,
    add_solubility_lines,
    draw_solubility_curve,
    solubility,
    solubility_curve,
    solubility_lines,
    solubility_minimum,
    solubility_region,
)
from .windows import LeachWindow, draw_window, leach_window

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
    "SolubilityResult",
    "add_solubility_lines",
    "compare_maps",
    "corrosion_reading",
    "draw_comparison",
    "draw_field",
    "draw_solubility_curve",
    "draw_window",
    "field_readings",
    "immunity_potential",
    "leach_window",
    "place_readings",
    "read_field_csv",
    "solubility",
    "solubility_curve",
    "solubility_lines",
    "solubility_minimum",
    "solubility_region",
]
