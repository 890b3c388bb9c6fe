"""Jarosite in a ferric sulfate leach: its solubility and its field on the Fe-K-S map.

The solubility constant at 25 C and I = 0 is recomputed from the tables as
log K = -dG / (RT ln 10) and compared with the published value (typed FROM
MEMORY, source named beside it). The map check draws the user's path for a
ferric sulfate leach with potassium (``pourbaix map Fe K --ratio 3:1 --ligand
S=0.5 --activity 1e-2 --exclude Fe2O3 FeOOH``: hematite and goethite left out
as they do not form on a leach's time scale at 25 C) and compares the
jarosite / ferric ion line with the pH the published constants give.
"""

import math

import pytest
from cli_run import run

from pourbaix.maps.systems import compute_system_map
from pourbaix.tables.species import load_species

RT_LN10 = 8.314462618 * 298.15 * math.log(10) / 1000  # [kJ/mol] (CODATA 2018 R)

JAROSITE = "KFe3(SO4)2(OH)6:jarosite"
NATROJAROSITE = "NaFe3(SO4)2(OH)6:natrojarosite"
# Baron & Palmer 1996, Geochim. Cosmochim. Acta 60, 185-195: log K = -11.0 +- 0.3 at 25 C for
# KFe3(SO4)2(OH)6 + 6H+ = K+ + 3Fe3+ + 2SO4^2- + 6H2O (from memory)
BARON_PALMER_LOG_K = -11.0
BARON_PALMER_UNCERTAINTY = 0.3
# pKa of HSO4- at 25 C, I = 0: 1.99 (Smith & Martell 1976, vol. 4; from memory)
PKA_HSO4 = 1.99


def _dissolution_log_k(table, solid, alkali):
    g = (
        table.get(alkali, "aq").dgf_kj_mol
        + 3 * table.get("Fe^3+", "aq").dgf_kj_mol
        + 2 * table.get("SO4^2-", "aq").dgf_kj_mol
        + 6 * table.get("H2O", "l").dgf_kj_mol
        - table.get(solid, "s").dgf_kj_mol
    )
    return -g / RT_LN10


@pytest.fixture(scope="module")
def table():
    return load_species()


def test_jarosite_solubility_against_baron_and_palmer(table):
    ours = _dissolution_log_k(table, JAROSITE, "K^+")
    assert ours == pytest.approx(BARON_PALMER_LOG_K, abs=BARON_PALMER_UNCERTAINTY)


def test_natrojarosite_more_soluble_than_jarosite(table):
    # the potassium member is the least soluble of the jarosite family (Stoffregen, Alpers &
    # Jambor 2000, Rev. Mineral. Geochem. 40; from memory)
    assert _dissolution_log_k(table, NATROJAROSITE, "Na^+") > _dissolution_log_k(
        table, JAROSITE, "K^+"
    )


@pytest.fixture(scope="module")
def leach_map():
    return compute_system_map(
        ["Fe", "K"],
        ratio=(3, 1),
        ligands={"S": 0.5},
        activity=1e-2,
        exclude=("Fe2O3", "FeOOH"),
        ph_range=(-1.0, 8.0),
        potential_range_v=(-0.5, 1.6),
    )


def test_leach_map_has_a_jarosite_field(leach_map):
    assert leach_map.probe(2.0, 1.0).species.split(" + ")[0] == JAROSITE
    assert leach_map.probe(-0.5, 1.0).species.split(" + ")[0] == "Fe^3+"


def test_jarosite_line_at_the_ph_of_the_published_constants(leach_map):
    """Fe3+ + K+ (HSO4- predominant) against jarosite, a vertical line.

    K+ + 3Fe3+ + 2HSO4- + 6H2O = KFe3(SO4)2(OH)6 + 8H+ with a(K+) = a(Fe3+) = 1e-2 and
    a(HSO4-) = 0.5: log K = -(log K_BP) - 2 pKa(HSO4-), so
    8 pH = log K_BP + 2 pKa - 2 log 0.5 - log 1e-2 - 3 log 1e-2.
    Tolerance from Baron & Palmer's +-0.3 (over 8) and 0.02 on the pKa (twice, over 8).
    """
    expected = (BARON_PALMER_LOG_K + 2 * PKA_HSO4 - 2 * math.log10(0.5) + 2 + 6) / 8
    lines = [
        b
        for b in leach_map.boundaries
        if any(s.startswith(JAROSITE) for s in b.between)
        and any(s.startswith("Fe^3+") for s in b.between)
    ]
    assert lines and all(b.ph is not None for b in lines)
    tolerance = (BARON_PALMER_UNCERTAINTY + 2 * 0.02) / 8
    assert lines[0].ph == pytest.approx(expected, abs=tolerance)


def test_leach_path_from_the_command_line(tmp_path, capsys):
    out = tmp_path / "leach.json"
    code, _, err = run(
        capsys,
        *"map Fe K --ratio 3:1 --ligand S=0.5 --activity 1e-2 --exclude Fe2O3 FeOOH".split(),
        *"--ph-range -1 8 --potential-range -0.5 1.6 --out".split(),
        out,
    )
    assert code == 0, err
    assert "jarosite" in out.read_text(encoding="utf-8")
