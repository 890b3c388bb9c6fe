"""Half-reactions, the electrochemical series, cells, couples and mixed potentials.

Outside checks, each named beside its value:
- CRC Handbook, "Electrochemical Series": E°(Zn2+/Zn) = -0.7618 V, E°(Cu2+/Cu) = +0.3419 V,
  so the Daniell cell at unit activities gives 1.1037 V ("1.10 V") (from memory);
- the Nernst equation and ΔrG = -nFE worked by hand below (Bard & Faulkner 2001, §2.1);
- the series values listed in tests/test_published_data.py (CRC series and Bard, Parsons &
  Jordan 1985, typed from memory there) for at least 25 printed E°;
- reference electrodes at T from their published formulas, typed here by hand (Ives & Janz
  1961 for SCE; Bard & Faulkner 2001 with Sawyer et al. 1995 for Ag/AgCl in saturated KCl);
- the Evans construction: the intersection of two Tafel lines in closed form (Stern & Geary
  1957), solved by hand below.
"""

import importlib.util
import math
from pathlib import Path

import numpy as np
import pytest

from pourbaix.analyses.cells import (
    ElectrodeKinetics,
    butler_volmer,
    cell_potential,
    describe_half_reaction,
    electrochemical_series,
    galvanic_couple,
    mixed_potential,
    parse_cell,
    parse_electrode,
    tafel_intersection,
)
from pourbaix.errors import (
    ConditionsError,
    OptionError,
    PourbaixError,
    ReactionError,
    UnknownSpeciesError,
)
from pourbaix.physics.halfreactions import (
    SolutionState,
    nernst_potential,
    nernst_text,
    parse_half_reaction,
    standard_potential_at,
)
from pourbaix.tables.species import load_species

F = 96485.33212  # C/mol, CODATA 2018
R = 8.314462618  # J/(mol K), CODATA 2018
K25 = R * 298.15 * math.log(10) / F  # Nernst factor at 25 °C by hand: 0.0591597 V
CRC_ZN = -0.7618  # V, CRC Handbook Electrochemical Series (from memory)
CRC_CU = 0.3419  # V, CRC Handbook Electrochemical Series (from memory)


def _published():
    """The list of series values kept in tests/test_published_data.py (not duplicated here)."""
    path = Path(__file__).with_name("test_published_data.py")
    spec = importlib.util.spec_from_file_location("_published_series", path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


# ---------------------------------------------------------------------------- half-reactions
def test_parse_checks_balance_and_keeps_a_reduction():
    r = parse_half_reaction("MnO4- + 8H+ + 5e- = Mn2+ + 4H2O")
    assert r.n == 5
    assert r.text() == "MnO4^- + 8 H^+ + 5 e- = Mn^2+ + 4 H2O"
    # an oxidation is turned round
    ox = parse_half_reaction("Zn -> Zn2+ + 2e-")
    assert ox.reversed_input and ox.text() == "Zn^2+ + 2 e- = Zn"
    # fractions, and the usual standard state for a name without phase (O2 gas, H2O liquid)
    half = parse_half_reaction("1/2 O2 + 2H+ + 2e- = H2O")
    assert [str(sp) for sp, _ in half.oxidised] == ["O2(g)", "H^+(aq)"]
    # O2/H2O: 1.229 V (CRC series, from memory); the tables give it within 1 mV
    assert standard_potential_at(half) == pytest.approx(1.229, abs=0.001)


@pytest.mark.parametrize(
    "text, match",
    [
        ("MnO4- + 8H+ + 4e- = Mn2+ + 4H2O", "charge"),
        ("MnO4- + 8H+ + 5e- = Mn2+ + 3H2O", "O: 4 on the left, 3 on the right"),
        ("Zn2+ = Zn", "does not balance"),
        ("Fe3+ + 3e- Fe", "two sides"),
        ("Fe2+ = Fe2+", "transfers no electrons|does not balance"),
    ],
)
def test_unbalanced_or_malformed_half_reactions(text, match):
    with pytest.raises(ReactionError, match=match):
        parse_half_reaction(text)


def test_unknown_species_named():
    with pytest.raises(UnknownSpeciesError, match="Unobtainium|Uo"):
        parse_half_reaction("Uo2+ + 2e- = Uo")
    # neptunium: a real element the tables do not hold
    with pytest.raises(UnknownSpeciesError, match=r"'Np3\+'"):
        parse_half_reaction("Np3+ + 3e- = Np")


def test_nernst_shift_by_hand():
    r = parse_half_reaction("Cu2+ + 2e- = Cu")
    for a in (0.01, 1.0):
        e0, e = nernst_potential(r, SolutionState(activity=a))
        # Nernst by hand: E = E° + (k/2) log10 a(Cu2+)
        assert e - e0 == pytest.approx(K25 / 2 * math.log10(a), abs=1e-12)
    # a molality times γ = 1 at zero ionic strength
    e0, e = nernst_potential(r, SolutionState(molality=0.01))
    assert e - e0 == pytest.approx(-K25, abs=1e-12)
    assert nernst_text(r, 0.3419) == "E = +0.3419 - (0.05916/2) log10[1 / a(Cu²⁺)]"


def test_ph_dependence_of_a_proton_couple_by_hand():
    r = parse_half_reaction("MnO4- + 8H+ + 5e- = Mn2+ + 4H2O")
    e0, e = nernst_potential(r, SolutionState(ph=3.0))
    # 8 H+ over 5 electrons: -(8/5) k pH
    assert e - e0 == pytest.approx(-8 / 5 * K25 * 3.0, abs=1e-12)


def test_acid_and_alkaline_forms_agree_at_any_ph():
    """O2 + 4H+ + 4e- = 2H2O and O2 + 2H2O + 4e- = 4OH- are one couple: same E at a given pH."""
    acid = parse_half_reaction("O2 + 4H+ + 4e- = 2H2O")
    base = parse_half_reaction("O2 + 2H2O + 4e- = 4OH-")
    for t in (25.0, 80.0):
        for ph in (2.0, 7.0, 12.0):
            ea = nernst_potential(acid, SolutionState(ph=ph), t)[1]
            eb = nernst_potential(base, SolutionState(ph=ph), t)[1]
            assert ea == pytest.approx(eb, abs=1e-9)
    # 25 °C: 1.229 - 0.05916 pH at pH 7 is 0.815 V (textbook water line)
    assert nernst_potential(acid, SolutionState(ph=7.0))[1] == pytest.approx(0.815, abs=0.001)


# ---------------------------------------------------------------------------- series
def test_series_against_published_values():
    """At least 25 couples printed within 10 mV of the CRC series or Bard, Parsons & Jordan 1985."""
    published = _published()
    series = electrochemical_series(sort="table")
    by_label = {e.label: e for e in series.entries}
    table = load_species()
    agree, checked = [], 0
    for couple in published.COUPLES:
        entry = next((by_label[lab] for lab in couple.labels if lab in by_label), None)
        if entry is None:
            continue
        checked += 1
        if abs(entry.e0_v - couple.e0) <= published.E0_TOL_V:
            agree.append(couple.label)
            continue
        # otherwise the data row's note must say why (as in test_published_data)
        notes = [sp.note for sp in entry.reaction.species()]
        documented = published.documented_e0(notes, couple.labels)
        assert any(
            abs(published._num(v) - entry.e0_v) <= published._digits_tol(v) for v in documented
        ), (
            f"{couple.label}: series prints {entry.e0_v:+.4f} V, {couple.source} {couple.e0} V, "
            "and no note of its species explains the difference"
        )
    assert checked >= 55
    assert len(agree) >= 25, agree
    assert table.get("Zn2+").source in series.sources


@pytest.mark.parametrize(
    "label, crc",
    [
        # CRC Handbook, Electrochemical Series (from memory); mercury rows not in
        # test_published_data's list
        ("Hg2+/Hg", 0.851),
        ("Hg2^2+/Hg", 0.7973),
        ("Hg2+/Hg2^2+", 0.920),
        ("Hg2Cl2/Hg", 0.26808),
        ("Hg2SO4/Hg", 0.6125),
        ("HgO/Hg", 0.0977),
    ],
)
def test_mercury_couples(label, crc):
    entry = next(e for e in electrochemical_series(elements=["Hg"]).entries if e.label == label)
    assert entry.e0_v == pytest.approx(crc, abs=0.010)  # the series' 10 mV


@pytest.mark.parametrize(
    "label, crc",
    [
        # CRC Handbook, Electrochemical Series (from memory): couples the series builds from the
        # tables' simple ions (simple_ion_couples), not in test_published_data's list
        ("Cd2+/Cd", -0.4030),
        ("Ca2+/Ca", -2.868),
        ("Na+/Na", -2.71),
        ("K+/K", -2.931),
        ("Li+/Li", -3.0401),
        ("Ba2+/Ba", -2.912),
        ("Tl+/Tl", -0.336),
        ("In3+/In", -0.3382),
        ("Ga3+/Ga", -0.549),
        ("Ce3+/Ce", -2.336),
        ("La3+/La", -2.379),
        ("Mn3+/Mn2+", 1.5415),
        ("V3+/V2+", -0.255),
        ("Ag2+/Ag+", 1.980),
        ("Au3+/Au+", 1.401),
    ],
)
def test_simple_ion_couples_against_crc(label, crc):
    entry = next(e for e in electrochemical_series(sort="table").entries if e.label == label)
    assert entry.e0_v == pytest.approx(crc, abs=0.010)  # the series' 10 mV


def test_a_formula_held_under_a_form_tag_is_found():
    # calomel is stored as Hg2Cl2:calomel; typed without the tag it is still found
    r = parse_half_reaction("Hg2Cl2 + 2e- = 2Hg + 2Cl-")
    assert str(r.oxidised[0][0]) == "Hg2Cl2:calomel(s)"


@pytest.mark.parametrize(
    "reference, offset",
    [
        # Ives & Janz 1961 cubic for saturated calomel at 60 °C, worked by hand
        ("SCE", 0.2412 - 6.61e-4 * 35 - 1.75e-6 * 35**2 - 9.0e-10 * 35**3),
        # Bard & Faulkner 2001 (0.197 V) with -1.01 mV/K (Sawyer, Sobkowiak & Roberts 1995)
        ("Ag/AgCl-sat", 0.197 - 1.01e-3 * 35),
    ],
)
def test_series_on_another_reference_shifts_by_its_potential_at_t(reference, offset):
    she = electrochemical_series(60.0, sort="table")
    other = electrochemical_series(60.0, reference=reference, sort="table")
    assert other.reference_offset_v == pytest.approx(offset, abs=1e-9)
    for a, b in zip(she.entries, other.entries, strict=True):
        assert a.label == b.label
        assert a.e0_v - b.e0_v == pytest.approx(offset, abs=1e-12)


def test_series_filter_sort_and_formal_potentials():
    s = electrochemical_series(elements=["Cu"], sort="descending")
    assert all("Cu" in e.elements for e in s.entries)
    values = [e.e0_v for e in s.entries]
    assert values == sorted(values, reverse=True)
    assert all(e.e_v is None for e in s.entries)
    f = electrochemical_series(elements=["Zn"], state=SolutionState(ph=7.0, activity=1e-6))
    zn = next(e for e in f.entries if e.label == "Zn2+/Zn")
    assert zn.e_v - zn.e0_v == pytest.approx(K25 / 2 * -6, abs=1e-12)  # Nernst by hand
    with pytest.raises(OptionError, match="sort"):
        electrochemical_series(sort="alphabet")
    with pytest.raises(OptionError, match="Xx"):
        electrochemical_series(elements=["Xx"])


def test_series_at_temperature_follows_the_entropy_of_reaction():
    """dE°/dT = ΔrS°/(nF) near 25 °C (Gibbs–Helmholtz; Bard & Faulkner 2001, eq. 2.1.39)."""
    table = load_species()
    r = parse_half_reaction("Cu2+ + 2e- = Cu", table)
    # ΔrS° by hand from the NBS entropies in the table: S(Cu) - S(Cu2+) - 2 S_e, S_e = S(H2)/2
    s = {sp.name: sp.s_j_molk for sp in (table.get("Cu"), table.get("Cu2+"), table.get("H2(g)"))}
    dr_s = s["Cu"] - s["Cu^2+"] - s["H2"]
    slope = (standard_potential_at(r, 30.0) - standard_potential_at(r, 20.0)) / 10.0
    assert slope == pytest.approx(dr_s / (2 * F), abs=2e-6)


def test_describe_half_reaction():
    e = describe_half_reaction("MnO4- + 8H+ + 5e- = Mn2+ + 4H2O", reference="SCE")
    assert e.n == 5
    assert e.e0_v == pytest.approx(e.e0_she_v - 0.2412, abs=1e-12)  # SCE 0.2412 V (Ives & Janz)
    assert "(0.05916/5)" in e.nernst


# ---------------------------------------------------------------------------- cells
def test_daniell_cell_against_crc():
    r = cell_potential("Zn | Zn2+ || Cu2+ | Cu")
    # CRC: 0.3419 - (-0.7618) = 1.1037 V; our tables within 5 mV (both rows from NBS82)
    assert r.e0_cell_v == pytest.approx(CRC_CU - CRC_ZN, abs=0.005)
    assert round(r.e_cell_v, 2) == 1.10
    assert r.n == 2 and r.spontaneous and r.actual_anode is r.anode
    assert r.reaction.startswith("Cu^2+ + Zn = Cu + Zn^2+")
    assert r.anode_e0_v == pytest.approx(CRC_ZN, abs=0.005)
    assert r.cathode_e0_v == pytest.approx(CRC_CU, abs=0.005)


def test_nernst_shift_of_a_cell_by_hand():
    base = cell_potential("Zn | Zn2+ || Cu2+ | Cu")
    # a(Zn2+) = 0.01, a(Cu2+) = 1: Q = 0.01, Ecell = E° - (k/2) log10 0.01 = E° + k
    r = cell_potential("Zn | Zn2+(0.01) || Cu2+(1) | Cu")
    assert r.e_cell_v - base.e0_cell_v == pytest.approx(K25, abs=1e-12)
    assert r.log10_q == pytest.approx(-2.0, abs=1e-12)
    # the same with molalities given apart (γ = 1 at zero ionic strength)
    m = cell_potential("Zn | Zn2+ || Cu2+ | Cu", molalities={"Zn2+": 0.01, "Cu2+": 1.0})
    assert m.e_cell_v == pytest.approx(r.e_cell_v, abs=1e-12)
    # 1 mol/kg of both: no shift
    one = cell_potential("Zn | Zn2+(m=1) || Cu2+(m=1) | Cu")
    assert one.e_cell_v == pytest.approx(base.e0_cell_v, abs=1e-12)


def test_ionic_strength_applies_to_molalities():
    """Davies at I = 0.1 mol/kg, A = 0.5092 at 25 °C (common value, from memory), worked by hand."""
    i = 0.1
    log_gamma_2 = -0.5092 * 4 * (math.sqrt(i) / (1 + math.sqrt(i)) - 0.3 * i)
    plain = cell_potential("Zn | Zn2+ || Cu2+ | Cu", molalities={"Zn2+": 0.01})
    salty = cell_potential(
        "Zn | Zn2+ || Cu2+ | Cu",
        state=SolutionState(ionic_strength=i),
        molalities={"Zn2+": 0.01},
    )
    # only a(Zn2+) = m γ changes (Cu2+ is at activity 1): ΔE = -(k/2) log10 γ
    assert salty.e_cell_v - plain.e_cell_v == pytest.approx(-K25 / 2 * log_gamma_2, abs=2e-4)


def test_gibbs_energy_scales_with_the_reaction_and_e_does_not():
    r = cell_potential("Zn | Zn2+ || Cu2+ | Cu")
    # ΔrG = -nFE by hand, n = 2
    assert r.dg_kj_mol == pytest.approx(-2 * F * r.e_cell_v / 1000, rel=1e-12)
    doubled = r.multiplied(2.0)
    assert doubled["n"] == 4
    assert doubled["e_cell_v"] == r.e_cell_v
    assert doubled["dg_kj_mol"] == pytest.approx(2 * r.dg_kj_mol, rel=1e-12)
    # the same through a doubled half-reaction typed by the user
    d = cell_potential(("2 Zn2+ + 4e- = 2 Zn", "Cu2+ + 2e- = Cu"))
    assert d.n == 4
    assert d.e_cell_v == pytest.approx(r.e_cell_v, abs=1e-12)
    assert d.dg_kj_mol == pytest.approx(2 * r.dg_kj_mol, rel=1e-12)


def test_cell_written_backwards_is_not_spontaneous():
    r = cell_potential("Cu | Cu2+ || Zn2+ | Zn")
    assert r.e_cell_v < 0 and not r.spontaneous
    assert r.actual_anode is r.cathode
    assert r.dg_kj_mol > 0


@pytest.mark.parametrize(
    "text, reduction",
    [
        ("Pt | Fe3+, Fe2+", "Fe^3+ + e- = Fe^2+"),
        ("Pt | H2(g) | H+", "2 H^+ + 2 e- = H2"),
        ("Ag | AgCl | Cl-", "AgCl + e- = Ag + Cl^-"),
        ("Zn | ZnO | OH-", "ZnO + H2O + 2 e- = Zn + 2 OH^-"),
        ("O2 | OH- | Pt", "O2 + 2 H2O + 4 e- = 4 OH^-"),
        ("Cu2+ + 2e- = Cu", "Cu^2+ + 2 e- = Cu"),
    ],
)
def test_electrodes_of_the_trade(text, reduction):
    assert parse_electrode(text).reaction.text() == reduction


def test_reference_electrode_in_a_cell():
    r = cell_potential("Zn | Zn2+ || SCE")
    assert r.cathode_e_v == pytest.approx(0.2412, abs=1e-9)  # SCE at 25 °C (Ives & Janz 1961)
    assert r.e_cell_v == pytest.approx(0.2412 - r.anode_e_v, abs=1e-12)


def test_hydrogen_and_silver_cell_at_ph():
    # E = E°(Ag+/Ag) + k log a(Ag+) - (-k pH), by hand
    r = cell_potential(
        "Pt | H2(g) | H+ || Ag+ | Ag", state=SolutionState(ph=3.0), activities={"Ag+": 1e-3}
    )
    assert r.e_cell_v == pytest.approx(r.cathode_e0_v - 3 * K25 + 3 * K25, abs=1e-12)


def test_bad_cells():
    with pytest.raises(ReactionError, match="the same"):
        cell_potential("Cu | Cu2+ || Cu2+ | Cu")
    conc = cell_potential("Cu | Cu2+(0.001) || Cu2+ | Cu")  # a concentration cell is a cell
    assert conc.e_cell_v == pytest.approx(1.5 * K25, abs=1e-12)
    with pytest.raises(ReactionError, match=r"\|\|"):
        parse_cell("Zn | Zn2+ | Cu2+ | Cu")
    with pytest.raises(ReactionError, match="two forms"):
        parse_cell("Zn || Cu")
    with pytest.raises(UnknownSpeciesError, match="Qq"):
        parse_cell("Qq | Qq2+ || Cu2+ | Cu")
    with pytest.raises(ConditionsError, match="> 0"):
        cell_potential("Zn | Zn2+ || Cu2+ | Cu", activities={"Zn2+": 0.0})
    assert issubclass(ReactionError, PourbaixError)


# ---------------------------------------------------------------------------- kinetics
def test_butler_volmer_scalar_and_array():
    k = ElectrodeKinetics(0.06, 0.12, exchange_current_a_m2=1e-2)
    assert butler_volmer(0.0, 0.0, k) == 0.0
    # one decade per Tafel slope, by hand
    assert butler_volmer(0.06, 0.0, k) == pytest.approx(1e-2 * (10 - 10**-0.5), rel=1e-12)
    arr = butler_volmer(np.array([-0.12, 0.0, 0.06]), 0.0, k)
    assert arr.shape == (3,) and arr[0] < 0 < arr[2]


@pytest.mark.parametrize(
    "kwargs, match",
    [
        (dict(anodic_tafel_v=0.0, cathodic_tafel_v=0.1, exchange_current_a_m2=1.0), "anodic"),
        (dict(anodic_tafel_v=0.1, cathodic_tafel_v=-0.1, exchange_current_a_m2=1.0), "cathodic"),
        (dict(anodic_tafel_v=0.1, cathodic_tafel_v=0.1, exchange_current_a_m2=0.0), "> 0"),
        (dict(anodic_tafel_v=0.1, cathodic_tafel_v=0.1, corrosion_current_a_m2=-1.0), "> 0"),
        (dict(anodic_tafel_v=0.1, cathodic_tafel_v=0.1), "one of"),
    ],
)
def test_kinetics_must_be_positive(kwargs, match):
    with pytest.raises(ConditionsError, match=match):
        ElectrodeKinetics(**kwargs)


def test_mixed_potential_of_two_tafel_electrodes_closed_form():
    """Σ I = 0 against the intersection of the two Tafel lines solved by hand (Evans construction)."""
    e_a, e_c = -0.76, 0.34  # rest potentials [V]
    b_a, b_c = 0.04, 0.12  # Tafel slopes [V/decade]
    i_a, i_c, area_c = 1e-2, 1e-3, 5.0
    anode = ElectrodeKinetics(b_a, b_c, exchange_current_a_m2=i_a)
    cathode = ElectrodeKinetics(b_a, b_c, exchange_current_a_m2=i_c)
    m = mixed_potential([e_a, e_c], [anode, cathode], [1.0, area_c], ["Zn", "Cu"])
    # i_a 10^((E-e_a)/b_a) = area_c i_c 10^(-(E-e_c)/b_c), solved for E by hand:
    e_hand = (math.log10(area_c * i_c / i_a) + e_a / b_a + e_c / b_c) / (1 / b_a + 1 / b_c)
    i_hand = i_a * 10 ** ((e_hand - e_a) / b_a)
    assert m.potential_v == pytest.approx(e_hand, abs=1e-9)  # back reactions are < 1e-20 here
    assert m.galvanic_current_a == pytest.approx(i_hand, rel=1e-6)
    assert m.anode == "Zn"
    assert sum(m.currents_a) == pytest.approx(0.0, abs=1e-9 * i_hand)
    assert tafel_intersection(e_a, i_a, b_a, e_c, area_c * i_c, b_c)[0] == pytest.approx(e_hand)


def test_mixed_potential_is_robust_for_steep_kinetics():
    k = ElectrodeKinetics(0.001, 0.001, exchange_current_a_m2=1e-12)
    m = mixed_potential([-2.5, 1.5], [k, ElectrodeKinetics(0.2, 0.2, exchange_current_a_m2=10.0)])
    assert -2.5 < m.potential_v < 1.5 and math.isfinite(m.potential_v)
    with pytest.raises(ConditionsError, match="same potential"):
        mixed_potential([0.1, 0.1], [k, k])
    with pytest.raises(ConditionsError, match="area"):
        mixed_potential([0.0, 0.1], [k, k], [1.0, 0.0])


# ---------------------------------------------------------------------------- couples
def test_zinc_copper_couple_in_a_water():
    c = galvanic_couple(["Zn", "Cu"], ph=4.0)
    zn, cu = c.metals
    assert c.anode == "Zn" and c.cathode == "Cu"
    # Zn2+/Zn at 1e-6: CRC -0.7618 + (k/2)(-6) = -0.9393 V by hand; tables within 5 mV
    assert zn.equilibrium_potential_v == pytest.approx(CRC_ZN - 3 * K25, abs=0.005)
    assert zn.state_above == "corrosion"
    # Cu2+/Cu at 1e-6 and pH 4: CRC 0.3419 - 3k = 0.1644 V by hand (Cu2+ stable at pH 4)
    assert cu.equilibrium_potential_v == pytest.approx(CRC_CU - 3 * K25, abs=0.005)
    assert c.driving_force_v == pytest.approx(
        cu.equilibrium_potential_v - zn.equilibrium_potential_v
    )
    assert c.mixed is None and "only the driving force" in c.statement


def test_couple_at_ph_8():
    c = galvanic_couple(["Zn", "Cu"], ph=8.0)
    cu = c.metals[1]
    assert cu.above == "Cu2O" and cu.state_above == "passivation"
    # Cu2O/Cu in its alkaline form, -0.360 V (CRC series, from memory) at pH 14: at pH 8 the
    # line sits at -0.360 + 6k = -0.005 V by hand (within the series' 10 mV)
    assert cu.equilibrium_potential_v == pytest.approx(-0.360 + 6 * K25, abs=0.010)


def test_couple_at_15_c_matches_the_half_reaction():
    """The map's immunity line and the typed half-reaction are computed apart; they must agree."""
    c = galvanic_couple(["Zn", "Cu"], ph=8.0, temperature_c=15.0)
    assert (c.anode, c.cathode) == ("Zn", "Cu")
    half = parse_half_reaction("Cu2O + 2H+ + 2e- = 2Cu + H2O")
    e = nernst_potential(half, SolutionState(ph=8.0), 15.0)[1]
    assert c.metals[1].equilibrium_potential_v == pytest.approx(e, abs=1e-6)
    zn = nernst_potential(
        parse_half_reaction("Zn2+ + 2e- = Zn"), SolutionState(activity=1e-6), 15.0
    )
    assert c.metals[0].equilibrium_potential_v == pytest.approx(zn[1], abs=1e-6)


def test_couple_at_150_c_matches_the_half_reaction():
    """Above 100 °C (saturation pressure) the map and the half-reaction use the same routes."""
    c = galvanic_couple(["Zn", "Cu"], ph=5.0, temperature_c=150.0)
    zn = nernst_potential(
        parse_half_reaction("Zn2+ + 2e- = Zn"), SolutionState(activity=1e-6), 150.0
    )
    assert c.metals[0].equilibrium_potential_v == pytest.approx(zn[1], abs=1e-6)


def test_couple_with_kinetics_and_area_ratio():
    zn = ElectrodeKinetics(0.03, 0.12, corrosion_current_a_m2=0.02, rest_potential_v=-0.80)
    cu = ElectrodeKinetics(0.06, 0.30, corrosion_current_a_m2=0.005, rest_potential_v=-0.05)
    c = galvanic_couple(
        ["Zn", "Cu"], ph=8.0, kinetics={"Zn": zn, "Cu": cu}, cathode_to_anode_area=10.0
    )
    m = c.mixed
    assert m.areas_m2 == (1.0, 10.0)
    assert -0.80 < m.potential_v < -0.05
    assert c.metals[1].state_at_couple == "immunity"  # copper held below its equilibrium
    assert m.currents_a[0] > 0 > m.currents_a[1]


def test_bad_couples():
    with pytest.raises(OptionError, match="twice"):
        galvanic_couple(["Cu", "Cu"], ph=7.0)
    with pytest.raises(OptionError, match="two metals"):
        galvanic_couple(["Cu"], ph=7.0)
    k = ElectrodeKinetics(0.06, 0.12, exchange_current_a_m2=1.0)
    with pytest.raises(OptionError, match="every metal"):
        galvanic_couple(["Zn", "Cu"], ph=7.0, kinetics={"Zn": k})


def test_figures():
    from pourbaix.plot.cells import draw_couple_maps, draw_evans

    k = ElectrodeKinetics(0.06, 0.12, exchange_current_a_m2=1e-2)
    c = galvanic_couple(["Zn", "Cu"], ph=8.0, kinetics={"Zn": k, "Cu": k})
    fig = draw_couple_maps(c)
    assert len(fig.axes) == 2
    ax = draw_evans(c.mixed)
    assert ax.get_xscale() == "log"
    lo, hi = ax.get_ylim()
    assert lo < c.mixed.potential_v < hi
    import matplotlib.pyplot as plt

    plt.close("all")
