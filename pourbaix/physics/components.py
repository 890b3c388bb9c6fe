"""Mass-balance systems: metal and ligand species as rows over conserved components.

A mass-balanced calculation (Smith & Missen 1982, Chemical Reaction Equilibrium Analysis) needs, for every species that may
form, how many units of each conserved component it holds (the metals and the
ligand units: N for ammonia, CN for cyanide, S, C, Cl) and its transformed
standard energy as a plane over (pH, E). H and O are not conserved: they come
from water, H+ and electrons, whose chemical potentials are fixed by pH and E
(the Legendre transform of Alberty 2003, ch. 4). The plane of species s, per
formula unit and formed from the reference states of its elements, is

    phi_s(pH, E) = [dG_r,s - (2o - h) R T ln10 pH - (2o - h + z) F E] / F    [V]

with dG_r,s as in :mod:`pourbaix.physics.energies` (Pourbaix 1974, ch. II).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from pourbaix.constants import F_KJ as _FARADAY_KJ
from pourbaix.errors import ConditionsError, OptionError, UnknownSpeciesError
from pourbaix.physics import energies

__all__ = ["MassBalanceSystem", "parse_totals", "build_system", "ligand_species"]


@dataclass(frozen=True)
class MassBalanceSystem:
    """Species of a mass-balanced system with their component counts and planes.

    Attributes
    ----------
    metals : tuple of str
        Metal elements (conserved components, first is the principal one).
    ligands : tuple of str
        Ligand family names (conserved components, counted in ligand units).
    components : tuple of str
        ``metals + ligands``.
    totals : numpy.ndarray
        Total amount of each component [mol/kg water].
    species : tuple of Species
        Table rows, aqueous ones first.
    names : tuple of str
        Species names as on maps (neutral aqueous species carry "(aq)").
    labels : tuple of str
        Typeset (Unicode) labels.
    counts : numpy.ndarray, shape (S, C)
        Units of each component in each species [-].
    planes : numpy.ndarray, shape (S, 3)
        ``(c0, cph, ce)`` per formula unit, vs SHE [V, V/pH, V/V].
    aqueous : numpy.ndarray of bool, shape (S,)
        True for dissolved species.
    charges : numpy.ndarray, shape (S,)
        Charge of each species [-].
    temperature_c : float
        Temperature [°C].
    pressure_bar : float
        Pressure [bar].
    nernst_v : float
        R T ln10 / F [V].
    species_energies : tuple of SpeciesEnergy
        The data used, for reports and export.
    water_activity : float
        Activity of water the planes were built with [-].
    """

    metals: tuple
    ligands: tuple
    components: tuple
    totals: np.ndarray
    species: tuple
    names: tuple
    labels: tuple
    counts: np.ndarray
    planes: np.ndarray
    aqueous: np.ndarray
    charges: np.ndarray
    temperature_c: float
    pressure_bar: float
    nernst_v: float
    species_energies: tuple
    water_activity: float = 1.0

    @property
    def water_counts(self):
        """Water taken up in forming each species from the elements, H2O, H+ and e- [-].

        Every O atom comes from water (no element's reference state holds
        oxygen), so it is the species' O count: each plane holds
        ``-n_O (RT/F) ln a_w`` per formula unit.
        """
        return np.array([dict(sp.composition).get("O", 0) for sp in self.species], dtype=float)

    def index(self, name):
        """Row of a species by its map name (e.g. ``"Cu(NH3)4^2+"``, ``"NH3(aq)"``).

        Raises
        ------
        UnknownSpeciesError
            If the system holds no such species.
        """
        try:
            return self.names.index(name)
        except ValueError:
            raise UnknownSpeciesError(
                f"species {name!r} is not part of the {'-'.join(self.components)} system; "
                f"it holds {', '.join(self.names)}"
            ) from None

    def holding(self, component):
        """Rows of the species that hold ``component`` (a metal or a ligand name)."""
        j = self.components.index(component)
        return np.flatnonzero(self.counts[:, j] > 0)


def parse_totals(totals, metals):
    """Sort ``{"Cu": 1e-2, "N": 1}`` into metal totals and ligand families.

    Parameters
    ----------
    totals : dict or sequence of (str, float)
        Component -> total [mol/kg]. Keys are metal symbols given in
        ``metals`` or ligand names (``S``, ``C``/``CO3``, ``Cl``, ``NH3``/``N``, ``CN``).
    metals : sequence of str
        The metals of the system.

    Returns
    -------
    (dict, list)
        ``{metal: total}`` and ``[(LigandFamily, total), ...]``.

    Raises
    ------
    OptionError
        An unknown component or one given twice.
    ConditionsError
        A total that is not a finite number > 0.

    Examples
    --------
    >>> m, lig = parse_totals({"Cu": 1e-2, "N": 1.0}, ["Cu"])
    >>> m, [(f.name, t) for f, t in lig]
    ({'Cu': 0.01}, [('NH3', 1.0)])
    """
    from pourbaix.tables.ligands import resolve_ligand

    items = totals.items() if isinstance(totals, dict) else list(totals or ())
    metal_totals, ligands, seen = {}, [], set()
    for item in items:
        try:
            key, value = item
        except (TypeError, ValueError):
            raise OptionError(
                f"totals must be NAME=mol/kg pairs such as Cu=1e-3, got {item!r}"
            ) from None
        key = str(key).strip()
        try:
            v = float(value)
        except (TypeError, ValueError):
            v = float("nan")
        if not (math.isfinite(v) and v > 0):
            raise ConditionsError(f"total {key}: must be a number > 0 mol/kg, got {value!r}")
        if key in metals:
            name = key
            metal_totals[key] = v
        else:
            try:
                fam = resolve_ligand(key)
            except OptionError:
                raise OptionError(
                    f"--total {key}: not a metal of the system ({', '.join(metals)}) nor a ligand "
                    f"(S, C or CO3, Cl, NH3 or N, CN)"
                ) from None
            name = fam.name
            ligands.append((fam, v))
        if name in seen:
            raise OptionError(f"total of {name} given twice")
        seen.add(name)
    return metal_totals, ligands


def ligand_species(table, family):
    """Table rows of a ligand family (its listed species, or every S-H-O ... species, no gases).

    Parameters
    ----------
    table : SpeciesTable
        Species tables.
    family : LigandFamily
        The ligand.

    Returns
    -------
    list of Species
    """
    if family.species is not None:
        return [table.get(formula, phase) for formula, phase in family.species]
    allowed = set(family.elements) | {"H", "O"}
    return [
        sp
        for sp in table.species
        if family.counted in dict(sp.composition)
        and set(dict(sp.composition)) <= allowed
        and sp.phase != "g"
        and not sp.metastable
    ]


def _unit_matrix(families):
    """Ligand elements and the (elements x families) matrix of ligand units."""
    els = sorted({el for f, _ in families for el in f.elements})
    unit = np.zeros((len(els), len(families)))
    for j, (f, _) in enumerate(families):
        for el, n in f.unit:
            unit[els.index(el), j] = n
    if families and np.linalg.matrix_rank(unit) < len(families):
        raise OptionError(
            f"the ligands {' + '.join(f.name for f, _ in families)} share elements in a way that "
            "does not say which ligand a species carries; give at most two of C, NH3, CN"
        )
    return els, unit


def _shifted_plane(se, principal, comp, ctx, g_atom):
    """Plane per formula unit formed from every element's reference state.

    ``energies.species_energy`` forms the species from the principal element,
    H2O, H+ and e- per atom of it; the other elements' reference energies
    (zero at 25 °C, Benson-Helgeson convention) are subtracted here.
    """
    x = comp[principal]
    shift = sum(
        n * g_atom[el]
        for el, n in comp.items()
        if el not in ("H", "O") and not (el == principal and el in ctx.element_g_kj)
    )
    c0, cph, ce = se.plane
    return np.array([c0 * x - shift / _FARADAY_KJ, cph * x, ce * x])


def build_system(
    metals,
    totals,
    *,
    table=None,
    temperature_c=25.0,
    pressure_bar=None,
    water_activity=1.0,
    metastable="exclude",
    exclude=(),
    dataset="default",
    data_files=(),
):
    """Collect the species of metals and ligands with their counts and planes.

    Parameters
    ----------
    metals : str or sequence of str
        Metal element(s), e.g. ``"Cu"``.
    totals : dict
        Component -> total [mol/kg], e.g. ``{"Cu": 1e-2, "N": 1.0}``; every
        metal must have a total; ligands are named as in :func:`parse_totals`.
    table : SpeciesTable, optional
        Pre-loaded tables.
    temperature_c : float
        Temperature [°C].
    pressure_bar : float, optional
        Pressure [bar].
    water_activity : float
        Activity of water [-].
    metastable : {"exclude", "include"}
        Leave out or include metastable solids.
    exclude : sequence of str
        Species to leave out (table names).
    dataset : str
        Data set name.
    data_files : sequence of path
        User species tables.

    Returns
    -------
    MassBalanceSystem

    Raises
    ------
    OptionError, ConditionsError, UnknownSpeciesError
        For unknown metals or ligands, totals not > 0, or a missing metal total.

    References
    ----------
    Alberty, R. A. (2003). *Thermodynamics of Biochemical Reactions*. Wiley, ch. 4.
    Pourbaix, M. (1974). *Atlas of Electrochemical Equilibria in Aqueous Solutions*,
    2nd English ed. NACE, ch. II.

    Examples
    --------
    >>> s = build_system("Cu", {"Cu": 1e-2, "NH3": 1.0})
    >>> s.components
    ('Cu', 'NH3')
    """
    from pourbaix.conditions import parse_elements
    from pourbaix.maps.result import species_id, species_label
    from pourbaix.tables.species import load_species

    metals = parse_elements(metals)
    metal_totals, families = parse_totals(totals, metals)
    missing = [m for m in metals if m not in metal_totals]
    if missing:
        raise OptionError(
            f"give the total of {', '.join(missing)} (e.g. --total {missing[0]}=1e-3) for a mass balance"
        )
    if metastable not in ("exclude", "include"):
        raise OptionError(f"metastable must be exclude or include, got {metastable!r}")
    lig_elements, unit = _unit_matrix(families)
    if table is None:
        table = load_species(dataset, tuple(data_files))
    for el in metals:
        energies.reference_species(table, el)
    ctx = energies.make_context(table, temperature_c, pressure_bar, water_activity, metals)
    t = ctx.temperature_c
    g_atom = {}
    for el in (*metals, *lig_elements):
        ref = energies.reference_species(table, el)
        n = dict(ref.composition)[el]
        g = float(energies.species_gibbs_at(ref, ctx)[0])  # route at the context's (T, P)
        g_atom[el] = g / n
    excluded = set()
    for n in exclude:
        excluded.add(table.get(n).key)
    allowed = set(metals) | {"H", "O"} | set(lig_elements)
    rows = []  # (species, principal, others)
    for sp in table.species:
        comp = dict(sp.composition)
        if sp.phase == "g" or sp.key in excluded or not set(comp) & set(metals):
            continue
        if not set(comp) <= allowed or (sp.metastable and metastable == "exclude"):
            continue
        principal = next(m for m in metals if m in comp)
        rows.append((sp, principal))
    for fam, _ in families:
        for sp in ligand_species(table, fam):
            if sp.key not in excluded:
                rows.append((sp, fam.counted))
    names, labels, counts, planes, aq, charges, used, ses = [], [], [], [], [], [], [], []
    skipped = []
    for sp, principal in rows:
        comp = dict(sp.composition)
        lig = np.array([comp.get(el, 0) for el in lig_elements], dtype=float)
        nu = np.linalg.lstsq(unit, lig, rcond=None)[0] if families else np.zeros(0)
        if families and (np.abs(unit @ nu - lig).max() > 1e-9 or np.any(nu < -1e-12)):
            skipped.append(sp.name)
            continue
        others = tuple(el for el in (*metals, *lig_elements) if el != principal)
        se = energies.species_energy(sp, principal, ctx, 1.0, 1.0, ligand_elements=others)
        used.append(sp)
        ses.append(se)
        names.append(species_id(sp))
        labels.append(species_label(sp))
        counts.append([comp.get(m, 0) for m in metals] + list(np.maximum(nu, 0.0)))
        planes.append(_shifted_plane(se, principal, comp, ctx, g_atom))
        aq.append(sp.phase == "aq")
        charges.append(sp.charge)
    if not used:
        raise UnknownSpeciesError(f"no species of {'-'.join(metals)} in the tables")
    order = sorted(range(len(used)), key=lambda i: (not aq[i], i))
    comps = tuple(metals) + tuple(f.name for f, _ in families)
    return MassBalanceSystem(
        metals=tuple(metals),
        ligands=tuple(f.name for f, _ in families),
        components=comps,
        totals=np.array([metal_totals[m] for m in metals] + [v for _, v in families]),
        species=tuple(used[i] for i in order),
        names=tuple(names[i] for i in order),
        labels=tuple(labels[i] for i in order),
        counts=np.array([counts[i] for i in order], dtype=float).reshape(len(used), len(comps)),
        planes=np.array([planes[i] for i in order], dtype=float),
        aqueous=np.array([aq[i] for i in order], dtype=bool),
        charges=np.array([charges[i] for i in order], dtype=float),
        temperature_c=t,
        pressure_bar=ctx.pressure_bar,
        nernst_v=ctx.nernst_v,
        species_energies=tuple(ses[i] for i in order),
        water_activity=float(ctx.water_activity),
    )
