"""--report on the analysis commands: the report carries the analysis, the map's tables and the cautions.

Each command is run once through ``pourbaix.cli.commands.main`` and its HTML (or Markdown) report read back
as text; bad report paths exit 2 before anything is computed or written.
"""

import html
import json
import math
import re

import pytest
from cli_run import run

K25 = 8.314462618 * 298.15 * math.log(10) / 96485.33212  # R T ln10 / F at 25 °C (CODATA 2018)

# Phrases of the cautions every report carries (common practice for this project's reports; README, "Safety and limits")
CAUTIONS = ("thermodynamic prediction", "local codes", "applicable standards", "licensed practice")


def text_of(fragment):
    """Visible text of an HTML fragment (figures dropped, tags removed, entities decoded)."""
    fragment = re.sub(r"<svg.*?</svg>", " ", fragment, flags=re.S)
    fragment = re.sub(r"<style.*?</style>", " ", fragment, flags=re.S)
    fragment = re.sub(r"<(tr|p|li|h[1-6]|div|section|aside|figcaption)\b[^>]*>", "\n", fragment)
    fragment = re.sub(r"<[^>]+>", " ", fragment)
    return re.sub(r"[ \t]+", " ", html.unescape(fragment))


def section(page, anchor):
    """Text of ``<section id=anchor>`` of an HTML report."""
    m = re.search(rf'<section id="{anchor}">(.*?)</section>', page, flags=re.S)
    assert m, f"no section {anchor}"
    return text_of(m.group(1))


def table_rows(page, anchor):
    """Rows of the section's table, each as a list of cell texts."""
    m = re.search(rf'<section id="{anchor}">(.*?)</section>', page, flags=re.S)
    assert m, f"no section {anchor}"
    rows = []
    for tr in re.findall(r"<tr\b[^>]*>(.*?)</tr>", m.group(1), flags=re.S):
        cells = re.findall(r"<t[dh]\b[^>]*>(.*?)</t[dh]>", tr, flags=re.S)
        rows.append([" ".join(text_of(c).split()) for c in cells])
    return rows


def check_general_parts(page):
    """Species table with source keys, the sources' citations, and the cautions."""
    species = section(page, "species")
    assert "Species and values used" in species and "Source" in species
    # NBS82 is the key of the NBS tables (Wagman et al. 1982), cited in the Sources section
    assert "NBS82" in species
    assert "Wagman" in section(page, "sources")
    cautions = text_of(re.search(r'<aside class="cautions".*?</aside>', page, flags=re.S).group(0))
    for phrase in CAUTIONS:
        assert phrase in cautions, phrase


# ------------------------------------------------------------------ the five commands
def test_solubility_report_has_the_table_the_minimum_and_the_lines(tmp_path, capsys):
    report = tmp_path / "zn.html"
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
        "--levels",
        "1e-2",
        "1e-6",
        "--report",
        report,
    )
    assert code == 0, err
    assert f"wrote {report}" in out
    page = report.read_text(encoding="utf-8")
    sol = section(page, "analysis-1")
    assert "Solubility of Zn" in sol and "Total dissolved" in sol
    rows = table_rows(page, "analysis-1")
    assert [r[0] for r in rows[1:]] == [
        "6.00",
        "7.00",
        "8.00",
        "9.00",
        "10.00",
        "11.00",
        "12.00",
        "13.00",
    ]
    # ZnO + 2 H+ = Zn2+ + H2O, log *Ks0 = 11.15 (11.14-11.16 measured, Baes & Mesmer 1976; from memory):
    # at pH 6, where Zn2+ carries the zinc, log10 S = 11.15 - 2 * 6 = -0.85
    assert float(rows[1][3]) == pytest.approx(-0.85, abs=0.05)
    extra = section(page, "analysis-2")
    # common practice: zinc is least soluble near pH 9-10
    assert re.search(
        r"Lowest total dissolved Zn between pH 6 and 13, .*: pH (9\.\d\d|10\.0\d)", extra
    )
    assert "Iso-solubility lines on the map (total dissolved): 0.01, 1e-06 mol/kg" in extra
    # the main figure is the map with those lines drawn on it
    main_figure = re.search(r'<figure id="figure-1">(.*?)</figure>', page, flags=re.S).group(1)
    assert "pourbaix-solubility" in main_figure
    check_general_parts(page)


def test_window_report_has_bounds_area_and_room(tmp_path, capsys):
    report = tmp_path / "w.html"
    code, out, err = run(capsys, "window", "Cu", "--keep-solid", "Fe", "--report", report)
    assert code == 0, err
    assert f"wrote {report}" in out
    page = report.read_text(encoding="utf-8")
    win = section(page, "analysis-1")
    assert "Leach window: dissolve Cu, keep Fe solid" in win
    for words in (
        "area",
        "pH bounds",
        "Potential bounds",
        "Point with most room",
        "Room there",
        "Dissolved there",
    ):
        assert words in win, words
    rows = {r[0]: r[1] for r in table_rows(page, "analysis-1")[1:]}
    # Cu2+ + 2 e- = Cu, E0 = +0.3419 V (CRC electrochemical series): in acid, where Cu2+ carries the copper,
    # Cu is dissolved at 1e-2 mol/kg only above E0 + (k/2) log10(1e-2) = 0.283 V (Nernst)
    m = re.search(r"pH ([\d.]+), ([+-]\d\.\d{3}) V vs SHE", rows["Point with most room"])
    best_ph, best_e = float(m.group(1)), float(m.group(2))
    assert best_ph < 7 and best_e > 0.3419 + K25 / 2 * -2
    assert "Thermodynamic window only" in win  # the leach caution
    check_general_parts(page)


def test_field_report_in_markdown_lists_the_readings(tmp_path, capsys):
    readings = tmp_path / "loop.csv"
    # invented demo readings of a cooling loop
    readings.write_text(
        "ph,potential_v,reference,label\n"
        "7.2,-0.650,SCE,return header (demo)\n"
        "8.1,-0.950,SCE,buried flange (demo)\n",
        encoding="utf-8",
    )
    report = tmp_path / "loop.md"
    code, out, err = run(capsys, "field", "Fe", "--readings", readings, "--report", report)
    assert code == 0, err
    assert f"wrote {report}" in out
    md = report.read_text(encoding="utf-8")
    assert "## Field readings" in md
    assert "return header (demo)" in md and "buried flange (demo)" in md
    # SCE = +0.2412 V vs SHE (Ives & Janz 1961): -0.650 vs SCE is -0.409 V vs SHE, -0.950 is -0.709
    assert "| -0.409 |" in md and "| -0.709 |" in md
    assert "## Species and values used" in md and "NBS82" in md and "Wagman" in md
    for phrase in CAUTIONS:
        assert phrase in md, phrase
    figures = re.findall(r"\]\((loop-figure-\d+\.svg)\)", md)
    assert len(figures) == 2  # the map and the map with the readings
    for name in figures:
        assert (tmp_path / name).read_text(encoding="utf-8").lstrip().startswith("<?xml")


@pytest.mark.parametrize("as_json", [False, True])
def test_reading_report_for_steel(tmp_path, capsys, as_json):
    report = tmp_path / "r.html"
    args = [
        "reading",
        "Fe",
        "--dataset",
        "bpj85",
        "--ph",
        "7",
        "--potential",
        "-0.9",
        "--report",
        report,
    ]
    code, out, err = run(capsys, *args, *(["--json"] if as_json else []))
    assert code == 0, err
    if as_json:  # stdout stays one JSON document; the note on the report goes to stderr
        assert json.loads(out)["reading"] == "immune"
        assert f"wrote {report}" in err
    else:
        assert f"wrote {report}" in out
    page = report.read_text(encoding="utf-8")
    rd = section(page, "analysis-1")
    assert "Corrosion reading: Fe" in rd
    assert "immune (immunity); stable: Fe" in rd
    # Fe2+ + 2 e- = Fe, E0 = -0.447 V (CRC electrochemical series; Bard, Parsons & Jordan 1985, the bpj85 set);
    # at a(Fe2+) = 1e-6 the top of immunity at pH 7 is E0 + (k/2) log10(1e-6) (Nernst). Tolerance: the set's
    # 1.5 mV against the series value (as in test_map) plus the report's rounding to 1 mV.
    top = float(re.search(r"up to ([+-]\d\.\d{3}) V vs SHE", rd).group(1))
    assert top == pytest.approx(-0.447 + K25 / 2 * math.log10(1e-6), abs=0.002)
    # common practice: criterion -0.85 V vs Cu/CuSO4, which sits at +0.316 V vs SHE:
    # -0.900 V vs SHE = -1.216 V vs Cu/CuSO4, 366 mV more negative than the criterion
    assert "-1.216 V vs Cu/CuSO4 is 366 mV more negative than -0.85 V" in rd
    assert "qualified corrosion engineer" in rd  # the cathodic-protection caution
    check_general_parts(page)


def test_compare_report_has_the_boundary_shift_table(tmp_path, capsys):
    report = tmp_path / "cmp.html"
    code, out, err = run(
        capsys, "compare", "Cu", "--against-activity", "1e-4", "--at-ph", "2", "--report", report
    )
    assert code == 0, err
    assert f"wrote {report}" in out
    page = report.read_text(encoding="utf-8")
    cmp = section(page, "analysis-1")
    assert "Comparison of two maps" in cmp
    assert "A = activity 1e-06; B = activity 0.0001" in cmp
    rows = {r[0]: r for r in table_rows(page, "analysis-1")[1:]}
    assert rows["Cu | Cu²⁺"][2] == "pH 2.00"
    # Cu2+ + 2 e- = Cu: a hundredfold activity moves the line by (k/2) log10(100) = 59.16 mV (Nernst)
    moved = float(rows["Cu | Cu²⁺"][5].removesuffix(" mV"))
    assert moved == pytest.approx(1000 * K25 / 2 * 2, abs=0.05)
    # Cu2O / CuO exchange no dissolved species: that line does not move
    assert rows["Cu₂O | CuO"][5] == "+0.0 mV"
    assert page.count('<figure id="figure-') == 2  # the map and the overlay
    check_general_parts(page)


def test_compare_report_across_temperature_vs_a_moving_electrode(tmp_path, capsys):
    # the SCE drifts with temperature: no overlay can be drawn, but the table and map B's notes are reported
    # (cerium: its oxides and ions keep their 25 °C values, which map B warns about)
    report = tmp_path / "cmp.html"
    code, out, err = run(
        capsys,
        "compare",
        "Ce",
        "--reference",
        "SCE",
        "--against-temperature",
        "60",
        "--report",
        report,
    )
    assert code == 0, err
    page = report.read_text(encoding="utf-8")
    cmp = section(page, "analysis-1")
    assert "no overlay figure: the SCE electrode itself moves between 25 and 60 °C" in cmp
    assert "map B: at 60 °C" in cmp  # map B's warning, printed on stderr, is in the report too
    assert "at 60 °C" in err
    assert page.count('<figure id="figure-') == 1


# ------------------------------------------------------------------ bad report paths
COMMANDS = {
    "solubility": ("solubility", "Zn", "--potential", "0"),
    "window": ("window", "Cu", "--keep-solid", "Fe"),
    "field": ("field", "Fe", "--readings", "READINGS"),
    "reading": ("reading", "Fe", "--ph", "7", "--potential", "-0.9"),
    "compare": ("compare", "Cu", "--against-activity", "1e-4"),
}


def _command(name, tmp_path):
    readings = tmp_path / "r.csv"
    readings.write_text("ph,potential_v,reference\n7,-0.5,SHE\n", encoding="utf-8")
    return [str(readings) if a == "READINGS" else a for a in COMMANDS[name]]


@pytest.mark.parametrize("name", sorted(COMMANDS))
def test_report_in_a_missing_folder_fails_before_anything_is_written(tmp_path, capsys, name):
    args = _command(name, tmp_path)
    before = set(tmp_path.iterdir())
    target = tmp_path / "no_such_folder" / "x.html"
    extra = [] if name == "reading" else ["--out", tmp_path / "early.json"]
    code, out, err = run(capsys, *args, *extra, "--report", target)
    assert code == 2
    lines = [ln for ln in err.splitlines() if ln.startswith("pourbaix: error:")]
    assert len(lines) == 1 and "--report" in lines[0] and "does not exist" in lines[0]
    assert out == ""  # nothing computed or printed before the check
    assert set(tmp_path.iterdir()) == before and not target.parent.exists()


@pytest.mark.parametrize("name", ["reading", "window"])
def test_report_with_a_wrong_extension_is_a_usage_error(tmp_path, capsys, name):
    target = tmp_path / "out.txt"
    code, out, err = run(capsys, *_command(name, tmp_path), "--report", target)
    assert code == 2 and out == ""
    assert "--report" in err and "the extension must be one of" in err
    assert not target.exists()


def test_report_onto_a_folder_fails_cleanly(tmp_path, capsys):
    folder = tmp_path / "taken.html"
    folder.mkdir()
    code, out, err = run(capsys, *_command("reading", tmp_path), "--report", folder)
    assert code == 2 and out == ""
    assert "--report" in err and "it is a folder" in err
    assert list(folder.iterdir()) == []
