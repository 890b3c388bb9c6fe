"""Ligand systems (predominant-ligand method) and several metals at a fixed ratio.

Two extensions of the single-element map (Pourbaix 1974, ch. II; Dantzig 1963, ch. 3):

* **Ligands.** Sulfur, carbonate, chloride, ammonia and cyanide have their own
  speciation over pH and potential. The ligand's own map is computed first at
  its total activity; inside each of its domains the metal-ligand species are
  formed from the ligand species that predominates there, so the metal map is
  solved once per ligand domain, clipped to it and the pieces are labelled by
  their assemblage (metal species + predominant ligand species). This is the
  predominant-ligand approximation: no mass balance on the ligand (it is taken
  in excess, its activity is not lowered by complexation or precipitation).
  Pourbaix 1974, ch. II and the S, C, Cl, N sections; Garrels & Christ 1965,
  ch. 7.
* **Several metals at a fixed ratio.** At each point the stable assemblage is
  the cheapest combination of species whose metal content matches the ratio,
  the linear programme ``min Σ n_s Φ_s(pH, E)`` subject to ``A n = r``,
  ``n >= 0``. Its optimal bases hold at most k species for k metals (Dantzig
  1963, basic feasible solutions), so every basis with positive amounts is
  enumerated once as a combination entry whose plane is ``Σ n_s Φ_s`` per mole
  of metal, and the lower envelope of those planes (Qhull) gives the exact
  domains.

Both may be combined (an alloy in a sulfidic water): the combination entries
carry the ligand units they hold and are treated like single species.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass, field, replace

import numpy as np

from pourbaix.conditions import Conditions, make_conditions
from pourbaix.constants import F_KJ
from pourbaix.errors import ConditionsError, OptionError, UnknownSpeciesError
from pourbaix.maps.build import (
    build_map,
    dissolved_activity,
    route_warnings,
    to_frame,
)
from pourbaix.maps.result import (
    Boundary,
    Domain,
    DomainMap,
    Entry,
    ProbeResult,
    species_id,
    species_label,
    state_of,
)
from pourbaix.physics import energies, thermo
from pourbaix.solve import envelope as solve
from pourbaix.solve import parametric_lp
from pourbaix.tables.ligands import LIGAND_ALIASES, LIGANDS, LigandFamily, resolve_ligand

__all__ = [
    "forms_slowly",
    "slow_ligand_species",
    "LigandFamily",
    "LIGANDS",
    "LIGAND_ALIASES",
    "SystemMap",
    "resolve_ligand",
    "ratio_combinations",
    "compute_ligand_map",
    "compute_system_map",
    "units_at_ratio",
]

_FARADAY_KJ = F_KJ  # kJ/(mol V)
# Snap rounding grid for the polygon overlay [pH units and V]; far below any
# meaningful difference, far above double-precision noise.
_GRID = 1e-9
# Pieces smaller than this fraction of the window area are rounding slivers.
_SLIVER = 1e-12


def _unit_matrix(families):
    """Ligand elements and the (elements x families) unit matrix; checks the units are independent."""
    els = sorted({el for f, _ in families for el in f.elements})
    U = np.zeros((len(els), len(families)))
    for j, (f, _) in enumerate(families):
        for el, n in f.unit:
            U[els.index(el), j] = n
    if families and np.linalg.matrix_rank(U) < len(families):
        names = " + ".join(f.name for f, _ in families)
        raise OptionError(
            f"the ligands {names} share elements in a way that does not say which ligand a species "
            f"carries; use at most two of C, NH3, CN together"
        )
    return els, U


# ------------------------------------------------------------------ energies
def _g_per_atom(table, element, temperature_c, pressure_bar=1.0, water=None):
    """Apparent Gibbs energy of an element's reference state per atom at (T, P) [kJ/mol]."""
    ref = energies.reference_species(table, element)
    n = dict(ref.composition)[element]
    if temperature_c == 25.0 and pressure_bar == 1.0:
        return ref.dgf_kj_mol / n
    res = thermo.species_gibbs(ref, temperature_c, pressure_bar, water=water)
    return float(res.dg_kj_mol) / n


def _formation_plane(se, element, ctx, g_atom):
    """Plane per atom of ``element`` formed from *every* element's reference state.

    ``energies.species_energy`` forms the species from ``element``, H2O, H+ and
    e- and leaves other atoms (ligand elements, other metals) in the plane; this
    removes their element-reference terms (zero at 25 °C), so planes of the
    metal species and of the ligand species stand on the same zero.
    """
    comp = dict(se.species.composition)
    x = comp[element]
    shift = 0.0
    for el, n in comp.items():
        if el in ("H", "O"):
            continue
        if el == element and el in ctx.element_g_kj:
            continue  # already in species_energy's dG_r
        shift += n * g_atom[el]
    c0, cph, ce = se.plane
    return (c0 - shift / _FARADAY_KJ / x, cph, ce)


def forms_slowly(species):
    """Whether the data name a species as not forming on a practical time scale.

    Such species (perchlorate: its row's note reads "kinetically inert") are
    thermodynamically stable in part of the window but are not made from
    chloride at ordinary conditions in any practical time (common practice;
    Pourbaix 1974, chlorine, notes the same), so ligand maps leave them out
    unless asked to include them.

    Parameters
    ----------
    species : Species
        A row of the tables.

    Returns
    -------
    bool
    """
    return "kinetically inert" in (species.note or "").lower()


def _ligand_species(table, fam, leave_out=frozenset(), include_slow=False):
    out = []
    if fam.species is not None:
        for formula, phase in fam.species:
            sp = table.get(formula, phase)
            if sp.key not in leave_out:
                out.append(sp)
        return out
    allowed = set(fam.elements) | {"H", "O"}
    for sp in table.species:
        comp = dict(sp.composition)
        if fam.counted not in comp or not set(comp) <= allowed or sp.phase == "g":
            continue
        if sp.metastable or sp.key in leave_out:
            continue
        if not include_slow and forms_slowly(sp):
            continue
        out.append(sp)
    return out


def slow_ligand_species(table, ligand):
    """Names of a ligand's species left out by default as not forming on a practical time scale.

    Parameters
    ----------
    table : SpeciesTable
        The tables.
    ligand : str
        Ligand family name (``Cl``, ``S`` ...).

    Returns
    -------
    list of str
    """
    fam = LIGANDS[resolve_ligand(ligand).name]
    every = _ligand_species(table, fam, include_slow=True)
    return [species_id(sp) for sp in every if forms_slowly(sp)]


def _ligand_energies(table, fam, activity, ctx, g_atom, leave_out=frozenset(), include_slow=False):
    """SpeciesEnergy (plane per ligand unit, vs SHE) of each species of a family."""
    rows = []
    unit = dict(fam.unit)
    others = tuple(el for el in unit if el != fam.counted)
    for sp in _ligand_species(table, fam, leave_out, include_slow):
        comp = dict(sp.composition)
        m = comp[fam.counted]
        if any(comp.get(el, 0) * unit[fam.counted] != m * unit[el] for el in others):
            continue  # not made of whole units of this ligand
        # dissolved ligand species at the total activity shared by its atoms (Pourbaix 1974, ch. II)
        act = activity / m if sp.phase == "aq" else 1.0
        se = energies.species_energy(sp, fam.counted, ctx, act, 1.0, ligand_elements=others)
        plane = _formation_plane(se, fam.counted, ctx, g_atom)
        rows.append(
            energies.SpeciesEnergy(sp, se.dg_kj_mol, se.route, se.valid_to_c, act, 1.0, plane)
        )
    if not rows:
        raise UnknownSpeciesError(
            f"the tables hold no species of ligand {fam.name} ({fam.description})"
        )
    return rows


# ------------------------------------------------------------------ selection
def _system_name(metals, families):
    return "-".join(list(metals) + [f.name for f, _ in families])


def _select(table, metals, lig_elements, metastable, exclude, only, warn, system):
    if metastable not in ("exclude", "include", "only"):
        raise OptionError(f"metastable must be one of exclude, include, only; got {metastable!r}")
    metal_set = set(metals)
    allowed = metal_set | {"H", "O"} | set(lig_elements)
    chosen = []
    for sp in table.species:
        comp = set(sp.composition)
        if not comp & metal_set or sp.phase == "g":
            continue
        if not comp <= allowed:
            origin = sp.origin or ""
            if not origin.startswith("species_data/"):  # a row from a user table
                outside = ", ".join(sorted(comp - allowed))
                warn.append(
                    f"{sp} from {origin} holds {outside}, outside the {system} system; left out"
                )
            continue
        chosen.append(sp)
    keys = {sp.key for sp in chosen}

    def lookup(n):
        sp = table.get(n)  # raises UnknownSpeciesError with close matches
        if sp.key not in keys:
            comp = set(sp.composition)
            outside = sorted(comp - allowed)
            if outside:
                raise UnknownSpeciesError(
                    f"species {sp} holds {', '.join(outside)}, outside the {system} system; add the element "
                    f"to the metals (with a ratio) or as a ligand ({', '.join(LIGANDS)}), or leave the species out"
                )
            raise UnknownSpeciesError(
                f"species {sp} is not part of the {system} system (gases and species "
                f"without {', '.join(metals)} play no part)"
            )
        return sp.key

    excl = {lookup(n) for n in exclude}
    keep = None if not only else {lookup(n) for n in only}
    out = []
    for sp in chosen:
        principal = next(m for m in metals if m in sp.composition)
        state = state_of(sp, principal)
        if sp.key in excl:
            continue
        if keep is not None and sp.key not in keep and state != "immunity":
            continue
        is_compound_solid = sp.phase == "s" and state == "passivation"
        if metastable == "exclude" and sp.metastable:
            continue
        if metastable == "only" and is_compound_solid and not sp.metastable:
            continue
        out.append(sp)
    return out


# ------------------------------------------------------------------ combinations
def ratio_combinations(counts, ratio, max_species=None, tol=1e-9):
    """Every set of species whose metal content matches a ratio with positive amounts.

    Parameters
    ----------
    counts : array_like, shape (N, k)
        Atoms of each of the k metals in each of the N species.
    ratio : array_like, shape (k,)
        Amounts of the metals [mol]; normalised to a total of 1.
    max_species : int, optional
        Largest set size; default k (a basic solution of the linear programme
        holds at most k species).
    tol : float
        Tolerance on residuals and on positivity [mol].

    Returns
    -------
    list of (tuple of int, ndarray)
        Species indices and their amounts per mole of metal [mol/mol].

    Notes
    -----
    For a set S of m species, the amounts solve ``A_S n = r`` (k equations).
    With m = k the system is square and solved directly; with m < k it is
    overdetermined and solved by the normal equations, kept only if the
    residual vanishes. Sets with linearly dependent columns are not bases and
    are skipped (Dantzig 1963, ch. 3). All sets of one size are solved at once
    as a stack of small systems.

    Examples
    --------
    >>> combos = ratio_combinations([[1, 0], [0, 1], [1, 2]], [1, 1])
    >>> [(c, [round(float(v), 3) for v in n]) for c, n in combos]
    [((0, 1), [0.5, 0.5]), ((0, 2), [0.25, 0.25])]
    """
    A = np.asarray(counts, dtype=float)
    r = np.asarray(ratio, dtype=float)
    r = r / r.sum()
    n_sp, k = A.shape
    m_max = k if max_species is None else int(max_species)
    out = []
    for m in range(1, min(m_max, n_sp) + 1):
        idx = np.array(list(itertools.combinations(range(n_sp), m)), dtype=int)
        if len(idx) == 0:
            continue
        # B[c] = A_S^T: (k, m) per combination
        B = np.transpose(A[idx], (0, 2, 1))
        if m == k:
            det = np.linalg.det(B)
            ok = np.abs(det) > 1e-12
            sol = np.zeros((len(idx), m))
            if ok.any():
                sol[ok] = np.linalg.solve(B[ok], np.broadcast_to(r, (int(ok.sum()), k))[..., None])[
                    ..., 0
                ]
        else:
            G = np.einsum("cki,ckj->cij", B, B)
            det = np.linalg.det(G)
            ok = np.abs(det) > 1e-12
            sol = np.zeros((len(idx), m))
            if ok.any():
                rhs = np.einsum("cki,k->ci", B[ok], r)
                sol[ok] = np.linalg.solve(G[ok], rhs[..., None])[..., 0]
            resid = np.abs(np.einsum("ckm,cm->ck", B, sol) - r).max(axis=1)
            ok &= resid <= tol
        ok &= np.all(sol > tol, axis=1)
        for c in np.flatnonzero(ok):
            out.append((tuple(int(v) for v in idx[c]), sol[c].copy()))
    return out


# ------------------------------------------------------------------ result
@dataclass(repr=False)
class SystemMap(DomainMap):
    """A map of a ligand system or of several metals (a :class:`DomainMap`).

    Attributes
    ----------
    ligand_maps : dict
        Ligand name -> the ligand's own DomainMap (its domains and lines, for
        drawing the ligand boundaries as a second layer).
    units : list of Entry
        The candidates before any ligand term: species (one metal) or
        combination entries (several metals), planes vs the map's reference.
    """

    ligand_maps: dict = field(default_factory=dict)
    units: list = field(default_factory=list)
    _base: object = None
    _nu: object = None
    _ligand_planes: list = field(default_factory=list)
    _ligand_names: list = field(default_factory=list)

    def assemblage(self, unit, ligand_key=()):
        """Species names of a unit together with the predominant ligand species.

        Parameters
        ----------
        unit : int
            Index into ``units``.
        ligand_key : tuple of int
            Index of the predominant species of each ligand.

        Returns
        -------
        tuple of str
        """
        names = list(self.units[unit].names)
        names += [self._ligand_names[f][k] for f, k in enumerate(ligand_key)]
        return tuple(names)

    def probe(self, ph, potential_v):
        """Stable assemblage, state and margins at points.

        Parameters
        ----------
        ph : float or array_like
            pH.
        potential_v : float or array_like
            Potential [V vs the map's reference].

        Returns
        -------
        ProbeResult
            Scalars for scalar input, arrays otherwise (see
            :meth:`~pourbaix.maps.domain_map.DomainMap.probe`).

        Notes
        -----
        The predominant species of each ligand is the argmin of its own
        planes; the stable unit is the argmin of the units' planes less the
        ligand term of those species (Pourbaix 1974, ch. II). Margins are the nearest
        crossing of either kind in each direction: every ligand boundary is
        also an assemblage boundary. Exact, and valid beyond the window.
        Points are handled in chunks so memory stays bounded with thousands of
        combination entries.
        """
        ph_a, e_a = np.broadcast_arrays(
            np.asarray(ph, dtype=float), np.asarray(potential_v, dtype=float)
        )
        scalar = ph_a.ndim == 0
        x = ph_a.ravel()
        y = e_a.ravel()
        if not (np.all(np.isfinite(x)) and np.all(np.isfinite(y))):
            raise ConditionsError("probe points must be finite numbers (pH and potential)")
        if self._base is None or len(self._base) == 0:
            raise ConditionsError("this map has no candidates to probe")
        chunk = max(1, 300_000 // len(self._base))
        parts = [
            self._probe_chunk(x[s : s + chunk], y[s : s + chunk]) for s in range(0, len(x), chunk)
        ]
        res = {k: np.concatenate([p[k] for p in parts]) for k in parts[0]}
        res["ph"], res["potential_v"] = x, y
        for k, v in res.items():
            res[k] = (
                v.reshape(ph_a.shape)
                if not scalar
                else (v.reshape(()).item() if v.dtype != object else v[0])
            )
        return ProbeResult(**res)

    def _effective(self, keys):
        eff = np.broadcast_to(self._base, (len(keys), *self._base.shape)).copy()
        for f, L in enumerate(self._ligand_planes):
            eff -= self._nu[None, :, f, None] * L[keys[:, f]][:, None, :]
        return eff

    def _classify(self, x, y):
        keys = np.zeros((len(x), len(self._ligand_planes)), dtype=int)
        for f, L in enumerate(self._ligand_planes):
            vals = L[:, 0][None, :] + np.outer(x, L[:, 1]) + np.outer(y, L[:, 2])
            keys[:, f] = np.argmin(vals, axis=1)
        eff = self._effective(keys)  # (M, N, 3)
        vals = eff[:, :, 0] + eff[:, :, 1] * x[:, None] + eff[:, :, 2] * y[:, None]
        return np.argmin(vals, axis=1), keys, eff

    def _name(self, unit, key):
        return " + ".join(self.assemblage(int(unit), tuple(int(k) for k in key)))

    def _probe_chunk(self, x, y):
        best, keys, eff = self._classify(x, y)
        rows = np.arange(len(x))
        found = {}
        for name, (pos, idx) in _crossings(eff - eff[rows, best][:, None, :], x, y).items():
            found[name] = (pos, np.full(len(x), -1), idx)
        for f, L in enumerate(self._ligand_planes):
            dl = L[None, :, :] - L[keys[:, f]][:, None, :]
            for name, (pos, idx) in _crossings(dl, x, y).items():
                cur_pos, cur_kind, cur_idx = found[name]
                here = _here(name, x, y)
                nearer = np.abs(pos - here) < np.abs(cur_pos - here)
                found[name] = (
                    np.where(nearer, pos, cur_pos),
                    np.where(nearer, f, cur_kind),
                    np.where(nearer, idx, cur_idx),
                )
        out = {
            "species": np.array(
                [self._name(u, k) for u, k in zip(best, keys, strict=True)], dtype=object
            ),
            "state": np.array([self.units[u].state for u in best], dtype=object),
        }
        labels = {
            "up": ("margin_up_v", "neighbour_up"),
            "down": ("margin_down_v", "neighbour_down"),
            "right": ("margin_alkaline_ph", "neighbour_alkaline"),
            "left": ("margin_acid_ph", "neighbour_acid"),
        }
        for name, (pos, kind, idx) in found.items():
            here = _here(name, x, y)
            margin = np.abs(pos - here)
            nb = np.empty(len(x), dtype=object)
            for m in range(len(x)):
                if not math.isfinite(margin[m]):
                    nb[m] = ""
                elif kind[m] == -1:
                    nb[m] = self._name(idx[m], keys[m])
                else:
                    # across a ligand boundary: whatever is stable just beyond it
                    step = 1e-9 * (1.0 + abs(pos[m]))
                    beyond = pos[m] + (step if name in ("up", "right") else -step)
                    px, py = (x[m], beyond) if name in ("up", "down") else (beyond, y[m])
                    b2, k2, _ = self._classify(np.array([px]), np.array([py]))
                    nb[m] = self._name(b2[0], k2[0])
            mkey, nkey = labels[name]
            out[mkey] = margin
            out[nkey] = nb
        return out


def _here(name, x, y):
    return y if name in ("up", "down") else x


def _crossings(d, x, y):
    """Nearest crossing in each direction, given plane differences ``d`` (M, N, 3) to the current plane.

    Along the vertical through (x, y) the difference d0 + dph pH + de E
    vanishes at E* = -(d0 + dph pH) / de; that candidate takes over above the
    point where de < 0 and below it where de > 0 (likewise along pH at fixed E).
    """
    base = d[:, :, 0] + d[:, :, 1] * x[:, None]
    base_e = d[:, :, 0] + d[:, :, 2] * y[:, None]
    with np.errstate(divide="ignore", invalid="ignore"):
        e_cross = -base / d[:, :, 2]
        ph_cross = -base_e / d[:, :, 1]
    up = np.where(d[:, :, 2] < -1e-15, e_cross, np.inf)
    down = np.where(d[:, :, 2] > 1e-15, e_cross, -np.inf)
    right = np.where(d[:, :, 1] < -1e-15, ph_cross, np.inf)
    left = np.where(d[:, :, 1] > 1e-15, ph_cross, -np.inf)
    # a crossing just behind the point (rounding) counts as at the point
    up = np.maximum(up, y[:, None])
    down = np.minimum(down, y[:, None])
    right = np.maximum(right, x[:, None])
    left = np.minimum(left, x[:, None])
    rows = np.arange(len(x))
    iu, idn = np.argmin(up, axis=1), np.argmax(down, axis=1)
    ir, il = np.argmin(right, axis=1), np.argmax(left, axis=1)
    return {
        "up": (up[rows, iu], iu),
        "down": (down[rows, idn], idn),
        "right": (right[rows, ir], ir),
        "left": (left[rows, il], il),
    }


# ------------------------------------------------------------------ geometry helpers
def _polygons(geom):
    """Return the polygon parts of a shapely geometry."""
    if geom is None or geom.is_empty:
        return []
    if geom.geom_type == "Polygon":
        return [geom]
    if hasattr(geom, "geoms"):
        out = []
        for g in geom.geoms:
            out += _polygons(g)
        return out
    return []


def _straight_segments(geom, min_length):
    """Split the line parts of a geometry into straight segments ((x0, y0), (x1, y1))."""
    import shapely

    lines = []

    def collect(g):
        if g.is_empty:
            return
        if g.geom_type == "LineString":
            lines.append(g)
        elif g.geom_type == "LinearRing":
            lines.append(shapely.LineString(g.coords))
        elif hasattr(g, "geoms"):
            for h in g.geoms:
                collect(h)

    collect(geom)
    if not lines:
        return []
    merged = shapely.line_merge(shapely.MultiLineString(lines)) if len(lines) > 1 else lines[0]
    parts = list(merged.geoms) if hasattr(merged, "geoms") else [merged]
    segs = []
    for line in parts:
        pts = np.asarray(line.coords)
        start = pts[0]
        for k in range(1, len(pts)):
            last = k == len(pts) - 1
            if not last:
                a, b = pts[k] - pts[k - 1], pts[k + 1] - pts[k]
                na, nb = np.hypot(*a), np.hypot(*b)
                if (
                    na > 0
                    and nb > 0
                    and abs(a[0] * b[1] - a[1] * b[0]) <= 1e-9 * na * nb
                    and a @ b > 0
                ):
                    continue  # still on the same straight line
            end = pts[k]
            if np.hypot(*(end - start)) > min_length:
                segs.append((tuple(map(float, start)), tuple(map(float, end))))
            start = end
    return segs


def _cell(poly, planes, i, others):
    """Part of a convex polygon where plane i is not above any of ``others``."""
    for j in others:
        if j == i:
            continue
        d = planes[i] - planes[j]
        if not np.any(d):
            continue  # coincident planes: the lower index keeps the ground (as in solve)
        poly = solve.clip_halfplane(poly, d, 1e-13 * (1.0 + np.abs(d).sum()))
        if poly is None:
            return None
    return poly


def _ring_area(poly):
    x, y = poly[:, 0], poly[:, 1]
    return 0.5 * float(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))


def _line_of(d, p, q):
    """Line of the plane difference d = (d0, dph, de): (e0, slope, ph_vertical); end points if degenerate."""
    d0, dph, de = (float(v) for v in d)
    if abs(de) > 1e-12:
        return -d0 / de, -dph / de, None
    if abs(dph) > 1e-12:
        return None, None, -d0 / dph
    # no usable plane difference: the straight line through the end points
    (x0, y0), (x1, y1) = p, q
    if abs(x1 - x0) <= 1e-12:
        return None, None, 0.5 * (x0 + x1)
    slope = (y1 - y0) / (x1 - x0)
    return y0 - slope * x0, slope, None


# ------------------------------------------------------------------ state
def _combined_state(states):
    # a metal reads 'corrosion' if any of it is dissolved, else 'passivation'
    # if any is in a solid compound, else 'immunity' (the conservative reading)
    if "corrosion" in states:
        return "corrosion"
    if "passivation" in states:
        return "passivation"
    return "immunity"


# ------------------------------------------------------------------ ligand map
def _ligand_map(
    fam,
    activity,
    ctx,
    g_atom,
    table,
    conditions,
    water_she,
    water_sp,
    leave_out=frozenset(),
    include_slow=False,
):
    off0, off1 = conditions.reference_offset_v, conditions.reference_slope_v_per_ph
    rows = _ligand_energies(table, fam, activity, ctx, g_atom, leave_out, include_slow)
    entries = [
        Entry(
            names=(species_id(se.species),),
            plane=to_frame(se.plane, off0, off1),
            state=state_of(se.species, fam.counted),
            label=species_label(se.species),
        )
        for se in rows
    ]
    cond = replace(conditions, elements=(fam.counted,), activity=float(activity), molality=None)
    sources = {
        se.species.source: table.sources.get(se.species.source, se.species.source)
        for se in [*rows, water_sp]
    }
    method = (
        f"the {fam.name} ligand's own map at total activity {activity:g}: {fam.description}; planes per "
        f"{fam.counted} atom, dissolved species at the total activity divided by their {fam.counted} atoms; "
        "exact lower envelope (half-space intersection)"
        + (f"; {fam.suppressed}" if fam.suppressed else "")
    )
    lm = build_map(cond, entries, [*rows, water_sp], water_she, [], sources, method=method)
    return lm, rows


def compute_ligand_map(
    ligand,
    activity,
    *,
    temperature_c=25.0,
    pressure_bar=None,
    water_activity=1.0,
    ph_range=(-2.0, 16.0),
    potential_range_v=(-2.0, 2.0),
    reference="SHE",
    dataset="default",
    data_files=(),
    table=None,
):
    """Compute the ligand's own potential-pH map (e.g. the S-H2O diagram).

    Parameters
    ----------
    ligand : str
        ``S``, ``C`` (``CO3``), ``Cl``, ``NH3`` (``N``) or ``CN``.
    activity : float
        Total activity of the ligand [-].
    temperature_c : float
        Temperature [°C].
    pressure_bar : float, optional
        Pressure [bar].
    water_activity : float
        Activity of water [-].
    ph_range : (float, float)
        pH window.
    potential_range_v : (float, float)
        Potential window [V vs ``reference``].
    reference : str
        Reference electrode.
    dataset : str
        Data set name.
    data_files : sequence of path
        User species tables.
    table : SpeciesTable, optional
        Pre-loaded tables.

    Returns
    -------
    DomainMap
        Domains of the ligand species; planes per ligand atom.

    Raises
    ------
    OptionError
        Unknown ligand.
    ConditionsError
        Activity not > 0, or other conditions out of range.

    Examples
    --------
    >>> m = compute_ligand_map("S", 1e-3)
    >>> m.probe(10.0, -0.6).species
    'HS^-'
    """
    fam = resolve_ligand(ligand)
    conditions = make_conditions(
        fam.counted,
        temperature_c=temperature_c,
        pressure_bar=pressure_bar,
        water_activity=water_activity,
        ligands={ligand: activity},
        ph_range=ph_range,
        potential_range_v=potential_range_v,
        reference=reference,
        dataset=dataset,
        data_files=data_files,
    )
    a = conditions.ligands[fam.name]
    if table is None:
        from pourbaix.tables.species import load_species

        table = load_species(conditions.dataset, conditions.data_files)
    conditions = replace(conditions, dataset=table.dataset)
    ctx = energies.context_for(table, conditions, elements=())
    g_atom = {
        el: _g_per_atom(table, el, ctx.temperature_c, ctx.pressure_bar, ctx.water)
        for el in fam.elements
    }
    water_she = energies.water_lines(ctx)
    water_sp = energies.water_energy(table, ctx)
    lm, rows = _ligand_map(fam, a, ctx, g_atom, table, conditions, water_she, water_sp)
    lm.warnings[:0] = list(conditions.notes)
    route_warnings(rows, ctx.temperature_c, lm.warnings)
    return lm


# ------------------------------------------------------------------ the system map
def compute_system_map(
    conditions,
    *,
    exclude=(),
    only=None,
    metastable="exclude",
    table=None,
    warn=None,
    ratio_method="walk",
    slow_species="exclude",
    **condition_keywords,
):
    """Map of a metal with ligands, or of several metals at a fixed ratio (or both).

    Called by :func:`pourbaix.maps.compute.compute_map` when ligands, a ratio or
    several elements are given.

    Parameters
    ----------
    elements : str or sequence of str
        Metal(s); the first is the principal element.
    activity, molality : float, optional
        Activity [-] (default 1e-6) or molality [mol/kg] of every dissolved
        metal species.
    temperature_c : float
        Temperature [°C].
    pressure_bar : float, optional
        Pressure [bar].
    ionic_strength : float, optional
        Ionic strength [mol/kg].
    background : dict or str, optional
        Background electrolyte [mol/kg].
    activity_model : str
        Activity-coefficient model.
    water_activity : float
        Activity of water [-].
    ligands : dict, optional
        Ligand -> total activity, e.g. ``{"S": 1e-3, "Cl": 0.1}`` [-].
    ratio : sequence of float, optional
        Amounts of the metals in the order of ``elements`` [mol]; required
        for several metals.
    ph_range : (float, float)
        pH window.
    potential_range_v : (float, float)
        Potential window [V vs ``reference``].
    reference : str
        Reference electrode.
    dataset : str
        Data set name.
    data_files : sequence of path
        User species tables.
    exclude : sequence of str
        Species to leave out.
    only : sequence of str, optional
        Keep only these species (plus the metals themselves).
    metastable : {"exclude", "include", "only"}
        Treatment of metastable solids.
    table : SpeciesTable, optional
        Pre-loaded tables.
    warn : list of str, optional
        Warnings gathered by the caller.
    ratio_method : {"walk", "enumerate"}
        Several metals: walk the optimal bases of the linear programme
        (multi-parametric LP, cost grows with the domains; with ligands, in
        each region of the ligands' predominant species) or enumerate every
        combination matching the ratio (the reference).
    slow_species : {"exclude", "include"}
        Ligand species the data name as not forming on a practical time
        scale (:func:`forms_slowly`, e.g. perchlorate) are left out of the
        ligands' maps by default (a warning names them); "include" keeps them.

    Returns
    -------
    SystemMap
        A DomainMap whose domains carry assemblages (species lists).

    Raises
    ------
    OptionError
        Unknown ligand; a ratio that does not match the elements; several
        metals without a ratio.
    ConditionsError
        Ligand activity or ratio amounts not > 0; other conditions out of range.
    UnknownSpeciesError
        A species named in ``only``/``exclude`` that is not in the tables or
        holds an element outside the system.

    Notes
    -----
    Ligands: predominant-ligand method (Pourbaix 1974, ch. II; Garrels & Christ 1965, ch. 7).
    Several metals: basic solutions of the linear programme (Dantzig 1963, ch. 3); the entry plane is ``Σ n_s Φ_s`` per mole of
    metal, Φ_s the transformed energy of forming species s from the elements,
    water, H+ and electrons.

    Examples
    --------
    >>> m = compute_system_map(["Fe", "Cr"], ratio=(3, 1))
    >>> m.probe(7.0, -1.5).species
    'Fe + Cr'
    """
    if not isinstance(conditions, Conditions):
        conditions = make_conditions(conditions, **condition_keywords)
    elif condition_keywords:
        raise OptionError("give either checked conditions or condition keywords, not both")
    elements = conditions.elements
    activity, molality = conditions.activity, conditions.molality
    families = [(LIGANDS[name], a) for name, a in conditions.ligands.items()]
    ratio_vals = conditions.ratio
    if ratio_vals is None and len(elements) > 1:
        raise OptionError(f"several metals ({' '.join(elements)}) need a ratio of their amounts")
    lig_elements, U = _unit_matrix(families)
    clash = set(lig_elements) & set(elements)
    if clash:
        raise OptionError(
            f"{', '.join(sorted(clash))} is given both as a metal and inside a ligand"
        )
    if table is None:
        from pourbaix.tables.species import load_species

        table = load_species(conditions.dataset, conditions.data_files)
    if table.dataset != conditions.dataset:
        conditions = replace(conditions, dataset=table.dataset)  # the tables given win
    warn = list(table.overrides) if warn is None else list(warn)
    warn += [n for n in conditions.notes if n not in warn]
    for el in elements:
        energies.reference_species(table, el)  # raises if the element has no data
    ctx = energies.context_for(table, conditions)
    off0, off1 = conditions.reference_offset_v, conditions.reference_slope_v_per_ph
    t = ctx.temperature_c
    g_atom = {
        el: _g_per_atom(table, el, t, ctx.pressure_bar, ctx.water)
        for el in (*elements, *lig_elements)
    }
    system = _system_name(elements, families)
    if slow_species not in ("exclude", "include"):
        raise OptionError(f"slow_species must be exclude or include; got {slow_species!r}")
    # names in exclude that are species of a ligand's own map leave that map
    ligand_keys = {
        sp.key: sp for fam, _ in families for sp in _ligand_species(table, fam, include_slow=True)
    }
    ligand_exclude, metal_exclude = set(), []
    for name in exclude:
        sp = table.get(name)  # raises UnknownSpeciesError with close matches
        if sp.key in ligand_keys:
            ligand_exclude.add(sp.key)
        else:
            metal_exclude.append(name)
    chosen = _select(table, elements, lig_elements, metastable, metal_exclude, only, warn, system)

    # species planes: full formation plane per formula unit (Φ_s), metal counts, ligand units
    metal_rows, phis, counts, nus, skipped = [], [], [], [], []
    for sp in chosen:
        comp = dict(sp.composition)
        principal = next(m for m in elements if m in comp)
        lig_comp = np.array([comp.get(el, 0) for el in lig_elements], dtype=float)
        if families:
            nu = np.linalg.lstsq(U, lig_comp, rcond=None)[0]
            if np.abs(U @ nu - lig_comp).max() > 1e-9 or np.any(nu < -1e-12):
                skipped.append(str(sp))
                continue
        else:
            nu = np.zeros(0)
        act, gam = dissolved_activity(sp, conditions)
        others = tuple(el for el in (*elements, *lig_elements) if el != principal)
        se = energies.species_energy(sp, principal, ctx, act, gam, ligand_elements=others)
        plane = _formation_plane(se, principal, ctx, g_atom)
        se = energies.SpeciesEnergy(
            sp, se.dg_kj_mol, se.route, se.valid_to_c, se.activity, se.gamma, plane
        )
        x = comp[principal]
        metal_rows.append(se)
        phis.append(np.array(plane) * x)
        counts.append([comp.get(m, 0) for m in elements])
        nus.append(np.maximum(nu, 0.0))
    if skipped:
        warn.append("left out, not made of whole units of the given ligands: " + ", ".join(skipped))
    if not metal_rows:
        raise UnknownSpeciesError(f"no species of the {system} system are left to compute")
    phis = np.array(phis)
    counts = np.array(counts, dtype=float)
    nus = np.array(nus).reshape(len(metal_rows), len(families))

    # each ligand's own map first: inside each of its domains the metal's ligand species
    # form from the ligand species predominating there
    water_she = energies.water_lines(ctx)
    water_sp = energies.water_energy(table, ctx)
    ligand_maps, ligand_planes, ligand_names, ligand_rows = {}, [], [], []
    for fam, a in families:
        lm, rows = _ligand_map(
            fam,
            a,
            ctx,
            g_atom,
            table,
            conditions,
            water_she,
            water_sp,
            ligand_exclude,
            slow_species == "include",
        )
        slow = [n for n in slow_ligand_species(table, fam.name) if slow_species != "include"]
        if slow:
            warn.append(
                f"left out of the {fam.name} ligand's map as not forming on a practical time scale "
                f"(kinetically inert): {', '.join(slow)}; to include them: --include-slow on the "
                'command line, slow_species="include" in Python'
            )
        ligand_maps[fam.name] = lm
        ligand_planes.append(np.array([e.plane for e in lm.entries]))
        ligand_names.append([e.names[0] for e in lm.entries])
        ligand_rows += rows

    # candidates ("units"): single species, or combinations matching the ratio
    r = np.array(ratio_vals if ratio_vals is not None else (1.0,))
    if ratio_method not in ("walk", "enumerate"):
        raise OptionError(f"ratio_method must be walk or enumerate, got {ratio_method!r}")
    walked = ratio_vals is not None and ratio_method == "walk"
    if walked:
        # multi-parametric LP: only the combinations optimal somewhere (Gal & Nedoma 1972)
        costs = np.array([to_frame(tuple(p), off0, off1) for p in phis])
        if not families:
            walk_regions = parametric_lp.walk(costs, counts, r, conditions.window)
            combos = parametric_lp.combinations_of(walk_regions)
        else:
            regions = _ligand_regions(conditions, ligand_planes, ligand_maps)
            combos = _walk_ligand_regions(costs, counts, nus, r, ligand_planes, regions)
    else:
        combos = ratio_combinations(counts, r)
    if not combos:
        raise ConditionsError(
            f"no combination of the {system} species matches the ratio {':'.join(f'{v:g}' for v in r)}"
        )
    units, base, nu_units = _assemblage_entries(combos, metal_rows, phis, nus, elements, off0, off1)

    method = [
        f"exact lower envelope of transformed-energy planes (half-space intersection) for the {system} system"
    ]
    if ratio_vals is not None:
        method.append(
            f"several metals at the fixed ratio {':'.join(f'{v:g}' for v in ratio_vals)} "
            f"({', '.join(elements)}): {len(units)} combination entries of up to {len(elements)} species "
            f"(from {len(metal_rows)} species) whose metal content matches the ratio with positive amounts, each "
            "with its energy per mole of metal; the cheapest is stable (the linear programme min sum n_s psi_s with the "
            "metal balance, solved exactly through its basic solutions; Dantzig 1963"
            + (
                "; the entries are the optimal bases found by walking the critical regions of the "
                "multi-parametric programme, Gal & Nedoma 1972"
                + (" (in each region of the ligands' predominant species)" if families else "")
                if walked
                else ""
            )
            + "). Metals are taken as pure phases (no alloy solution energy); "
            "mixed compounds enter as the tables hold them. A metal's state reads 'corrosion' if any of it is "
            "dissolved, else 'passivation' if any is in a solid compound, else 'immunity'; the map's state is "
            f"that of {elements[0]}"
        )
    all_rows = list(metal_rows) + ligand_rows
    if families:
        method.append(
            "predominant-ligand method (Pourbaix 1974, ch. II; Garrels & Christ 1965, ch. 7): each ligand's own map at its total activity ("
            + ", ".join(f"{f.name} {a:g}" for f, a in families)
            + "); inside each ligand domain the metal-ligand species are formed from the ligand species "
            "predominating there and the map is solved there; domains are labelled by assemblage (metal species "
            "+ predominant ligand species). Approximation: no mass balance on the ligand - it is taken in "
            "excess, its activity not lowered by complexation or precipitation, so fields are right only where "
            "the ligand far exceeds the metal"
        )
        method += [f.suppressed for f, _ in families if f.suppressed]
    route_warnings(all_rows, t, warn)
    sources = {}
    for se in [*all_rows, water_sp]:
        sources[se.species.source] = table.sources.get(se.species.source, se.species.source)
    species_list = [*all_rows, water_sp]

    if not families:
        # the walk's regions already tile the window: its envelope needs no second solve
        env = None
        if walked:  # (no ligands here)
            env = parametric_lp.envelope_of_regions(walk_regions, base, conditions.window)
        m = build_map(
            conditions,
            units,
            species_list,
            water_she,
            warn,
            sources,
            method="; ".join(method),
            envelope=env,
        )
        fields = {f: getattr(m, f) for f in DomainMap.__dataclass_fields__}
    else:
        fields = _overlay_map(
            conditions,
            units,
            base,
            nu_units,
            ligand_maps,
            ligand_planes,
            ligand_names,
            species_list,
            water_she,
            warn,
            sources,
            "; ".join(method),
        )
    stable = {n for d in fields["domains"] for n in d.species}
    fields["never_stable"] = list(
        dict.fromkeys(
            species_id(se.species) for se in metal_rows if species_id(se.species) not in stable
        )
    )
    sm = SystemMap(
        **fields,
        ligand_maps=ligand_maps,
        units=units,
        _base=base,
        _nu=nu_units,
        _ligand_planes=ligand_planes,
        _ligand_names=ligand_names,
    )
    _ligand_warnings(sm, families, activity if activity is not None else molality, metal_rows, nus)
    return sm


def units_at_ratio(system_map, ratio):
    """A fixed-ratio map's assemblages at another ratio, and the area of each one's domain.

    The species of a map of several metals (no ligands) and their planes do
    not depend on the ratio; only the optimal combinations do. So a sweep
    over ratios at one temperature, amount and ionic strength computes the
    species once (one map) and walks the linear programme (Gal & Nedoma
    1972) at each ratio, without building each map.

    Parameters
    ----------
    system_map : SystemMap
        A map of these metals at any ratio, without ligands.
    ratio : sequence of float
        Amounts of the metals in the order of the map's elements [mol].

    Returns
    -------
    units : list of Entry
        The assemblages stable somewhere in the window, as the map at
        ``ratio`` holds them (names, plane per mole of metal vs the map's
        reference, states).
    areas : ndarray, shape (len(units),)
        Area of each assemblage's domain [pH V].

    Raises
    ------
    OptionError
        For a map with ligands or of one metal, or a ratio of the wrong length.
    ConditionsError
        For amounts not > 0, or a ratio no combination of the species meets.

    Examples
    --------
    >>> m = compute_system_map(["Fe", "Cr"], ratio=(3, 1))
    >>> units, areas = units_at_ratio(m, (1, 3))
    >>> print(f"{areas.sum():.6f}")
    72.000000
    """
    c = system_map.conditions
    elements = c.elements
    if system_map.ligand_maps or len(elements) < 2:
        raise OptionError("units_at_ratio needs a map of several metals without ligands")
    r = np.asarray(ratio, dtype=float)
    if r.shape != (len(elements),):
        raise OptionError(f"the ratio needs {len(elements)} amounts ({', '.join(elements)})")
    if not (np.all(np.isfinite(r)) and np.all(r > 0)):
        raise ConditionsError(f"ratio amounts must be finite numbers > 0, got {ratio!r}")
    off0, off1 = c.reference_offset_v, c.reference_slope_v_per_ph
    # the map's species rows hold each species' plane per atom of its principal metal
    metal_rows, phis, counts = [], [], []
    for se in system_map.species:
        comp = dict(se.species.composition)
        principal = next((m for m in elements if m in comp), None)
        if principal is None:
            continue  # water
        metal_rows.append(se)
        phis.append(np.array(se.plane) * comp[principal])
        counts.append([comp.get(m, 0) for m in elements])
    phis = np.array(phis)
    counts = np.array(counts, dtype=float)
    costs = np.array([to_frame(tuple(p), off0, off1) for p in phis])
    regions = parametric_lp.walk(costs, counts, r, c.window)
    combos = parametric_lp.combinations_of(regions)
    units, _, _ = _assemblage_entries(
        combos, metal_rows, phis, np.zeros((len(metal_rows), 0)), elements, off0, off1
    )
    index = {support: i for i, (support, _) in enumerate(combos)}
    areas = np.zeros(len(units))
    for reg in regions:
        areas[index[reg.support]] += reg.area
    return units, areas


def _ligand_warnings(sm, families, metal_activity, metal_rows, nus):
    """Warn where the dissolved metal is not far below the ligand (no mass balance)."""
    stable = {n for d in sm.domains for n in d.species}
    for f, (fam, a) in enumerate(families):
        need = metal_activity
        for se, nu in zip(metal_rows, nus, strict=True):
            if se.species.phase == "aq" and species_id(se.species) in stable:
                x = max(dict(se.species.composition).get(m, 0) for m in sm.conditions.elements)
                need = max(need, metal_activity * nu[f] / max(x, 1))
        if metal_activity > a or need > a:
            sm.warnings.append(
                f"the dissolved metal (activity {metal_activity:g}) is not in excess of ligand {fam.name} "
                f"(total activity {a:g}) — it would bind up to {need:g} of it; the predominant-ligand method "
                "has no mass balance on the ligand, so fields involving it are unreliable here"
            )


def _assemblage_entries(combos, metal_rows, phis, nus, elements, off0, off1):
    """Entries of the combinations (species indices, amounts): names, plane, states.

    Returns the entries, their planes per mole of metal in the reference
    frame (M, 3) and their ligand units (M, F).
    """
    # names in an assemblage: single-metal species in the order of the metals, mixed compounds last
    order_key = [
        (
            sum(m in se.species.composition for m in elements) > 1,
            min(elements.index(m) for m in se.species.composition if m in elements),
        )
        for se in metal_rows
    ]
    ids = [species_id(se.species) for se in metal_rows]
    labels = [species_label(se.species) for se in metal_rows]
    states = [
        {m: state_of(se.species, m) for m in elements if m in se.species.composition}
        for se in metal_rows
    ]
    units, base, nu_units = [], [], []
    for idx, amounts in combos:
        order = sorted(idx, key=lambda i: (order_key[i], i))
        plane = amounts @ phis[list(idx)]  # Σ n_s Φ_s per mole of metal (Dantzig 1963)
        nu = amounts @ nus[list(idx)]
        metal_states = {
            m: _combined_state([states[i][m] for i in order if m in states[i]]) for m in elements
        }
        plane_ref = to_frame(tuple(float(v) for v in plane), off0, off1)
        units.append(
            Entry(
                names=tuple(ids[i] for i in order),
                plane=plane_ref,
                state=metal_states[elements[0]],
                label=" + ".join(labels[i] for i in order),
                metal_states=metal_states,
            )
        )
        base.append(plane_ref)
        nu_units.append(nu)
    base = np.array(base)
    nu_units = np.array(nu_units).reshape(len(units), nus.shape[1])
    return units, base, nu_units


def _ligand_regions(conditions, ligand_planes, ligand_maps):
    """Where each combination of the ligands' predominant species holds: (key, polygon) pairs.

    Window ∩ {the key's species lowest for every ligand}, clipped exactly by
    half planes (the same sets as the overlay of the ligand maps' domains,
    with vertices from exact line intersections); the key holds one entry
    index per ligand map.
    """
    x0, x1 = conditions.ph_range
    y0, y1 = conditions.potential_range_v
    area_tol = _SLIVER * (x1 - x0) * (y1 - y0)
    window = np.array([[x0, y0], [x1, y0], [x1, y1], [x0, y1]], dtype=float)
    stable_sets = [sorted({d.entry for d in lm.domains}) for lm in ligand_maps.values()]
    regions = []
    for key in itertools.product(*stable_sets):
        poly = window
        for f, k in enumerate(key):
            poly = _cell(poly, ligand_planes[f], k, range(len(ligand_planes[f])))
            if poly is None:
                break
        if poly is not None and abs(_ring_area(poly)) > area_tol:
            regions.append((tuple(key), poly))
    return regions


def _walk_ligand_regions(costs, counts, nus, ratio, ligand_planes, regions):
    """The combinations optimal somewhere in the ligand regions, by the walk in each.

    Inside a ligand region each species' energy is its own plane less its
    ligand units times the predominant ligand species' planes (linear in pH
    and E), so the fixed-ratio programme there is the one without ligands
    with these costs (Gal & Nedoma 1972): walked over the region's bounding
    box (which holds the region), every combination optimal at some point of
    the region is found. Ordered as :func:`ratio_combinations` orders them.
    """
    found = {}
    for key, poly in regions:
        eff = costs.copy()
        for f, k in enumerate(key):
            eff -= nus[:, f, None] * np.asarray(ligand_planes[f][k])[None, :]
        (bx0, by0), (bx1, by1) = poly.min(axis=0), poly.max(axis=0)
        # a sliver of a region still needs a box with room to walk in
        pad_x = max(0.0, 1e-6 - (bx1 - bx0))
        pad_y = max(0.0, 1e-6 - (by1 - by0))
        box = (bx0 - pad_x, bx1 + pad_x, by0 - pad_y, by1 + pad_y)
        for support, amounts in parametric_lp.optimal_combinations(eff, counts, ratio, box):
            found.setdefault(support, amounts)
    return [(s, found[s]) for s in sorted(found, key=lambda s: (len(s), s))]


def _overlay_map(
    conditions,
    units,
    base,
    nu_units,
    ligand_maps,
    ligand_planes,
    ligand_names,
    species_list,
    water_she,
    warn,
    sources,
    method,
):
    """Solve the units in every ligand region, clip, merge equal assemblages, find boundaries."""
    import shapely
    from shapely.geometry import Polygon
    from shapely.ops import polylabel

    x0, x1 = conditions.ph_range
    y0, y1 = conditions.potential_range_v
    area_tol = _SLIVER * (x1 - x0) * (y1 - y0)
    regions = _ligand_regions(conditions, ligand_planes, ligand_maps)

    pieces = {}
    for key, rpoly in regions:
        eff = base.copy()
        for f, k in enumerate(key):
            eff -= nu_units[:, f, None] * ligand_planes[f][k][None, :]
        bx0, by0 = rpoly.min(axis=0)
        bx1, by1 = rpoly.max(axis=0)
        if bx1 - bx0 <= _GRID or by1 - by0 <= _GRID:
            # a thin region: no envelope solve on a degenerate box; every unit is clipped
            cand = range(len(eff))
        else:
            # Qhull finds the units that win somewhere in the region's bounding box ...
            cand = solve.lower_envelope(eff, (bx0, bx1, by0, by1)).stable
        # ... and each one's piece is the region clipped by its half planes against the
        # others. The pieces are kept exactly as clipped (no snapping to a grid): pieces
        # of one region and the regions themselves come from the same half planes, so
        # they tile the window to rounding error; snapping each piece on its own moved
        # shared vertices apart and left slivers of about grid x edge length.
        for i in cand:
            cell = _cell(rpoly, eff, i, cand)
            if cell is None or abs(_ring_area(cell)) <= area_tol:
                continue
            piece = Polygon(cell)
            if not piece.is_valid:
                piece = shapely.make_valid(piece)
            for part in _polygons(piece):
                if part.area > area_tol:
                    pieces.setdefault((i, key), []).append((part, tuple(float(v) for v in eff[i])))

    entries, domains, dkeys = [], [], []
    for i, key in sorted(pieces):
        parts = [p for p, _ in pieces[(i, key)]]
        merged = shapely.union_all(parts) if len(parts) > 1 else parts[0]
        u = units[i]
        names = tuple(u.names) + tuple(ligand_names[f][k] for f, k in enumerate(key))
        labels = [u.label] + [_ligand_label(ligand_maps, f, k) for f, k in enumerate(key)]
        e_index = len(entries)
        entries.append(
            Entry(
                names=names,
                plane=pieces[(i, key)][0][1],
                state=u.state,
                label=" + ".join(labels),
                metal_states=dict(u.metal_states),
            )
        )
        for P in _polygons(merged):
            if P.area <= area_tol:
                continue
            P = shapely.Polygon(P.exterior)  # convex pieces: no holes
            lp = polylabel(P, tolerance=1e-3 * math.sqrt(max(P.area, 1e-12)))
            domains.append(
                Domain(
                    names, u.state, P, entries[e_index].label, (float(lp.x), float(lp.y)), e_index
                )
            )
            dkeys.append((i, key))

    # boundaries: shared edges of the final domains, each on its own line
    boundaries = []
    min_len = 1e3 * _GRID
    # shared edges are found on copies snapped to the grid (the domains themselves stay
    # exact): neighbours' vertices computed in different regions then coincide
    snapped = [shapely.set_precision(d.polygon, _GRID) for d in domains]
    for a in range(len(domains)):
        for b in range(a + 1, len(domains)):
            A, B = domains[a], domains[b]
            if not snapped[a].intersects(snapped[b]):
                continue
            shared = shapely.intersection(snapped[a].boundary, snapped[b].boundary, grid_size=_GRID)
            segs = _straight_segments(shared, min_len)
            if not segs:
                continue
            ka, kb = dkeys[a][1], dkeys[b][1]
            if ka == kb:  # same ligand region: the two effective planes
                d = np.subtract(entries[A.entry].plane, entries[B.entry].plane)
            else:  # a ligand boundary: the two ligand species' planes
                f = next(f for f in range(len(ka)) if ka[f] != kb[f])
                d = ligand_planes[f][ka[f]] - ligand_planes[f][kb[f]]
            for p, q in segs:
                if p[0] > q[0] or (p[0] == q[0] and p[1] > q[1]):
                    p, q = q, p
                e0, slope, phv = _line_of(d, p, q)
                boundaries.append(
                    Boundary(
                        between=(" + ".join(A.species), " + ".join(B.species)),
                        entries=(A.entry, B.entry),
                        start=p,
                        end=q,
                        e_at_ph0_v=e0,
                        slope_v_per_ph=slope,
                        ph=phv,
                    )
                )
    water = {
        k: (e0 - conditions.reference_offset_v, s - conditions.reference_slope_v_per_ph)
        for k, (e0, s) in water_she.items()
    }
    return dict(
        conditions=conditions,
        species=list(species_list),
        entries=entries,
        domains=domains,
        boundaries=boundaries,
        water=water,
        never_stable=[],
        warnings=warn,
        method=method,
        sources=sources,
        extra_species=[],
        _planes=np.array([e.plane for e in entries]) if entries else np.zeros((0, 3)),
        _active=np.arange(len(entries)),
    )


def _ligand_label(ligand_maps, f, k):
    """Label of species ``k`` of the ``f``-th ligand map."""
    lm = list(ligand_maps.values())[f]
    return lm.entries[k].label
