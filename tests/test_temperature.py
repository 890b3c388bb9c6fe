"""Maps at real conditions: temperature, pressure, ionic strength, references at T."""

import math

import numpy as np
import pytest

from pourbaix import compute_map
from pourbaix.errors import ConditionsError, OptionError
from pourbaix.maps.domain_map import compute_sweep
from pourbaix.physics import energies, thermo
from pourbaix.tables.species import load_species


def _nernst_exact(t_c):
    # R T ln10 / F with CODATA 2018 R = 8.314462618 J/(mol K), F = 96485.33212 C/mol
    return 8.314462618 * (t_c + 273.15) * math.log(10) / 96485.33212


def test_25c_through_the_temperature_path_equals_the_plain_map(monkeypatch):
    """Routing every species and water through the Benson-Helgeson path at exactly 25 °C.

    The apparent Gibbs energy at Tr is ΔfG°(Tr) by construction (Helgeson et al.
    1978, eq. 58), so the planes must be identical, not merely close.
    """
    plain = compute_map("Fe")

    def through_t(sp, temperature_c, pressure_bar=1.0, aqueous_route="hkf"):
        res = thermo.species_gibbs(sp, temperature_c, pressure_bar, aqueous_route)
        return float(res.dg_kj_mol), res.route, float(res.valid_to_c)

    monkeypatch.setattr(energies, "_gibbs", through_t)
    routed = compute_map("Fe")
    assert np.array_equal(plain._planes, routed._planes)
    assert [d.species for d in plain.domains] == [d.species for d in routed.domains]


@pytest.mark.parametrize("t_c", [25.0, 60.0, 100.0, 200.0])
def test_water_lines_follow_the_nernst_factor(t_c):
    m = compute_map("Fe", temperature_c=t_c)
    k = _nernst_exact(t_c)
    assert m.water["oxygen"][1] == pytest.approx(-k, rel=1e-9)
    assert m.water["hydrogen"][1] == pytest.approx(-k, rel=1e-9)
    assert m.water["hydrogen"][0] == pytest.approx(
        0.0, abs=1e-12
    )  # SHE is zero at every T (convention)


def test_water_window_shrinks_with_temperature():
    # E0(O2/H2O) falls by about 0.85 mV/K (Bard, Parsons & Jordan 1985, dE0/dT = -0.846 mV/K; from memory)
    widths = [
        compute_map("Fe", temperature_c=t).water["oxygen"][0] for t in (25.0, 60.0, 100.0, 200.0)
    ]
    assert all(a > b for a, b in zip(widths, widths[1:], strict=False))
    assert (widths[1] - widths[0]) / 35.0 == pytest.approx(-0.846e-3, abs=0.02e-3)


def test_neutral_ph_and_pressure_at_temperature():
    # pKw = 13.995 at 25 °C and about 12.26 at 100 °C at saturation (IAPWS R11-07; from memory)
    m100 = compute_map("Fe", temperature_c=100.0)
    assert m100.neutral_ph == pytest.approx(12.26 / 2, abs=0.03)
    # above 100 °C the pressure is the saturation pressure: 15.55 bar at 200 °C (IAPWS-IF97; from memory)
    m200 = compute_map("Fe", temperature_c=200.0)
    assert m200.conditions.pressure_bar == pytest.approx(15.55, abs=0.05)
    assert m200.to_dict()["conditions"]["pressure_bar"] == pytest.approx(15.55, abs=0.05)


def test_iron_magnetite_field_widens_with_temperature():
    """Magnetite's field grows and reaches lower pH as T rises.

    Compared with the Fe-H2O diagrams at 25-300 °C of Beverskog & Puigdomenech
    (Corrosion Science 38, 2121, 1996, figs. 1-4; from memory), where the
    Fe2+/Fe3O4 boundary moves to lower pH with temperature.
    """
    maps = compute_sweep("Fe", temperatures_c=[25.0, 100.0, 200.0])
    areas = [m.domain_of("Fe3O4").area for m in maps]
    assert areas[0] < areas[1] < areas[2]
    # pH where magnetite meets the hydrogen line (its acid end in water)
    acid_end = []
    for m in maps:
        poly = m.domain_of("Fe3O4").polygon
        e0, s = m.water["hydrogen"]
        xs = np.linspace(-2, 16, 3601)
        from shapely import points, within

        on = within(points(xs, e0 + s * xs), poly.buffer(1e-9))
        acid_end.append(xs[on].min())
    assert acid_end[0] > acid_end[1] > acid_end[2]


def test_route_warnings_above_their_range():
    # every iron species has a route to 250 °C (Fe2(OH)2^4+ by its S° from the BM76 enthalpy)
    m = compute_map("Fe", temperature_c=250.0)
    assert not any("keep their 25 °C ΔG" in w for w in m.warnings)
    # the higher nickel oxides have no S° in the tables: they take an estimated S° (from NiO)
    m = compute_map("Ni", temperature_c=250.0)
    assert not any("keep their 25 °C ΔG" in w for w in m.warnings)
    routes = {se.species.name: se.route for se in m.species}
    assert all("estimated" in routes[n] for n in ("Ni3O4", "Ni2O3", "NiO2"))
    # the cerium oxides and ions have no S° and no estimate: they keep their 25 °C value
    m = compute_map("Ce", temperature_c=250.0)
    assert any("keep their 25 °C ΔG" in w and "CeO2" in w for w in m.warnings)
    assert m.to_dict()["warnings"]
    # solids on a constant Cp (here goethite, Cp by Kopp's rule) are trusted to 350 °C
    m = compute_map("Fe", temperature_c=400.0, pressure_bar=1000.0)
    assert any("past the range" in w and "FeOOH" in w for w in m.warnings)


def test_molality_with_ionic_strength_uses_davies():
    # Davies log γ for z = 2 at I = 0.1 and 25 °C: -0.509*4*(0.2403 - 0.03) = -0.428 (Davies 1962 form)
    m = compute_map("Cu", molality=1e-6, ionic_strength=0.1, activity_model="davies")
    cu2 = next(se for se in m.species if se.species.name == "Cu^2+")
    assert math.log10(cu2.gamma) == pytest.approx(-0.4282, abs=0.002)
    assert cu2.activity == pytest.approx(1e-6 * cu2.gamma)
    assert m.conditions.activity_model == "davies"
    assert any("davies" in w for w in m.warnings)


def test_background_electrolyte_sets_ionic_strength():
    m = compute_map("Cu", molality=1e-6, background="NaCl=0.5,CaCl2=0.01", activity_model="davies")
    assert m.conditions.ionic_strength == pytest.approx(0.5 + 0.03)  # ½Σ m z²
    assert any("0.5" in w or "Davies" in w or "davies" in w for w in m.warnings)


def test_reference_electrode_at_temperature():
    # The map reads its reference at the map's temperature (published coefficients are checked in
    # tests/test_electrodes.py); RHE at T: E(SHE) = E(RHE) - k(T) pH by definition.
    from pourbaix.physics import electrodes

    m = compute_map("Cu", temperature_c=60.0, reference="SCE")
    assert m.conditions.reference_offset_v == pytest.approx(
        electrodes.reference_offset("SCE", 60.0), abs=1e-12
    )
    m = compute_map("Cu", temperature_c=60.0, reference="RHE")
    assert m.conditions.reference_slope_v_per_ph == pytest.approx(-_nernst_exact(60.0), rel=1e-9)


@pytest.mark.parametrize(
    "kwargs, error, match",
    [
        (dict(temperature_c=360.0), ConditionsError, "350"),
        (dict(temperature_c=-5.0), ConditionsError, "0"),
        (dict(molality=-1e-6), ConditionsError, "molality"),
        (dict(molality=1e-6, background="KryptonCl=0.1"), OptionError, "KryptonCl"),
        (dict(molality=1e-6, ionic_strength=0.1, activity_model="sorcery"), OptionError, "sorcery"),
        (
            dict(molality=1e-6, ionic_strength=5.0, activity_model="davies"),
            ConditionsError,
            "davies|Davies",
        ),
        (dict(temperature_c=150.0, pressure_bar=2.0), ConditionsError, "boil"),
    ],
)
def test_bad_conditions_are_refused(kwargs, error, match):
    with pytest.raises(error, match=match):
        compute_map("Cu", **kwargs)


def test_sweep_over_activities():
    maps = compute_sweep("Cu", activities=[1e-6, 1e-4])
    b = [
        next(x for x in m.boundaries if set(x.between) == {"Cu", "Cu^2+"}).e_at_ph0_v for m in maps
    ]
    # Nernst: two decades of Cu2+ activity move Cu2+/Cu by 2 * k/2 = 59.16 mV
    assert b[1] - b[0] == pytest.approx(_nernst_exact(25.0), abs=1e-9)


def test_table_loaded_once_for_a_sweep():
    table = load_species()
    maps = compute_sweep("Fe", temperatures_c=[25.0, 80.0], table=table)
    assert len(maps) == 2


def test_iron_dimer_enthalpy_and_entropy_follow_baes_mesmer():
    # Baes & Mesmer 1976: 2 Fe3+ + 2 H2O = Fe2(OH)2^4+ + 2 H+, log *beta22 = -2.95 and
    # dH = 56.48 kJ/mol, read from the Thermoddem file shipped by pygcc (reference 76bae/mes).
    import re
    from pathlib import Path

    pygcc = pytest.importorskip("pygcc")
    text = (
        Path(pygcc.__file__).parent / "default_db" / "PHREEQC_ThermoddemV1.10_15Dec2020.dat"
    ).read_text(errors="replace")
    block = text[text.index("2.000Fe+3 + 2.000H2O  = Fe2(OH)2+4 + 2.000H+") :][:400]
    dh_r = float(re.search(r"delta_h\s+([-\d.]+)\s+#kJ/mol\s+#76bae/mes", block).group(1))
    assert dh_r == 56.48
    t = load_species()
    dimer, fe3, water = t.get("Fe2(OH)2^4+"), t.get("Fe^3+"), t.get("H2O", "l")
    dg_r = dimer.dgf_kj_mol - 2 * fe3.dgf_kj_mol - 2 * water.dgf_kj_mol
    assert dg_r == pytest.approx(-8.314462618e-3 * 298.15 * math.log(10) * -2.95, abs=0.01)
    # dH and S of the row reproduce the reaction's enthalpy and entropy (table gives 2 decimals)
    assert dimer.dhf_kj_mol - 2 * fe3.dhf_kj_mol - 2 * water.dhf_kj_mol == pytest.approx(
        dh_r, abs=0.01
    )
    ds_r = dimer.s_j_molk - 2 * fe3.s_j_molk - 2 * water.s_j_molk
    assert ds_r == pytest.approx((dh_r - dg_r) / 298.15 * 1000.0, abs=0.02)
