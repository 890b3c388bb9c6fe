"""Exact potential-pH (Pourbaix) diagrams with traceable thermodynamic data.

The main entry point is :func:`~pourbaix.maps.domain_map.compute_map`, which
returns a :class:`~pourbaix.maps.domain_map.DomainMap` holding exact stability
domains, boundary lines, the water window and the data used. Drawing lives in
:mod:`pourbaix.plot.draw` and is imported only when needed (matplotlib is never
imported by computing).

A map is a thermodynamic prediction: it says nothing about rates, film
quality, pitting, crevices or microbiology.
"""

from pourbaix.errors import PourbaixError

__version__ = "0.1.0"

__all__ = [
    "PourbaixError",
    "compute_map",
    "make_conditions",
    "DomainMap",
    "Conditions",
    "load_species",
    "sweep",
    "__version__",
]


def __getattr__(name):
    # Lazy imports keep `import pourbaix` cheap for the command line.
    if name in ("compute_map", "DomainMap", "Conditions", "compute_sweep", "make_conditions"):
        from pourbaix.maps import domain_map

        return getattr(domain_map, name)
    if name == "sweep":
        from pourbaix.analyses.sweep import sweep

        return sweep
    if name == "load_species":
        from pourbaix.tables.species import load_species

        return load_species
    raise AttributeError(f"module 'pourbaix' has no attribute {name!r}")
