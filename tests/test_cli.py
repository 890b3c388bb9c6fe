"""The command line: outputs, exit codes and one-line errors."""

import json
import subprocess
import sys

import pytest
import shapely.geometry
from cli_run import run

import pourbaix
from pourbaix.cli.commands import main


def test_map_writes_figure_json_and_csv(tmp_path, capsys):
    png, js, csv = tmp_path / "fe.png", tmp_path / "fe.json", tmp_path / "fe.csv"
    code, out, err = run(
        capsys, "map", "Fe", "--out", str(png), "--out", str(js), "--out", str(csv)
    )
    assert code == 0, err
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    doc = json.loads(js.read_text())
    assert doc["format"] == "pourbaix.map" and doc["version"] == 1
    assert csv.read_text().startswith("species_1,species_2")
    assert "domains:" in out


def test_map_says_when_no_solid_compound_shows(tmp_path, capsys):
    # zinc at 1e-7: ZnO shows only from about 2.0e-7 (ZnO + H2O = Zn(OH)2(aq), log K = 11.12 - 17.82
    # = -6.70 from the IUPAC review, Powell et al. 2013, from memory), so the map has no passive
    # field and says why
    code, out, err = run(
        capsys, "map", "Zn", "--activity", "1e-7", "--out", str(tmp_path / "zn.json")
    )
    assert code == 0, err
    note = [ln for ln in err.splitlines() if "no solid compound of Zn" in ln]
    assert len(note) == 1 and "ZnO" in note[0] and "2e-07" in note[0]
    code, out, err = run(
        capsys, "map", "Zn", "--activity", "1e-6", "--out", str(tmp_path / "zn6.json")
    )
    assert code == 0 and "no solid compound" not in err
    code, out, err = run(capsys, "map", "Fe", "--out", str(tmp_path / "fe.json"))
    assert code == 0 and "no solid compound" not in err


def test_probe_answers_species_state_and_margins(capsys):
    code, out, err = run(
        capsys, "probe", "Fe", "--ph", "7", "--potential", "-0.6", "--reference", "SCE"
    )
    assert code == 0, err
    assert "Fe^2+" in out and "corrosion" in out and "mV" in out


def test_probe_json(capsys):
    code, out, _ = run(capsys, "probe", "Cu", "--ph", "2", "--potential", "0.0", "--json")
    assert code == 0
    row = json.loads(out)
    assert row["species"] == "Cu" and row["state"] == "immunity"
    assert row["reference"] == "SHE"


def test_lines_prints_reactions_and_equations(capsys):
    code, out, _ = run(capsys, "lines", "Cu")
    assert code == 0
    assert "Cu^2+ + 2 e- = Cu" in out
    assert "E0 = +0.3394 V vs SHE" in out or "E0 = +0.34" in out
    assert "water: O2/H2O" in out


def test_species_lists_iron_with_sources(capsys):
    code, out, _ = run(capsys, "species", "Fe", "--json")
    assert code == 0
    rows = json.loads(out)
    assert len(rows) >= 12
    for r in rows:
        assert {"name", "phase", "composition", "charge", "dgf_kj_mol", "source", "note"} <= set(r)


def test_references_and_datasets_list(capsys):
    code, out, _ = run(capsys, "references")
    assert code == 0 and "SCE" in out and "Cu/CuSO4" in out and "RHE" in out
    code, out, _ = run(capsys, "datasets")
    assert code == 0 and "default" in out and "bpj85" in out


@pytest.mark.parametrize(
    "args, match",
    [
        (["probe", "Xx", "--ph", "7", "--potential", "0"], "unknown element 'Xx'"),
        (["map", "Fe", "--ph", "9", "3", "--out", "x.json"], "pH range"),
        (
            ["probe", "Fe", "--ph", "7", "--potential", "0", "--reference", "calomelish"],
            "unknown reference",
        ),
        (["map", "Fe", "--out", "fe.xyz"], "unknown file type"),
        (["map", "Fe", "--activity", "-3", "--out", "a.json"], "positive"),
        (["probe", "Fe", "--ph", "seven", "--potential", "0"], "not a number"),
    ],
)
def test_bad_input_exits_2_with_one_line(capsys, tmp_path, monkeypatch, args, match):
    monkeypatch.chdir(tmp_path)
    code, out, err = run(capsys, *args)
    assert code == 2
    assert match in err
    assert "Traceback" not in err
    assert list(tmp_path.iterdir()) == []  # nothing written


def test_unwritable_output_leaves_nothing(tmp_path, capsys):
    target = tmp_path / "missing-folder" / "fe.json"
    code, _, err = run(capsys, "map", "Fe", "--out", str(target))
    assert code == 2 and "does not exist" in err
    assert not target.exists()


def test_help_has_an_example_and_the_caution():
    for cmd in ("map", "probe", "lines"):
        res = subprocess.run(
            [sys.executable, "-m", "pourbaix.cli.commands", cmd, "--help"],
            capture_output=True,
            text=True,
            check=False,
        )
        assert res.returncode == 0
        assert "example:" in res.stdout
        assert "licensed practice" in res.stdout


def test_light_commands_do_not_import_matplotlib():
    code = (
        "import sys; from pourbaix.cli.commands import main; "
        "main(['probe','Fe','--ph','7','--potential','-0.6']); main(['lines','Fe']); main(['species','Fe']); "
        "assert 'matplotlib' not in sys.modules, 'matplotlib imported'"
    )
    res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=False)
    assert res.returncode == 0, res.stderr


def test_building_the_parser_does_not_import_the_analyses():
    # registering the analysis commands must not pull in the analyses (and numpy): `datasets`
    # and every --help start without them
    code = (
        "import sys; from pourbaix.cli.commands import build_parser, main; build_parser(); main(['datasets']); "
        "assert 'numpy' not in sys.modules, 'numpy imported'; "
        "assert not [m for m in sys.modules if m.startswith('pourbaix.analyses')], 'analyses imported'"
    )
    res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=False)
    assert res.returncode == 0, res.stderr


def test_map_palette_option(tmp_path, capsys):
    from pourbaix.cli.commands import _PALETTES
    from pourbaix.plot import draw

    assert _PALETTES == tuple(draw.PALETTES)
    svg = tmp_path / "fe-grey.svg"
    code, out, err = run(capsys, "map", "Fe", "--palette", "grey", "--out", str(svg))
    assert code == 0, err
    text = svg.read_text(encoding="utf-8")
    # the grey palette's immunity tint fills the Fe domain; no tint of the default palette is used
    assert draw.PALETTES["grey"]["immunity"][0] in text
    assert not any(
        c in text
        for cs in draw.PALETTES["default"].values()
        for c in (cs if isinstance(cs, tuple) else (cs,))
    )
    code, out, err = run(
        capsys, "map", "Fe", "--palette", "sepia", "--out", str(tmp_path / "x.svg")
    )
    assert code == 2 and "invalid choice" in err and not (tmp_path / "x.svg").exists()


# ---------------------------------------------------------------------- issue 17: defaults that hid answers
def test_default_window_widens_to_show_magnesium_immunity(tmp_path, capsys):
    out = tmp_path / "mg.json"
    code, _, err = run(capsys, "map", "Mg", "--out", str(out))
    assert code == 0, err
    assert "widened down to -3 V" in err and "immunity" in err
    doc = json.loads(out.read_text(encoding="utf-8"))
    text = json.dumps(doc)
    assert '"Mg"' in text
    m = pourbaix.compute_map("Mg", potential_range_v=(-3.0, 2.0))
    mg = next(d for d in m.domains if d.species == ("Mg",))
    # CODATA key values (Cox, Wagman & Medvedev 1989; from memory): dHf(Mg2+) = -467.0 kJ/mol,
    # S(Mg2+) = -137, S(Mg, s) = 32.67, S(H2, g) = 130.68 J/(mol K), S(H+) = 0:
    # dGf = -467.0 - 298.15 x (-137 - 32.67 + 130.68) / 1000 = -455.38 kJ/mol,
    # E0(Mg2+/Mg) = dGf / (2 F) = -2.3598 V, and at 1e-6 the immunity line lies at
    # -2.3598 - 0.029580 x 6 = -2.5373 V at pH 0
    dgf = -467.0 - 298.15 * (-137 - 32.67 + 130.68) / 1000
    line = dgf / (2 * 96.485332) - 0.0295799 * 6
    cut = mg.polygon.intersection(shapely.geometry.LineString([(0.0, -3.0), (0.0, 2.0)]))
    assert cut.bounds[3] == pytest.approx(line, abs=0.001)  # key values to 0.1: 0.5 mV
    # a window the user chose stays as chosen
    code, stdout, err = run(capsys, "map", "Mg", "--potential", "-2", "2", "--out", str(out))
    assert code == 0 and "widened" not in err
    assert "never stable in the window: Mg" in stdout
    # iron's immunity is inside the default window: nothing changes
    code, _, err = run(capsys, "map", "Fe", "--out", str(out))
    assert "widened" not in err


@pytest.mark.parametrize(
    "args",
    [
        ["probe", "Fe", "--ph", "7", "--potential", "-0.3"],
        ["lines", "Zn"],
        ["species", "Cu"],
    ],
)
def test_report_on_probe_lines_and_species(tmp_path, capsys, args):
    page = tmp_path / "report.html"
    code, _, err = run(capsys, *args, "--report", str(page))
    assert code == 0, err
    text = page.read_text(encoding="utf-8")
    assert text.startswith("<!DOCTYPE html>") and "<svg" in text


def test_species_help_explains_every_argument(capsys):
    with pytest.raises(SystemExit):
        main(["species", "--help"])
    out = capsys.readouterr().out
    for option in ("--dataset", "--data", "--json", "--report"):
        line = next(ln for ln in out.splitlines() if ln.strip().startswith(option))
        rest = line.split(option, 1)[1].split(None, 1)
        assert len(rest) > 1 or option == "--data", f"{option} has no help"
    assert "user species table" in out and "print JSON" in out


def test_one_name_for_iso_solubility_levels(tmp_path, capsys):
    fig = tmp_path / "zn.png"
    code, _, err = run(
        capsys, "solubility", "Zn", "--potential", "0", "--solubility-lines", "1e-3",
        "--map-out", str(fig),
    )  # fmt: skip
    assert code == 0, err
    assert fig.is_file()
    code, _, err = run(capsys, "solubility", "Zn", "--potential", "0", "--levels", "1e-3")
    assert code == 0, err  # the older name still works


def test_background_salt_says_its_chloride_forms_no_complexes(capsys):
    code, _, err = run(capsys, "probe", "Cu", "--background", "NaCl=0.5", "--ph", "5",
                       "--potential", "0.3")  # fmt: skip
    assert code == 0
    assert "chloride (0.5 mol/kg) sets the ionic strength only" in err
    assert "--ligand Cl=0.5" in err
    code, _, err = run(capsys, "probe", "Cu", "--background", "NaCl=0.5", "--ligand", "Cl=0.5",
                       "--ph", "5", "--potential", "0.3")  # fmt: skip
    assert code == 0 and "sets the ionic strength only" not in err


def test_point_and_range_options_read_alike_and_errors_show_no_python(tmp_path, capsys):
    # ranges: --ph-range LO HI and --potential-range LO HI (the older --ph LO HI still works);
    # points: --ph X and --potential E
    out = tmp_path / "cu.json"
    code, _, err = run(capsys, "map", "Cu", "--ph-range", "0", "14", "--potential-range", "-1",
                       "1.5", "--out", str(out))  # fmt: skip
    assert code == 0, err
    window = json.loads(out.read_text(encoding="utf-8"))
    text = json.dumps(window)
    assert "14" in text and "1.5" in text
    code, _, err = run(capsys, "map", "Cu", "--ph", "0", "14", "--out", str(out))
    assert code == 0, err
    code, _, err = run(capsys, "solubility", "Zn", "--potential", "0", "--ph-range", "6", "10")
    assert code == 0, err
    code, _, err = run(capsys, "map", "Fe", "Cr", "--out", str(tmp_path / "x.png"))
    assert code == 2
    assert "--ratio 1:1" in err and "ratio=(" not in err
