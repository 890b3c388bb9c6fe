"""Routes to temperature per species on maps and in the command line (issue: HKF routes).

Checks against outside values: the ranges of the revised HKF equations
(Shock et al. 1992: water density >= 0.35 g/cm³, to 5 kbar); IAPWS-95 critical
temperature 373.946 °C.
"""

import json

import pytest
from cli_run import run

from pourbaix.maps.domain_map import compute_map

REAL = (
    "fitted HKF",
    "estimated HKF",
    "Maier–Kelley",
    "constant Cp",
    "IAPWS-95",
    "convention (H+ = 0)",
)


@pytest.mark.parametrize("element", ["Fe", "Ni", "Cu", "Zn"])
def test_maps_at_300c_name_a_route_for_every_species(element):
    m = compute_map(element, temperature_c=300.0)
    stuck = [se.species.name for se in m.species if not se.route.startswith(REAL)]
    if stuck:  # a species with no route at all is named in a warning
        assert any("keep their 25 °C ΔG" in w and all(n in w for n in stuck) for w in m.warnings)
    aqueous = [se for se in m.species if se.species.phase == "aq"]
    assert all("HKF" in se.route for se in aqueous if se.species.name not in stuck)


def test_map_400c_1000bar_json_carries_routes(tmp_path, capsys):
    out = tmp_path / "fe400.json"
    code, _, err = run(
        capsys, "map", "Fe", "--temperature", "400", "--pressure", "1000", "--out", str(out)
    )
    assert code == 0, err
    doc = json.loads(out.read_text())
    assert doc["conditions"]["pressure_bar"] == 1000.0
    assert all(s["route"] for s in doc["species"])
    assert any(s["route"].startswith("estimated HKF") for s in doc["species"])


@pytest.mark.parametrize(
    "args, pattern",
    [
        (("--temperature", "400"), "above 350 °C"),
        (("--temperature", "300", "--pressure", "6000"), "5000"),
        (("--temperature", "500", "--pressure", "300"), "0.35 g/cm³"),
        (("--temperature", "650", "--pressure", "1000"), "outside"),
    ],
)
def test_conditions_outside_the_range_are_one_message(tmp_path, capsys, args, pattern):
    out = tmp_path / "x.json"
    code, _, err = run(capsys, "map", "Fe", *args, "--out", str(out))
    assert code == 2
    assert pattern in err and "Traceback" not in err
    assert not out.exists()


def test_species_and_lines_show_routes(capsys):
    code, out, _ = run(capsys, "species", "Fe", "--temperature", "200")
    assert code == 0
    assert "route: how ΔG is carried to 200 °C" in out and "estimated HKF" in out
    code, out, _ = run(capsys, "species", "Fe", "--json")
    rows = json.loads(out)
    assert all("route" in r for r in rows)
    code, out, _ = run(capsys, "lines", "Fe", "--temperature", "250", "--json")
    rows = json.loads(out)
    assert all(set(r["routes"]) <= set(r["between"]) for r in rows)
    assert any(r["routes"] for r in rows)
    code, out, _ = run(capsys, "lines", "Fe", "--temperature", "250")
    assert "ΔG of each species at 250 °C" in out


def test_pressure_moves_solids_only_with_a_volume():
    # at 25 °C, 1000 bar: aqueous species follow HKF; H2O follows IAPWS-95
    m1 = compute_map("Cu")
    m2 = compute_map("Cu", temperature_c=25.0, pressure_bar=1000.0)
    g1 = {se.species.key: se.dg_kj_mol for se in m1.species}
    g2 = {se.species.key: se.dg_kj_mol for se in m2.species}
    assert g2[("Cu^2+", "aq")] != g1[("Cu^2+", "aq")]
    water = [se for se in m2.species if se.species.name == "H2O"]
    # V(H2O) = 18.07 cm3/mol: about +1.8 kJ/mol for 999 bar (common practice estimate)
    assert water[0].dg_kj_mol - (-237.129) == pytest.approx(1.78, abs=0.05)


def test_compare_hkf_against_criss_cobble(capsys):
    # the older routes stay available as the data set "criss-cobble"; at 150 °C the
    # Fe2+/Fe line moves between the two (different Cp of Fe2+), at 25 °C it does not
    code, out, err = run(
        capsys,
        "compare",
        "Fe",
        "--temperature",
        "150",
        "--against-dataset",
        "criss-cobble",
        "--json",
    )
    assert code == 0, err
    doc = json.loads(out)
    text = json.dumps(doc)
    assert "criss-cobble" in text
    m_hkf = compute_map("Fe", temperature_c=150.0)
    m_cc = compute_map("Fe", temperature_c=150.0, dataset="criss-cobble")
    r_hkf = {se.species.name: se.route for se in m_hkf.species}
    r_cc = {se.species.name: se.route for se in m_cc.species}
    assert r_hkf["Fe^2+"].endswith("HKF") and r_cc["Fe^2+"] == "Criss–Cobble"
    line = {tuple(sorted(b.between)): b.e_at_ph0_v for b in m_hkf.boundaries if b.ph is None}
    line_cc = {tuple(sorted(b.between)): b.e_at_ph0_v for b in m_cc.boundaries if b.ph is None}
    assert line[("Fe", "Fe^2+")] != pytest.approx(line_cc[("Fe", "Fe^2+")], abs=1e-4)
