"""Tests of pourbaix.report.document: HTML and Markdown reports, escaping, atomic writing, a real browser."""

from __future__ import annotations

import argparse
import html
import os
import re
import subprocess
import xml.etree.ElementTree as ET
from html.parser import HTMLParser

import numpy as np
import pytest
from browser import browser_or_skip

from pourbaix import outputs as export
from pourbaix.cli.files import add_report_option, write_report_from_args
from pourbaix.errors import ExportError, OptionError
from pourbaix.maps.domain_map import CAUTION, compute_map
from pourbaix.maps.lines import boundary_equations
from pourbaix.report.document import (
    REPORT_CAUTIONS,
    render_report,
    table_html,
    table_markdown,
    write_report,
)

# The cautions every report must carry (README, "Safety and limits"): one phrase per point.
CAUTION_PHRASES = (
    "thermodynamic",
    "rates",
    "film quality",
    "pitting",
    "crevices",
    "microbiolog",
    "drinking",
    "cathodic-protection",
    "cyanide",
    "acids",
    "H2S",
    "local codes",
    "applicable standards",
    "licensed practice",
)

SECTION_IDS = (
    "domains",
    "conditions",
    "boundaries",
    "water",
    "species",
    "warnings",
    "method",
    "sources",
    "cautions",
)


class _Tags(HTMLParser):
    """Collect start tags, attributes and the text inside <svg> and inside <section id=species>."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.tags = []
        self.svg_depth = 0
        self.svg_texts = []
        self._text_depth = 0
        self._buf = []
        self.ids = set()

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))
        a = dict(attrs)
        if "id" in a:
            self.ids.add(a["id"])
        if tag == "svg":
            self.svg_depth += 1
        if self.svg_depth and tag == "text":
            self._text_depth += 1
            self._buf = []

    def handle_endtag(self, tag):
        if tag == "svg":
            self.svg_depth -= 1
        if self.svg_depth and tag == "text" and self._text_depth:
            self._text_depth -= 1
            self.svg_texts.append("".join("".join(self._buf).split()))

    def handle_data(self, data):
        if self._text_depth:
            self._buf.append(data)


def _parse(text):
    p = _Tags()
    p.feed(text)
    p.close()
    return p


@pytest.fixture(scope="module")
def fe60():
    # an ionic strength with dissolved iron set by activity gives a warning (the coefficients do
    # not apply to an activity), which the report must carry
    return compute_map("Fe", temperature_c=60.0, reference="SCE", ionic_strength=0.1)


@pytest.fixture(scope="module")
def fe60_html(fe60, tmp_path_factory):
    path = tmp_path_factory.mktemp("report") / "fe60.html"
    write_report(path, fe60)
    return path.read_text(encoding="utf-8")


# ---------------------------------------------------------------------- HTML
def test_html_is_self_contained_and_has_every_section(fe60_html):
    text = fe60_html
    assert text.startswith("<!DOCTYPE html>")
    tags = _parse(text)
    names = [t for t, _ in tags.tags]
    for sid in SECTION_IDS:
        assert sid in tags.ids, f"section {sid} missing"
    assert "svg" in names and "table" in names
    # no external resources: no scripts, links, images, iframes, remote URLs or imports
    for bad in ("script", "link", "img", "iframe", "object", "embed"):
        assert bad not in names, bad
    assert not re.search(r"(src|href)\s*=\s*\"(https?:|//)", text)
    assert "@import" not in text and "url(http" not in text
    # every figure is inline SVG, referenced ids all resolve inside the page
    for ref in re.findall(r"url\(#([^)]+)\)", text):
        assert ref in tags.ids, ref


def test_html_has_conditions_boundaries_species_sources_warnings(fe60, fe60_html):
    text = fe60_html
    c = fe60.conditions
    assert "60 °C" in text
    assert f"{c.reference_offset_v:.4f} V" in text  # the SCE offset at 60 °C as used
    assert "SCE" in text and "default" in text
    for row in boundary_equations(fe60):
        if row.get("reaction"):
            assert html.escape(row["reaction"]) in text
        assert html.escape(row["line"]) in text
    for se in fe60.species:
        assert html.escape(se.species.source) in text
        assert f"{se.species.dgf_kj_mol:.2f}" in text
        assert f"{se.dg_kj_mol:.2f}" in text
        assert html.escape(se.route) in text
        if se.species.note:
            assert html.escape(se.species.note) in text
    for citation in fe60.sources.values():
        assert html.escape(citation) in text
    assert fe60.warnings, "the fixture is meant to carry warnings"
    for w in fe60.warnings:
        assert html.escape(w) in text


def test_html_carries_every_caution(fe60_html):
    text = html.unescape(fe60_html)
    assert CAUTION in text
    for c in REPORT_CAUTIONS:
        assert c in text
    cautions = text[text.index('id="cautions"') : text.index("</aside>")]
    for phrase in CAUTION_PHRASES:
        assert phrase in cautions, phrase


def test_html_values_against_published_ones():
    # Water's oxygen line at 25 °C, 1 bar: E = 1.229 - 0.0592 pH V vs SHE (Bard & Faulkner 2001,
    # and every electrochemistry text); the table gives 3 decimals for E0 and 4 for the slope.
    # Cu2+/Cu: E0 = +0.340 V vs SHE (Bard, Parsons & Jordan 1985); our NBS82 data are quoted to
    # 0.01 kJ/mol, so 5 mV is ample.
    text = html.unescape(render_report(compute_map("Cu"), figure=False))
    m = re.search(
        r"O₂ \+ 4 H⁺ \+ 4 e⁻ = 2 H₂O \(1 bar O₂\)</td><td[^>]*>E = ([+-]\d\.\d+) - (\d\.\d+) pH",
        text,
    )
    assert m, "oxygen line row missing"
    assert float(m.group(1)) == pytest.approx(1.229, abs=0.0005)
    assert float(m.group(2)) == pytest.approx(0.0592, abs=0.00005)
    e0 = [
        float(v)
        for v in re.findall(r"Cu\^2\+ \+ 2 e- = Cu</td><td[^>]*>E0 = ([+-]\d\.\d+) V", text)
    ]
    assert e0 and e0[0] == pytest.approx(0.340, abs=0.005)
    # Nernst factor RT ln10 / F at 298.15 K = 0.05916 V (CODATA constants; Bard & Faulkner 2001)
    assert "0.05916 V" in text


def test_html_for_a_ligand_map_lists_assemblages_and_the_approximation():
    m = compute_map("Pb", ligands={"C": 1e-3})
    text = html.unescape(render_report(m, figure=False))
    assert "Pb–C–H₂O" in text
    assert "C: 10⁻³" in text  # the ligand's total activity
    assert "no mass balance" in text  # the predominant-ligand approximation, from the map's method
    assert "assemblage boundary" in text
    assert "HCO₃⁻" in text


# ---------------------------------------------------------------------- Markdown
def test_markdown_with_sibling_svg(fe60, tmp_path):
    path = tmp_path / "loop report.md"
    out = write_report(path, fe60)
    assert out == path
    text = path.read_text(encoding="utf-8")
    figure = tmp_path / "loop report-figure-1.svg"
    assert figure.is_file()
    assert "](loop report-figure-1.svg)" in text  # relative link
    root = ET.parse(figure).getroot()
    assert root.tag.endswith("svg")
    for heading in (
        "Stable domains",
        "Conditions",
        "Boundaries",
        "Water stability lines",
        "Species and values used",
        "Warnings",
        "Method",
        "Sources",
    ):
        assert f"\n## {heading}\n" in text, heading
    assert "> **Cautions**" in text
    plain = text.replace("\\", "")
    for phrase in CAUTION_PHRASES:
        assert phrase in plain, phrase
    for citation in fe60.sources.values():
        assert citation.replace("\\", "") in plain or citation in plain
    # nothing but the report and its figure (no temporary files left)
    assert sorted(p.name for p in tmp_path.iterdir()) == [
        "loop report-figure-1.svg",
        "loop report.md",
    ]
    # every table row has as many cells as its header
    for block in re.findall(r"((?:^\|.*\|\n)+)", text, flags=re.M):
        counts = {len(re.findall(r"(?<!\\)\|", line)) for line in block.strip().splitlines()}
        assert len(counts) == 1, block


# ---------------------------------------------------------------------- escaping
@pytest.fixture
def hostile_data(tmp_path):
    path = tmp_path / "hostile.csv"
    path.write_text(
        "formula,phase,dgf_kj_mol,source,note\n"
        "Fe^2+,aq,-78.90,lab <b>book</b>,\"<script>alert('x')</script> | *bold* _u_ [link](http://example.invalid) & more\"\n",
        encoding="utf-8",
    )
    return path


def test_escaping_html(hostile_data, tmp_path):
    m = compute_map("Fe", data_files=[hostile_data])
    out = tmp_path / "x.html"
    write_report(
        out,
        m,
        title='Loop <b>"7"</b> & co',
        extra_sections=[
            ("Notes <i>", "A paragraph with <script>bad()</script>.\n\nSecond & last."),
            ("Rows", [{"k<": "<td>", "v": 1.5}]),
        ],
        figure=False,
    )
    text = out.read_text(encoding="utf-8")
    names = [t for t, _ in _parse(text).tags]
    assert "script" not in names and "i" not in names
    # none of the hostile markup survives as markup (the page's own cells are <td class=...>)
    for raw in ("<script>", "<b>book</b>", '<b>"7"</b>', "<td>", "<i>"):
        assert raw not in text, raw
    assert "&lt;script&gt;alert(&#x27;x&#x27;)&lt;/script&gt;" in text
    assert "Loop &lt;b&gt;&quot;7&quot;&lt;/b&gt; &amp; co" in text
    assert "lab &lt;b&gt;book&lt;/b&gt;" in text
    assert "Notes &lt;i&gt;" in text and "&lt;script&gt;bad()&lt;/script&gt;" in text
    assert "&lt;td&gt;" in text and "k&lt;" in text
    assert str(hostile_data) in html.unescape(text)  # the user file is named in the conditions


def test_escaping_markdown(hostile_data, tmp_path):
    m = compute_map("Fe", data_files=[hostile_data])
    out = tmp_path / "x.md"
    write_report(
        out,
        m,
        title="Loop *7* <b>",
        extra_sections=[("Rows", [{"a|b": "c|d", "e": "<x>"}])],
        figure=False,
    )
    text = out.read_text(encoding="utf-8")
    assert "<script>" not in text and "<b>" not in text and "<x>" not in text
    assert r"\<script\>" in text
    assert r"\[link\]" in text and r"\*bold\*" in text and r"\_u\_" in text
    assert "# Loop \\*7\\* \\<b\\>" in text
    assert "| a\\|b | e |" in text and "| c\\|d | \\<x\\> |" in text
    assert not list(tmp_path.glob("*.svg"))  # figure=False: no figure file


def test_table_helpers():
    rows = [
        {"pH": 7, "E": -0.4567, "name": "Fe^2+", "none": None, "ok": True},
        {"pH": 8.5, "E": float("inf"), "name": "a|b"},
    ]
    h = table_html(rows, columns=["pH", ("E", "E [V]", "+.3f"), "name", "none", "ok"])
    assert '<th class="col-E num">E [V]</th>' in h
    assert "-0.457" in h and "∞" in h and "—" in h and "yes" in h
    md = table_markdown(rows, columns=[("E", "E", ".2f"), "name"])
    assert md.splitlines()[1] == "|---:|---|"
    assert "| -0.46 | Fe^2+ |" in md and "| ∞ | a\\|b |" in md
    assert table_html([]).startswith("<table>")
    with pytest.raises(OptionError, match="column is a key"):
        table_html(rows, columns=[("E",)])


# ---------------------------------------------------------------------- bad input, atomic writing
@pytest.mark.parametrize("name", ["fe.pdf", "fe.txt", "fe", "fe.html.bak"])
def test_unknown_extension(fe60, tmp_path, name):
    with pytest.raises(OptionError, match=r"\.html, \.htm, \.md"):
        write_report(tmp_path / name, fe60)
    assert not list(tmp_path.iterdir())


def test_bad_sections_and_analyses(fe60, tmp_path):
    with pytest.raises(OptionError, match="report section 'X'"):
        write_report(tmp_path / "a.html", fe60, extra_sections=[("X", 42)], figure=False)
    with pytest.raises(OptionError, match="give a Section or a"):
        write_report(tmp_path / "a.html", fe60, extra_sections=["just text"], figure=False)
    with pytest.raises(OptionError, match="cannot show a dict"):
        write_report(tmp_path / "a.html", fe60, analyses=[{"a": 1}], figure=False)
    with pytest.raises(OptionError, match="DomainMap"):
        write_report(tmp_path / "a.html", "Fe")
    with pytest.raises(OptionError, match="matplotlib Figure or Axes"):
        write_report(tmp_path / "a.html", fe60, figure="fig.png")
    assert not list(tmp_path.iterdir())


@pytest.mark.parametrize("name", ["r.html", "r.md"])
def test_missing_folder_raises_and_leaves_nothing(fe60, tmp_path, name):
    with pytest.raises(ExportError, match="does not exist"):
        write_report(tmp_path / "nowhere" / name, fe60)
    blocker = tmp_path / "a-file"
    blocker.write_text("x")
    with pytest.raises(ExportError, match="does not exist"):
        write_report(blocker / name, fe60)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a-file"]


@pytest.mark.skipif(
    hasattr(os, "geteuid") and os.geteuid() == 0, reason="root may write into read-only folders"
)
@pytest.mark.parametrize("name", ["r.html", "r.md"])
def test_read_only_folder_raises_and_leaves_nothing(fe60, tmp_path, name):
    folder = tmp_path / "ro"
    folder.mkdir()
    folder.chmod(0o500)
    try:
        with pytest.raises(ExportError, match="not writable"):
            write_report(folder / name, fe60)
        assert not list(folder.iterdir())
    finally:
        folder.chmod(0o700)


@pytest.mark.parametrize("name", ["r.html", "r.md"])
def test_failure_while_writing_leaves_nothing(fe60, tmp_path, monkeypatch, name):
    """A failure at the last step (moving the report into place) leaves no report, figure or temp file."""
    real_replace = os.replace

    def failing_replace(src, dst):
        if str(dst).endswith((".html", ".md")):
            raise OSError(28, "No space left on device")
        return real_replace(src, dst)

    monkeypatch.setattr(export.os, "replace", failing_replace)
    with pytest.raises(ExportError, match="No space left"):
        write_report(tmp_path / name, fe60)
    assert not list(tmp_path.iterdir())


# ---------------------------------------------------------------------- analyses in a report
def test_analyses_sections(tmp_path):
    from pourbaix.analyses.compare import compare_maps
    from pourbaix.analyses.field import field_readings
    from pourbaix.analyses.reading import corrosion_reading
    from pourbaix.analyses.solubility import solubility_curve
    from pourbaix.analyses.windows import leach_window

    csv = tmp_path / "loop.csv"
    # invented readings for this test
    csv.write_text(
        "ph,potential_v,reference,label\n8.2,-0.65,SCE,north <tap>\n8.0,-0.30,SCE,south\nseven,-0.2,SCE,bad row\n",
        encoding="utf-8",
    )
    m, data = field_readings("Fe", csv, reference="SCE")
    reading = corrosion_reading(m, 8.0, -0.90, "Cu/CuSO4")
    sol = solubility_curve(m, np.arange(6.0, 12.1, 2.0), potential_v=-0.5)
    cmp = compare_maps(
        compute_map("Fe", reference="SCE"), compute_map("Fe", reference="SCE", dataset="bpj85")
    )
    window = leach_window("Cu", ["Fe"], 1e-2, 1e-5)
    out = tmp_path / "all.html"
    write_report(out, m, analyses=[data, reading, sol, window, cmp])
    text = out.read_text(encoding="utf-8")
    plain = html.unescape(text)
    tags = _parse(text)
    assert [t for t, _ in tags.tags].count(
        "svg"
    ) == 5  # map, readings, solubility curve, window, comparison
    for heading in (
        "Field readings",
        "Corrosion reading: Fe",
        "Solubility of Fe",
        "Leach window: dissolve Cu, keep Fe solid",
        "Comparison of two maps",
    ):
        assert f">{heading}</h2>" in plain, heading
    assert "north &lt;tap&gt;" in text  # label escaped
    assert "line 4" in plain and "column ph" in plain  # the bad row is listed with its line
    assert "Cathodic-protection criterion (common practice)" in plain
    assert CAUTION not in plain.replace(
        plain[plain.index('id="cautions"') : plain.index("</aside>")], ""
    )  # only once, at the top
    assert "data set bpj85" in plain
    # the window's maps' sources (Cu data) are cited too
    for key in window.maps["Cu"].sources:
        assert f">{key}</td>" in plain


# ---------------------------------------------------------------------- command-line hook
def test_cli_hook(fe60, tmp_path, capsys):
    p = argparse.ArgumentParser(prog="x")
    add_report_option(p)
    p.add_argument("--second-axis")
    with pytest.raises(SystemExit):
        p.parse_args(["--report", "out.pdf"])
    assert "the extension must be one of" in capsys.readouterr().err
    assert write_report_from_args(p.parse_args([]), fe60) is None
    target = tmp_path / "r.html"
    a = p.parse_args(["--report", str(target), "--second-axis", "SHE"])
    assert write_report_from_args(a, fe60) == target
    assert "wrote" in capsys.readouterr().out
    assert "vs SHE" in target.read_text(encoding="utf-8")
    # the command's own figure is used when given (and not closed: it belongs to the caller)
    import matplotlib.pyplot as plt

    from pourbaix.plot.draw import draw_map

    ax = draw_map(fe60, title="Figure given by the command")
    write_report_from_args(a, fe60, figure=ax)
    text = target.read_text(encoding="utf-8")
    assert [t for t, _ in _parse(text).tags].count("svg") == 1
    assert "".join("Figure given by the command".split()) in _parse(text).svg_texts
    assert plt.fignum_exists(ax.figure.number)
    plt.close(ax.figure)


# ---------------------------------------------------------------------- a real browser
def _run_browser(exe, profile, *args):
    cmd = [
        exe,
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        f"--user-data-dir={profile}",
        *args,
    ]
    return subprocess.run(cmd, capture_output=True, text=True, timeout=180, check=False)


def test_report_in_headless_chromium(tmp_path):
    exe = browser_or_skip()
    m = compute_map("Cu")
    page = tmp_path / "cu report.html"
    write_report(page, m, title="Copper in a potable water")
    url = page.resolve().as_uri()

    dom = _run_browser(exe, tmp_path / "profile-dom", "--dump-dom", url)
    assert dom.returncode == 0, dom.stderr[-2000:]
    tree = _parse(dom.stdout)
    assert "svg" in [t for t, _ in tree.tags], "no <svg> element in the rendered page"

    # Each label is real SVG text, typeset with Unicode sub- and superscripts (Cu₂O, Cu²⁺);
    # compare the glyphs of each <text>, read as plain digits and signs, as a multiset.
    plain = str.maketrans("₀₁₂₃₄₅₆₇₈₉⁰¹²³⁴⁵⁶⁷⁸⁹⁺⁻−", "01234567890123456789+--")

    def glyphs(s):
        return "".join(sorted(s.translate(plain)))

    labels = {glyphs(t) for t in tree.svg_texts}
    # The classical copper map at 1e-6: Cu, Cu2O, CuO and Cu2+ domains (Pourbaix 1974, copper; from memory).
    for label in ("Cu", "Cu2O", "CuO", "Cu2+"):
        assert glyphs(label) in labels, f"domain label {label} not drawn as text in the SVG"
    for d in m.domains:
        assert glyphs(d.species[0].replace("^", "")) in labels, d.species
    species = dom.stdout[dom.stdout.index('id="species"') :]
    species = species[: species.index("</section>")]
    assert "<table" in species and "Cu₂O" in species and "NBS82" in species

    shot = tmp_path / "shot.png"
    res = _run_browser(
        exe, tmp_path / "profile-shot", f"--screenshot={shot}", "--window-size=1200,2400", url
    )
    assert res.returncode == 0 and shot.is_file(), res.stderr[-2000:]
    from PIL import Image

    rgb = np.asarray(Image.open(shot).convert("RGB")).astype(int)
    assert rgb.shape[:2] == (2400, 1200)
    assert rgb.std() > 20, "screenshot is blank or uniform"
    # the figure's fills (pourbaix.plot.draw.PALETTES) must be on screen: passivation and immunity tints
    from pourbaix.plot.draw import PALETTES

    def count(hex_colour, tol=3):
        target = np.array([int(hex_colour[i : i + 2], 16) for i in (1, 3, 5)])
        return int((np.abs(rgb - target).max(axis=2) <= tol).sum())

    pal = PALETTES["default"]
    assert max(count(c) for c in pal["passivation"]) > 2000, "no passivation fill on screen"
    assert max(count(c) for c in pal["immunity"]) > 2000, "no immunity fill on screen"
    assert max(count(c) for c in pal["corrosion"]) > 2000, "no corrosion fill on screen"
    # and the cautions box (its own amber rule) near the top of the page
    assert count("#c98a12", tol=6) > 100


def test_report_warns_when_no_solid_compound_shows(tmp_path):
    # zinc at 1e-7: ZnO + H2O = Zn(OH)2(aq) has log K = 11.12 - 17.82 (IUPAC review, Powell et al.
    # 2013, from memory), so ZnO needs about 2e-7 to show; the report says so among its warnings
    zn = tmp_path / "zn.md"
    write_report(zn, compute_map("Zn", activity=1e-7))
    text = zn.read_text(encoding="utf-8")
    assert "no solid compound of Zn is stable on this map" in text and "ZnO" in text
    fe = tmp_path / "fe.md"
    write_report(fe, compute_map("Fe", activity=1e-6))
    assert "no solid compound" not in fe.read_text(encoding="utf-8")
