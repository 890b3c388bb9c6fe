"""Mass-balanced equilibrium against an independent Gibbs minimisation and hand calculations.

The independent reference minimises the Gibbs energy by enumerating the solid
assemblages the phase rule allows (at most one solid per component) and, for
each, maximising the Lagrange dual with scipy.optimize (trust-exact) on the
affine set where the assemblage's solids are saturated; the lowest feasible
Gibbs energy wins (Smith & Missen 1982, ch. 2). The energies are formed in this
file from the table rows (Pourbaix 1974, ch. III), not by the code under test.
"""

import itertools
import math

import numpy as np
import pytest
from scipy.linalg import lstsq, null_space
from scipy.optimize import minimize

from pourbaix.errors import ConditionsError, OptionError, PourbaixError
from pourbaix.physics.components import build_system, parse_totals
from pourbaix.solve.equilibrium import (
    EquilibriumError,
    energy_derivatives_rt,
    sensitivity,
    solve_at,
    solve_equilibrium,
    solve_many,
)
from pourbaix.tables.species import load_species

# CODATA 2018 constants
R_KJ = 8.314462618e-3  # kJ/(mol K)
FARADAY_KJ = 96.48533212  # kJ/(mol V)
RT = R_KJ * 298.15
K25 = RT * math.log(10) / FARADAY_KJ  # 0.0591597 V

TABLE = load_species()
G_WATER = TABLE.get("H2O", "l").dgf_kj_mol


def mu_over_rt(system, ph, potential_v):
    """Transformed energy of each species / RT, written from the rows (25 °C, elements at 0).

    Forming s from its elements, H2O, H+ and e- (Pourbaix 1974, ch. III):
    mu'_s = dG_s - o dG_w - (2o - h) RT ln10 pH - (2o - h + z) F E.
    """
    out = []
    for sp in system.species:
        comp = dict(sp.composition)
        h, o, z = comp.get("H", 0), comp.get("O", 0), sp.charge
        g = (
            sp.dgf_kj_mol
            - o * G_WATER
            - (2 * o - h) * RT * math.log(10) * ph
            - (2 * o - h + z) * FARADAY_KJ * potential_v
        )
        out.append(g / RT)
    return np.array(out)


def _dual_on(lam, Z, A_aq, mu_aq, b):
    """Maximise the dual on lam + span(Z), re-centred so it is evaluated as small differences."""
    for _ in range(60):
        n0 = np.exp(np.minimum(A_aq @ lam - mu_aq, 700))
        B = A_aq @ Z

        def f(t, n0=n0, B=B):
            return -(b @ (Z @ t) - n0 @ np.expm1(np.minimum(B @ t, 700)))

        def g(t, n0=n0, B=B):
            return -(Z.T @ b - B.T @ (n0 * np.exp(np.minimum(B @ t, 700))))

        def h(t, n0=n0, B=B):
            return (B * (n0 * np.exp(np.minimum(B @ t, 700)))[:, None]).T @ B

        # trust-exact may try a far step whose norm overflows on its way; it rejects it
        with np.errstate(over="ignore"):
            res = minimize(
                f,
                np.zeros(Z.shape[1]),
                jac=g,
                hess=h,
                method="trust-exact",
                options={"gtol": 1e-300},
            )
        lam = lam + Z @ res.x
        if np.max(np.abs(res.x)) < 1e-13:
            break
    return lam


def gibbs_minimum(A, mu, aqueous, b):
    """Amounts minimising G/RT = sum_aq n(mu + ln n - 1) + sum_solid n mu under A^T n = b, n >= 0."""
    A_aq, mu_aq = A[aqueous], mu[aqueous]
    solids = np.flatnonzero(~aqueous)
    best = None
    for k in range(A.shape[1] + 1):
        for W in itertools.combinations(solids, k):
            W = list(W)
            As = A[W]
            if k and np.linalg.matrix_rank(As) < k:
                continue
            lam0 = lstsq(As, mu[W])[0] if k else np.zeros(A.shape[1])
            Z = null_space(As) if k else np.eye(A.shape[1])
            if Z.shape[1]:
                shift = np.linalg.lstsq(Z, np.full(A.shape[1], -30.0) - lam0, rcond=None)[0]
                lam = _dual_on(lam0 + Z @ shift, Z, A_aq, mu_aq, b)
            else:
                lam = lam0
            n = np.zeros(len(mu))
            n[aqueous] = np.exp(np.minimum(A_aq @ lam - mu_aq, 700))
            if k:
                x = lstsq(As.T, b - A_aq.T @ n[aqueous])[0]
                if np.any(x < 0):
                    continue
                n[W] = x
            if np.any(np.abs(A.T @ n - b) > 1e-9 * b):
                continue
            if len(solids) and np.any(A[solids] @ lam - mu[solids] > 1e-9):
                continue  # a solid left out would be supersaturated
            G = np.sum(n[aqueous] * (mu_aq + np.log(n[aqueous]) - 1)) + n[~aqueous] @ mu[~aqueous]
            if best is None or G < best[0]:
                best = (G, n)
    return best[1]


SYSTEMS = [
    ("Cu", {"Cu": 1e-2, "N": 1.0}),
    ("Au", {"Au": 1e-5, "CN": 1e-3}),
    ("Cu", {"Cu": 1e-3}),
    ("Fe", {"Fe": 1e-4}),
]


@pytest.mark.parametrize("metal,totals", SYSTEMS)
def test_amounts_match_independent_gibbs_minimisation(metal, totals):
    system = build_system(metal, totals)
    rng = np.random.default_rng(20261203)
    for _ in range(6):
        ph, e = rng.uniform(-2, 16), rng.uniform(-1.2, 1.4)
        r = solve_at(system, ph, e)
        ref = gibbs_minimum(system.counts, mu_over_rt(system, ph, e), system.aqueous, system.totals)
        # within 1e-8 of each amount (the tolerance), amounts below 1e-30 mol/kg aside
        np.testing.assert_allclose(r.amounts, ref, rtol=1e-8, atol=1e-30)
        assert set(np.flatnonzero(r.present)) == set(np.flatnonzero(ref * ~system.aqueous > 0))


@pytest.mark.parametrize("metal,totals", SYSTEMS)
def test_mass_is_conserved_from_any_start(metal, totals):
    system = build_system(metal, totals)
    rng = np.random.default_rng(7)
    far = solve_at(system, -2.0, 2.0)
    for _ in range(12):
        ph, e = rng.uniform(-2, 16), rng.uniform(-2, 2)
        for start in (None, far):
            r = solve_at(system, ph, e, start=start)
            resid = np.abs(system.counts.T @ r.amounts - system.totals) / system.totals
            assert resid.max() <= 1e-10
            assert np.all(r.amounts >= 0)
            assert np.all(r.saturation <= 1e-12)  # no solid supersaturated


def test_mass_is_conserved_where_a_solid_just_dissolves():
    # a metal total far below the ligand's (Cu 1e-5, NH3 1 mol/kg): at the potential where the
    # last copper dissolves, the solid's amount falls to the rounding level of the larger total;
    # the mass balance of the small one must still hold to 1e-10 (the tolerance)
    system = build_system("Cu", {"Cu": 1e-5, "N": 1.0})
    lo, hi = -0.4, 0.0  # Cu(s) present at lo, gone at hi (pH 7.5)
    cu = system.index("Cu")
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if solve_at(system, 7.5, mid).present[cu] else (lo, mid)
    for e in np.linspace(lo - 2e-9, hi + 2e-9, 41):
        r = solve_at(system, 7.5, e)
        resid = np.abs(system.counts.T @ r.amounts - system.totals) / system.totals
        assert resid.max() <= 1e-10
        ref = gibbs_minimum(
            system.counts, mu_over_rt(system, 7.5, e), system.aqueous, system.totals
        )
        np.testing.assert_allclose(r.amounts, ref, rtol=1e-8, atol=1e-14)


@pytest.mark.parametrize("ph,e", [(9.5, 0.5), (6.0, 1.0), (12.5, 0.0), (5.0, 0.25)])
def test_sensitivity_matches_central_differences(ph, e):
    # the implicit-function derivatives (no solid, CuO, CuO, Cu2O present at these points)
    # against central differences of amounts that test_amounts_match_... checks against scipy
    system = build_system("Cu", {"Cu": 1e-2, "N": 1.0})
    derivatives = energy_derivatives_rt(system)
    r = solve_at(system, ph, e)
    dlam, dlog = sensitivity(system, r, derivatives)
    h = 1e-6
    for j, (dx, dy) in enumerate([(h, 0.0), (0.0, h)]):
        up, down = solve_at(system, ph + dx, e + dy), solve_at(system, ph - dx, e - dy)

        def logs(res):
            return np.where(system.aqueous, np.log(np.maximum(res.amounts, 1e-300)), res.amounts)

        np.testing.assert_allclose(dlam[:, j], (up.log_free - down.log_free) / (2 * h), atol=1e-6)
        held = r.amounts > 1e-20
        fd = (logs(up) - logs(down)) / (2 * h)
        np.testing.assert_allclose(dlog[held, j], fd[held], rtol=1e-6, atol=1e-6)


@pytest.mark.parametrize("metal,totals", SYSTEMS)
def test_many_points_at_once_match_the_independent_minimisation(metal, totals):
    # the batched Newton steps (solve_many, used for the mesh of a traced map) against the
    # scipy Gibbs minimisation above at random points, and against solve_at on a coarse mesh
    system = build_system(metal, totals)
    rng = np.random.default_rng(31)
    ph, e = rng.uniform(-2, 16, 5), rng.uniform(-1.2, 1.4, 5)
    for r, x, y in zip(solve_many(system, ph, e), ph, e, strict=True):
        ref = gibbs_minimum(system.counts, mu_over_rt(system, x, y), system.aqueous, system.totals)
        np.testing.assert_allclose(r.amounts, ref, rtol=1e-8, atol=1e-30)
    grid_ph, grid_e = (
        v.ravel() for v in np.meshgrid(np.linspace(-2, 16, 13), np.linspace(-2, 2, 9))
    )
    for r, x, y in zip(solve_many(system, grid_ph, grid_e), grid_ph, grid_e, strict=True):
        one = solve_at(system, x, y)
        assert r.active == one.active
        np.testing.assert_allclose(r.amounts, one.amounts, rtol=1e-8, atol=1e-30)
        resid = np.abs(system.counts.T @ r.amounts - system.totals) / system.totals
        assert resid.max() <= 1e-10


def test_many_points_bad_input():
    system = build_system("Cu", {"Cu": 1e-3})
    with pytest.raises(ConditionsError, match="finite"):
        solve_many(system, [1.0, np.nan], [0.0, 0.0])
    with pytest.raises(ConditionsError, match="one length"):
        solve_many(system, [1.0, 2.0], [0.0])


def test_phase_rule_at_most_one_solid_per_component():
    system = build_system("Cu", {"Cu": 1e-2, "N": 1.0})
    for ph in np.linspace(-2, 16, 19):
        for e in np.linspace(-1, 1.2, 12):
            r = solve_at(system, ph, e)
            assert r.present.sum() <= len(system.components)


def test_ionic_strength_follows_the_speciation():
    system = build_system("Cu", {"Cu": 0.05})
    r = solve_at(system, 2.0, 0.6, activity_model="davies", background_ionic_strength=0.01)
    aq = system.aqueous
    expected = 0.01 + 0.5 * np.sum(r.amounts[aq] * system.charges[aq] ** 2)  # Lewis & Randall 1921
    assert r.ionic_strength == pytest.approx(expected, rel=1e-10)
    assert r.ionic_strength == pytest.approx(0.01 + 0.5 * 4 * 0.05, rel=1e-6)  # all as Cu2+
    # Davies (1962) at that I for z = 2, with A = 0.5114 at 25 °C (Robinson & Stokes 1959,
    # App. 7.1); the code's A from IAPWS water properties is 0.3 % lower, hence 2e-3
    i = r.ionic_strength
    lg = -0.5114 * 4 * (math.sqrt(i) / (1 + math.sqrt(i)) - 0.3 * i)
    assert r.log_gamma[system.index("Cu^2+")] == pytest.approx(lg, abs=2e-3)


# ------------------------------------------------------------------ hand calculations
# NBS tables (Wagman et al. 1982, J. Phys. Chem. Ref. Data 11, Suppl. 2), ΔfG° [kJ/mol]
DG_CU2 = 65.49
DG_NH3 = -26.50
DG_NH4 = -79.31
DG_CUNH3_4 = -111.07
DG_CUO = -129.7
DG_CN = 172.4
DG_HCN = 119.7
DG_AUCN2 = 285.8
# Bard, Parsons & Jordan 1985 (Standard Potentials in Aqueous Solution): E0(Au+/Au) [V]
E0_AU = 1.692


def _copper_ammine_only(system_totals):
    """Cu-NH3 system with only the complexes the hand calculation knows (others left out)."""
    base = build_system("Cu", system_totals)
    extra = [
        sp.name
        for sp in base.species
        if "N" in dict(sp.composition)
        and "Cu" in dict(sp.composition)
        and sp.name not in ("Cu(NH3)4^2+", "Cu(NH3)2^+")
    ]
    return build_system("Cu", system_totals, exclude=extra)


def test_copper_tetraammine_and_ammonia_consumption_by_hand():
    # log beta4 (Cu2+ + 4 NH3 = Cu(NH3)4^2+) and pKa(NH4+) from the NBS values above:
    log_beta4 = (DG_CU2 + 4 * DG_NH3 - DG_CUNH3_4) / (RT * math.log(10))  # 12.36
    pka = (DG_NH3 - DG_NH4) / (RT * math.log(10))  # 9.25
    assert log_beta4 == pytest.approx(12.36, abs=0.01)
    system = _copper_ammine_only({"Cu": 0.1, "N": 1.0})
    ph, e = 9.5, 0.7  # Cu(II) field: Cu(I) ammine (E0 0.80 V vs Cu2+) negligible at both pH
    r = solve_at(system, ph, e)
    # hand: all copper as Cu(NH3)4^2+ binds 0.4 mol/kg; the rest splits NH3/NH4+ by pKa
    free_nh3 = (1.0 - 0.4) / (1 + 10 ** (pka - ph))
    m = dict(zip(system.names, r.amounts, strict=True))
    assert m["Cu(NH3)4^2+"] / 0.1 > 0.999
    assert m["NH3(aq)"] == pytest.approx(free_nh3, rel=2e-3)
    consumed = 4 * m["Cu(NH3)4^2+"] + 2 * m["Cu(NH3)2^+"]
    assert consumed == pytest.approx(0.4, rel=1e-3)
    # the acid edge of the field at 0.7 V: CuO (log *Ks0 from the NBS values, CuO + 2H+ =
    # Cu2+ + H2O) just dissolves with all copper as Cu(NH3)4^2+ and 0.6 mol/kg NH3 + NH4+ left
    log_ks0 = (DG_CU2 + G_WATER - DG_CUO) / (-RT * math.log(10))  # 7.35

    def short(p):  # log of (Cu(NH3)4^2+ the solution can hold) / (copper total)
        nh3 = 0.6 / (1 + 10 ** (pka - p))
        return log_beta4 + log_ks0 - 2 * p + 4 * math.log10(nh3) - math.log10(0.1)

    lo, hi = 4.0, 9.0
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        lo, hi = (lo, mid) if short(mid) > 0 else (mid, hi)
    ph_edge = 0.5 * (lo + hi)  # 8.93
    assert log_ks0 == pytest.approx(7.35, abs=0.01)
    tenorite = system.index("CuO")
    lo, hi = 4.0, 9.0
    for _ in range(40):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if solve_at(system, mid, e).present[tenorite] else (lo, mid)
    # hydrolysis and Cu(I) (below 1e-4 of the copper there) are left out of the hand calculation
    assert 0.5 * (lo + hi) == pytest.approx(ph_edge, abs=0.005)


def test_gold_cyanide_boundary_at_ph_10_5_by_hand():
    log_beta2 = (163.25 + 2 * DG_CN - DG_AUCN2) / (RT * math.log(10))  # Au+ from E0 1.692 V
    e0 = E0_AU - K25 * log_beta2  # Au(CN)2- + e- = Au + 2 CN-
    pka = (DG_CN - DG_HCN) / (RT * math.log(10))  # HCN, 9.23
    ph = 10.5
    # Au(s) just gone: all 1e-5 gold as Au(CN)2-, the other cyanide split CN-/HCN
    cn = (1e-3 - 2e-5) / (1 + 10 ** (pka - ph))
    e_hand = e0 + K25 * math.log10(1e-5 / cn**2)
    system = build_system("Au", {"Au": 1e-5, "CN": 1e-3})
    gold = system.index("Au")
    lo, hi = -0.9, -0.2
    for _ in range(40):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if solve_at(system, ph, mid).present[gold] else (lo, mid)
    assert e_hand == pytest.approx(-0.549, abs=2e-3)
    # data rounded to 0.1 kJ/mol (about 1 mV)
    assert 0.5 * (lo + hi) == pytest.approx(e_hand, abs=1.5e-3)


def test_copper_hydrolysis_fractions_against_baes_mesmer():
    # Baes & Mesmer 1976, The Hydrolysis of Cations, ch. 10 (copper(II)), log *beta at
    # 25 °C and I = 0 (from memory): CuOH+ -8.0, Cu(OH)2 -17.3, Cu(OH)3- -27.8, Cu(OH)4^2- -39.6
    log_beta = [0.0, -8.0, -17.3, -27.8, -39.6]
    names = ["Cu^2+", "CuOH^+", "Cu(OH)2(aq)", "Cu(OH)3^-", "Cu(OH)4^2-"]
    system = build_system("Cu", {"Cu": 1e-12})  # far below CuO's solubility: no solid
    for ph in (6.0, 8.0, 9.5, 11.0, 12.5):
        r = solve_at(system, ph, 1.0)
        assert not r.present.any()
        w = np.array([10 ** (lb + i * ph) for i, lb in enumerate(log_beta)])
        expected = w / w.sum()
        got = np.array([r.amounts[system.index(n)] for n in names]) / 1e-12
        # table rows rounded to 0.01 kJ/mol (0.002 log units)
        np.testing.assert_allclose(got, expected, rtol=0.01, atol=1e-6)


# ------------------------------------------------------------------ bad input and failure
def test_non_convergence_is_reported():
    system = build_system("Cu", {"Cu": 1e-2, "N": 1.0})
    mu = mu_over_rt(system, 9.5, 0.2)
    with pytest.raises(EquilibriumError, match="did not converge"):
        solve_equilibrium(system.counts, mu, system.aqueous, system.totals, max_iter=1)
    assert issubclass(EquilibriumError, PourbaixError)


def test_bad_totals():
    with pytest.raises(ConditionsError, match="Cu"):
        parse_totals({"Cu": -1}, ["Cu"])
    with pytest.raises(OptionError, match="Xx"):
        parse_totals({"Xx": 1}, ["Cu"])
    with pytest.raises(OptionError, match="total of Cu"):
        build_system("Cu", {"N": 1.0})
    with pytest.raises(ConditionsError, match="> 0"):
        solve_equilibrium([[1]], [0.0], [True], [0.0])
    with pytest.raises(ConditionsError, match="finite"):
        solve_at(build_system("Cu", {"Cu": 1e-3}), float("nan"), 0.0)


def test_scalar_core_example():
    # M(s) at mu = 5 RT above the ion: undersaturated, all dissolved
    r = solve_equilibrium([[1], [1]], [0.0, 5.0], [True, False], [1e-3])
    assert r.amounts[0] == pytest.approx(1e-3, rel=1e-12)
    assert r.saturation[1] == pytest.approx((math.log(1e-3) - 5.0) / math.log(10), rel=1e-9)
    # and supersaturated: the solid takes all above exp(-mu) = 1 mol/kg... with mu_solid = -1
    r = solve_equilibrium([[1], [1]], [0.0, -1.0], [True, False], [1.0])
    assert r.present[1]
    assert r.amounts[0] == pytest.approx(math.exp(-1.0), rel=1e-12)
    assert r.amounts[1] == pytest.approx(1.0 - math.exp(-1.0), rel=1e-12)


def test_warm_start_from_far_away_with_pitzer_coefficients():
    # Ca 0.05 and sulfate 0.05 mol/kg in 1 mol/kg NaCl, Pitzer: started from the equilibrium at
    # pH 4, 0 V (gypsum; lambda far below), the solve at pH 11.98, 0.28 V put lambda on the old
    # solid's constraint, where the dissolved amounts overflowed and the line search could not
    # tell ascent (it diverged). Any start must give the cold start's amounts.
    system = build_system("Ca", {"Ca": 0.05, "S": 0.05}, exclude=["CaSO4(aq)"])
    kw = dict(activity_model="pitzer", background="NaCl=1")
    cold = solve_at(system, 11.9771, 0.28125, **kw)
    for ph, e in [(4.0, 0.0), (2.0, -0.5), (12.0, 1.0), (7.0, 0.25)]:
        start = solve_at(system, ph, e, **kw)
        warm = solve_at(system, 11.9771, 0.28125, start=start, **kw)
        np.testing.assert_allclose(warm.amounts, cold.amounts, rtol=1e-8, atol=1e-30)
        resid = np.abs(system.counts.T @ warm.amounts - system.totals) / system.totals
        assert resid.max() <= 1e-10
