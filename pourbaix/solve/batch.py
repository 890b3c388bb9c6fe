"""Many maps of one species set at once: their planes, and their answers, computed in numpy.

A sweep over temperature, activity, molality or ionic strength keeps the
species of a single-element map and changes only their planes (Pourbaix 1974, ch. II):

    psi_i = c0_i + cph_i pH + ce_i E        [V per atom of the element]

with the activity entering c0 as (k_T / x_i) log10 a_i. This module builds
the planes of M maps as one array (M, N, 3) — the thermodynamics once per
distinct temperature and ionic strength, the activities as a shift of c0 —
and answers the questions a screen asks of every map with array operations
over all M maps together instead of one Python call per map:

* the stable species and its margins at given points (the argmin of the
  planes, and the nearest crossing in each direction);
* the exact area of each domain (vertices of the lower envelope: every
  point where three planes, or two planes and the window's edge, meet and
  no plane lies below; Preparata & Shamos 1985, §7.2, for the envelope of
  planes as an intersection of half-spaces);
* the width in potential over which a solid compound is stable at a pH;
* the total dissolved element at a point (the solubility relation of
  :mod:`pourbaix.analyses.solubility`).

Each result equals what :func:`pourbaix.maps.domain_map.compute_map` and the
analyses give for the same conditions one map at a time (tested).

References
----------
Pourbaix, M. (1974). Atlas of Electrochemical Equilibria in Aqueous
Solutions, 2nd English ed., ch. II. NACE.
Preparata, F. P. & Shamos, M. I. (1985). Computational Geometry: An
Introduction, §7.2. Springer. https://doi.org/10.1007/978-1-4612-1098-6
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from itertools import combinations

import numpy as np

from pourbaix.errors import ConditionsError, OptionError

__all__ = [
    "PlaneBatch",
    "batch_planes",
    "stable_at",
    "domain_areas",
    "passive_width",
    "solubility_at",
]

# Maps per block of the vectorised solve: bounds the working memory
# (block x candidate vertices x species doubles, ~40 MB for iron).
_BLOCK = 256
# A plane within this of the lowest at a vertex is on it [V, relative to the planes' scale].
_ON_TOL = 1e-9
# Vertices this far outside the window (relative to its span) are outside.
_WINDOW_TOL = 1e-9


@dataclass(frozen=True)
class PlaneBatch:
    """The planes of M maps of one element that share one species set.

    Attributes
    ----------
    element : str
        The element.
    names : tuple of str
        Species names as on a map (N).
    states : tuple of str
        ``immunity``, ``passivation`` or ``corrosion`` per species.
    x : ndarray, shape (N,)
        Atoms of the element per formula unit.
    charge : ndarray, shape (N,)
        Charges.
    dissolved, solid : ndarray of bool, shape (N,)
        Dissolved species; solids and liquids.
    planes : ndarray, shape (M, N, 3)
        ``(c0, cph, ce)`` per map and species, vs the batch's reference
        [V, V/pH, V/V].
    log_activity : ndarray, shape (M, N)
        log10 of the activity inside each plane [-].
    log_gamma : ndarray, shape (M, N)
        log10 of the molal activity coefficient of each dissolved species
        under the map's model (0 at zero ionic strength) [-].
    nernst_v : ndarray, shape (M,)
        R T ln10 / F of each map [V].
    window : tuple of float
        ``(ph_lo, ph_hi, e_lo, e_hi)`` [-, -, V, V] vs ``reference``.
    reference : str
        Reference electrode of the potentials.
    warnings : tuple of str
        Warnings of the conditions, each once.
    """

    element: str
    names: tuple
    states: tuple
    x: np.ndarray
    charge: np.ndarray
    dissolved: np.ndarray
    solid: np.ndarray
    planes: np.ndarray
    log_activity: np.ndarray
    log_gamma: np.ndarray
    nernst_v: np.ndarray
    window: tuple
    reference: str
    warnings: tuple = ()

    @property
    def size(self):
        """Number of maps M."""
        return self.planes.shape[0]


def _as_column(name, value, size=None):
    arr = np.atleast_1d(np.asarray(value, dtype=float))
    if arr.ndim != 1:
        raise ConditionsError(f"{name} must be a number or a 1-D sequence of numbers")
    if not np.all(np.isfinite(arr)):
        raise ConditionsError(f"{name} must be finite numbers, got {value!r}")
    return arr


def batch_planes(
    element,
    *,
    temperature_c=25.0,
    activity=None,
    molality=None,
    ionic_strength=None,
    exclude=(),
    only=None,
    metastable="exclude",
    table=None,
    **condition_keywords,
):
    """Planes of many single-element maps (no ligands) in one array.

    Parameters
    ----------
    element : str
        The element, e.g. "Fe".
    temperature_c : float or array_like
        Temperature of each map [°C].
    activity : float or array_like, optional
        Activity of the dissolved species of each map [-] (default 1e-6).
    molality : float or array_like, optional
        Molality instead of activity [mol/kg]; activity = molality × γ.
    ionic_strength : float or array_like, optional
        Ionic strength of each map [mol/kg].
    exclude, only, metastable, table
        As for :func:`pourbaix.maps.compute.compute_map`.
    **condition_keywords
        Other keywords of :func:`pourbaix.conditions.make_conditions`, the
        same for every map (``reference``, ``ph_range``, ``potential_range_v``,
        ``activity_model``, ``water_activity``, ``pressure_bar``, ``dataset`` ...).

    Returns
    -------
    PlaneBatch
        M maps, M the broadcast length of the condition arrays.

    Raises
    ------
    PourbaixError
        As :func:`~pourbaix.conditions.make_conditions` for bad conditions; ConditionsError when
        the condition arrays do not broadcast.

    Notes
    -----
    The conditions are checked and the energies built once per distinct
    (temperature, ionic strength) with the same functions as
    :func:`~pourbaix.maps.domain_map.compute_map`; each map's activities then enter c0 as
    (k_T / x_i) log10 a_i (Pourbaix 1974, ch. II).

    Examples
    --------
    >>> b = batch_planes("Fe", activity=[1e-6, 1e-4])
    >>> b.planes.shape[0], b.names[0]
    (2, 'Fe')
    """
    from pourbaix.conditions import make_conditions, parse_elements
    from pourbaix.maps.build import select_species, to_frame
    from pourbaix.maps.result import species_id, state_of
    from pourbaix.physics import energies
    from pourbaix.tables.species import load_species

    if len(parse_elements(element)) != 1:
        raise OptionError("a batch of planes is built for one element (no ratio, no ligands)")
    for name in ("ligands", "ratio", "background"):
        if condition_keywords.get(name):
            raise OptionError(
                f"a batch of planes is built for one element with water only (no {name})"
            )
    if activity is not None and molality is not None:
        raise OptionError("give either activity or molality, not both")
    by_molality = molality is not None
    given = molality if by_molality else activity
    amounts = _as_column(
        "molality" if by_molality else "activity", 1e-6 if given is None else given
    )
    if np.any(amounts <= 0):
        raise ConditionsError(f"activity or molality must be > 0, got {given!r}")
    temps = _as_column("temperature_c", temperature_c)
    ionic = None if ionic_strength is None else _as_column("ionic_strength", ionic_strength)
    try:
        cols = np.broadcast_arrays(temps, amounts, *([] if ionic is None else [ionic]))
    except ValueError as exc:
        raise ConditionsError(
            "temperature, activity/molality and ionic strength must have one length (or be single)"
        ) from exc
    temps, amounts = cols[0], cols[1]
    ionic_col = None if ionic is None else cols[2]
    first = make_conditions(
        element,
        temperature_c=float(temps[0]),
        ionic_strength=None if ionic_col is None else float(ionic_col[0]),
        **{("molality" if by_molality else "activity"): float(amounts[0])},
        **condition_keywords,
    )
    (el,) = first.elements
    for a in np.unique(amounts):  # each amount checked against its plausible range once
        make_conditions(el, **{("molality" if by_molality else "activity"): float(a)})
    if table is None:
        table = load_species(first.dataset, first.data_files)
    energies.reference_species(table, el)
    chosen = select_species(table, el, (), metastable, exclude, only)
    N = len(chosen)
    x = np.array([dict(sp.composition)[el] for sp in chosen], dtype=float)
    charge = np.array([sp.charge for sp in chosen], dtype=float)
    dissolved = np.array([sp.phase == "aq" for sp in chosen])
    M = len(temps)
    planes = np.empty((M, N, 3))
    log_a = np.zeros((M, N))
    log_g = np.zeros((M, N))
    nernst = np.empty(M)
    warn = list(getattr(table, "overrides", ()))
    keys = np.column_stack([temps, np.zeros(M) if ionic_col is None else ionic_col])
    uniq, inverse = np.unique(keys, axis=0, return_inverse=True)
    inverse = inverse.ravel()
    for u, (t, i_val) in enumerate(uniq):
        rows = np.flatnonzero(inverse == u)
        cond = make_conditions(
            el,
            temperature_c=float(t),
            ionic_strength=None if ionic_col is None else float(i_val),
            **{("molality" if by_molality else "activity"): float(amounts[rows[0]])},
            **condition_keywords,
        )
        warn += [n for n in cond.notes if not n.startswith(("activity of", "molality of"))]
        ctx = energies.context_for(table, cond)
        off0, off1 = cond.reference_offset_v, cond.reference_slope_v_per_ph
        base = np.array(
            [
                to_frame(energies.species_energy(sp, el, ctx, 1.0, 1.0).plane, off0, off1)
                for sp in chosen
            ]
        )
        # log10 γ of each dissolved species under the map's model (0 at zero ionic strength)
        lg = np.array(
            [
                math.log10(cond.activity_coefficient(z)) if d else 0.0
                for z, d in zip(charge, dissolved, strict=True)
            ]
        )
        # activity of each dissolved species: the set activity, or molality × γ (compute_map's rule)
        la = np.log10(amounts[rows])[:, None] + (lg[None, :] if by_molality else 0.0)
        la = np.where(dissolved[None, :], la, 0.0)
        p = np.broadcast_to(base, (len(rows), N, 3)).copy()
        # Pourbaix 1974, ch. II: the activity term (k_T / x) log10 a_i of c0
        p[:, :, 0] += ctx.nernst_v * la / x[None, :]
        planes[rows] = p
        log_a[rows] = la
        log_g[rows] = lg[None, :]
        nernst[rows] = ctx.nernst_v
    return PlaneBatch(
        element=el,
        names=tuple(species_id(sp) for sp in chosen),
        states=tuple(state_of(sp, el) for sp in chosen),
        x=x,
        charge=charge,
        dissolved=dissolved,
        solid=np.array([sp.phase in ("s", "l") for sp in chosen]),
        planes=planes,
        log_activity=log_a,
        log_gamma=log_g,
        nernst_v=nernst,
        window=first.window,
        reference=first.reference,
        warnings=tuple(dict.fromkeys(warn)),
    )


def _check_planes(planes):
    P = np.asarray(planes, dtype=float)
    if P.ndim != 3 or P.shape[2] != 3 or P.shape[1] == 0:
        raise ConditionsError(f"planes must be an (M, N, 3) array, got shape {P.shape}")
    return P


def stable_at(planes, ph, potential_v):
    """Stable species and margins at points, for every map of a batch.

    Parameters
    ----------
    planes : array_like, shape (M, N, 3)
        Planes of M maps [V, V/pH, V/V].
    ph, potential_v : array_like, shape (P,)
        The points [-, V].

    Returns
    -------
    dict of ndarray, each (M, P)
        ``species`` (index of the stable species), ``margin_up_v``,
        ``margin_down_v``, ``margin_acid_ph``, ``margin_alkaline_ph``
        (distance to the nearest crossing in that direction, inf where
        none) and ``neighbour_up`` ... (index across it, -1 where none).

    Notes
    -----
    As :meth:`~pourbaix.maps.domain_map.DomainMap.probe`: candidate j overtakes the stable d along the
    vertical through the point at E* = −(Δ0 + Δph pH)/Δe, Δ = plane_j − plane_d.

    Examples
    --------
    >>> r = stable_at([[[0, 0, 0], [1, 0, -1]]], [7.0], [0.5])
    >>> int(r["species"][0, 0]), float(r["margin_up_v"][0, 0])
    (0, 0.5)
    """
    P = _check_planes(planes)
    x = np.atleast_1d(np.asarray(ph, dtype=float))
    y = np.atleast_1d(np.asarray(potential_v, dtype=float))
    x, y = np.broadcast_arrays(x, y)
    if not (np.all(np.isfinite(x)) and np.all(np.isfinite(y))):
        raise ConditionsError("points must be finite numbers (pH and potential)")
    M, N, _ = P.shape
    out = {}
    for s in range(0, M, _BLOCK):
        B = P[s : s + _BLOCK]  # (m, N, 3)
        vals = (
            B[:, None, :, 0]
            + x[None, :, None] * B[:, None, :, 1]
            + y[None, :, None] * B[:, None, :, 2]
        )
        best = np.argmin(vals, axis=2)  # (m, P)
        Pb = np.take_along_axis(B[:, None, :, :], best[:, :, None, None], axis=2)  # (m, P, 1, 3)
        d = B[:, None, :, :] - Pb  # (m, P, N, 3)
        with np.errstate(divide="ignore", invalid="ignore"):
            e_cross = -(d[..., 0] + d[..., 1] * x[None, :, None]) / d[..., 2]
            ph_cross = -(d[..., 0] + d[..., 2] * y[None, :, None]) / d[..., 1]
        up = np.where(d[..., 2] < -1e-15, e_cross, np.inf)
        down = np.where(d[..., 2] > 1e-15, e_cross, -np.inf)
        right = np.where(d[..., 1] < -1e-15, ph_cross, np.inf)
        left = np.where(d[..., 1] > 1e-15, ph_cross, -np.inf)
        iu, idn = np.argmin(up, axis=2), np.argmax(down, axis=2)
        ir, il = np.argmin(right, axis=2), np.argmax(left, axis=2)

        def pick(a, i):
            return np.take_along_axis(a, i[..., None], axis=2)[..., 0]

        parts = {
            "species": best,
            "margin_up_v": np.maximum(pick(up, iu) - y[None, :], 0.0),
            "margin_down_v": np.maximum(y[None, :] - pick(down, idn), 0.0),
            "margin_acid_ph": np.maximum(x[None, :] - pick(left, il), 0.0),
            "margin_alkaline_ph": np.maximum(pick(right, ir) - x[None, :], 0.0),
        }
        for name, idx, key in (
            ("neighbour_up", iu, "margin_up_v"),
            ("neighbour_down", idn, "margin_down_v"),
            ("neighbour_acid", il, "margin_acid_ph"),
            ("neighbour_alkaline", ir, "margin_alkaline_ph"),
        ):
            parts[name] = np.where(np.isfinite(parts[key]), idx, -1)
        for name, v in parts.items():
            out.setdefault(name, []).append(v)
    return {name: np.concatenate(v, axis=0) for name, v in out.items()}


def _candidate_vertices(B, window, triples, pairs):
    """Candidate envelope vertices (m, V) x and y, and whether each lies in the window."""
    x0, x1, y0, y1 = window
    m = B.shape[0]
    c0, cph, ce = (np.ascontiguousarray(B[:, :, n]) for n in range(3))
    i, j, k = triples[:, 0], triples[:, 1], triples[:, 2]
    # three planes meet: (P_i − P_j)·(1, x, y) = 0 and (P_i − P_k)·(1, x, y) = 0 (Cramer's rule)
    a0, a1, a2 = c0[:, i] - c0[:, j], cph[:, i] - cph[:, j], ce[:, i] - ce[:, j]
    b0, b1, b2 = c0[:, i] - c0[:, k], cph[:, i] - cph[:, k], ce[:, i] - ce[:, k]
    det = a1 * b2 - a2 * b1
    p, q = pairs[:, 0], pairs[:, 1]
    d0, d1, d2 = c0[:, p] - c0[:, q], cph[:, p] - cph[:, q], ce[:, p] - ce[:, q]
    with np.errstate(divide="ignore", invalid="ignore"):
        xs = [(a2 * b0 - a0 * b2) / det]
        ys = [(a0 * b1 - a1 * b0) / det]
        # two planes meet on an edge of the window
        for xv in (x0, x1):  # vertical edges: E from the line
            xs.append(np.full(d0.shape, xv))
            ys.append(-(d0 + d1 * xv) / d2)
        for yv in (y0, y1):  # horizontal edges: pH from the line
            xs.append(-(d0 + d2 * yv) / d1)
            ys.append(np.full(d0.shape, yv))
    xs.append(np.broadcast_to(np.array([x0, x1, x1, x0]), (m, 4)))
    ys.append(np.broadcast_to(np.array([y0, y0, y1, y1]), (m, 4)))
    vx = np.concatenate(xs, axis=1)
    vy = np.concatenate(ys, axis=1)
    tol_x = _WINDOW_TOL * (x1 - x0)
    tol_y = _WINDOW_TOL * (y1 - y0)
    with np.errstate(invalid="ignore"):
        inside = (vx >= x0 - tol_x) & (vx <= x1 + tol_x) & (vy >= y0 - tol_y) & (vy <= y1 + tol_y)
    vx = np.clip(np.where(inside, vx, x0), x0, x1)
    vy = np.clip(np.where(inside, vy, y0), y0, y1)
    return vx, vy, inside


def domain_areas(planes, window, workers=None):
    """Exact area of every species' domain in every map of a batch.

    Parameters
    ----------
    planes : array_like, shape (M, N, 3)
        Planes of M maps [V, V/pH, V/V].
    window : (float, float, float, float)
        ``(ph_lo, ph_hi, e_lo, e_hi)`` [-, -, V, V].
    workers : int, optional
        Threads sharing the blocks of maps (numpy releases the interpreter
        lock in its array loops); default min(2, number of CPUs).

    Returns
    -------
    ndarray, shape (M, N)
        Domain areas [pH V]; 0 for a species that is never lowest.

    Notes
    -----
    A domain is convex (an intersection of half planes), so its area follows
    from its vertices in angular order (shoelace formula). Its vertices are
    the envelope vertices at which its plane is lowest: points where three
    planes meet, or two planes meet on the window's edge, or corners of the
    window, with no plane below them (Preparata & Shamos 1985, §7.2).

    Examples
    --------
    >>> domain_areas([[[0, 0, 0], [0, 0, -1]]], (0, 1, -1, 1)).round(6).tolist()
    [[1.0, 1.0]]
    """
    import os

    P = _check_planes(planes)
    x0, x1, y0, y1 = (float(v) for v in window)
    if not (x1 > x0 and y1 > y0):
        raise ConditionsError(
            f"window must be (pH lo, pH hi, E lo, E hi) increasing, got {window!r}"
        )
    M, N, _ = P.shape
    areas = np.zeros((M, N))
    if N == 1:
        areas[:] = (x1 - x0) * (y1 - y0)
        return areas
    triples = np.array(list(combinations(range(N), 3)), dtype=int).reshape(-1, 3)
    pairs = np.array(list(combinations(range(N), 2)), dtype=int).reshape(-1, 2)
    # the planes defining each candidate, in the order of _candidate_vertices
    # (triples; pairs on each of the four edges; the corners, defined by any plane: index N)
    defining = np.concatenate(
        [triples] + [pairs[:, [0, 1, 1]]] * 4 + [np.full((4, 3), N, dtype=int)]
    )
    blocks = [(s, min(s + _BLOCK, M)) for s in range(0, M, _BLOCK)]

    def run(span):
        lo, hi = span
        areas[lo:hi] = _areas_block(P[lo:hi], (x0, x1, y0, y1), triples, pairs, defining)

    workers = min(2, os.cpu_count() or 1) if workers is None else int(workers)
    if workers > 1 and len(blocks) > 1:
        from concurrent.futures import ThreadPoolExecutor

        with ThreadPoolExecutor(max_workers=workers) as pool:
            list(pool.map(run, blocks))
    else:
        for span in blocks:
            run(span)
    return areas


def _areas_block(B, window, triples, pairs, defining):
    x0, x1, y0, y1 = window
    m, N, _ = B.shape
    vx, vy, inside = _candidate_vertices(B, window, triples, pairs)  # (m, V)
    # lowest plane value at each candidate: a running minimum over the planes
    low = B[:, 0, 0, None] + B[:, 0, 1, None] * vx + B[:, 0, 2, None] * vy
    for n in range(1, N):
        np.minimum(low, B[:, n, 0, None] + B[:, n, 1, None] * vx + B[:, n, 2, None] * vy, out=low)
    scale = 1.0 + np.abs(B).max(axis=(1, 2)) * (1.0 + max(abs(x0), abs(x1), abs(y0), abs(y1)))
    tol = _ON_TOL * scale[:, None]
    # a candidate is an envelope vertex only where the planes that define it are lowest
    # there (else it is a point inside some domain); corners always are
    # (the defining planes are equal there by construction, so one of them is checked)
    idx = defining[:, 0]
    real = idx < N
    Bd = B[:, np.where(real, idx, 0)]  # (m, V, 3)
    val = Bd[..., 0] + Bd[..., 1] * vx + Bd[..., 2] * vy
    keep = inside & (~real[None, :] | (val <= low + tol))
    # compact the envelope vertices to the front, then which planes are lowest at each
    width = int(keep.sum(axis=1).max())
    order = np.argsort(~keep, axis=1, kind="stable")[:, :width]
    vx = np.take_along_axis(vx, order, axis=1)
    vy = np.take_along_axis(vy, order, axis=1)
    low = np.take_along_axis(low, order, axis=1)
    kept = np.take_along_axis(keep, order, axis=1)
    vals = B[:, :, 0, None] + B[:, :, 1, None] * vx[:, None, :] + B[:, :, 2, None] * vy[:, None, :]
    on = (vals <= (low + tol)[:, None, :]) & kept[:, None, :]  # (m, N, W)
    count = on.sum(axis=2)
    # vertices of each domain in angular order about their mean (window-normalised units)
    ux, uy = (vx - x0) / (x1 - x0), (vy - y0) / (y1 - y0)
    with np.errstate(invalid="ignore", divide="ignore"):
        cx = (on * ux[:, None, :]).sum(axis=2) / count
        cy = (on * uy[:, None, :]).sum(axis=2) / count
    ang = np.arctan2(uy[:, None, :] - cy[..., None], ux[:, None, :] - cx[..., None])
    ang = np.where(on, ang, np.inf)
    srt = np.argsort(ang, axis=2)
    px = np.take_along_axis(np.broadcast_to(vx[:, None, :], on.shape), srt, axis=2)
    py = np.take_along_axis(np.broadcast_to(vy[:, None, :], on.shape), srt, axis=2)
    valid = np.take_along_axis(on, srt, axis=2)
    # close each polygon: the vertex after the last valid one is the first (shoelace formula)
    nxt = np.roll(np.arange(width), -1)
    last = np.arange(width)[None, None, :] == (count[..., None] - 1)
    qx = np.where(last, px[..., :1], px[..., nxt])
    qy = np.where(last, py[..., :1], py[..., nxt])
    cross = np.where(valid, px * qy - py * qx, 0.0)
    return np.where(count >= 3, np.abs(0.5 * cross.sum(axis=2)), 0.0)


def passive_width(planes, passive, ph, window):
    """Width in potential over which a passivating species is stable at a pH.

    Parameters
    ----------
    planes : array_like, shape (M, N, 3)
        Planes of M maps [V, V/pH, V/V].
    passive : array_like of bool, shape (N,)
        Which species passivate (solid compounds).
    ph : float
        The pH [-].
    window : (float, float, float, float)
        ``(ph_lo, ph_hi, e_lo, e_hi)``; the potential range is searched [V].

    Returns
    -------
    ndarray, shape (M,)
        Total length of potential, within the window, where the stable
        species at ``ph`` passivates [V].

    Examples
    --------
    >>> float(passive_width([[[0, 0, 0], [0.5, 0, -1]]], [False, True], 7.0, (0, 14, -1, 1))[0])
    0.5
    """
    P = _check_planes(planes)
    mask = np.asarray(passive, dtype=bool)
    y0, y1 = float(window[2]), float(window[3])
    M, N, _ = P.shape
    pairs = np.array(list(combinations(range(N), 2)), dtype=int).reshape(-1, 2)
    out = np.empty(M)
    for s in range(0, M, _BLOCK):
        B = P[s : s + _BLOCK]
        a = B[:, :, 0] + B[:, :, 1] * ph  # each species' line c(E) = a + ce E along the vertical
        e = B[:, :, 2]
        da = a[:, pairs[:, 0]] - a[:, pairs[:, 1]]
        de = e[:, pairs[:, 0]] - e[:, pairs[:, 1]]
        with np.errstate(divide="ignore", invalid="ignore"):
            cross = -da / de
        cross = np.where(np.isfinite(cross), np.clip(cross, y0, y1), y0)
        brk = np.sort(
            np.concatenate([np.full((len(B), 1), y0), cross, np.full((len(B), 1), y1)], axis=1),
            axis=1,
        )
        mid = 0.5 * (brk[:, 1:] + brk[:, :-1])
        stable = np.argmin(a[:, None, :] + e[:, None, :] * mid[..., None], axis=2)
        out[s : s + len(B)] = ((brk[:, 1:] - brk[:, :-1]) * mask[stable]).sum(axis=1)
    return out


def solubility_at(batch, ph, potential_v):
    """Total dissolved element at a point for every map of a batch.

    Parameters
    ----------
    batch : PlaneBatch
        The maps.
    ph, potential_v : float
        The point [-, V vs the batch's reference].

    Returns
    -------
    log10_total : ndarray, shape (M,)
        log10 of Σ x_i a_i / γ_i [log10 mol/kg].
    solid : ndarray of int, shape (M,)
        Index of the least-soluble solid, which sets the solubility.

    Notes
    -----
    Per atom of the element, equilibrium of dissolved species i with the
    solid s gives log10 a_i = log10 a_set + x_i (psi_s − psi_i) / k_T
    (Pourbaix 1974, ch. II; the relation of :mod:`pourbaix.analyses.solubility`).

    Examples
    --------
    >>> b = batch_planes("Zn", activity=[1e-6])
    >>> round(float(solubility_at(b, 9.5, 0.0)[0][0]), 2)
    -6.53
    """
    if not batch.dissolved.any() or not batch.solid.any():
        raise ConditionsError(
            f"the {batch.element} species hold no dissolved species or no solid; no solubility"
        )
    P = batch.planes
    psi = P[:, :, 0] + P[:, :, 1] * ph + P[:, :, 2] * potential_v  # (M, N)
    sol_idx = np.flatnonzero(batch.solid)
    s = sol_idx[np.argmin(psi[:, sol_idx], axis=1)]
    psi_s = psi[np.arange(len(psi)), s]
    d = batch.dissolved
    xd = batch.x[d]
    k = batch.nernst_v[:, None]
    log_a = batch.log_activity[:, d] + xd[None, :] * (psi_s[:, None] - psi[:, d]) / k
    terms = log_a - batch.log_gamma[:, d] + np.log10(xd)[None, :]
    top = terms.max(axis=1)
    total = top + np.log10(np.exp((terms - top[:, None]) * math.log(10.0)).sum(axis=1))
    return total, s
