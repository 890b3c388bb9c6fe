"""Comparisons: a 1 kJ/mol change of ΔfG° moves each boundary by ν·1000/(nF) (Nernst)."""

import pytest

from pourbaix.analyses.compare import compare_maps
from pourbaix.errors import OptionError
from pourbaix.maps.domain_map import compute_map
from pourbaix.tables.species import load_species

F = 96485.33212  # C/mol (CODATA 2018)


@pytest.fixture(scope="module")
def shifted(tmp_path_factory):
    """Fe map and the same map with ΔfG°(Fe^2+) raised by 1 kJ/mol through a user table."""
    g = load_species().get("Fe^2+", "aq").dgf_kj_mol
    path = tmp_path_factory.mktemp("data") / "fe2_plus_1kj.csv"
    path.write_text(
        "formula,phase,dgf_kj_mol,source,note\n"
        f"Fe^2+,aq,{g + 1.0:.4f},test,the embedded value plus 1 kJ/mol (invented for the test)\n",
        encoding="utf-8",
    )
    return compare_maps(compute_map("Fe"), compute_map("Fe", data_files=[path]))


# Reduction half-reactions written by hand: (pair, ν(Fe2+) produced, n electrons, reaction)
# E = -ΔrG/(nF): raising G(Fe2+) by δ moves E by -ν δ / (n F) (Nernst; Bard & Faulkner 2001, eq. 2.1.38)
CASES = [
    (("Fe", "Fe^2+"), -1, 2, "Fe2+ + 2e- = Fe"),
    (("Fe^2+", "Fe^3+"), 1, 1, "Fe3+ + e- = Fe2+"),
    (("Fe^2+", "Fe2O3"), 2, 2, "Fe2O3 + 6H+ + 2e- = 2Fe2+ + 3H2O"),
    (("Fe^2+", "Fe3O4"), 3, 2, "Fe3O4 + 8H+ + 2e- = 3Fe2+ + 4H2O"),
]


@pytest.mark.parametrize(("pair", "nu", "n", "reaction"), CASES)
def test_one_kj_moves_each_boundary_by_nernst(shifted, pair, nu, n, reaction):
    s = shifted.shift(*pair)
    assert s is not None and s.kind == "potential"
    expected_mv = -nu * 1000.0 / (n * F) * 1000.0
    # a boundary line moves rigidly; 1e-6 mV covers rounding
    assert s.shift_mv == pytest.approx(expected_mv, abs=1e-6)
    assert s.slope_a_v_per_ph == pytest.approx(s.slope_b_v_per_ph, abs=1e-12)


def test_boundaries_without_fe2_plus_do_not_move(shifted):
    for s in shifted.shifts:
        if "Fe^2+" not in s.between:
            value = s.shift_mv if s.kind == "potential" else s.shift_ph
            assert value == pytest.approx(0.0, abs=1e-9), s.between
    assert "fe2_plus_1kj.csv" in shifted.label_b


def test_activity_comparison_moves_lines_and_vertical_lines():
    cmp = compare_maps(compute_map("Cu", activity=1e-6), compute_map("Cu", activity=1e-4), ph=3.0)
    # Cu2+ + 2e- = Cu: E = E0 + (k/2) log a: +2 decades -> +k (59.16 mV at 25 °C, Nernst)
    s = cmp.shift("Cu", "Cu^2+")
    assert s.at_ph == 3.0 and s.shift_mv == pytest.approx(59.16, abs=0.01)
    # CuO + 2H+ = Cu2+ + H2O: log a = log K - 2 pH -> +2 decades moves the line by -1 pH
    v = cmp.shift("Cu^2+", "CuO")
    assert v.kind == "ph" and v.shift_ph == pytest.approx(-1.0, abs=1e-9)
    assert cmp.label_a == "activity 1e-06" and cmp.label_b == "activity 0.0001"
    rows = cmp.rows()
    assert {r["status"] for r in rows} >= {"in both"}


def test_temperature_comparison_lists_new_and_vanished_boundaries():
    cmp = compare_maps(compute_map("Fe"), compute_map("Fe", temperature_c=100.0))
    assert cmp.only_a or cmp.only_b
    assert all(r["status"].startswith("only in") for r in cmp.rows() if r["kind"] is None)


def test_bad_input():
    with pytest.raises(OptionError, match="cannot compare a map of Fe with one of Cu"):
        compare_maps(compute_map("Fe"), compute_map("Cu"))
    with pytest.raises(OptionError, match="different reference electrodes"):
        compare_maps(compute_map("Fe"), compute_map("Fe", reference="SCE"))
    with pytest.raises(OptionError, match="labels"):
        compare_maps(compute_map("Fe"), compute_map("Fe"), labels="one")
