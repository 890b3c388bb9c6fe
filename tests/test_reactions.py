"""Tests for pourbaix.physics.reactions: balancing, standard potentials, log K.

Balanced half-reactions are checked against the equations as printed in the
electrochemical series (CRC Handbook of Chemistry and Physics, "Electrochemical
Series"; Bard, Parsons & Jordan, Standard Potentials in Aqueous Solution, 1985),
from memory. Gibbs energies used to build test species are NBS 1982 values
(Wagman et al., J. Phys. Chem. Ref. Data 11, Suppl. 2), from memory, so the
tests do not depend on the embedded tables.
"""

import math

import pytest

from pourbaix.errors import DataError, PourbaixError
from pourbaix.physics.reactions import (
    FARADAY,
    GAS_CONSTANT,
    Reaction,
    balance_pair,
    log_k,
    reaction_gibbs_kj_mol,
    standard_potential,
)
from pourbaix.tables.formula import parse_formula
from pourbaix.tables.species import Species

H2O_DGF = -237.129  # kJ/mol, NBS82 / CODATA89 key value, from memory


def sp(text, phase, dgf=0.0):
    f = parse_formula(text, phase)
    return Species(
        name=f.text, formula=f, phase=phase, form=None, dgf_kj_mol=dgf, source="test", origin="test"
    )


def _coeffs(r):
    ox = {s.name: c for s, c in r.oxidised}
    red = {s.name: c for s, c in r.reduced}
    return ox, red, r.h_plus, r.electrons, r.water


# (ox, red, element, extra, oxidised side, reduced side, H+, e-, H2O) as printed in the
# electrochemical series (CRC Handbook / BPJ85), from memory
BALANCED = [
    (("Fe2O3", "s"), ("Fe^2+", "aq"), "Fe", [], {"Fe2O3": 1}, {"Fe^2+": 2}, 6, 2, 3),
    (("MnO4^-", "aq"), ("Mn^2+", "aq"), "Mn", [], {"MnO4^-": 1}, {"Mn^2+": 1}, 8, 5, 4),
    (("Cr2O7^2-", "aq"), ("Cr^3+", "aq"), "Cr", [], {"Cr2O7^2-": 1}, {"Cr^3+": 2}, 14, 6, 7),
    (("O2", "g"), ("H2O", "l"), "O", [], {"O2": 1}, {"H2O": 2}, 4, 4, 0),
    (("O2", "g"), ("H2O2", "aq"), "O", [], {"O2": 1}, {"H2O2": 1}, 2, 2, 0),
    (("H^+", "aq"), ("H2", "g"), "H", [], {"H^+": 2}, {"H2": 1}, 0, 2, 0),
    (("Cl2", "g"), ("Cl^-", "aq"), "Cl", [], {"Cl2": 1}, {"Cl^-": 2}, 0, 2, 0),
    (("S", "s"), ("H2S", "aq"), "S", [], {"S": 1}, {"H2S": 1}, 2, 2, 0),
    (("SO4^2-", "aq"), ("S", "s"), "S", [], {"SO4^2-": 1}, {"S": 1}, 8, 6, 4),
    (
        ("AgCl", "s"),
        ("Ag", "s"),
        "Ag",
        [("Cl^-", "aq")],
        {"AgCl": 1},
        {"Ag": 1, "Cl^-": 1},
        0,
        1,
        0,
    ),
    (
        ("Au(CN)2^-", "aq"),
        ("Au", "s"),
        "Au",
        [("CN^-", "aq")],
        {"Au(CN)2^-": 1},
        {"Au": 1, "CN^-": 2},
        0,
        1,
        0,
    ),
    (
        ("PbO2", "s"),
        ("PbSO4", "s"),
        "Pb",
        [("SO4^2-", "aq")],
        {"PbO2": 1, "SO4^2-": 1},
        {"PbSO4": 1},
        4,
        2,
        2,
    ),
    (("Fe3O4", "s"), ("Fe", "s"), "Fe", [], {"Fe3O4": 1}, {"Fe": 3}, 8, 8, 4),
    (("FeO4^2-", "aq"), ("Fe^3+", "aq"), "Fe", [], {"FeO4^2-": 1}, {"Fe^3+": 1}, 8, 3, 4),
    (("CrO4^2-", "aq"), ("Cr(OH)3", "s"), "Cr", [], {"CrO4^2-": 1}, {"Cr(OH)3": 1}, 5, 3, 1),
    (("Cu^2+", "aq"), ("Cu2O", "s"), "Cu", [], {"Cu^2+": 2}, {"Cu2O": 1}, -2, 2, -1),
    (("Fe^3+", "aq"), ("Fe(OH)2", "s"), "Fe", [], {"Fe^3+": 1}, {"Fe(OH)2": 1}, -2, 1, -2),
]


@pytest.mark.parametrize(
    ("ox", "red", "el", "extra", "ox_side", "red_side", "h", "e", "w"), BALANCED
)
def test_balance_pair(ox, red, el, extra, ox_side, red_side, h, e, w):
    r = balance_pair(sp(*ox), sp(*red), el, [sp(*x) for x in extra])
    got_ox, got_red, got_h, got_e, got_w = _coeffs(r)
    assert got_ox == ox_side and got_red == red_side
    assert (got_h, got_e, got_w) == (h, e, w)


def test_conservation_of_atoms_and_charge():
    """Every balanced reaction conserves each element and charge (mass and charge balance)."""
    for ox, red, el, extra, *_ in BALANCED:
        r = balance_pair(sp(*ox), sp(*red), el, [sp(*x) for x in extra])
        count: dict = {}
        for s, c in r.oxidised:
            for k, n in s.composition.items():
                count[k] = count.get(k, 0) + c * n
        for s, c in r.reduced:
            for k, n in s.composition.items():
                count[k] = count.get(k, 0) - c * n
        count["H"] = count.get("H", 0) + r.h_plus - 2 * r.water
        count["O"] = count.get("O", 0) - r.water
        assert all(abs(v) < 1e-12 for v in count.values()), (r.text(), count)
        charge = sum(c * s.charge for s, c in r.oxidised) + r.h_plus - r.electrons
        charge -= sum(c * s.charge for s, c in r.reduced)
        assert abs(charge) < 1e-12


def test_text():
    r = balance_pair(sp("Fe2O3", "s"), sp("Fe^2+", "aq"), "Fe")
    assert r.text() == "Fe2O3 + 6 H+ + 2 e- = 2 Fe^2+ + 3 H2O"
    assert str(r) == r.text()
    r = balance_pair(sp("Fe^3+", "aq"), sp("Fe(OH)2", "s"), "Fe")
    assert r.text() == "Fe^3+ + e- + 2 H2O = Fe(OH)2 + 2 H+"  # negative terms change sides
    r = balance_pair(sp("AgCl", "s"), sp("Ag", "s"), "Ag", [sp("Cl^-", "aq")])
    assert r.text() == "AgCl + e- = Ag + Cl^-"


def test_unbalanced_elements_are_named():
    with pytest.raises(DataError, match=r"Cl do not balance.*extra="):
        balance_pair(sp("AgCl", "s"), sp("Ag", "s"), "Ag")
    with pytest.raises(DataError, match=r"C, N do not balance"):
        balance_pair(sp("Au(CN)2^-", "aq"), sp("Au", "s"), "Au")
    with pytest.raises(DataError, match=r"the reduced species Cu\(s\) contains no Fe"):
        balance_pair(sp("Fe^2+", "aq"), sp("Cu", "s"), "Fe")
    with pytest.raises(PourbaixError, match=r"oxidised species Cu\^2\+\(aq\) contains no Ag"):
        balance_pair(sp("Cu^2+", "aq"), sp("Ag", "s"), "Ag")


def test_standard_potentials_from_nbs_values():
    # NBS82 dGf (kJ/mol, from memory) against the electrochemical series (CRC, from memory)
    zn = balance_pair(sp("Zn^2+", "aq", -147.06), sp("Zn", "s", 0.0), "Zn")
    assert standard_potential(zn, water_dgf=H2O_DGF) == pytest.approx(-0.7618, abs=0.001)
    o2 = balance_pair(sp("O2", "g", 0.0), sp("H2O", "l", H2O_DGF), "O")
    assert standard_potential(o2, water_dgf=H2O_DGF) == pytest.approx(1.229, abs=0.0005)
    ag = balance_pair(sp("AgCl", "s", -109.789), sp("Ag", "s"), "Ag", [sp("Cl^-", "aq", -131.228)])
    assert standard_potential(ag, water_dgf=H2O_DGF) == pytest.approx(0.22233, abs=0.001)
    fe = balance_pair(sp("Fe^3+", "aq", -4.7), sp("Fe^2+", "aq", -78.9), "Fe")
    assert standard_potential(fe, water_dgf=H2O_DGF) == pytest.approx(0.771, abs=0.003)


def test_standard_potential_formula():
    # E0 = -dG/(nF) (Bard & Faulkner 2001, eq. 2.1.22); 1 V for dG = -F J per electron
    ox = sp("Ag^+", "aq", FARADAY / 1000.0)
    r = balance_pair(ox, sp("Ag", "s"), "Ag")
    assert standard_potential(r, water_dgf=H2O_DGF) == pytest.approx(1.0, rel=1e-12)
    assert reaction_gibbs_kj_mol(r, water_dgf=H2O_DGF) == pytest.approx(-FARADAY / 1000.0)


def test_constants_codata_2018():
    # CODATA 2018 exact values (2019 SI): F = N_A e, R = N_A k; F tabulated to 10 digits
    assert FARADAY == pytest.approx(6.02214076e23 * 1.602176634e-19, rel=1e-10)
    assert GAS_CONSTANT == pytest.approx(6.02214076e23 * 1.380649e-23, rel=1e-9)


def test_log_k_of_water_against_iapws():
    """pKw at 25 °C from NBS82/CODATA89 dGf of H2O and OH- vs IAPWS R11-07 (Bandura & Lvov 2006)."""
    iapws = pytest.importorskip("iapws")
    from iapws._iapws import _Kw

    r = balance_pair(sp("OH^-", "aq", -157.244), sp("H2O", "l", H2O_DGF), "O")
    assert (r.h_plus, r.electrons, r.water) == (1, 0, 0)
    rho = iapws.IAPWS95(T=298.15, P=0.1).rho
    pkw = _Kw(rho, 298.15)
    # the tables give 0.001 kJ/mol, i.e. 2e-4 log units; the IAPWS fit is good to about 0.01
    assert log_k(r, water_dgf=H2O_DGF) == pytest.approx(pkw, abs=0.01)


def test_wrong_kind_of_reaction():
    zn = balance_pair(sp("Zn^2+", "aq", -147.06), sp("Zn", "s"), "Zn")
    with pytest.raises(DataError, match="use standard_potential"):
        log_k(zn, water_dgf=H2O_DGF)
    w = balance_pair(sp("OH^-", "aq", -157.244), sp("H2O", "l", H2O_DGF), "O")
    with pytest.raises(DataError, match="no electrons.*use log_k"):
        standard_potential(w, water_dgf=H2O_DGF)


def test_water_from_table():
    """Without water_dgf, liquid water comes from the table (default: the default data set)."""
    from pourbaix.tables.species import load_species

    t = load_species()
    r = balance_pair(sp("Fe2O3", "s", -742.2), sp("Fe^2+", "aq", -78.9), "Fe")
    w = t.get("H2O", "l").dgf_kj_mol
    assert reaction_gibbs_kj_mol(r, t) == pytest.approx(2 * -78.9 + 3 * w + 742.2)
    assert reaction_gibbs_kj_mol(r) == pytest.approx(reaction_gibbs_kj_mol(r, t))


def test_reaction_is_plain_data():
    r = balance_pair(sp("Cu^2+", "aq"), sp("Cu", "s"), "Cu")
    assert isinstance(r, Reaction)
    assert r.electrons == 2 and r.h_plus == 0 and r.water == 0
    assert math.isclose(sum(c for _, c in r.oxidised), 1.0)
