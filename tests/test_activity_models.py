"""SIT and Pitzer against published tables and worked values; ranges enforced.

Sources of the check values (all from memory, as marked):
- Robinson & Stokes, *Electrolyte Solutions*, 2nd ed. (1959), Appendix 8.10: mean molal
  activity coefficients at 25 °C of NaCl, CaCl2, HCl, KCl and MgCl2; Appendix 8.3: osmotic
  coefficients.
- Millero & Leung (1976), Am. J. Sci. 276, 1035: osmotic coefficient of seawater of
  salinity 35 at 25 °C, 0.901.
- NEA-TDB (Grenthe et al. 1992, Appendix B): D = 0.509 sqrt(I)/(1 + 1.5 sqrt(I)) at 25 °C and
  eps(Na+, Cl-) = 0.03, eps(H+, Cl-) = 0.12, eps(Cu2+, Cl-) = 0.08 kg/mol.
"""

import math
import warnings

import pytest

from pourbaix.errors import ConditionsError, OptionError
from pourbaix.physics import pitzer, sit, solution
from pourbaix.physics.thermo import RangeWarning

# Robinson & Stokes 1959, Appendix 8.10 (from memory)
NACL_GAMMA = {
    0.1: 0.778,
    0.5: 0.681,
    1.0: 0.657,
    2.0: 0.668,
    3.0: 0.714,
    4.0: 0.783,
    5.0: 0.874,
    6.0: 0.986,
}
CACL2_GAMMA = {0.1: 0.518, 0.5: 0.448, 1.0: 0.500, 2.0: 0.792, 3.0: 1.483}

# Millero et al. 2008 (Deep-Sea Res. I 55, 50), reference-composition seawater, S = 35, major
# ions [mol/kg water] (from memory); Br-, borate, Sr2+ and F- (under 0.2 % of the salt) left out
SEAWATER = {
    "Na^+": 0.4860597,
    "Mg^2+": 0.0547421,
    "Ca^2+": 0.0106568,
    "K^+": 0.0105797,
    "Cl^-": 0.5657647,
    "SO4^2-": 0.0292643,
    "HCO3^-": 0.0017803,
    "CO3^2-": 0.0002477,
}


@pytest.mark.parametrize("m,expected", sorted(NACL_GAMMA.items()))
def test_pitzer_nacl_to_6_molal(m, expected):
    # tables give 3 decimals; the HMW84 fit reproduces them to about 0.5 %
    assert pitzer.mean_activity_coefficient("NaCl", m) == pytest.approx(expected, rel=0.006)


@pytest.mark.parametrize("m,expected", sorted(CACL2_GAMMA.items()))
def test_pitzer_cacl2_to_3_molal(m, expected):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RangeWarning)  # I = 9 mol/kg at 3 mol/kg CaCl2
        got = pitzer.mean_activity_coefficient("CaCl2", m)
    # the binary CaCl2 parameters of HMW84 reproduce the table to about 1.5 % up to 3 mol/kg
    assert got == pytest.approx(expected, rel=0.02)


def test_pitzer_osmotic_coefficients():
    # Robinson & Stokes 1959, Appendix 8.3 (from memory): NaCl 1 m 0.936, 6 m 1.271
    assert pitzer.pitzer({"Na^+": 1.0, "Cl^-": 1.0}).osmotic_coefficient == pytest.approx(
        0.936, abs=0.003
    )
    assert pitzer.pitzer({"Na^+": 6.0, "Cl^-": 6.0}).osmotic_coefficient == pytest.approx(
        1.271, abs=0.006
    )


def test_pitzer_seawater_osmotic_coefficient_and_water_activity():
    r = pitzer.pitzer(SEAWATER)
    # Millero & Leung 1976: phi = 0.901 at S = 35, 25 °C (from memory); minor ions left out
    assert r.osmotic_coefficient == pytest.approx(0.901, abs=0.005)
    # a_w = exp(-phi M_w sum m): 0.9814 for seawater of S = 35 (Millero & Leung 1976, from memory)
    assert r.water_activity == pytest.approx(0.9814, abs=3e-4)
    assert r.ionic_strength == pytest.approx(0.722, abs=0.002)  # of this composition, by hand


def test_pitzer_range_is_enforced():
    with pytest.raises(ConditionsError, match="25 °C"):
        pitzer.pitzer({"Na^+": 1.0, "Cl^-": 1.0}, temperature_c=60.0)
    with pytest.raises(OptionError, match="Cu"):
        pitzer.pitzer({"Cu^2+": 0.1, "Cl^-": 0.2})
    with pytest.raises(ConditionsError, match="limit"):
        pitzer.pitzer({"Ca^2+": 8.0, "Cl^-": 16.0})
    with pytest.warns(RangeWarning, match="above 9"):
        pitzer.pitzer({"Ca^2+": 3.5, "Cl^-": 7.0})
    with pytest.raises(ConditionsError, match=">= 0"):
        pitzer.pitzer({"Na^+": -1.0, "Cl^-": 1.0})


def test_pitzer_parameters_read_from_the_import():
    p = pitzer.load_parameters()
    # HMW84, Table 1 (from memory): NaCl beta0 0.0765, beta1 0.2664, C-phi 0.00127
    assert p["beta0"][("Cl^-", "Na^+")] == pytest.approx(0.0765)
    assert p["beta1"][("Cl^-", "Na^+")] == pytest.approx(0.2664)
    assert p["cphi"][("Cl^-", "Na^+")] == pytest.approx(0.00127)
    # MgSO4, a 2-2 salt with beta2 (HMW84 Table 1, from memory): -37.23
    assert p["beta2"][("Mg^2+", "SO4^2-")] == pytest.approx(-37.23)


def test_sit_worked_values():
    # NEA-TDB eq. B.4 by hand at 25 °C, 1 mol/kg NaCl: D = 0.509 x 1 / 2.5 = 0.2036
    d = 0.509 / 2.5
    assert sit.debye_huckel_term(1.0) == pytest.approx(d, rel=1e-12)
    r = sit.sit({"Na^+": 1.0, "Cl^-": 1.0, "H^+": 0.01, "Cu^2+": 0.001})
    i = r.ionic_strength
    d = 0.509 * math.sqrt(i) / (1 + 1.5 * math.sqrt(i))
    cl = 1.0  # the only anion: eps terms of the cations are eps(ion, Cl-) x 1 mol/kg
    assert r.log_gamma["H^+"] == pytest.approx(-d + 0.12 * cl, abs=1e-12)
    assert r.log_gamma["Cu^2+"] == pytest.approx(-4 * d + 0.08 * cl, abs=1e-12)
    assert r.log_gamma["Na^+"] == pytest.approx(-d + 0.03 * cl, abs=1e-12)


@pytest.mark.parametrize("m", [0.5, 1.0, 2.0, 3.0])
def test_sit_nacl_against_robinson_stokes(m):
    # SIT holds to about 3.5 mol/kg within a few per cent (NEA-TDB, Appendix B)
    assert sit.mean_activity_coefficient("NaCl", m) == pytest.approx(NACL_GAMMA[m], rel=0.03)


# Robinson & Stokes 1959, Appendix 8.10, mean molal activity coefficients at 25 °C (from
# memory), for salts whose epsilon the NEA-TDB tabulates; up to I = 3.5 mol/kg, SIT's range
RS_GAMMA = {
    "HCl": {0.5: 0.757, 1.0: 0.809, 2.0: 1.009, 3.0: 1.316},
    "NaCl": {m: NACL_GAMMA[m] for m in (0.5, 1.0, 2.0, 3.0)},
    "KCl": {0.5: 0.649, 1.0: 0.604, 2.0: 0.573, 3.0: 0.569},
    "CaCl2": {0.5: 0.448, 1.0: 0.500},
    "MgCl2": {0.5: 0.481, 1.0: 0.570},
}


@pytest.mark.parametrize("salt", sorted(RS_GAMMA))
def test_sit_epsilon_from_mean_activity_coefficients(salt):
    # The NEA-TDB way of finding epsilon(M, X) (Grenthe et al. 1992, Appendix B, section B.1.2;
    # Ciavatta 1980, Ann. Chim. (Rome) 70, 551): for a salt M_p X_q, SIT gives
    # log g± + |z_M z_X| D(I) = eps (2 p q / (p + q)) m, so eps is the slope of that line
    # through the measured g± (least squares through the origin). The tabulated eps must
    # agree with the slope within its stated uncertainty (the table's column); a mistyped
    # value (0.02 off) fails here.
    from pourbaix.physics.solution import SALTS

    (cation, p, z_c), (anion, q, z_a) = SALTS[salt]
    sxy = sxx = 0.0
    for m, gamma in RS_GAMMA[salt].items():
        ionic = 0.5 * (p * z_c**2 + q * z_a**2) * m
        y = math.log10(gamma) + abs(z_c * z_a) * sit.debye_huckel_term(ionic)
        x = 2 * p * q / (p + q) * m
        sxy, sxx = sxy + x * y, sxx + x * x
    eps = sit.load_epsilon()[(cation, anion)]
    rows = {
        (r["ion_1"], r["ion_2"]): float(r["uncertainty_kg_mol"])
        for r in _sit_rows()
        if r["ion_1"] == cation and r["ion_2"] == anion
    }
    assert sxy / sxx == pytest.approx(eps, abs=rows[(cation, anion)])
    # and the module's mean activity coefficient is that line's (the same eps and D)
    m = max(RS_GAMMA[salt])
    ionic = 0.5 * (p * z_c**2 + q * z_a**2) * m
    log_mean = -abs(z_c * z_a) * sit.debye_huckel_term(ionic) + eps * 2 * p * q / (p + q) * m
    assert math.log10(sit.mean_activity_coefficient(salt, m)) == pytest.approx(log_mean, abs=1e-12)


def _sit_rows():
    import csv

    from pourbaix.tables.species import data_dir

    with open(f"{data_dir()}/activity/sit_nea.csv", encoding="utf-8") as f:
        return list(csv.DictReader(line for line in f if not line.startswith("#")))


def test_sit_range_and_missing_pairs():
    with pytest.raises(ConditionsError, match="limit"):
        sit.sit({"Na^+": 7.0, "Cl^-": 7.0})
    with pytest.warns(RangeWarning, match="3.5"):
        sit.sit({"Na^+": 4.0, "Cl^-": 4.0})
    with pytest.raises(ConditionsError, match="50"):
        sit.sit({"Na^+": 1.0, "Cl^-": 1.0}, temperature_c=80.0)
    r = sit.sit({"Cs^+": 0.1, "Cl^-": 0.1})
    assert r.missing == (("Cs^+", "Cl^-"),)


def test_registry_knows_the_new_models():
    d = 0.509 * math.sqrt(0.5) / (1 + 1.5 * math.sqrt(0.5))
    assert solution.log_gamma(2, 0.5, model="sit") == pytest.approx(-4 * d, rel=1e-12)
    lo, hi, text = solution.model_validity("sit")
    assert (lo, hi) == (3.5, 6.0) and "NEA-TDB" in text
    # Pitzer's long-range term at 1 mol/kg: f = -A_phi (sqrt I/(1 + 1.2 sqrt I) + (2/1.2) ln(1 + 1.2 sqrt I))
    f = -0.3915 * (1 / 2.2 + 2 / 1.2 * math.log(2.2))
    assert solution.log_gamma(1, 1.0, model="pitzer") == pytest.approx(f / math.log(10), rel=1e-12)
    with pytest.raises(ConditionsError, match="25 °C"):
        solution.log_gamma(1, 1.0, temperature_c=60.0, model="pitzer")


def test_sit_medium_terms_enter_the_mass_balanced_equilibrium():
    # Cu2+ in 1 mol/kg NaCl by SIT: log g = -4 D(I) + eps(Cu2+, Cl-) x 1 mol/kg, eps = 0.08
    # (NEA-TDB); at pH 2 and 0.8 V all the 1e-4 mol/kg copper is Cu2+ (no chloride ligand here)
    from pourbaix.analyses.speciation import compute_speciation

    r = compute_speciation(
        "Cu",
        {"Cu": 1e-4},
        ph=2.0,
        potential_range_v=(0.79, 0.81),
        points=3,
        background="NaCl=1",
        activity_model="sit",
    )
    from pourbaix.physics.components import build_system
    from pourbaix.physics.sit import system_medium_terms
    from pourbaix.solve.equilibrium import solve_at

    system = build_system("Cu", {"Cu": 1e-4})
    terms, _ = system_medium_terms(system, "NaCl=1")
    res = solve_at(
        system,
        2.0,
        0.8,
        activity_model="sit",
        background_ionic_strength=1.0,
        specific_log_gamma=terms,
    )
    i = res.ionic_strength
    d = 0.509 * math.sqrt(i) / (1 + 1.5 * math.sqrt(i))
    assert res.log_gamma[system.index("Cu^2+")] == pytest.approx(-4 * d + 0.08, abs=1e-12)
    assert r.amounts[1, r.system.index("Cu^2+")] == pytest.approx(
        res.amounts[system.index("Cu^2+")], rel=1e-9
    )


# ----------------------------------------------------------------- Pitzer inside the solver


def _phase_log_k(name):
    """log K of a PHASES entry of the pitzer.dat that pygcc ships (HMW84's 25 °C values)."""
    import importlib.util
    from pathlib import Path

    path = Path(importlib.util.find_spec("pygcc").origin).parent / "default_db" / "pitzer.dat"
    lines = path.read_text(encoding="utf-8", errors="replace").splitlines()
    start = lines.index("PHASES")
    at = next(i for i in range(start, len(lines)) if lines[i].strip() == name)
    row = next(ln for ln in lines[at : at + 6] if ln.split() and ln.split()[0] == "log_k")
    return float(row.split()[1])


def _salt_solubility(cation, anion, z_cation, z_anion, log_k, total, background=None, water=0):
    """Molality of the salt dissolved at saturation, solved with Pitzer inside the solver.

    Components (cation, anion); the solid M_1 X_1 . water H2O at unit activity with
    ln K = ln a_M + ln a_X + water ln a_w (a_w from Pitzer, settled by repeating the solve).
    """
    from pourbaix.solve.equilibrium import solve_equilibrium

    function = pitzer.solver_log_gamma([cation, anion], [z_cation, z_anion], background)
    ln_aw = 0.0
    for _ in range(40):
        r = solve_equilibrium(
            [[1, 0], [0, 1], [1, 1]],
            [0.0, 0.0, log_k * math.log(10) - water * ln_aw],
            [True, True, False],
            [total, total],
            charges=[z_cation, z_anion, 0],
            composition_log_gamma=function,
        )
        assert r.present[2]  # saturated
        comp = {cation: r.amounts[0], anion: r.amounts[1]}
        if background:
            for salt, m in background.items():
                for ion, n, _ in solution.SALTS[salt]:
                    comp[ion] = comp.get(ion, 0.0) + n * m
        new = math.log(pitzer.pitzer(comp).water_activity)
        if abs(new - ln_aw) < 1e-13:
            break
        ln_aw = new
    # the mass balance holds to 1e-10 with gamma from the composition (the solver's tolerance)
    assert abs(r.amounts[0] + r.amounts[2] - total) <= 1e-10 * total
    return r.amounts[0]


@pytest.mark.parametrize(
    "cation,anion,phase,expected",
    [
        # CRC Handbook of Chemistry and Physics, "Aqueous solubility of inorganic compounds",
        # 25 °C (from memory): NaCl 26.45 and KCl 26.22 mass % -> 6.154 and 4.767 mol/kg
        ("Na^+", "Cl^-", "Halite", 26.45 / (73.55 * 0.058443)),
        ("K^+", "Cl^-", "Sylvite", 26.22 / (73.78 * 0.074551)),
    ],
)
def test_pitzer_in_the_solver_halite_and_sylvite_solubility(cation, anion, phase, expected):
    # the solids' log K are HMW84's (read from the pitzer.dat file pygcc ships); the saturated
    # solutions (I = 4.8 and 6.2 mol/kg) need the binary terms: an ideal solution gives
    # 10^(log K / 2), 2.8 mol/kg for sylvite (41 % low). HMW84 fit these data to about 1 %.
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RangeWarning)
        got = _salt_solubility(cation, anion, 1, -1, _phase_log_k(phase), 7.0)
    assert got == pytest.approx(expected, rel=0.015)


def test_pitzer_in_the_solver_gypsum_in_sodium_chloride_brines():
    # Marshall & Slusher 1966 (J. Phys. Chem. 70, 4015), 25 °C (from memory; also plotted
    # against the model in Harvie, Møller & Weare 1984): gypsum dissolves to about
    # 0.0154 mol/kg in water, and NaCl raises that to a maximum of about 0.056 mol/kg near
    # 3 mol/kg NaCl, falling beyond. Needs the Ca-Cl, Na-SO4 binary terms, the Ca-Na theta
    # and Cl-SO4 mixing terms, and the water activity (gypsum is a dihydrate).
    log_k = _phase_log_k("Gypsum")
    s = {
        nacl: _salt_solubility(
            "Ca^2+", "SO4^2-", 2, -2, log_k, 0.2, {"NaCl": nacl} if nacl else None, water=2
        )
        for nacl in (0.0, 1.0, 2.0, 3.0, 4.0, 6.0)
    }
    assert s[0.0] == pytest.approx(0.0154, rel=0.03)  # read to 3 figures
    peak = max(s, key=s.get)
    assert 2.0 <= peak <= 4.0
    assert s[peak] == pytest.approx(0.056, rel=0.05)  # read off a figure
    assert s[6.0] < s[peak]


def test_pitzer_in_the_solver_range_is_enforced():
    from pourbaix.physics.components import build_system
    from pourbaix.solve.equilibrium import solve_at

    hot = build_system("Na", {"Na": 1.0, "Cl": 1.0}, temperature_c=60.0, exclude=["NaCl(aq)"])
    with pytest.raises(ConditionsError, match="25 °C"):
        solve_at(hot, 7.0, 0.5, activity_model="pitzer")
    cold = build_system("Ca", {"Ca": 0.01, "S": 0.01}, exclude=["CaSO4(aq)"])
    with pytest.raises(OptionError, match="NO3"):
        solve_at(cold, 7.0, 0.6, activity_model="pitzer", background="NaNO3=1")
    with pytest.raises(ConditionsError, match="limit"):
        solve_at(cold, 7.0, 0.6, activity_model="pitzer", background="NaCl=25")
    # inside the range: the system's ions and the background in one evaluation
    r = solve_at(cold, 7.0, 0.6, activity_model="pitzer", background="NaCl=1")
    ca, so4 = cold.index("Ca^2+"), cold.index("SO4^2-")
    m = {"Na^+": 1.0, "Cl^-": 1.0, "Ca^2+": r.amounts[ca], "SO4^2-": r.amounts[so4]}
    others = {
        n: int(z) for n, z, a in zip(cold.names, cold.charges, cold.aqueous, strict=True) if a
    }
    for n in others:
        if n not in m and n not in pitzer.PITZER_IONS:
            m[n] = max(r.amounts[cold.index(n)], 1e-300)
    direct = pitzer.pitzer(m, other_charges=others).log_gamma
    assert r.log_gamma[ca] == pytest.approx(direct["Ca^2+"], abs=1e-10)


def test_pitzer_in_solve_at_feeds_the_water_activity_back():
    # Gypsum (CaSO4·2H2O) in NaCl brines through the system-level solver: each equilibrium
    # that takes up water moves with the brine's water activity (Pitzer's osmotic
    # coefficient), here as a_w^2 in the gypsum solubility product. The tables' gypsum is
    # not HMW84's (its solubility in water comes out 0.018 mol/kg), so the check is the
    # rise over pure water: Marshall & Slusher 1966, 25 °C (from memory, as above): about
    # 0.0154 mol/kg in water and a maximum of about 0.056 near 3 mol/kg NaCl, a factor 3.64.
    # With the water activity left at 1 the factor comes out 3.13.
    from pourbaix.physics.components import build_system
    from pourbaix.solve.equilibrium import solve_at

    # anhydrite and the CaSO4 ion pair left out: M&S measured gypsum; HMW84 has no pair
    system = build_system(
        "Ca", {"Ca": 0.2, "S": 0.2}, exclude=["CaSO4(aq)", "CaSO4:anhydrite"]
    )
    ca, so4 = system.index("Ca^2+"), system.index("SO4^2-")
    dissolved, start = {}, None
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RangeWarning)
        for nacl in (0.0, 1.0, 2.0, 2.5, 3.0, 3.5, 4.0, 6.0):
            r = solve_at(
                system, 7.0, 0.6, activity_model="pitzer",
                background=f"NaCl={nacl}" if nacl else None, start=start,
            )  # fmt: skip
            assert r.present[system.index("CaSO4·2H2O:gypsum")]
            dissolved[nacl] = r.amounts[ca]
            start = r
            # the water activity used is that of the equilibrium's own composition
            brine = {"Ca^2+": r.amounts[ca], "SO4^2-": r.amounts[so4]}
            if nacl:
                brine.update({"Na^+": nacl, "Cl^-": nacl})
            assert r.water_activity == pytest.approx(pitzer.pitzer(brine).water_activity, abs=1e-6)
    peak = max(dissolved, key=dissolved.get)
    assert 2.5 <= peak <= 3.5
    assert dissolved[peak] / dissolved[0.0] == pytest.approx(0.056 / 0.0154, rel=0.05)
    assert dissolved[6.0] < dissolved[peak]


def test_a_water_activity_given_with_pitzer_is_refused():
    # the Pitzer model computes the water activity from the brine: a second value would
    # contradict it
    from pourbaix.conditions import make_conditions

    with pytest.raises(ConditionsError, match="Pitzer model, which computes it"):
        make_conditions("Ca", activity_model="pitzer", water_activity=0.9)
    assert make_conditions("Ca", activity_model="pitzer").water_activity == 1.0
