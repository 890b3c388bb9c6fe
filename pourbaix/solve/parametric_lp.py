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
does not lead across an edge) is solved by HiGHS through
:func:`scipy.optimize.linprog` (Huangfu & Hall 2018).

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
Dantzig, G. B. (1963). Linear Programming and Extensions, ch. 7 (the simplex
pivot). Princeton University Press.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from pourbaix.errors import ConditionsError

__all__ = ["CriticalRegion", "solve_at", "critical_region", "walk", "optimal_combinations"]

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
    x, y = poly[:, 0], poly[:, 1]
    return 0.5 * float(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))


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


def _basis_from_solution(A, c, amounts, duals):
    """Complete the support of a vertex solution to a dual-feasible basis."""
    k = A.shape[0]
    basis = [int(s) for s in np.flatnonzero(amounts > _AMOUNT_TOL)]
    reduced = c - A.T @ duals
    scale = 1.0 + np.abs(c).max()
    for j in np.argsort(reduced, kind="stable"):
        if len(basis) == k:
            break
        if j in basis or reduced[j] > 1e-9 * scale:
            continue
        if np.linalg.matrix_rank(A[:, [*basis, int(j)]]) == len(basis) + 1:
            basis.append(int(j))
    if len(basis) != k or np.linalg.matrix_rank(A[:, basis]) < k:
        return None
    return tuple(sorted(basis))


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
    nonbasic = np.setdiff1d(np.arange(len(costs)), basis)
    scale = 1.0 + np.abs(costs).max()
    V, L = _clip_labelled(window, D, nonbasic, _COST_TOL * scale)
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
    amounts, _, duals = solve_at(costs, A.T, r, point[0], point[1])
    c = costs[:, 0] + costs[:, 1] * point[0] + costs[:, 2] * point[1]
    return _basis_from_solution(A, c, amounts, duals)


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
    solved with HiGHS just beyond the edge. A last check that the regions
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
    found = {}
    for reg in walk(costs, counts, ratio, window):
        support = reg.support
        if support in found:
            continue
        # the basis is ascending, so the positive amounts are in the order of the support
        found[support] = np.array([n for n in reg.amounts if n > _AMOUNT_TOL], dtype=float)
    return [(s, found[s]) for s in sorted(found, key=lambda s: (len(s), s))]
