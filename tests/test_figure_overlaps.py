"""Nothing overlaps on crowded maps: labels, numbered callouts, leaders, line labels, key, caption.

Measured on the figures as drawn (display coordinates after layout): every
text box is compared with every other, with the boundary lines of the map,
and with the leader lines; the caption must stay inside the figure.
"""

import itertools

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pytest  # noqa: E402

import pourbaix  # noqa: E402
from pourbaix.maps.systems import compute_system_map  # noqa: E402
from pourbaix.plot import draw  # noqa: E402
from pourbaix.plot.labels import _segments_hit_boxes  # noqa: E402

TOUCH_PX = 0.5  # boxes may touch (anti-aliasing), never overlap


@pytest.fixture(autouse=True)
def _close_figures():
    yield
    plt.close("all")


def _box(artist, renderer):
    patch = artist.get_bbox_patch() if hasattr(artist, "get_bbox_patch") else None
    e = (patch or artist).get_window_extent(renderer)
    if patch is not None:  # the text may stick out of a tight box; take the union
        t = artist.get_window_extent(renderer)
        return (min(e.x0, t.x0), min(e.y0, t.y0), max(e.x1, t.x1), max(e.y1, t.y1))
    return (e.x0, e.y0, e.x1, e.y1)


def _overlap(a, b):
    return (
        min(a[2], b[2]) - max(a[0], b[0]) > TOUCH_PX
        and min(a[3], b[3]) - max(a[1], b[1]) > TOUCH_PX
    )


def _measure(ax, dmap):
    """Collect the placed boxes, leaders and boundary segments of a drawn map [px]."""
    fig = ax.figure
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    boxes = {}
    for t in fig.findobj(matplotlib.text.Text):
        gid = t.get_gid() or ""
        if t.get_visible() and t.get_text() and gid.startswith(("pourbaix-label", "pourbaix-key")):
            boxes[gid] = _box(t, renderer)
        if gid == "pourbaix-caption":
            boxes[gid] = _box(t, renderer)
    leg = ax.get_legend()
    if leg is not None:
        e = leg.get_window_extent(renderer)
        boxes["pourbaix-legend"] = (e.x0, e.y0, e.x1, e.y1)
    leaders = {}
    for ln in ax.get_lines():
        gid = ln.get_gid() or ""
        if gid.startswith("pourbaix-leader:"):
            xy = ax.transData.transform(np.column_stack(ln.get_data()))
            leaders[gid.split(":", 1)[1]] = (tuple(xy[0]), tuple(xy[-1]))
    segments = [
        tuple(map(tuple, ax.transData.transform([b.start, b.end]))) for b in dmap.boundaries
    ]
    return fig, boxes, leaders, segments


def _check(ax, dmap):
    fig, boxes, leaders, segments = _measure(ax, dmap)
    problems = []
    for (ga, a), (gb, b) in itertools.combinations(boxes.items(), 2):
        if _overlap(a, b):
            problems.append(f"{ga} overlaps {gb}")
    # labels and callouts keep off the boundary lines (shrunk by the touch tolerance)
    for gid, b in boxes.items():
        if not gid.startswith("pourbaix-label"):
            continue
        inner = (b[0] + TOUCH_PX, b[1] + TOUCH_PX, b[2] - TOUCH_PX, b[3] - TOUCH_PX)
        if _segments_hit_boxes(segments, [inner])[0]:
            problems.append(f"{gid} sits on a boundary line")
    # leaders run through no label or callout but their own, and cross no other leader
    for key, seg in leaders.items():
        own = {f"pourbaix-label:domain:{key}", f"pourbaix-label:number:{key}"}
        for gid, b in boxes.items():
            if gid in own or not gid.startswith("pourbaix-label"):
                continue
            if _segments_hit_boxes([seg], [b])[0]:
                problems.append(f"leader {key} runs through {gid}")
    for (ka, sa), (kb, sb) in itertools.combinations(leaders.items(), 2):
        if _cross(sa, sb):
            problems.append(f"leaders {ka} and {kb} cross")
    # everything stays on the figure (the caption used to run off the right edge)
    w, h = fig.bbox.width, fig.bbox.height
    for gid, b in boxes.items():
        if b[0] < -TOUCH_PX or b[1] < -TOUCH_PX or b[2] > w + TOUCH_PX or b[3] > h + TOUCH_PX:
            problems.append(f"{gid} runs off the figure ({b[2]:.0f} > {w:.0f} px?)")
    return problems


def _cross(p, q):
    def orient(u, v, w):
        return (v[0] - u[0]) * (w[1] - u[1]) - (v[1] - u[1]) * (w[0] - u[0])

    (a, b), (c, d) = p, q
    return orient(c, d, a) * orient(c, d, b) < 0 and orient(a, b, c) * orient(a, b, d) < 0


# the crowded maps practitioners reported (issue: Cu with S, Cu with Cl, Fe-Cr-Ni 70:19:11,
# and a map at temperature and ionic strength whose caption ran off the edge)
CROWDED = {
    "Cu-S": lambda: compute_system_map(["Cu"], ligands={"S": 1e-3}),
    "Cu-Cl": lambda: compute_system_map(["Cu"], ligands={"Cl": 1.0}),
    "Fe-Cr-Ni": lambda: compute_system_map(["Fe", "Cr", "Ni"], ratio=(70, 19, 11)),
    "Fe-150C-brine": lambda: pourbaix.compute_map(
        "Fe", temperature_c=150, ionic_strength=0.5, activity_model="davies"
    ),
    # nickel's higher oxides keep their 25 °C values: a warning that names formulas
    "Ni-150C-brine": lambda: pourbaix.compute_map(
        "Ni", temperature_c=150, ionic_strength=0.5, activity_model="davies"
    ),
}


@pytest.mark.parametrize("name", sorted(CROWDED))
@pytest.mark.parametrize("reading", [False, True])
def test_nothing_overlaps_on_crowded_maps(name, reading):
    dmap = CROWDED[name]()
    ax = draw.draw_map(dmap, reading=reading)
    problems = _check(ax, dmap)
    assert not problems, f"{name}: " + "; ".join(problems[:12])


def test_caption_wraps_within_the_figure_and_typesets_formulas():
    # cerium at 150 °C in brine: the cerium oxides and ions have no route to temperature
    # (no S°, no estimate), so the caption names species in a warning
    dmap = pourbaix.compute_map(
        "Ce", temperature_c=150, ionic_strength=0.5, activity_model="davies"
    )
    assert dmap.warnings, "this map is expected to carry warnings (routes and model limits at 150 °C)"
    ax = draw.draw_map(dmap)
    cap = next(t for t in ax.texts if t.get_gid() == "pourbaix-caption")
    text = cap.get_text()
    assert len(text.splitlines()) >= 4
    # formulas in the warnings are typeset like the labels (Ni₃O₄, not Ni3O4)
    assert "^" not in text
    assert "Ce₂O₃" in text or "CeO₂" in text
