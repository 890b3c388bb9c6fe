"""Several metals at a fixed ratio by multi-parametric linear programming: walk the optimal bases.

At a fixed ratio r of k metals the stable assemblage at (pH, E) is the optimum
of the linear programme

    min  Σ_s n_s c_s(pH, E)   subject to   A n = r,  n >= 0

where column s of A counts the metal atoms in species s and each cost
c_s = c0_s + cph_s pH + ce_s E is linear in pH and E. For an optimal basis B
(k columns) the amounts B⁻¹ r do not depend on (pH, E) and the reduced costs
d_j = c_j − c_Bᵀ B⁻¹ A_j are linear in (pH, E); the basis stays optimal on
the convex polygon ``window ∩ {d_j >= 0 for every j}``, its critical region
(Gal & Nedoma 1972; Borrelli, Bemporad & Morari 2017, ch. 6). Each edge of
that polygon inside the window is a line where one non-basic column j prices
in; entering j by a simplex pivot gives the basis on the other side. Walking
from one solved point across every edge visits each region once, so the work
grows with the number of domains, not with the number of species
combinations that an enumeration would solve.

The linear programme at the starting point (and wherever a degenerate pivot
does not lead across an edge) is solved by a small two-phase revised simplex
method written here in numpy (:func:`simplex_basis`; Dantzig 1963, ch. 5-7;
Bland 1977 against cycling): with k metals the basis is k x k, so each pivot
costs one small inverse and a k x N product, and the command does not pay
for importing :mod:`scipy.optimize`. :func:`solve_at` solves one point with
HiGHS through :func:`scipy.optimize.linprog` (Huangfu & Hall 2018) as an
independent reference.

References
----------
Gal, T. & Nedoma, J. (1972). Multiparametric linear programming. Management
Science 18(7), 406-422. https://doi.org/10.1287/mnsc.18.7.406
Borrelli, F., Bemporad, A. & Morari, M. (2017). Predictive Control for Linear
and Hybrid Systems, ch. 6 (multiparametric programming). Cambridge University
Press.
Huangfu, Q. & Hall, J. A. J. (2018). Parallelizing the dual revised simplex
method. Mathematical Programming Computation 10, 119-142.
https://doi.org/10.1007/s12532-017-0130-5
Dantzig, G. B. (1963). Linear Programming and Extensions, ch. 5-7 (the simplex
method, its two phases and the pivot). Princeton University Press.
Bland, R. G. (1977). New finite pivoting rules for the simplex method.
Mathematics of Operations Research 2(2), 103-107.
https://doi.org/10.1287/moor.2.2.103
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from pourbaix.errors import ConditionsError

__all__ = [
    "CriticalRegion",
    "solve_at",
    "simplex_basis",
    "critical_region",
    "walk",
    "optimal_combinations",
    "combinations_of",
    "envelope_of_regions",
]

# Amounts at or below this (mol per mol of metal) are zero: the same positivity
# tolerance as the enumeration of combinations (systems.ratio_combinations).
_AMOUNT_TOL = 1e-9
# Reduced costs within this of zero [V per mol of metal] count as zero.
_COST_TOL = 1e-10
# Regions smaller than this fraction of the window's area are touching points.
_AREA_TOL = 1e-12
# Step across an edge, as a fraction of the window's diagonal.
_STEP = 1e-7


@dataclass(frozen=True)
class CriticalRegion:
    """Where one basis of the linear programme stays optimal.

    Attributes
    ----------
    basis : tuple of int
        Species (columns) of the basis, ascending.
    amounts : ndarray, shape (k,)
        Amounts of the basis species per mole of metal [mol/mol] (B⁻¹ r).
    polygon : ndarray, shape (m, 2)
        Counter-clockwise vertices of the region in (pH, E) [-, V].
    edge_columns : tuple of int
        For each edge (vertex i to i+1) the column whose reduced cost vanishes
        along it, or -1 for an edge on the window.
    """

    basis: tuple
    amounts: np.ndarray
    polygon: np.ndarray
    edge_columns: tuple

    @property
    def support(self):
        """Species with a positive amount, ascending."""
        return tuple(
            int(s) for s, n in zip(self.basis, self.amounts, strict=True) if n > _AMOUNT_TOL
        )

    @property
    def area(self):
        """Area of the region [pH V]."""
        return _area(self.polygon)


def _area(poly):
    # shoelace formula over a handful of vertices: plain floats beat numpy here
    pts = poly.tolist()
    total = 0.0
    px, py = pts[-1]
    for qx, qy in pts:
        total += px * qy - py * qx
        px, py = qx, qy
    return 0.5 * total


def _check(costs, counts, ratio, window):
    costs = np.asarray(costs, dtype=float)
    counts = np.asarray(counts, dtype=float)
    r = np.asarray(ratio, dtype=float)
    if costs.ndim != 2 or costs.shape[1] != 3:
        raise ConditionsError(f"costs must be an (N, 3) array of planes, got shape {costs.shape}")
    if counts.shape != (len(costs), len(r)):
        raise ConditionsError(
            f"counts must be (N, k) = ({len(costs)}, {len(r)}) species x metals, got {counts.shape}"
        )
    if not (np.all(np.isfinite(r)) and np.all(r > 0)):
        raise ConditionsError(f"ratio amounts must be finite numbers > 0, got {ratio!r}")
    x0, x1, y0, y1 = (float(v) for v in window)
    if not (x1 > x0 and y1 > y0):
        raise ConditionsError(
            f"window must be (pH lo, pH hi, E lo, E hi) increasing, got {window!r}"
        )
    return costs, counts.T.copy(), r / r.sum(), (x0, x1, y0, y1)


def solve_at(costs, counts, ratio, ph, potential_v):
    """Solve the linear programme at one point with HiGHS.

    Parameters
    ----------
    costs : array_like, shape (N, 3)
        Cost planes ``(c0, cph, ce)`` of the species per formula unit
        [V, V/pH, V/V].
    counts : array_like, shape (N, k)
        Metal atoms in each species.
    ratio : array_like, shape (k,)
        Amounts of the metals (normalised to a total of 1) [mol].
    ph, potential_v : float
        The point [-, V].

    Returns
    -------
    amounts : ndarray, shape (N,)
        Optimal amounts per mole of metal [mol/mol].
    value : float
        Optimal cost per mole of metal [V].
    duals : ndarray, shape (k,)
        Prices of the metal balances [V] (reduced costs are c − Aᵀ duals).

    Raises
    ------
    ConditionsError
        If the ratio cannot be met by the species.

    Examples
    --------
    >>> n, value, _ = solve_at([[0, 0, 0], [0, 0, 0], [-1, 0, 0]], [[1, 0], [0, 1], [1, 1]],
    ...                        [1, 1], 7.0, 0.0)
    >>> [round(float(v), 6) for v in n], round(value, 6)
    ([0.0, 0.0, 0.5], -0.5)
    """
    from scipy.optimize import linprog

    c_arr = np.asarray(costs, dtype=float)
    A = np.asarray(counts, dtype=float).T
    r = np.asarray(ratio, dtype=float)
    r = r / r.sum()
    c = c_arr[:, 0] + c_arr[:, 1] * ph + c_arr[:, 2] * potential_v
    res = linprog(c, A_eq=A, b_eq=r, bounds=(0, None), method="highs-ds")
    if res.status != 0:
        raise ConditionsError(f"no combination of the species matches the ratio ({res.message})")
    return res.x, float(res.fun), np.asarray(res.eqlin.marginals, dtype=float)


def simplex_basis(costs, counts, ratio, ph, potential_v):
    """An optimal basis of the linear programme at one point, by the revised simplex method.

    Parameters
    ----------
    costs : array_like, shape (N, 3)
        Cost planes ``(c0, cph, ce)`` of the species per formula unit
        [V, V/pH, V/V].
    counts : array_like, shape (N, k)
        Metal atoms in each species (rank k: every metal in some species).
    ratio : array_like, shape (k,)
        Amounts of the metals [mol] (normalised to a total of 1).
    ph, potential_v : float
        The point [-, V].

    Returns
    -------
    tuple of int
        k columns, ascending, of a basis that is primal feasible (amounts
        B⁻¹ r >= 0) and dual feasible (reduced costs >= 0) at the point.

    Raises
    ------
    ConditionsError
        If the ratio cannot be met by the species.

    Notes
    -----
    Phase 1 minimises the sum of k artificial columns (the identity) from the
    basis made of them; an artificial left in the basis at zero is pivoted
    out on any column with a non-zero entry in its row; phase 2 then
    minimises the costs (Dantzig 1963, ch. 5). The entering column is the
    most negative reduced cost, switching to the lowest index (Bland 1977)
    after a run of degenerate pivots, so the method cannot cycle.

    Examples
    --------
    Two metals 2:1 and a 1:1 compound cheaper than the pure metals: the
    compound takes all of the second metal, the first metal's excess stays.

    >>> simplex_basis([[0, 0, 0], [0, 0, 0], [-1, 0, 0]], [[1, 0], [0, 1], [1, 1]],
    ...               [2, 1], 7.0, 0.0)
    (0, 2)
    """
    c_arr = np.asarray(costs, dtype=float)
    A = np.asarray(counts, dtype=float).T
    r = np.asarray(ratio, dtype=float)
    r = r / r.sum()
    c = c_arr[:, 0] + c_arr[:, 1] * ph + c_arr[:, 2] * potential_v
    return _simplex_basis(c, A, r)


def _simplex_basis(c, A, r):
    k, n = A.shape
    extended = np.hstack([A, np.eye(k)])
    # phase 1: the artificial columns n..n+k-1 start as the basis (r >= 0)
    phase1 = np.concatenate([np.zeros(n), np.ones(k)])
    basis = _simplex(phase1, extended, r, list(range(n, n + k)))
    inverse = np.linalg.inv(extended[:, basis])
    infeasibility = float(phase1[basis] @ (inverse @ r))
    if infeasibility > 1e-9:
        raise ConditionsError(
            "no combination of the species matches the ratio "
            f"(an infeasible linear programme: {infeasibility:.3g} mol/mol left unmatched)"
        )
    for pos in range(k):  # artificials left at zero leave for a real column
        if basis[pos] < n:
            continue
        inverse = np.linalg.inv(extended[:, basis])
        row = inverse[pos] @ A
        row[[b for b in basis if b < n]] = 0.0
        j = int(np.argmax(np.abs(row)))
        if abs(row[j]) <= 1e-9:
            raise ConditionsError("the metal balances are not independent (a metal in no species)")
        basis[pos] = j
    basis = _simplex(c, A, r, basis)
    return tuple(sorted(int(b) for b in basis))


_BLAND_AFTER = 20  # degenerate pivots in a row before the lowest-index rule takes over


def _simplex(c, A, r, basis):
    """Revised simplex from a feasible basis (Dantzig 1963, ch. 7; Bland 1977): an optimal basis."""
    k, n = A.shape
    scale = 1.0 + float(np.abs(c).max())
    degenerate_run = 0
    for _ in range(50 * (n + k)):
        inverse = np.linalg.inv(A[:, basis])
        x_b = inverse @ r
        reduced = c - (c[basis] @ inverse) @ A
        reduced[basis] = 0.0
        negative = np.flatnonzero(reduced < -1e-11 * scale)
        if not len(negative):
            return basis
        if degenerate_run >= _BLAND_AFTER:
            entering = int(negative[0])
        else:
            entering = int(negative[np.argmin(reduced[negative])])
        w = inverse @ A[:, entering]
        ok = np.flatnonzero(w > 1e-12)
        if not len(ok):
            raise ConditionsError("the linear programme is unbounded (a species of negative size?)")
        ratios = np.maximum(x_b[ok], 0.0) / w[ok]
        least = ratios.min()
        ties = ok[ratios <= least + 1e-12]
        leave = int(ties[np.argmin(np.asarray(basis)[ties])])  # lowest index leaves (Bland)
        degenerate_run = degenerate_run + 1 if least <= 1e-12 else 0
        basis[leave] = entering
    raise ConditionsError("the simplex method did not converge")


def _reduced_planes(costs, A, r, basis):
    B = A[:, list(basis)]
    try:
        inverse = np.linalg.inv(B)  # k x k, k the number of metals
    except np.linalg.LinAlgError:
        return None, None, None
    W = inverse @ A  # B⁻¹ A  (k, N)
    x_b = inverse @ r
    # reduced costs d_j = c_j − c_Bᵀ B⁻¹ A_j, each a plane in (pH, E) (Gal & Nedoma 1972)
    D = costs - W.T @ costs[list(basis)]
    return D, W, x_b


def _clip_labelled(window, D, columns, tol):
    """Window ∩ {D_j·(1, pH, E) >= 0}: vertices and the column that makes each edge."""
    x0, x1, y0, y1 = window
    V = np.array([[x0, y0], [x1, y0], [x1, y1], [x0, y1]], dtype=float)
    L = [-1, -1, -1, -1]
    Dc = D[columns]
    if not len(columns):
        return V, L
    while True:
        vals = Dc[:, 0][:, None] + Dc[:, 1][:, None] * V[:, 0] + Dc[:, 2][:, None] * V[:, 1]
        worst = vals.min(axis=1)
        j = int(np.argmin(worst))
        if worst[j] >= -tol:
            return V, L
        v = vals[j].tolist()
        pts = V.tolist()  # plain floats: a handful of vertices, cheaper than numpy scalars
        label = int(columns[j])
        out_v, out_l = [], []
        n = len(pts)
        for i in range(n):
            (px, py), (qx, qy) = pts[i], pts[(i + 1) % n]
            vp, vq = v[i], v[(i + 1) % n]
            if vp >= -tol:
                out_v.append((px, py))
                if vq < -tol and vp > tol:
                    t = vp / (vp - vq)
                    out_l.append(L[i])
                    out_v.append((px + t * (qx - px), py + t * (qy - py)))
                    out_l.append(label)
                elif vq < -tol:
                    out_l.append(label)  # p on the line, q outside
                else:
                    out_l.append(L[i])
            elif vq > tol:
                t = vp / (vp - vq)
                out_v.append((px + t * (qx - px), py + t * (qy - py)))
                out_l.append(L[i])
        if len(out_v) < 3:
            return None, None
        V = np.array(out_v)
        L = out_l


def critical_region(costs, counts, ratio, basis, window):
    """The critical region of a basis: where it stays optimal inside the window.

    Parameters
    ----------
    costs : array_like, shape (N, 3)
        Cost planes of the species per formula unit [V, V/pH, V/V].
    counts : array_like, shape (N, k)
        Metal atoms in each species.
    ratio : array_like, shape (k,)
        Amounts of the metals [mol].
    basis : sequence of int
        k columns forming an invertible, primal-feasible basis.
    window : (float, float, float, float)
        ``(ph_lo, ph_hi, e_lo, e_hi)`` [-, -, V, V].

    Returns
    -------
    CriticalRegion or None
        None when the basis is singular, infeasible, or optimal nowhere in
        the window (less than a sliver).

    Examples
    --------
    >>> reg = critical_region([[0, 0, 0], [0, 0, 0], [-1, 0.1, 0]], [[1, 0], [0, 1], [1, 1]],
    ...                       [1, 1], (0, 1), (0, 14, -1, 1))
    >>> reg.support, round(reg.area, 6)
    ((0, 1), 8.0)
    """
    costs, A, r, window = _check(costs, counts, ratio, window)
    return _region(costs, A, r, tuple(sorted(int(b) for b in basis)), window)


def _region(costs, A, r, basis, window, reduced=None):
    D, _, x_b = _reduced_planes(costs, A, r, basis) if reduced is None else reduced
    if D is None or np.any(x_b < -_AMOUNT_TOL):
        return None
    scale = 1.0 + np.abs(costs).max()
    tol = _COST_TOL * scale
    # a reduced cost >= 0 at the window's four corners is >= 0 all over it (linear): only
    # the columns negative at some corner can cut the region
    x0, x1, y0, y1 = window
    lows = D[:, 0] + np.minimum(D[:, 1] * x0, D[:, 1] * x1) + np.minimum(D[:, 2] * y0, D[:, 2] * y1)
    cutting = lows < -tol
    cutting[list(basis)] = False
    V, L = _clip_labelled(window, D, np.flatnonzero(cutting), tol)
    if V is None:
        return None
    win_area = (window[1] - window[0]) * (window[3] - window[2])
    if _area(V) <= _AREA_TOL * win_area:
        return None
    return CriticalRegion(basis, np.maximum(x_b, 0.0), V, tuple(L))


def _pivot(W, x_b, basis, entering):
    """Basis after entering column ``entering`` (ratio test; Dantzig 1963, ch. 7).

    ``W`` is B⁻¹ A and ``x_b`` is B⁻¹ r of the current basis.
    """
    w = W[:, entering]
    ok = w > 1e-12
    if not ok.any():
        return None
    ratios = np.where(ok, np.maximum(x_b, 0.0) / np.where(ok, w, 1.0), np.inf)
    leave = int(np.argmin(ratios))
    new = list(basis)
    new[leave] = int(entering)
    return tuple(sorted(new))


def _dual_feasible_at(reduced, point, scale):
    D, _, x_b = reduced
    if D is None or np.any(x_b < -_AMOUNT_TOL):
        return False
    d = D[:, 0] + D[:, 1] * point[0] + D[:, 2] * point[1]
    return bool(d.min() >= -1e-9 * scale)


def _lp_basis(costs, A, r, point):
    c = costs[:, 0] + costs[:, 1] * point[0] + costs[:, 2] * point[1]
    return _simplex_basis(c, A, r)


def walk(costs, counts, ratio, window, start=None):
    """Every critical region of the fixed-ratio linear programme in a window.

    Parameters
    ----------
    costs : array_like, shape (N, 3)
        Cost planes ``(c0, cph, ce)`` of the species per formula unit, in the
        window's potential frame [V, V/pH, V/V].
    counts : array_like, shape (N, k)
        Metal atoms in each species (k metals).
    ratio : array_like, shape (k,)
        Amounts of the metals [mol]; normalised to a total of 1.
    window : (float, float, float, float)
        ``(ph_lo, ph_hi, e_lo, e_hi)`` [-, -, V, V].
    start : (float, float), optional
        First point solved; the window's centre by default.

    Returns
    -------
    list of CriticalRegion
        Regions in the order they were found; together they cover the window.

    Raises
    ------
    ConditionsError
        If the ratio cannot be met, or the inputs do not fit together.

    Notes
    -----
    From the basis optimal at the start point, each region's inner edges are
    crossed by a pivot on the column whose reduced cost vanishes there
    (Borrelli, Bemporad & Morari 2017, §6.3). Where the vertex is degenerate
    (an amount of zero in the basis) a pivot may lead to another basis of the
    same vertex instead of across the edge; then the linear programme is
    solved just beyond the edge (:func:`simplex_basis`). A last check that the regions
    cover the whole window solves the programme inside any gap left.

    Examples
    --------
    >>> regions = walk([[0, 0, 0], [0, 0, 0], [-1, 0.1, 0]], [[1, 0], [0, 1], [1, 1]],
    ...                [1, 1], (0, 14, -1, 1))
    >>> sorted({reg.support for reg in regions})
    [(0, 1), (2,)]
    """
    costs, A, r, window = _check(costs, counts, ratio, window)
    x0, x1, y0, y1 = window
    diag = float(np.hypot(x1 - x0, y1 - y0))
    scale = 1.0 + float(np.abs(costs).max())
    start = ((x0 + x1) / 2, (y0 + y1) / 2) if start is None else tuple(start)
    regions, seen, degenerate = [], set(), False
    stack = []
    cache = {}

    def reduced(basis):
        if basis not in cache:
            cache[basis] = _reduced_planes(costs, A, r, basis)
        return cache[basis]

    def push_point(point):
        b = _lp_basis(costs, A, r, point)
        if b is not None:
            stack.append(b)

    push_point(start)
    while True:
        while stack:
            basis = stack.pop()
            if basis in seen:
                continue
            seen.add(basis)
            D, W, x_b = reduced(basis)
            reg = _region(costs, A, r, basis, window, (D, W, x_b))
            if reg is None:
                continue
            regions.append(reg)
            if np.any(reg.amounts <= _AMOUNT_TOL):
                degenerate = True
            V, L = reg.polygon, reg.edge_columns
            for i, j in enumerate(L):
                if j < 0:
                    continue
                mid = 0.5 * (V[i] + V[(i + 1) % len(V)])
                grad = D[j, 1:]
                norm = float(np.hypot(*grad))
                if norm == 0.0:
                    continue
                point = mid - _STEP * diag * grad / norm  # just outside: d_j < 0 there
                if not (x0 <= point[0] <= x1 and y0 <= point[1] <= y1):
                    continue
                nb = _pivot(W, x_b, basis, j)
                if nb is not None and nb in seen:
                    continue
                if nb is not None and _dual_feasible_at(reduced(nb), point, scale):
                    stack.append(nb)
                else:
                    push_point(point)
        gap = _uncovered_point(regions, window, degenerate)
        if gap is None:
            return regions
        basis = _lp_basis(costs, A, r, gap)
        if basis is None or basis in seen:
            raise ConditionsError(
                "the walk over optimal bases left part of the window uncovered; "
                "use the enumeration of combinations for this system"
            )
        stack.append(basis)


def _uncovered_point(regions, window, degenerate):
    """A point of the window no region covers, or None."""
    x0, x1, y0, y1 = window
    win_area = (x1 - x0) * (y1 - y0)
    total = sum(reg.area for reg in regions)
    if not degenerate and abs(total - win_area) <= 1e-9 * win_area:
        return None
    import shapely

    # snapped to a grid far below any meaningful difference: the overlay of regions that
    # share edges up to rounding is not reliable in floating point without it
    grid = 1e-9 * max(x1 - x0, y1 - y0)
    covered = shapely.union_all([shapely.Polygon(reg.polygon) for reg in regions], grid_size=grid)
    rest = shapely.box(x0, y0, x1, y1).difference(covered, grid_size=grid)
    if rest.area <= 1e-9 * win_area:
        return None
    parts = getattr(rest, "geoms", [rest])
    biggest = max(parts, key=lambda g: g.area)
    p = biggest.representative_point()
    return (float(p.x), float(p.y))


def optimal_combinations(costs, counts, ratio, window):
    """The species sets that are stable somewhere in the window, with their amounts.

    A drop-in for :func:`pourbaix.maps.systems.ratio_combinations` that returns
    only the sets optimal somewhere in the window (found by :func:`walk`)
    instead of every set that matches the ratio.

    Parameters
    ----------
    costs : array_like, shape (N, 3)
        Cost planes of the species per formula unit [V, V/pH, V/V].
    counts : array_like, shape (N, k)
        Metal atoms in each species.
    ratio : array_like, shape (k,)
        Amounts of the metals [mol].
    window : (float, float, float, float)
        ``(ph_lo, ph_hi, e_lo, e_hi)`` [-, -, V, V].

    Returns
    -------
    list of (tuple of int, ndarray)
        Species indices (ascending) and their amounts per mole of metal
        [mol/mol], ordered by set size and then by indices.

    Examples
    --------
    >>> combos = optimal_combinations([[0, 0, 0], [0, 0, 0], [-1, 0.1, 0]],
    ...                               [[1, 0], [0, 1], [1, 1]], [1, 1], (0, 14, -1, 1))
    >>> [(c, [round(float(v), 3) for v in n]) for c, n in combos]
    [((2,), [0.5]), ((0, 1), [0.5, 0.5])]
    """
    return combinations_of(walk(costs, counts, ratio, window))


def combinations_of(regions):
    """The species sets of critical regions, each once, with their amounts.

    Parameters
    ----------
    regions : sequence of CriticalRegion
        As :func:`walk` returns them.

    Returns
    -------
    list of (tuple of int, ndarray)
        Species indices (ascending) and their amounts per mole of metal
        [mol/mol], ordered by set size and then by indices.

    Examples
    --------
    >>> regions = walk([[0, 0, 0], [0, 0, 0], [-1, 0.1, 0]], [[1, 0], [0, 1], [1, 1]],
    ...                [1, 1], (0, 14, -1, 1))
    >>> [c for c, _ in combinations_of(regions)]
    [(2,), (0, 1)]
    """
    found = {}
    for reg in regions:
        support = reg.support
        if support in found:
            continue
        # the basis is ascending, so the positive amounts are in the order of the support
        found[support] = np.array([n for n in reg.amounts if n > _AMOUNT_TOL], dtype=float)
    return [(s, found[s]) for s in sorted(found, key=lambda s: (len(s), s))]


# Vertices closer than this (window-normalised units) are one; a plane within this
# of the lowest at a vertex [V, relative to 1 + the largest |value|] is on it: the
# tolerances of the envelope solve (pourbaix.solve.envelope).
_VERTEX_TOL = 1e-9
_PLANE_TOL = 1e-9


def envelope_of_regions(regions, planes, window):
    """The exact lower envelope of the walk's combinations, assembled from its regions.

    The critical regions already tile the window, so the domains and shared
    edges of the combinations' planes follow from the regions' vertices
    alone: no second solve (and no import of :mod:`scipy.spatial`).

    Parameters
    ----------
    regions : sequence of CriticalRegion
        As :func:`walk` returns them.
    planes : array_like, shape (M, 3)
        Energy planes per mole of metal of the combinations, in the order of
        :func:`combinations_of` [V, V/pH, V/V] (``Σ n_s c_s``).
    window : (float, float, float, float)
        ``(ph_lo, ph_hi, e_lo, e_hi)`` [-, -, V, V], as walked.

    Returns
    -------
    pourbaix.solve.envelope.Envelope or None
        The same result as :func:`pourbaix.solve.envelope.lower_envelope`
        of ``planes`` (domains ordered counter-clockwise, shared edges with
        their lines), or None when the domains do not tile the window (two
        combinations of equal energy over an area): then solve the envelope
        of the planes directly.

    Notes
    -----
    Every vertex of a domain is a vertex of some region. At each vertex the
    combinations whose plane is lowest there are found; vertices where
    regions of one combination meet (inside its domain or on an edge: fewer
    than three lowest planes inside the window, fewer than two on its sides,
    not a corner) are dropped. A domain is the set of vertices where its
    plane is lowest, ordered by angle (it is convex),
    and two domains share an edge where they share two vertices (a linear
    function equal to the concave lower envelope at two points equals it
    between them).

    Examples
    --------
    >>> costs, counts, ratio = [[0, 0, 0], [0, 0, 0], [-1, 0.1, 0]], [[1, 0], [0, 1], [1, 1]], [1, 1]
    >>> regions = walk(costs, counts, ratio, (0, 14, -1, 1))
    >>> combos = combinations_of(regions)
    >>> planes = [n @ np.asarray(costs, dtype=float)[list(c)] for c, n in combos]
    >>> env = envelope_of_regions(regions, planes, (0, 14, -1, 1))
    >>> [round(float(e.start[0]), 6) for e in env.edges]
    [10.0]
    """
    from pourbaix.solve.envelope import Edge, Envelope, unique_points

    x0, x1, y0, y1 = (float(v) for v in window)
    dx, dy = x1 - x0, y1 - y0
    planes = np.asarray(planes, dtype=float)
    n = len(planes)
    # window-normalised (u, v) as in the envelope solve
    A = np.column_stack(
        [planes[:, 0] + planes[:, 1] * x0 + planes[:, 2] * y0, planes[:, 1] * dx, planes[:, 2] * dy]
    )
    corners = np.array([[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0]])
    uv = np.vstack(
        [corners]
        + [
            np.column_stack([(r.polygon[:, 0] - x0) / dx, (r.polygon[:, 1] - y0) / dy])
            for r in regions
        ]
    )
    uv = np.clip(uv, 0.0, 1.0)
    uv = unique_points(uv, _VERTEX_TOL)
    vals = A[:, 0][None, :] + np.outer(uv[:, 0], A[:, 1]) + np.outer(uv[:, 1], A[:, 2])
    low = vals.min(axis=1)
    member = vals <= low[:, None] + _PLANE_TOL * (1.0 + np.abs(low).max())
    # Where regions of one combination meet (bases that differ in a zero amount), their
    # vertices lie inside its domain or on its edges. A vertex of the envelope is a
    # corner of the window, or a point of the window's side where two planes are
    # lowest, or an inner point where three or more are.
    on_side = (uv <= 0.0).any(axis=1) | (uv >= 1.0).any(axis=1)
    corner = ((uv <= 0.0) | (uv >= 1.0)).all(axis=1)
    lowest = member.sum(axis=1)
    keep = corner | (on_side & (lowest >= 2)) | (lowest >= 3)
    uv, member = uv[keep], member[keep]
    polygons = [None] * n
    total = 0.0
    for i in range(n):
        pts = uv[member[:, i]]
        if len(pts) < 3:
            continue
        centre = pts.mean(axis=0)
        pts = pts[np.argsort(np.arctan2(pts[:, 1] - centre[1], pts[:, 0] - centre[0]))]
        area = _area(pts)
        if area <= _AREA_TOL:
            continue
        total += area
        polygons[i] = np.column_stack([x0 + dx * pts[:, 0], y0 + dy * pts[:, 1]])
    if abs(total - 1.0) > 1e-9:
        return None  # overlapping domains (coincident planes): not a tiling
    stable = [i for i in range(n) if polygons[i] is not None]
    sub = member[:, stable].astype(np.int32)
    shared = sub.T @ sub
    edges = []
    for a, b in zip(*np.nonzero(np.triu(shared, 1) >= 2), strict=True):
        i, j = stable[a], stable[b]
        pts = uv[member[:, i] & member[:, j]]
        d = pts - pts[0]
        direction = d[np.argmax(np.hypot(d[:, 0], d[:, 1]))]
        t = d @ direction
        p_uv, q_uv = pts[np.argmin(t)], pts[np.argmax(t)]
        if np.hypot(*(q_uv - p_uv)) <= _VERTEX_TOL:
            continue
        p = (x0 + dx * float(p_uv[0]), y0 + dy * float(p_uv[1]))
        q = (x0 + dx * float(q_uv[0]), y0 + dy * float(q_uv[1]))
        if p[0] > q[0] or (p[0] == q[0] and p[1] > q[1]):
            p, q = q, p
        # boundary line psi_i = psi_j: d0 + dph pH + de E = 0
        d0, dph, de = (float(v) for v in planes[i] - planes[j])
        if abs(de) <= 1e-14:
            edges.append(Edge((i, j), p, q, float("nan"), float("inf"), -d0 / dph))
        else:
            edges.append(Edge((i, j), p, q, -d0 / de, -dph / de))
    return Envelope(polygons, edges, {}, (x0, x1, y0, y1))


