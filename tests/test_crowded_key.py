"""Very crowded maps stay readable: a short key, a note on the small domains, titles and labels clear.

The 316 stainless steel map (Fe-Cr-Ni-Mo-Mn 66:17:11:3:3, the nominal
composition of UNS S31600 per ASTM A240) has over a hundred domains; most are
slivers too small to read on the page. The overlap checks are those of
tests/test_figure_overlaps.py, loaded from that file.
"""

import importlib.util
import re
from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import pytest  # noqa: E402

import pourbaix  # noqa: E402
from pourbaix.maps.systems import compute_system_map  # noqa: E402
from pourbaix.plot import draw  # noqa: E402

_spec = importlib.util.spec_from_file_location(
    "figure_overlaps", Path(__file__).with_name("test_figure_overlaps.py")
)
overlaps = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(overlaps)


@pytest.fixture(autouse=True)
def _close_figures():
    yield
    plt.close("all")


@pytest.fixture(scope="module")
def map_316():
    return compute_system_map(["Fe", "Cr", "Ni", "Mo", "Mn"], ratio=(66, 17, 11, 3, 3))


def _accounting(ax):
    """Domains labelled in place or boxed, numbered in the key, and the count in the note."""
    fig = ax.figure
    labelled, keyed, note = set(), set(), None
    for t in fig.findobj(matplotlib.text.Text):
        gid = t.get_gid() or ""
        if not (t.get_visible() and t.get_text()):
            continue
        if gid.startswith("pourbaix-label:domain:"):
            labelled.add(int(gid.rsplit(":", 1)[1]))
        elif gid.startswith("pourbaix-key:"):
            keyed.add(int(gid.rsplit(":", 1)[1]))
        elif gid == "pourbaix-key-note:unlabelled":
            note = t.get_text()
    return labelled, keyed, note


def test_316_map_has_no_overlaps(map_316):
    assert len(map_316.domains) > 100, "the 316 map is expected to be very crowded"
    ax = draw.draw_map(map_316)
    problems = overlaps._check(ax, map_316)
    assert not problems, "; ".join(problems[:12])


def test_316_map_accounts_for_every_domain(map_316):
    ax = draw.draw_map(map_316)
    labelled, keyed, note = _accounting(ax)
    assert note is not None, "the key should say how many small domains are not labelled"
    count = int(re.match(r"(\d+) small domains? not labelled", note).group(1))
    assert "JSON export" in note and "probe" in note and "report" in note
    assert not labelled & keyed
    assert len(labelled) + len(keyed) + count == len(map_316.domains)
    # the key stays short enough to read (issue 16: a 127-entry key was not)
    assert 0 < len(keyed) <= 30


def test_ordinary_crowded_map_still_labels_every_domain():
    dmap = compute_system_map(["Fe", "Cr", "Ni"], ratio=(70, 19, 11))
    ax = draw.draw_map(dmap)
    labelled, keyed, note = _accounting(ax)
    assert note is None
    assert labelled | keyed == set(range(len(dmap.domains)))


def _inside_figure(artist, fig, renderer):
    e = artist.get_window_extent(renderer)
    return e.x0 >= 0 and e.y0 >= 0 and e.x1 <= fig.bbox.width and e.y1 <= fig.bbox.height


@pytest.mark.parametrize("potential_range_v", [(-2.0, 2.0), (-0.3, -0.1)])
def test_long_reference_label_lies_inside_the_figure(potential_range_v):
    # a narrow window has three-decimal tick labels, which push the axis label left
    dmap = pourbaix.compute_map(
        "Fe", reference="Ag/AgCl-seawater", potential_range_v=potential_range_v
    )
    ax = draw.draw_map(dmap, second_reference="SCE")
    fig = ax.figure
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    assert "Ag/AgCl-seawater" in ax.get_ylabel()
    assert _inside_figure(ax.yaxis.label, fig, renderer)
    for other in fig.axes:  # the second axis's label too
        assert _inside_figure(other.yaxis.label, fig, renderer)


def test_title_and_subtitle_do_not_overlap(map_316):
    ax = draw.draw_map(map_316)
    fig = ax.figure
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    titles = [t for t in (ax.title, ax._left_title, ax._right_title) if t.get_text()]
    assert len(titles) == 2
    a, b = (overlaps._box(t, renderer) for t in titles)
    assert not overlaps._overlap(a, b)
    for t in titles:
        assert _inside_figure(t, fig, renderer)
