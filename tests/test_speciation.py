"""Speciation sweeps: mass balance along the sweep, hand calculations and the command line.

Check values: NBS tables (Wagman et al. 1982) and Baes & Mesmer (1976), as in
test_equilibrium.py.
"""

import json
import math

import numpy as np
import pytest

from pourbaix.analyses.speciation import compute_speciation
from pourbaix.cli.commands import main
from pourbaix.errors import ConditionsError, OptionError

RT = 8.314462618e-3 * 298.15  # kJ/mol, CODATA 2018


def test_shares_close_the_mass_balance():
    r = compute_speciation("Cu", {"Cu": 0.1, "N": 1.0}, potential_v=0.2, points=57)
    np.testing.assert_allclose(r.metal_fraction().sum(axis=1), 1.0, rtol=1e-10)
    total = r.free_ligand("NH3") + r.bound_ligand("NH3")
    np.testing.assert_allclose(total, 1.0, rtol=1e-10)
    assert r.present.any()  # CuO, Cu2O and Cu appear along this sweep at 0.1 mol/kg copper


def test_ammonia_bound_by_copper_by_hand():
    # all 0.1 mol/kg copper as Cu(NH3)4^2+ at pH 9.5, 0.7 V binds 0.4 mol/kg of the ammonia;
    # the rest splits NH3/NH4+ by pKa = (dG NH3(aq) - dG NH4+)/(RT ln10), NBS82: -26.50, -79.31
    r = compute_speciation(
        "Cu", {"Cu": 0.1, "N": 1.0}, ph=9.5, potential_range_v=(0.6, 0.8), points=3
    )
    pka = (-26.50 + 79.31) / (RT * math.log(10))
    free_nh3 = 0.6 / (1 + 10 ** (pka - 9.5))
    assert r.bound_ligand("NH3")[1] == pytest.approx(0.4, rel=2e-3)
    nh3 = r.amounts[1, r.system.index("NH3(aq)")]
    # the data hold Cu(NH3)4^2+ and Cu(NH3)2^+ only (no intermediate ammines)
    assert nh3 == pytest.approx(free_nh3, rel=5e-3)


def test_hydrolysis_fractions_against_baes_mesmer():
    # Baes & Mesmer 1976, ch. 10, copper(II) log *beta (from memory): -8.0, -17.3, -27.8, -39.6
    r = compute_speciation("Cu", {"Cu": 1e-12}, potential_v=1.0, ph_range=(6, 12), points=7)
    log_beta = [0.0, -8.0, -17.3, -27.8, -39.6]
    names = ["Cu^2+", "CuOH^+", "Cu(OH)2(aq)", "Cu(OH)3^-", "Cu(OH)4^2-"]
    frac = r.metal_fraction()
    for n, ph in enumerate(r.x):
        w = np.array([10 ** (lb + i * ph) for i, lb in enumerate(log_beta)])
        got = [frac[n, r.system.index(s)] for s in names]
        np.testing.assert_allclose(got, w / w.sum(), rtol=0.01, atol=1e-6)  # rows to 0.01 kJ/mol


def test_gold_dissolves_past_the_hand_potential():
    r = compute_speciation(
        "Au", {"Au": 1e-5, "CN": 1e-3}, ph=10.5, potential_range_v=(-0.6, -0.5), points=101
    )
    gold = r.system.index("Au")
    last = r.x[r.present[:, gold]].max()
    # hand value -0.549 V from NBS82 and Bard, Parsons & Jordan 1985 (see test_equilibrium.py)
    assert last == pytest.approx(-0.549, abs=2e-3)


def test_outputs(tmp_path):
    r = compute_speciation("Cu", {"N": 1.0}, potential_v=0.2, points=11)
    doc = json.loads(r.to_json())
    assert doc["totals_mol_kg"] == {"Cu": 1e-6, "NH3": 1.0}
    assert len(doc["rows"]) == 11
    assert r.to_csv().count("\n") == 12
    assert "Cu(NH3)4^2+" in r.summary() or "Cu(NH3)2^+" in r.summary()


def test_bad_input():
    with pytest.raises(OptionError, match="exactly one"):
        compute_speciation("Cu", {"N": 1.0})
    with pytest.raises(OptionError, match="exactly one"):
        compute_speciation("Cu", {"N": 1.0}, potential_v=0.2, ph=7.0)
    with pytest.raises(ConditionsError, match="points"):
        compute_speciation("Cu", {"N": 1.0}, potential_v=0.2, points=1)
    r = compute_speciation("Cu", {"N": 1.0}, potential_v=0.2, points=3)
    with pytest.raises(OptionError, match="CN"):
        r.free_ligand("CN")


def test_draw(tmp_path):
    pytest.importorskip("matplotlib")
    from pourbaix.plot.speciation import draw_speciation

    r = compute_speciation("Cu", {"Cu": 0.1, "N": 1.0}, potential_v=0.2, points=41)
    axes = draw_speciation(r)
    assert len(axes) == 2
    labels = [t.get_text() for t in axes[0].get_legend().get_texts()]
    assert "Cu(NH₃)₄²⁺" in labels
    import matplotlib.pyplot as plt

    plt.close(axes[0].figure)


def test_cli(tmp_path, capsys):
    png, csv = tmp_path / "s.png", tmp_path / "s.csv"
    code = main(
        [
            "speciation",
            "Cu",
            "--total",
            "N=1",
            "--potential",
            "0.2",
            "--points",
            "31",
            "--out",
            str(png),
            "--out",
            str(csv),
        ]
    )
    assert code == 0 and png.stat().st_size > 0 and csv.exists()
    assert "Speciation of Cu-NH3" in capsys.readouterr().out
    bad = tmp_path / "b.png"
    assert main(["speciation", "Cu", "--total", "N=1", "--out", str(bad)]) == 2
    assert "--potential" in capsys.readouterr().err
    assert not bad.exists()


def test_cli_help_carries_the_caution(capsys):
    with pytest.raises(SystemExit):
        main(["speciation", "--help"])
    assert "cyanide" in capsys.readouterr().out


def test_water_activity_shifts_hydrolysis_by_mass_action():
    # Cu2+ + H2O = CuOH+ + H+ and Cu2+ + 2 H2O = Cu(OH)2(aq) + 2 H+: in an ideal solution
    # the ratios to Cu2+ go as a_w and a_w^2 (mass action; common practice)
    kw = dict(potential_v=0.5, ph_range=(5.0, 6.0), points=5)
    plain = compute_speciation("Cu", {"Cu": 1e-6}, **kw)
    brine = compute_speciation("Cu", {"Cu": 1e-6}, water_activity=0.6, **kw)
    s = plain.system
    cu = s.index("Cu^2+")
    for name, n_water in (("CuOH^+", 1), ("Cu(OH)2(aq)", 2)):
        i = s.index(name)
        shift = (brine.amounts[:, i] / brine.amounts[:, cu]) / (
            plain.amounts[:, i] / plain.amounts[:, cu]
        )
        np.testing.assert_allclose(shift, 0.6**n_water, rtol=1e-9)
    assert brine.water_activity == 0.6 and "water activity 0.6" in brine.summary()


def test_pressure_moves_nickel_hydrolysis_as_the_hkf_equations_say():
    # Ni2+ + H2O = NiOH+ + H+ at 25 °C, 500 bar against 1 bar: both ions carry the
    # SUPCRT-family HKF parameters (Shock et al. 1997); pygcc (test-only) evaluates the
    # same equations with its own IAPWS-95 water and FGL97 dielectric constant
    pygcc_utils = pytest.importorskip("pygcc.pygcc_utils")
    species_eos = pytest.importorskip("pygcc.species_eos")
    water_eos = pytest.importorskip("pygcc.water_eos")
    kw = dict(potential_v=0.5, ph_range=(6.0, 7.0), points=3)
    low = compute_speciation("Ni", {"Ni": 1e-6}, **kw)
    high = compute_speciation("Ni", {"Ni": 1e-6}, pressure_bar=500.0, **kw)
    s = low.system
    ni, nioh = s.index("Ni^2+"), s.index("NiOH^+")
    ours = np.log10(
        (high.amounts[:, nioh] / high.amounts[:, ni]) / (low.amounts[:, nioh] / low.amounts[:, ni])
    )
    db = pygcc_utils.db_reader().dbaccessdic
    tc, p = np.array([25.0, 25.0]), np.array([1.0, 500.0])
    water = water_eos.iapws95(T=tc, P=p)
    eps = np.asarray(water_eos.water_dielec(T=tc, P=p, Dielec_method="FGL97").E)
    rho = np.asarray(water.rho)

    def g(name):  # [cal/mol]
        return np.asarray(species_eos.supcrtaq(tc, p, db[name], Dielec_method="FGL97", rho=rho, E=eps))

    dg = (g("NiOH+") - g("Ni++") - np.asarray(water.G)) * 4.184e-3  # kJ/mol
    expected = -(dg[1] - dg[0]) / (RT * math.log(10))
    np.testing.assert_allclose(ours, expected, atol=1e-4)
    assert high.pressure_bar == 500.0 and "500 bar" in high.summary()


def test_cli_pressure_and_water_activity(tmp_path, capsys):
    out = tmp_path / "s.json"
    args = ["speciation", "Ni", "--total", "Ni=1e-6", "--potential", "0.5", "--points", "5"]
    code = main([*args, "--pressure", "500", "--water-activity", "0.9", "--out", str(out)])
    assert code == 0, capsys.readouterr().err
    doc = json.loads(out.read_text(encoding="utf-8"))
    assert doc["pressure_bar"] == 500.0 and doc["water_activity"] == 0.9
    bad = tmp_path / "bad.json"
    assert main([*args, "--water-activity", "1.5", "--out", str(bad)]) == 2
    err = capsys.readouterr().err
    assert "water activity" in err and not bad.exists()
