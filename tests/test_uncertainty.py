"""Uncertainty bands and probabilities (pourbaix.analyses.uncertainty).

Outside check: for an acid-base line between two species whose Gibbs energies
carry independent standard uncertainties u, the line's pH has standard
uncertainty sqrt(2) u / (RT ln 10) (law of propagation of uncertainty, JCGM
100:2008 eq. 10), so the central 95 % of the sampled positions spans
+-1.96 of that (normal distribution; JCGM 101:2008).
"""

import dataclasses
import math

import numpy as np
import pytest

from pourbaix.analyses.uncertainty import boundary_band, sample_maps, species_probabilities
from pourbaix.cli import main
from pourbaix.errors import DataFileError, OptionError
from pourbaix.tables.species import load_species, read_species_file

RT_LN10 = 8.314462618 * 298.15 * math.log(10) / 1000  # [kJ/mol]


@pytest.fixture(scope="module")
def arsenic():
    return sample_maps("As", samples=200, default_uncertainty_kj_mol=2.0, seed=1)


def test_probabilities_sum_to_one_and_favour_the_nominal_species(arsenic):
    p = species_probabilities(arsenic, 4.5, 1.0)  # inside the H2AsO4- field, 2.3 pH from lines
    assert sum(p.values()) == pytest.approx(1.0)
    assert next(iter(p)) == str(arsenic.nominal.probe(4.5, 1.0).species)
    assert p[next(iter(p))] > 0.95


def test_band_width_of_an_acid_base_line_follows_propagation(arsenic):
    # the H2AsO4-/HAsO4^2- line at E = 1.0 V: share of samples on the acid side along pH
    ph = np.linspace(4.5, 9.5, 501)
    acid = np.zeros_like(ph)
    for m in arsenic.samples:
        acid += np.asarray(m.probe(ph, np.full_like(ph, 1.0)).species, dtype=object) == "H2AsO4^-"
    acid /= len(arsenic.samples)
    lo = ph[np.argmax(acid < 0.975)]
    hi = ph[np.argmax(acid < 0.025)]
    expected = 2 * 1.96 * math.sqrt(2) * 2.0 / RT_LN10  # [pH units]
    assert hi - lo == pytest.approx(expected, rel=0.25)


def test_zero_uncertainty_gives_no_band():
    # rows without a stated uncertainty and a default of 0: nothing moves
    table = load_species()
    bare = dataclasses.replace(
        table,
        species=tuple(dataclasses.replace(s, dgf_unc_kj_mol=None) for s in table.species),
    )
    r = sample_maps("Zn", samples=10, default_uncertainty_kj_mol=0.0, table=bare)
    assert r.stated == 0
    _, _, band = boundary_band(r, resolution=40)
    assert not band.any()
    # the same default with the zinc rows' own uncertainties (IUPAC review) draws a band
    r = sample_maps("Zn", samples=10, default_uncertainty_kj_mol=0.0, table=table)
    assert r.stated == 6 and boundary_band(r, resolution=40)[2].any()


def test_bad_sample_count():
    with pytest.raises(OptionError):
        sample_maps("Zn", samples=3)


def test_cli_probe_and_map(capsys, tmp_path):
    assert main(["probe", "As", "--ph", "6.9", "--potential", "0.5", "--uncertainty", "2",
                 "--samples", "20"]) == 0  # fmt: skip
    out = capsys.readouterr().out
    assert "probability of each species (20 sampled maps" in out and "HAsO4^2-" in out
    target = tmp_path / "as.png"
    assert main(["map", "As", "--uncertainty", "--samples", "10", "--out", str(target)]) == 0
    assert target.stat().st_size > 0
    assert main(["map", "As", "--uncertainty", "--samples", "2", "--out", str(target)]) == 2
    assert "--samples 2" in capsys.readouterr().err


# ---- rows that carry their source's uncertainty -------------------------------------------

T_KK = 298.15e-3  # [kK]: T in kK turns J/(mol K) into kJ/mol


def _codata_u(u_dh, u_s, elements):
    """Standard uncertainty of dG = dH - T dS from CODATA 1989 +/- values (95 %, k = 2).

    U(dG)^2 = U(dH)^2 + T^2 [U(S)^2 + sum (nu U(S_element))^2] (JCGM 100:2008 eq. 10,
    independent inputs); u = U / 2.
    """
    return 0.5 * math.sqrt(u_dh**2 + T_KK**2 * (u_s**2 + sum((n * x) ** 2 for n, x in elements)))


# CODATA Key Values (Cox, Wagman & Medvedev 1989), printed +/- of dH [kJ/mol] and S [J/(mol K)]
# (from memory): Al3+ 1.5 and 10; Al2O3 1.3 and 0.10; Mg2+ 0.6 and 4; MgO 0.30 and 0.15;
# CdO 0.40 and 1.5; HgO (red) 0.12 and 0.30; Hg2Cl2 0.40 and 0.8; Hg2SO4 0.40 and 0.20;
# BeO 2.5 and 0.04; UO2 1.0 and 0.20; UO2^2+ 1.5 and 3.0; MgF2 1.2 and 0.5;
# Sn2+ 1.0 and 4.0; SnO 0.20 and 0.30; SnO2 0.20 and 0.10; TiO2 (rutile) 0.8 and 0.30;
# elements Al(cr) 0.10, Mg(cr) 0.10, Cd(cr) 0.15, Hg(l) 0.12, Be(cr) 0.08, U(cr) 0.20,
# Sn(cr, white) 0.08, Ti(cr) 0.10,
# S(rh) 0.050, H2(g) 0.003, O2(g) 0.005, Cl2(g) 0.010, F2(g) 0.005. The hand-typed rows carry
# the value typed; the mercury, cadmium, beryllium, uranium and MgF2 rows get it from
# species_data/import/run_import.py.
CODATA_ROWS = [
    ("Al^3+", "aq", _codata_u(1.5, 10, [(1, 0.10), (1.5, 0.003)])),
    ("Al2O3", "s", _codata_u(1.3, 0.10, [(2, 0.10), (1.5, 0.005)])),
    ("Mg^2+", "aq", _codata_u(0.6, 4, [(1, 0.10), (1, 0.003)])),
    ("MgO", "s", _codata_u(0.30, 0.15, [(1, 0.10), (0.5, 0.005)])),
    ("CdO:monteponite", "s", _codata_u(0.40, 1.5, [(1, 0.15), (0.5, 0.005)])),
    ("HgO:montroydite", "s", _codata_u(0.12, 0.30, [(1, 0.12), (0.5, 0.005)])),
    ("Hg2Cl2:calomel", "s", _codata_u(0.40, 0.8, [(2, 0.12), (1, 0.010)])),
    ("Hg2SO4", "s", _codata_u(0.40, 0.20, [(2, 0.12), (1, 0.050), (2, 0.005)])),
    ("BeO:bromellite", "s", _codata_u(2.5, 0.04, [(1, 0.08), (0.5, 0.005)])),
    ("UO2:uraninite", "s", _codata_u(1.0, 0.20, [(1, 0.20), (1, 0.005)])),
    # UO2^2+: U + O2 + 2 H+ = UO2^2+ + H2, so one H2 (charge / 2) enters the reaction
    ("UO2^2+", "aq", _codata_u(1.5, 3.0, [(1, 0.20), (1, 0.005), (1, 0.003)])),
    ("MgF2:sellaite", "s", _codata_u(1.2, 0.5, [(1, 0.10), (1, 0.005)])),
    ("Sn^2+", "aq", _codata_u(1.0, 4.0, [(1, 0.08), (1, 0.003)])),
    ("SnO", "s", _codata_u(0.20, 0.30, [(1, 0.08), (0.5, 0.005)])),
    ("SnO2", "s", _codata_u(0.20, 0.10, [(1, 0.08), (1, 0.005)])),
    ("TiO2", "s", _codata_u(0.8, 0.30, [(1, 0.10), (1, 0.005)])),
]


@pytest.mark.parametrize("name, phase, expected", CODATA_ROWS, ids=[r[0] for r in CODATA_ROWS])
def test_codata_rows_carry_the_propagated_uncertainty(name, phase, expected):
    row = load_species().get(name, phase)
    assert row.source == "CODATA89"  # only a row whose value is the CODATA one may carry it
    assert row.dgf_unc_kj_mol == pytest.approx(expected, abs=0.006)  # the row prints 2 decimals


def test_hand_calculation_of_the_al3_uncertainty():
    # Al3+: U(dH) 1.5 kJ/mol, U(S) 10 J/(mol K) dominate: sqrt(1.5^2 + (0.29815 * 10)^2) / 2
    # = sqrt(2.25 + 8.889) / 2 = 1.669 kJ/mol (CODATA 1989 +/-, from memory)
    assert load_species().get("Al^3+", "aq").dgf_unc_kj_mol == pytest.approx(1.669, abs=0.005)


def test_review_constants_carry_their_log_k_uncertainty():
    # Powell et al. 2007 (IUPAC, Cu2+ + CO3^2-): log beta2 = 10.3 +/- 0.1 (95 %; from memory):
    # u(dG) = RT ln10 * 0.1 / 2 = 5.708 * 0.05 kJ/mol
    row = load_species().get("Cu(CO3)2^2-", "aq")
    assert row.dgf_unc_kj_mol == pytest.approx(RT_LN10 * 0.1 / 2, abs=0.006)


def test_loader_reads_the_column_and_refuses_a_negative_value(tmp_path):
    path = tmp_path / "mine.csv"
    path.write_text(
        "formula,phase,dgf_kj_mol,dgf_unc_kj_mol,source\n"
        "Zn^2+,aq,-147.2,0.25,X\nZnO,s,-320.5,,X\n",
        encoding="utf-8",
    )
    zn, zno = read_species_file(path)
    assert zn.dgf_unc_kj_mol == 0.25 and zno.dgf_unc_kj_mol is None
    path.write_text(
        "formula,phase,dgf_kj_mol,dgf_unc_kj_mol,source\nZn^2+,aq,-147.2,-0.25,X\n",
        encoding="utf-8",
    )
    with pytest.raises(DataFileError) as info:
        read_species_file(path)
    ((where, line, _, message),) = info.value.problems
    assert where == str(path) and line == 2 and "dgf_unc_kj_mol -0.25 must be >= 0" in message


def _acid_side_width(result, acid, ph, potential_v):
    """pH span over which the share of `acid` falls from 97.5 % to 2.5 % at one potential."""
    share = np.zeros_like(ph)
    for m in result.samples:
        share += np.asarray(m.probe(ph, np.full_like(ph, potential_v)).species, dtype=object) == acid
    share /= len(result.samples)
    return ph[np.argmax(share < 0.025)] - ph[np.argmax(share < 0.975)]


def test_band_is_wider_where_the_row_states_a_larger_uncertainty():
    # default 0: only the rows with a stated uncertainty move (Mg2+ 0.67, MgO 0.15 kJ/mol).
    # The Mg2+/Mg(OH)2 line, Mg(OH)2 + 2 H+ = Mg2+ + 2 H2O, sits at pH = (log K - log a)/2,
    # so its pH has standard uncertainty u(Mg2+) / (2 RT ln10) and its 95 % band spans
    # 2 * 1.96 of that (JCGM 100:2008 eq. 10; JCGM 101:2008).
    table = load_species()
    mg = table.get("Mg^2+", "aq")
    wider = dataclasses.replace(
        table,
        species=tuple(
            dataclasses.replace(s, dgf_unc_kj_mol=3 * mg.dgf_unc_kj_mol) if s is mg else s
            for s in table.species
        ),
    )
    ph = np.linspace(8.0, 12.0, 801)
    widths = []
    for t in (table, wider):
        r = sample_maps(
            "Mg", samples=200, default_uncertainty_kj_mol=0.0, seed=3, table=t,
            exclude=["MgOH^+"],  # its line lies 0.02 pH from Mg2+/Mg(OH)2 at 1e-6
        )  # fmt: skip
        assert r.stated == 2  # Mg2+ and MgO
        widths.append(_acid_side_width(r, "Mg^2+", ph, 0.0))
    expected = [2 * 1.96 * u / (2 * RT_LN10) for u in (mg.dgf_unc_kj_mol, 3 * mg.dgf_unc_kj_mol)]
    assert widths[1] > 2 * widths[0]
    assert widths == pytest.approx(expected, rel=0.3)  # 200 draws: band edges to a few %


def test_species_json_gives_the_stated_uncertainty(capsys):
    import json

    assert main(["species", "Zn", "--json"]) == 0
    rows = {(r["name"], r["phase"]): r for r in json.loads(capsys.readouterr().out)}
    # ZnO: log *Ks0 = 11.12 +/- 0.05 (Powell et al. 2013, from memory): u = 5.708 * 0.05 / 2
    assert rows[("ZnO", "s")]["dgf_unc_kj_mol"] == pytest.approx(RT_LN10 * 0.05 / 2, abs=0.006)
    assert "dgf_unc_kj_mol" not in rows[("Zn^2+", "aq")]  # NBS82 states none


def test_loader_reads_the_parent_and_refuses_a_bad_one(tmp_path):
    head = "formula,phase,dgf_kj_mol,dgf_unc_kj_mol,dgf_unc_parent,source\n"
    path = tmp_path / "mine.csv"
    path.write_text(head + "ZnOH^+,aq,-333.0,0.2,Zn^2+,X\n", encoding="utf-8")
    assert load_species(user_files=[path]).get("ZnOH^+", "aq").dgf_unc_parent == "Zn^2+"
    for row, pattern in (
        ("ZnOH^+,aq,-333.0,,Zn^2+,X", "needs dgf_unc_kj_mol"),
        ("ZnOH^+,aq,-333.0,0.2,Zz^2+,X", "dgf_unc_parent: "),
        ("ZnOH^+,aq,-333.0,0.2,ZnOH+,X", "names the row itself"),
    ):
        path.write_text(head + row + "\n", encoding="utf-8")
        with pytest.raises(DataFileError) as info:
            load_species(user_files=[path])
        ((where, line, _, message),) = info.value.problems
        assert where == str(path) and line == 2 and pattern in message, message


def _share_along(result, name, ph, potential_v):
    share = np.zeros(np.broadcast(ph, potential_v).shape)
    for m in result.samples:
        got = m.probe(np.broadcast_to(ph, share.shape), np.broadcast_to(potential_v, share.shape))
        share += np.asarray(got.species, dtype=object) == name
    return share / len(result.samples)


def test_a_row_moves_with_its_parent():
    # ZnO from log *Ks0 = 11.12 +/- 0.05 and the table's Zn2+ (Powell et al. 2013, from memory):
    # with Zn2+ drawn at 1 kJ/mol (no stated value) and ZnO with it plus u = 0.14 kJ/mol, the
    # Zn2+/ZnO line (pH = (log *Ks0 - log a)/2) has a 95 % band of 2 * 1.96 * u / (2 RT ln10)
    # = 0.049 pH; drawn independently it would span 2 * 1.96 * sqrt(1 + 0.14^2) / (2 RT ln10)
    # = 0.35 pH (JCGM 100:2008 eq. 10 with and without the shared term)
    r = sample_maps("Zn", samples=200, default_uncertainty_kj_mol=1.0, seed=5)
    ph = np.linspace(8.2, 8.9, 701)
    acid = _share_along(r, "Zn^2+", ph, 0.0)
    width = ph[np.argmax(acid < 0.025)] - ph[np.argmax(acid < 0.975)]
    u = load_species().get("ZnO", "s").dgf_unc_kj_mol
    assert width == pytest.approx(2 * 1.96 * u / (2 * RT_LN10), rel=0.35)
    # the shared draw still moves the Zn2+/Zn line: E0 = dG(Zn2+) / (2F), u = 1 kJ/mol / 2F
    potential = np.linspace(-1.1, -0.8, 601)
    metal = _share_along(r, "Zn", 4.0, potential)
    spread = potential[np.argmax(metal < 0.025)] - potential[np.argmax(metal < 0.975)]
    assert spread == pytest.approx(2 * 1.96 * 1.0 / (2 * 96.485), rel=0.35)  # [V]


def test_only_species_of_the_maps_system_are_drawn_and_counted():
    # MgF2 (CODATA89, u 0.60 kJ/mol) belongs to a magnesium map only when fluoride is present
    plain = sample_maps("Mg", samples=10, default_uncertainty_kj_mol=0.0, seed=1)
    fluoride = sample_maps(
        "Mg", samples=10, default_uncertainty_kj_mol=0.0, seed=1, ligands={"F": 1e-3}
    )
    assert plain.stated == 2  # Mg2+ and MgO
    assert fluoride.stated == 3  # and MgF2
    assert fluoride.perturbed > plain.perturbed


def test_the_band_caption_goes_under_the_map_where_it_hides_no_label(tmp_path, monkeypatch):
    # the caption of the hatched band is a line under the figure, not a box inside the axes
    # (a box at the lower right covered a domain label of the U-C map)
    from pourbaix.plot import draw

    saved = []
    real_save = draw.save_figure

    def keep(ax, path, **kwargs):
        saved.append(ax)
        return real_save(ax, path, **kwargs)

    monkeypatch.setattr(draw, "save_figure", keep)
    out = tmp_path / "zn.png"
    code = main(["map", "Zn", "--uncertainty", "1", "--samples", "10", "--out", str(out)])
    assert code == 0 and out.exists()
    (ax,) = saved
    texts = [t for t in ax.texts + ax.figure.texts if "95 % band" in t.get_text()]
    (caption,) = texts  # one mention: the caption's line, no box of its own
    assert caption.get_text().startswith("Zn–H₂O  ·  25 °C")
    assert "\n//// 95 % band (10 draws" in caption.get_text()
    assert caption.get_bbox_patch() is None
