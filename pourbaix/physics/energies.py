"""Transformed free energies: each species as a plane over (pH, potential).

For a species i = M_x H_h O_o (charge z) formed from the metal M, water,
H+ and electrons (Pourbaix 1974, ch. II),

    x M + o H2O  ->  i + (2o - h) H+ + (2o - h + z) e-

the transformed energy per atom of M at (pH, E) is

    psi_i = [dG_r + R T ln a_i - o R T ln a_w
             - (2o - h) R T ln10 pH - (2o - h + z) F E] / x        [J/mol]

with dG_r = G_i + n_e G_e - x G_M - o G_w built from apparent Gibbs energies
at T (Benson-Helgeson convention). G(H+) = 0 and G_e = G(H2, g)/2 at every T,
so the standard hydrogen electrode is the zero of potential at every
temperature. Dividing by F gives psi in volts, the unit used throughout.
Ligand atoms (S, C, Cl, N ...) are taken from the ligand species that
predominates at the point (predominant-ligand method, Pourbaix 1974, ch. II); the planes
here carry that species' own plane, so the subtraction stays linear.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np

from pourbaix.constants import F_KJ, T_REF_C
from pourbaix.errors import ConditionsError
from pourbaix.physics import thermo

__all__ = [
    "SpeciesEnergy",
    "EnergyContext",
    "aqueous_route_of",
    "entropy_estimates",
    "species_gibbs_at",
    "oxide_sum_entropy",
    "oxide_additivity_entropy",
    "make_context",
    "context_for",
    "reference_species",
    "species_energy",
    "water_energy",
    "water_lines",
]

_FARADAY_KJ = F_KJ  # kJ/(mol V)


@dataclass(frozen=True)
class EnergyContext:
    """Everything about the conditions that the planes need.

    Attributes
    ----------
    temperature_c : float
        Temperature [°C].
    pressure_bar : float
        Pressure [bar].
    nernst_v : float
        R T ln10 / F [V].
    g_water_kj : float
        Apparent Gibbs energy of liquid water at T [kJ/mol].
    g_electron_kj : float
        Half the apparent Gibbs energy of H2(g) at T [kJ/mol] (SHE convention).
    g_oxygen_kj : float
        Apparent Gibbs energy of O2(g) at T [kJ/mol].
    water_activity : float
        Activity of water [-].
    element_g_kj : dict
        Apparent Gibbs energy of each element's reference species at T [kJ/mol].
    aqueous_route : str
        ``"hkf"`` or ``"criss-cobble"`` (see :func:`~pourbaix.physics.thermo.species_gibbs`).
    entropy_estimates : dict
        ``(name, phase)`` -> ``(S° [J/(mol K)], how)`` for species the tables
        give without S° (:func:`entropy_estimates`).
    water : WaterProperties or None
        Water at (T, P) from the checked conditions, passed on so that no
        species' energy checks or looks up the conditions again.
    """

    temperature_c: float
    pressure_bar: float
    nernst_v: float
    g_water_kj: float
    g_electron_kj: float
    g_oxygen_kj: float
    water_activity: float
    element_g_kj: dict
    aqueous_route: str = "hkf"
    entropy_estimates: dict = field(default_factory=dict)
    water: object = None


@dataclass(frozen=True)
class SpeciesEnergy:
    """One species' data at the map's conditions.

    Attributes
    ----------
    species : Species
        The table row.
    dg_kj_mol : float
        Gibbs energy used at the map's temperature [kJ/mol].
    route : str
        How ``dg_kj_mol`` was obtained (e.g. "25 °C value", "constant Cp").
    valid_to_c : float
        Upper temperature limit of that route [°C].
    activity : float
        Activity used [-] (dissolved: activity times activity coefficient).
    gamma : float
        Activity coefficient applied [-].
    plane : tuple of float
        ``(c0, cph, ce)`` per atom of the principal element, vs SHE
        [V, V/pH, V/V], before any ligand term.
    """

    species: object
    dg_kj_mol: float
    route: str
    valid_to_c: float
    activity: float
    gamma: float
    plane: tuple


# Water at the (T, P) states of checked conditions, so that the energy of each species
# neither checks the conditions again nor looks water up again (filled by _context).
_CHECKED_WATER = {}


def _gibbs(sp, temperature_c, pressure_bar=1.0, aqueous_route="hkf"):
    if temperature_c == 25.0 and pressure_bar == 1.0:
        return sp.dgf_kj_mol, "25 °C value", float("inf")
    water = _CHECKED_WATER.get((temperature_c, pressure_bar))
    res = thermo.species_gibbs(sp, temperature_c, pressure_bar, aqueous_route, water=water)
    return float(res.dg_kj_mol), res.route, float(res.valid_to_c)


# entropy_estimates per table: tables are immutable, and the search over all rows costs
# ~20 ms for the embedded tables, more than the rest of a map at temperature
_ESTIMATES: dict[int, tuple[object, dict]] = {}


def entropy_estimates(table):
    """S° estimates for the tables' hydroxide complexes that have none.

    Parameters
    ----------
    table : SpeciesTable
        Species tables.

    Returns
    -------
    dict
        ``(name, phase)`` -> ``(S° [J/(mol K)], how)``: oxyanions XO_n^z- by
        Cobble's rule (:func:`pourbaix.physics.hkf.cobble_oxyanion_entropy`);
        aqueous hydroxide complexes from the cation M^z+ of the same tables by the correlations
        of Shock et al. (1997) (:func:`pourbaix.physics.hkf.estimate_hydroxo_entropy`);
        solid hydroxides and oxyhydroxides as the sum of a tabulated oxide of
        the same oxidation state and water (:func:`oxide_sum_entropy`); other
        anhydrous solid oxides from a measured oxide of the same metal
        (:func:`oxide_additivity_entropy`).
    """
    cached = _ESTIMATES.get(id(table))
    if cached is not None and cached[0] is table:
        return cached[1]
    found = _entropy_estimates(table)
    if len(_ESTIMATES) >= 8:
        _ESTIMATES.pop(next(iter(_ESTIMATES)))
    _ESTIMATES[id(table)] = (table, found)
    return found


def _entropy_estimates(table):
    from pourbaix.physics import hkf

    cations = {}
    for sp in table.species:
        comp = dict(sp.composition)
        if sp.phase == "aq" and len(comp) == 1 and sp.s_j_molk is not None and sp.charge > 0:
            ((element, count),) = comp.items()
            if count == 1 and not sp.form:
                cations.setdefault((element, sp.charge), sp.s_j_molk)
    found = {}
    for sp in table.species:
        if sp.phase != "aq" or sp.s_j_molk is not None:
            continue
        comp = dict(sp.composition)
        if sp.charge < 0 and len(comp) == 2 and "O" in comp and "H" not in comp:
            (central,) = set(comp) - {"O"}
            if comp[central] == 1:
                s = hkf.cobble_oxyanion_entropy(sp.charge, comp["O"])
                found[sp.key] = (s, "S° by Cobble's oxyanion rule")
                continue
        form = hkf.hydroxo_form(comp, sp.charge)
        if form is None or (form[0], form[1]) not in cations:
            continue
        removed = comp.get("O", 0) - comp.get("H", 0)
        s = hkf.estimate_hydroxo_entropy(cations[form[0], form[1]], form[1], form[2], removed)
        if s is not None:
            found[sp.key] = (s, "S° from the cation")
    for sp in table.species:
        if sp.phase == "s" and sp.s_j_molk is None:
            s = oxide_sum_entropy(sp, table)
            if s is not None:
                found[sp.key] = (s, "S° by oxide sum")
                continue
            estimate = oxide_additivity_entropy(sp, table)
            if estimate is not None:
                found[sp.key] = (estimate[0], f"S° estimated from {estimate[1]} by additivity")
    return found


# Entropy of water bound in crystalline hydrates and hydroxides, the "ice-like" value
# of Latimer (1952, The Oxidation States of the Elements, 2nd ed.; from memory)
_S_BOUND_WATER_J_MOLK = 39.3


def oxide_sum_entropy(species, table):
    """S° of a solid hydroxide as a tabulated oxide plus bound water (solid-solid ΔS ≈ 0).

    Parameters
    ----------
    species : Species
        A solid M_a O_o H_h without S°.
    table : SpeciesTable
        Species tables.

    Returns
    -------
    float or None
        S° [J/(mol K)], or None when no oxide of the same metal and oxidation
        state with S° is tabulated.

    Notes
    -----
    M_a O_o H_h = (a/a') M_a' O_o' H_h' + k H2O(bound); S° = (a/a') S°' + k × 39.3
    J/(mol K): entropies of reactions among solids are small (Fyfe, Turner &
    Verhoogen 1958; Helgeson et al. 1978, Am. J. Sci. 278-A), and water bound
    in solids carries about 39.3 J/(mol K) (Latimer 1952; from memory). E.g.
    Zn(OH)2 from ZnO (43.65): 82.9 J/(mol K).
    """
    comp = dict(species.composition)
    metals = [e for e in comp if e not in ("H", "O")]
    if len(metals) != 1 or species.charge != 0:
        return None
    metal = metals[0]
    a, o, h = comp[metal], comp.get("O", 0), comp.get("H", 0)
    best = None
    for other in table.species:
        if other.phase != "s" or other.s_j_molk is None or other is species:
            continue
        oc = dict(other.composition)
        if set(oc) - {"H", "O"} != {metal}:
            continue
        ratio = a / oc[metal]
        water = o - ratio * oc.get("O", 0)
        if water <= 0 or abs(h - ratio * oc.get("H", 0) - 2 * water) > 1e-9:
            continue
        s = ratio * other.s_j_molk + water * _S_BOUND_WATER_J_MOLK
        if best is None or (best[0] and not other.metastable):
            best = (other.metastable, s)
    return None if best is None else best[1]


def oxide_additivity_entropy(species, table):
    """S° of an anhydrous solid oxide from a measured oxide of the same metal.

    Parameters
    ----------
    species : Species
        A solid M_a O_o (no H, no charge) without S°.
    table : SpeciesTable
        Species tables.

    Returns
    -------
    tuple or None
        ``(S° [J/(mol K)], name of the oxide used)``, or None when the tables
        hold no other oxide of that metal with S°.

    Notes
    -----
    Latimer's additive contributions (Latimer 1951, J. Am. Chem. Soc. 73, 1480):
    the S° of a solid is the sum of a contribution per cation, fixed for the
    element, and one per anion. Taking the metal's contribution from a measured
    oxide M_a' O_o' and the change of the O²⁻ contribution with the oxidation
    state as zero gives S° = (a/a') S°(M_a' O_o'). Over the 28 pairs of measured
    oxides of one metal in the tables (NBS82/CRC values) this is unbiased (mean
    -0.5 %) with 25 % r.m.s. scatter; the worst, Co3O4 from CoO, is 55 % high.
    The oxide used is the one nearest in O/M, stable before metastable.
    """
    comp = dict(species.composition)
    metals = [e for e in comp if e != "O"]
    if species.charge != 0 or "O" not in comp or len(metals) != 1 or "H" in comp:
        return None
    metal = metals[0]
    ratio = comp["O"] / comp[metal]
    best = None
    for other in table.species:
        if other.phase != "s" or other.s_j_molk is None or other is species:
            continue
        oc = dict(other.composition)
        if set(oc) != {metal, "O"}:
            continue
        rank = (abs(oc["O"] / oc[metal] - ratio), bool(other.metastable))
        if best is None or rank < best[0]:
            best = (rank, comp[metal] / oc[metal] * other.s_j_molk, other.name)
    return None if best is None else (best[1], best[2])


def species_gibbs_at(sp, ctx):
    """Apparent Gibbs energy of a table row at the context's (T, P), with its route.

    Parameters
    ----------
    sp : Species
        Table row.
    ctx : EnergyContext
        Conditions.

    Returns
    -------
    tuple
        ``(dg_kj_mol, route, valid_to_c)`` as :func:`~pourbaix.physics.thermo.species_gibbs`; a
        species the tables give without S° uses the context's estimate of it
        (named in the route).
    """
    estimate = ctx.entropy_estimates.get(getattr(sp, "key", None))
    if estimate is None:
        return _gibbs(sp, ctx.temperature_c, ctx.pressure_bar, ctx.aqueous_route)
    with_s = replace(sp, s_j_molk=estimate[0])
    dg, route, valid = _gibbs(with_s, ctx.temperature_c, ctx.pressure_bar, ctx.aqueous_route)
    if route != "25 °C value":
        route += f", {estimate[1]}"
    return dg, route, valid


def aqueous_route_of(table):
    """``"criss-cobble"`` for the data set of that name, else ``"hkf"``."""
    return "criss-cobble" if getattr(table, "dataset", "") == "criss-cobble" else "hkf"


def make_context(table, temperature_c=25.0, pressure_bar=None, water_activity=1.0, elements=()):
    """Build the condition-dependent constants for the planes.

    Parameters
    ----------
    table : SpeciesTable
        Species tables (must hold H2O(l), H2(g) and O2(g)).
    temperature_c : float
        Temperature [°C].
    pressure_bar : float, optional
        Pressure [bar]; default 1 bar below 100 °C, saturation above.
    water_activity : float
        Activity of liquid water [-].
    elements : iterable of str
        Elements whose reference (zero-valent) species sets their zero.

    Returns
    -------
    EnergyContext

    Raises
    ------
    ConditionsError
        If the water activity is not in (0, 1] or T is out of range.
    """
    if not (0.0 < float(water_activity) <= 1.0):
        raise ConditionsError(f"water activity must be in (0, 1], got {water_activity}")
    t = float(temperature_c)
    props = thermo.water_properties(t, pressure_bar)
    return _context(
        table, t, props, float(thermo.nernst_factor(t)), float(water_activity), elements
    )


def context_for(table, conditions, elements=None):
    """Build the constants for the planes from checked conditions (nothing is re-checked).

    Parameters
    ----------
    table : SpeciesTable
        Species tables (must hold H2O(l), H2(g) and O2(g)).
    conditions : pourbaix.conditions.Conditions
        Conditions built by :func:`pourbaix.conditions.make_conditions`.
    elements : iterable of str, optional
        Elements whose reference species set their zero; default the
        conditions' elements.

    Returns
    -------
    EnergyContext
    """
    props = conditions.water
    if props is None:  # conditions built by hand (tests, plots of invented systems)
        props = thermo.water_properties(conditions.temperature_c, conditions.pressure_bar)
    return _context(
        table,
        float(conditions.temperature_c),
        props,
        float(conditions.nernst_v),
        float(conditions.water_activity),
        conditions.elements if elements is None else elements,
    )


def _context(table, t, props, nernst_v, water_activity, elements):
    p = float(props.pressure_bar)
    if not (t == T_REF_C and p == 1.0):
        from pourbaix.physics.hkf import check_hkf_range

        check_hkf_range(t, p, props.density_kg_m3 / 1000.0)
    route = aqueous_route_of(table)
    water = table.get("H2O", "l")
    h2 = table.get("H2", "g")
    o2 = table.get("O2", "g")
    if t == T_REF_C and p == 1.0:
        g_w = water.dgf_kj_mol
    else:
        # the table's 25 °C value carried to (T, P) by IAPWS-95 (keeps one source for water)
        g_w = water.dgf_kj_mol + float(props.gibbs_kj_mol - thermo.water_gibbs(T_REF_C, 1.0))
    if len(_CHECKED_WATER) > 256:
        _CHECKED_WATER.clear()
    _CHECKED_WATER[(t, p)] = props
    g_h2 = _gibbs(h2, t, p, route)[0]
    g_o2 = _gibbs(o2, t, p, route)[0]
    element_g = {}
    for el in elements:
        element_g[el] = _gibbs(reference_species(table, el), t, p, route)[0]
    return EnergyContext(
        temperature_c=t,
        pressure_bar=float(props.pressure_bar),
        nernst_v=nernst_v,
        g_water_kj=float(g_w),
        g_electron_kj=0.5 * g_h2,
        g_oxygen_kj=float(g_o2),
        water_activity=water_activity,
        element_g_kj=element_g,
        aqueous_route=route,
        entropy_estimates=(
            entropy_estimates(table) if route == "hkf" and (t, p) != (T_REF_C, 1.0) else {}
        ),
        water=props,
    )


def water_energy(table, ctx):
    """The row of liquid water with its Gibbs energy at the context's (T, P).

    Parameters
    ----------
    table : SpeciesTable
        Species tables.
    ctx : EnergyContext
        Conditions.

    Returns
    -------
    SpeciesEnergy
        Water, route "IAPWS-95", activity as set (no plane: it is the solvent).
    """
    return SpeciesEnergy(
        table.get("H2O", "l"),
        ctx.g_water_kj,
        "IAPWS-95",
        thermo.T_MAX_C,
        ctx.water_activity,
        1.0,
        (0.0, 0.0, 0.0),
    )


def reference_species(table, element):
    """The element in its standard state (the zero of formation energies).

    Parameters
    ----------
    table : SpeciesTable
        Species tables.
    element : str
        Element symbol.

    Returns
    -------
    Species
        The uncharged, single-element, non-metastable row with ΔfG° = 0.

    Raises
    ------
    DataError
        If the tables hold no such row.
    """
    from pourbaix.errors import DataError

    for sp in table.species:
        comp = dict(sp.composition)
        if (
            list(comp) == [element]
            and sp.charge == 0
            and sp.dgf_kj_mol == 0.0
            and not sp.metastable
        ):
            return sp
    raise DataError(f"the tables hold no reference state (ΔfG° = 0) for element {element!r}")


def species_energy(sp, element, ctx, activity=1.0, gamma=1.0, ligand_elements=()):
    """Plane of one species per atom of ``element``.

    Parameters
    ----------
    sp : Species
        Table row; its elements must be ``element``, H, O and ``ligand_elements``.
    element : str
        Principal element M.
    ctx : EnergyContext
        Conditions.
    activity : float
        Activity of the species [-] (1 for solids and water).
    gamma : float
        Activity coefficient already included in ``activity`` [-] (reported only).
    ligand_elements : iterable of str
        Other elements allowed; their atoms are left in the plane and must be
        removed by the caller with the ligand species' planes.

    Returns
    -------
    SpeciesEnergy
    """
    comp = dict(sp.composition)
    x = comp.get(element, 0)
    if x <= 0:
        raise ConditionsError(f"species {sp.name} holds no {element}")
    extra = set(comp) - {element, "H", "O"} - set(ligand_elements)
    if extra:
        raise ConditionsError(
            f"species {sp.name} holds {', '.join(sorted(extra))}, outside the system"
        )
    h, o, z = comp.get("H", 0), comp.get("O", 0), sp.charge
    dg, route, valid = species_gibbs_at(sp, ctx)
    k = ctx.nernst_v
    n_h = 2 * o - h
    n_e = 2 * o - h + z
    # Pourbaix 1974, ch. II: dG_r = G_i + n_e G_e - x G_M - o G_w  (formation from M, H2O, H+, e-)
    dg_r = (
        dg + n_e * ctx.g_electron_kj - x * ctx.element_g_kj.get(element, 0.0) - o * ctx.g_water_kj
    )
    c0 = (dg_r / _FARADAY_KJ + k * np.log10(activity) - o * k * np.log10(ctx.water_activity)) / x
    plane = (float(c0), float(-n_h * k / x), float(-n_e / x))
    return SpeciesEnergy(sp, float(dg), route, valid, float(activity), float(gamma), plane)


def water_lines(ctx, oxygen_bar=1.0, hydrogen_bar=1.0):
    """The stability limits of water vs SHE at the context's temperature.

    Parameters
    ----------
    ctx : EnergyContext
        Conditions.
    oxygen_bar, hydrogen_bar : float
        Partial pressures of O2 and H2 [bar].

    Returns
    -------
    dict
        ``{"oxygen": (e_at_ph0_v, slope_v_per_ph), "hydrogen": (...)}`` [V, V/pH].

    Notes
    -----
    O2 + 4 H+ + 4 e- = 2 H2O:  E = -(2 G_w - G_O2 - 4 G_e)/(4F) + k/4 log(p_O2 a_w^-2) - k pH;
    2 H+ + 2 e- = H2:          E = -(k/2) log p_H2 - k pH  (Nernst; Bard & Faulkner 2001, eq. 2.1.38).
    """
    k = ctx.nernst_v
    e_o2 = -(2 * ctx.g_water_kj - ctx.g_oxygen_kj - 4 * ctx.g_electron_kj) / (4 * _FARADAY_KJ)
    e_o2 += k / 4 * (np.log10(oxygen_bar) - 2 * np.log10(ctx.water_activity))
    e_h2 = -(k / 2) * np.log10(hydrogen_bar)
    return {"oxygen": (float(e_o2), -k), "hydrogen": (float(e_h2), -k)}
