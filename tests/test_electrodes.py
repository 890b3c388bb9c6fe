"""Tests for pourbaix.physics.electrodes: reference electrodes at temperature and conversions."""

import math
import warnings

import numpy as np
import pytest

from pourbaix.errors import ConditionsError, OptionError
from pourbaix.physics import electrodes
from pourbaix.physics.thermo import RangeWarning

K_B = 1.380649e-23  # J/K, CODATA 2018 exact
E_CHARGE = 1.602176634e-19  # C, CODATA 2018 exact

# ----------------------------------------------------------------- Ag/AgCl standard potential

# Bates & Bower 1954, J. Res. NBS 53, 283, table of E°(AgCl/Ag) in V, 0-60 °C
# (5 decimals; from memory).
BATES_BOWER = [
    (0.0, 0.23655),
    (5.0, 0.23413),
    (10.0, 0.23142),
    (15.0, 0.22857),
    (20.0, 0.22557),
    (25.0, 0.22234),
    (30.0, 0.21904),
    (35.0, 0.21565),
    (40.0, 0.21208),
    (45.0, 0.20835),
    (50.0, 0.20449),
    (55.0, 0.20056),
    (60.0, 0.19649),
]


@pytest.mark.parametrize("t, e0", BATES_BOWER)
def test_agcl_standard_potential_bates_bower(t, e0):
    # within 0.1 mV, the precision the paper's fit claims for its table
    assert electrodes.agcl_standard_potential(t) == pytest.approx(e0, abs=1e-4)


def test_agcl_standard_potential_array_and_range():
    t, e0 = (np.array(v) for v in zip(*BATES_BOWER, strict=True))
    np.testing.assert_allclose(electrodes.agcl_standard_potential(t), e0, atol=1e-4)
    with pytest.warns(RangeWarning, match="0-95"):
        electrodes.agcl_standard_potential(150.0)
    with pytest.raises(ConditionsError, match="outside"):
        electrodes.agcl_standard_potential(-5.0)


# ----------------------------------------------------------------- registry and values

REQUIRED = [
    "SHE",
    "SCE",
    "Ag/AgCl-sat",
    "Ag/AgCl-3M",
    "Ag/AgCl-1M",
    "Ag/AgCl-seawater",
    "Cu/CuSO4",
    "Hg/HgO-1M",
    "Hg/Hg2SO4",
    "RHE",
]


def test_list_references_complete_with_sources():
    refs = electrodes.list_references()
    names = [r["name"] for r in refs]
    assert names == REQUIRED
    for r in refs:
        assert r["source"] and r["description"]
        lo, hi = r["valid_range_c"]
        assert 0.0 <= lo < 25.0 < hi <= 600.0
    rhe = refs[names.index("RHE")]
    assert rhe["offset_v"] is None and rhe["dE_dT_v_per_k"] is None


@pytest.mark.parametrize(
    "name, value, tol",
    [
        ("SCE", 0.2412, 1e-4),  # Bard & Faulkner 2001, Table C.1 (from memory)
        ("Ag/AgCl-sat", 0.197, 1e-3),  # Bard & Faulkner 2001 (from memory)
        ("Ag/AgCl-3M", 0.210, 1e-3),  # handbook value (from memory)
        ("Ag/AgCl-1M", 0.235, 1e-3),  # 0.235-0.2355 (from memory)
        ("Ag/AgCl-seawater", 0.25, 5e-3),  # common practice
        ("Cu/CuSO4", 0.316, 5e-3),  # common practice (0.30-0.32 quoted)
        ("Hg/HgO-1M", 0.140, 1e-3),  # 1 M NaOH (from memory)
        ("Hg/Hg2SO4", 0.64, 1e-2),  # 0.64-0.65 (from memory)
    ],
)
def test_offsets_at_25c(name, value, tol):
    assert electrodes.reference_offset(name) == pytest.approx(value, abs=tol)


def test_sce_temperature_coefficient():
    # dE/dT of the SCE ≈ -0.66 mV/K near 25 °C (Ives & Janz 1961; from memory)
    ref = electrodes.get_reference("SCE")
    assert ref.de_dt_v_per_k(25.0) * 1000 == pytest.approx(-0.66, abs=0.01)
    # the cubic of Ives & Janz at 40 °C (t - 25 = 15)
    expected = 0.2412 - 6.61e-4 * 15 - 1.75e-6 * 15**2 - 9.0e-10 * 15**3
    assert electrodes.reference_offset("SCE", 40.0) == pytest.approx(expected, abs=1e-9)


def test_sce_against_agcl_sat():
    # SCE lies about 44-45 mV above Ag/AgCl (sat. KCl) (common practice)
    diff = electrodes.reference_offset("SCE") - electrodes.reference_offset("Ag/AgCl-sat")
    assert diff == pytest.approx(0.0445, abs=0.0015)


def test_cathodic_protection_criteria_agree():
    # -0.85 V vs Cu/CuSO4 and -0.80 V vs Ag/AgCl/seawater are taken as the same
    # criterion for steel (common practice); the electrodes' spread is ~20 mV.
    e_she = electrodes.to_she(-0.85, "Cu/CuSO4")
    assert electrodes.from_she(e_she, "Ag/AgCl-seawater") == pytest.approx(-0.80, abs=0.02)


def test_agcl_fixed_chloride_follows_e0():
    # Ag/AgCl in 1 M KCl: Nernst with a fixed chloride activity, so its offset from
    # E°(AgCl/Ag) scales with T in kelvin (-k_T log a_Cl); the E°(T) curve itself is
    # checked against the Bates & Bower table above
    e0 = electrodes.agcl_standard_potential
    e25 = electrodes.reference_offset("Ag/AgCl-1M", 25.0)
    e60 = electrodes.reference_offset("Ag/AgCl-1M", 60.0)
    assert e60 - e0(60.0) == pytest.approx((e25 - e0(25.0)) * 333.15 / 298.15, abs=1e-9)
    # the chloride term of 1 M KCl is positive (a_Cl < 1) and small
    assert 0.0 < e25 - e0(25.0) < 0.02


# ----------------------------------------------------------------- conversions


@pytest.mark.parametrize("name", [n for n in REQUIRED if n != "RHE"])
def test_round_trip(name):
    e = np.linspace(-1.5, 1.5, 7)
    for t in (20.0, 25.0, 30.0):
        np.testing.assert_allclose(
            electrodes.to_she(electrodes.from_she(e, name, t), name, t), e, atol=1e-12
        )


def test_sign_convention():
    # 0 V vs SCE is +0.2412 V vs SHE (Bard & Faulkner 2001, scale of reference electrodes)
    assert electrodes.to_she(0.0, "SCE") == pytest.approx(0.2412)
    assert electrodes.from_she(0.2412, "SCE") == pytest.approx(0.0)
    # -0.85 V vs CSE ≈ -0.53 V vs SHE (common practice)
    assert electrodes.to_she(-0.85, "CSE") == pytest.approx(-0.534, abs=0.005)


@pytest.mark.parametrize("t", [25.0, 60.0, 150.0])
@pytest.mark.parametrize("ph", [0.0, 7.0, 14.0])
def test_rhe(t, ph):
    # E(RHE) = -k_T pH vs SHE, k_T = k T ln10 / e (Nernst; CODATA 2018); R and F
    # are published to 10 digits, hence rel=1e-9
    k_t = K_B * (t + 273.15) * math.log(10) / E_CHARGE
    assert electrodes.reference_offset("RHE", t, ph=ph) == pytest.approx(-k_t * ph, rel=1e-9)
    assert electrodes.to_she(0.0, "RHE", t, ph) == pytest.approx(-k_t * ph, rel=1e-9)
    assert electrodes.from_she(-k_t * ph, "rhe", t, ph) == pytest.approx(0.0, abs=1e-9)


def test_rhe_array_and_textbook():
    ph = np.array([0.0, 7.0, 14.0])
    out = electrodes.reference_offset("RHE", 25.0, ph=ph)
    # 0.05916 V per pH unit at 25 °C (Bard & Faulkner 2001)
    np.testing.assert_allclose(out, -0.05916 * ph, atol=1e-4)
    e = electrodes.to_she(np.array([0.1, 0.2, 0.3]), "RHE", 25.0, ph)
    assert e.shape == (3,)


def test_rhe_needs_ph():
    with pytest.raises(ConditionsError, match="pH"):
        electrodes.reference_offset("RHE", 25.0)
    with pytest.raises(ConditionsError, match="pH"):
        electrodes.to_she(0.0, "RHE", 25.0, ph="neutral")


def test_temperature_array():
    out = electrodes.reference_offset("SCE", np.array([20.0, 25.0, 30.0]))
    assert out.shape == (3,) and out[0] > out[1] > out[2]


# ----------------------------------------------------------------- range warnings and names


def test_range_warnings():
    with pytest.warns(RangeWarning, match="SCE"):
        electrodes.reference_offset("SCE", 80.0)
    with pytest.warns(RangeWarning, match="Hg/HgO-1M"):
        electrodes.reference_offset("Hg/HgO-1M", 50.0)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        for name in REQUIRED:
            electrodes.reference_offset(name, 25.0, ph=7.0)
        electrodes.reference_offset("RHE", 250.0, ph=7.0)
        electrodes.reference_offset("SHE", 250.0)
    with pytest.raises(ConditionsError, match="outside"):
        electrodes.reference_offset("SHE", 620.0)


@pytest.mark.parametrize(
    "alias, name",
    [
        ("calomel", "SCE"),
        ("sce", "SCE"),
        ("CSE", "Cu/CuSO4"),
        ("cu/cuso4", "Cu/CuSO4"),
        ("MSE", "Hg/Hg2SO4"),
        ("Hg/HgO", "Hg/HgO-1M"),
        ("ag/agcl-3m", "Ag/AgCl-3M"),
        ("AgCl-sat", "Ag/AgCl-sat"),
        (" Ag/AgCl - seawater ", "Ag/AgCl-seawater"),
        ("nhe", "SHE"),
    ],
)
def test_aliases(alias, name):
    assert electrodes.get_reference(alias).name == name


def test_unknown_and_ambiguous_names():
    with pytest.raises(OptionError, match="valid: SHE, SCE, Ag/AgCl-sat"):
        electrodes.reference_offset("glass")
    with pytest.raises(OptionError, match="ambiguous.*Ag/AgCl-3M"):
        electrodes.get_reference("Ag/AgCl")
    with pytest.raises(OptionError, match="unknown reference"):
        electrodes.to_she(0.0, "SSE")
    with pytest.raises(ConditionsError, match="not a number of volts"):
        electrodes.to_she("high", "SCE")
