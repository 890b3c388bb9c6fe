"""Standard potentials at temperature from the tables and the temperature routes.

Outside values:
- dE°/dT at 25 °C of Bratsch (1989), "Standard electrode potentials and
  temperature coefficients in water at 298.15 K", J. Phys. Chem. Ref. Data 18,
  1-21 (reproduced in the CRC Handbook); from memory, in mV/K;
  Fe2+/Fe is left out: its +0.052 mV/K implies S°(Fe2+) of about -113 J/(mol K)
  where the tables keep NBS82's -137.7 (see that row's note), which alone moves
  E°(100 °C) by 9 mV;
- E°(AgCl/Ag) from 0 to 95 °C of Bates & Bower (1954), J. Res. Natl. Bur.
  Stand. 53, 283 (the polynomial coded in pourbaix.physics.electrodes, whose
  own test checks it against the paper's table);
- E°(O2/H2O) at 150-300 °C from CODATA key values (Cox, Wagman & Medvedev
  1989; from memory), IAPWS-95 for liquid water and the TRC ideal-gas Cp of
  H2 and O2 shipped by `chemicals`;
- pygcc's SUPCRT92 route and speq21.dat data (Helgeson et al. 1978 minerals;
  Shock et al. 1997 Fe2+) for the iron–water lines at 300 °C.
"""

import math

import pytest

from pourbaix.constants import F_KJ
from pourbaix.physics import energies
from pourbaix.physics.electrodes import agcl_standard_potential
from pourbaix.tables.species import load_species


@pytest.fixture(scope="module")
def table():
    return load_species()


def _g(table, name, phase, t_c):
    ctx = energies.make_context(table, t_c)
    return energies.species_gibbs_at(table.get(name, phase), ctx)[0]


def _e0(table, t_c, oxidised, reduced, electrons, h2_per_e=True):
    """E° vs SHE of sum(ox) + n e- = sum(red), each side a list of (name, phase, count)."""
    ctx = energies.make_context(table, t_c)
    g = 0.0
    for name, phase, n in reduced:
        g += n * (ctx.g_water_kj if (name, phase) == ("H2O", "l") else _g(table, name, phase, t_c))
    for name, phase, n in oxidised:
        g -= n * (ctx.g_water_kj if (name, phase) == ("H2O", "l") else _g(table, name, phase, t_c))
    # SHE convention: the electron carries G(H2, g)/2 at every T (H+ = 0)
    g -= electrons * ctx.g_electron_kj
    return -g / (electrons * F_KJ)


COUPLES = [
    # (label, oxidised side, reduced side, n, dE°/dT [mV/K], Bratsch 1989, from memory)
    ("Ag+/Ag", [("Ag^+", "aq", 1)], [("Ag", "s", 1)], 1, -0.989),
    ("Cu+/Cu", [("Cu^+", "aq", 1)], [("Cu", "s", 1)], 1, -0.754),
    ("Cu2+/Cu", [("Cu^2+", "aq", 1)], [("Cu", "s", 1)], 2, 0.011),
    ("Zn2+/Zn", [("Zn^2+", "aq", 1)], [("Zn", "s", 1)], 2, 0.119),
    ("Mn2+/Mn", [("Mn^2+", "aq", 1)], [("Mn", "s", 1)], 2, -0.129),
    ("Co2+/Co", [("Co^2+", "aq", 1)], [("Co", "s", 1)], 2, 0.065),
    ("Fe3+/Fe2+", [("Fe^3+", "aq", 1)], [("Fe^2+", "aq", 1)], 1, 1.188),
    ("AgCl/Ag", [("AgCl", "s", 1)], [("Ag", "s", 1), ("Cl^-", "aq", 1)], 1, -0.658),
    ("Cl2/Cl-", [("Cl2", "g", 1)], [("Cl^-", "aq", 2)], 2, -1.248),
    ("O2/H2O", [("O2", "g", 1)], [("H2O", "l", 2)], 4, -0.846),
]


@pytest.mark.parametrize("label, ox, red, n, coefficient", COUPLES, ids=[c[0] for c in COUPLES])
def test_potential_at_100c_follows_the_published_coefficient(table, label, ox, red, n, coefficient):
    e25 = _e0(table, 25.0, ox, red, n)
    e100 = _e0(table, 100.0, ox, red, n)
    expected = e25 + 75.0 * coefficient / 1000.0
    cps = [(k, table.get(name, phase).cp_j_molk) for name, phase, k in red] + [
        (-k, table.get(name, phase).cp_j_molk) for name, phase, k in ox
    ]
    if all(cp is not None for _, cp in cps):
        # Cp° at 25 °C of every member tabulated (NBS82): add the curvature of a
        # constant ΔCp, -ΔCp [(T - Tr) - T ln(T/Tr)]/(nF) (H2 for the electrons:
        # Cp 28.84 J/(mol K), NBS82); what remains is the change of ionic Cp
        # over 25-100 °C, a few mV
        d_cp = sum(k * cp for k, cp in cps) - n / 2 * 28.84
        tk = 373.15
        expected -= d_cp * (75.0 - tk * math.log(tk / 298.15)) / (n * F_KJ * 1000.0)
        tolerance = 0.004
    else:
        # ions without Cp° in the tables: over 75 K the curvature ΔCp (T - Tr)²/(2 T n F)
        # reaches 12 mV for |ΔCp| = 150 J/(mol K), n = 1
        tolerance = 0.012 / n**0.5
    assert e100 == pytest.approx(expected, abs=tolerance), label


def test_agcl_against_bates_bower_at_95c(table):
    ox, red = [("AgCl", "s", 1)], [("Ag", "s", 1), ("Cl^-", "aq", 1)]
    shift = _e0(table, 95.0, ox, red, 1) - _e0(table, 25.0, ox, red, 1)
    expected = agcl_standard_potential(95.0) - agcl_standard_potential(25.0)
    # Bates & Bower's cell data carry about 0.1 mV; the tables' S° and the estimated
    # HKF route for Cl- carry a few mV at 95 °C
    assert shift == pytest.approx(expected, abs=0.004)


def _oxygen_couple_reference(temperature_c, pressure_bar):
    """E° of O2(g) + 4 H+ + 4 e- = 2 H2O(l) at T from outside data only [V vs SHE].

    2 H2(g) + O2(g) = 2 H2O(l) carried from 25 °C with ΔrH(T) = ΔrH° + Σ ΔH and
    ΔrS(T) = ΔrS° + Σ ΔS: CODATA key values (Cox, Wagman & Medvedev 1989, CODATA Key
    Values for Thermodynamics; from memory): ΔfH°(H2O, l) -285.830 kJ/mol, S° of H2O(l)
    69.95, H2(g) 130.680, O2(g) 205.152 J/(mol K); the liquid's H and S changes to
    (T, P) from IAPWS-95 (the `iapws` package); the ideal-gas Cp of H2 and O2 from the
    TRC correlations shipped by `chemicals` (TRC_gas_data), integrated numerically.
    In the SHE convention H+ + e- = ½ H2 has ΔG = 0 at every T, so E° = -ΔrG/(4F).
    """
    from chemicals.heat_capacity import TRC_gas_data, TRCCp
    from iapws import IAPWS95
    from scipy.integrate import quad

    t = temperature_c + 273.15

    def gas(cas):
        row = TRC_gas_data.loc[cas]
        coefficients = [row[f"a{i}"] for i in range(8)]
        dh = quad(lambda x: TRCCp(x, *coefficients), 298.15, t)[0] / 1000.0
        ds = quad(lambda x: TRCCp(x, *coefficients) / x, 298.15, t)[0]
        return dh, ds

    molar_mass = 18.015268e-3  # kg/mol (IAPWS-95)
    water_ref, water = IAPWS95(T=298.15, P=0.1), IAPWS95(T=t, P=pressure_bar / 10.0)
    dh_w = (water.h - water_ref.h) * molar_mass  # kJ/mol
    ds_w = (water.s - water_ref.s) * molar_mass * 1000.0  # J/(mol K)
    dh_h2, ds_h2 = gas("1333-74-0")
    dh_o2, ds_o2 = gas("7782-44-7")
    dh = 2 * (-285.830 + dh_w) - 2 * dh_h2 - dh_o2
    ds = 2 * (69.95 + ds_w) - 2 * (130.680 + ds_h2) - (205.152 + ds_o2)
    return -(dh - t * ds / 1000.0) / (4 * F_KJ)


@pytest.mark.parametrize("temperature_c", [150.0, 200.0, 250.0, 300.0])
def test_oxygen_couple_at_150_to_300c_against_codata_iapws_trc(table, temperature_c):
    from pourbaix.physics.thermo import water_properties

    pressure = water_properties(temperature_c).pressure_bar  # saturation, the map's default
    ours = _e0(table, temperature_c, [("O2", "g", 1)], [("H2O", "l", 2)], 4)
    expected = _oxygen_couple_reference(temperature_c, pressure)
    # CODATA's ±0.040 kJ/mol on ΔfH°(H2O, l) is ±0.2 mV here; the tables' NBS82 25 °C
    # values differ from CODATA's by 0.06 mV; the TRC Cp fits hold to about 0.1 %.
    # Dropping the heat capacities (constant ΔrS) would move E° by 16 mV at 300 °C.
    assert ours == pytest.approx(expected, abs=0.0005)


# ------------------------------------------------------------------ iron in water at 300 °C


def _pygcc_hematite_magnetite_e0(t_c, p_bar):
    """E° of 3 Fe2O3 + 2 H+ + 2 e- = 2 Fe3O4 + H2O from pygcc's SUPCRT92 route and data."""
    import numpy as np

    species_eos = pytest.importorskip("pygcc.species_eos")
    water_eos = pytest.importorskip("pygcc.water_eos")
    db = pytest.importorskip("pygcc.pygcc_utils").db_reader().dbaccessdic
    cal = 4.184

    def g(name):
        res = species_eos.heatcap(
            T=t_c, P=p_bar, Species=name, Species_ppt=db[name], method="SUPCRT"
        )
        return float(np.ravel(res.dG)[0]) * cal / 1000

    g_w = float(np.ravel(water_eos.iapws95(T=t_c, P=p_bar).G)[0]) * cal / 1000
    dg = 2 * g("Magnetite") + g_w - 3 * g("Hematite") - g("H2(g)")
    return -dg / (2 * F_KJ)


def test_hematite_magnetite_line_moves_as_supcrt92_data_say(table):
    # The two data sets differ at 25 °C (NBS82 against Helgeson et al. 1978); the move
    # of the line from 25 to 300 °C comes from the heat capacities and entropies and is
    # compared here (pygcc, SUPCRT92 route: Maier-Kelley Cp of Helgeson et al. 1978)
    ox, red = [("Fe2O3", "s", 3)], [("Fe3O4", "s", 2), ("H2O", "l", 1)]
    ours = _e0(table, 300.0, ox, red, 2) - _e0(table, 25.0, ox, red, 2)
    from pourbaix.physics.thermo import water_properties

    p_sat = water_properties(300.0).pressure_bar
    ref = _pygcc_hematite_magnetite_e0(300.0, p_sat) - _pygcc_hematite_magnetite_e0(25.0, 1.0)
    # constant NBS82 Cp against Maier-Kelley Cp: a few mV at 300 °C
    assert ours == pytest.approx(ref, abs=0.008)


def test_iron_map_at_300c():
    # Beverskog & Puigdomenech (1996), Corros. Sci. 38, 2121, iron-water at 300 °C,
    # [Fe] = 1e-6 (from memory, features not numbers): magnetite is the stable phase at
    # neutral pH (about 5.7 at 300 °C; IAPWS R11-07) from below the hydrogen line up past it;
    # iron is immune only below the hydrogen line; hematite lies above magnetite.
    from pourbaix.maps.domain_map import compute_map

    m = compute_map("Fe", temperature_c=300.0)
    neutral = m.conditions.neutral_ph
    assert 5.5 < neutral < 5.8
    e_h2 = m.water["hydrogen"][0] + m.water["hydrogen"][1] * neutral
    e_o2 = m.water["oxygen"][0] + m.water["oxygen"][1] * neutral
    assert str(m.probe(neutral, e_h2 + 0.01).species) == "Fe3O4"
    assert str(m.probe(neutral, e_h2 - 0.05).species) == "Fe3O4"
    assert str(m.probe(neutral, e_o2).species) == "Fe2O3"
    fe_line = [b for b in m.boundaries if set(b.between) == {"Fe", "Fe3O4"}]
    assert fe_line and all(
        b.e_at_ph0_v + b.slope_v_per_ph * ph < m.water["hydrogen"][0] + m.water["hydrogen"][1] * ph
        for b in fe_line
        for ph in (4.0, 8.0, 12.0)
    )
    # the Fe3O4/Fe2O3 line of the map is the E° of the reaction above, Nernst slope -k
    line = [b for b in m.boundaries if set(b.between) == {"Fe3O4", "Fe2O3"}][0]
    e0 = _e0(load_species(), 300.0, [("Fe2O3", "s", 3)], [("Fe3O4", "s", 2), ("H2O", "l", 1)], 2)
    assert line.e_at_ph0_v == pytest.approx(e0, abs=1e-9)
