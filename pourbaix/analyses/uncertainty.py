"""How far the map's lines move with the uncertainty of the Gibbs energies.

The Gibbs energy of formation of each species of the element system is drawn
from a normal distribution, mean the table value, standard deviation the row's
stated uncertainty (``dgf_unc_kj_mol``: the standard uncertainty derived from
what the row's own source prints, e.g. CODATA key values or an IUPAC review's
log K interval) or, for a row that states none, a default the user chooses
(``--uncertainty KJ``, 1 kJ/mol when no value is given; 0 samples only the rows
with stated uncertainties); the map is solved once per sample (Monte Carlo
propagation of distributions, JCGM 101:2008). A row derived from another species
by a constant (``dgf_unc_parent``, e.g. a hydroxo complex or oxide from its
review's log K and the table's Zn2+) moves with that species' draw, times the
units of it the species holds (``dgf_unc_parent_units``: 2 for (UO2)2(OH)2^2+),
plus its own, so the line between the two moves only by the constant's uncertainty. The
probability of a species at a point is the share of samples in which it is the
stable one; a boundary's 95 % band is where no species reaches 97.5 % (the central
95 % of the sampled boundary positions covers the point). Other draws are
independent per species: correlations between values of one compilation are not
modelled (a stated simplification).

References
----------
JCGM 101:2008. Evaluation of measurement data - Supplement 1 to the "Guide to
the expression of uncertainty in measurement" - Propagation of distributions
using a Monte Carlo method. BIPM (2008).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

__all__ = ["UncertainMap", "sample_maps", "species_probabilities", "boundary_band"]

BAND_LEVEL = 0.975  # a species above this share holds the point (two-sided 95 %)


@dataclass(frozen=True)
class UncertainMap:
    """The nominal map and the maps of the sampled energies.

    Attributes
    ----------
    nominal : DomainMap
        The map of the table values.
    samples : tuple of DomainMap
        One map per draw.
    default_uncertainty_kj_mol : float
        Standard uncertainty used for rows that state none [kJ/mol].
    stated : int
        Number of perturbed species whose rows state an uncertainty.
    perturbed : int
        Number of species drawn.
    """

    nominal: object
    samples: tuple
    default_uncertainty_kj_mol: float
    stated: int
    perturbed: int


def _perturbed_tables(table, elements, count, default, seed, ligand_elements=frozenset()):
    import numpy as np

    rng = np.random.default_rng(seed)
    # species of the map's chemical system: a metal, with only H, O and the ligands' elements
    # beside it (a fluoride is not drawn on a map without fluoride, nor counted as stated)
    allowed = set(elements) | set(ligand_elements) | {"H", "O"}
    chosen = [
        i
        for i, sp in enumerate(table.species)
        if set(sp.composition) & set(elements)
        and set(sp.composition) <= allowed
        and sp.dgf_kj_mol != 0.0
    ]
    sigma = np.array(
        [
            table.species[i].dgf_unc_kj_mol
            if table.species[i].dgf_unc_kj_mol is not None
            else default
            for i in chosen
        ]
    )
    stated = sum(table.species[i].dgf_unc_kj_mol is not None for i in chosen)
    parents = _parent_positions(table, chosen)
    units = [table.species[i].dgf_unc_parent_units for i in chosen]
    tables = []
    for _ in range(count):
        own = rng.normal(0.0, 1.0, len(chosen)) * sigma
        draw = [_with_parents(k, own, parents, units) for k in range(len(chosen))]
        species = list(table.species)
        for i, delta in zip(chosen, draw, strict=True):
            species[i] = dataclasses.replace(species[i], dgf_kj_mol=species[i].dgf_kj_mol + delta)
        tables.append(dataclasses.replace(table, species=tuple(species)))
    return tables, stated, len(chosen)


def _parent_positions(table, chosen):
    """For each drawn species, the position (in ``chosen``) of its dgf_unc_parent, or None."""
    where = {table.species[i].key: k for k, i in enumerate(chosen)}
    out = []
    for i in chosen:
        name = table.species[i].dgf_unc_parent
        # a parent outside the drawn species (another element) stays at its table value
        out.append(None if name is None else where.get(table.get(name).key))
    return out


def _with_parents(k, own, parents, units):
    """Own draw plus the parent's draw times the units held, down the chain of parents.

    draw(k) = own(k) + units(k) draw(parent(k)) (the loader refuses a self-reference).
    """
    total, factor, seen = 0.0, 1.0, set()
    while k is not None and k not in seen:
        seen.add(k)
        total += factor * own[k]
        factor *= units[k]
        k = parents[k]
    return total


def sample_maps(
    elements, samples=200, default_uncertainty_kj_mol=1.0, seed=0, table=None, **map_keywords
):
    """Solve the map for sampled Gibbs energies.

    Parameters
    ----------
    elements : str or sequence of str
        As for :func:`pourbaix.maps.domain_map.compute_map`.
    samples : int
        Number of draws (each is one exact map; 200 give band edges to about 1.5 %).
    default_uncertainty_kj_mol : float
        Standard uncertainty for rows without ``dgf_unc_kj_mol`` [kJ/mol].
    seed : int
        Seed of the random generator (the same seed gives the same bands).
    table : SpeciesTable, optional
        Pre-loaded tables.
    **map_keywords
        Passed to ``compute_map`` (activity, ligands, temperature_c, ...).

    Returns
    -------
    UncertainMap
    """
    from pourbaix.errors import OptionError
    from pourbaix.maps.domain_map import compute_map
    from pourbaix.tables.species import load_species

    if int(samples) < 10:
        raise OptionError(f"--samples {samples}: give at least 10 draws")
    if not default_uncertainty_kj_mol >= 0:
        raise OptionError(
            f"--uncertainty {default_uncertainty_kj_mol}: give a standard uncertainty >= 0 kJ/mol"
        )
    if table is None:
        table = load_species(
            map_keywords.get("dataset", "default"), tuple(map_keywords.get("data_files", ()))
        )
    nominal = compute_map(elements, table=table, **map_keywords)
    from pourbaix.tables.ligands import resolve_ligand

    names = nominal.conditions.elements
    ligand_elements = set()
    for ligand in nominal.conditions.ligands or ():
        ligand_elements |= resolve_ligand(ligand).elements
    tables, stated, perturbed = _perturbed_tables(
        table, names, int(samples), float(default_uncertainty_kj_mol), seed, ligand_elements
    )
    maps = tuple(compute_map(elements, table=t, **map_keywords) for t in tables)
    return UncertainMap(nominal, maps, float(default_uncertainty_kj_mol), stated, perturbed)


def species_probabilities(result, ph, potential_v):
    """Share of the samples in which each species (or assemblage) is stable at a point.

    Parameters
    ----------
    result : UncertainMap
    ph, potential_v : float
        The point [-, V vs the map's reference].

    Returns
    -------
    dict
        Species label -> probability, largest first.
    """
    counts: dict[str, int] = {}
    for m in result.samples:
        name = str(m.probe(ph, potential_v).species)
        counts[name] = counts.get(name, 0) + 1
    total = len(result.samples)
    return dict(sorted(((k, v / total) for k, v in counts.items()), key=lambda kv: -kv[1]))


def boundary_band(result, resolution=160):
    """Grid of the points no species holds with 97.5 % probability.

    Parameters
    ----------
    result : UncertainMap
    resolution : int
        Points per axis.

    Returns
    -------
    ph, potential, band : ndarray
        1-D axes and a boolean 2-D mask (rows: potential) of the 95 % bands.
    """
    import numpy as np

    ph_lo, ph_hi, e_lo, e_hi = result.nominal.window
    ph = np.linspace(ph_lo, ph_hi, resolution)
    e = np.linspace(e_lo, e_hi, resolution)
    pp, ee = np.meshgrid(ph, e)
    best = np.zeros(pp.shape)
    counts: dict[str, np.ndarray] = {}
    for m in result.samples:
        names = np.asarray(m.probe(pp.ravel(), ee.ravel()).species, dtype=object).reshape(pp.shape)
        for name in set(names.ravel()):
            counts.setdefault(name, np.zeros(pp.shape))
            counts[name] += names == name
    for c in counts.values():
        best = np.maximum(best, c / len(result.samples))
    return ph, e, best < BAND_LEVEL
