"""Tests for the HKF, volume and phase-transition columns of the species tables.

Facts used as checks:
- the revised-HKF parameters a1-a4, c1, c2 and omega form one set per aqueous
  species (Tanger & Helgeson, Am. J. Sci. 288, 1988, eqs. 2-3; DEVELOPERS.md,
  "Species tables");
- SUPCRT-family files print a1x10, a2x10^-2, a4x10^-4, c2x10^-4, omegax10^-5
  (Johnson, Oelkers & Helgeson, Comput. Geosci. 18, 1992, the SUPCRT92 data
  file layout; the table holds the unscaled values). Example row: Na+, a1 =
  1.8390 (x10 -> 0.18390 cal/(mol bar)), omega = 0.3306 (x1e-5 -> 33060 cal/mol)
  (Shock & Helgeson, GCA 52, 1988, Table 10; as shipped in pygcc's speq21.dat).
"""

import pytest

from pourbaix.errors import DataFileError
from pourbaix.tables.species import HKF_COLUMNS, HKFParameters, read_species_file
from pourbaix.tables.transitions import load_transitions, read_transitions_file

KNOWN = {"NBS82": "Wagman et al. 1982", "SH88": "Shock & Helgeson 1988", "HDNB78": "Helgeson"}
HEAD = "formula,phase,dgf_kj_mol,source," + ",".join(HKF_COLUMNS) + ",hkf_source,v_cm3_mol\n"
# Na+ of Shock & Helgeson 1988 (Table 10), unscaled as the table holds them
NA_HKF = "0.1839,-228.5,3.256,-27260,18.18,-29810,33060"


def _write(tmp_path, body, head=HEAD):
    path = tmp_path / "t.csv"
    path.write_text(head + body, encoding="utf-8")
    return path


def test_hkf_set_reads_unscaled(tmp_path):
    path = _write(tmp_path, f"Na^+,aq,-261.9,NBS82,{NA_HKF},SH88,\n")
    (na,) = read_species_file(path, KNOWN)
    assert na.hkf == HKFParameters(0.1839, -228.5, 3.256, -27260.0, 18.18, -29810.0, 33060.0)
    assert na.hkf_source == "SH88"
    assert na.v_cm3_mol is None


def test_no_hkf_columns_means_no_parameters(tmp_path):
    path = _write(
        tmp_path, "Fe,s,0,NBS82,7.09\n", head="formula,phase,dgf_kj_mol,source,v_cm3_mol\n"
    )
    (fe,) = read_species_file(path, KNOWN)
    assert fe.hkf is None and fe.hkf_source is None and fe.v_cm3_mol == 7.09


@pytest.mark.parametrize(
    "row, pattern",
    [
        (
            "Na^+,aq,-261.9,NBS82,0.1839,,3.256,-27260,18.18,-29810,33060,,",
            r"come as a set.*hkf_a2",
        ),
        ("NaCl,s,-384.1,NBS82," + NA_HKF + ",,27.0", r"aqueous species, not phase 's'"),
        ("Na^+,aq,-261.9,NBS82," + NA_HKF + ",SH98,", r"unknown source key 'SH98'"),
        ("Fe,s,0,NBS82,,,,,,,,,-7.09", r"v_cm3_mol -7.09 must be > 0"),
        ("Na^+,aq,-261.9,NBS82,0.1839,x,3.256,-27260,18.18,-29810,33060,,", r"'x' is not a number"),
    ],
)
def test_bad_hkf_rows(tmp_path, row, pattern):
    with pytest.raises(DataFileError, match=pattern) as info:
        read_species_file(_write(tmp_path, row + "\n"), KNOWN)
    assert "t.csv:2" in str(info.value)


TR_HEAD = (
    "formula,phase,form,t_k,dh_j_mol,dv_cm3_mol,dpdt_bar_k,"
    "mk_a_j_molk,mk_b_j_molk2,mk_c_jk_mol,source\n"
)


def test_transitions_read_sorted(tmp_path):
    # magnetite's lambda transition at 848 K (Helgeson et al. 1978 list it with dH = 0);
    # numbers here only exercise the reader
    path = tmp_path / "tr.csv"
    path.write_text(
        TR_HEAD + "Fe3O4,s,,900,0,,,200.8,0,0,HDNB78\nFe3O4,s,,848,0,0,,200.8,0,0,HDNB78\n",
        encoding="utf-8",
    )
    got = read_transitions_file(path, KNOWN)
    (key,) = got
    assert key == ("Fe3O4", "s")
    assert [t.t_k for t in got[key]] == [848.0, 900.0]
    assert got[key][0].dv_cm3_mol == 0.0 and got[key][1].dv_cm3_mol is None


@pytest.mark.parametrize(
    "row, pattern",
    [
        ("Fe3O4,s,,,0,,,200.8,0,0,HDNB78", r"missing value for required column 't_k'"),
        ("Fe3O4,s,,848,0,,,200.8,0,0,XX", r"unknown source key 'XX'"),
        ("Fe3O4,s,,-5,0,,,200.8,0,0,HDNB78", r"must be positive"),
    ],
)
def test_bad_transition_rows(tmp_path, row, pattern):
    path = tmp_path / "tr.csv"
    path.write_text(TR_HEAD + row + "\n", encoding="utf-8")
    with pytest.raises(DataFileError, match=pattern):
        read_transitions_file(path, KNOWN)


def test_embedded_transitions_load_and_name_species():
    from pourbaix.tables.species import load_species

    table = load_species()
    keys = {sp.key for sp in table}
    for key, items in load_transitions().items():
        assert key in keys, f"transition rows for {key} name no species row"
        assert all(t.t_k > 298.15 for t in items)
