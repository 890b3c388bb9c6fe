"""Solubility of an element over pH and potential: values, curves, iso-solubility regions and lines.

The total dissolved amount of an element M in equilibrium with its
least-soluble solid follows from the same transformed-energy planes as the
map (Pourbaix 1974, ch. II). Each plane psi_i holds ``(k_T / x_i) log10 a_set`` for a
dissolved species i with x_i atoms of M set at the map's activity a_set, so at
another activity a

    psi_i(a) = psi_i(a_set) + (k_T / x_i) log10(a / a_set)          [V per atom of M]

and equilibrium with the solid s (per atom of M: psi_i(a) = psi_s) gives

    log10 a_i = log10 a_set + x_i (psi_s - psi_i(a_set)) / k_T

(the Nernst / mass-action law written per atom; Pourbaix 1974, ch. II §3).
The total is the sum over every dissolved species holding M, complexes
included:  S = Σ_i x_i a_i / γ_i  [mol/kg].

The solid s is the solid (metal included) with the lowest plane at the point:
it is the stable one wherever the map shows a solid, and the least-soluble one
wherever the map shows a dissolved species at its set activity.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from pourbaix.errors import ConditionsError, OptionError
from pourbaix.frames import Tabular
from pourbaix.solve.envelope import clip_halfplane

__all__ = [
    "DEFAULT_LEVELS",
    "SolubilityResult",
    "solubility",
    "solubility_curve",
    "solubility_minimum",
    "SolidOnset",
    "solid_onset",
    "missing_solid_note",
    "solubility_region",
    "solubility_lines",
    "polygon_parts",
    "check_basis",
    "check_level",
]

#: Iso-solubility levels drawn by default [mol/kg].
DEFAULT_LEVELS = (1e-2, 1e-4, 1e-6, 1e-8)

#: Default chord tolerance of traced iso-solubility curves, in window-normalised units
#: (1e-5 of the pH span and of the potential span).
DEFAULT_TOLERANCE = 1e-5

_BASES = ("total", "species")
_ALONG = {"oxygen": "O2/H2O line (1 bar O2)", "hydrogen": "H2O/H2 line (1 bar H2)"}


# ---------------------------------------------------------------------- model
@dataclass(frozen=True)
class _Model:
    """Planes and data of every species holding the element (internal)."""

    element: str
    names: tuple
    labels: tuple  # typeset (Unicode) labels
    x: np.ndarray  # atoms of the element per formula unit
    dissolved: np.ndarray  # bool
    solid: np.ndarray  # bool (solids and liquids)
    log_a_set: np.ndarray  # log10 activity inside each plane
    log_gamma: np.ndarray  # log10 molal activity coefficient (molality = a / γ)
    log_gamma_map: np.ndarray  # the map's own convention (1 when an activity was set)
    base: np.ndarray  # (N, 3) planes vs the map's reference, before ligand terms
    nu: np.ndarray  # (N, F) ligand units per atom of the element
    ligand_planes: tuple  # F arrays (K_f, 3)
    ligand_names: tuple  # F lists of names
    ligand_maps: tuple  # F DomainMaps
    k: float  # Nernst factor [V]
    window: tuple


def _get_map(dmap_or_element, conditions):
    from pourbaix.maps.domain_map import DomainMap, compute_map

    if isinstance(dmap_or_element, DomainMap):
        if conditions:
            raise OptionError(
                "conditions (" + ", ".join(sorted(conditions)) + ") are given with a computed map; "
                "pass either a map or an element with its conditions"
            )
        return dmap_or_element
    return compute_map(dmap_or_element, **conditions)


def _model(dmap):
    from pourbaix.maps.domain_map import species_id, species_label, to_frame

    c = dmap.conditions
    if len(c.elements) != 1 or c.ratio is not None:
        raise OptionError(
            f"solubility is computed for one element; the map is of {'-'.join(c.elements)} at a fixed ratio - "
            "compute a map of each metal on its own (ligands are allowed)"
        )
    el = c.elements[0]
    rows = [se for se in dmap.species if el in dict(se.species.composition)]
    if not rows:
        raise ConditionsError(f"the map holds no species of {el}")
    off0, off1 = c.reference_offset_v, c.reference_slope_v_per_ph
    base = np.array([to_frame(se.plane, off0, off1) for se in rows], dtype=float)
    x = np.array([dict(se.species.composition)[el] for se in rows], dtype=float)
    phase = np.array([se.species.phase for se in rows])
    dissolved = phase == "aq"
    solid = (phase == "s") | (phase == "l")
    if not dissolved.any():
        raise ConditionsError(
            f"the {el} map holds no dissolved species of {el}; there is no solubility to compute"
        )
    if not solid.any():
        raise ConditionsError(
            f"the {el} map holds no solid of {el}; solubility needs a solid to be in equilibrium with"
        )
    log_a = np.log10([se.activity for se in rows])
    log_g_map = np.log10([se.gamma for se in rows])
    log_g = log_g_map.copy()
    if c.ionic_strength and c.ionic_strength > 0 and c.activity_model:
        # the map's own activity coefficients, computed once with its conditions
        log_g = np.where(
            dissolved,
            [math.log10(c.activity_coefficient(se.species.charge)) for se in rows],
            0.0,
        )
    lig_planes = tuple(
        np.asarray(p, dtype=float) for p in (getattr(dmap, "_ligand_planes", None) or ())
    )
    if lig_planes:
        units = dmap.units
        names_ok = len(units) == len(rows) and all(
            tuple(u.names) in ((se.species.name,), (species_id(se.species),))
            for u, se in zip(units, rows, strict=False)
        )
        if not names_ok:
            raise ConditionsError(
                "this ligand map's candidates do not match its species list; cannot compute solubility"
            )
        nu = np.asarray(dmap._nu, dtype=float).reshape(len(rows), len(lig_planes))
        lig_names = tuple(list(n) for n in dmap._ligand_names)
        lig_maps = tuple(dmap.ligand_maps.values())
    else:
        nu = np.zeros((len(rows), 0))
        lig_names, lig_maps = (), ()
    return _Model(
        element=el,
        names=tuple(species_id(se.species) for se in rows),
        labels=tuple(species_label(se.species) for se in rows),
        x=x,
        dissolved=dissolved,
        solid=solid,
        log_a_set=log_a,
        log_gamma=log_g,
        log_gamma_map=log_g_map,
        base=base,
        nu=nu,
        ligand_planes=lig_planes,
        ligand_names=lig_names,
        ligand_maps=lig_maps,
        k=float(c.nernst_v),
        window=dmap.window,
    )


def _log10_sum(log_terms, axis=-1):
    """log10 Σ 10^t along an axis, without overflow (log-sum-exp)."""
    m = np.max(log_terms, axis=axis, keepdims=True)
    m = np.where(np.isfinite(m), m, 0.0)
    with np.errstate(over="ignore", under="ignore"):
        s = np.sum(10.0 ** (log_terms - m), axis=axis, keepdims=True)
    return np.squeeze(m + np.log10(s), axis=axis)


def _ligand_keys(model, x, y):
    keys = np.zeros((len(x), len(model.ligand_planes)), dtype=int)
    for f, L in enumerate(model.ligand_planes):
        vals = L[:, 0][None, :] + np.outer(x, L[:, 1]) + np.outer(y, L[:, 2])
        keys[:, f] = np.argmin(vals, axis=1)
    return keys


def _effective(model, keys):
    """Planes (M, N, 3) after the ligand term of the predominant ligand species (predominant-ligand method; Pourbaix 1974, ch. II)."""
    eff = np.broadcast_to(model.base, (len(keys), *model.base.shape)).copy()
    for f, L in enumerate(model.ligand_planes):
        eff -= model.nu[None, :, f, None] * L[keys[:, f]][:, None, :]
    return eff


def _coefficients(model, eff, s, basis):
    """Affine log10 terms of every dissolved species with solid ``s`` (planes ``eff`` (N, 3)).

    Returns (n_dissolved, 3): term_i = a0 + a1 pH + a2 E, where for ``total``
    term_i = log10(x_i a_i / γ_i) and for ``species`` term_i = log10(a_i / γ_map,i).
    """
    d = model.dissolved
    # log10 a_i = log10 a_set + x_i (psi_s - psi_i(a_set)) / k_T   (module docstring)
    A = model.x[d, None] * (eff[s][None, :] - eff[d]) / model.k
    A[:, 0] += model.log_a_set[d]
    if basis == "total":
        A[:, 0] += np.log10(model.x[d]) - model.log_gamma[d]
    else:
        A[:, 0] -= model.log_gamma_map[d]
    return A


# ---------------------------------------------------------------------- values
@dataclass(frozen=True)
class SolubilityResult(Tabular):
    """Solubility of an element at points.

    Attributes hold arrays shaped like the broadcast input (scalars for
    scalar input).

    Attributes
    ----------
    element : str
        The element.
    reference : str
        Reference electrode of ``potential_v``.
    ph : ndarray
        pH.
    potential_v : ndarray
        Potential [V vs ``reference``].
    total_molality : ndarray
        Total dissolved element, Σ x_i a_i / γ_i [mol/kg].
    log10_total : ndarray
        log10 of ``total_molality`` (finite even where the total overflows).
    solid : ndarray of str
        The least-soluble solid at the point, which sets the solubility.
    dominant : ndarray of str
        The dissolved species carrying most of the element.
    saturation_index : ndarray
        min_i log10(a_set / a_i): above 0 a solution holding the map's set
        activity is over-saturated (the map shows a solid there), below 0
        under-saturated (the map shows a dissolved species).
    saturation : ndarray of str
        ``over-saturated``, ``under-saturated`` or ``saturated`` (abs(index) < 1e-9).
    species : tuple of str
        The dissolved species, in the order of ``species_molality``'s last axis.
    species_labels : tuple of str
        Their typeset (Unicode) labels.
    species_molality : ndarray
        Molality of each dissolved species, shape (..., len(species)) [mol/kg].
    ligand : ndarray of str
        Predominant ligand species used (" + " joined; "" without ligands).
    activity_set : float or None
        The map's set activity of dissolved species [-].
    """

    element: str
    reference: str
    ph: object
    potential_v: object
    total_molality: object
    log10_total: object
    solid: object
    dominant: object
    saturation_index: object
    saturation: object
    species: tuple
    species_molality: object
    ligand: object
    activity_set: float | None = None
    species_labels: tuple = ()

    def rows(self):
        """One plain dict per point (JSON-ready), without the per-species molalities.

        Returns
        -------
        list of dict
        """
        n = np.size(self.ph)
        cols = {
            "ph": np.ravel(self.ph),
            f"potential_v_vs_{self.reference}": np.ravel(self.potential_v),
            "total_mol_kg": np.ravel(self.total_molality),
            "log10_total": np.ravel(self.log10_total),
            "solid": np.ravel(np.asarray(self.solid, dtype=object)),
            "dominant": np.ravel(np.asarray(self.dominant, dtype=object)),
            "saturation_index": np.ravel(self.saturation_index),
            "saturation": np.ravel(np.asarray(self.saturation, dtype=object)),
        }
        if any(np.ravel(np.asarray(self.ligand, dtype=object))):
            cols["ligand"] = np.ravel(np.asarray(self.ligand, dtype=object))
        out = []
        for k in range(n):
            row = {}
            for name, v in cols.items():
                val = v[k]
                if isinstance(val, np.generic):
                    val = val.item()
                if isinstance(val, float) and not math.isfinite(val):
                    val = None
                row[name] = val
            out.append(row)
        return out


def _evaluate(model, dmap, ph, potential_v):
    ph_a, e_a = np.broadcast_arrays(
        np.asarray(ph, dtype=float), np.asarray(potential_v, dtype=float)
    )
    scalar = ph_a.ndim == 0
    x, y = ph_a.ravel(), e_a.ravel()
    if not (np.all(np.isfinite(x)) and np.all(np.isfinite(y))):
        raise ConditionsError("solubility: pH and potential must be finite numbers")
    keys = _ligand_keys(model, x, y)
    eff = _effective(model, keys)  # (M, N, 3)
    psi = eff[:, :, 0] + eff[:, :, 1] * x[:, None] + eff[:, :, 2] * y[:, None]
    sol_idx = np.flatnonzero(model.solid)
    s_local = np.argmin(psi[:, sol_idx], axis=1)
    s = sol_idx[s_local]
    rows = np.arange(len(x))
    psi_s = psi[rows, s]
    d = model.dissolved
    xd = model.x[d]
    # log10 a_i = log10 a_set + x_i (psi_s - psi_i(a_set)) / k_T   (module docstring)
    log_a = model.log_a_set[d][None, :] + xd[None, :] * (psi_s[:, None] - psi[:, d]) / model.k
    log_m = (
        log_a - model.log_gamma[d][None, :]
    )  # m = a / γ (molal activity coefficient, IUPAC definition)
    log_total = _log10_sum(
        log_m + np.log10(xd)[None, :]
    )  # S = Σ x_i m_i (mass balance on the element)
    with np.errstate(over="ignore"):
        total = 10.0**log_total
        species_m = 10.0**log_m
    dom = np.argmax(log_m + np.log10(xd)[None, :], axis=1)
    # saturation index log10(a_set / a_i) = x_i (psi_i - psi_s) / k_T (from the equilibrium relation above);
    # the least under-saturated species decides, as on the map
    si = np.min(xd[None, :] * (psi[:, d] - psi_s[:, None]) / model.k, axis=1)
    sat = np.where(
        si > 1e-9, "over-saturated", np.where(si < -1e-9, "under-saturated", "saturated")
    ).astype(object)
    names = np.array(model.names, dtype=object)
    dnames = tuple(str(n) for n, keep in zip(model.names, d, strict=True) if keep)
    if model.ligand_planes:
        lig = np.array(
            [" + ".join(model.ligand_names[f][k] for f, k in enumerate(row)) for row in keys],
            dtype=object,
        )
    else:
        lig = np.full(len(x), "", dtype=object)
    out = dict(
        ph=x,
        potential_v=y,
        total_molality=total,
        log10_total=log_total,
        solid=names[s],
        dominant=np.array(dnames, dtype=object)[dom],
        saturation_index=si,
        saturation=sat,
        ligand=lig,
    )
    shape = ph_a.shape
    for key, v in out.items():
        out[key] = v.reshape(shape) if not scalar else (v[0].item() if v.dtype != object else v[0])
    spm = species_m.reshape((*shape, len(dnames))) if not scalar else species_m[0]
    c = dmap.conditions
    return SolubilityResult(
        element=model.element,
        reference=c.reference,
        species=dnames,
        species_molality=spm,
        activity_set=c.activity,
        species_labels=tuple(lab for lab, keep in zip(model.labels, d, strict=True) if keep),
        **out,
    )


def solubility(dmap_or_element, ph, potential_v, **conditions):
    """Total dissolved element in equilibrium with its least-soluble solid.

    Parameters
    ----------
    dmap_or_element : DomainMap or str
        A computed single-element map (ligands allowed), or an element symbol
        whose map is computed with ``conditions``.
    ph : float or array_like
        pH [-].
    potential_v : float or array_like
        Potential [V vs the map's reference].
    **conditions
        Keyword arguments of :func:`pourbaix.maps.domain_map.compute_map` when an
        element is given (temperature_c, ligands, reference, ionic_strength ...).

    Returns
    -------
    SolubilityResult
        Scalars for scalar input, arrays otherwise.

    Raises
    ------
    OptionError
        For a several-metal map, or conditions given with a computed map.
    ConditionsError
        For non-finite points, or a system without a dissolved species or a solid.

    Notes
    -----
    Per atom of the element, equilibrium between dissolved species i and the
    solid s gives log10 a_i = log10 a_set + x_i (psi_s - psi_i) / k_T with the
    planes at the map's set activity a_set (Nernst / mass action; Pourbaix
    1974, ch. II). The total is Σ x_i a_i / γ_i [mol/kg], with γ_i from the
    map's activity model at its ionic strength (1 at zero ionic strength).
    Exact at every point, inside or beyond the map's window; values far above
    1 mol/kg only say that no solid can form there. In a ligand map the ligand
    is taken at its predominant species and total activity (no mass balance
    on the ligand, as in the map).

    Examples
    --------
    >>> r = solubility("Zn", 9.5, 0.0)
    >>> r.solid, r.dominant
    ('ZnO', 'Zn(OH)2(aq)')
    >>> round(float(r.log10_total), 2)
    -6.53
    """
    dmap = _get_map(dmap_or_element, conditions)
    return _evaluate(_model(dmap), dmap, ph, potential_v)


def _along_line(dmap, ph, potential_v, along):
    ph = np.asarray(ph, dtype=float)
    if along is None:
        if potential_v is None:
            raise OptionError(
                "solubility curve: give a potential, or along='oxygen' or 'hydrogen' (a water line)"
            )
        return ph, np.broadcast_to(np.asarray(potential_v, dtype=float), ph.shape)
    if potential_v is not None:
        raise OptionError(
            "solubility curve: give either a fixed potential or a water line to follow, not both"
        )
    if along not in _ALONG:
        raise OptionError(
            f"solubility curve: along={along!r} is not known; use one of {', '.join(_ALONG)} or None"
        )
    e0, slope = dmap.water[along]
    return ph, e0 + slope * ph


def solubility_curve(dmap, ph, potential_v=None, along=None):
    """Solubility along pH at a fixed potential, or along a water line.

    Parameters
    ----------
    dmap : DomainMap
        A single-element map (ligands allowed).
    ph : array_like
        pH values [-].
    potential_v : float, optional
        Fixed potential [V vs the map's reference].
    along : {"oxygen", "hydrogen"}, optional
        Follow the O2/H2O or the H2O/H2 line (1 bar gas) instead.

    Returns
    -------
    SolubilityResult

    Raises
    ------
    OptionError
        If neither or both of ``potential_v`` and ``along`` are given, or
        ``along`` is unknown.

    Examples
    --------
    >>> from pourbaix.maps.domain_map import compute_map
    >>> r = solubility_curve(compute_map("Zn"), [6.0, 9.5, 13.0], potential_v=0.0)
    >>> [round(float(v), 1) for v in r.log10_total]
    [-0.9, -6.5, -3.2]
    """
    x, y = _along_line(dmap, ph, potential_v, along)
    return _evaluate(_model(dmap), dmap, x, y)


def solubility_minimum(dmap, potential_v=None, along=None, ph_range=None):
    """PH of the lowest total solubility at a fixed potential (or along a water line).

    Parameters
    ----------
    dmap : DomainMap
        A single-element map.
    potential_v : float, optional
        Fixed potential [V vs the map's reference].
    along : {"oxygen", "hydrogen"}, optional
        Follow a water line instead.
    ph_range : (float, float), optional
        pH interval searched; default the map's pH window.

    Returns
    -------
    (float, SolubilityResult)
        The pH of the minimum and the solubility there.

    Notes
    -----
    log S is piecewise convex in pH (a log-sum-exp of affine terms between
    changes of solid or ligand species), so the minimum is bracketed on a
    2001-point scan and refined by bounded Brent minimisation to 1e-9 pH.

    Examples
    --------
    >>> from pourbaix.maps.domain_map import compute_map
    >>> ph, r = solubility_minimum(compute_map("Zn"), potential_v=0.0)
    >>> round(ph, 1), r.solid
    (9.6, 'ZnO')
    """
    from scipy.optimize import minimize_scalar

    lo, hi = (
        dmap.conditions.ph_range if ph_range is None else (float(ph_range[0]), float(ph_range[1]))
    )
    if not (math.isfinite(lo) and math.isfinite(hi) and hi > lo):
        raise ConditionsError(f"ph_range must be two finite numbers LO < HI, got {ph_range!r}")
    model = _model(dmap)
    grid = np.linspace(lo, hi, 2001)
    x, y = _along_line(dmap, grid, potential_v, along)
    vals = _evaluate(model, dmap, x, y).log10_total
    k = int(np.argmin(vals))
    a, b = grid[max(k - 1, 0)], grid[min(k + 1, len(grid) - 1)]

    def f(p):
        px, py = _along_line(dmap, np.array([p]), potential_v, along)
        return float(_evaluate(model, dmap, px, py).log10_total[0])

    best = grid[k]
    if b > a:
        res = minimize_scalar(f, bounds=(a, b), method="bounded", options={"xatol": 1e-9})
        if res.fun <= vals[k]:
            best = float(res.x)
    px, py = _along_line(dmap, np.array(best), potential_v, along)
    return float(best), _evaluate(model, dmap, px, py)


@dataclass(frozen=True)
class SolidOnset:
    """The lowest dissolved activity at which a solid compound of the element shows on the map.

    Attributes
    ----------
    solid : str
        Species id of the compound (oxide, hydroxide, sulfide ...).
    activity : float
        Set activity of each dissolved species at which its field appears
        (a molality when the map was set by molality) [-].
    ph : float
        A pH where it appears first [pH].
    potential_v : float
        Potential there [V vs the map's reference].
    ph_range : tuple of float
        The pH span of the grid points within 0.01 log units of the first
        appearance (the index is often flat over a band of pH) [pH].
    dominant : str
        The dissolved species it is in equilibrium with there.
    activity_set : float
        The map's own set activity (or molality) [-].
    """

    solid: str
    activity: float
    ph: float
    potential_v: float
    dominant: str
    activity_set: float
    ph_range: tuple = ()

    @property
    def shown(self):
        """True when the compound already has a field on the map."""
        return self.activity <= self.activity_set


def solid_onset(dmap, n_ph=241, n_potential=201):
    """Where and from which set activity a solid compound of the element would first show.

    On a map a solid s has a field where it lies below every dissolved plane,
    i.e. where its saturation index (the least of log10(a_set / a_i) over the
    dissolved species i in equilibrium with s) is >= 0. Raising every set
    activity by a factor f raises that index by log10 f (module docstring), so
    the compound with the largest index anywhere, index SI_max, shows from
    ``a_set * 10**(-SI_max)``. Only points where a compound (not the element
    itself) is the least-soluble solid count: where the metal is lower, no
    activity makes the compound stable.

    Parameters
    ----------
    dmap : DomainMap
        A single-element map (ligands allowed).
    n_ph, n_potential : int
        Points of the search grid over the map's window; the index is linear
        between changes of solid and dissolved species, so the grid maximum is
        within a grid step of the true one.

    Returns
    -------
    SolidOnset or None
        None when no solid compound is the least-soluble solid anywhere in
        the window (or the element has no solid compound).

    Examples
    --------
    >>> from pourbaix.maps.domain_map import compute_map
    >>> onset = solid_onset(compute_map("Zn", activity=1e-7))
    >>> onset.solid, onset.shown, f"{onset.activity:.1e}"
    ('ZnO', False, '2.0e-07')
    """
    model = _model(dmap)
    el = model.element
    rows = [se for se in dmap.species if el in dict(se.species.composition)]
    # the element itself (Zn, Hg(l) ...): a pure-element solid or liquid, no charge
    metal = model.solid & np.array(
        [set(dict(se.species.composition)) == {el} and se.species.charge == 0 for se in rows]
    )
    if not (model.solid & ~metal).any():
        return None
    x0, x1, y0, y1 = dmap.window
    ph, e = np.meshgrid(np.linspace(x0, x1, n_ph), np.linspace(y0, y1, n_potential))
    r = _evaluate(model, dmap, ph.ravel(), e.ravel())
    metal_names = {n for n, m in zip(model.names, metal, strict=True) if m}
    compound = np.array([s not in metal_names for s in r.solid])
    if not compound.any():
        return None
    si = np.where(compound, r.saturation_index, -np.inf)
    k = int(np.argmax(si))
    a_set = (
        dmap.conditions.molality
        if dmap.conditions.molality is not None
        else dmap.conditions.activity
    )
    near = (si >= si[k] - 0.01) & (r.solid == r.solid[k])
    return SolidOnset(
        solid=str(r.solid[k]),
        activity=float(a_set * 10.0 ** (-si[k])),
        ph=float(r.ph[k]),
        potential_v=float(r.potential_v[k]),
        dominant=str(r.dominant[k]),
        activity_set=float(a_set),
        ph_range=(float(r.ph[near].min()), float(r.ph[near].max())),
    )


def missing_solid_note(dmap):
    """A sentence for a one-element map that shows no solid compound: which would show first, from what.

    Parameters
    ----------
    dmap : DomainMap
        The map.

    Returns
    -------
    str or None
        None when the map shows a solid compound, is not a one-element map,
        or has no solid compound of the element to speak of.

    Examples
    --------
    >>> from pourbaix.maps.domain_map import compute_map
    >>> print(missing_solid_note(compute_map("Zn", activity=1e-7)))  # doctest: +ELLIPSIS
    no solid compound of Zn is stable on this map at activity 1e-07; the first to show would be ZnO ...
    """
    c = dmap.conditions
    if (
        len(c.elements) != 1
        or c.ratio is not None
        or any(d.state == "passivation" for d in dmap.domains)
    ):
        return None
    try:
        onset = solid_onset(dmap)
    except (ConditionsError, OptionError):  # no solid or no dissolved species of the element
        return None
    if onset is None or onset.shown:
        return None
    el = c.elements[0]
    what = "molality" if c.molality is not None else "activity"
    lo, hi = onset.ph_range
    return (
        f"no solid compound of {el} is stable on this map at {what} {onset.activity_set:.3g}; "
        f"the first to show would be {onset.solid} (against {onset.dominant}) from "
        f"{'a' if what == 'molality' else 'an'} {what} of about {onset.activity:.2g}, "
        f"between pH {lo:.1f} and {hi:.1f} (see `pourbaix solubility {el}`)"
    )


# ---------------------------------------------------------------------- geometry
@dataclass(frozen=True)
class _Piece:
    """A convex part of the window with one least-soluble solid and fixed ligand species."""

    vertices: np.ndarray  # (k, 2) counter-clockwise
    planes: np.ndarray  # (N, 3) effective planes
    solid: int  # index into the model's species


def polygon_parts(geom):
    """The polygon parts of a shapely geometry (empty list for None or empty)."""
    if geom is None or geom.is_empty:
        return []
    if geom.geom_type == "Polygon":
        return [geom]
    out = []
    for g in getattr(geom, "geoms", ()):
        out += polygon_parts(g)
    return out


def _ccw(coords):
    v = np.asarray(coords, dtype=float)
    if len(v) > 1 and np.allclose(v[0], v[-1]):
        v = v[:-1]
    area = 0.5 * (np.dot(v[:, 0], np.roll(v[:, 1], -1)) - np.dot(v[:, 1], np.roll(v[:, 0], -1)))
    return v if area >= 0 else v[::-1]


def _pieces(model):
    """Split the window into convex pieces with one solid and one set of ligand species."""
    import shapely
    from shapely.geometry import Polygon, box

    from pourbaix.solve import envelope as solve

    x0, x1, y0, y1 = model.window
    area_tol = 1e-12 * (x1 - x0) * (y1 - y0)
    regions = [((), box(x0, y0, x1, y1))]
    for lm in model.ligand_maps:
        new = []
        for key, geom in regions:
            for d in lm.domains:
                if not geom.intersects(d.polygon):
                    continue
                for part in polygon_parts(shapely.intersection(geom, d.polygon)):
                    if part.area > area_tol:
                        new.append(((*key, d.entry), part))
        regions = new
    sol_idx = np.flatnonzero(model.solid)
    out = []
    for key, geom in regions:
        eff = model.base.copy()
        for f, k in enumerate(key):
            eff -= model.nu[:, f, None] * model.ligand_planes[f][k][None, :]
        bx0, by0, bx1, by1 = geom.bounds
        env = solve.lower_envelope(eff[sol_idx], (bx0, bx1, by0, by1))
        for j, poly in enumerate(env.polygons):
            if poly is None:
                continue
            parts = (
                [Polygon(poly)]
                if not key
                else polygon_parts(shapely.intersection(Polygon(poly), geom))
            )
            for part in parts:
                if part.area > area_tol:
                    out.append(_Piece(_ccw(part.exterior.coords), eff, int(sol_idx[j])))
    return out


def _g(A, pts):
    pts = np.atleast_2d(pts)
    return _log10_sum(A[None, :, 0] + pts[:, :1] * A[None, :, 1] + pts[:, 1:2] * A[None, :, 2])


def _grad(A, pts):
    pts = np.atleast_2d(pts)
    t = A[None, :, 0] + pts[:, :1] * A[None, :, 1] + pts[:, 1:2] * A[None, :, 2]
    w = 10.0 ** (t - t.max(axis=1, keepdims=True))
    w /= w.sum(axis=1, keepdims=True)
    return w @ A[:, 1:]  # (m, 2): softmax-weighted slopes of the log-sum-exp


def _interior_point(P, A, L):
    """A point strictly inside the convex polygon P where g < L, or None if there is none."""
    from scipy.optimize import linprog, minimize

    cen = P.mean(axis=0)
    cands = [cen]
    gv = _g(A, P)
    for v in P[gv < L]:
        cands += [v + s * (cen - v) for s in (1e-2, 1e-5, 1e-8)]
    cands = np.array(cands)
    ok = np.flatnonzero(_g(A, cands) < L)
    if ok.size:
        return cands[ok[0]]
    # the max of the affine terms bounds g from below: min over P of the max by linear programming
    n = len(P)
    N = np.column_stack(
        [np.roll(P[:, 1], -1) - P[:, 1], -(np.roll(P[:, 0], -1) - P[:, 0])]
    )  # outward normals
    b = np.einsum("ij,ij->i", N, P)
    A_ub = np.vstack(
        [np.column_stack([A[:, 1], A[:, 2], -np.ones(len(A))]), np.column_stack([N, np.zeros(n)])]
    )
    b_ub = np.concatenate([-A[:, 0], b])
    res = linprog([0, 0, 1], A_ub=A_ub, b_ub=b_ub, bounds=[(None, None)] * 3, method="highs")
    if not res.success or res.x[2] >= L:
        return None  # g >= max_i term_i >= L everywhere on P
    p0 = res.x[:2]
    cons = [{"type": "ineq", "fun": lambda p, N=N, b=b: b - N @ p}]
    opt = minimize(lambda p: float(_g(A, p)[0]), p0, method="SLSQP", constraints=cons)
    for p in (opt.x, p0):
        for s in (1e-3, 1e-6, 1e-9):
            q = p + s * (cen - p)
            if _g(A, q)[0] < L and np.all(N @ q < b):
                return q
    return None


def _edge_crossings(P, A, L):
    """Points on P's edges where g = L exactly (g is convex along each edge: 0, 1 or 2 roots)."""
    from scipy.optimize import brentq, minimize_scalar

    out = []
    n = len(P)
    for k in range(n):
        a, b = P[k], P[(k + 1) % n]

        def h(s, a=a, b=b):
            return float(_g(A, a + s * (b - a))[0]) - L

        ha, hb = h(0.0), h(1.0)
        if (ha < 0) != (hb < 0):
            s = brentq(h, 0.0, 1.0, xtol=1e-15)
            out.append(a + s * (b - a))
        elif ha > 0 and hb > 0:
            res = minimize_scalar(h, bounds=(0.0, 1.0), method="bounded", options={"xatol": 1e-12})
            if res.fun < 0:
                for lo, hi in ((0.0, res.x), (res.x, 1.0)):
                    s = brentq(h, lo, hi, xtol=1e-15)
                    out.append(a + s * (b - a))
    return out


def _trace(P, A, L, scale, tol):
    """The convex set {g <= L} ∩ P, traced: inner (chord) and outer (tangent) polygons.

    g(p) = log10 Σ_i 10^(A_i0 + A_i1 pH + A_i2 E) is convex (log-sum-exp of
    affine functions; Boyd & Vandenberghe 2004, §3.1.5), so its sublevel set
    inside the convex piece P is convex. Boundary points are found exactly on
    rays from an interior point (bisection to machine precision); consecutive
    points are refined until the chord is within ``tol`` (window-normalised)
    of the curve. The chord polygon lies inside the set, and the polygon of
    tangent-line intersections outside it (a convex set lies on one side of
    each tangent), so both are returned.
    """
    gv = _g(A, P)
    if np.all(gv <= L):
        return P, P
    c = _interior_point(P, A, L)
    if c is None:
        return None, None
    sx, sy = scale
    N = np.column_stack([np.roll(P[:, 1], -1) - P[:, 1], -(np.roll(P[:, 0], -1) - P[:, 0])])
    b = np.einsum("ij,ij->i", N, P)
    room = b - N @ c  # > 0 for an interior point

    def cast(theta):
        d = np.column_stack([sx * np.cos(theta), sy * np.sin(theta)])
        nd = d @ N.T
        with np.errstate(divide="ignore"):
            t_edge = np.min(
                np.where(nd > 0, room[None, :] / np.where(nd > 0, nd, 1.0), np.inf), axis=1
            )
        inside = _g(A, c + t_edge[:, None] * d) <= L
        lo = np.zeros_like(t_edge)
        hi = t_edge.copy()
        for _ in range(64):  # bisection: g is convex along the ray with g(c) < L
            mid = 0.5 * (lo + hi)
            below = _g(A, c + mid[:, None] * d) <= L
            lo = np.where(below, mid, lo)
            hi = np.where(below, hi, mid)
        t = np.where(inside, t_edge, 0.5 * (lo + hi))
        return c + t[:, None] * d

    def angle(pts):
        return np.arctan2((pts[:, 1] - c[1]) / sy, (pts[:, 0] - c[0]) / sx)

    # rays through the piece's vertices, the exact edge crossings, and a uniform fan
    crossings = np.array(_edge_crossings(P, A, L)).reshape(-1, 2)
    th_vert = angle(P)
    th_uniform = np.linspace(-np.pi, np.pi, 64, endpoint=False)
    pts = np.vstack([cast(th_vert), crossings, cast(th_uniform)])
    th = np.concatenate([th_vert, angle(crossings), th_uniform])
    for _ in range(30):
        order = np.argsort(th)
        th, pts = th[order], pts[order]
        nxt = np.roll(np.arange(len(th)), -1)
        th_next = th[nxt] + np.where(nxt == 0, 2 * np.pi, 0.0)
        gap = th_next - th
        cand = gap > 1e-12
        if not cand.any():
            break
        mids = 0.5 * (th + th_next)
        mid_pts = cast(mids[cand])
        p0 = pts[cand] / (sx, sy)
        p1 = pts[nxt][cand] / (sx, sy)
        pm = mid_pts / (sx, sy)
        chord = p1 - p0
        length = np.hypot(chord[:, 0], chord[:, 1])
        cross = np.abs(chord[:, 0] * (pm[:, 1] - p0[:, 1]) - chord[:, 1] * (pm[:, 0] - p0[:, 0]))
        sag = np.where(
            length > 0, cross / np.where(length > 0, length, 1.0), np.hypot(*(pm - p0).T)
        )
        add = sag > tol
        if not add.any():
            break
        th = np.concatenate([th, np.mod(mids[cand][add] + np.pi, 2 * np.pi) - np.pi])
        pts = np.vstack([pts, mid_pts[add]])
    order = np.argsort(th)
    inner = pts[order]
    # drop repeated points (a vertex hit twice)
    keep = np.ones(len(inner), dtype=bool)
    keep[1:] = np.hypot(*((inner[1:] - inner[:-1]) / (sx, sy)).T) > 1e-13
    inner = inner[keep]
    outer = _outer(inner, A, L, P, scale)
    return inner, outer


def _outer(inner, A, L, P, scale):
    """Polygon through the inner points and the intersections of consecutive tangents."""
    sx, sy = scale
    gv = _g(A, inner)
    on = np.abs(gv - L) <= 1e-9
    grad = _grad(A, inner)
    out = []
    n = len(inner)
    for k in range(n):
        p = inner[k]
        out.append(p)
        q = inner[(k + 1) % n]
        if not (on[k] and on[(k + 1) % n]):
            continue
        g1, g2 = grad[k], grad[(k + 1) % n]
        det = g1[0] * g2[1] - g1[1] * g2[0]
        if abs(det) < 1e-14 * (np.hypot(*g1) * np.hypot(*g2)):
            continue
        r1, r2 = g1 @ p, g2 @ q
        v = np.array([(r1 * g2[1] - r2 * g1[1]) / det, (g1[0] * r2 - g2[0] * r1) / det])
        chord = np.hypot(*((q - p) / (sx, sy)))
        mid = 0.5 * (p + q)
        if np.hypot(*((v - mid) / (sx, sy))) > 2.0 * chord + 1e-12:
            continue  # tangents meet far away: the arc is straight there
        out.append(v)
    poly = np.array(out)
    # keep inside P (a tangent vertex next to an edge may poke out)
    N = np.column_stack([np.roll(P[:, 1], -1) - P[:, 1], -(np.roll(P[:, 0], -1) - P[:, 0])])
    b = np.einsum("ij,ij->i", N, P)
    for nrm, rhs in zip(N, b, strict=True):
        poly = clip_halfplane(poly, np.array([-rhs, nrm[0], nrm[1]]))
        if poly is None:
            return None
    return poly


def check_basis(basis):
    """Return ``basis`` if it is a known solubility basis; raise OptionError listing the valid ones."""
    if basis not in _BASES:
        raise OptionError(
            f"basis {basis!r} is not known; use 'total' (sum over dissolved species) or 'species' (each species on its own)"
        )


def check_level(level, what="level"):
    """Return a solubility level as a positive finite float [mol/kg]; raise ConditionsError otherwise."""
    try:
        v = float(level)
    except (TypeError, ValueError):
        raise ConditionsError(f"{what} must be a positive number [mol/kg], got {level!r}") from None
    if not (math.isfinite(v) and v > 0):
        raise ConditionsError(f"{what} must be a positive number [mol/kg], got {level!r}")
    return v


def _cells(model, level, basis, tolerance):
    """For each piece: (P, inner, outer) of the set where the solubility is at most ``level``."""
    L = math.log10(level)
    x0, x1, y0, y1 = model.window
    scale = (x1 - x0, y1 - y0)
    out = []
    for piece in _pieces(model):
        A = _coefficients(model, piece.planes, piece.solid, basis)
        P = piece.vertices
        if basis == "species":
            C = P
            for row in A:  # a_i / γ_i <= level for every dissolved species: half-planes
                C = clip_halfplane(C, np.array([row[0] - L, row[1], row[2]]))
                if C is None:
                    break
            out.append((P, C, C, A))
        else:
            inner, outer = _trace(P, A, L, scale, tolerance)
            out.append((P, inner, outer, A))
    return out


def _union(polys):
    import shapely

    polys = [p for p in polys if p is not None and not p.is_empty]
    if not polys:
        return shapely.Polygon()
    return shapely.union_all(polys, grid_size=1e-10)


def solubility_region(dmap, level, *, side="above", basis="total", tolerance=DEFAULT_TOLERANCE):
    """Region of the map's window where the solubility is above (or below) a level.

    Parameters
    ----------
    dmap : DomainMap
        A single-element map (ligands allowed).
    level : float
        Solubility level [mol/kg].
    side : {"above", "below"}
        ``above``: solubility >= level (the element dissolves at least that
        much); ``below``: solubility <= level (the solid holds it below that).
    basis : {"total", "species"}
        ``total``: the sum over dissolved species, Σ x_i m_i; ``species``:
        each dissolved species on its own (the map's own convention, so the
        region at the map's activity is exactly its dissolved / solid domains).
    tolerance : float
        Largest gap between a traced curve and its chords, in units of the
        window's pH span and potential span (``total`` basis only) [-].

    Returns
    -------
    shapely.Geometry
        Polygon or MultiPolygon in (pH, E vs the map's reference) [-, V].

    Raises
    ------
    OptionError
        For an unknown side or basis.
    ConditionsError
        For a level that is not a positive number.

    Notes
    -----
    ``species``: within each piece of fixed least-soluble solid, each
    log10(a_i / γ_i) is affine in (pH, E), so the region is an exact union of
    half-plane intersections. ``total``: log10 Σ x_i m_i is a log-sum-exp of
    affine terms, convex in each piece, and its level line is curved; it is
    traced with points lying exactly on the curve. The region returned is on
    the safe side: ``below`` uses the chord polygons (inside the true set),
    ``above`` removes the tangent polygons (which contain the true set), so
    every point returned satisfies the inequality; the region misses at most
    a strip ``tolerance`` wide along the curve.

    Examples
    --------
    >>> from pourbaix.maps.domain_map import compute_map
    >>> r = solubility_region(compute_map("Zn"), 1e-5, side="below")
    >>> r.contains(__import__("shapely").Point(9.5, 0.0))
    True
    """
    from shapely.geometry import Polygon

    if side not in ("above", "below"):
        raise OptionError(f"side {side!r} is not known; use 'above' or 'below'")
    check_basis(basis)
    level = check_level(level)
    model = _model(dmap)
    parts = []
    for P, inner, outer, _ in _cells(model, level, basis, float(tolerance)):
        if side == "below":
            if inner is not None:
                parts.append(Polygon(inner).buffer(0))
        else:
            PP = Polygon(P)
            parts.append(
                PP if outer is None else PP.difference(Polygon(outer).buffer(0), grid_size=1e-10)
            )
    return _union(parts)


def solubility_lines(dmap, levels=DEFAULT_LEVELS, *, basis="total", tolerance=DEFAULT_TOLERANCE):
    """Iso-solubility lines at chosen levels.

    Parameters
    ----------
    dmap : DomainMap
        A single-element map (ligands allowed).
    levels : sequence of float
        Solubility levels [mol/kg].
    basis : {"total", "species"}
        As for :func:`solubility_region`.
    tolerance : float
        Chord tolerance of traced curves (window-normalised) [-].

    Returns
    -------
    dict
        level -> list of (k, 2) arrays of (pH, E vs the map's reference)
        polylines [-, V].

    Notes
    -----
    Every vertex of a ``total`` line lies exactly on the level curve
    (bisection to machine precision); between vertices the chords stay within
    ``tolerance``. ``species`` lines are exact straight segments. See
    :func:`solubility_region`.

    Examples
    --------
    >>> from pourbaix.maps.domain_map import compute_map
    >>> lines = solubility_lines(compute_map("Zn"), [1e-6])
    >>> len(lines[1e-6]) >= 1
    True
    """
    import shapely
    from shapely.geometry import LineString, Polygon

    check_basis(basis)
    model = _model(dmap)
    x0, x1, y0, y1 = model.window
    scale = np.array([x1 - x0, y1 - y0])
    out = {}
    for level in levels:
        lv = check_level(level)
        segs = []
        for P, inner, _outer, _A in _cells(model, lv, basis, float(tolerance)):
            if inner is None:
                continue
            ring = Polygon(P).exterior
            n = len(inner)
            for k in range(n):
                p, q = inner[k], inner[(k + 1) % n]
                if np.hypot(*((q - p) / scale)) < 1e-12:
                    continue
                mid = 0.5 * (p + q)
                if ring.distance(shapely.Point(mid)) <= 1e-9 * float(np.hypot(*scale)):
                    continue  # an edge of the piece, not of the level set
                segs.append(LineString([p, q]))
        if not segs:
            out[level] = []
            continue
        # pieces meet on shared edges: snap to a 1e-9 grid so their crossings join
        merged = shapely.line_merge(shapely.set_precision(shapely.MultiLineString(segs), 1e-9))
        parts = list(merged.geoms) if hasattr(merged, "geoms") else [merged]
        out[level] = [np.asarray(g.coords) for g in parts]
    return out


# old private names, kept one release for code not yet moved to the public ones
_polygon_parts = polygon_parts
_check_basis = check_basis
_check_level = check_level
