"""Drawing potential-pH maps with matplotlib: domains, labels, water lines, overlays and field points.

matplotlib is imported inside the functions, never when this module is
imported, so computing and probing maps stays free of it. Every function
draws onto a given Axes (or a new figure when none is given) and returns the
Axes, so users can compose their own figures.

Visual style (our own): domains are filled by state, with lightness that
separates the three families even in greyscale and hues that stay apart for
colour-blind readers -- corrosion in light sand tints, passivation in mid
blue tints, immunity in darker slate greys. Boundaries are thin dark lines,
the water lines dark blue and dashed. Labels sit at each domain's interior
pole; a label that does not fit its domain goes outside in a small white box
with a leader line, placed greedily so no two labels overlap each other or
the axes frame.
"""

from __future__ import annotations

import math
import os
import sys
import warnings
from pathlib import Path

import numpy as np

from pourbaix.errors import ConditionsError, OptionError
from pourbaix.tables.formula import _TO_SUPER

__all__ = ["draw_map", "draw_overlay", "draw_points", "save_figure", "PALETTES", "FIGURE_SIZE_IN"]

#: Default size of a new figure [in].
FIGURE_SIZE_IN = (7.0, 5.5)

#: Fill tints per state family. Lightness separates the families (corrosion
#: lightest, immunity darkest) so a greyscale print still reads; within a
#: family the tints differ slightly so neighbouring domains of one state stay
#: distinct. Hues: warm sand vs mid blue vs neutral slate (apart for the
#: common colour-vision deficiencies).
PALETTES = {
    "default": {
        "corrosion": ("#fbedd7", "#f7e3c2", "#fdf4e6", "#f5dcb4", "#faead0"),
        "passivation": ("#b8d0e6", "#a9c5df", "#a6c8d8", "#9fbfdc", "#b0cae2"),
        "immunity": ("#98a1ab", "#8d97a2", "#a2aab3"),
        "hatch": "#8a6a3c",
    },
    "grey": {
        "corrosion": ("#f3f3f3", "#ebebeb", "#f8f8f8", "#e6e6e6", "#efefef"),
        "passivation": ("#c9c9c9", "#bebebe", "#d2d2d2", "#b8b8b8", "#c4c4c4"),
        "immunity": ("#9a9a9a", "#919191", "#a3a3a3"),
        "hatch": "#555555",
    },
}

_STATE_NAMES = {
    "immunity": "immunity (metal stable)",
    "passivation": "passivation (solid stable)",
    "corrosion": "corrosion (dissolved)",
}
_READING_CAUTION = "Passivation = a solid is stable; whether it protects is a kinetic question."
_HATCH = {"corrosion": "////", "passivation": None, "immunity": None}

_INK = "#1f1f1f"  # boundaries, frame, labels
_WATER_COLOUR = "#1d4f91"
_CAPTION_COLOUR = "#3a3a3a"
_LABEL_SIZE = 10.0  # [pt] label inside its domain
_SMALL_LABEL_SIZE = 8.5  # [pt] second try inside, and labels placed outside
_BOX_PAD_PT = 2.0  # [pt] clearance kept around every label box

# Line styles of an overlay, one per map (colour-blind-safe hues, distinct dashes).
_OVERLAY_STYLES = (
    ("#1a1a1a", "-", 1.4),
    ("#0a6ab0", (0, (6, 2.5)), 1.4),
    ("#c65a00", (0, (7, 2, 1.5, 2)), 1.4),
    ("#3b8a3a", (0, (1.5, 1.8)), 1.7),
    ("#8b3d9e", (0, (10, 2.5, 2, 2.5, 2, 2.5)), 1.4),
    ("#6b6b6b", (0, (3, 3)), 1.4),
)

_FORMATS = {".png": "png", ".svg": "svg", ".pdf": "pdf"}


# ---------------------------------------------------------------- matplotlib
def _pyplot():
    """Import pyplot, choosing the Agg backend only if the user chose none."""
    import matplotlib

    if "matplotlib.pyplot" not in sys.modules and not os.environ.get("MPLBACKEND"):
        chosen = getattr(matplotlib.rcParams, "_get_backend_or_none", lambda: "unknown")()
        if chosen is None:
            matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt


def _new_axes(figsize=FIGURE_SIZE_IN):
    plt = _pyplot()
    fig, ax = plt.subplots(figsize=figsize)
    return fig, ax


def _fit_bottom(fig, bottom_pt, right=None):
    """Set a new figure's margins; a taller bottom band grows the figure, not shrinks the map."""
    base_pt = 44 + 2 * _CAPTION_LINE_PT + 6  # two caption lines fit the default size
    w, h = fig.get_size_inches()
    if bottom_pt > base_pt:
        h = FIGURE_SIZE_IN[1] + (bottom_pt - base_pt) / 72.0
        fig.set_size_inches(w, h)
    top_pt = (1 - 0.925) * FIGURE_SIZE_IN[1] * 72.0
    kw = {} if right is None else {"right": right}
    fig.subplots_adjust(left=0.105, top=1 - top_pt / 72.0 / h, bottom=bottom_pt / 72.0 / h, **kw)


def _renderer(fig, layout=True):
    if layout and fig.get_layout_engine() is not None:
        fig.draw_without_rendering()  # let the layout engine place the axes first
    get = getattr(fig.canvas, "get_renderer", None)
    return get() if get is not None else fig._get_renderer()


def _palette(name):
    if isinstance(name, dict):
        missing = [k for k in ("corrosion", "passivation", "immunity") if k not in name]
        if missing:
            raise OptionError(
                f"palette dict lacks {', '.join(missing)}; give colours for corrosion, passivation, immunity"
            )
        return {"hatch": _INK, **name}
    try:
        return PALETTES[name]
    except (KeyError, TypeError):
        raise OptionError(f"unknown palette {name!r}; valid: {', '.join(PALETTES)}") from None


# ------------------------------------------------------------------ text
def _sci(x):
    """Format a number with a Unicode power of ten: 1e-06 -> 10⁻⁶, 2.5e-05 -> 2.5×10⁻⁵, 0.5 -> 0.5."""
    x = float(x)
    if x == 0 or (1e-2 <= abs(x) < 1e4):
        return f"{x:g}"
    exp = math.floor(math.log10(abs(x)))
    mant = x / 10**exp
    power = "10" + str(exp).translate(_TO_SUPER)
    if abs(mant - round(mant)) < 1e-9 and round(mant) == 1:
        return power
    return f"{mant:.3g}×{power}"


def _system_text(c):
    els = "–".join(c.elements)
    lig = "".join(f"–{k}" for k in (c.ligands or {}))
    text = f"{els}{lig}–H₂O"
    if c.ratio is not None and len(c.elements) > 1:
        text += " (" + ":".join(f"{r:g}" for r in c.ratio) + ")"
    return text


def _activity_text(c):
    what = "dissolved " + ", ".join(c.elements)
    if c.molality is not None:
        return f"{what}: {_sci(c.molality)} mol/kg"
    if c.activity is not None:
        return f"{what}: activity {_sci(c.activity)}"
    return what


def _caption_parts(c, extra=(), dmap=None):
    """Caption of a map as logical lines, each a list of parts joined by a middle dot."""
    first = [
        _system_text(c),
        f"{c.temperature_c:g} °C",
        f"{c.pressure_bar:.4g} bar",
        _activity_text(c),
    ]
    if c.ligands:
        first.append(
            "ligands (total activity): " + ", ".join(f"{k} {_sci(v)}" for k, v in c.ligands.items())
        )
    if c.ratio is not None and len(c.elements) > 1:
        first.append("ratio " + ":".join(f"{r:g}" for r in c.ratio))
    second = []
    if c.ionic_strength and c.ionic_strength > 0:
        model = f", {c.activity_model} model" if c.activity_model else ""
        second.append(f"I = {c.ionic_strength:g} mol/kg{model}")
    else:
        second.append("I = 0")
    if c.water_activity != 1.0:
        second.append(f"water activity {c.water_activity:g}")
    ds = f"data set: {c.dataset}"
    if c.data_files:
        ds += " + " + ", ".join(Path(p).name for p in c.data_files)
    second.append(ds)
    second.append(f"potentials vs {c.reference}")
    lines = [first, second]
    if dmap is not None and c.temperature_c != 25.0:
        routes = {}
        for se in getattr(dmap, "species", ()):
            route = getattr(se, "route", None)
            if route and route != "IAPWS-95":
                routes[route] = routes.get(route, 0) + 1
        if routes:
            lines.append(
                [
                    f"ΔG at {c.temperature_c:g} °C from: "
                    + "; ".join(f"{r} ×{n}" for r, n in routes.items())
                ]
            )
    warns = list(getattr(dmap, "warnings", ()) or ()) if dmap is not None else []
    if warns:
        w = warns[0] if len(warns[0]) <= 100 else warns[0][:98].rstrip(" ,;:") + "…"
        more = f" (+{len(warns) - 1} more)" if len(warns) > 1 else ""
        lines.append([f"Warning: {w}{more} (full text: the map's warnings)"])
    lines += [[e] for e in extra]
    return lines


def _pack(lines, width_pt, fontsize):
    """Lay caption parts into lines no wider than ``width_pt`` (estimated from the font size)."""
    import textwrap

    chars = max(int(width_pt / (0.47 * fontsize)), 30)
    out = []
    for parts in lines:
        cur = ""
        for part in parts:
            cand = part if not cur else f"{cur}  ·  {part}"
            if len(cand) <= chars or not cur:
                cur = cand
            else:
                out.append(cur)
                cur = part
        out += textwrap.wrap(cur, chars, break_on_hyphens=False) if len(cur) > chars else [cur]
    return out


_CAPTION_SIZE = 7.5  # [pt]
_CAPTION_LINE_PT = _CAPTION_SIZE * 1.45


def _caption_lines(c, extra=(), dmap=None, width_pt=440.0):
    """Caption lines stating the conditions of a map."""
    return _pack(_caption_parts(c, extra, dmap), width_pt, _CAPTION_SIZE)


def _title_y(ax):
    """Title height in axes units: 1.0 (just above the frame) when nothing sits on top.

    A fixed height spares matplotlib measuring both axes' tick labels at every draw
    to decide whether the title must move up (about 35 ms per saved figure); with
    ticks or a label on top, None keeps that automatic placement.
    """
    top = (
        ax.xaxis.get_ticks_position() in ("top", "unknown")
        or ax.xaxis.get_label_position() == "top"
    )
    return None if top else 1.0


def _axis_label(reference):
    return f"E / V vs {reference}"


# ------------------------------------------------------------- placement
class _Placer:
    """Greedy label placement in display coordinates (pixels).

    Keeps the boxes already taken and the axes frame; a candidate box is free
    when it lies inside the frame and overlaps no taken box.
    """

    def __init__(self, ax, renderer):
        self.ax = ax
        self.renderer = renderer
        self.px_per_pt = ax.figure.dpi / 72.0
        self.pad = _BOX_PAD_PT * self.px_per_pt
        b = ax.bbox
        self.frame = (b.x0 + self.pad, b.y0 + self.pad, b.x1 - self.pad, b.y1 - self.pad)
        self.boxes = np.zeros((0, 4))
        self.lines = []  # boundary segments in display units, kept clear by line labels
        self.leaders = []  # leader lines drawn so far, display units

    def add_lines(self, segments_data):
        """Register boundary segments (data units) that line labels should not cross."""
        for a, b in segments_data:
            self.lines.append(
                (tuple(self.ax.transData.transform(a)), tuple(self.ax.transData.transform(b)))
            )

    def crosses_lines(self, box, clearance_pt=3.0):
        c = clearance_pt * self.px_per_pt
        grown = (box[0] - c, box[1] - c, box[2] + c, box[3] + c)
        return bool(_segments_hit_boxes(self.lines, [grown])[0])

    def measure(self, text):
        """Width, height and centre offset of a text artist's box [px]."""
        text.set_position((0.0, 0.0))
        tr = text.get_transform()
        text.set_transform(self.ax.transData)
        ext = text.get_window_extent(self.renderer)
        anchor = self.ax.transData.transform((0.0, 0.0))
        text.set_transform(tr)
        return (
            ext.width,
            ext.height,
            ext.x0 + ext.width / 2 - anchor[0],
            ext.y0 + ext.height / 2 - anchor[1],
        )

    def inside_frame(self, boxes):
        f = self.frame
        return (
            (boxes[:, 0] >= f[0])
            & (boxes[:, 1] >= f[1])
            & (boxes[:, 2] <= f[2])
            & (boxes[:, 3] <= f[3])
        )

    def clear(self, boxes):
        """Tell where a box (padded by the clearance) lies in the frame and overlaps no taken box."""
        ok = self.inside_frame(boxes)
        if len(self.boxes):
            p = self.pad
            b = boxes[:, None, :]
            t = self.boxes[None, :, :]
            hit = (
                (b[..., 0] - p < t[..., 2])
                & (b[..., 2] + p > t[..., 0])
                & (b[..., 1] - p < t[..., 3])
                & (b[..., 3] + p > t[..., 1])
            )
            ok &= ~hit.any(axis=1)
        return ok

    def take(self, box):
        self.boxes = np.vstack([self.boxes, np.asarray(box, dtype=float)[None, :]])

    def to_data(self, xy):
        return self.ax.transData.inverted().transform(xy)


def _boxes_at(centres, w, h):
    c = np.atleast_2d(centres)
    return np.column_stack([c[:, 0] - w / 2, c[:, 1] - h / 2, c[:, 0] + w / 2, c[:, 1] + h / 2])


def _segment_hits_box(p, q, box):
    """Whether segment p-q crosses an axis-aligned box (Liang-Barsky clipping)."""
    x0, y0 = p
    dx, dy = q[0] - p[0], q[1] - p[1]
    t0, t1 = 0.0, 1.0
    for pk, qk in ((-dx, x0 - box[0]), (dx, box[2] - x0), (-dy, y0 - box[1]), (dy, box[3] - y0)):
        if pk == 0:
            if qk < 0:
                return False
        else:
            r = qk / pk
            if pk < 0:
                t0 = max(t0, r)
            else:
                t1 = min(t1, r)
            if t0 > t1:
                return False
    return True


def _segments_hit_boxes(segments, boxes):
    """For each box, whether any segment crosses it (Liang-Barsky, vectorised).

    Parameters
    ----------
    segments : sequence of ((x, y), (x, y))
        Segment end points [px].
    boxes : array_like, shape (K, 4)
        ``(x0, y0, x1, y1)`` per box [px].

    Returns
    -------
    ndarray of bool, shape (K,)
    """
    boxes = np.atleast_2d(np.asarray(boxes, dtype=float))
    if len(segments) == 0:
        return np.zeros(len(boxes), dtype=bool)
    s = np.asarray(segments, dtype=float).reshape(-1, 4)
    x0, y0 = s[:, 0], s[:, 1]  # (S,)
    dx, dy = s[:, 2] - x0, s[:, 3] - y0
    bx0, by0, bx1, by1 = (boxes[:, k : k + 1] for k in range(4))  # (K, 1)
    # the four clipping conditions p_k t <= q_k, each broadcast to (K, S)
    shape = (len(boxes), len(s))
    pk = np.stack([np.broadcast_to(v, shape) for v in (-dx, dx, -dy, dy)])
    qk = np.stack([np.broadcast_to(v, shape) for v in (x0 - bx0, bx1 - x0, y0 - by0, by1 - y0)])
    parallel_out = np.any((pk == 0) & (qk < 0), axis=0)
    with np.errstate(divide="ignore", invalid="ignore"):
        r = qk / pk
    t0 = np.max(np.where(pk < 0, r, 0.0), axis=0)
    t1 = np.min(np.where(pk > 0, r, 1.0), axis=0)
    return np.any(~parallel_out & (t0 <= t1), axis=1)


def _segments_cross(p, q, a, b):
    """Whether segments p-q and a-b properly intersect (orientation test)."""

    def orient(u, v, w):
        return (v[0] - u[0]) * (w[1] - u[1]) - (v[1] - u[1]) * (w[0] - u[0])

    d1, d2 = orient(a, b, p), orient(a, b, q)
    d3, d4 = orient(p, q, a), orient(p, q, b)
    return (d1 * d2 < 0) and (d3 * d4 < 0)


def _nearest_on_box(p, box):
    return (min(max(p[0], box[0]), box[2]), min(max(p[1], box[1]), box[3]))


def _display_polygon(ax, polygon):
    from shapely.geometry import Polygon

    xy = ax.transData.transform(np.asarray(polygon.exterior.coords))
    return Polygon(xy)


def _fit_inside(placer, poly_px, w, h, soft_lines=()):
    """Centre for a w x h label box inside a display polygon; None if none fits.

    Candidates on a grid over the polygon are kept if the box (with the
    clearance) lies inside and is free; among them the one with the most room
    around the box wins (distance to the edge measured with x scaled by the
    box's aspect, so a wide label looks for a wide spot), ties going to the
    spot nearest the centroid. Spots whose box a water line crosses are used
    only when there is no other.
    """
    import shapely
    from shapely import affinity

    shrunk = poly_px.buffer(-placer.pad)
    if shrunk.is_empty or shrunk.geom_type != "Polygon":
        return None
    x0, y0, x1, y1 = shrunk.bounds
    if x1 - x0 < w or y1 - y0 < h:
        return None
    gx = np.linspace(x0 + w / 2, x1 - w / 2, 31)
    gy = np.linspace(y0 + h / 2, y1 - h / 2, 21)
    cx, cy = np.meshgrid(gx, gy)
    centres = np.column_stack([cx.ravel(), cy.ravel()])
    boxes = _boxes_at(centres, w, h)
    ok = shapely.contains(shrunk, shapely.box(boxes[:, 0], boxes[:, 1], boxes[:, 2], boxes[:, 3]))
    ok &= placer.clear(boxes)
    if not ok.any():
        return None
    k = np.flatnonzero(ok)
    sx = h / max(w, 1e-9)
    scaled = affinity.scale(poly_px, xfact=sx, yfact=1.0, origin=(0, 0))
    pts = shapely.points(centres[k, 0] * sx, centres[k, 1])
    room = shapely.distance(pts, scaled.exterior)
    cen = scaled.centroid
    near = np.hypot(centres[k, 0] * sx - cen.x, centres[k, 1] - cen.y)
    score = room - 0.15 * near
    if soft_lines:
        c = 1.5 * placer.px_per_pt
        crossed = _segments_hit_boxes(soft_lines, boxes[k] + np.array([-c, -c, c, c]))
        if not crossed.all():
            score = np.where(crossed, -np.inf, score)
    return tuple(centres[k[int(np.argmax(score))]])


def _place_outside(placer, pole_px, w, h, avoid_points, avoid_polys):
    """Centre for a boxed label outside its domain, with a leader to the pole."""
    import shapely

    ppt = placer.px_per_pt
    radii = np.array([10, 16, 24, 34, 46, 60, 78, 100, 128, 160, 200, 250, 310, 380]) * ppt
    angles = np.deg2rad(np.arange(0, 360, 15) + 7.5)
    rr, aa = np.meshgrid(radii, angles, indexing="ij")
    rr, aa = rr.ravel(), aa.ravel()
    cx = pole_px[0] + np.cos(aa) * (rr + w / 2)
    cy = pole_px[1] + np.sin(aa) * (rr + h / 2)
    centres = np.column_stack([cx, cy])
    boxes = _boxes_at(centres, w, h)
    ok = placer.clear(boxes)
    if not ok.any():
        # the whole axes as a last resort: any free spot, nearest first
        f = placer.frame
        gx, gy = np.meshgrid(
            np.linspace(f[0] + w / 2, f[2] - w / 2, 40), np.linspace(f[1] + h / 2, f[3] - h / 2, 30)
        )
        centres = np.column_stack([gx.ravel(), gy.ravel()])
        boxes = _boxes_at(centres, w, h)
        rr = np.hypot(centres[:, 0] - pole_px[0], centres[:, 1] - pole_px[1])
        ok = placer.clear(boxes)
        if not ok.any():
            return None
    score = rr.astype(float).copy()
    score[~ok] = np.inf
    idx = np.flatnonzero(ok)
    # leaders should not run through labels already placed, nor cross other leaders
    for k in idx:
        q = _nearest_on_box(pole_px, boxes[k])
        if any(_segment_hits_box(pole_px, q, tb) for tb in placer.boxes):
            score[k] += 400 * ppt
        score[k] += 70 * ppt * sum(_segments_cross(pole_px, q, a, b) for a, b in placer.leaders)
    # keep off the label points and tiny domains of labels still to be placed
    if len(avoid_points):
        ap = np.asarray(avoid_points)
        inside = (
            (ap[None, :, 0] >= boxes[:, None, 0] - 6 * ppt)
            & (ap[None, :, 0] <= boxes[:, None, 2] + 6 * ppt)
            & (ap[None, :, 1] >= boxes[:, None, 1] - 6 * ppt)
            & (ap[None, :, 1] <= boxes[:, None, 3] + 6 * ppt)
        )
        score += 120 * ppt * inside.sum(axis=1)
    if avoid_polys:
        geoms = shapely.box(boxes[idx, 0], boxes[idx, 1], boxes[idx, 2], boxes[idx, 3])
        for poly in avoid_polys:
            inter = shapely.area(shapely.intersection(geoms, poly))
            score[idx] += 60 * ppt * (inter / max(w * h, 1.0)) * 10
    best = int(np.argmin(score))
    return tuple(centres[best]) if np.isfinite(score[best]) else None


def _label_domains(ax, dmap, renderer, colours=None, *, light=False, fixed=(), soft_lines=()):
    """Place one label per domain; returns the placer (boxes taken) for later labels."""
    placer = _Placer(ax, renderer)
    for box in fixed:
        placer.take(box)
    colour = "#5a5a5a" if light else _INK
    polys_px = [_display_polygon(ax, d.polygon) for d in dmap.domains]
    poles_px = [tuple(ax.transData.transform(d.label_point)) for d in dmap.domains]
    order = sorted(range(len(dmap.domains)), key=lambda i: -dmap.domains[i].area)
    pending = []
    for i in order:
        d = dmap.domains[i]
        placed = False
        for size in (_LABEL_SIZE - (1.0 if light else 0.0), _SMALL_LABEL_SIZE):
            t = ax.text(
                0, 0, d.label, fontsize=size, ha="center", va="center", color=colour, zorder=6
            )
            w, h, ox, oy = placer.measure(t)
            c = _fit_inside(placer, polys_px[i], w, h, soft_lines)
            if c is not None:
                box = _boxes_at(c, w, h)[0]
                t.set_position(placer.to_data((c[0] - ox, c[1] - oy)))
                if colours is not None:
                    face = _mix_white(colours[i], 0.45) if light else colours[i]
                    t.set_bbox(
                        dict(
                            boxstyle="square,pad=0.08",
                            facecolor=face,
                            edgecolor="none",
                            alpha=0.8 if light else 1.0,
                        )
                    )
                t.set_gid(f"pourbaix-label:domain:{i}")
                placer.take(box)
                placed = True
                break
            t.remove()
        if not placed:
            pending.append(i)
    return placer, pending, polys_px, poles_px


def _mix_white(colour, alpha):
    """Return the colour seen when ``colour`` is laid on white with ``alpha``."""
    from matplotlib.colors import to_rgb

    r, g, b = to_rgb(colour)
    return (1 - alpha + alpha * r, 1 - alpha + alpha * g, 1 - alpha + alpha * b)


def _label_pending(ax, dmap, placer, pending, polys_px, poles_px, *, light=False):
    """Labels that do not fit their domain: outside, boxed, with a leader line."""
    colour = "#5a5a5a" if light else _INK
    pending = sorted(pending, key=lambda i: dmap.domains[i].area)
    tiny = [shp for k, shp in enumerate(polys_px) if k in pending]
    for n, i in enumerate(pending):
        d = dmap.domains[i]
        size = _SMALL_LABEL_SIZE - (0.5 if light else 0.0)
        t = ax.text(0, 0, d.label, fontsize=size, ha="center", va="center", color=colour, zorder=8)
        w, h, ox, oy = placer.measure(t)
        bpad = 0.18 * size * placer.px_per_pt  # the white box drawn around the text
        W, H = w + 2 * bpad, h + 2 * bpad
        others = [poles_px[k] for k in pending[n + 1 :]]
        c = _place_outside(
            placer,
            poles_px[i],
            W,
            H,
            others,
            [p for k, p in zip(pending, tiny, strict=True) if k != i],
        )
        if c is None:  # nowhere free at all: shrink once more, then give up on the box
            t.set_fontsize(6.5)
            w, h, ox, oy = placer.measure(t)
            bpad = 0.18 * 6.5 * placer.px_per_pt
            W, H = w + 2 * bpad, h + 2 * bpad
            c = _place_outside(placer, poles_px[i], W, H, [], [])
            if c is None:
                c = tuple(poles_px[i])
        box = _boxes_at(c, W, H)[0]
        t.set_position(placer.to_data((c[0] - ox, c[1] - oy)))
        t.set_bbox(
            dict(
                boxstyle="round,pad=0.18,rounding_size=0.25",
                facecolor="white",
                edgecolor="#6b6b6b",
                linewidth=0.5,
                alpha=0.94,
            )
        )
        t.set_gid(f"pourbaix-label:domain:{i}")
        placer.take(box)
        q = _nearest_on_box(poles_px[i], box)
        placer.leaders.append((tuple(poles_px[i]), q))
        a, b = placer.to_data(poles_px[i]), placer.to_data(q)
        ax.plot(
            [a[0], b[0]],
            [a[1], b[1]],
            color="#3c3c3c",
            lw=0.6,
            zorder=7,
            solid_capstyle="round",
            gid=f"pourbaix-leader:{i}",
        )
        ax.plot(
            [a[0]], [a[1]], "o", ms=2.4, color="#1f1f1f", zorder=7.5, gid=f"pourbaix-leader-dot:{i}"
        )


# ------------------------------------------------------------- numbered key
_MAX_OUTSIDE_LABELS = 6  # more labels than this that do not fit inside: number them instead
_OUTSIDE_SHARE = 0.05  # or one outside label box covering more than this share of the axes
_OUTSIDE_TOTAL_SHARE = 0.15  # or all outside label boxes together covering more than this
_NUMBER_SIZES = (7.0, 6.0)  # [pt] number in its circle: usual, then shrunk
_NUMBER_PAD = 0.22  # circle padding, in units of the font size
_KEY_SIZE = 8.0  # [pt] label text in the key
_KEY_GAP_PT = 10.0  # [pt] between the axes decorations and the key, and between key columns


def _needs_numbers(ax, dmap, placer, pending):
    """Whether the labels that do not fit inside should become numbered markers.

    True when they are more than :data:`_MAX_OUTSIDE_LABELS`, or when their
    boxes outside would cover a large share of the axes (one box over
    :data:`_OUTSIDE_SHARE`, all together over :data:`_OUTSIDE_TOTAL_SHARE`).
    """
    if len(pending) > _MAX_OUTSIDE_LABELS:
        return True
    if not pending:
        return False
    area = max(ax.bbox.width * ax.bbox.height, 1.0)
    shares = []
    for i in pending:
        t = ax.text(0, 0, dmap.domains[i].label, fontsize=_SMALL_LABEL_SIZE)
        w, h, _, _ = placer.measure(t)
        t.remove()
        bpad = 0.18 * _SMALL_LABEL_SIZE * placer.px_per_pt
        shares.append((w + 2 * bpad) * (h + 2 * bpad) / area)
    return max(shares) > _OUTSIDE_SHARE or sum(shares) > _OUTSIDE_TOTAL_SHARE


def _number_text(ax, n, size, gid, **kw):
    return ax.text(
        0,
        0,
        str(n),
        fontsize=size,
        ha="center",
        va="center",
        color=_INK,
        gid=gid,
        bbox=dict(
            boxstyle=f"circle,pad={_NUMBER_PAD}",
            facecolor="white",
            edgecolor="#4a4a4a",
            linewidth=0.6,
        ),
        **kw,
    )


def _circle_size(placer, t, size):
    """Width and height of the circle drawn around a number, and the text's centre offset [px]."""
    w, h, ox, oy = placer.measure(t)
    d = max(w, h) + 2 * _NUMBER_PAD * size * placer.px_per_pt
    return d, ox, oy


def _number_pending(ax, dmap, placer, pending, polys_px, poles_px):
    """Mark each domain in ``pending`` by a number in a small circle; return {domain: number}.

    Numbers run in reading order of the label points (top to bottom, then
    left to right). A number sits at its domain's label point when that spot
    is free, else at the roomiest free spot inside the domain, else in a
    smaller size; failing all, just outside with a short leader. Numbers
    never overlap each other or the labels already placed.
    """
    import shapely

    ppt = placer.px_per_pt
    # reading order in bands of ~14 pt so nearly level points read left to right
    band = 14 * ppt
    order = sorted(pending, key=lambda i: (-round(poles_px[i][1] / band), poles_px[i][0]))
    numbers = {i: n for n, i in enumerate(order, start=1)}
    for i in sorted(pending, key=lambda k: dmap.domains[k].area):
        gid = f"pourbaix-label:number:{i}"
        pole = poles_px[i]
        done = False
        for size in _NUMBER_SIZES:
            t = _number_text(ax, numbers[i], size, gid, zorder=8)
            d, ox, oy = _circle_size(placer, t, size)
            box = _boxes_at(pole, d, d)
            c = None
            if placer.clear(box)[0] and polys_px[i].contains(shapely.Point(pole)):
                c = tuple(pole)
            else:
                c = _fit_inside(placer, polys_px[i], d, d)
            if c is not None:
                t.set_position(placer.to_data((c[0] - ox, c[1] - oy)))
                placer.take(_boxes_at(c, d, d)[0])
                done = True
                break
            t.remove()
        if done:
            continue
        size = _NUMBER_SIZES[-1]
        t = _number_text(ax, numbers[i], size, gid, zorder=8)
        d, ox, oy = _circle_size(placer, t, size)
        c = _place_outside(placer, pole, d, d, [], [])
        if c is None:  # no free spot anywhere in the axes: at the point regardless
            c = tuple(pole)
        box = _boxes_at(c, d, d)[0]
        t.set_position(placer.to_data((c[0] - ox, c[1] - oy)))
        placer.take(box)
        q = _nearest_on_box(pole, box)
        placer.leaders.append((tuple(pole), q))
        a, b = placer.to_data(pole), placer.to_data(q)
        ax.plot(
            [a[0], b[0]],
            [a[1], b[1]],
            color="#3c3c3c",
            lw=0.6,
            zorder=7,
            gid=f"pourbaix-leader:{i}",
        )
        ax.plot(
            [a[0]], [a[1]], "o", ms=2.0, color="#1f1f1f", zorder=7.5, gid=f"pourbaix-leader-dot:{i}"
        )
    return numbers


def _draw_key(ax, dmap, numbers, renderer, *, grow):
    """List "number  label" for the numbered domains to the right of the axes.

    Entries fill columns as tall as the axes, as many columns as needed. When
    ``grow`` is true (a figure of our own) the figure is widened so the key
    fits and the axes keep their size in inches; on a user's axes the key is
    placed the same way and the user sizes the figure.
    """
    fig = ax.figure
    ppt = fig.dpi / 72.0
    entries = sorted(numbers.items(), key=lambda kv: kv[1])
    tight = ax.get_tightbbox(renderer)
    right_pt = max(tight.x1 - ax.bbox.x1, 0.0) / ppt + _KEY_GAP_PT
    line_pt = _KEY_SIZE * 1.75
    height_pt = ax.bbox.height / ppt
    rows = max(1, int(height_pt // line_pt))
    ncol = math.ceil(len(entries) / rows)
    rows = math.ceil(len(entries) / ncol)
    num_w_pt = (_KEY_SIZE - 1.0) * 1.9  # room for a two-digit number in its circle
    x_pt = right_pt
    for col in range(ncol):
        chunk = entries[col * rows : (col + 1) * rows]
        widest = 0.0
        for r, (i, n) in enumerate(chunk):
            y_pt = -(r + 0.5) * line_pt
            num = ax.annotate(
                str(n),
                xy=(1.0, 1.0),
                xycoords="axes fraction",
                xytext=(x_pt + num_w_pt / 2, y_pt),
                textcoords="offset points",
                ha="center",
                va="center",
                fontsize=_KEY_SIZE - 1.0,
                color=_INK,
                annotation_clip=False,
                gid=f"pourbaix-key-number:{i}",
                bbox=dict(
                    boxstyle=f"circle,pad={_NUMBER_PAD}",
                    facecolor="white",
                    edgecolor="#4a4a4a",
                    linewidth=0.6,
                ),
            )
            lab = ax.annotate(
                dmap.domains[i].label,
                xy=(1.0, 1.0),
                xycoords="axes fraction",
                xytext=(x_pt + num_w_pt + 4.0, y_pt),
                textcoords="offset points",
                ha="left",
                va="center",
                fontsize=_KEY_SIZE,
                color=_INK,
                annotation_clip=False,
                gid=f"pourbaix-key:{i}",
            )
            del num
            widest = max(widest, lab.get_window_extent(renderer).width / ppt)
        x_pt += num_w_pt + 4.0 + widest + _KEY_GAP_PT
    if grow:
        w, h = fig.get_size_inches()
        need_in = (ax.bbox.x1 / ppt + x_pt) / 72.0
        if need_in > w:
            pos = ax.get_position()
            fig.set_size_inches(need_in, h)
            fig.subplots_adjust(left=pos.x0 * w / need_in, right=pos.x1 * w / need_in)


def _label_line(
    ax, placer, text, e0, slope, *, colour, size=8.0, above=True, gid="pourbaix-label:line"
):
    """Label a straight line E = e0 + slope pH along it, at the first free spot.

    Spots are tried from the right end leftwards, on the preferred side of
    the line and then on the other; one whose box crosses no boundary is
    preferred, then any spot clear of the other labels.
    """
    x0, x1 = ax.get_xlim()
    y0, y1 = ax.get_ylim()
    t = ax.text(
        0,
        0,
        text,
        fontsize=size,
        color=colour,
        ha="center",
        va="center",
        zorder=6,
        rotation_mode="anchor",
    )
    tr = ax.transData
    fallback = None
    spots = [(f, side) for side in (above, not above) for f in np.linspace(0.9, 0.06, 36)]
    for f, side in spots:
        ph = x0 + f * (x1 - x0)
        e = e0 + slope * ph
        if not (y0 < e < y1):
            continue
        p = tr.transform((ph, e))
        q = tr.transform((ph + 1.0, e + slope))
        ang = math.degrees(math.atan2(q[1] - p[1], q[0] - p[0]))
        t.set_rotation(ang)
        # centre the text a little above (or below) the line, measured across the line
        hh = 0.66 * size * placer.px_per_pt
        nx, ny = -math.sin(math.radians(ang)), math.cos(math.radians(ang))
        sgn = 1.0 if side else -1.0
        c = (p[0] + sgn * nx * hh, p[1] + sgn * ny * hh)
        t.set_position(placer.to_data(c))
        ext = t.get_window_extent(placer.renderer)
        box = np.array([[ext.x0, ext.y0, ext.x1, ext.y1]])
        if placer.clear(box)[0]:
            if not placer.crosses_lines(box[0]):
                placer.take(box[0])
                t.set_gid(gid)
                return t
            if fallback is None:
                fallback = (ang, c, box[0])
    if fallback is not None:
        ang, c, box = fallback
        t.set_rotation(ang)
        t.set_position(placer.to_data(c))
        placer.take(box)
        t.set_gid(gid)
        return t
    t.remove()
    return None


# ------------------------------------------------------------------ layers
def _domain_colours(dmap, palette):
    """One tint per domain: its state's family, neighbours of one state told apart."""
    pal = _palette(palette)
    index = {d.entry: k for k, d in enumerate(dmap.domains)}
    nbrs = {k: set() for k in range(len(dmap.domains))}
    for b in dmap.boundaries:
        i, j = (index.get(e) for e in b.entries)
        if i is not None and j is not None:
            nbrs[i].add(j)
            nbrs[j].add(i)
    chosen = {}
    for k in sorted(nbrs, key=lambda k: -dmap.domains[k].area):
        state = (
            dmap.domains[k].state
            if dmap.domains[k].state in ("corrosion", "passivation", "immunity")
            else "passivation"
        )
        tints = pal[state]
        used = {chosen[n] for n in nbrs[k] if n in chosen}
        chosen[k] = next((c for c in tints if c not in used), tints[len(chosen) % len(tints)])
    return [chosen[k] for k in range(len(dmap.domains))], pal


def _fill_domains(ax, dmap, colours, pal, *, reading=False, alpha=1.0, zorder=1.0):
    from matplotlib.patches import Polygon as MplPolygon

    for k, d in enumerate(dmap.domains):
        xy = np.asarray(d.polygon.exterior.coords)
        ax.add_patch(
            MplPolygon(
                xy,
                closed=True,
                facecolor=colours[k],
                edgecolor="none",
                lw=0,
                alpha=alpha,
                zorder=zorder,
                gid=f"pourbaix-domain:{k}",
            )
        )
        hatch = _HATCH.get(d.state) if reading else None
        if hatch:
            ax.add_patch(
                MplPolygon(
                    xy,
                    closed=True,
                    facecolor="none",
                    edgecolor=pal["hatch"],
                    lw=0.0,
                    hatch=hatch,
                    zorder=zorder + 0.1,
                    alpha=0.55,
                )
            )


def _draw_boundaries(ax, dmap, *, colour=_INK, lw=0.9, ls="-", zorder=3.0, label=None):
    from matplotlib.collections import LineCollection

    segs = [[b.start, b.end] for b in dmap.boundaries]
    lc = LineCollection(
        segs,
        colors=colour,
        linewidths=lw,
        linestyles=ls,
        zorder=zorder,
        capstyle="round",
        label=label,
    )
    ax.add_collection(lc)
    return lc


def _draw_water(ax, dmap, *, colour=_WATER_COLOUR, lw=1.1, ls=(0, (5, 3)), zorder=2.5):
    x0, x1 = dmap.conditions.ph_range
    ph = np.array([x0, x1])
    lines = []
    for key in ("oxygen", "hydrogen"):
        if key not in dmap.water:
            continue
        e0, s = dmap.water[key]
        (ln,) = ax.plot(
            ph, e0 + s * ph, color=colour, lw=lw, ls=ls, zorder=zorder, gid=f"pourbaix-water:{key}"
        )
        lines.append(ln)
    return lines


def _water_segments(dmap):
    """Return the water lines as segments over the map's pH range (data units)."""
    x0, x1 = dmap.conditions.ph_range
    return [
        [(x0, e0 + s * x0), (x1, e0 + s * x1)]
        for e0, s in (dmap.water[k] for k in ("oxygen", "hydrogen") if k in dmap.water)
    ]


def _neutral_ph(dmap):
    try:
        v = float(dmap.neutral_ph)
    except Exception:  # noqa: BLE001 - thermo may be unavailable for hand-made maps; the marker is optional
        return None
    lo, hi = dmap.conditions.ph_range
    return v if lo < v < hi and math.isfinite(v) else None


def _bottom_band(ax, renderer):
    """Distance from the axes' bottom edge to below its x-axis decorations [pt]."""
    tb = ax.xaxis.get_tightbbox(renderer)
    gap_px = ax.bbox.y0 - tb.y0 if tb is not None else 0.0
    return gap_px * 72.0 / ax.figure.dpi + 5.0


def _add_caption(ax, lines, offset_pt):
    text = "\n".join(lines)
    return ax.annotate(
        text,
        xy=(0.0, 0.0),
        xycoords="axes fraction",
        xytext=(0.0, -offset_pt),
        textcoords="offset points",
        ha="left",
        va="top",
        fontsize=_CAPTION_SIZE,
        color=_CAPTION_COLOUR,
        linespacing=1.45,
        annotation_clip=False,
        gid="pourbaix-caption",
    )


def _bottom_legend(ax, handles, labels, offset_pt, title=None, ncol=None):
    from matplotlib.transforms import ScaledTranslation

    fig = ax.figure
    tr = ax.transAxes + ScaledTranslation(0.0, -offset_pt / 72.0, fig.dpi_scale_trans)
    leg = ax.legend(
        handles,
        labels,
        loc="upper left",
        bbox_to_anchor=(0.0, 0.0),
        bbox_transform=tr,
        ncol=ncol or len(handles),
        frameon=False,
        fontsize=8,
        title=title,
        title_fontsize=8,
        alignment="left",
        borderaxespad=0.0,
        borderpad=0.0,
        handlelength=2.6,
        handleheight=1.0,
        columnspacing=1.6,
    )
    leg.set_gid("pourbaix-legend")
    renderer = _renderer(fig, layout=False)
    if ncol is None or ncol > 1:
        cols = ncol or len(handles)
        while cols > 1 and leg.get_window_extent(renderer).width > ax.bbox.width:
            cols -= 1
            leg.remove()
            return _bottom_legend(ax, handles, labels, offset_pt, title=title, ncol=cols)
    return leg


def _legend_height_pt(leg, renderer):
    ext = leg.get_window_extent(renderer)
    return ext.height * 72.0 / leg.figure.dpi


def _style_axes(ax, dmap_or_window, reference):
    from matplotlib.ticker import AutoMinorLocator, MaxNLocator, MultipleLocator

    x0, x1, y0, y1 = dmap_or_window
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)
    ax.set_xlabel("pH", fontsize=11)
    ax.set_ylabel(_axis_label(reference), fontsize=11)
    span = x1 - x0
    if 6 <= span <= 24:
        ax.xaxis.set_major_locator(MultipleLocator(2))
        ax.xaxis.set_minor_locator(MultipleLocator(1))
    else:
        ax.xaxis.set_major_locator(MaxNLocator(10, steps=[1, 2, 5, 10]))
        ax.xaxis.set_minor_locator(AutoMinorLocator())
    ax.yaxis.set_major_locator(MaxNLocator(9, steps=[1, 2, 2.5, 5, 10]))
    ax.yaxis.set_minor_locator(AutoMinorLocator())
    ax.tick_params(which="both", direction="out", labelsize=9.5, color=_INK)
    ax.tick_params(which="major", length=4.5, width=0.8)
    ax.tick_params(which="minor", length=2.5, width=0.6)
    for sp in ax.spines.values():
        sp.set_linewidth(0.9)
        sp.set_color(_INK)
        sp.set_zorder(9)
    ax.set_facecolor("white")


def _second_shift(dmap, name):
    """Name of the second reference and the shift E_second - E_map [V] (pH-independent only)."""
    from pourbaix.physics import electrodes

    c = dmap.conditions
    ref = electrodes.get_reference(name)  # OptionError listing the valid names
    if c.reference_slope_v_per_ph:
        raise OptionError(
            f"the map is drawn vs {c.reference}, a pH-dependent reference; a second potential axis "
            "needs a map drawn vs a fixed reference (e.g. SHE)"
        )
    if ref.name == "RHE":
        raise OptionError(
            f"second_reference {name!r} is pH-dependent; a pH-dependent reference cannot be a second "
            "potential axis (give a fixed reference such as SCE, Ag/AgCl-sat or Cu/CuSO4)"
        )
    off0 = float(electrodes.reference_offset(ref.name, c.temperature_c, ph=0.0))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # a range warning was already given for this electrode
        off1 = float(electrodes.reference_offset(ref.name, c.temperature_c, ph=1.0))
    if abs(off1 - off0) > 1e-12:
        raise OptionError(
            f"second_reference {name!r} is pH-dependent; a pH-dependent reference cannot be a second "
            "potential axis (give a fixed reference such as SCE, Ag/AgCl-sat or Cu/CuSO4)"
        )
    # E_SHE = E_map + off_map = E_second + off_second  ->  E_second = E_map + (off_map - off_second)
    return ref.name, c.reference_offset_v - off0


def _second_axis(ax, name, shift):
    """Add a potential axis on the right in another (pH-independent) reference."""
    sec = ax.secondary_yaxis("right", functions=(lambda e: e + shift, lambda e: e - shift))
    sec.set_ylabel(_axis_label(name), fontsize=11)
    sec.tick_params(which="both", direction="out", labelsize=9.5, color=_INK)
    sec.set_gid("pourbaix-second-axis")
    sec.spines["right"].set_linewidth(0.9)
    sec.spines["right"].set_color(_INK)
    return sec


# ------------------------------------------------------------------ public
def draw_map(
    dmap,
    ax=None,
    *,
    reading=False,
    second_reference=None,
    caption=True,
    water=True,
    labels=True,
    palette="default",
    title=None,
):
    """Draw a potential-pH map: filled domains, labels, boundaries, water lines, caption.

    Parameters
    ----------
    dmap : DomainMap
        The map to draw (potentials vs its own reference).
    ax : matplotlib.axes.Axes, optional
        Axes to draw onto; a new figure of :data:`FIGURE_SIZE_IN` is made when None.
    reading : bool
        Add the corrosion reading: hatching on corrosion domains, a legend of
        the three states and the caution that passivation is thermodynamic only.
    second_reference : str, optional
        Name of a reference electrode for a second potential axis on the
        right, e.g. ``"SCE"`` (must not depend on pH).
    caption : bool
        Add the caption of conditions below the axes.
    water : bool
        Draw and label the two water lines and mark neutral pH.
    labels : bool
        Label the domains.
    palette : str or dict
        ``"default"`` or ``"grey"``, or a dict of tints per state
        (``corrosion``, ``passivation``, ``immunity``; optional ``hatch``).
    title : str or False, optional
        Title; None gives the element system, False or "" gives none.

    Returns
    -------
    matplotlib.axes.Axes
        The Axes drawn on.

    Raises
    ------
    OptionError
        For an unknown palette or reference, or a pH-dependent second reference.

    Notes
    -----
    Labels are placed after the axes are laid out, in display units: a label
    goes at the domain's interior pole if its text box fits inside the
    polygon (else elsewhere inside, else in a smaller size), otherwise outside
    in a white box with a leader line, at the nearest free position. Resize
    the figure before drawing, not after, to keep that placement.

    Examples
    --------
    >>> from pourbaix import compute_map
    >>> ax = draw_map(compute_map("Cu"), second_reference="SCE")
    >>> ax.get_ylabel()
    'E / V vs SHE'
    """
    # check every choice before anything is drawn
    colours, pal = _domain_colours(dmap, palette)
    second = _second_shift(dmap, second_reference) if second_reference else None
    own = ax is None
    c = dmap.conditions
    extra = [_READING_CAUTION] if reading else []
    if own:
        fig, ax = _new_axes()
        right = 0.885 if second_reference else 0.965
        width_pt = (right - 0.105) * fig.get_figwidth() * 72.0
        cap = _caption_lines(c, extra, dmap, width_pt) if caption else []
        _fit_bottom(fig, 44 + (22 if reading else 0) + _CAPTION_LINE_PT * len(cap) + 6, right=right)
    else:
        width_pt = ax.get_position().width * ax.figure.get_figwidth() * 72.0
        cap = _caption_lines(c, extra, dmap, width_pt) if caption else []
    fig = ax.figure
    _style_axes(ax, (*c.ph_range, *c.potential_range_v), c.reference)
    _fill_domains(ax, dmap, colours, pal, reading=reading)
    _draw_boundaries(ax, dmap)
    if second is not None:
        _second_axis(ax, *second)
    neutral = _neutral_ph(dmap) if water else None
    if water:
        _draw_water(ax, dmap)
        if neutral is not None:
            ax.axvline(
                neutral,
                color="#4a4a4a",
                lw=0.7,
                ls=(0, (1, 2.2)),
                zorder=2.2,
                gid="pourbaix-neutral",
            )
    if title is None:
        ax.set_title(
            _system_text(c),
            loc="left",
            fontsize=12.5,
            fontweight="bold",
            color=_INK,
            pad=8,
            y=_title_y(ax),
        )
        ax.set_title(
            f"{c.temperature_c:g} °C  ·  {_activity_text(c)}",
            loc="right",
            fontsize=9,
            color="#4a4a4a",
            pad=8,
            y=_title_y(ax),
        )
    elif title:
        ax.set_title(
            title, loc="left", fontsize=12.5, fontweight="bold", color=_INK, pad=8, y=_title_y(ax)
        )
    # legend and caption first, so a layout engine makes room for them before labels are placed
    renderer = _renderer(fig, layout=False)
    offset = _bottom_band(ax, renderer)
    if reading:
        from matplotlib.patches import Patch

        handles = [
            Patch(
                facecolor=pal[s][0],
                edgecolor=_INK,
                linewidth=0.5,
                hatch=_HATCH[s] if _HATCH[s] else None,
            )
            for s in ("immunity", "passivation", "corrosion")
        ]
        leg = _bottom_legend(
            ax,
            handles,
            [_STATE_NAMES[s] for s in ("immunity", "passivation", "corrosion")],
            offset,
            title=None,
            ncol=3,
        )
        offset += _legend_height_pt(leg, renderer) + 5
    if cap:
        _add_caption(ax, cap, offset)
    renderer = _renderer(fig)
    if labels:
        soft = []
        if water:
            soft = [tuple(map(tuple, ax.transData.transform(seg))) for seg in _water_segments(dmap)]
            if neutral is not None:
                soft.append(
                    tuple(
                        map(
                            tuple,
                            ax.transData.transform(
                                [
                                    (neutral, c.potential_range_v[0]),
                                    (neutral, c.potential_range_v[1]),
                                ]
                            ),
                        )
                    )
                )
        placer, pending, polys_px, poles_px = _label_domains(
            ax, dmap, renderer, colours, soft_lines=soft
        )
    else:
        placer, pending, polys_px, poles_px = _Placer(ax, renderer), [], [], []
    placer.add_lines([(b.start, b.end) for b in dmap.boundaries])
    if neutral is not None:
        placer.add_lines([((neutral, c.potential_range_v[0]), (neutral, c.potential_range_v[1]))])
    if water:
        texts = {"oxygen": "O₂/H₂O", "hydrogen": "H₂O/H₂"}
        for key, above in (("oxygen", True), ("hydrogen", False)):
            if key in dmap.water:
                e0, s = dmap.water[key]
                _label_line(
                    ax,
                    placer,
                    texts[key],
                    e0,
                    s,
                    colour=_WATER_COLOUR,
                    above=above,
                    gid=f"pourbaix-label:water:{key}",
                )
        if neutral is not None:
            placer.lines.pop()  # its own line does not count against the neutral note
            _label_neutral(ax, placer, neutral)
    if labels:
        if _needs_numbers(ax, dmap, placer, pending):
            numbers = _number_pending(ax, dmap, placer, pending, polys_px, poles_px)
            _draw_key(ax, dmap, numbers, renderer, grow=own)
        else:
            _label_pending(ax, dmap, placer, pending, polys_px, poles_px)
    return ax


def _label_neutral(ax, placer, neutral):
    """Small note beside the neutral-pH line, upright or level, at a free spot."""
    y0, y1 = ax.get_ylim()
    t = ax.text(
        0, 0, f"neutral pH {neutral:.2f}", fontsize=7, color="#262626", va="center", zorder=6
    )
    fallback = None
    for rotation in (90, 0):
        t.set_rotation(rotation)
        for f in (0.86, 0.14, 0.75, 0.25, 0.64, 0.36, 0.5, 0.95, 0.05):
            for side in (1, -1):
                t.set_ha("left" if side > 0 else "right")
                p = ax.transData.transform((neutral, y0 + f * (y1 - y0)))
                t.set_position(placer.to_data((p[0] + side * 3.0 * placer.px_per_pt, p[1])))
                ext = t.get_window_extent(placer.renderer)
                box = np.array([[ext.x0, ext.y0, ext.x1, ext.y1]])
                if placer.clear(box)[0]:
                    if not placer.crosses_lines(box[0], clearance_pt=1.5):
                        placer.take(box[0])
                        t.set_gid("pourbaix-label:neutral")
                        return t
                    if fallback is None:
                        fallback = (rotation, t.get_ha(), t.get_position(), box[0])
    if fallback is not None:
        rotation, ha, pos, box = fallback
        t.set_rotation(rotation)
        t.set_ha(ha)
        t.set_position(pos)
        placer.take(box)
        t.set_gid("pourbaix-label:neutral")
        return t
    t.remove()
    return None


def _condition_labels(maps):
    """Legend text per map from the conditions that differ between them."""
    cs = [m.conditions for m in maps]

    def differs(get):
        vals = [get(c) for c in cs]
        return any(v != vals[0] for v in vals[1:])

    parts = [[] for _ in maps]
    if differs(lambda c: c.temperature_c):
        for p, c in zip(parts, cs, strict=True):
            p.append(f"{c.temperature_c:g} °C")
    if differs(lambda c: round(c.pressure_bar, 6)) and not differs(lambda c: c.temperature_c):
        for p, c in zip(parts, cs, strict=True):
            p.append(f"{c.pressure_bar:.4g} bar")
    if differs(lambda c: (c.activity, c.molality)):
        for p, c in zip(parts, cs, strict=True):
            p.append(
                f"{_sci(c.molality)} mol/kg"
                if c.molality is not None
                else f"activity {_sci(c.activity)}"
            )
    if differs(lambda c: c.ionic_strength):
        for p, c in zip(parts, cs, strict=True):
            p.append(f"I = {c.ionic_strength:g}")
    if differs(lambda c: (c.dataset, tuple(c.data_files))):
        for p, c in zip(parts, cs, strict=True):
            p.append(
                f"data set {c.dataset}"
                + (" + " + ", ".join(Path(f).name for f in c.data_files) if c.data_files else "")
            )
    if differs(lambda c: dict(c.ligands)):
        for p, c in zip(parts, cs, strict=True):
            p.append(", ".join(f"{k} {_sci(v)}" for k, v in c.ligands.items()) or "no ligands")
    if differs(lambda c: c.elements):
        for p, c in zip(parts, cs, strict=True):
            p.append(_system_text(c))
    return [", ".join(p) if p else f"map {k + 1}" for k, p in enumerate(parts)]


def draw_overlay(maps, ax=None, *, labels=None, caption=True):
    """Overlay the boundaries of several maps, one line style per map.

    For sweeps over temperature or activity, or two data sets: the first
    map's domains are shaded and labelled lightly, every map's boundaries
    and water lines are drawn in its own style, and a legend names each
    condition.

    Parameters
    ----------
    maps : sequence of DomainMap
        Two to six maps vs the same reference electrode.
    ax : matplotlib.axes.Axes, optional
        Axes to draw onto; a new figure is made when None.
    labels : sequence of str, optional
        Legend text per map; by default built from the conditions that differ.
    caption : bool
        Add the caption of the conditions the maps share.

    Returns
    -------
    matplotlib.axes.Axes

    Raises
    ------
    OptionError
        For fewer than one or more than six maps, mismatched labels, or maps
        drawn vs different references.

    Examples
    --------
    >>> from pourbaix import compute_sweep
    >>> ax = draw_overlay(compute_sweep("Zn", activities=[1e-6, 1e-4]))
    >>> [t.get_text() for t in ax.get_legend().get_texts()]
    ['activity 10⁻⁶', 'activity 10⁻⁴']
    """
    maps = list(maps)
    if not 1 <= len(maps) <= len(_OVERLAY_STYLES):
        raise OptionError(f"draw_overlay takes 1 to {len(_OVERLAY_STYLES)} maps, got {len(maps)}")
    refs = {
        (
            m.conditions.reference,
            round(m.conditions.reference_offset_v, 9),
            m.conditions.reference_slope_v_per_ph,
        )
        for m in maps
    }
    if len(refs) > 1:
        names = ", ".join(sorted({r[0] for r in refs}))
        raise OptionError(
            f"maps in an overlay must be drawn vs one reference electrode; got {names}"
        )
    if labels is None:
        labels = _condition_labels(maps)
    else:
        labels = [str(s) for s in labels]
        if len(labels) != len(maps):
            raise OptionError(f"labels: give one per map ({len(maps)}), got {len(labels)}")
    own = ax is None
    if own:
        fig, ax = _new_axes()
        width_pt = (0.965 - 0.105) * fig.get_figwidth() * 72.0
        cap = _pack(_shared_caption(maps, labels), width_pt, _CAPTION_SIZE) if caption else []
        rows = math.ceil(len(maps) / 4)
        _fit_bottom(fig, 44 + 18 * rows + 4 + _CAPTION_LINE_PT * len(cap) + 6, right=0.965)
    else:
        width_pt = ax.get_position().width * ax.figure.get_figwidth() * 72.0
        cap = _pack(_shared_caption(maps, labels), width_pt, _CAPTION_SIZE) if caption else []
    fig = ax.figure
    first = maps[0]
    c = first.conditions
    x0 = min(m.conditions.ph_range[0] for m in maps)
    x1 = max(m.conditions.ph_range[1] for m in maps)
    y0 = min(m.conditions.potential_range_v[0] for m in maps)
    y1 = max(m.conditions.potential_range_v[1] for m in maps)
    _style_axes(ax, (x0, x1, y0, y1), c.reference)
    colours, pal = _domain_colours(first, "default")
    _fill_domains(ax, first, colours, pal, alpha=0.45)
    from matplotlib.lines import Line2D

    handles = []
    one_water = _same_water(maps)
    if one_water:
        _draw_water(ax, first, colour="#4d4d4d", lw=0.9, ls=(0, (1.2, 2.2)))
    for k, m in enumerate(maps):
        colour, ls, lw = _OVERLAY_STYLES[k]
        _draw_boundaries(ax, m, colour=colour, lw=lw, ls=ls, zorder=3.0 + 0.1 * (len(maps) - k))
        if not one_water:
            _draw_water(ax, m, colour=colour, lw=0.8, ls=(0, (2, 2.5)), zorder=2.4)
        handles.append(Line2D([], [], color=colour, ls=ls, lw=lw))
    ax.set_title(
        _system_text(c),
        loc="left",
        fontsize=12.5,
        fontweight="bold",
        color=_INK,
        pad=8,
        y=_title_y(ax),
    )
    ax.set_title(
        f"boundaries of {len(maps)} maps overlaid",
        loc="right",
        fontsize=9,
        color="#4a4a4a",
        pad=8,
        y=_title_y(ax),
    )
    renderer = _renderer(fig, layout=False)
    offset = _bottom_band(ax, renderer)
    leg = _bottom_legend(ax, handles, labels, offset, ncol=min(len(maps), 4))
    offset += _legend_height_pt(leg, renderer) + 5
    if cap:
        _add_caption(ax, cap, offset)
    renderer = _renderer(fig)
    soft = []
    for m in maps:
        segs = _water_segments(m) + ([] if m is first else [[b.start, b.end] for b in m.boundaries])
        soft += [tuple(map(tuple, ax.transData.transform(seg))) for seg in segs]
    placer, pending, polys_px, poles_px = _label_domains(
        ax, first, renderer, colours, light=True, soft_lines=soft
    )
    if one_water:
        placer.add_lines([(b.start, b.end) for m in maps for b in m.boundaries])
        texts = {"oxygen": "O₂/H₂O", "hydrogen": "H₂O/H₂"}
        for key, above in (("oxygen", True), ("hydrogen", False)):
            if key in first.water:
                e0, sl = first.water[key]
                _label_line(
                    ax,
                    placer,
                    texts[key],
                    e0,
                    sl,
                    colour="#3a3a3a",
                    size=7.5,
                    above=above,
                    gid=f"pourbaix-label:water:{key}",
                )
    _label_pending(ax, first, placer, pending, polys_px, poles_px, light=True)
    return ax


def _same_water(maps):
    """Tell whether every map has the same water lines (within 0.1 mV)."""
    ref = maps[0].water
    return all(
        set(m.water) == set(ref)
        and all(abs(a - b) < 1e-4 for k in ref for a, b in zip(m.water[k], ref[k], strict=True))
        for m in maps[1:]
    )


def _shared_caption(maps, labels):
    """Caption of an overlay as logical lines of parts: what the maps share, and how to read it."""
    cs = [m.conditions for m in maps]
    c = cs[0]

    def same(get):
        return all(get(x) == get(c) for x in cs[1:])

    shared = [_system_text(c)]
    if same(lambda x: x.temperature_c):
        shared.append(f"{c.temperature_c:g} °C")
    if same(lambda x: round(x.pressure_bar, 6)):
        shared.append(f"{c.pressure_bar:.4g} bar")
    if same(lambda x: (x.activity, x.molality)):
        shared.append(_activity_text(c))
    if same(lambda x: x.ionic_strength):
        if c.ionic_strength:
            model = f", {c.activity_model} model" if c.activity_model else ""
            shared.append(f"I = {c.ionic_strength:g} mol/kg{model}")
        else:
            shared.append("I = 0")
    if same(lambda x: (x.dataset, tuple(x.data_files))):
        shared.append(f"data set: {c.dataset}")
    shared.append(f"potentials vs {c.reference}")
    n_warn = sum(len(m.warnings) for m in maps)
    lines = [
        shared,
        [
            f"Shading and labels: {labels[0]}.",
            "Grey dotted: the water lines, the same for every map."
            if _same_water(maps)
            else "Dotted lines in each map's colour: the water lines at that map's conditions.",
        ],
    ]
    if n_warn:
        lines.append(
            [
                f"{n_warn} warning{'s' if n_warn > 1 else ''} with these maps (data routes, model limits): see each map's warnings."
            ]
        )
    return lines


def draw_points(ax, ph, potential_v, labels=None, path=False, **style):
    """Draw measured field points on a map.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes of a map (from :func:`draw_map`).
    ph : float or array_like
        Measured pH values.
    potential_v : float or array_like
        Measured potentials, already converted to the map's reference [V vs the map's reference].
    labels : sequence of str, optional
        A short label per point (sample name or date).
    path : bool
        Join the points in order with arrows (a time series).
    **style
        Marker style passed to ``Axes.plot`` (e.g. ``marker="o"``, ``color="k"``).

    Returns
    -------
    matplotlib.axes.Axes

    Raises
    ------
    ConditionsError
        If a value is not a finite number, or pH and potentials differ in length.
    OptionError
        If the number of labels does not match the points.

    Examples
    --------
    >>> from pourbaix import compute_map
    >>> ax = draw_map(compute_map("Fe"))
    >>> ax = draw_points(ax, [6.8, 7.4], [-0.55, -0.3], labels=["May", "June"], path=True)
    """
    x = np.atleast_1d(np.asarray(ph, dtype=float)).ravel()
    y = np.atleast_1d(np.asarray(potential_v, dtype=float)).ravel()
    if x.shape != y.shape:
        raise ConditionsError(
            f"draw_points: {x.size} pH values but {y.size} potentials; give one of each per point"
        )
    bad = np.flatnonzero(~(np.isfinite(x) & np.isfinite(y)))
    if bad.size:
        raise ConditionsError(
            f"draw_points: point {int(bad[0]) + 1} is not a finite (pH, potential) pair"
        )
    if labels is not None:
        labels = [str(s) for s in labels]
        if len(labels) != x.size:
            raise OptionError(
                f"draw_points: {len(labels)} labels for {x.size} points; give one per point"
            )
    kw = dict(
        marker="D",
        ms=5.5,
        mfc="white",
        mec="#111111",
        mew=1.1,
        ls="none",
        zorder=10,
        gid="pourbaix-points",
    )
    kw.update(style)
    ax.plot(x, y, **kw)
    if path and x.size > 1:
        colour = kw.get("mec", kw.get("color", "#111111"))
        for k in range(x.size - 1):
            ax.annotate(
                "",
                xy=(x[k + 1], y[k + 1]),
                xytext=(x[k], y[k]),
                arrowprops=dict(
                    arrowstyle="-|>,head_length=0.45,head_width=0.22",
                    color=colour,
                    lw=0.9,
                    shrinkA=4.5,
                    shrinkB=4.5,
                ),
                zorder=9.5,
                gid="pourbaix-path",
            )
    if labels:
        _label_points(ax, x, y, labels)
    return ax


def _label_points(ax, x, y, labels):
    renderer = _renderer(ax.figure)
    placer = _Placer(ax, renderer)
    for t in ax.texts:
        if t.get_visible() and t.get_text():
            e = t.get_window_extent(renderer)
            placer.take((e.x0, e.y0, e.x1, e.y1))
    ppt = placer.px_per_pt
    pts = ax.transData.transform(np.column_stack([x, y]))
    for p in pts:  # the markers themselves
        r = 4 * ppt
        placer.take((p[0] - r, p[1] - r, p[0] + r, p[1] + r))
    offsets = [(1, 1), (1, -1), (-1, 1), (-1, -1), (1, 0), (-1, 0), (0, 1), (0, -1)]
    for k, (p, text) in enumerate(zip(pts, labels, strict=True)):
        t = ax.text(
            0,
            0,
            text,
            fontsize=7.5,
            color="#111111",
            ha="center",
            va="center",
            zorder=11,
            gid=f"pourbaix-label:point:{k}",
        )
        t.set_bbox(dict(boxstyle="round,pad=0.12", facecolor="white", edgecolor="none", alpha=0.85))
        w, h, ox, oy = placer.measure(t)
        done = False
        for dist in (5, 9, 14):
            for sx, sy in offsets:
                c = (p[0] + sx * (dist * ppt + w / 2), p[1] + sy * (dist * ppt + h / 2))
                box = _boxes_at(c, w, h)
                if placer.clear(box)[0]:
                    t.set_position(placer.to_data((c[0] - ox, c[1] - oy)))
                    placer.take(box[0])
                    done = True
                    break
            if done:
                break
        if not done:  # crowded: next to the point anyway
            c = (p[0] + 5 * ppt + w / 2, p[1] + 5 * ppt + h / 2)
            t.set_position(placer.to_data((c[0] - ox, c[1] - oy)))


def save_figure(fig_or_ax, path, dpi=200):
    """Save a figure as PNG, SVG or PDF (chosen by the extension), atomically.

    Parameters
    ----------
    fig_or_ax : matplotlib.figure.Figure or matplotlib.axes.Axes
        The figure, or any Axes on it.
    path : str or Path
        Destination; ``.png``, ``.svg`` or ``.pdf``.
    dpi : float
        Resolution for PNG [dots per inch].

    Returns
    -------
    str or Path
        ``path``, as given.

    Raises
    ------
    OptionError
        For an extension other than .png, .svg, .pdf.
    ExportError
        If the folder is missing or not writable; no partial file is left.

    Examples
    --------
    >>> import tempfile, os
    >>> from pourbaix import compute_map
    >>> ax = draw_map(compute_map("Zn"))
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     path = save_figure(ax, os.path.join(folder, "zn.svg"))
    ...     os.path.getsize(path) > 0
    True
    """
    from pourbaix.outputs import atomic_write_with

    ext = Path(path).suffix.lower()
    if ext not in _FORMATS:
        raise OptionError(
            f"cannot save a figure as {Path(path).name!r}: the extension must be one of {', '.join(_FORMATS)}"
        )
    fig = getattr(fig_or_ax, "figure", None) if not hasattr(fig_or_ax, "savefig") else fig_or_ax
    if fig is None or not hasattr(fig, "savefig"):
        raise OptionError(
            f"save_figure needs a matplotlib Figure or Axes, got {type(fig_or_ax).__name__}"
        )
    fmt = _FORMATS[ext]
    atomic_write_with(path, lambda tmp: fig.savefig(tmp, dpi=dpi, format=fmt, facecolor="white"))
    return path
