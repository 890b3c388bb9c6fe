"""Tests for pourbaix.physics.thermo: Nernst factor, apparent Gibbs energies, water at T."""

import math
import warnings
from types import SimpleNamespace

import numpy as np
import pytest
from scipy.integrate import quad

from pourbaix.errors import ConditionsError, OptionError
from pourbaix.physics import thermo
from pourbaix.physics.electrodes import agcl_standard_potential
from pourbaix.physics.thermo import RangeWarning

# CODATA 2018 exact defining constants (SI 2019), independent of R and F in thermo.
K_B = 1.380649e-23  # J/K
E_CHARGE = 1.602176634e-19  # C


# ----------------------------------------------------------------- Nernst factor


@pytest.mark.parametrize("t", [25.0, 60.0, 100.0, 200.0])
def test_nernst_factor_codata(t):
    # k_T = k T ln10 / e from the CODATA 2018 exact constants (R/F = k/e)
    expected = K_B * (t + 273.15) * math.log(10) / E_CHARGE
    assert thermo.nernst_factor(t) == pytest.approx(expected, rel=1e-9)


def test_nernst_factor_textbook_25c():
    # 0.05916 V at 25 °C (Bard & Faulkner 2001), given to 5 decimals
    assert thermo.nernst_factor(25.0) == pytest.approx(0.05916, abs=5e-6)


def test_nernst_factor_array_and_edges():
    t = np.array([0.0, 25.0, 300.0])
    out = thermo.nernst_factor(t)
    assert out.shape == (3,)
    assert out[0] < out[1] < out[2]
    expected = K_B * (t + 273.15) * math.log(10) / E_CHARGE
    np.testing.assert_allclose(out, expected, rtol=1e-9)


@pytest.mark.parametrize("bad", [-0.5, 600.5, float("nan"), "hot"])
def test_nernst_factor_bad_temperature(bad):
    with pytest.raises(ConditionsError, match="temperature"):
        thermo.nernst_factor(bad)


# ----------------------------------------------------------------- IAPWS R11-07

# IAPWS R11-07, Table 3 (check values for computer programs); from memory.
R11_07_CHECK = [
    (300.0, 1000.0, 13.906565),
    (600.0, 70.0, 21.048874),
    (600.0, 700.0, 11.203153),
    (800.0, 200.0, 15.089765),
    (800.0, 1200.0, 6.438330),
]


@pytest.mark.parametrize("tk, rho, pkw", R11_07_CHECK)
def test_pkw_r11_07_check_values(tk, rho, pkw):
    # the release gives 6 decimals
    assert thermo.pkw_r11_07(rho, tk) == pytest.approx(pkw, abs=2e-6)


def test_pkw_r11_07_array():
    tk, rho, pkw = zip(*R11_07_CHECK, strict=True)
    np.testing.assert_allclose(thermo.pkw_r11_07(np.array(rho), np.array(tk)), pkw, atol=2e-6)


# IAPWS R11-07, Table 2: pKw of liquid water along the saturation curve
# (3 decimals; from memory). Below 100 °C we evaluate at 1 bar instead of the
# saturation pressure: dpKw/dP ≈ 4e-4 per bar, inside the tolerance.
R11_07_SATURATION = [
    (25.0, 13.995),
    (50.0, 13.264),
    (100.0, 12.252),
    (150.0, 11.641),
    (200.0, 11.310),
    (250.0, 11.205),
    (300.0, 11.339),
]


@pytest.mark.parametrize("t, pkw", R11_07_SATURATION)
def test_water_pkw_along_saturation(t, pkw):
    assert thermo.water_properties(t).pkw == pytest.approx(pkw, abs=1e-3)


def test_pkw_rough_values():
    # pKw ≈ 14.0 at 25 °C and ≈ 12.3 at 100 °C at saturation (from memory, 1-2 digits)
    assert thermo.water_properties(25.0).pkw == pytest.approx(14.0, abs=0.05)
    assert thermo.water_properties(100.0).pkw == pytest.approx(12.3, abs=0.05)


@pytest.mark.parametrize("t", [0.0, 25.0, 60.0, 100.0, 150.0, 200.0])
def test_pkw_against_iapws_package(t):
    # iapws 1.5.x codes _Kw with a coefficient set that differs from the R11-07
    # table (it misses the check values above, e.g. 20.16 instead of 21.05 at
    # 600 K, 70 kg/m3); in the liquid to 200 °C the two agree within the
    # release's stated uncertainty of 0.01 in pKw (from memory).
    from iapws._iapws import _Kw

    w = thermo.water_properties(t)
    assert w.pkw == pytest.approx(_Kw(w.density_kg_m3, t + 273.15), abs=0.01)


# ----------------------------------------------------------------- water properties


def test_water_25c_published():
    w = thermo.water_properties(25.0)
    # IAPWS-95 density at 25 °C, 0.1 MPa: 997.047 kg/m3 (Wagner & Pruß 2002; from memory)
    assert w.density_kg_m3 == pytest.approx(997.047, abs=0.001)
    # IAPWS R8-97 dielectric constant at 25 °C, 0.1 MPa: 78.41 (Fernández et al. 1997; from memory)
    assert w.dielectric_constant == pytest.approx(78.41, abs=0.01)
    assert w.pressure_bar == 1.0
    assert not w.at_saturation


@pytest.mark.parametrize(
    "t, p_sat",
    # IAPWS-IF97 saturation pressures (Wagner et al. 2000; from memory): 0.101418,
    # 1.5549 and 8.5879 MPa
    [(100.0, 1.01418), (200.0, 15.549), (300.0, 85.879)],
)
def test_water_default_pressure_is_saturation_above_100c(t, p_sat):
    w = thermo.water_properties(t)
    assert w.at_saturation
    assert w.pressure_bar == pytest.approx(p_sat, rel=2e-4)
    assert thermo.saturation_pressure(t) == pytest.approx(p_sat, rel=2e-4)


def test_water_given_pressure_and_cache():
    w1 = thermo.water_properties(150.0, 50.0)
    assert w1.pressure_bar == pytest.approx(50.0)
    assert not w1.at_saturation
    # compressed liquid is denser than saturated liquid (IAPWS-95)
    assert w1.density_kg_m3 > thermo.water_properties(150.0).density_kg_m3
    assert thermo.water_properties(150.0, 50.0) is thermo.water_properties(150.0, 50.0)


@pytest.mark.parametrize("t", [99.6, 150.0, 200.0, 300.0])
def test_water_reported_saturation_pressure_round_trips(t):
    # feeding back the reported saturation pressure gives the same saturated
    # liquid (IF97 and IAPWS-95 saturation pressures differ by up to 2e-4)
    w = thermo.water_properties(t)
    assert thermo.water_properties(t, w.pressure_bar) is w
    assert thermo.water_gibbs(t, w.pressure_bar) == w.gibbs_kj_mol


def test_water_pressure_below_saturation_refused():
    with pytest.raises(ConditionsError, match="boil"):
        thermo.water_properties(150.0, 2.0)
    with pytest.raises(ConditionsError, match="boil"):
        thermo.water_properties(95.0, 0.5)  # p_sat(95 °C) ≈ 0.85 bar


@pytest.mark.parametrize("p", [-1.0, 0.0, 5000.5, "high"])
def test_water_bad_pressure(p):
    with pytest.raises(ConditionsError, match="pressure"):
        thermo.water_properties(25.0, p)


@pytest.mark.parametrize(
    "t, pattern",
    [
        (-1.0, "outside the supported range"),
        (601.0, "outside the supported range"),
        # along saturation the range stops at 350 °C (Shock et al. 1992: the g-function needs a dense liquid); above, a pressure is needed
        (351.0, "above 350 °C.*give a pressure"),
        (374.0, "above 350 °C.*give a pressure"),
    ],
)
def test_water_bad_temperature(t, pattern):
    with pytest.raises(ConditionsError, match=pattern):
        thermo.water_properties(t)


def test_water_gibbs_exact_at_reference():
    # NBS tables (Wagman et al. 1982) / CODATA: ΔfG°(H2O, l) = -237.129 kJ/mol
    assert thermo.water_gibbs(25.0) == -237.129
    assert thermo.water_gibbs(25.0, 1.0) == -237.129


@pytest.mark.parametrize("t", [10.0, 60.0, 90.0])
def test_water_gibbs_against_constant_cp(t):
    # NBS tables: S° = 69.95 J/(mol K), Cp° = 75.291 J/(mol K) (from memory). The
    # Cp of liquid water changes by < 0.5 % over 10-90 °C, so the constant-Cp
    # Benson–Helgeson value must agree within 0.002 kJ/mol.
    expected = thermo.apparent_gibbs(-237.129, 69.95, t, cp_j_molk=75.291)
    assert thermo.water_gibbs(t) == pytest.approx(expected, abs=0.002)


def test_water_line_temperature_coefficient():
    # dE°/dT of O2 + 4H+ + 4e- = 2H2O is -0.8456 mV/K at 25 °C (Bard, Parsons &
    # Jordan 1985; from memory). Gas entropies from the CRC table in `chemicals`:
    # S°(H2, g) = 130.7, S°(O2, g) = 205.2 J/(mol K), Cp 28.8 and 29.4 J/(mol K).
    def e0(t):
        g_w = thermo.water_gibbs(t)
        g_h2 = thermo.apparent_gibbs(0.0, 130.7, t, cp_j_molk=28.8)
        g_o2 = thermo.apparent_gibbs(0.0, 205.2, t, cp_j_molk=29.4)
        dg = g_w - g_h2 - 0.5 * g_o2  # H2 + 1/2 O2 -> H2O, 2 electrons
        return -dg * 1000.0 / (2 * thermo.F)

    slope = (e0(26.0) - e0(24.0)) / 2.0
    # CRC entropies carry 0.1 J/(mol K): 0.003 mV/K covers them
    assert slope * 1000 == pytest.approx(-0.8456, abs=0.003)
    # E°(O2/H2O) at 25 °C = 1.229 V (Bard, Parsons & Jordan 1985)
    assert e0(25.0) == pytest.approx(1.229, abs=5e-4)


def test_neutral_ph():
    # R11-07 Table 2 (from memory): pKw 13.995 at 25 °C, 12.252 at 100 °C
    assert thermo.neutral_ph(25.0) == pytest.approx(13.995 / 2, abs=6e-4)
    out = thermo.neutral_ph(np.array([25.0, 100.0]))
    np.testing.assert_allclose(out, [13.995 / 2, 12.252 / 2], atol=6e-4)
    with pytest.raises(ConditionsError, match="above 350 °C"):
        thermo.neutral_ph(400.0)


# ----------------------------------------------------------------- apparent Gibbs


def test_apparent_gibbs_exact_at_25c():
    assert thermo.apparent_gibbs(-100.0, 50.0, 25.0, cp_j_molk=80.0) == -100.0
    assert thermo.apparent_gibbs(-100.0, 50.0, 25.0, mk=(30.0, 0.01, -5e5)) == -100.0
    out = thermo.apparent_gibbs(-100.0, 50.0, np.array([25.0, 80.0]), cp_j_molk=80.0)
    assert out[0] == -100.0 and out.shape == (2,)


def test_apparent_gibbs_slope_is_minus_entropy():
    # d(ΔGapp)/dT = -S at Tr (Helgeson et al. 1978): thermodynamic identity
    h = 0.01
    for kw in ({}, {"cp_j_molk": 120.0}, {"mk": (60.0, 0.05, -1.2e6)}):
        g = [thermo.apparent_gibbs(-500.0, 80.0, 25.0 + d, **kw) for d in (-h, h)]
        assert (g[1] - g[0]) / (2 * h) * 1000 == pytest.approx(-80.0, abs=1e-3)


@pytest.mark.parametrize("t", [5.0, 150.0, 300.0])
def test_apparent_gibbs_maier_kelley_against_quadrature(t):
    # Closed-form integrals checked against numerical quadrature (scipy) of
    # ΔG(T) - ΔG(Tr) = -S (T - Tr) + ∫Cp dT - T ∫Cp/T dT for Cp = a + bT + c/T²
    a, b, c = 87.4, 0.0426, -1.82e6  # a magnetite-like Maier–Kelley set
    s = 146.1
    tk = t + 273.15

    def cp(x):
        return a + b * x + c / x**2

    int_cp = quad(cp, 298.15, tk)[0]
    int_cp_t = quad(lambda x: cp(x) / x, 298.15, tk)[0]
    expected = -1015.4 + (-s * (tk - 298.15) + int_cp - tk * int_cp_t) / 1000
    got = thermo.apparent_gibbs(-1015.4, s, t, mk=(a, b, c))
    assert got == pytest.approx(expected, abs=1e-9)
    # b = c = 0 is the constant-Cp route
    assert thermo.apparent_gibbs(-1015.4, s, t, mk=(a, 0, 0)) == pytest.approx(
        thermo.apparent_gibbs(-1015.4, s, t, cp_j_molk=a), abs=1e-12
    )


def test_apparent_gibbs_bad_temperature():
    with pytest.raises(ConditionsError, match="outside"):
        thermo.apparent_gibbs(-1.0, 1.0, np.array([25.0, 650.0]))


def _agcl_e0_change(t, cl_cp):
    """E°(AgCl/Ag)(T) - E°(25 °C) from apparent Gibbs energies [V].

    CRC tables in `chemicals`: Ag(s) S 42.6, Cp 25.4; AgCl(s) S 96.3, Cp 50.8;
    H2(g) S 130.7, Cp 28.8; Cl-(aq) ΔfG -131.2 kJ/mol, S 56.5 J/(mol K).
    """

    def dg(temp, cp):
        g_ag = thermo.apparent_gibbs(0.0, 42.6, temp, cp_j_molk=25.4)
        g_agcl = thermo.apparent_gibbs(-109.8, 96.3, temp, cp_j_molk=50.8)
        g_h2 = thermo.apparent_gibbs(0.0, 130.7, temp, cp_j_molk=28.8)
        g_cl = thermo.apparent_gibbs(-131.2, 56.5, temp, cp_j_molk=cp)
        # AgCl + 1/2 H2 -> Ag + H+ + Cl-  (H+ = 0 at every T)
        return g_ag + g_cl - g_agcl - 0.5 * g_h2

    return -(dg(t, cl_cp(t)) - dg(25.0, cl_cp(25.0))) * 1000.0 / thermo.F


@pytest.mark.parametrize(
    "t, e0_t",
    # Bates & Bower 1954, J. Res. NBS 53, 283, table of E° (5 decimals; from memory)
    [(40.0, 0.21208), (60.0, 0.19649)],
)
def test_criss_cobble_reproduces_agcl_electrode(t, e0_t):
    # E°(25 °C) = 0.22234 V (same table). Cl- has S but no Cp in the CRC table's
    # row used here, so its Cp comes from Criss–Cobble. Expected error from the
    # method's Cp scatter (~20 J/(mol K)): ≈ 20 (T-Tr)²/(2T F), 0.4 mV at 60 °C;
    # allowed 1 mV. (Dropping Cp altogether misses by 2.5 mV at 60 °C.)
    def cc(temp):
        return thermo.criss_cobble_cp(56.5, -1, temp, kind="anion")

    assert _agcl_e0_change(t, cc) == pytest.approx(e0_t - 0.22234, abs=1e-3)
    # and the polynomial of the same paper agrees with its table
    assert agcl_standard_potential(t) == pytest.approx(e0_t, abs=1e-4)


# ----------------------------------------------------------------- Criss–Cobble

# Criss & Cobble 1964 (J. Am. Chem. Soc. 86, 5385), entropy correspondence
# S_T(abs) = a_T + b_T S_25(abs) in cal/(mol K), and the absolute entropy of H+
# at T (-5.0 at 25 °C); from memory. The average Cp follows as
# (S_T - S_25) / ln(T/Tr), an independent route to the Cp parameters.
CC_ENTROPY = {
    60.0: {"cation": (3.9, 0.955), "anion": (-5.1, 0.969), "H": -2.5},
    100.0: {"cation": (10.3, 0.876), "anion": (-13.0, 1.000), "H": 2.0},
    150.0: {"cation": (16.2, 0.792), "anion": (-21.3, 0.989), "H": 6.5},
    200.0: {"cation": (23.3, 0.711), "anion": (-30.2, 0.981), "H": 11.1},
}


@pytest.mark.parametrize("t", sorted(CC_ENTROPY))
@pytest.mark.parametrize(
    "s_conv, z, kind",
    # Na+ and Cl- conventional entropies from the CRC table in `chemicals`
    [(59.0, 1, "cation"), (56.5, -1, "anion"), (-137.7, 2, "cation")],
)
def test_criss_cobble_against_entropy_correspondence(t, s_conv, z, kind):
    cal = 4.184
    s_abs = s_conv / cal - 5.0 * z
    a, b = CC_ENTROPY[t][kind]
    ln = math.log((t + 273.15) / 298.15)
    cp_abs = (a + (b - 1.0) * s_abs) / ln
    cp_h = (CC_ENTROPY[t]["H"] + 5.0) / ln
    expected = (cp_abs - z * cp_h) * cal
    # the Cp table is rounded to 1 cal (alpha) and 0.01 (beta): 1.5 cal = 6.3 J
    assert thermo.criss_cobble_cp(s_conv, z, t, kind=kind) == pytest.approx(expected, abs=6.3)


def test_criss_cobble_zero_correction_at_25c_and_array():
    cp = thermo.criss_cobble_cp(-137.7, 2, np.array([25.0, 100.0]))
    assert cp.shape == (2,)
    assert thermo.apparent_gibbs(-78.9, -137.7, 25.0, cp_j_molk=float(cp[0])) == -78.9


def test_criss_cobble_h_plus_is_zero():
    assert thermo.criss_cobble_cp(0.0, 1, 150.0, kind="H+") == 0.0


def test_criss_cobble_warns_above_200c():
    with pytest.warns(RangeWarning, match="200"):
        thermo.criss_cobble_cp(56.5, -1, 250.0)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        thermo.criss_cobble_cp(56.5, -1, 200.0)


def test_criss_cobble_bad_input():
    with pytest.raises(OptionError, match="valid: cation"):
        thermo.criss_cobble_cp(10.0, 1, 100.0, kind="zwitterion")
    with pytest.raises(OptionError, match="ions only"):
        thermo.criss_cobble_cp(10.0, 0, 100.0)
    with pytest.raises(ConditionsError, match="outside"):
        thermo.criss_cobble_cp(10.0, 1, -5.0)


@pytest.mark.parametrize(
    "comp, z, kind",
    [
        ({"Cl": 1}, -1, "anion"),
        ({"O": 1, "H": 1}, -1, "anion"),  # Criss & Cobble class OH- with simple anions
        ({"S": 1, "O": 4}, -2, "oxyanion"),
        ({"H": 1, "S": 1, "O": 4}, -1, "acid-oxyanion"),
        ({"Fe": 1}, 3, "cation"),
        ({"H": 1}, 1, "H+"),
    ],
)
def test_criss_cobble_kind(comp, z, kind):
    assert thermo.criss_cobble_kind(comp, z) == kind


def test_criss_cobble_kind_neutral():
    with pytest.raises(OptionError, match="neutral"):
        thermo.criss_cobble_kind({"Fe": 1, "O": 2, "H": 2}, 0)


# ----------------------------------------------------------------- species_gibbs


def _sp(name, phase, charge, comp, dgf, s=None, cp=None, mk=None, tmax=None):
    a, b, c = mk if mk else (None, None, None)
    return SimpleNamespace(
        name=name,
        phase=phase,
        charge=charge,
        composition=comp,
        dgf_kj_mol=dgf,
        dhf_kj_mol=None,
        s_j_molk=s,
        cp_j_molk=cp,
        mk_a_j_molk=a,
        mk_b_j_molk2=b,
        mk_c_jk_mol=c,
        mk_tmax_k=tmax,
    )


def test_species_gibbs_routes():
    h = _sp("H^+", "aq", 1, {"H": 1}, 0.0, 0.0, 0.0)
    assert thermo.species_gibbs(h, 200.0) == (0.0, "convention (H+ = 0)", 600.0)

    water = _sp("H2O", "l", 0, {"H": 2, "O": 1}, -237.14, 69.95, 75.3)
    r = thermo.species_gibbs(water, 150.0)
    assert r.route.startswith("IAPWS-95")
    # the row's own 25 °C value is carried by the IAPWS-95 change
    assert r.dg_kj_mol == pytest.approx(thermo.water_gibbs(150.0) + (-237.14 + 237.129), abs=1e-12)

    # illustrative Maier–Kelley row (only the route and its limit are checked here)
    fe3o4 = _sp(
        "Fe3O4", "s", 0, {"Fe": 3, "O": 4}, -1015.4, 146.4, 143.4, (91.55, 0.2017, 0.0), 900.0
    )
    r = thermo.species_gibbs(fe3o4, 200.0)
    assert r.route == "Maier–Kelley" and r.valid_to_c == pytest.approx(626.85)

    so4 = _sp("SO4^2-", "aq", -2, {"S": 1, "O": 4}, -744.53, 20.1, -293.0)
    assert thermo.species_gibbs(so4, 100.0).route == "estimated HKF"
    r = thermo.species_gibbs(so4, 100.0, aqueous_route="criss-cobble")
    assert (r.route, r.valid_to_c) == ("constant Cp", 150.0)

    fe2 = _sp("Fe^2+", "aq", 2, {"Fe": 1}, -78.9, -137.7)
    assert thermo.species_gibbs(fe2, 100.0).route == "estimated HKF"
    r = thermo.species_gibbs(fe2, 100.0, aqueous_route="criss-cobble")
    assert (r.route, r.valid_to_c) == ("Criss–Cobble", 200.0)
    cp = thermo.criss_cobble_cp(-137.7, 2, 100.0)
    assert r.dg_kj_mol == pytest.approx(thermo.apparent_gibbs(-78.9, -137.7, 100.0, cp_j_molk=cp))

    feoh2 = _sp("Fe(OH)2", "aq", 0, {"Fe": 1, "O": 2, "H": 2}, -400.0, 50.0)
    assert thermo.species_gibbs(feoh2, 60.0).route == "estimated HKF"
    r = thermo.species_gibbs(feoh2, 60.0, aqueous_route="criss-cobble")
    assert r.route == "S only (Cp = 0)"
    with pytest.raises(OptionError, match="criss-cobble"):
        thermo.species_gibbs(feoh2, 60.0, aqueous_route="cobble")

    nos = _sp("ZnOH^+", "aq", 1, {"Zn": 1, "O": 1, "H": 1}, -330.1)
    r = thermo.species_gibbs(nos, 60.0)
    assert r == (-330.1, "no entropy: 25 °C value", 25.0)

    # exactly the table value at 25 °C, whatever the route
    assert thermo.species_gibbs(fe2, 25.0) == (-78.9, "25 °C value", math.inf)
    assert thermo.species_gibbs(water, 25.0).dg_kj_mol == -237.14


def test_species_gibbs_criss_cobble_above_200_reports_limit():
    fe2 = _sp("Fe^2+", "aq", 2, {"Fe": 1}, -78.9, -137.7)
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # the limit travels in valid_to_c, not a warning
        r = thermo.species_gibbs(fe2, 250.0, aqueous_route="criss-cobble")
    assert r.valid_to_c < 250.0


def test_species_gibbs_bad_temperature():
    fe2 = _sp("Fe^2+", "aq", 2, {"Fe": 1}, -78.9, -137.7)
    with pytest.raises(ConditionsError, match="outside"):
        thermo.species_gibbs(fe2, 610.0)
    with pytest.raises(ConditionsError, match="one temperature"):
        thermo.species_gibbs(fe2, [25.0, 50.0])


def test_import_does_not_pull_matplotlib_or_iapws():
    import subprocess
    import sys

    code = (
        "import sys, pourbaix.physics.thermo, pourbaix.physics.solution, pourbaix.physics.electrodes; "
        "print('matplotlib' in sys.modules, 'iapws' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.split() == ["False", "False"]


def test_reference_state_shortcut_equals_the_computed_state():
    # the 25 °C / 1 bar shortcut must be exactly what IAPWS-95, R8-97 and R11-07 give
    from pourbaix.physics import thermo

    assert thermo.water_properties(25.0) == thermo._water_properties_cached(25.0, 0.1)
    assert thermo.water_properties(25.0, 1.0) == thermo._water_properties_cached(25.0, 0.1)
