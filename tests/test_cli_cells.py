"""series, cell and couple from the command line: outputs, exit codes (0 ok, 2 bad input), reports.

Check values: CRC Handbook Electrochemical Series (from memory) E°(Zn2+/Zn) = -0.7618 V and
E°(Cu2+/Cu) = +0.3419 V; saturated calomel 0.2412 V at 25 °C and Ives & Janz's (1961) cubic
at other temperatures.
"""

import csv
import io
import json

import pytest
from cli_run import one_error_line, run


def test_series_at_60_c_vs_sce(capsys):
    code, out, err = run(capsys, "series", "--temperature", "60", "--reference", "SCE", "--json")
    assert code == 0, err
    rows = {r["couple"]: r for r in json.loads(out)}
    sce60 = 0.2412 - 6.61e-4 * 35 - 1.75e-6 * 35**2 - 9.0e-10 * 35**3  # Ives & Janz 1961
    for r in rows.values():
        assert r["reference"] == "SCE" and r["temperature_c"] == 60.0
        assert r["e0_v_she"] - r["e0_v"] == pytest.approx(sce60, abs=2e-5)  # rounded to 5 places
    assert len(rows) >= 40
    code, out, _ = run(capsys, "series", "--temperature", "60", "--reference", "SCE")
    assert code == 0 and "vs SCE" in out and "Zn²⁺ + 2 e⁻ = Zn" in out


def test_series_text_at_25_c_prints_crc_values(capsys):
    code, out, _ = run(capsys, "series", "--element", "Zn", "Cu")
    assert code == 0
    line = next(ln for ln in out.splitlines() if ln.startswith("Zn2+/Zn "))
    assert float(line.split()[1]) == pytest.approx(-0.7618, abs=0.005)  # CRC series
    line = next(ln for ln in out.splitlines() if ln.startswith("Cu2+/Cu "))
    assert float(line.split()[1]) == pytest.approx(0.3419, abs=0.005)  # CRC series
    assert "\n  NBS82: Wagman" in out


def test_series_csv_json_and_report(tmp_path, capsys):
    table, js, rep = tmp_path / "s.csv", tmp_path / "s.json", tmp_path / "s.html"
    code, out, err = run(
        capsys,
        "series",
        "--element",
        "Fe",
        "--ph",
        "7",
        "--activity",
        "1e-6",
        "--out",
        str(table),
        "--out",
        str(js),
        "--report",
        str(rep),
    )
    assert code == 0, err
    rows = list(csv.DictReader(io.StringIO(table.read_text())))
    assert rows and all(r["e_v"] for r in rows)
    assert json.loads(js.read_text())[0]["couple"] == rows[0]["couple"]
    html = rep.read_text()
    assert "not a corrosion rate" in html and "licensed practice" in html and "NBS82" in html


def test_typed_half_reaction(capsys):
    code, out, err = run(
        capsys,
        "series",
        "MnO4- + 8H+ + 5e- = Mn2+ + 4H2O",
        "--ph",
        "2",
        "--species-activity",
        "MnO4-=0.01",
    )
    assert code == 0, err
    assert "n = 5" in out and "Nernst: E = +1.51" in out
    assert "balance: elements and charge check" in out


@pytest.mark.parametrize(
    "reaction, match",
    [
        ("MnO4- + 8H+ + 4e- = Mn2+ + 4H2O", "does not balance: charge"),
        ("Qq2+ + 2e- = Qq", "unknown species 'Qq2\\+'"),
    ],
)
def test_bad_half_reactions_exit_2(capsys, reaction, match):
    code, out, err = run(capsys, "series", reaction)
    assert code == 2 and one_error_line(err) and "Traceback" not in err
    assert __import__("re").search(match, err)


def test_daniell_cell(capsys):
    code, out, err = run(capsys, "cell", "Zn | Zn2+ || Cu2+ | Cu")
    assert code == 0, err
    assert "E°cell = E°cathode - E°anode = +0.3394 - (-0.7621) = +1.1015 V" in out
    assert "spontaneous as written" in out and "anode is Zn | Zn2+" in out
    assert "× 2:  n = 4,  Ecell = +1.1015 V" in out
    code, out, _ = run(capsys, "cell", "Zn | Zn2+ || Cu2+ | Cu", "--json", "--multiply", "3")
    d = json.loads(out)
    assert d["e0_cell_v"] == pytest.approx(0.3419 + 0.7618, abs=0.005)  # CRC series
    m = {r["factor"]: r for r in d["multiplied"]}
    assert m[3.0]["e_cell_v"] == m[1.0]["e_cell_v"]
    assert m[3.0]["dg_kj_mol"] == pytest.approx(3 * m[1.0]["dg_kj_mol"], abs=1e-3)


def test_cell_two_half_reactions_and_report(tmp_path, capsys):
    rep = tmp_path / "cell.md"
    code, out, err = run(
        capsys,
        "cell",
        "Zn2+ + 2e- = Zn",
        "O2 + 4H+ + 4e- = 2H2O",
        "--ph",
        "7",
        "--report",
        str(rep),
    )
    assert code == 0, err
    assert "n = 4" in out
    text = rep.read_text()
    assert "E does not change" in text or "the potential E does not change" in text


@pytest.mark.parametrize(
    "args, match",
    [
        (["cell", "Cu | Cu2+ || Cu2+ | Cu"], "the same"),
        (["cell", "Zn | Zn2+ | Cu2+ | Cu"], r"\|\|"),
        (["cell", "Zn | Zn2+ || Cu2+ | Cu", "--species-activity", "Zn2+=0"], "must be > 0"),
        (["couple", "Cu", "Cu", "--ph", "7"], "twice"),
        (
            ["couple", "Zn", "Cu", "--ph", "7", "--kinetics", "Zn:anodic=0,cathodic=0.1,i0=1"],
            "must be > 0",
        ),
        (
            ["couple", "Zn", "Cu", "--ph", "7", "--kinetics", "Zn:anodic=0.1,cathodic=0.1,i0=-1"],
            "must be > 0",
        ),
        (
            ["couple", "Zn", "Cu", "--ph", "7", "--kinetics", "Zn:anodic=0.1,cathodic=0.1,i0=1"],
            "every metal",
        ),
    ],
)
def test_bad_input_exit_2(tmp_path, capsys, args, match):
    rep = tmp_path / "never.html"
    code, out, err = run(capsys, *args, "--report", str(rep))
    assert code == 2 and "Traceback" not in err
    assert __import__("re").search(match, err), err
    assert not rep.exists()


def test_couple_at_ph_8_and_15_c(tmp_path, capsys):
    fig, js = tmp_path / "zc.png", tmp_path / "zc.json"
    code, out, err = run(
        capsys,
        "couple",
        "Zn",
        "Cu",
        "--ph",
        "8",
        "--temperature",
        "15",
        "--out",
        str(fig),
        "--out",
        str(js),
    )
    assert code == 0, err
    assert "driven anodic: Zn" in out and "only the driving force" in out
    assert fig.stat().st_size > 10000
    d = json.loads(js.read_text())
    assert d["anode"] == "Zn" and d["driving_force_v"] > 0.9


def test_couple_mixed_potential_with_evans(tmp_path, capsys):
    ev, rep = tmp_path / "ev.svg", tmp_path / "couple.html"
    code, out, err = run(
        capsys,
        "couple",
        "Zn",
        "Cu",
        "--ph",
        "8",
        "--kinetics",
        "Zn:anodic=0.03,cathodic=0.12,icorr=0.02,ecorr=-0.80",
        "--kinetics",
        "Cu:anodic=0.06,cathodic=0.30,icorr=0.005,ecorr=-0.05",
        "--area-ratio",
        "10",
        "--evans",
        str(ev),
        "--report",
        str(rep),
        "--json",
    )
    assert code == 0, err
    d = json.loads(out)
    assert -0.80 < d["mixed_potential_v"] < -0.05
    assert d["galvanic_current_a"] > 0
    assert ev.read_text().startswith("<?xml")
    html = rep.read_text()
    assert html.count("<svg") >= 2 and "Butler" in html and "licensed practice" in html
