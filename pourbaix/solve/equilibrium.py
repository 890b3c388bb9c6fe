"""Chemical equilibrium under mass balance at fixed pH and potential.

At fixed pH and E the chemical potentials of H+ and e- are set, so every
species s has a transformed standard energy mu_s (a plane over pH and E, in
units of RT here). With totals b of the conserved components (metals and
ligand units) and 1 kg of water, the equilibrium minimises

    G/RT = sum_aq n_s (mu_s + ln gamma_s + ln n_s - 1) + sum_solid n_p mu_p

subject to A^T n = b, n >= 0 (solids at unit activity; Smith & Missen 1982,
ch. 2; Alberty 2003, ch. 4 for the transformed energies). Its Lagrange dual
in the free-component potentials lambda (one per component; ln of the
activity of a free component) is

    maximise  D(lambda) = b . lambda - sum_aq exp(A_s lambda - mu_s - ln gamma_s)
    subject to A_p lambda <= mu_p  for every solid p,

a smooth concave programme: mass action (ln m_s = A_s lambda - mu_s - ln gamma_s)
in a basis of free components, with the phase rule as its active set (a solid
is present exactly where its constraint is active, and its amount is the
constraint's multiplier; at most one solid per component). It is solved by
Newton steps on lambda (the logarithms of the free components) with a line
search (damping) and the classical primal active-set method (Nocedal &
Wright 2006, §16.5), so it converges from any feasible start; a start that
breaks a solubility constraint is shifted inside first. Activity
coefficients follow the ionic strength by an outer fixed-point iteration.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from pourbaix.errors import ConditionsError, PourbaixError

__all__ = [
    "EquilibriumError",
    "EquilibriumResult",
    "solve_equilibrium",
    "solve_at",
    "solve_many",
    "energies_rt",
    "energy_derivatives_rt",
    "sensitivity",
    "MASS_TOLERANCE",
]

MASS_TOLERANCE = 1e-10  # relative mass-balance residual accepted [-]
_EXP_MAX = 700.0  # exp() overflow guard [-]
_STEP_MAX = 25.0  # largest change of any ln(free component) in one step [-]


class EquilibriumError(PourbaixError, ArithmeticError):
    """The equilibrium solver did not converge; the message names the point and residual."""


@dataclass(frozen=True)
class EquilibriumResult:
    """Amounts of every species at one point.

    Attributes
    ----------
    amounts : numpy.ndarray, shape (S,)
        Molality of each dissolved species and amount of each solid, per kg
        of water [mol/kg].
    present : numpy.ndarray of bool, shape (S,)
        Solids present (always False for dissolved species).
    saturation : numpy.ndarray, shape (S,)
        log10 saturation index of each solid (0 where present, < 0 where
        undersaturated); 0 for dissolved species [-].
    log_free : numpy.ndarray, shape (C,)
        ln activity of each free component, lambda [-].
    log_gamma : numpy.ndarray, shape (S,)
        log10 activity coefficient of each dissolved species [-].
    ionic_strength : float
        Ionic strength of the solution [mol/kg].
    residual : float
        Largest relative mass-balance residual [-].
    iterations : int
        Newton iterations taken (all outer ionic-strength passes).
    active : tuple of int
        Rows of the solids present (the active set), for a warm start.
    energies_rt : numpy.ndarray or None, shape (S,)
        mu_s / RT used, with ln gamma_s for the dissolved species, for the
        predictor of a warm start [-].
    water_activity : float or None
        Activity of water computed from the composition (the Pitzer model
        in :func:`solve_at`), which the energies used [-]; None where the
        energies kept the value they were built with.
    """

    amounts: np.ndarray
    present: np.ndarray
    saturation: np.ndarray
    log_free: np.ndarray
    log_gamma: np.ndarray
    ionic_strength: float
    residual: float
    iterations: int
    active: tuple
    energies_rt: np.ndarray | None = None
    water_activity: float | None = None


def _objective(b, lam, A_aq, mu_aq):
    with np.errstate(over="ignore", invalid="ignore"):
        ex = A_aq @ lam - mu_aq
        if np.any(ex > _EXP_MAX):
            return -math.inf
        return float(b @ lam - np.exp(ex).sum())


def _feasible_start(lam, A_s, mu_s):
    """Shift lambda down along (1, ..., 1) until no solid is supersaturated."""
    if len(mu_s) == 0:
        return lam
    excess = A_s @ lam - mu_s
    worst = np.max(excess / A_s.sum(axis=1))
    if worst > -1e-9:
        lam = lam - (worst + 1e-6)
    return lam


def _initial(b, A_aq, mu_aq):
    """A start where each component's largest single-component species holds its total."""
    lam = np.zeros(len(b))
    for j in range(len(b)):
        only = np.flatnonzero((A_aq[:, j] > 0) & (np.count_nonzero(A_aq, axis=1) == 1))
        rows = only if len(only) else np.flatnonzero(A_aq[:, j] > 0)
        if len(rows) == 0:
            lam[j] = math.log(b[j])
            continue
        lam[j] = np.min((mu_aq[rows] + math.log(b[j])) / A_aq[rows, j])
    return lam


def _predict(lam, n_aq, dmu, A_aq, A_s, aq, active, b):
    """Return lambda + d, with A_W d = dmu_W and d minimising sum_aq n_s (A_s d - dmu_s)^2."""
    n_c = len(lam)
    M = (A_aq.T * n_aq) @ A_aq + np.diag(1e-14 * np.maximum(b, 1e-300) + 1e-300)
    rhs = A_aq.T @ (n_aq * dmu[aq])
    k = len(active)
    try:
        if k:
            Aw = A_s[active]
            K = np.zeros((n_c + k, n_c + k))
            K[:n_c, :n_c] = M
            K[:n_c, n_c:] = Aw.T
            K[n_c:, :n_c] = Aw
            d = np.linalg.solve(K, np.concatenate([rhs, dmu[~aq][active]]))[:n_c]
        else:
            d = np.linalg.solve(M, rhs)
    except np.linalg.LinAlgError:
        return lam
    return lam + d if np.all(np.isfinite(d)) else lam


def _independent(rows, A_s, candidate):
    if not rows:
        return True
    if len(rows) == 1:  # two rows: independent unless parallel
        a, c = A_s[rows[0]], A_s[candidate]
        return abs(a @ c) < (1.0 - 1e-12) * math.sqrt((a @ a) * (c @ c))
    M = A_s[list(rows) + [candidate]]
    return np.linalg.matrix_rank(M, tol=1e-9) == len(rows) + 1


@dataclass(frozen=True)
class _Prepared:
    """The arrays of one system that do not change from point to point."""

    A: np.ndarray  # (S, C) counts
    aq: np.ndarray  # (S,) bool
    b: np.ndarray  # (C,) totals
    A_aq: np.ndarray
    A_aq_t: np.ndarray  # contiguous transpose
    A_s: np.ndarray
    solid_rows: np.ndarray
    aq_rows: np.ndarray
    z: np.ndarray  # charges of the dissolved species
    zz: np.ndarray  # their squares
    scale: np.ndarray  # max(b, tiny), for relative residuals
    ridge: np.ndarray  # diagonal regularisation of M
    cap: float  # ln of the largest total + 5
    aq_sums: np.ndarray  # units per dissolved species
    solid_scale: np.ndarray  # per solid, the smallest total / units of the components it holds


def _prepare(counts, aqueous, totals, charges=None):
    """Check and split a system's arrays once (the per-point work is then the Newton steps)."""
    A = np.atleast_2d(np.asarray(counts, dtype=float))
    aq = np.asarray(aqueous, dtype=bool)
    b = np.asarray(totals, dtype=float)
    if not np.all(np.isfinite(b)) or np.any(b <= 0):
        raise ConditionsError(f"totals must be numbers > 0 mol/kg, got {list(b)}")
    held = (A > 0).any(axis=0)
    if not held.all():
        raise ConditionsError(f"component(s) {list(np.flatnonzero(~held))} are held by no species")
    A_aq = np.ascontiguousarray(A[aq])
    z = np.zeros(int(aq.sum())) if charges is None else np.asarray(charges, dtype=float)[aq]
    scale = np.maximum(b, 1e-300)
    return _Prepared(
        A=A,
        aq=aq,
        b=b,
        A_aq=A_aq,
        A_aq_t=np.ascontiguousarray(A_aq.T),
        A_s=np.ascontiguousarray(A[~aq]),
        solid_rows=np.flatnonzero(~aq),
        aq_rows=np.flatnonzero(aq),
        z=z,
        zz=z * z,
        scale=scale,
        ridge=1e-14 * scale + 1e-300,  # keeps M regular where dissolved amounts vanish
        cap=math.log(float(np.max(b))) + 5.0,
        aq_sums=A_aq.sum(axis=1),
        solid_scale=np.array(
            [np.min(scale[row > 0] / row[row > 0]) for row in A[~aq]], dtype=float
        ).reshape(-1),
    )


def _warm_active_set(lam, active, A_s, mu_s, n_comp):
    """Keep the previous solids (independent ones) with lambda on their constraints.

    A solid the move supersaturates joins them (least change of lambda); returns (lam, W).
    """
    W = []
    for p in active:
        if _independent(W, A_s, p):
            W.append(p)
    for _ in range(len(mu_s) + 1):
        if W:
            Aw = A_s[W]
            lam = lam - Aw.T @ np.linalg.solve(Aw @ Aw.T, Aw @ lam - mu_s[W])
        if not len(mu_s):
            return lam, W
        excess = A_s @ lam - mu_s
        excess[W] = 0.0
        worst = int(np.argmax(excess))
        if excess[worst] <= 1e-9:
            return lam, W
        if len(W) < n_comp and _independent(W, A_s, worst):
            W.append(worst)
        else:
            break
    return _feasible_start(lam, A_s, mu_s), []


def _solve_fixed_gamma(prep, mu_aq, mu_s, lam, active, max_iter):
    """Active-set Newton on the concave dual; returns (lam, active, solid amounts, iterations)."""
    b, A_aq, A_aq_t, A_s = prep.b, prep.A_aq, prep.A_aq_t, prep.A_s
    n_c = len(b)
    lam = np.array(lam, dtype=float)
    # a start whose dissolved amounts would far exceed the totals moves down first
    over = float(np.max((A_aq @ lam - mu_aq - prep.cap) / prep.aq_sums))
    if over > 0:
        lam = lam - over
    lam, W = _warm_active_set(lam, active, A_s, mu_s, n_c)
    # putting lambda on the previous solids' constraints may lift it where the dissolved
    # amounts overflow (there the line search cannot tell ascent): start below instead
    over = float(np.max((A_aq @ lam - mu_aq - prep.cap) / prep.aq_sums))
    if over > 0:
        lam, W = _feasible_start(lam - over, A_s, mu_s), []
    scale = prep.scale
    diag = np.arange(n_c)
    solve = np.linalg.solve
    n_s = len(mu_s)
    nu = np.zeros(0)
    rel = math.inf
    for it in range(1, max_iter + 1):
        ex = A_aq @ lam - mu_aq
        clipped = ex.max() > _EXP_MAX
        n = np.exp(np.minimum(ex, _EXP_MAX) if clipped else ex)
        g = b - A_aq_t @ n
        M = (A_aq_t * n) @ A_aq
        M[diag, diag] += prep.ridge
        k = len(W)
        try:
            if k:
                Aw = A_s[W]
                K = np.zeros((n_c + k, n_c + k))
                K[:n_c, :n_c] = M
                K[:n_c, n_c:] = Aw.T
                K[n_c:, :n_c] = Aw
                sol = solve(K, np.concatenate([g, np.zeros(k)]))
                step, nu = sol[:n_c], sol[n_c:]
                resid = g - Aw.T @ nu
            else:
                step = solve(M, g)
                nu = np.zeros(0)
                resid = g
        except np.linalg.LinAlgError:
            raise EquilibriumError(
                "singular Newton system (the solids given are degenerate)"
            ) from None
        rel = float((np.abs(resid) / scale).max())
        big = float(np.abs(step).max())
        if big < 1e-10 or rel < MASS_TOLERANCE * 1e-2:
            if k:
                # a solid with a negative amount leaves (phase rule); "negative" on the scale of
                # the totals of the components it holds, so that clipping it to 0 keeps the
                # mass balance within its tolerance
                short = nu / prep.solid_scale[W]
                if short.min() < -1e-2 * MASS_TOLERANCE:
                    W.pop(int(np.argmin(short)))
                    continue
            # converged: the residual is tiny, or rounding stops the steps with it in bounds
            if rel < MASS_TOLERANCE * 1e-2 or (big < 1e-14 and rel < MASS_TOLERANCE):
                return lam, W, nu, it
        alpha = min(1.0, _STEP_MAX / big) if big > 0 else 1.0
        # ratio test: the first solid whose constraint the step would break
        block = None
        if n_s:
            rate = A_s @ step
            rate[W] = 0.0
            if rate.max() > 1e-300:
                slack = np.maximum(mu_s - A_s @ lam, 0.0)
                t = np.full(n_s, np.inf)
                np.divide(slack, rate, out=t, where=rate > 1e-300)
                q = int(np.argmin(t))
                if t[q] < alpha:
                    alpha, block = float(t[q]), q
        # damping: backtracking (Armijo) on the concave dual, full steps near the solution
        if big * alpha > 1e-3:
            d0 = -math.inf if clipped else float(b @ lam - n.sum())
            slope = float(g @ step)
            rounding = 1e-13 * (abs(d0) + float(np.abs(b @ lam))) if math.isfinite(d0) else 0.0
            a = alpha
            while a > 1e-12:
                if _objective(b, lam + a * step, A_aq, mu_aq) >= d0 + 1e-4 * a * slope - rounding:
                    break
                a *= 0.5
            if a < alpha:
                block = None
            alpha = a
        lam = lam + alpha * step
        if block is not None:
            if _independent(W, A_s, block):
                W.append(block)
            # exactly on the constraint, so rounding does not make it look broken
            lam = lam + A_s[block] * ((mu_s[block] - A_s[block] @ lam) / (A_s[block] @ A_s[block]))
    raise EquilibriumError(
        f"equilibrium did not converge in {max_iter} Newton steps "
        f"(largest relative mass-balance residual {rel:.1e})"
    )


def solve_equilibrium(
    counts,
    energies_rt,
    aqueous,
    totals,
    *,
    charges=None,
    log_gamma=None,
    background_ionic_strength=0.0,
    start=None,
    max_iter=200,
    max_outer=60,
    composition_log_gamma=None,
):
    """Amounts of all species at equilibrium for given totals (the numerical core).

    Parameters
    ----------
    counts : array_like, shape (S, C)
        Units of each conserved component in each species [-].
    energies_rt : array_like, shape (S,)
        Transformed standard energy of each species at the point, mu_s / (R T) [-].
    aqueous : array_like of bool, shape (S,)
        True for dissolved species, False for solids (unit activity).
    totals : array_like, shape (C,)
        Total of each component [mol/kg]; all > 0.
    charges : array_like, shape (S,), optional
        Charges, for the ionic strength [-].
    log_gamma : callable, optional
        ``log_gamma(charges, ionic_strength) -> log10 gamma`` for the dissolved
        species; None for ideal solution (gamma = 1).
    background_ionic_strength : float
        Ionic strength of a background electrolyte, added to that of the
        system's own ions [mol/kg].
    start : EquilibriumResult, optional
        A neighbouring solution to start from (warm start).
    max_iter : int
        Newton steps allowed per ionic-strength pass.
    max_outer : int
        Ionic-strength (or activity-coefficient) passes allowed.
    composition_log_gamma : callable, optional
        ``f(molalities) -> log10 gamma`` of the dissolved species from their
        molalities (in the order of the dissolved rows), for models with
        specific terms such as Pitzer's
        (:func:`pourbaix.physics.pitzer.solver_log_gamma`); replaces
        ``log_gamma``. The passes then iterate on the coefficients, with
        Anderson mixing of depth 1 (Anderson 1965; Walker & Ni 2011), until
        they change by less than 1e-12 in log10.

    Returns
    -------
    EquilibriumResult

    Raises
    ------
    ConditionsError
        For totals not > 0 or a component no species holds.
    EquilibriumError
        If the solver does not converge (the message gives the residual).

    Notes
    -----
    Mass action in the free-component basis, ln m_s = A_s lambda - mu_s -
    ln gamma_s, with solids at unit activity where present (A_p lambda =
    mu_p); see the module docstring. Ionic strength I = I_bg + 1/2 sum m_s z_s^2
    (Lewis & Randall 1921) over the system's dissolved species; the ions
    that fix the pH are not counted.

    References
    ----------
    Smith, W. R. & Missen, R. W. (1982). *Chemical Reaction Equilibrium
    Analysis: Theory and Algorithms*. Wiley, ch. 2 and 6.
    Nocedal, J. & Wright, S. J. (2006). *Numerical Optimization*, 2nd ed.
    Springer, §16.5 (active-set methods).
    Anderson, D. G. (1965). Iterative procedures for nonlinear integral
    equations. J. ACM 12, 547-560.
    Walker, H. F. & Ni, P. (2011). Anderson acceleration for fixed-point
    iterations. SIAM J. Numer. Anal. 49, 1715-1735.

    Examples
    --------
    >>> import numpy as np
    >>> # M(s) and M+ (aq) with mu(M+) = 0: below saturation everything dissolves
    >>> r = solve_equilibrium([[1], [1]], [0.0, 5.0], [True, False], [1e-3])
    >>> float(r.amounts[0])
    0.001
    """
    prep = _prepare(counts, aqueous, totals, charges)
    return _solve_prepared(
        prep,
        np.asarray(energies_rt, dtype=float),
        log_gamma=log_gamma,
        background_ionic_strength=background_ionic_strength,
        start=start,
        max_iter=max_iter,
        max_outer=max_outer,
        composition_log_gamma=composition_log_gamma,
    )


def _solve_composition_gamma(
    prep, mu_aq0, mu_s, lam, active, lg, function, max_iter, max_outer, water=None
):
    """Passes of the fixed-gamma solve with gamma from the composition, Anderson-mixed.

    With ``water = (n_aq, n_s, ln_aw0, ln_aw)``, ``function`` also returns ln a_w
    and the energies follow it: mu_s / RT moves by -n_s (ln a_w - ln_aw0), n_s the
    water taken up in forming species s (Robinson & Stokes 1959, eq. 2.17 for a_w).

    Returns (lam, active, solid amounts, molalities, log10 gamma, ln a_w or None,
    Newton iterations).
    """
    ln10 = math.log(10.0)
    total_it = 0
    previous = None  # (x, residual) of the last pass
    change = math.inf
    n_aq = n_s = None
    w0 = w = 0.0
    if water is not None:
        n_aq, n_s, w0, w = water
    for _ in range(max_outer):
        shift_aq = 0.0 if water is None else -n_aq * (w - w0)
        shift_s = 0.0 if water is None else -n_s * (w - w0)
        lam, active, nu, it = _solve_fixed_gamma(
            prep, mu_aq0 + shift_aq + lg * ln10, mu_s + shift_s, lam, active, max_iter
        )
        total_it += it
        m = np.exp(np.minimum(prep.A_aq @ lam - mu_aq0 - shift_aq - lg * ln10, _EXP_MAX))
        if water is None:
            x = lg
            residual = np.asarray(function(m), dtype=float) - lg
        else:
            new_lg, new_w = function(m)
            x = np.append(lg, w)
            residual = np.append(np.asarray(new_lg, dtype=float) - lg, float(new_w) - w)
        change = float(np.max(np.abs(residual))) if len(residual) else 0.0
        if not math.isfinite(change):
            break
        if change <= 1e-12:
            return lam, active, nu, m, lg, (None if water is None else w), total_it
        step = residual
        if previous is not None:
            # Anderson mixing, depth 1 (a secant step on the residual)
            d_res = residual - previous[1]
            denom = float(d_res @ d_res)
            if denom > 0:
                theta = float(residual @ d_res) / denom
                step = residual - theta * ((x - previous[0]) + d_res)
        previous = (x, residual)
        x = x + step
        if water is None:
            lg = x
        else:
            lg, w = x[:-1], float(x[-1])
    raise EquilibriumError(
        f"activity coefficients did not settle in {max_outer} passes "
        f"(last change {change:.1e} in log10 gamma"
        + ("" if water is None else " or ln a_w")
        + ")"
    )


def _solve_prepared(
    prep,
    mu,
    *,
    log_gamma,
    background_ionic_strength,
    start,
    max_iter=200,
    max_outer=60,
    composition_log_gamma=None,
    water=None,
):
    """:func:`solve_equilibrium` on a system checked and split by :func:`_prepare`.

    ``water = (n, ln_aw0)``: the water taken up in forming each species and ln a_w
    of ``mu``; ``composition_log_gamma`` then also returns ln a_w, which the
    energies follow (see :func:`_solve_composition_gamma`).
    """
    aq, b, A_aq, A_s = prep.aq, prep.b, prep.A_aq, prep.A_s
    solid_rows = prep.solid_rows
    mu_aq0, mu_s = mu[aq], mu[~aq]
    z = prep.z
    ln10 = math.log(10.0)
    if start is not None:
        lam = np.asarray(start.log_free, dtype=float)
        active = [int(np.searchsorted(solid_rows, p)) for p in start.active]
        ionic = float(start.ionic_strength)
        old = start.energies_rt
        if old is not None and len(old) == len(mu):
            # first-order predictor: the change of lambda that keeps the dissolved amounts
            # (least squares, weighted by amount) and the solids present (exactly)
            mu_new = mu.copy()
            mu_new[aq] += start.log_gamma[aq] * ln10
            if water is not None and start.water_activity is not None:
                mu_new -= water[0] * (math.log(start.water_activity) - water[1])
            lam = _predict(lam, start.amounts[aq], mu_new - old, A_aq, A_s, aq, active, b)
    else:
        lam = _initial(b, A_aq, mu_aq0)
        active = []
        ionic = float(background_ionic_strength)
    total_it = 0
    lg = np.zeros(len(mu_aq0))
    ln_aw = None
    if composition_log_gamma is not None:
        loop_water = None
        if water is not None:
            n_w, w0 = water
            w_start = w0
            if start is not None and start.water_activity is not None:
                w_start = math.log(start.water_activity)
            loop_water = (n_w[aq], n_w[~aq], w0, w_start)
        if start is not None and len(start.log_gamma) == len(mu):
            lg = np.asarray(start.log_gamma, dtype=float)[aq]
        lam, active, nu, m, lg, ln_aw, total_it = _solve_composition_gamma(
            prep,
            mu_aq0,
            mu_s,
            lam,
            active,
            lg,
            composition_log_gamma,
            max_iter,
            max_outer,
            water=loop_water,
        )
        if ln_aw is not None:  # the energies used: the water activity of the composition
            mu = mu - water[0] * (ln_aw - water[1])
            mu_s = mu[~aq]
        ionic = float(background_ionic_strength + 0.5 * (m @ prep.zz))
    else:
        for _ in range(max_outer):
            if log_gamma is not None:
                lg = np.asarray(log_gamma(z, ionic), dtype=float) * np.ones(len(mu_aq0))
            mu_aq = mu_aq0 + lg * ln10
            lam, W, nu, it = _solve_fixed_gamma(prep, mu_aq, mu_s, lam, active, max_iter)
            total_it += it
            active = W
            m = np.exp(np.minimum(A_aq @ lam - mu_aq, _EXP_MAX))
            new_ionic = float(background_ionic_strength + 0.5 * (m @ prep.zz))
            if log_gamma is None or abs(new_ionic - ionic) <= 1e-12 * (1.0 + new_ionic):
                ionic = new_ionic
                break
            ionic = new_ionic
        else:
            raise EquilibriumError(
                f"ionic strength did not settle in {max_outer} passes (last {ionic:.6g} mol/kg)"
            )
    amounts = np.zeros(len(mu))
    amounts[prep.aq_rows] = m
    present = np.zeros(len(mu), dtype=bool)
    if active:
        amounts[solid_rows[active]] = np.maximum(nu, 0.0)
        present[solid_rows[active]] = True
    resid = b - prep.A.T @ amounts
    rel = float(np.max(np.abs(resid) / b))
    if rel > MASS_TOLERANCE:
        raise EquilibriumError(
            f"equilibrium ended with a relative mass-balance residual of {rel:.1e} "
            f"(more than {MASS_TOLERANCE:g})"
        )
    sat = np.zeros(len(mu))
    if len(mu_s):
        sat[solid_rows] = np.minimum((A_s @ lam - mu_s) / ln10, 0.0)
        if active:
            sat[solid_rows[active]] = 0.0
    lgam = np.zeros(len(mu))
    lgam[prep.aq_rows] = lg
    return EquilibriumResult(
        amounts=amounts,
        present=present,
        saturation=sat,
        log_free=lam,
        log_gamma=lgam,
        ionic_strength=ionic,
        residual=rel,
        iterations=total_it,
        active=tuple(int(solid_rows[p]) for p in active),
        energies_rt=mu + lgam * ln10,
        water_activity=None if ln_aw is None else math.exp(ln_aw),
    )


def solve_at(
    system,
    ph,
    potential_v,
    *,
    activity_model=None,
    background_ionic_strength=0.0,
    start=None,
    specific_log_gamma=None,
    background=None,
):
    """Equilibrium of a :class:`~pourbaix.physics.components.MassBalanceSystem` at one point.

    Parameters
    ----------
    system : MassBalanceSystem
        Species, counts, planes and totals.
    ph : float
        pH.
    potential_v : float
        Potential [V vs SHE].
    activity_model : str, optional
        Activity-coefficient model name (see
        :data:`pourbaix.physics.solution.ACTIVITY_MODELS`); None for ideal.
    background_ionic_strength : float
        Ionic strength of a background electrolyte [mol/kg].
    start : EquilibriumResult, optional
        Warm start.
    specific_log_gamma : array_like, optional
        A constant added to log10 gamma of each dissolved species (in the
        system's order), e.g. the SIT medium terms sum_k eps(j, k) m_k of
        :func:`pourbaix.physics.sit.medium_terms` [-].
    background : dict or str, optional
        Background salts [mol/kg] (e.g. ``"NaCl=1"``); with
        ``activity_model="pitzer"`` their ions join the system's dissolved
        species in one Pitzer evaluation
        (:func:`pourbaix.physics.pitzer.solver_log_gamma`), so the HMW84 binary
        and ternary terms act between all of them.

    Returns
    -------
    EquilibriumResult

    Raises
    ------
    ConditionsError
        Non-finite pH or potential; Pitzer away from 25 °C or beyond 20 mol/kg.
    EquilibriumError
        No convergence; the message names the point.

    Examples
    --------
    >>> from pourbaix.physics.components import build_system
    >>> s = build_system("Cu", {"Cu": 1e-3})
    >>> r = solve_at(s, 2.0, 0.6)
    >>> s.names[int(r.amounts.argmax())]
    'Cu^2+'
    """
    if not (math.isfinite(float(ph)) and math.isfinite(float(potential_v))):
        raise ConditionsError(f"pH and potential must be finite, got {ph}, {potential_v}")
    mu = energies_rt(system, ph, potential_v)
    lg = None
    composition = None
    water = None
    if activity_model is not None and str(activity_model).strip().lower() == "pitzer":
        composition = _pitzer_function(system, background)
        # the water activity of the brine, fed back into every equilibrium that takes up water
        water = (system.water_counts, math.log(system.water_activity))
    elif activity_model is not None:
        from pourbaix.physics import solution

        t = system.temperature_c

        extra = 0.0
        if specific_log_gamma is not None:
            extra = np.asarray(specific_log_gamma, dtype=float)[system.aqueous]

        def lg(z, ionic):
            return solution.log_gamma(z, ionic, t, model=activity_model) + extra

    try:
        return _solve_prepared(
            _prepared_for(system),
            mu,
            log_gamma=lg,
            background_ionic_strength=background_ionic_strength,
            start=start,
            composition_log_gamma=composition,
            water=water,
        )
    except EquilibriumError as exc:
        raise EquilibriumError(
            f"at pH {float(ph):g}, E {float(potential_v):g} V vs SHE: {exc}"
        ) from None


def _initial_many(prep, mu_aq):
    """:func:`_initial` for many points at once, shape (P, C)."""
    b, A_aq = prep.b, prep.A_aq
    lam = np.zeros((mu_aq.shape[0], len(b)))
    single = np.count_nonzero(A_aq, axis=1) == 1
    for j in range(len(b)):
        only = np.flatnonzero((A_aq[:, j] > 0) & single)
        rows = only if len(only) else np.flatnonzero(A_aq[:, j] > 0)
        if len(rows) == 0:
            lam[:, j] = math.log(b[j])
            continue
        lam[:, j] = np.min((mu_aq[:, rows] + math.log(b[j])) / A_aq[rows, j], axis=1)
    return lam


def _batch_newton(prep, mu_aq, mu_s, max_iter=100):
    """The active-set Newton of :func:`_solve_fixed_gamma` on many points at once (ideal).

    Every point carries a system of fixed size C + N_solids: inactive solids get an identity
    row (their multiplier is 0), so one batched ``numpy.linalg.solve`` serves all points.

    Returns (lam (P, C), active (P, N) bool, nu (P, N), done (P,) bool, iterations (P,)).
    """
    b, A_aq, A_s = prep.b, prep.A_aq, prep.A_s
    n_p, n_c, n_s = mu_aq.shape[0], len(b), A_s.shape[0]
    lam = _initial_many(prep, mu_aq)
    over = np.max((lam @ A_aq.T - mu_aq - prep.cap) / prep.aq_sums, axis=1)
    lam -= np.maximum(over, 0.0)[:, None]
    if n_s:
        worst = np.max((lam @ A_s.T - mu_s) / A_s.sum(axis=1), axis=1)
        lam -= np.where(worst > -1e-9, worst + 1e-6, 0.0)[:, None]
    W = np.zeros((n_p, n_s), dtype=bool)
    nu = np.zeros((n_p, n_s))
    done = np.zeros(n_p, dtype=bool)
    iterations = np.zeros(n_p, dtype=int)
    scale = prep.scale
    size = n_c + n_s
    eye_s = np.eye(n_s)
    ridge = np.diag(prep.ridge)
    for _ in range(max_iter):
        todo = np.flatnonzero(~done)
        if not len(todo):
            break
        iterations[todo] += 1
        L, Wt, mu_a, mu_b = lam[todo], W[todo], mu_aq[todo], mu_s[todo]
        ex = L @ A_aq.T - mu_a
        n = np.exp(np.minimum(ex, _EXP_MAX))
        g = b - n @ A_aq
        K = np.zeros((len(todo), size, size))
        K[:, :n_c, :n_c] = np.einsum("ps,sc,sd->pcd", n, A_aq, A_aq) + ridge
        if n_s:
            w = Wt.astype(float)
            K[:, :n_c, n_c:] = A_s.T[None, :, :] * w[:, None, :]
            K[:, n_c:, :n_c] = A_s[None, :, :] * w[:, :, None]
            K[:, n_c:, n_c:] = eye_s[None, :, :] * (1.0 - w)[:, None, :]
        rhs = np.zeros((len(todo), size))
        rhs[:, :n_c] = g
        try:
            sol = np.linalg.solve(K, rhs[..., None])[..., 0]
        except np.linalg.LinAlgError:
            return lam, W, nu, done, iterations  # the scalar solver takes the rest
        step, nu_t = sol[:, :n_c], sol[:, n_c:] * Wt
        resid = g - nu_t @ A_s
        rel = np.max(np.abs(resid) / scale, axis=1)
        big = np.max(np.abs(step), axis=1)
        near = (big < 1e-10) | (rel < MASS_TOLERANCE * 1e-2)
        if n_s:
            short = np.where(Wt, nu_t / prep.solid_scale, np.inf)
            leave = near & (short.min(axis=1) < -1e-2 * MASS_TOLERANCE)
            for k in np.flatnonzero(leave):  # a solid with a negative amount leaves
                W[todo[k], int(np.argmin(short[k]))] = False
        else:
            leave = np.zeros(len(todo), dtype=bool)
        finished = (
            near
            & ~leave
            & ((rel < MASS_TOLERANCE * 1e-2) | ((big < 1e-14) & (rel < MASS_TOLERANCE)))
        )
        done[todo[finished]] = True
        nu[todo[finished]] = nu_t[finished]
        move = ~finished & ~leave
        if not move.any():
            continue
        idx = np.flatnonzero(move)
        st, bg = step[idx], big[idx]
        alpha = np.minimum(1.0, _STEP_MAX / np.where(bg > 0, bg, 1.0))
        block = np.full(len(idx), -1)
        Lm = L[idx]
        if n_s:
            rate = st @ A_s.T
            rate[Wt[idx]] = 0.0
            slack = np.maximum(mu_b[idx] - Lm @ A_s.T, 0.0)
            with np.errstate(divide="ignore", invalid="ignore"):
                t = np.where(rate > 1e-300, slack / rate, np.inf)
            q = np.argmin(t, axis=1)
            tq = t[np.arange(len(idx)), q]
            hit = tq < alpha
            alpha = np.where(hit, tq, alpha)
            block = np.where(hit, q, -1)
        # damping: backtracking (Armijo) on the concave dual where the step is not small
        damp = bg * alpha > 1e-3
        if damp.any():
            nm = n[idx]
            clipped = ex[idx].max(axis=1) > _EXP_MAX
            d0 = np.where(clipped, -np.inf, Lm @ b - nm.sum(axis=1))
            slope = np.einsum("pc,pc->p", g[idx], st)
            rounding = np.where(np.isfinite(d0), 1e-13 * (np.abs(d0) + np.abs(Lm @ b)), 0.0)
            a = alpha.copy()
            pending = damp.copy()
            for _ in range(45):
                if not pending.any():
                    break
                trial = Lm[pending] + a[pending, None] * st[pending]
                with np.errstate(over="ignore", invalid="ignore"):
                    e_t = trial @ A_aq.T - mu_aq[todo[idx[pending]]]
                    value = np.where(
                        e_t.max(axis=1) > _EXP_MAX, -np.inf, trial @ b - np.exp(e_t).sum(axis=1)
                    )
                ok = value >= d0[pending] + 1e-4 * a[pending] * slope[pending] - rounding[pending]
                sel = np.flatnonzero(pending)
                pending[sel[ok]] = False
                a[sel[~ok]] *= 0.5
                pending &= a > 1e-12
            block = np.where(a < alpha, -1, block)
            alpha = a
        new = Lm + alpha[:, None] * st
        for k in np.flatnonzero(block >= 0):
            q = int(block[k])
            p = todo[idx[k]]
            rows = list(np.flatnonzero(W[p]))
            if len(rows) < n_c and _independent(rows, A_s, q):
                W[p, q] = True
            # exactly on the constraint, so rounding does not make it look broken
            new[k] += A_s[q] * ((mu_s[p, q] - A_s[q] @ new[k]) / (A_s[q] @ A_s[q]))
        lam[todo[idx]] = new
    return lam, W, nu, done, iterations


def solve_many(system, ph, potential_v):
    """Equilibria of a system at many points at once (ideal solution).

    Parameters
    ----------
    system : MassBalanceSystem
        Species, counts, planes and totals.
    ph : array_like, shape (P,)
        pH of each point.
    potential_v : array_like, shape (P,)
        Potential of each point [V vs SHE].

    Returns
    -------
    list of EquilibriumResult
        As :func:`solve_at` would give at each point (ideal solution). The
        Newton steps of all points are taken together (one batched linear
        solve per step); a point the batch does not settle is solved by
        :func:`solve_at`.

    Raises
    ------
    ConditionsError
        Non-finite pH or potential.
    EquilibriumError
        A point that does not converge (the message names it).

    Examples
    --------
    >>> from pourbaix.physics.components import build_system
    >>> s = build_system("Cu", {"Cu": 1e-3})
    >>> [s.names[int(r.amounts.argmax())] for r in solve_many(s, [2.0, 5.0], [0.6, -0.5])]
    ['Cu^2+', 'Cu']
    """
    x = np.asarray(ph, dtype=float).ravel()
    y = np.asarray(potential_v, dtype=float).ravel()
    if x.shape != y.shape or not (np.all(np.isfinite(x)) and np.all(np.isfinite(y))):
        raise ConditionsError("pH and potential must be finite arrays of one length")
    prep = _prepared_for(system)
    P = system.planes
    mu = (P[:, 0] + np.outer(x, P[:, 1]) + np.outer(y, P[:, 2])) * (
        math.log(10.0) / system.nernst_v
    )
    aq = prep.aq
    lam, W, nu, done, iterations = _batch_newton(prep, mu[:, aq], mu[:, ~aq])
    ln10 = math.log(10.0)
    n_species = len(system.names)
    m = np.exp(np.minimum(lam @ prep.A_aq.T - mu[:, aq], _EXP_MAX))
    amounts = np.zeros((len(x), n_species))
    amounts[:, prep.aq_rows] = m
    present = np.zeros((len(x), n_species), dtype=bool)
    saturation = np.zeros((len(x), n_species))
    if len(prep.solid_rows):
        amounts[:, prep.solid_rows] = np.where(W, np.maximum(nu, 0.0), 0.0)
        present[:, prep.solid_rows] = W
        saturation[:, prep.solid_rows] = np.where(
            W, 0.0, np.minimum((lam @ prep.A_s.T - mu[:, ~aq]) / ln10, 0.0)
        )
    rel = np.max(np.abs(prep.b - amounts @ prep.A) / prep.b, axis=1)
    ionic = 0.5 * (m @ prep.zz)
    zeros = np.zeros(n_species)
    out = []
    for k in range(len(x)):
        if not done[k] or rel[k] > MASS_TOLERANCE:
            out.append(solve_at(system, x[k], y[k]))  # the batch did not settle this point
            continue
        out.append(
            EquilibriumResult(
                amounts=amounts[k],
                present=present[k],
                saturation=saturation[k],
                log_free=lam[k],
                log_gamma=zeros,
                ionic_strength=float(ionic[k]),
                residual=float(rel[k]),
                iterations=int(iterations[k]),
                active=tuple(prep.solid_rows[W[k]].tolist()),
                energies_rt=mu[k],
            )
        )
    return out


_PITZER = {}  # (id(system), background) -> (system, function)


def _pitzer_function(system, background):
    from pourbaix.physics import pitzer

    key = (id(system), repr(background))
    got = _PITZER.get(key)
    if got is not None and got[0] is system:
        return got[1]
    aq = system.aqueous
    function = pitzer.solver_log_gamma(
        [n for n, a in zip(system.names, aq, strict=True) if a],
        [int(z) for z, a in zip(system.charges, aq, strict=True) if a],
        background,
        system.temperature_c,
        water=True,
    )
    if len(_PITZER) >= 8:
        _PITZER.pop(next(iter(_PITZER)))
    _PITZER[key] = (system, function)
    return function


def sensitivity(system, result, denergies_rt):
    """First-order change of an equilibrium with the species' energies (implicit functions).

    Parameters
    ----------
    system : MassBalanceSystem
        The system solved.
    result : EquilibriumResult
        Its equilibrium at a point.
    denergies_rt : array_like, shape (S,) or (S, k)
        Derivative of each species' mu_s / (R T) along k directions, e.g.
        :func:`energy_derivatives_rt` [-].

    Returns
    -------
    dlog_free : numpy.ndarray, shape (C,) or (C, k)
        Derivative of lambda, the ln activities of the free components [-].
    dlog_amounts : numpy.ndarray, shape (S,) or (S, k)
        Derivative of ln m_s of each dissolved species; for each solid
        present, the derivative of its amount [mol/kg]; 0 for absent solids.

    Notes
    -----
    The equilibrium conditions A_aq^T n + A_W^T nu = b with ln n_s = A_s lambda
    - mu_s, and A_W lambda = mu_W for the solids present, differentiated at
    fixed activity coefficients (the implicit-function theorem; Allgower &
    Georg 1990, ch. 1): [[M, A_W^T], [A_W, 0]] [dlambda; dnu] = [A_aq^T N
    dmu_aq; dmu_W], M = A_aq^T N A_aq. The change of the activity
    coefficients with the point is left out, so with an activity model this is
    the Jacobian of a quasi-Newton method.

    References
    ----------
    Allgower, E. L. & Georg, K. (1990). *Numerical Continuation Methods*.
    Springer, ch. 1.
    """
    prep = _prepared_for(system)
    dmu = np.asarray(denergies_rt, dtype=float)
    flat = dmu.ndim == 1
    dmu = dmu.reshape(len(dmu), -1)
    aq = prep.aq
    n = result.amounts[aq]
    A_aq, A_s = prep.A_aq, prep.A_s
    n_c = len(prep.b)
    solid_pos = [int(np.searchsorted(prep.solid_rows, p)) for p in result.active]
    k = len(solid_pos)
    K = np.zeros((n_c + k, n_c + k))
    K[:n_c, :n_c] = (prep.A_aq_t * n) @ A_aq
    K[np.arange(n_c), np.arange(n_c)] += prep.ridge
    rhs = np.zeros((n_c + k, dmu.shape[1]))
    rhs[:n_c] = prep.A_aq_t @ (n[:, None] * dmu[aq])
    if k:
        Aw = A_s[solid_pos]
        K[:n_c, n_c:] = Aw.T
        K[n_c:, :n_c] = Aw
        rhs[n_c:] = dmu[~aq][solid_pos]
    try:
        sol = np.linalg.solve(K, rhs)
    except np.linalg.LinAlgError:
        sol = np.full_like(rhs, np.nan)
    dlam = sol[:n_c]
    dlog = np.zeros_like(dmu)
    dlog[prep.aq_rows] = A_aq @ dlam - dmu[aq]
    if k:
        dlog[prep.solid_rows[solid_pos]] = sol[n_c:]  # the amounts of the solids present
    if flat:
        return dlam[:, 0], dlog[:, 0]
    return dlam, dlog


def energy_derivatives_rt(system, reference_slope_v_per_ph=0.0):
    """d(mu_s / RT)/dpH and d(mu_s / RT)/dE of every species, shape (S, 2) [-, 1/V].

    Parameters
    ----------
    system : MassBalanceSystem
        The system.
    reference_slope_v_per_ph : float
        dE_SHE/dpH at fixed potential vs the reference (the reversible hydrogen
        electrode's -k_T; 0 for the others) [V].
    """
    c = math.log(10.0) / system.nernst_v
    P = system.planes
    return np.column_stack([(P[:, 1] + P[:, 2] * reference_slope_v_per_ph) * c, P[:, 2] * c])


_PREPARED = {}  # id(system) -> (system, _Prepared), the last few systems solved


def _prepared_for(system):
    got = _PREPARED.get(id(system))
    if got is not None and got[0] is system:
        return got[1]
    prep = _prepare(system.counts, system.aqueous, system.totals, system.charges)
    if len(_PREPARED) >= 8:
        _PREPARED.pop(next(iter(_PREPARED)))
    _PREPARED[id(system)] = (system, prep)
    return prep


def energies_rt(system, ph, potential_v):
    """mu_s / (R T) of every species of a system at (pH, E vs SHE) [-].

    Notes
    -----
    mu_s / RT = phi_s F / (R T) = phi_s ln10 / k_T, with phi_s the plane in
    volts (:mod:`pourbaix.physics.components`) and k_T = R T ln10 / F.
    """
    P = system.planes
    phi = P[:, 0] + P[:, 1] * float(ph) + P[:, 2] * float(potential_v)
    return phi * (math.log(10.0) / system.nernst_v)
