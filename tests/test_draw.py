"""Tests of pourbaix.plot.draw: files, label placement, water lines, axes, overlays and field points."""

import itertools
import math
import os
import subprocess
import sys
from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pytest  # noqa: E402
import shapely  # noqa: E402

import pourbaix  # noqa: E402
from pourbaix.errors import ConditionsError, ExportError, OptionError  # noqa: E402
from pourbaix.maps.domain_map import Conditions, Entry, build_map  # noqa: E402
from pourbaix.plot import draw  # noqa: E402

REPO = Path(__file__).resolve().parents[1]

# Nernst factor at 25 °C, R T ln10 / F with CODATA 2018 constants (exact to the digits shown)
K25 = 8.314462618 * 298.15 * math.log(10) / 96485.33212


@pytest.fixture(autouse=True)
def _close_figures():
    yield
    plt.close("all")


@pytest.fixture(scope="module")
def maps():
    """The four metals the placement must cope with, at the corrosion activity 1e-6 (common practice)."""
    return {el: pourbaix.compute_map(el, activity=1e-6) for el in ("Fe", "Cu", "Zn", "Mn")}


def crowded_map(seed=5):
    """A synthetic map with many tiny domains (a cluster of 12 cells among 14 large ones).

    The planes are tangent planes of the concave paraboloid -(a pH^2 + b E^2);
    the lower envelope of tangent planes makes each plane lowest in the Voronoi
    cell of its tangent point (in pH scaled by 1/4.5), so clustered tangent
    points give tiny domains.
    """
    rng = np.random.default_rng(seed)
    spread = np.column_stack([rng.uniform(-1.5, 15.5, 14), rng.uniform(-1.8, 1.8, 14)])
    cluster = np.column_stack([rng.normal(5.0, 0.5, 12), rng.normal(0.3, 0.12, 12)])
    a, b = 1 / 4.5**2, 1.0
    entries = []
    for k, (p, e) in enumerate(np.vstack([spread, cluster])):
        plane = (a * p * p + b * e * e, -2 * a * p, -2 * b * e)
        state = ("corrosion", "passivation", "immunity")[k % 3]
        label = rf"$\mathrm{{Me_{{{k}}}(OH)_{{2}}^{{+}}}}$"
        entries.append(Entry(names=(f"S{k}",), plane=plane, state=state, label=label))
    water = {"oxygen": (1.229, -K25), "hydrogen": (0.0, -K25)}
    m = build_map(Conditions(elements=("Me",)), entries, [], water, [], {})
    m._neutral_ph = (
        7.0  # no temperature data for an invented element; pure water at 25 °C (common practice)
    )
    return m


def label_texts(ax, kind=None):
    prefix = "pourbaix-label" + (f":{kind}" if kind else "")
    return [t for t in ax.texts if str(t.get_gid()).startswith(prefix)]


def boxes_of(texts, renderer):
    # Text.get_window_extent is the text's own box (an Annotation would add its arrow)
    from matplotlib.text import Text

    return [Text.get_window_extent(t, renderer) for t in texts]


def assert_no_overlaps(ax):
    fig = ax.figure
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    texts = label_texts(ax)
    boxes = boxes_of(texts, renderer)
    frame = ax.bbox
    for t, b in zip(texts, boxes, strict=True):
        assert frame.x0 <= b.x0 and b.x1 <= frame.x1 and frame.y0 <= b.y0 and b.y1 <= frame.y1, (
            f"label {t.get_text()!r} crosses the axes frame"
        )
    for (t1, b1), (t2, b2) in itertools.combinations(zip(texts, boxes, strict=True), 2):
        overlap_w = min(b1.x1, b2.x1) - max(b1.x0, b2.x0)
        overlap_h = min(b1.y1, b2.y1) - max(b1.y0, b2.y0)
        assert overlap_w <= 0 or overlap_h <= 0, (
            f"labels {t1.get_text()!r} and {t2.get_text()!r} overlap"
        )
    return texts


def test_import_does_not_load_matplotlib():
    code = "import sys, pourbaix.plot.draw; print('matplotlib' in sys.modules)"
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, cwd=REPO, check=True
    )
    assert out.stdout.strip() == "False"


def test_backend_left_alone_when_user_chose_one():
    code = (
        "import matplotlib; matplotlib.use('svg'); import pourbaix, pourbaix.plot.draw as d; "
        "ax = d.draw_map(pourbaix.compute_map('Cu')); print(matplotlib.get_backend())"
    )
    env = {k: v for k, v in os.environ.items() if k != "MPLBACKEND"}
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, cwd=REPO, check=True, env=env
    )
    assert out.stdout.strip().lower() == "svg"


@pytest.mark.parametrize(("preset", "expected"), [(None, "['Agg']"), ("env", "[]"), ("use", "[]")])
def test_agg_only_when_no_backend_chosen(preset, expected):
    # record the backends pourbaix.plot.draw asks for (after any choice the user made)
    code = (
        ("import matplotlib; matplotlib.use('svg'); " if preset == "use" else "import matplotlib; ")
        + "calls = []; orig = matplotlib.use; "
        + "matplotlib.use = lambda b, **k: (calls.append(b), orig(b, **k)); "
        + "import pourbaix.plot.draw as d; d._pyplot(); print(calls)"
    )
    env = {k: v for k, v in os.environ.items() if k != "MPLBACKEND"}
    if preset == "env":
        env["MPLBACKEND"] = "svg"
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, cwd=REPO, check=True, env=env
    )
    assert out.stdout.strip() == expected


# ------------------------------------------------------------------ files
@pytest.mark.parametrize(
    ("ext", "magic"), [(".png", b"\x89PNG\r\n\x1a\n"), (".svg", b"<svg"), (".pdf", b"%PDF-")]
)
def test_save_each_format(tmp_path, maps, ext, magic):
    ax = draw.draw_map(maps["Cu"])
    out = tmp_path / f"cu{ext}"
    assert draw.save_figure(ax, out) == out
    data = out.read_bytes()
    assert len(data) > 1000
    assert magic in data[:400]  # PNG and PDF start with it; SVG after the XML prologue
    assert sorted(p.name for p in tmp_path.iterdir()) == [out.name]  # no temporary left behind


def test_save_accepts_figure_and_upper_case_extension(tmp_path, maps):
    ax = draw.draw_map(maps["Zn"])
    out = draw.save_figure(ax.figure, tmp_path / "zn.PNG", dpi=72)
    assert Path(out).read_bytes()[:4] == b"\x89PNG"


def test_save_unknown_extension_lists_valid_ones(tmp_path, maps):
    ax = draw.draw_map(maps["Cu"])
    with pytest.raises(OptionError, match=r"\.png, \.svg, \.pdf"):
        draw.save_figure(ax, tmp_path / "cu.jpg")
    assert list(tmp_path.iterdir()) == []


def test_save_into_missing_folder_leaves_nothing(tmp_path, maps):
    ax = draw.draw_map(maps["Cu"])
    with pytest.raises(ExportError, match="does not exist"):
        draw.save_figure(ax, tmp_path / "nowhere" / "cu.png")
    assert list(tmp_path.iterdir()) == []


def test_save_failing_midway_leaves_no_partial_file(tmp_path, maps, monkeypatch):
    ax = draw.draw_map(maps["Cu"])
    fig = ax.figure

    def broken_savefig(fname, **kw):
        Path(fname).write_bytes(b"\x89PNG partial")
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(fig, "savefig", broken_savefig)
    with pytest.raises(ExportError, match="No space left"):
        draw.save_figure(fig, tmp_path / "cu.png")
    assert list(tmp_path.iterdir()) == []


def test_save_rejects_non_figure(tmp_path):
    with pytest.raises(OptionError, match="Figure or Axes"):
        draw.save_figure("not a figure", tmp_path / "x.png")


# ---------------------------------------------------------------- labels
@pytest.mark.parametrize("element", ["Fe", "Cu", "Zn", "Mn"])
def test_labels_do_not_overlap_on_metal_maps(maps, element):
    ax = draw.draw_map(maps[element], second_reference="SCE")
    assert_no_overlaps(ax)
    assert len(label_texts(ax, "water")) == 2


@pytest.mark.parametrize("element", ["Fe", "Mn"])
def test_labels_do_not_overlap_with_reading_and_grey(maps, element):
    ax = draw.draw_map(maps[element], reading=True, palette="grey")
    assert_no_overlaps(ax)


def test_labels_do_not_overlap_on_many_tiny_domains():
    m = crowded_map()
    areas = sorted(d.area for d in m.domains)
    assert len(m.domains) >= 20 and areas[4] < 0.1  # the case is really crowded (window area 72)
    ax = draw.draw_map(m)
    assert_no_overlaps(ax)
    leaders = [ln for ln in ax.lines if str(ln.get_gid()).startswith("pourbaix-leader:")]
    numbers = label_texts(ax, "number")
    assert len(leaders) + len(numbers) >= 5  # the tiny ones went outside or got numbers


@pytest.mark.parametrize("make", [lambda maps: maps["Mn"], lambda maps: crowded_map()])
def test_every_domain_has_exactly_one_label(maps, make):
    m = make(maps)
    ax = draw.draw_map(m)
    marks = label_texts(ax, "domain") + label_texts(ax, "number")
    owners = sorted(int(t.get_gid().rsplit(":", 1)[1]) for t in marks)
    assert owners == list(range(len(m.domains)))  # one label or one number each
    keyed = {
        t.get_gid().rsplit(":", 1)[1]: t.get_text()
        for t in ax.texts
        if str(t.get_gid()).startswith("pourbaix-key:")
    }
    for t in marks:
        i = t.get_gid().rsplit(":", 1)[1]
        # a label shows the domain's text; a number's text is in the key
        text = t.get_text() if ":domain:" in t.get_gid() else keyed[i]
        assert text == m.domains[int(i)].label


def test_labels_sit_inside_their_domain_or_lead_to_it():
    m = crowded_map()
    ax = draw.draw_map(m)
    fig = ax.figure
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    leaders = {
        ln.get_gid().split(":")[1]: ln
        for ln in ax.lines
        if str(ln.get_gid()).startswith("pourbaix-leader:")
    }
    for t in label_texts(ax, "domain") + label_texts(ax, "number"):
        i = t.get_gid().rsplit(":", 1)[1]
        d = m.domains[int(i)]
        if ":number:" in t.get_gid() and i not in leaders:
            # a number without a leader is centred inside its domain
            b = boxes_of([t], renderer)[0]
            x, y = ax.transData.inverted().transform(((b.x0 + b.x1) / 2, (b.y0 + b.y1) / 2))
            assert d.polygon.buffer(1e-6).contains(shapely.Point(x, y)), (
                f"number {t.get_text()} off its domain"
            )
        elif i in leaders:
            x, y = leaders[i].get_data()
            # the leader starts at the domain's label point, inside the domain
            assert (x[0], y[0]) == pytest.approx(d.label_point)
            assert d.polygon.buffer(1e-9).contains(shapely.Point(x[0], y[0]))
        else:
            b = boxes_of([t], renderer)[0]
            inv = ax.transData.inverted()
            (x0, y0), (x1, y1) = inv.transform([(b.x0, b.y0), (b.x1, b.y1)])
            assert d.polygon.contains(shapely.box(x0, y0, x1, y1)), (
                f"label {t.get_text()} leaves its domain"
            )


def test_labels_off_draws_no_domain_labels(maps):
    ax = draw.draw_map(maps["Fe"], labels=False)
    assert label_texts(ax, "domain") == []


def test_two_maps_on_one_figure_with_constrained_layout(maps):
    fig, (a1, a2) = plt.subplots(1, 2, figsize=(12, 5), layout="constrained")
    assert draw.draw_map(maps["Fe"], ax=a1, caption=False) is a1
    assert draw.draw_map(maps["Cu"], ax=a2, caption=False) is a2
    assert_no_overlaps(a1)
    assert_no_overlaps(a2)


# ------------------------------------------------------------ map parts
def test_draw_onto_given_axes_returns_it(maps):
    fig, ax = plt.subplots()
    out = draw.draw_map(maps["Fe"], ax=ax)
    assert out is ax
    assert len(fig.axes) == 1
    domains = [p for p in ax.patches if str(p.get_gid()).startswith("pourbaix-domain:")]
    assert len(domains) == len(maps["Fe"].domains)


def test_water_lines_follow_the_map(maps):
    m = maps["Fe"]
    ax = draw.draw_map(m)
    lines = {ln.get_gid(): ln for ln in ax.lines if str(ln.get_gid()).startswith("pourbaix-water")}
    assert set(lines) == {"pourbaix-water:oxygen", "pourbaix-water:hydrogen"}
    # 25 °C, 1 bar: E = 1.229 - 0.05916 pH and -0.05916 pH vs SHE (CODATA dG(H2O); textbook water lines)
    for key, e0 in (("oxygen", 1.229), ("hydrogen", 0.0)):
        x, y = lines[f"pourbaix-water:{key}"].get_data()
        assert y[0] == pytest.approx(
            e0 - 0.05916 * x[0], abs=1.5e-3
        )  # 1.229 is given to 3 decimals
        assert (y[1] - y[0]) / (x[1] - x[0]) == pytest.approx(-0.05916, abs=1e-5)
        assert lines[f"pourbaix-water:{key}"].get_linestyle() in ("--", ":", "-.")
    texts = {t.get_gid(): t.get_text() for t in label_texts(ax, "water")}
    assert texts["pourbaix-label:water:oxygen"] == "O₂/H₂O"
    assert texts["pourbaix-label:water:hydrogen"] == "H₂O/H₂"
    neutral = [ln for ln in ax.lines if ln.get_gid() == "pourbaix-neutral"]
    assert len(neutral) == 1
    assert neutral[0].get_xdata()[0] == pytest.approx(
        7.0, abs=0.01
    )  # pKw/2 = 7.00 at 25 °C (IAPWS R11-07)


def test_no_water_means_no_water_lines(maps):
    ax = draw.draw_map(maps["Cu"], water=False)
    assert not [ln for ln in ax.lines if str(ln.get_gid()).startswith("pourbaix-water")]
    assert label_texts(ax, "water") == []


def test_axis_titles_name_the_reference():
    m = pourbaix.compute_map("Cu", reference="SCE")
    ax = draw.draw_map(m)
    assert ax.get_xlabel() == "pH"
    assert ax.get_ylabel() == "E / V vs SCE"


def test_caption_states_conditions(maps):
    ax = draw.draw_map(maps["Fe"])
    cap = [t for t in ax.texts if t.get_gid() == "pourbaix-caption"]
    assert len(cap) == 1
    text = cap[0].get_text()
    for part in (
        "Fe",
        "25 °C",
        "bar",
        "activity 10⁻⁶",
        "data set: default",
        "vs SHE",
        "I = 0",
    ):
        assert part in text
    ax2 = draw.draw_map(maps["Fe"], caption=False)
    assert not [t for t in ax2.texts if t.get_gid() == "pourbaix-caption"]


def test_caption_with_molality_and_ionic_strength():
    m = pourbaix.compute_map("Cu", molality=1e-5, ionic_strength=0.1, activity_model="davies")
    ax = draw.draw_map(m)
    text = next(t.get_text() for t in ax.texts if t.get_gid() == "pourbaix-caption")
    assert "mol/kg" in text and "I = 0.1 mol/kg" in text and "davies" in text


def test_reading_adds_legend_and_caution(maps):
    ax = draw.draw_map(maps["Fe"], reading=True)
    leg = ax.get_legend()
    assert leg is not None
    names = [t.get_text() for t in leg.get_texts()]
    # the three states, then the lines the legend also names (water lines, neutral pH)
    assert [n.split()[0] for n in names[:3]] == ["immunity", "passivation", "corrosion"]
    assert [n.split()[0] for n in names[3:]] == ["water", "neutral"]
    text = next(t.get_text() for t in ax.texts if t.get_gid() == "pourbaix-caption")
    assert "whether it protects is a kinetic question" in text
    hatched = [p for p in ax.patches if p.get_hatch()]
    n_corrosion = sum(d.state == "corrosion" for d in maps["Fe"].domains)
    assert len(hatched) == n_corrosion


def test_unknown_palette_lists_valid_ones(maps):
    with pytest.raises(OptionError, match="default, grey"):
        draw.draw_map(maps["Cu"], palette="rainbow")
    assert plt.get_fignums() == []  # refused before a figure was made


def srgb_lightness(hex_colour):
    """CIE 1976 L* of an sRGB colour (sRGB transfer curve, IEC 61966-2-1; L* from CIE 15:2004)."""
    from matplotlib.colors import to_rgb

    lin = [c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4 for c in to_rgb(hex_colour)]
    y = 0.2126 * lin[0] + 0.7152 * lin[1] + 0.0722 * lin[2]  # Rec. 709 luminance weights
    return 116 * y ** (1 / 3) - 16 if y > 216 / 24389 else 24389 / 27 * y


@pytest.mark.parametrize("name", sorted(draw.PALETTES))
def test_palette_families_separate_in_greyscale(name):
    pal = draw.PALETTES[name]
    light = {
        s: [srgb_lightness(c) for c in pal[s]] for s in ("immunity", "passivation", "corrosion")
    }
    # 5 L* units between families: a just-readable step in greyscale print (common practice)
    assert min(light["corrosion"]) - max(light["passivation"]) >= 5
    assert min(light["passivation"]) - max(light["immunity"]) >= 5
    # dark labels stay readable on the darkest tint (L* above 55; common practice)
    assert min(light["immunity"]) > 55


def test_neighbours_of_one_state_get_different_tints(maps):
    m = maps["Mn"]
    ax = draw.draw_map(m)
    face = {
        int(p.get_gid().split(":")[1]): p.get_facecolor()
        for p in ax.patches
        if str(p.get_gid()).startswith("pourbaix-domain:")
    }
    index = {d.entry: k for k, d in enumerate(m.domains)}
    checked = 0
    for b in m.boundaries:
        i, j = index[b.entries[0]], index[b.entries[1]]
        if m.domains[i].state == m.domains[j].state:
            assert face[i] != face[j], (
                f"{m.domains[i].species} and {m.domains[j].species} share a tint"
            )
            checked += 1
    assert checked > 0


# ------------------------------------------------------------ second axis
def second_axis(ax):
    sec = [c for c in ax.child_axes if c.get_gid() == "pourbaix-second-axis"]
    assert len(sec) == 1
    return sec[0]


def test_second_axis_offset_sce(maps):
    ax = draw.draw_map(maps["Fe"], second_reference="SCE")
    ax.figure.canvas.draw()
    sec = second_axis(ax)
    assert sec.get_ylabel() == "E / V vs SCE"
    # SCE is +0.241 V vs SHE at 25 °C (Ives & Janz, Reference Electrodes, 1961; from memory); 3 decimals -> 1 mV
    lo, hi = sec.get_ylim()
    assert lo == pytest.approx(-2.0 - 0.241, abs=1e-3)
    assert hi == pytest.approx(2.0 - 0.241, abs=1e-3)
    # a tick of the second axis sits at the height of E_SHE = E_SCE + 0.241 on the main axis
    for v in sec.get_yticks():
        y_sec = sec.transData.transform((0.0, v))[1]
        y_main = ax.transData.transform((0.0, v + 0.241))[1]
        assert y_sec == pytest.approx(y_main, abs=0.5)  # pixels; 1 mV is about 0.1 px here


def test_second_axis_cu_cuso4_on_a_map_vs_sce():
    m = pourbaix.compute_map("Fe", reference="SCE")
    ax = draw.draw_map(m, second_reference="Cu/CuSO4")
    ax.figure.canvas.draw()
    lo, hi = second_axis(ax).get_ylim()
    # E_CSE = E_SCE + 0.241 - 0.316: SCE 0.241 V (Ives & Janz 1961, from memory), saturated
    # Cu/CuSO4 0.316 V vs SHE (common practice in cathodic protection; 0.30-0.32 V quoted)
    assert lo == pytest.approx(-2.0 + 0.241 - 0.316, abs=3e-3)
    assert hi == pytest.approx(2.0 + 0.241 - 0.316, abs=3e-3)


def test_second_axis_refuses_ph_dependent_reference(maps):
    with pytest.raises(OptionError, match="pH-dependent reference cannot be a second"):
        draw.draw_map(maps["Fe"], second_reference="RHE")
    m = pourbaix.compute_map("Cu", reference="RHE")
    with pytest.raises(OptionError, match="pH-dependent"):
        draw.draw_map(m, second_reference="SCE")
    with pytest.raises(OptionError, match="valid"):
        draw.draw_map(maps["Fe"], second_reference="XYZ")


# ---------------------------------------------------------------- overlay
def test_overlay_of_three_maps_has_three_legend_entries():
    sweep = pourbaix.compute_sweep("Fe", temperatures_c=[25, 100, 200])
    ax = draw.draw_overlay(sweep)
    texts = [t.get_text() for t in ax.get_legend().get_texts()]
    assert texts == ["25 °C", "100 °C", "200 °C"]
    styles = {str(h.get_linestyle()) + h.get_color() for h in ax.get_legend().legend_handles}
    assert len(styles) == 3
    # the first map's domains are labelled, once each
    assert len(label_texts(ax, "domain")) == len(sweep[0].domains)
    assert_no_overlaps(ax)


def test_overlay_of_activities_and_given_labels(maps):
    sweep = pourbaix.compute_sweep("Zn", activities=[1e-6, 1e-4])
    ax = draw.draw_overlay(sweep)
    texts = [t.get_text() for t in ax.get_legend().get_texts()]
    assert texts == ["activity 10⁻⁶", "activity 10⁻⁴"]
    fig, ax2 = plt.subplots()
    assert draw.draw_overlay(sweep, ax=ax2, labels=["dilute", "concentrated"]) is ax2
    assert [t.get_text() for t in ax2.get_legend().get_texts()] == ["dilute", "concentrated"]


def test_overlay_bad_input(maps):
    with pytest.raises(OptionError, match="one per map"):
        draw.draw_overlay([maps["Fe"], maps["Fe"]], labels=["only one"])
    with pytest.raises(OptionError, match="one reference electrode"):
        draw.draw_overlay([maps["Fe"], pourbaix.compute_map("Fe", reference="SCE")])
    with pytest.raises(OptionError, match="1 to 6 maps"):
        draw.draw_overlay([])


# ------------------------------------------------------------------ points
def test_points_scalar_array_and_path(maps):
    ax = draw.draw_map(maps["Fe"])
    assert draw.draw_points(ax, 7.0, -0.6) is ax
    ph = np.array([6.5, 7.2, 7.8, 8.4])
    e = np.array([-0.62, -0.55, -0.4, -0.2])
    draw.draw_points(ax, ph, e, labels=["Jan", "Mar", "May", "Jul"], path=True, marker="o")
    pts = [ln for ln in ax.lines if ln.get_gid() == "pourbaix-points"]
    assert len(pts) == 2
    assert np.allclose(pts[1].get_xdata(), ph) and np.allclose(pts[1].get_ydata(), e)
    arrows = [t for t in ax.texts if t.get_gid() == "pourbaix-path"]
    assert len(arrows) == 3
    assert_no_overlaps(ax)  # point labels join the other labels without overlapping them


def test_points_bad_input(maps):
    ax = draw.draw_map(maps["Cu"])
    with pytest.raises(ConditionsError, match="3 pH values but 2 potentials"):
        draw.draw_points(ax, [1, 2, 3], [0.1, 0.2])
    with pytest.raises(ConditionsError, match="point 2"):
        draw.draw_points(ax, [1, float("nan")], [0.1, 0.2])
    with pytest.raises(OptionError, match="1 labels for 2 points"):
        draw.draw_points(ax, [1, 2], [0.1, 0.2], labels=["a"])


# ------------------------------------------------------------ temperature
@pytest.fixture(scope="module")
def fe200():
    return pourbaix.compute_map("Fe", temperature_c=200)


def test_neutral_line_and_water_lines_at_200c(fe200):
    from iapws import IAPWS97
    from iapws._iapws import _Kw

    ax = draw.draw_map(fe200)
    c = fe200.conditions
    water = IAPWS97(T=c.temperature_c + 273.15, P=c.pressure_bar / 10)
    # pKw from IAPWS R11-07 as implemented in the iapws package; neutral pH = pKw / 2
    neutral = _Kw(water.rho, c.temperature_c + 273.15) / 2
    line = next(ln for ln in ax.lines if ln.get_gid() == "pourbaix-neutral")
    assert line.get_xdata()[0] == pytest.approx(neutral, abs=0.01)
    note = next(t for t in label_texts(ax) if t.get_gid() == "pourbaix-label:neutral")
    assert f"{neutral:.2f}" in note.get_text()
    # the water lines' slope is the Nernst factor at 200 °C, R T ln10 / F (CODATA 2018 constants)
    k200 = 8.314462618 * 473.15 * math.log(10) / 96485.33212
    x, y = next(ln for ln in ax.lines if ln.get_gid() == "pourbaix-water:oxygen").get_data()
    assert (y[1] - y[0]) / (x[1] - x[0]) == pytest.approx(-k200, rel=1e-6)


def test_caption_states_pressure_routes_and_warnings_at_200c(fe200):
    ax = draw.draw_map(fe200)
    text = next(t.get_text() for t in ax.texts if t.get_gid() == "pourbaix-caption")
    assert "200 °C" in text
    assert f"{fe200.conditions.pressure_bar:.4g} bar" in text  # saturation pressure, not 1 bar
    assert "ΔG at 200 °C from:" in text
    if fe200.warnings:
        assert "Warning:" in text


def test_long_caption_grows_the_figure_not_the_map(maps, fe200):
    ax25 = draw.draw_map(maps["Fe"])
    ax200 = draw.draw_map(fe200, reading=True)
    h25 = ax25.get_position().height * ax25.figure.get_figheight()
    h200 = ax200.get_position().height * ax200.figure.get_figheight()
    assert h200 == pytest.approx(h25, rel=1e-6)
    assert ax25.figure.get_size_inches() == pytest.approx(draw.FIGURE_SIZE_IN)
    assert ax200.figure.get_figheight() > draw.FIGURE_SIZE_IN[1]


def test_map_without_temperature_data_draws_without_neutral_marker(monkeypatch):
    m = crowded_map()

    def no_thermo(self):
        raise ImportError("no water properties for this map")

    monkeypatch.setattr(type(m), "neutral_ph", property(no_thermo))
    ax = draw.draw_map(m)
    assert not [ln for ln in ax.lines if ln.get_gid() == "pourbaix-neutral"]
    assert len(label_texts(ax, "domain")) + len(label_texts(ax, "number")) == len(m.domains)


def test_overlay_water_lines_once_when_shared_and_per_map_when_not(maps):
    two_sets = [maps["Fe"], pourbaix.compute_map("Fe", dataset="bpj85")]
    ax = draw.draw_overlay(two_sets)
    water = [ln for ln in ax.lines if str(ln.get_gid()).startswith("pourbaix-water")]
    assert len(water) == 2  # same temperature: one pair of water lines, labelled
    assert len(label_texts(ax, "water")) == 2
    assert_no_overlaps(ax)
    sweep = pourbaix.compute_sweep("Fe", temperatures_c=[25, 150])
    ax2 = draw.draw_overlay(sweep)
    water2 = [ln for ln in ax2.lines if str(ln.get_gid()).startswith("pourbaix-water")]
    assert len(water2) == 4  # the water lines move with temperature: one pair per map


# ------------------------------------------------------------ numbered key
@pytest.fixture(scope="module")
def steel():
    """Fe-Cr-Ni at 70:19:11, an austenitic stainless steel composition (common practice): 46 domains."""
    return pourbaix.compute_map(["Fe", "Cr", "Ni"], ratio=(70, 19, 11), activity=1e-6)


def test_crowded_steel_map_numbers_domains_without_overlaps(steel):
    ax = draw.draw_map(steel)
    texts = assert_no_overlaps(ax)  # labels and numbers, inside the frame, none overlapping
    numbers = label_texts(ax, "number")
    labels = label_texts(ax, "domain")
    assert len(numbers) > 6  # the crowded case really switched to numbers
    assert set(numbers) | set(labels) <= set(texts)
    owners = [int(t.get_gid().rsplit(":", 1)[1]) for t in labels + numbers]
    assert sorted(owners) == list(range(len(steel.domains)))  # exactly one label or one number each
    assert sorted(int(t.get_text()) for t in numbers) == list(range(1, len(numbers) + 1))
    for t in labels:
        assert t.get_text() == steel.domains[int(t.get_gid().rsplit(":", 1)[1])].label


def test_key_lists_every_numbered_domain_outside_the_axes(steel):
    ax = draw.draw_map(steel)
    fig = ax.figure
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    numbers = {t.get_gid().rsplit(":", 1)[1]: t.get_text() for t in label_texts(ax, "number")}
    key = {
        t.get_gid().rsplit(":", 1)[1]: t
        for t in ax.texts
        if str(t.get_gid()).startswith("pourbaix-key:")
    }
    key_num = {
        t.get_gid().rsplit(":", 1)[1]: t.get_text()
        for t in ax.texts
        if str(t.get_gid()).startswith("pourbaix-key-number:")
    }
    assert set(key) == set(numbers) == set(key_num)
    for i, n in numbers.items():
        assert key_num[i] == n  # the key's number is the one on the map
        assert key[i].get_text() == steel.domains[int(i)].label
    boxes = boxes_of(list(key.values()), renderer)
    fig_box = fig.bbox
    for b in boxes:
        assert b.x0 > ax.bbox.x1  # right of the plot, off the map
        assert (
            fig_box.x0 <= b.x0 and b.x1 <= fig_box.x1 and fig_box.y0 <= b.y0 and b.y1 <= fig_box.y1
        )
    for b1, b2 in itertools.combinations(boxes, 2):
        assert min(b1.x1, b2.x1) <= max(b1.x0, b2.x0) or min(b1.y1, b2.y1) <= max(b1.y0, b2.y0)


def test_key_grows_the_figure_not_the_map(steel, maps):
    plain = draw.draw_map(maps["Fe"])
    ax = draw.draw_map(steel)
    w_plain, h_plain = plain.figure.get_size_inches()
    w, h = ax.figure.get_size_inches()
    assert w > w_plain and h == pytest.approx(h_plain)
    # the axes keep their size in inches
    size = lambda a: (a.bbox.width / a.figure.dpi, a.bbox.height / a.figure.dpi)  # noqa: E731
    assert size(ax) == pytest.approx(size(plain), abs=1e-6)


@pytest.mark.parametrize("element", ["Fe", "Cu", "Zn"])
def test_simple_maps_keep_labels_and_no_key(maps, element):
    ax = draw.draw_map(maps[element])
    assert label_texts(ax, "number") == []
    assert not [t for t in ax.texts if str(t.get_gid()).startswith("pourbaix-key")]
    assert tuple(ax.figure.get_size_inches()) == pytest.approx(draw.FIGURE_SIZE_IN)


@pytest.mark.parametrize("dpi", [100, 200])
def test_least_label_size_is_below_matplotlibs_measure(maps, steel, dpi):
    # the shortcut that skips measuring labels too big for a domain must never exceed
    # the box matplotlib's own text layout gives (the reference), or a label that fits
    # would be pushed out of its domain
    from pourbaix.plot.labels import Placer
    from pourbaix.plot.style import get_renderer

    fig, ax = plt.subplots(dpi=dpi)
    placer = Placer(ax, get_renderer(fig))
    texts = [d.label for m in (*maps.values(), steel) for d in m.domains]
    texts += ["O₂/H₂O", "1", "23", "Ill", "two\nlines of text", r"$\mathrm{Me_{2}(OH)_{2}^{+}}$"]
    for text in texts:
        for size in (10.0, 8.5, 6.5):
            t = ax.text(0, 0, text, fontsize=size, ha="center", va="center")
            w, h, _, _ = placer.measure(t)
            least_w, least_h = placer.least_size(text, size)
            assert least_w <= w and least_h <= h + 1e-9, (text, size)
            t.remove()


def test_segment_box_crossing_matches_shapely():
    # Reference: shapely's exact LineString/box intersection (GEOS), on random segments and
    # boxes including horizontal and vertical segments (the parallel cases of Liang-Barsky).
    import shapely

    rng = np.random.default_rng(11)
    segs = rng.uniform(0, 100, (60, 2, 2))
    segs[:10, 1, 1] = segs[:10, 0, 1]  # horizontal
    segs[10:20, 1, 0] = segs[10:20, 0, 0]  # vertical
    lo = rng.uniform(0, 90, (200, 2))
    boxes = np.column_stack([lo, lo + rng.uniform(1, 15, (200, 2))])
    got = draw._segments_hit_boxes([tuple(map(tuple, s)) for s in segs], boxes)
    lines = shapely.linestrings(segs)
    for k, b in enumerate(boxes):
        want = bool(shapely.intersects(lines, shapely.box(*b)).any())
        assert got[k] == want, (k, b)
        assert want == any(draw._segment_hits_box(s[0], s[1], b) for s in segs)
    assert not draw._segments_hit_boxes([], boxes).any()


def test_states_legend_without_reading_names_only_the_states_shown(maps):
    # issue 17: no legend for the states unless the reading was asked for
    ax = draw.draw_map(maps["Cu"])
    names = [t.get_text() for t in ax.get_legend().get_texts()]
    shown = {d.state for d in maps["Cu"].domains}
    assert [n.split()[0] for n in names if n.split()[0] in STATES] == [
        s for s in STATES if s in shown
    ]
    assert not [p for p in ax.patches if p.get_hatch()]  # hatching stays with the reading


STATES = ("immunity", "passivation", "corrosion")


def test_grey_palette_draws_grey_water_lines(maps):
    from matplotlib.colors import to_rgb

    ax = draw.draw_map(maps["Fe"], palette="grey")
    water = [ln for ln in ax.get_lines() if (ln.get_gid() or "").startswith("pourbaix-water")]
    assert len(water) == 2
    for ln in water:
        r, g, b = to_rgb(ln.get_color())
        assert max(r, g, b) - min(r, g, b) < 0.02, "a water line keeps a hue in the grey palette"
