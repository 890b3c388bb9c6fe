"""User tables: implausible magnitudes and impossible formulas refused with file:line; long reports capped."""

import re

import pytest

from pourbaix.cli.commands import main
from pourbaix.errors import DataFileError
from pourbaix.tables.species import read_species_file

HEADER = "formula,phase,dgf_kj_mol,s_j_molk,source"
KNOWN = {"NBS82": "Wagman et al. 1982"}


def _table(tmp_path, *rows, name="user.csv"):
    path = tmp_path / name
    path.write_text("\n".join([HEADER, *rows]) + "\n", encoding="utf-8")
    return path


@pytest.mark.parametrize(
    "row, column, pattern",
    [
        # ΔfG° of real species are at most a few 10^4 kJ/mol (Robie & Hemingway 1995, by inspection)
        ("Fe^2+,aq,1e300,,NBS82", 3, r"dgf_kj_mol: '1e300' is implausible"),
        ("Fe^2+,aq,-78.9,5e7,NBS82", 4, r"s_j_molk: '5e7' is implausible"),
        # no ion carries a charge of a thousand (common practice)
        ("Fe^1000+,aq,-78.9,,NBS82", 1, r"charge \+1000 .* is not a real ionic charge"),
        ("Fe1000000O,s,-78.9,,NBS82", 1, r"more than 500 atoms of Fe"),
    ],
)
def test_implausible_rows_are_refused_with_file_and_line(tmp_path, row, column, pattern):
    path = _table(tmp_path, "Fe^3+,aq,-4.7,,NBS82", row)
    with pytest.raises(DataFileError) as info:
        read_species_file(path, KNOWN)
    ((where, line, col, message),) = info.value.problems
    assert where == str(path) and line == 3 and col == column
    assert re.search(pattern, message), message


def test_many_bad_rows_list_twenty_and_count_the_rest(tmp_path):
    rows = [f"Fe^2+,aq,not-a-number-{k},,NBS82" for k in range(500)]
    path = _table(tmp_path, *rows)
    with pytest.raises(DataFileError) as info:
        read_species_file(path, KNOWN)
    assert len(info.value.problems) == 500  # all kept for programs
    text = str(info.value)
    lines = text.splitlines()
    assert len(lines) == 21
    assert lines[-1].startswith("... and 480 more problem(s) on 480 more line(s)")


def test_a_huge_cell_is_shortened_in_the_message(tmp_path):
    path = _table(tmp_path, "Fe^2+,aq," + "9" * 100_000 + "x,,NBS82")
    with pytest.raises(DataFileError) as info:
        read_species_file(path, KNOWN)
    assert len(str(info.value)) < 1000


def test_the_command_line_prints_a_capped_report_for_a_big_bad_table(tmp_path, capsys):
    rows = [f"Fe^2+,aq,{'x' * 2000},,NBS82" for _ in range(2000)]  # ~4 MB of bad rows
    path = _table(tmp_path, *rows)
    code = main(["map", "Fe", "--data", str(path), "--out", str(tmp_path / "fe.json")])
    out, err = capsys.readouterr()
    assert code == 2 and "Traceback" not in err
    assert len(err) < 20_000
    assert not (tmp_path / "fe.json").exists()


def test_a_field_file_unit_column_other_than_volts_is_refused_per_row(tmp_path):
    from pourbaix.analyses.field import read_field_csv

    path = tmp_path / "field.csv"
    path.write_text(
        "ph,potential_v,reference,unit\n7.2,-0.65,SCE,V\n7.1,-0.9,SCE,mV\n", encoding="utf-8"
    )
    data = read_field_csv(path)
    assert len(data.rows) == 1
    ((problem),) = data.problems
    assert problem.line == 3 and "potential_v is read in volts" in str(problem)


def test_a_solubility_step_far_too_fine_is_refused(capsys):
    code = main(["solubility", "Zn", "--potential", "0", "--step", "1e-300"])
    _, err = capsys.readouterr()
    assert code == 2 and "--step 1e-300 would make" in err and "Traceback" not in err
