"""Tests for pourbaix.physics.hkf: the revised HKF equations of state.

Outside reference: ``pygcc`` (Awolayo & Tutolo, a general-purpose geochemistry
library from the package registry; test-only), which implements the same
equations (Tanger & Helgeson 1988; Shock et al. 1992) with its own IAPWS-95
and IAPWS R8-97 (FGL97) water, and ships the SUPCRT-family parameter file
speq21.dat (Shock & Helgeson 1988; Shock et al. 1997; Sverjensky et al. 1997
parameters). The parameters of each species are read from that file here and
passed to both codes.
"""

import math
import re

import numpy as np
import pytest

from pourbaix.errors import ConditionsError
from pourbaix.physics import hkf, thermo
from pourbaix.tables.species import HKFParameters

pygcc_utils = pytest.importorskip("pygcc.pygcc_utils")
water_eos = pytest.importorskip("pygcc.water_eos")
species_eos = pytest.importorskip("pygcc.species_eos")

CAL = 4.184

# 40+ species of charge -3 to +4 (names as in speq21.dat)
NAMES = (
    "Na+", "K+", "Li+", "Ag+", "Cu+", "NH4+", "FeOH+", "ZnOH+", "NiOH+", "CuCl(aq)",
    "Fe++", "Ni++", "Cu++", "Zn++", "Mg++", "Ca++", "Mn++", "Co++", "Pb++", "FeOH++",
    "Fe+++", "Al+++", "Cr+++", "Cl-", "OH-", "HS-", "HCO3-", "HSO4-", "NO3-", "HFeO2-",
    "SO4--", "CO3--", "CuO2--", "ZnO2--", "PO4---", "H2S(aq)", "FeO(aq)", "CO2(aq)",
    "O2(aq)", "H2(aq)", "NH3(aq)", "SiO2(aq)", "ZnO(aq)", "Th++++",
)  # fmt: skip

# states: along saturation (pygcc's IAPWS-95 saturation pressure; 1 bar at 25 °C),
# then 500 and 2000 bar
T_SAT = (25.0, 100.0, 200.0, 300.0, 350.0)
T_P = ((300.0, 500.0), (100.0, 2000.0), (300.0, 2000.0), (500.0, 2000.0))


@pytest.fixture(scope="module")
def database():
    return pygcc_utils.db_reader().dbaccessdic


@pytest.fixture(scope="module")
def states():
    t_sat = np.array(T_SAT)
    p_sat = np.asarray(water_eos.iapws95(T=t_sat, P="T").P, dtype=float)
    p_sat[0] = 1.0
    tc = np.concatenate([t_sat, [t for t, _ in T_P]])
    p = np.concatenate([p_sat, [p for _, p in T_P]])
    water = water_eos.iapws95(T=tc, P=p)
    dielectric = water_eos.water_dielec(T=tc, P=p, Dielec_method="FGL97")
    return tc, p, np.asarray(water.rho), np.asarray(dielectric.E), dielectric


def _ours(row, t, p):
    params = HKFParameters(
        row[5] * 1e-1, row[6] * 1e2, row[7], row[8] * 1e4, row[9], row[10] * 1e4, row[11] * 1e5
    )  # speq21 prints a1x10, a2x1e-2, a4x1e-4, c2x1e-4, omegax1e-5
    water = thermo.water_properties(t, p)
    return hkf.hkf_gibbs(
        row[2] * CAL / 1000,
        row[4] * CAL,
        params,
        int(row[12]),
        t,
        p,
        water.density_kg_m3 / 1000,
        water.dielectric_constant,
    )


def test_water_agrees_with_pygcc(states):
    # density (IAPWS-95) and dielectric constant (IAPWS R8-97) of both codes
    tc, p, rho, eps, _ = states
    for t, pp, r, e in zip(tc, p, rho, eps, strict=True):
        w = thermo.water_properties(float(t), float(pp))
        assert w.density_kg_m3 == pytest.approx(r, rel=2e-5)
        assert w.dielectric_constant == pytest.approx(e, rel=1e-5)


def test_gibbs_of_44_species_against_pygcc(database, states):
    tc, p, rho, eps, _ = states
    charges = set()
    for name in NAMES:
        row = database[name]
        charges.add(int(row[12]))
        ref = species_eos.supcrtaq(tc, p, row, Dielec_method="FGL97", rho=rho, E=eps)
        for k, (t, pp) in enumerate(zip(tc, p, strict=True)):
            ours = _ours(row, float(t), float(pp))
            # the tolerance: 0.05 kJ/mol for the same parameters
            assert ours == pytest.approx(ref[k] * CAL / 1000, abs=0.05), (name, t, pp)
    assert len(NAMES) >= 40 and charges >= {-3, -2, -1, 0, 1, 2, 3, 4}


def test_born_y_against_pygcc(states):
    # Y = (dε/dT)_P / ε² from pygcc's R8-97 derivative
    tc, p, _, eps, dielectric = states
    y_ref = np.asarray(dielectric.dEdT_P) / eps**2
    for k in (0, 3, 5, 7):
        assert hkf.born_y(float(tc[k]), float(p[k])) == pytest.approx(y_ref[k], rel=1e-4)
    # pygcc's FGL97 reference value at 298.15 K, 1 bar: Yr = -5.836655e-5 1/K
    assert hkf.reference_born()[1] == pytest.approx(-5.836655257780387e-05, rel=1e-5)


def test_g_function_through_pygcc_born_term(states):
    # A species with only ω and Z: G - ΔfG° = ω(1/ε - 1) - ωr(1/εr - 1) + ωr Yr (T - Tr),
    # so pygcc's G gives ω(T, P) and hence g; compare g at states with rho < 1
    tc, p, rho, eps, _ = states
    # pygcc's FGL97 values at 298.15 K, 1 bar
    eps_r, y_r = 78.40836752, -5.836655257780387e-05
    omega_r, z = 1.5e5, 2
    row = ["X", "", 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, omega_r * 1e-5, float(z)]
    ref = species_eos.supcrtaq(tc, p, row, Dielec_method="FGL97", rho=rho, E=eps)
    for k in (2, 3, 4, 5, 7, 8):
        tk = tc[k] + 273.15
        born = ref[k] + omega_r * (1 / eps_r - 1) - omega_r * y_r * (tk - 298.15)
        omega = born / (1 / eps[k] - 1)
        g = hkf.g_function(float(tc[k]), float(p[k]), rho[k] / 1000)
        assert hkf.effective_born_coefficient(omega_r, z, g) == pytest.approx(omega, rel=1e-6)
        assert g < 0.0  # g is negative below 1 g/cm³ (Shock et al. 1992, Fig. 6)


def test_neutral_and_reference_state():
    assert hkf.g_function(4.0, 1.0, 1.0) == 0.0
    assert hkf.g_function(25.0, 1.0, 0.997) == pytest.approx(0.0, abs=1e-12)
    assert hkf.effective_born_coefficient(-3000.0, 0, -0.5) == -3000.0
    params = HKFParameters(0.1, 10.0, 1.0, -27000.0, 10.0, -30000.0, 30000.0)
    w = thermo.water_properties(25.0, 1.0)
    g = hkf.hkf_gibbs(-100.0, 50.0, params, 1, 25.0, 1.0, w.density_kg_m3 / 1000, 78.40843)
    assert g == pytest.approx(-100.0, abs=1e-6)


@pytest.mark.parametrize(
    "t, p, rho, pattern",
    [
        (650.0, 1000.0, 0.5, r"outside the range"),
        (300.0, 6000.0, 0.8, r"outside the range"),
        (500.0, 300.0, 0.1, r"below 0.35 g/cm³"),
        (370.0, 400.0, 0.4, r"near-critical"),
    ],
)
def test_range_errors(t, p, rho, pattern):
    with pytest.raises(ConditionsError, match=pattern):
        hkf.check_hkf_range(t, p, rho)


def test_estimate_regressions_recomputed_from_the_file(database):
    # the per-charge coefficients in pourbaix.physics.hkf are regressions over the
    # carbon-free species of speq21.dat; recompute them here
    x_r = -3.09e-7
    for z, (slope, intercept) in hkf._CP_FROM_S.items():
        s, cp, vol = [], [], []
        for name, row in database.items():
            if len(row) < 13 or not isinstance(row[12], float) or row[12] != z:
                continue
            if not isinstance(row[4], float) or re.search(r"C(?![a-z])", row[0] + name):
                continue
            s.append(row[4])
            cp.append(row[9] + row[10] * 1e4 / 70.15**2 + row[11] * 1e5 * 298.15 * x_r)
            vol.append((row[5] * 0.1, row[6] * 100, row[7]))
        fit = np.polyfit(s, cp, 1)
        assert fit == pytest.approx((slope, intercept), abs=1e-3)
        assert np.median(np.array(vol), axis=0) == pytest.approx(hkf._VOLUME[z], rel=1e-3)


def test_estimated_parameters_track_fitted_ones(database):
    # estimates from S° and Cp° alone against the file's fitted parameters, at 300 °C
    # along saturation: the correlations should land within a few kJ/mol
    w = thermo.water_properties(300.0)
    errors = []
    for name in ("Na+", "K+", "Fe++", "Ni++", "Cu++", "Zn++", "Mg++", "Cl-", "SO4--", "Al+++"):
        row = database[name]
        fitted = HKFParameters(
            row[5] * 1e-1, row[6] * 1e2, row[7], row[8] * 1e4, row[9], row[10] * 1e4, row[11] * 1e5
        )
        cp = row[9] + row[10] * 1e4 / 70.15**2 + row[11] * 1e5 * 298.15 * -3.09e-7
        estimate = hkf.estimate_hkf(row[4] * CAL, int(row[12]), cp * CAL)
        args = (int(row[12]), 300.0, w.pressure_bar, w.density_kg_m3 / 1000)
        g_fit = hkf.hkf_gibbs(0.0, row[4] * CAL, fitted, *args, w.dielectric_constant)
        g_est = hkf.hkf_gibbs(0.0, row[4] * CAL, estimate, *args, w.dielectric_constant)
        errors.append(abs(g_est - g_fit))
        # ω from S° (Shock et al. 1997 form) near the fitted ω
        assert estimate.omega == pytest.approx(fitted.omega, abs=0.25e5), name
    assert max(errors) < 3.0, errors
    assert math.fsum(errors) / len(errors) < 1.5


def test_hydroxo_entropy_regressions_recomputed_from_the_file(database):
    # S° of M(OH)n complexes against S° of M^z+ over the pairs of speq21.dat
    from pourbaix.tables.formula import parse_formula

    ions, pairs = {}, []
    for name, row in database.items():
        if len(row) < 13 or not isinstance(row[12], float) or not isinstance(row[4], float):
            continue
        try:
            f = parse_formula(re.sub(r"[+-]+$", "", name.replace("(aq)", "")))
        except Exception:
            continue
        comp, z = dict(f.composition), int(row[12])
        form = hkf.hydroxo_form(comp, z)
        metals = [e for e in comp if e not in "HO"]
        if len(comp) == 1 and metals and comp[metals[0]] == 1:
            ions[(metals[0], z)] = row[4] * CAL
        elif form is not None:
            removed = comp.get("O", 0) - comp.get("H", 0)
            pairs.append((*form, row[4] * CAL + removed * 69.95))
    for (z, n), (slope, intercept) in hkf._HYDROXO_ENTROPY.items():
        both = [
            (ions[m, z], s) for (m, zz, nn, s) in pairs if (zz, nn) == (z, n) and (m, z) in ions
        ]
        x, y = zip(*both, strict=True)
        assert len(x) >= 7
        assert np.polyfit(x, y, 1) == pytest.approx((slope, intercept), abs=2e-3)


@pytest.mark.parametrize(
    "charge, oxygens, tabulated",
    [
        # NBS tables (Wagman et al. 1982), S° [J/(mol K)], from memory
        (-1, 3, 146.4),  # NO3-
        (-2, 4, 20.1),  # SO4^2-
        (-1, 4, 191.2),  # MnO4-
        (-1, 4, 182.0),  # ClO4-
        (-2, 4, 50.2),  # CrO4^2-
        (-3, 4, -222.0),  # PO4^3-
    ],
)
def test_cobble_oxyanion_entropy(charge, oxygens, tabulated):
    # Cobble (1953) quotes a few cal/(mol K) for his rule: 40 J/(mol K) covers PO4^3-
    assert hkf.cobble_oxyanion_entropy(charge, oxygens) == pytest.approx(tabulated, abs=40.0)


def test_oxide_sum_entropy_against_tabulated_hydroxides():
    # Robie & Hemingway 1995 (USGS Bull. 2131), S° [J/(mol K)], from memory:
    # periclase 26.94 / brucite 63.18; hematite 87.40 / goethite 60.38;
    # lime 38.1 / portlandite 83.39; corundum 50.92 / boehmite 48.45, gibbsite 68.44
    from types import SimpleNamespace

    from pourbaix.physics.energies import oxide_sum_entropy
    from pourbaix.tables.formula import parse_formula

    def solid(formula, s):
        f = parse_formula(formula)
        return SimpleNamespace(
            phase="s", s_j_molk=s, composition=f.composition, charge=0, metastable=False
        )

    oxides = [solid("MgO", 26.94), solid("Fe2O3", 87.40), solid("CaO", 38.1), solid("Al2O3", 50.92)]
    table = SimpleNamespace(species=oxides)
    for formula, s in (
        ("Mg(OH)2", 63.18),
        ("FeOOH", 60.38),
        ("Ca(OH)2", 83.39),
        ("AlOOH", 48.45),
        ("Al(OH)3", 68.44),
    ):
        estimate = oxide_sum_entropy(solid(formula, None), table)
        # the rule is rough: gibbsite is 16 J/(mol K) off, the others within 7
        assert estimate == pytest.approx(s, abs=17.0), formula


def test_oxide_additivity_entropy_against_crc_oxides():
    # S° [J/(mol K)] of the CRC Handbook table as shipped by `chemicals` (S0s, by CAS):
    # the lower oxide gives the estimate, the higher one is the check
    from types import SimpleNamespace

    s0s = pytest.importorskip("chemicals.reaction").S0s
    from pourbaix.physics.energies import oxide_additivity_entropy
    from pourbaix.tables.formula import parse_formula

    def solid(formula, s):
        f = parse_formula(formula)
        return SimpleNamespace(
            name=formula, phase="s", s_j_molk=s, composition=f.composition, charge=0,
            metastable=False,
        )

    pairs = [
        ("FeO", "1345-25-1", "Fe3O4", "1317-61-9"),
        ("CoO", "1307-96-6", "Co3O4", "1308-06-1"),
        ("MnO", "1344-43-0", "Mn2O3", "1317-34-6"),
        ("MnO", "1344-43-0", "Mn3O4", "1317-35-7"),
        ("MnO", "1344-43-0", "MnO2", "1313-13-9"),
    ]
    for lower, lower_cas, higher, higher_cas in pairs:
        table = SimpleNamespace(species=[solid(lower, s0s(lower_cas))])
        estimate, used = oxide_additivity_entropy(solid(higher, None), table)
        assert used == lower
        # Latimer-type additivity is rough: over the measured oxides of one metal in the
        # tables it scatters by 25 % r.m.s., and Co3O4 (low-spin Co3+) comes out 56 J/(mol K)
        # high; 60 J/(mol K) is 16 kJ/mol on ΔG at 300 °C, half the error of keeping the
        # 25 °C ΔG of an oxide of S° ≈ 110 J/(mol K)
        assert estimate == pytest.approx(s0s(higher_cas), abs=60.0), higher
    # the rule is not a constant: the estimates differ from the CRC values pair by pair
    # (Mn2O3 8 % high, Fe3O4 24 %), and the closest of these lies within 10 J/(mol K)
    table = SimpleNamespace(species=[solid("MnO", s0s("1344-43-0"))])
    assert oxide_additivity_entropy(solid("Mn2O3", None), table)[0] == pytest.approx(
        s0s("1317-34-6"), abs=10.0
    )


# ------------------------------------------------------------------ Maier-Kelley with transitions


def _mk_from_supcrt(row):
    """(dG kJ, S J/K, V cm3, [(a, b, c) J units per phase], [(T_tr, dH_tr J, dV)]) of a speq21 row.

    SUPCRT92 prints a, b x1e3, c x1e-5 of Cp = a + bT + c/T² in calories (Johnson et al. 1992).
    """
    phases, transitions = [], []
    rest = row[6:]
    while True:
        a, b, c = rest[0], rest[1], rest[2]
        phases.append((a * CAL, b * 1e-3 * CAL, c * 1e5 * CAL))
        if len(rest) < 8:
            break
        t_tr, h_tr, v_tr = rest[3], rest[4], rest[5]
        transitions.append((t_tr, h_tr * CAL, v_tr))
        rest = rest[7:]
    return row[2] * CAL / 1000, row[4] * CAL, row[5], phases, transitions


@pytest.mark.parametrize(
    "name", ["Magnetite", "Hematite", "Bunsenite", "Nickel", "Pyrrhotite", "Chalcocite", "Cuprite"]
)
def test_maier_kelley_with_transitions_against_pygcc(database, name):
    # pygcc's SUPCRT92 route for minerals (Helgeson et al. 1978 parameters, same file)
    from types import SimpleNamespace

    heatcap = species_eos.heatcap
    g0, s0, volume, phases, transitions = _mk_from_supcrt(database[name])
    tmax = database[name][-1]
    trs = [
        SimpleNamespace(
            t_k=t, dh_j_mol=h, dv_cm3_mol=v, mk_a_j_molk=a, mk_b_j_molk2=b, mk_c_jk_mol=c
        )
        for (t, h, v), (a, b, c) in zip(transitions, phases[1:], strict=True)
    ]
    for t_c in (100.0, 200.0, 250.0, 300.0, 350.0, 450.0, 600.0):
        if t_c + 273.15 > tmax:
            continue
        ref = heatcap(T=t_c, P=1.0, Species=name, Species_ppt=database[name], method="SUPCRT")
        ours, _ = thermo.heat_capacity_gibbs(g0, s0, t_c, phases[0], trs)
        assert ours == pytest.approx(float(np.ravel(ref.dG)[0]) * CAL / 1000, abs=0.05), t_c
    # the volume term V(P - Pr) at 1000 bar (below the first transition)
    ref = heatcap(T=100.0, P=1000.0, Species=name, Species_ppt=database[name], method="SUPCRT")
    ours = thermo.heat_capacity_gibbs(g0, s0, 100.0, phases[0], trs)[0]
    ours += volume * 999.0 * 0.1 / 1000
    assert ours == pytest.approx(float(np.ravel(ref.dG)[0]) * CAL / 1000, abs=0.05)
