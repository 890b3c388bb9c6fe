"""Analysis commands: outputs, exit codes (0 ok, 2 bad input) and one-line errors."""

import json
from pathlib import Path

import pytest
from cli_run import one_error_line, run

from pourbaix.cli.commands import main
from pourbaix.tables.species import load_species

FIELD = Path(__file__).parent / "data" / "field"


# ------------------------------------------------------------------ solubility
def test_solubility_table_csv_and_json(tmp_path, capsys):
    csv_out, js = tmp_path / "zn.csv", tmp_path / "zn.json"
    code, out, err = run(
        capsys,
        "solubility",
        "Zn",
        "--potential",
        "0",
        "--ph",
        "6",
        "13",
        "--step",
        "1",
        "--out",
        str(csv_out),
        "--out",
        str(js),
    )
    assert code == 0, err
    assert (
        "minimum: pH 9." in out and "ZnO" in out
    )  # common practice: zinc least soluble near pH 9-10
    assert csv_out.read_text().startswith("ph,potential_v_vs_SHE,total_mol_kg,log10_total")
    rows = json.loads(js.read_text())["rows"]
    assert [r["ph"] for r in rows] == [6.0, 7.0, 8.0, 9.0, 10.0, 11.0, 12.0, 13.0]


def test_solubility_along_water_line_json(capsys):
    code, out, _ = run(capsys, "solubility", "Cu", "--along", "oxygen", "--ph", "4", "8", "--json")
    assert code == 0
    doc = json.loads(out)
    assert doc["rows"][0]["potential_v_vs_SHE"] == pytest.approx(
        1.229 - 0.05916 * 4, abs=1e-3
    )  # O2/H2O line


def test_solubility_figures(tmp_path, capsys):
    png, mp = tmp_path / "curve.png", tmp_path / "map.png"
    code, out, err = run(
        capsys,
        "solubility",
        "Zn",
        "--potential",
        "0",
        "--out",
        str(png),
        "--map-out",
        str(mp),
        "--levels",
        "1e-2",
        "1e-6",
    )
    assert code == 0, err
    assert png.read_bytes()[:4] == b"\x89PNG" and mp.read_bytes()[:4] == b"\x89PNG"


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (("solubility", "Zn"), "give either --potential E or --along"),
        (
            ("solubility", "Zn", "--potential", "0", "--along", "oxygen"),
            "give either --potential E or --along",
        ),
        (("solubility", "Zn", "Fe", "--potential", "0"), "give one element"),
        (("solubility", "Zn", "--potential", "0", "--out", "zn.xls"), "unknown file type .xls"),
        (("solubility", "Zn", "--potential", "0", "--ph", "8", "4"), "LO must be below HI"),
        (("solubility", "Xx", "--potential", "0"), "unknown element"),
    ],
)
def test_solubility_bad_input(capsys, args, message):
    code, _, err = run(capsys, *args)
    assert code == 2 and message in err and one_error_line(err)


# ------------------------------------------------------------------ window
def test_window_prints_bounds_and_writes_json_and_figure(tmp_path, capsys):
    js, png = tmp_path / "w.json", tmp_path / "w.png"
    code, out, err = run(
        capsys,
        "window",
        "Cu",
        "--keep-solid",
        "Fe",
        "--dissolved-at-least",
        "1e-2",
        "--others-at-most",
        "1e-5",
        "--ligand",
        "S=0.1",
        "--out",
        str(js),
        "--out",
        str(png),
    )
    assert code == 0, err
    assert "best point: pH" in out and "room there:" in out
    doc = json.loads(js.read_text())
    assert doc["empty"] is False and doc["keep_solid"] == ["Fe"]
    assert png.read_bytes()[:4] == b"\x89PNG"


def test_empty_window_says_why(capsys):
    code, out, _ = run(
        capsys,
        "window",
        "Cu",
        "--keep-solid",
        "Fe",
        "--dissolved-at-least",
        "1",
        "--others-at-most",
        "1e-12",
    )
    assert code == 0
    assert "no window:" in out and "Fe is dissolved (total) above 1e-12" in out


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (("window", "Cu", "--keep-solid", "Cu"), "both the element to dissolve and one to keep"),
        (("window", "Cu", "Ni", "--keep-solid", "Fe"), "give one element"),
        (("window", "Cu", "--keep-solid", "Qq"), "unknown element"),
    ],
)
def test_window_bad_input(capsys, args, message):
    code, _, err = run(capsys, *args)
    assert code == 2 and message in err and one_error_line(err)


def test_window_rejects_negative_level(capsys):
    code, _, err = run(capsys, "window", "Cu", "--keep-solid", "Fe", "--others-at-most", "-1")
    assert code == 2 and "must be a positive number" in err


# ------------------------------------------------------------------ field
def test_field_table_skips_bad_rows_and_draws_a_path(tmp_path, capsys):
    png, csv_out = tmp_path / "f.png", tmp_path / "f.csv"
    code, out, err = run(
        capsys,
        "field",
        "Fe",
        "--readings",
        str(FIELD / "bad_rows.csv"),
        "--reference",
        "SCE",
        "--out",
        str(png),
        "--out",
        str(csv_out),
    )
    assert code == 0, err
    assert "2 reading(s)" in out and "5 row(s) skipped" in out
    for line in (4, 5, 6, 7, 10):
        assert f"bad_rows.csv:{line}:" in err
    assert png.read_bytes()[:4] == b"\x89PNG"
    assert csv_out.read_text().count("\n") == 3  # header + 2 readings


def test_field_json(capsys):
    code, out, _ = run(capsys, "field", "Fe", "--readings", str(FIELD / "series.csv"), "--json")
    assert code == 0
    doc = json.loads(out)
    assert [r["label"] for r in doc["readings"]] == ["week 1", "week 2", "week 3", "week 4"]


@pytest.mark.parametrize(
    ("name", "message"),
    [
        ("missing_column.csv", "missing column(s) reference"),
        ("no_such_file.csv", "cannot read the file"),
    ],
)
def test_field_bad_file(capsys, name, message):
    code, _, err = run(capsys, "field", "Fe", "--readings", str(FIELD / name))
    assert code == 2 and message in err


def test_field_with_no_usable_row_exits_2(tmp_path, capsys):
    bad = tmp_path / "bad.csv"
    bad.write_text("ph,potential_v,reference\nx,y,SCE\n", encoding="utf-8")
    code, _, err = run(capsys, "field", "Fe", "--readings", str(bad))
    assert code == 2 and "no usable reading" in err


# ------------------------------------------------------------------ reading
def test_reading_for_steel_with_the_cp_criterion(capsys):
    code, out, err = run(
        capsys, "reading", "Fe", "--ph", "8", "--potential", "-0.9", "--reference", "Cu/CuSO4"
    )
    assert code == 0, err
    assert "reading:" in out and "immunity:" in out
    # common practice: -0.85 V vs Cu/CuSO4; -0.90 V is 50 mV more negative
    assert "50 mV more negative than -0.85 V" in out
    assert "qualified corrosion engineer" in out


def test_reading_json(capsys):
    code, out, _ = run(capsys, "reading", "Cu", "--ph", "2", "--potential", "0.0", "--json")
    assert code == 0
    doc = json.loads(out)
    assert doc["reading"] == "immune" and doc["cp_check"] is None


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (
            ("reading", "Fe", "--ph", "8", "--potential", "-0.9", "--reference", "copper-rod"),
            "unknown reference electrode",
        ),
        (("reading", "Fe", "--ph", "8"), "required: --potential"),
        (("reading", "Fe", "--ph", "eight", "--potential", "-0.9"), "not a number"),
    ],
)
def test_reading_bad_input(capsys, args, message):
    code, _, err = run(capsys, *args)
    assert code == 2 and message in err


# ------------------------------------------------------------------ compare
def test_compare_datasets_table(capsys):
    code, out, err = run(
        capsys, "compare", "Fe", "--dataset", "default", "--against-dataset", "bpj85"
    )
    assert code == 0, err
    assert "A = data set default, B = data set bpj85" in out and "Fe | Fe^2+" in out


def test_compare_with_a_user_file_moves_the_line_by_nernst(tmp_path, capsys):
    g = load_species().get("Cu^2+", "aq").dgf_kj_mol
    data = tmp_path / "cu.csv"
    # lowered, not raised: 1 kJ/mol more would let Cu+ take a domain of its own (Cu+ is barely unstable)
    data.write_text(
        f"formula,phase,dgf_kj_mol,source,note\nCu^2+,aq,{g - 1.0},test,minus 1 kJ/mol (invented)\n",
        encoding="utf-8",
    )
    js = tmp_path / "cmp.json"
    code, out, err = run(
        capsys, "compare", "Cu", "--against-data", str(data), "--at-ph", "2", "--out", str(js)
    )
    assert code == 0, err
    rows = {frozenset(r["between"]): r for r in json.loads(js.read_text())["boundaries"]}
    # Cu2+ + 2e- = Cu: lowering G(Cu2+) by 1 kJ/mol lowers E by 1000/(2F) V = 5.182 mV (Nernst)
    assert rows[frozenset(("Cu", "Cu^2+"))]["shift_mv"] == pytest.approx(
        -1e6 / (2 * 96485.33212), abs=1e-6
    )


def test_compare_activity_figure(tmp_path, capsys):
    png = tmp_path / "c.png"
    code, out, err = run(capsys, "compare", "Cu", "--against-activity", "1e-4", "--out", str(png))
    assert code == 0, err
    assert png.read_bytes()[:4] == b"\x89PNG"


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (("compare", "Fe"), "say what the second map changes"),
        (("compare", "Fe", "--against-dataset", "nosuchset"), "nosuchset"),
        (("compare", "Fe", "--against-activity", "0"), "must be a positive number"),
    ],
)
def test_compare_bad_input(capsys, args, message):
    code, _, err = run(capsys, *args)
    assert code == 2 and message in err


def test_compare_figure_refuses_a_reference_that_moves_with_temperature(tmp_path, capsys):
    png = tmp_path / "c.png"
    code, _, err = run(
        capsys,
        "compare",
        "Fe",
        "--reference",
        "SCE",
        "--against-temperature",
        "60",
        "--out",
        str(png),
    )
    assert code == 2 and "moves between 25 and 60 °C" in err and one_error_line(err)
    assert not png.exists()


# ---------------------------------------------------------------------- issue 17: beyond any real solution
def test_dissolved_amounts_beyond_any_real_solution_are_marked_not_printed(capsys):
    # ZnO in strong acid: log K(ZnO + 2 H+ = Zn2+ + H2O) is about 11 (Baes & Mesmer 1976; from
    # memory), so at pH 0 the computed 'solubility' is ~1e11 mol/kg, which no solution holds
    code = main(["solubility", "Zn", "--potential", "0", "--ph", "0", "8", "--step", "1"])
    out = capsys.readouterr().out
    assert code == 0
    first = next(ln for ln in out.splitlines() if ln.strip().startswith("0.00"))
    assert "beyond any real solution" in first and "e+11" not in first
    near_neutral = next(ln for ln in out.splitlines() if ln.strip().startswith("8.00"))
    assert "beyond" not in near_neutral
    main(["solubility", "Zn", "--potential", "0", "--ph", "0", "8", "--step", "1", "--json"])
    rows = json.loads(capsys.readouterr().out)["rows"]
    assert rows[0]["beyond_real_solution"] and not rows[-1]["beyond_real_solution"]


def test_window_parts_above_ph_14_are_marked(capsys):
    code = main(
        ["window", "Cu", "--keep-solid", "Fe", "--ligand", "S=0.1", "--dissolved-at-least", "1e-2",
         "--others-at-most", "1e-5"]
    )  # fmt: skip
    out = capsys.readouterr().out
    assert code == 0
    high = [ln for ln in out.splitlines() if ln.strip().startswith("pH 15")]
    assert high and all("beyond any real solution" in ln for ln in high)
    low = [ln for ln in out.splitlines() if ln.strip().startswith("pH 1.")]
    assert low and not any("beyond" in ln for ln in low)
