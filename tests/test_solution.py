"""Tests for pourbaix.physics.solution: ionic strength, backgrounds, activity models."""

import math
import warnings

import chempy.electrolytes as ce
import numpy as np
import pytest

from pourbaix.errors import ConditionsError, FormulaError, OptionError
from pourbaix.physics import solution
from pourbaix.physics.thermo import RangeWarning, water_properties

# ----------------------------------------------------------------- ionic strength


def test_ionic_strength_mapping_and_tuples():
    # definition I = 1/2 sum m z^2 (Lewis & Randall 1921): 0.01 m CaCl2 -> 0.03
    assert solution.ionic_strength({"Ca^2+": 0.01, "Cl-": 0.02}) == pytest.approx(0.03)
    assert solution.ionic_strength([(0.01, 2), (0.02, -1)]) == pytest.approx(0.03)
    assert solution.ionic_strength([("SO4^2-", 0.1, -2), ("Mg+2", 0.1, 2)]) == pytest.approx(0.4)
    # chempy.electrolytes.ionic_strength as an outside reference
    m, z = [0.1, 0.05, 0.2], [1, -2, 3]
    assert solution.ionic_strength(list(zip(m, z, strict=True))) == pytest.approx(
        ce.ionic_strength(m, z, warn=False)
    )


def test_ionic_strength_array_and_edges():
    out = solution.ionic_strength([(np.array([0.1, 0.2]), 1), (np.array([0.1, 0.2]), -1)])
    np.testing.assert_allclose(out, [0.1, 0.2])
    assert solution.ionic_strength([]) == 0.0
    assert solution.ionic_strength({"H4SiO4": 0.5}) == 0.0  # neutral species add nothing


def test_ionic_strength_bad_input():
    with pytest.raises(ConditionsError, match="molality of Na\\^\\+"):
        solution.ionic_strength({"Na^+": -0.1})
    with pytest.raises(ConditionsError, match="not a number"):
        solution.ionic_strength([(("x"), 1)])
    with pytest.raises(FormulaError, match="ion 'Qq\\^\\+'"):
        solution.ionic_strength({"Qq^+": 0.1})


# ----------------------------------------------------------------- backgrounds


def test_parse_background():
    assert solution.parse_background("NaCl=0.5,CaCl2=0.01") == {"NaCl": 0.5, "CaCl2": 0.01}
    assert solution.parse_background(" nacl = 0.1 , ") == {"NaCl": 0.1}
    assert solution.parse_background("") == {}


@pytest.mark.parametrize(
    "text, err, match",
    [
        ("NaBr=0.1", OptionError, "unknown salt 'NaBr'; valid salts: NaCl, KCl"),
        ("NaCl=-0.1", ConditionsError, "molality of NaCl must be"),
        ("NaCl=abc", ConditionsError, "molality of NaCl is not a number"),
        ("NaCl", ConditionsError, "SALT=MOLALITY"),
        ("NaCl=0.1,nacl=0.2", ConditionsError, "given twice"),
    ],
)
def test_parse_background_bad(text, err, match):
    with pytest.raises(err, match=match):
        solution.parse_background(text)


def test_background_ions_and_ionic_strength():
    ions = solution.background_ions({"NaCl": 0.5, "CaCl2": 0.01})
    assert ions == [("Na^+", 0.5, 1), ("Cl^-", 0.52, -1), ("Ca^2+", 0.01, 2)]
    # I = 1/2 (0.5 + 0.52 + 4 x 0.01) = 0.53 (definition)
    assert solution.ionic_strength(ions) == pytest.approx(0.53)
    # Na2SO4: I = 3 m (textbook result for a 1:2 salt)
    assert solution.ionic_strength(solution.background_ions({"Na2SO4": 0.1})) == pytest.approx(0.3)


def test_background_ions_bad():
    with pytest.raises(OptionError, match="valid salts"):
        solution.background_ions({"NaI": 0.1})
    with pytest.raises(ConditionsError, match="KCl"):
        solution.background_ions({"KCl": -1})


def test_ion_size_kielland():
    # Kielland 1937, Table I (from memory): Ca2+ 6, Mg2+ 8, H+ 9, K+ 3 Å
    assert solution.ion_size("Ca^2+") == 6.0
    assert solution.ion_size("Mg+2") == 8.0
    assert solution.ion_size("H+") == 9.0
    assert solution.ion_size("K^+") == 3.0
    assert solution.ion_size("U^4+") == solution.DEFAULT_ION_SIZE
    assert solution.ion_size("not a formula ((") == solution.DEFAULT_ION_SIZE


# ----------------------------------------------------------------- A(T), B(T)

TEMPS = [0.0, 25.0, 60.0, 100.0, 200.0, 300.0]


def _chempy_ab(t):
    w = water_properties(t)
    tk = t + 273.15
    # chempy returns A for ln-based expressions and B in 1/m
    a = ce.A(w.dielectric_constant, tk, w.density_kg_m3) / math.log(10)
    b = ce.B(w.dielectric_constant, tk, w.density_kg_m3) * 1e-10
    return a, b


@pytest.mark.parametrize("t", TEMPS)
def test_a_b_against_chempy(t):
    a, b = _chempy_ab(t)
    # chempy's combined constants predate CODATA 2018: relative 2e-6 apart
    assert solution.debye_huckel_a(t) == pytest.approx(a, rel=1e-5)
    assert solution.debye_huckel_b(t) == pytest.approx(b, rel=1e-5)


def test_a_published_25c():
    # A_phi = 0.3915 kg^0.5 mol^-0.5 at 25 °C (Archer & Wang 1990, J. Phys. Chem. Ref.
    # Data 19, 371; from memory); A_gamma(log10) = 3 A_phi / ln 10 = 0.5101.
    # Tolerance 0.001: the dielectric formulations differ by ~0.05 %.
    assert solution.debye_huckel_a(25.0) == pytest.approx(3 * 0.3915 / math.log(10), abs=1e-3)


def test_a_b_arrays_and_bad_temperature():
    t = np.array([25.0, 100.0])
    a = solution.debye_huckel_a(t)
    b = solution.debye_huckel_b(t)
    assert a.shape == b.shape == (2,)
    assert a[1] > a[0] and b[1] > b[0]  # both rise with T (εT falls)
    with pytest.raises(ConditionsError, match="above 350 °C"):
        solution.debye_huckel_a(360.0)
    with pytest.raises(ConditionsError, match="boil"):
        solution.debye_huckel_b(150.0, 1.0)


def test_bdot_table():
    # Helgeson 1969 (from memory): 0.041 at 25 °C, 0.046 at 100 °C
    assert solution.bdot(25.0) == pytest.approx(0.041)
    assert solution.bdot(100.0) == pytest.approx(0.046)
    np.testing.assert_allclose(solution.bdot(np.array([25.0, 100.0])), [0.041, 0.046])
    with pytest.raises(ConditionsError):
        solution.bdot(-10.0)


# ----------------------------------------------------------------- log gamma vs chempy


@pytest.mark.filterwarnings("ignore::pourbaix.physics.thermo.RangeWarning")  # I = 0.3 > EDH's 0.1
@pytest.mark.parametrize("t", [25.0, 60.0, 150.0])
@pytest.mark.parametrize("ionic", [0.001, 0.05, 0.3])
@pytest.mark.parametrize("z", [1, -2, 3])
def test_models_against_chempy(t, ionic, z):
    a, b = _chempy_ab(t)
    size = 4.5
    assert solution.log_gamma(z, ionic, t, "davies") == pytest.approx(
        ce.davies_log_gamma(ionic, z, a), rel=1e-5
    )
    assert solution.log_gamma(z, ionic, t, "extended-debye-huckel", size) == pytest.approx(
        ce.extended_log_gamma(ionic, z, size, a, b), rel=1e-5
    )
    # B-dot is the extended form plus a linear term C I (chempy's C)
    assert solution.log_gamma(z, ionic, t, "b-dot", size) == pytest.approx(
        ce.extended_log_gamma(ionic, z, size, a, b, C=solution.bdot(t)), rel=1e-5
    )


def test_log_gamma_arrays_and_neutral():
    out = solution.log_gamma(np.array([0, 1, 2]), 0.1)
    assert out[0] == 0.0  # neutral species: gamma = 1 (no Setschenow term)
    # Davies: log gamma scales with z^2 (Davies 1962)
    assert out[2] == pytest.approx(4 * out[1])
    out = solution.log_gamma(1, np.array([0.0, 0.01, 0.1]))
    assert out[0] == 0.0 and out[1] > out[2]


@pytest.mark.parametrize(
    "model, warn_at, refuse_at",
    [("davies", 0.6, 1.1), ("extended-debye-huckel", 0.2, 1.1), ("b-dot", 1.5, 3.5)],
)
def test_model_limits(model, warn_at, refuse_at):
    lo, hi, text = solution.model_validity(model)
    assert lo < warn_at < hi < refuse_at
    assert text
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        solution.log_gamma(1, lo, 25.0, model)  # at the limit: no warning
    with pytest.warns(RangeWarning, match=model):
        solution.log_gamma(1, warn_at, 25.0, model)
    with pytest.raises(ConditionsError, match=f"{model} model's limit of {hi:g} mol/kg"):
        solution.log_gamma(1, refuse_at, 25.0, model)


def test_unknown_model_and_bad_input():
    with pytest.raises(OptionError, match="valid models: davies, extended-debye-huckel, b-dot"):
        solution.log_gamma(1, 0.1, model="truesdell-jones")
    with pytest.raises(OptionError, match="valid models"):
        solution.model_validity("truesdell")
    with pytest.raises(ConditionsError, match="ionic strength"):
        solution.log_gamma(1, -0.1)
    with pytest.raises(ConditionsError, match="outside"):
        solution.log_gamma(1, 0.1, 610.0)
    with pytest.raises(ConditionsError, match="ion size"):
        solution.log_gamma(1, 0.1, model="b-dot", ion_size_angstrom=0.0)


def test_model_aliases():
    assert solution.model_validity("EDH") == solution.model_validity("extended-debye-huckel")
    assert solution.model_validity("bdot") == solution.model_validity("b-dot")
    assert solution.model_validity(None) == solution.model_validity("davies")


# ----------------------------------------------------------------- NaCl against Robinson & Stokes

# Robinson & Stokes, Electrolyte Solutions, 2nd ed. (1959), Appendix 8.10: mean
# molal activity coefficient of NaCl at 25 °C (from memory): 0.778 at 0.1,
# 0.681 at 0.5 and 0.657 at 1.0 mol/kg. Tolerances are the accuracy each
# model states in model_validity(): Davies 2 % to 0.1 and 10 % at 0.5;
# extended Debye–Hückel 3 % to 0.1 and 10 % at 0.5; B-dot 5 % to 1 mol/kg.
NACL_CASES = [
    ("davies", 0.1, 0.778, 0.02),
    ("davies", 0.5, 0.681, 0.10),
    ("extended-debye-huckel", 0.1, 0.778, 0.03),
    ("extended-debye-huckel", 0.5, 0.681, 0.10),
    ("b-dot", 0.1, 0.778, 0.05),
    ("b-dot", 0.5, 0.681, 0.05),
    ("b-dot", 1.0, 0.657, 0.05),
]


@pytest.mark.parametrize("model, m, gamma, rel", NACL_CASES)
def test_nacl_mean_activity_robinson_stokes(model, m, gamma, rel):
    lo = solution.model_validity(model)[0]
    if m > lo:
        with pytest.warns(RangeWarning):
            got = solution.mean_activity_coefficient("NaCl", m, 25.0, model)
    else:
        got = solution.mean_activity_coefficient("NaCl", m, 25.0, model)
    assert got == pytest.approx(gamma, rel=rel)


def test_mean_activity_array_and_bad():
    out = solution.mean_activity_coefficient("nacl", np.array([0.001, 0.01]))
    assert out.shape == (2,) and out[0] > out[1]
    # Davies at 0.001 mol/kg is the limiting law to 0.1 %: 10^(-A sqrt(I)) (Debye & Hückel 1923)
    a = solution.debye_huckel_a(25.0)
    assert out[0] == pytest.approx(10 ** (-a * math.sqrt(0.001)), rel=2e-3)
    with pytest.raises(OptionError, match="valid salts"):
        solution.mean_activity_coefficient("NaF", 0.1)
    with pytest.raises(ConditionsError, match="NaCl"):
        solution.mean_activity_coefficient("NaCl", -0.1)
    with pytest.raises(ConditionsError, match="davies model's limit"):
        solution.mean_activity_coefficient("CaCl2", 0.5)  # I = 1.5
