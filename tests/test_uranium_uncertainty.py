"""Uranium rows carry the uncertainty the NEA-TDB uranium volume prints for them.

Source of every expected value below: Grenthe, Fuger, Konings, Lemire, Muller,
Nguyen-Trung & Wanner, Chemical Thermodynamics of Uranium (NEA-TDB vol. 1,
Elsevier 1992), the tables of selected values at 25 C and I = 0 (typed from
memory). The volume's +/- is a 95 % interval, about twice the standard
uncertainty (from memory), so u(dG) = RT ln10 U(log K) / 2 for a constant and
U(dG) / 2 for a printed dG (law of propagation, JCGM 100:2008 eq. 10).
"""

import math

import numpy as np
import pytest

from pourbaix.analyses.uncertainty import boundary_band, sample_maps
from pourbaix.tables.species import load_species

RT_LN10 = 8.314462618 * 298.15 * math.log(10) / 1000  # [kJ/mol]
FARADAY = 96.485332  # [kJ/(mol V)] (CODATA 2018)
# NEA-TDB auxiliary values (CODATA 1989 key values; from memory) [kJ/mol]
AUXILIARY = {"H2O": -237.140, "CO3": -527.900, "F": -281.523, "Cl": -131.217, "SO4": -744.004}

# species, phase, parent, moles of the other reactants consumed, printed log K and its +/-
# (Grenthe et al. 1992, selected values; from memory)
NEA92_CONSTANTS = [
    ("UO2^+", "aq", "UO2^2+", {}, 1.484, 0.022),  # UO2^2+ + e- = UO2^+
    ("U^4+", "aq", "UO2^2+", {"H2O": -2}, 9.038, 0.041),  # UO2^2+ + 4 H+ + 2 e- = U^4+ + 2 H2O
    ("U^3+", "aq", "U^4+", {}, -9.353, 0.07),  # U^4+ + e- = U^3+
    ("UOH^3+", "aq", "U^4+", {"H2O": 1}, -0.54, 0.06),  # U^4+ + H2O = UOH^3+ + H+
    ("UO2OH^+", "aq", "UO2^2+", {"H2O": 1}, -5.2, 0.3),  # log *beta1
    ("UO2(OH)3^-", "aq", "UO2^2+", {"H2O": 3}, -19.2, 0.4),  # log *beta3
    ("UO2(OH)4^2-", "aq", "UO2^2+", {"H2O": 4}, -33.0, 2.0),  # log *beta4
    ("UO2CO3", "aq", "UO2^2+", {"CO3": 1}, 9.68, 0.04),  # log beta1
    ("UO2(CO3)2^2-", "aq", "UO2^2+", {"CO3": 2}, 16.94, 0.12),  # log beta2
    ("UO2(CO3)3^4-", "aq", "UO2^2+", {"CO3": 3}, 21.60, 0.05),  # log beta3
    ("UO2CO3", "s", "UO2^2+", {"CO3": 1}, 14.47, 0.04),  # -log Ks0 of UO2CO3(cr)
    ("UO2F^+", "aq", "UO2^2+", {"F": 1}, 5.09, 0.13),  # log beta1 .. beta4
    ("UO2F2", "aq", "UO2^2+", {"F": 2}, 8.62, 0.04),
    ("UO2F3^-", "aq", "UO2^2+", {"F": 3}, 10.9, 0.4),
    ("UO2F4^2-", "aq", "UO2^2+", {"F": 4}, 11.7, 0.7),
    ("UO2Cl^+", "aq", "UO2^2+", {"Cl": 1}, 0.17, 0.02),
    ("UO2Cl2", "aq", "UO2^2+", {"Cl": 2}, -1.1, 0.4),
    ("UO2SO4", "aq", "UO2^2+", {"SO4": 1}, 3.15, 0.02),
    ("UO2(SO4)2^2-", "aq", "UO2^2+", {"SO4": 2}, 4.14, 0.07),
    ("UF^3+", "aq", "U^4+", {"F": 1}, 9.28, 0.09),  # log beta1 .. beta6
    ("UF2^2+", "aq", "U^4+", {"F": 2}, 16.23, 0.15),
    ("UF3^+", "aq", "U^4+", {"F": 3}, 21.6, 1.0),
    ("UF4", "aq", "U^4+", {"F": 4}, 25.6, 1.0),
    ("UF5^-", "aq", "U^4+", {"F": 5}, 27.01, 0.30),
    ("UF6^2-", "aq", "U^4+", {"F": 6}, 29.08, 0.18),
    ("UCl^3+", "aq", "U^4+", {"Cl": 1}, 1.72, 0.13),
    ("USO4^2+", "aq", "U^4+", {"SO4": 1}, 6.58, 0.19),
    ("U(SO4)2", "aq", "U^4+", {"SO4": 2}, 10.51, 0.20),
]


@pytest.mark.parametrize(
    "name, phase, parent, others, log_k, plus_minus",
    NEA92_CONSTANTS,
    ids=[f"{r[0]}({r[1]})" for r in NEA92_CONSTANTS],
)
def test_constant_rows_carry_half_the_printed_interval(
    name, phase, parent, others, log_k, plus_minus
):
    table = load_species()
    row = table.get(name, phase)
    # only a row whose value is the NEA one may carry it: its dG follows from the constant
    expected = table.get(parent, "aq").dgf_kj_mol - RT_LN10 * log_k
    expected += sum(n * AUXILIARY[other] for other, n in others.items())
    assert row.source == "92gre/fug"
    assert row.dgf_kj_mol == pytest.approx(expected, abs=0.03)  # log K printed to 0.01
    assert row.dgf_unc_kj_mol == pytest.approx(RT_LN10 * plus_minus / 2, abs=0.006)  # 2 decimals
    assert row.dgf_unc_parent == parent


# polynuclear complexes: species, units of UO2^2+, other reactants, printed log K and its +/-
# (Grenthe et al. 1992, selected values; from memory)
NEA92_POLYNUCLEAR = [
    ("(UO2)2OH^3+", 2, {"H2O": 1}, -2.7, 1.0),  # 2 UO2^2+ + H2O = (UO2)2OH^3+ + H+
    ("(UO2)2(OH)2^2+", 2, {"H2O": 2}, -5.62, 0.04),
    ("(UO2)3(OH)4^2+", 3, {"H2O": 4}, -11.9, 0.3),
    ("(UO2)3(OH)5^+", 3, {"H2O": 5}, -15.55, 0.12),
    ("(UO2)3(OH)7^-", 3, {"H2O": 7}, -31.0, 2.0),
    ("(UO2)4(OH)7^+", 4, {"H2O": 7}, -21.9, 1.0),
    ("(UO2)3(CO3)6^6-", 3, {"CO3": 6}, 54.0, 1.0),  # 3 UO2^2+ + 6 CO3^2-
]


@pytest.mark.parametrize(
    "name, units, others, log_k, plus_minus",
    NEA92_POLYNUCLEAR,
    ids=[r[0] for r in NEA92_POLYNUCLEAR],
)
def test_polynuclear_rows_move_with_their_units_of_the_parent(
    name, units, others, log_k, plus_minus
):
    table = load_species()
    row = table.get(name, "aq")
    expected = units * table.get("UO2^2+", "aq").dgf_kj_mol - RT_LN10 * log_k
    expected += sum(n * AUXILIARY[other] for other, n in others.items())
    assert row.source == "92gre/fug"
    assert row.dgf_kj_mol == pytest.approx(expected, abs=0.03)
    assert row.dgf_unc_kj_mol == pytest.approx(RT_LN10 * plus_minus / 2, abs=0.006)
    assert (row.dgf_unc_parent, row.dgf_unc_parent_units) == ("UO2^2+", units)


def test_a_dimer_draws_twice_its_parents_draw_plus_its_own():
    # d[(UO2)2(OH)2^2+] = u_own z1 + 2 d[UO2^2+]: the residual after taking off twice the
    # parent's draw has the row's own standard uncertainty, RT ln10 x 0.04 / 2 = 0.114 kJ/mol
    from pourbaix.analyses.uncertainty import _perturbed_tables

    table = load_species()
    dimer, parent = table.get("(UO2)2(OH)2^2+", "aq"), table.get("UO2^2+", "aq")
    tables, _, _ = _perturbed_tables(table, ("U",), 400, 0.0, 7)
    d_dimer = np.array([t.get(dimer.name, "aq").dgf_kj_mol for t in tables]) - dimer.dgf_kj_mol
    d_parent = np.array([t.get(parent.name, "aq").dgf_kj_mol for t in tables]) - parent.dgf_kj_mol
    assert np.std(d_dimer - 2 * d_parent) == pytest.approx(RT_LN10 * 0.04 / 2, rel=0.15)
    assert np.std(d_parent) == pytest.approx(parent.dgf_unc_kj_mol, rel=0.15)


def test_the_loader_refuses_units_without_a_parent_and_units_not_above_zero(tmp_path):
    from pourbaix.errors import DataFileError
    from pourbaix.tables.species import read_species_file

    head = "formula,phase,dgf_kj_mol,dgf_unc_kj_mol,dgf_unc_parent,dgf_unc_parent_units,source\n"
    for row, words in (
        ("UO2^2+,aq,-952.5,0.9,,2,X\n", "needs dgf_unc_parent"),
        ("(UO2)2(OH)2^2+,aq,-2347.3,0.1,UO2^2+,0,X\n", "must be > 0"),
    ):
        path = tmp_path / "mine.csv"
        path.write_text(head + row, encoding="utf-8")
        with pytest.raises(DataFileError, match=words):
            read_species_file(path)


def test_schoepite_rows_carry_half_the_printed_dg_interval():
    # UO3.2H2O(cr): dG = -1636.506 +/- 1.705 kJ/mol (Grenthe et al. 1992; from memory)
    for form in ("", "schoepite"):
        row = load_species().get("UO3·2H2O" + (":" + form if form else ""), "s")
        assert row.dgf_kj_mol == pytest.approx(-1636.506, abs=0.001)
        assert row.dgf_unc_kj_mol == pytest.approx(1.705 / 2, abs=0.006)
        assert row.dgf_unc_parent is None


def test_chained_constants_give_the_printed_dg_intervals_of_the_ions():
    # the volume derives UO2^+, U^4+ and U^3+ from UO2^2+ (CODATA 1989: dH +/- 1.5, S +/- 3.0;
    # U(cr) S +/- 0.20, O2 +/- 0.005, H2 +/- 0.003; from memory) through the constants above,
    # and prints dG +/- 1.752, 1.765 and 1.810 kJ/mol (from memory); the constants' intervals
    # with the parent's (and 2 H2O at +/- 0.041 for U^4+) in quadrature give them back
    t = 298.15e-3
    uo2 = math.sqrt(1.5**2 + t**2 * (3.0**2 + 0.20**2 + 0.005**2 + 0.003**2))
    u4 = math.hypot(uo2, RT_LN10 * 0.041, 2 * 0.041)
    assert math.hypot(uo2, RT_LN10 * 0.022) == pytest.approx(1.752, abs=0.002)
    assert u4 == pytest.approx(1.765, abs=0.002)
    assert math.hypot(u4, RT_LN10 * 0.07) == pytest.approx(1.810, abs=0.002)
    # and the rows give the same chain: own u of each link, parent named
    table = load_species()
    assert table.get("UO2^2+", "aq").dgf_unc_kj_mol == pytest.approx(uo2 / 2, abs=0.006)
    assert table.get("U^3+", "aq").dgf_unc_parent == "U^4+"
    assert table.get("U^4+", "aq").dgf_unc_parent == "UO2^2+"


def test_rutherfordine_entry_whose_value_differs_carries_none():
    # the LLNL 'Rutherfordine' entry holds -1562.93 kJ/mol, not the volume's -1563.046
    row = load_species().get("UO2CO3:rutherfordine", "s")
    assert row.dgf_kj_mol == pytest.approx(-1562.93, abs=0.001)
    assert row.dgf_unc_kj_mol is None


def test_the_uranium_maps_now_draw_the_stated_uncertainties():
    # with no default, only rows with a stated uncertainty move: UO2 and UO2^2+ (CODATA 1989),
    # the nine U-O-H rows above and the six polynuclear hydroxo complexes; with carbonate the
    # four carbonate rows and (UO2)3(CO3)6^6- as well
    plain = sample_maps("U", samples=10, default_uncertainty_kj_mol=0.0, seed=1)
    assert plain.stated == 17  # fluoro, chloro and sulfato rows are not drawn here
    assert boundary_band(plain, resolution=40)[2].any()
    carbonate = sample_maps(
        "U", samples=10, default_uncertainty_kj_mol=0.0, seed=1, ligands={"C": 1e-3}
    )
    assert carbonate.stated == 22
    fluoride = sample_maps(
        "U", samples=10, default_uncertainty_kj_mol=0.0, seed=1, ligands={"F": 1e-3}
    )
    assert fluoride.stated == 27  # and the four uranyl and six U(IV) fluoro complexes


def test_the_u4_u3_line_moves_by_its_constant_only():
    # U^3+ moves with U^4+ plus its own draw, so the U^4+/U^3+ line (E = -dG_r / F) moves
    # by u = RT ln10 x 0.07 / 2 alone: 95 % band 2 x 1.96 u / F = 8.1 mV (JCGM 100:2008
    # eq. 10); drawn independently it would carry U^4+'s 0.88 kJ/mol too (36 mV)
    r = sample_maps("U", samples=150, default_uncertainty_kj_mol=0.0, seed=3)
    potential = np.linspace(-0.58, -0.53, 501)
    share = np.zeros_like(potential)
    for m in r.samples:
        got = m.probe(np.full_like(potential, -1.0), potential).species
        share += np.asarray(got, dtype=object) == "U^3+"
    share /= len(r.samples)
    width = potential[np.argmax(share < 0.025)] - potential[np.argmax(share < 0.975)]
    expected = 2 * 1.96 * (RT_LN10 * 0.07 / 2) / FARADAY  # [V]
    assert width == pytest.approx(expected, rel=0.35)  # 150 draws: band edges to ~20 %
