"""Label placement without overlaps: domain labels, boxed labels with leaders, numbered callouts and their key, line labels, point labels.

Placement works in display units (pixels) after the axes are laid out; a
greedy placer keeps every box taken so far and the axes frame.
"""

from __future__ import annotations

import math

import numpy as np

from pourbaix.plot.style import (
    BOX_PAD_PT,
    INK,
    LABEL_SIZE,
    SMALL_LABEL_SIZE,
    get_renderer,
)

__all__ = [
    "Placer",
    "draw_key",
    "label_domains",
    "label_line",
    "label_neutral",
    "label_pending",
    "label_points",
    "needs_numbers",
    "number_pending",
    "readable_pending",
    "unlabelled_note",
]


# ------------------------------------------------------------- placement
class Placer:
    """Greedy label placement in display coordinates (pixels).

    Keeps the boxes already taken and the axes frame; a candidate box is free
    when it lies inside the frame and overlaps no taken box.
    """

    def __init__(self, ax, renderer):
        self.ax = ax
        self.renderer = renderer
        self.px_per_pt = ax.figure.dpi / 72.0
        self.pad = BOX_PAD_PT * self.px_per_pt
        b = ax.bbox
        self.frame = (b.x0 + self.pad, b.y0 + self.pad, b.x1 - self.pad, b.y1 - self.pad)
        self.boxes = np.zeros((0, 4))
        self.lines = []  # boundary segments in display units, kept clear by line labels
        self.leaders = []  # leader lines drawn so far, display units
        self.soft_lines = []  # water and neutral lines: kept clear where there is a choice
        self._advances = {}  # (size, character) -> advance width [px]
        self._line_heights = {}  # size -> height of a line of text [px]

    def add_lines(self, segments_data):
        """Register boundary segments (data units) that line labels should not cross."""
        for a, b in segments_data:
            self.lines.append(
                (tuple(self.ax.transData.transform(a)), tuple(self.ax.transData.transform(b)))
            )

    def lines_hit(self, boxes, clearance_pt=1.0, soft=False):
        """For each box [px], whether a boundary (or, with ``soft``, a water) line crosses it."""
        c = clearance_pt * self.px_per_pt
        grown = np.atleast_2d(boxes) + np.array([-c, -c, c, c])
        return _segments_hit_boxes(self.soft_lines if soft else self.lines, grown)

    def crosses_lines(self, box, clearance_pt=3.0):
        """Whether a box (grown by the clearance) crosses a registered boundary segment."""
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

    def least_size(self, text, fontsize):
        """Lower bounds of the width and height of a label's box [px], without laying it out.

        Laying out a text (glyph shaping) is the costly part of placing
        labels. A box at least this large is what the exact measure
        (:meth:`measure`) would give: the height of a blank line in the size
        (matplotlib sets every line at least the font's ascent and descent), and
        ``_ADVANCE_SHARE`` of the sum of the characters' advance widths on
        the longest line (kerning and side bearings take far less; no width
        for mathtext). A domain too small for these is skipped without
        measuring the label.
        """
        height = self._line_heights.get(fontsize)
        if height is None:
            # a blank line: no ink, so its box is the least any line of text gets
            probe = self.ax.text(0, 0, " ", fontsize=fontsize)
            height = self.measure(probe)[1]
            probe.remove()
            self._line_heights[fontsize] = height
        if "$" in text:  # mathtext: the source is no guide to the width
            return 0.0, height
        width = 0.0
        font = None
        for line in text.split("\n"):
            line_width = 0.0
            for ch in line:
                adv = self._advances.get((fontsize, ch))
                if adv is None:
                    if font is None:
                        font = _font_at(fontsize, self.ax.figure.dpi)
                    adv = font.load_char(ord(ch)).linearHoriAdvance / 65536.0
                    self._advances[(fontsize, ch)] = adv
                line_width += adv
            width = max(width, line_width)
        return _ADVANCE_SHARE * width, height

    def inside_frame(self, boxes):
        """Tell which boxes lie inside the axes frame (less the clearance)."""
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
        """Mark a box [px] as taken; returns its row (for :meth:`release`)."""
        self.boxes = np.vstack([self.boxes, np.asarray(box, dtype=float)[None, :]])
        return len(self.boxes) - 1

    def release(self, row):
        """Free a box taken before (its row stays, as NaN, so later rows keep their numbers)."""
        self.boxes[row] = np.nan

    def retake(self, row, box):
        """Put a released box back, or move it."""
        self.boxes[row] = np.asarray(box, dtype=float)

    def to_data(self, xy):
        """Convert display coordinates [px] to data coordinates."""
        return self.ax.transData.inverted().transform(xy)


# Share of the summed advance widths a label's box is sure to exceed (kerning and
# side bearings of the figures' sans-serif font change a label's width by a few per cent).
_ADVANCE_SHARE = 0.8


def _font_at(fontsize, dpi):
    """The font of plain text (matplotlib's default family) set to a size [pt] and dpi."""
    from matplotlib.font_manager import FontProperties, findfont, get_font

    font = get_font(findfont(FontProperties(size=fontsize)))
    font.set_size(fontsize, dpi)
    return font


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
    return _hit_matrix(segments, boxes).any(axis=1)


def _hit_matrix(segments, boxes):
    """Whether segment s crosses box k, as a (K, S) array (Liang-Barsky clipping).

    Only the pairs whose bounding boxes meet are clipped (a segment outside a
    box's bounds cannot cross it); on a crowded map most pairs are far apart.
    """
    boxes = np.atleast_2d(np.asarray(boxes, dtype=float))
    s = np.asarray(segments, dtype=float).reshape(-1, 4)
    near = (
        (boxes[:, 0:1] <= np.maximum(s[:, 0], s[:, 2]))
        & (boxes[:, 2:3] >= np.minimum(s[:, 0], s[:, 2]))
        & (boxes[:, 1:2] <= np.maximum(s[:, 1], s[:, 3]))
        & (boxes[:, 3:4] >= np.minimum(s[:, 1], s[:, 3]))
    )
    k, j = np.nonzero(near)
    if not len(k):
        return near
    x0, y0 = s[j, 0], s[j, 1]  # one entry per pair
    dx, dy = s[j, 2] - x0, s[j, 3] - y0
    bx0, by0, bx1, by1 = (boxes[k, c] for c in range(4))
    # the four clipping conditions p_c t <= q_c
    pk = np.stack([-dx, dx, -dy, dy])
    qk = np.stack([x0 - bx0, bx1 - x0, y0 - by0, by1 - y0])
    parallel_out = np.any((pk == 0) & (qk < 0), axis=0)
    with np.errstate(divide="ignore", invalid="ignore"):
        r = qk / pk
    t0 = np.max(np.where(pk < 0, r, 0.0), axis=0)
    t1 = np.min(np.where(pk > 0, r, 1.0), axis=0)
    near[k, j] = ~parallel_out & (t0 <= t1)
    return near


def _cross_matrix(first, second):
    """Whether segment i of ``first`` properly crosses segment j of ``second``, shape (I, J)."""
    a = np.asarray(first, dtype=float).reshape(-1, 1, 4)
    b = np.asarray(second, dtype=float).reshape(1, -1, 4)

    def orient(ux, uy, vx, vy, wx, wy):
        return (vx - ux) * (wy - uy) - (vy - uy) * (wx - ux)

    d1 = orient(b[..., 0], b[..., 1], b[..., 2], b[..., 3], a[..., 0], a[..., 1])
    d2 = orient(b[..., 0], b[..., 1], b[..., 2], b[..., 3], a[..., 2], a[..., 3])
    d3 = orient(a[..., 0], a[..., 1], a[..., 2], a[..., 3], b[..., 0], b[..., 1])
    d4 = orient(a[..., 0], a[..., 1], a[..., 2], a[..., 3], b[..., 2], b[..., 3])
    return (d1 * d2 < 0) & (d3 * d4 < 0)


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


def _convex_sides(ring):
    """Unit inward normals and offsets of a convex ring's sides, or None if it is not convex.

    ``ring`` is the closed ring (last point = first). A point p lies inside
    where ``normals @ p - offsets >= 0`` for every side.
    """
    pts = ring[:-1] if len(ring) > 1 and np.array_equal(ring[0], ring[-1]) else ring
    edges = np.roll(pts, -1, axis=0) - pts
    lengths = np.hypot(edges[:, 0], edges[:, 1])
    keep = lengths > 1e-9
    pts, edges, lengths = pts[keep], edges[keep], lengths[keep]
    if len(pts) < 3:
        return None
    turn = (
        edges[:, 0] * np.roll(edges, -1, axis=0)[:, 1]
        - edges[:, 1] * np.roll(edges, -1, axis=0)[:, 0]
    )
    scale = 1e-9 * lengths.max() ** 2
    if np.all(turn >= -scale):
        sign = 1.0  # counter-clockwise
    elif np.all(turn <= scale):
        sign = -1.0
    else:
        return None
    normals = sign * np.column_stack([-edges[:, 1], edges[:, 0]]) / lengths[:, None]
    return normals, np.einsum("ij,ij->i", normals, pts)


def _side_distances(sides, points):
    """Signed distance [px] of each point to each side's line (positive inside)."""
    normals, offsets = sides
    return points @ normals.T - offsets[None, :]


def _fit_inside(placer, poly_px, w, h, soft_lines=(), hard_lines=()):
    """Centre for a w x h label box inside a display polygon; None if none fits.

    Candidates on a grid over the polygon are kept if the box (with the
    clearance) lies inside and is free; among them the one with the most room
    around the box wins (distance to the edge measured with x scaled by the
    box's aspect, so a wide label looks for a wide spot), ties going to the
    spot nearest the centroid. Spots whose box a water line crosses are used
    only when there is no other; spots a line of ``hard_lines`` (leaders)
    crosses are never used.
    """
    import shapely
    from shapely import affinity

    x0, y0, x1, y1 = poly_px.bounds
    if x1 - x0 - 2 * placer.pad < w or y1 - y0 - 2 * placer.pad < h:
        return None  # the shrunk polygon's bounds lie within these
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
    ok = placer.clear(boxes)
    sides = _convex_sides(np.asarray(shrunk.exterior.coords))
    if sides is not None:  # a convex polygon holds a box when it holds its four corners
        corners = boxes[:, [[0, 1], [2, 1], [2, 3], [0, 3]]].reshape(-1, 2)
        ok &= (_side_distances(sides, corners).min(axis=1) >= -1e-9).reshape(-1, 4).all(axis=1)
    elif ok.any():
        rows = np.flatnonzero(ok)
        geoms = shapely.box(boxes[rows, 0], boxes[rows, 1], boxes[rows, 2], boxes[rows, 3])
        ok[rows] = shapely.contains(shrunk, geoms)
    if len(hard_lines) and ok.any():
        rows = np.flatnonzero(ok)
        ok[rows] = ~_segments_hit_boxes(hard_lines, boxes[rows])
    if not ok.any():
        return None
    k = np.flatnonzero(ok)
    sx = h / max(w, 1e-9)
    scaled_xy = np.asarray(poly_px.exterior.coords) * np.array([sx, 1.0])
    scaled_sides = _convex_sides(scaled_xy)
    if scaled_sides is not None:
        # inside a convex polygon the distance to its boundary is the least distance to
        # the lines of its sides
        room = _side_distances(scaled_sides, centres[k] * np.array([sx, 1.0])).min(axis=1)
    else:
        scaled = affinity.scale(poly_px, xfact=sx, yfact=1.0, origin=(0, 0))
        room = shapely.distance(shapely.points(centres[k, 0] * sx, centres[k, 1]), scaled.exterior)
    cen = shapely.Polygon(scaled_xy).centroid
    near = np.hypot(centres[k, 0] * sx - cen.x, centres[k, 1] - cen.y)
    score = room - 0.15 * near
    if soft_lines:
        c = 1.5 * placer.px_per_pt
        crossed = _segments_hit_boxes(soft_lines, boxes[k] + np.array([-c, -c, c, c]))
        if not crossed.all():
            score = np.where(crossed, -np.inf, score)
    return tuple(centres[k[int(np.argmax(score))]])


def place_callout(placer, pole_px, w, h, avoid_points=(), avoid_polys=()):
    """Centre [px] for a callout (boxed label or numbered circle) drawn away from its domain.

    The box must be free (inside the frame, clear of every box taken) and is
    kept, in this order of preference, off the boundary lines, off the leaders
    already drawn, and with its own leader running through no other box and
    crossing no other leader; among the spots that keep the most of these, the
    nearest to the domain's label point wins (water lines and the label points
    of domains still to be labelled count against a spot). Returns None when
    no free spot exists.
    """
    import shapely

    ppt = placer.px_per_pt
    radii = np.array([10, 16, 24, 34, 46, 60, 78, 100, 128, 160, 200, 250, 310, 380]) * ppt
    angles = np.deg2rad(np.arange(0, 360, 15) + 7.5)
    rr, aa = np.meshgrid(radii, angles, indexing="ij")
    ring = np.column_stack(
        [
            pole_px[0] + np.cos(aa.ravel()) * (rr.ravel() + w / 2),
            pole_px[1] + np.sin(aa.ravel()) * (rr.ravel() + h / 2),
        ]
    )
    f = placer.frame
    gx, gy = np.meshgrid(
        np.linspace(f[0] + w / 2, f[2] - w / 2, 48), np.linspace(f[1] + h / 2, f[3] - h / 2, 36)
    )
    centres = np.vstack([ring, np.column_stack([gx.ravel(), gy.ravel()])])
    boxes = _boxes_at(centres, w, h)
    ok = placer.clear(boxes)
    if not ok.any():
        return None
    centres, boxes = centres[ok], boxes[ok]
    dist = np.hypot(centres[:, 0] - pole_px[0], centres[:, 1] - pole_px[1])
    score = dist.copy()
    score += 30 * ppt * placer.lines_hit(boxes, soft=True)
    if len(avoid_points):
        ap = np.asarray(avoid_points)
        m = 6 * ppt
        inside = (
            (ap[None, :, 0] >= boxes[:, None, 0] - m)
            & (ap[None, :, 0] <= boxes[:, None, 2] + m)
            & (ap[None, :, 1] >= boxes[:, None, 1] - m)
            & (ap[None, :, 1] <= boxes[:, None, 3] + m)
        )
        score += 120 * ppt * inside.sum(axis=1)
    for poly in avoid_polys:
        px0, py0, px1, py1 = poly.bounds
        near = np.flatnonzero(
            (boxes[:, 0] < px1) & (boxes[:, 2] > px0) & (boxes[:, 1] < py1) & (boxes[:, 3] > py0)
        )
        if len(near):
            geoms = shapely.box(boxes[near, 0], boxes[near, 1], boxes[near, 2], boxes[near, 3])
            inter = shapely.area(shapely.intersection(geoms, poly))
            score[near] += 600 * ppt * inter / max(w * h, 1.0)
    # tiers: a spot that breaks fewer rules always beats a nearer one that breaks more.
    # The rule checks are the costly part, so they run on the spots in order of score,
    # a chunk at a time, and stop at the first chunk holding a spot that breaks none:
    # its first such spot is the one a full (tier, score) sort would choose.
    order = np.argsort(score, kind="stable")
    tiers = np.empty(len(boxes))
    for start in range(0, len(order), _CALLOUT_CHUNK):
        rows = order[start : start + _CALLOUT_CHUNK]
        tiers[rows] = _callout_tiers(placer, pole_px, boxes[rows])
        clean = np.flatnonzero(tiers[rows] == 0)
        if len(clean):
            return tuple(centres[rows[clean[0]]])
    best = int(np.lexsort((score, tiers))[0])
    return tuple(centres[best])


_CALLOUT_CHUNK = 192  # candidate spots checked against the rules at a time


def _callout_tiers(placer, pole_px, boxes):
    """Rule-breaking tier of callout boxes: 4 on a boundary line, 2 on a leader, 1 a bad leader.

    A bad leader (from the label point to the nearest point of the box) runs
    through another box or crosses a leader already drawn.
    """
    on_line = placer.lines_hit(boxes)
    on_leader = (
        _segments_hit_boxes(placer.leaders, boxes) if placer.leaders else np.zeros(len(boxes), bool)
    )
    qx = np.clip(pole_px[0], boxes[:, 0], boxes[:, 2])
    qy = np.clip(pole_px[1], boxes[:, 1], boxes[:, 3])
    own = np.column_stack(
        [np.full(len(boxes), pole_px[0]), np.full(len(boxes), pole_px[1]), qx, qy]
    )
    bad_leader = np.zeros(len(boxes), dtype=bool)
    taken = placer.boxes[~np.isnan(placer.boxes).any(axis=1)] if len(placer.boxes) else []
    if len(taken):
        bad_leader |= _hit_matrix(own, taken).any(axis=0)
    if placer.leaders:
        bad_leader |= _cross_matrix(own, placer.leaders).any(axis=1)
    return 4.0 * on_line + 2.0 * on_leader + 1.0 * bad_leader


def label_domains(ax, dmap, renderer, colours=None, *, light=False, fixed=(), soft_lines=()):
    """Place one label per domain; returns the placer (boxes taken) for later labels."""
    placer = Placer(ax, renderer)
    for box in fixed:
        placer.take(box)
    colour = "#5a5a5a" if light else INK
    polys_px = [_display_polygon(ax, d.polygon) for d in dmap.domains]
    poles_px = [tuple(ax.transData.transform(d.label_point)) for d in dmap.domains]
    order = sorted(range(len(dmap.domains)), key=lambda i: -dmap.domains[i].area)
    pending = []
    for i in order:
        d = dmap.domains[i]
        placed = False
        bx0, by0, bx1, by1 = polys_px[i].bounds
        for size in (LABEL_SIZE - (1.0 if light else 0.0), SMALL_LABEL_SIZE):
            least_w, least_h = placer.least_size(d.label, size)
            if bx1 - bx0 - 2 * placer.pad < least_w or by1 - by0 - 2 * placer.pad < least_h:
                continue  # _fit_inside would find the domain too small for the box
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


def label_pending(ax, dmap, placer, pending, polys_px, poles_px, *, light=False):
    """Labels that do not fit their domain: outside, boxed, with a leader line."""
    colour = "#5a5a5a" if light else INK
    pending = sorted(pending, key=lambda i: dmap.domains[i].area)
    tiny = [shp for k, shp in enumerate(polys_px) if k in pending]
    for n, i in enumerate(pending):
        d = dmap.domains[i]
        size = SMALL_LABEL_SIZE - (0.5 if light else 0.0)
        t = ax.text(0, 0, d.label, fontsize=size, ha="center", va="center", color=colour, zorder=8)
        w, h, ox, oy = placer.measure(t)
        bpad = 0.18 * size * placer.px_per_pt  # the white box drawn around the text
        W, H = w + 2 * bpad, h + 2 * bpad
        others = [poles_px[k] for k in pending[n + 1 :]]
        c = place_callout(
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
            c = place_callout(placer, poles_px[i], W, H)
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
_MAX_KEY_ENTRIES = 45  # a longer numbered key is unreadable: number only the larger domains
_CROWDED_KEY_ENTRIES = 30  # on such a crowded map, the key lists at most this many
_CALLOUT_MIN_AREA_PT2 = 1000.0  # [pt²] and, on it, smaller domains (under ~32 pt square, ~11 mm)
# get no number; the key says how many and where they are listed


def readable_pending(dmap, pending, polys_px, px_per_pt):
    """Split the domains to be numbered into those shown and those left unlabelled.

    Every domain is numbered while the key stays at most ``_MAX_KEY_ENTRIES``
    long. Beyond that only the domains of at least ``_CALLOUT_MIN_AREA_PT2``
    on the page are numbered (the largest ``_CROWDED_KEY_ENTRIES`` of them); the
    others are left unlabelled and counted in the key.

    Returns
    -------
    shown, hidden : list of int
        Domain indices to number, and those left unlabelled.
    """
    if len(pending) <= _MAX_KEY_ENTRIES:
        return list(pending), []
    area_pt2 = {i: polys_px[i].area / px_per_pt**2 for i in pending}
    by_size = sorted(pending, key=lambda i: -area_pt2[i])
    shown = [i for i in by_size if area_pt2[i] >= _CALLOUT_MIN_AREA_PT2][:_CROWDED_KEY_ENTRIES]
    kept = set(shown)
    return [i for i in pending if i in kept], [i for i in pending if i not in kept]


def unlabelled_note(count):
    """The key's note on the small domains left unlabelled on a crowded map."""
    return (
        f"{count} small domain{'s' if count != 1 else ''} not labelled: numbers go only to the\n"
        f"{_CROWDED_KEY_ENTRIES} largest domains of at least {_CALLOUT_MIN_AREA_PT2:g} pt² on the page.\n"
        "The JSON export, pourbaix probe and the report list every domain."
    )


def needs_numbers(ax, dmap, placer, pending):
    """Whether the labels that do not fit inside should become numbered markers.

    True when they are more than ``_MAX_OUTSIDE_LABELS``, or when their
    boxes outside would cover a large share of the axes (one box over
    ``_OUTSIDE_SHARE``, all together over ``_OUTSIDE_TOTAL_SHARE``).
    """
    if len(pending) > _MAX_OUTSIDE_LABELS:
        return True
    if not pending:
        return False
    area = max(ax.bbox.width * ax.bbox.height, 1.0)
    shares = []
    for i in pending:
        t = ax.text(0, 0, dmap.domains[i].label, fontsize=SMALL_LABEL_SIZE)
        w, h, _, _ = placer.measure(t)
        t.remove()
        bpad = 0.18 * SMALL_LABEL_SIZE * placer.px_per_pt
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
        color=INK,
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


def _uncross_leaders(placer, spots, leaders, poles_px, rounds=3):
    """Swap the circles of two callouts whose leaders cross, where the swap is free and uncrosses them."""
    keys = list(leaders)
    for _ in range(rounds):
        changed = False
        for n, i in enumerate(keys):
            for j in keys[n + 1 :]:
                if not _segments_cross(*leaders[i], *leaders[j]):
                    continue
                ci, cj = spots[i][1], spots[j][1]
                bi, bj = (
                    _boxes_at(cj, spots[i][2], spots[i][2])[0],
                    _boxes_at(ci, spots[j][2], spots[j][2])[0],
                )
                li = (tuple(poles_px[i]), _nearest_on_box(poles_px[i], bi))
                lj = (tuple(poles_px[j]), _nearest_on_box(poles_px[j], bj))
                if _segments_cross(*li, *lj):
                    continue
                placer.release(spots[i][4])
                placer.release(spots[j][4])
                if placer.clear(np.array([bi]))[0] and placer.clear(np.array([bj]))[0]:
                    placer.retake(spots[i][4], bi)
                    placer.retake(spots[j][4], bj)
                    spots[i][1], spots[j][1] = cj, ci
                    leaders[i], leaders[j] = li, lj
                    changed = True
                else:
                    placer.retake(spots[i][4], _boxes_at(ci, spots[i][2], spots[i][2])[0])
                    placer.retake(spots[j][4], _boxes_at(cj, spots[j][2], spots[j][2])[0])
        placer.leaders[:] = list(leaders.values())
        if not changed:
            break


def _clear_leader_paths(placer, spots, leaders, polys_px, poles_px):
    """Move a number that sits inside its domain off any leader running through it.

    Elsewhere inside its domain where there is room, else out as a callout of its own.
    """
    if not leaders:
        return
    segs = list(leaders.values())
    for i, spot in spots.items():
        if i in leaders:
            continue
        box = _boxes_at(spot[1], spot[2], spot[2])[0]
        if not _segments_hit_boxes(segs, [box])[0]:
            continue
        placer.release(spot[4])
        c = _fit_inside(placer, polys_px[i], spot[2], spot[2], placer.soft_lines, hard_lines=segs)
        if c is None:
            c = place_callout(placer, poles_px[i], spot[2], spot[2])
            if c is not None:
                leaders[i] = (
                    tuple(poles_px[i]),
                    _nearest_on_box(poles_px[i], _boxes_at(c, spot[2], spot[2])[0]),
                )
                placer.leaders.append(leaders[i])
                segs.append(leaders[i])
        if c is not None:
            spot[1] = c
            box = _boxes_at(c, spot[2], spot[2])[0]
        placer.retake(spot[4], box)


def number_pending(ax, dmap, placer, pending, polys_px, poles_px):
    """Mark each domain in ``pending`` by a number in a small circle; return {domain: number}.

    Numbers run in reading order of the label points (top to bottom, then
    left to right). First every number that fits wholly inside its own
    domain goes there (the roomiest free spot, in the usual size and then a
    smaller one); the others become callouts: a circle at a free spot off the
    boundary lines (``place_callout``) with a leader to the domain's label
    point. Numbers never overlap each other, the labels already placed or the
    boundary lines.
    """
    ppt = placer.px_per_pt
    # reading order in bands of ~14 pt so nearly level points read left to right
    band = 14 * ppt
    order = sorted(pending, key=lambda i: (-round(poles_px[i][1] / band), poles_px[i][0]))
    numbers = {i: n for n, i in enumerate(order, start=1)}
    outside, spots = [], {}  # spots: domain -> [text, centre, diameter, offset, box row]
    for i in sorted(pending, key=lambda k: dmap.domains[k].area):
        gid = f"pourbaix-label:number:{i}"
        for size in _NUMBER_SIZES:
            t = _number_text(ax, numbers[i], size, gid, zorder=8)
            d, ox, oy = _circle_size(placer, t, size)
            # inside its own domain only where the whole circle fits (never astride a boundary)
            c = _fit_inside(placer, polys_px[i], d, d, placer.soft_lines)
            if c is not None:
                spots[i] = [t, c, d, (ox, oy), placer.take(_boxes_at(c, d, d)[0])]
                break
            t.remove()
        else:
            outside.append(i)
    leaders = {}
    for i in outside:
        pole = poles_px[i]
        size = _NUMBER_SIZES[-1]
        t = _number_text(ax, numbers[i], size, f"pourbaix-label:number:{i}", zorder=8)
        d, ox, oy = _circle_size(placer, t, size)
        c = place_callout(placer, pole, d, d, [poles_px[k] for k in outside if k != i])
        if c is None:  # no free spot anywhere in the axes: at the point regardless
            c = tuple(pole)
        box = _boxes_at(c, d, d)[0]
        spots[i] = [t, c, d, (ox, oy), placer.take(box)]
        leaders[i] = (tuple(pole), _nearest_on_box(pole, box))
        placer.leaders.append(leaders[i])
    _uncross_leaders(placer, spots, leaders, poles_px)
    _clear_leader_paths(placer, spots, leaders, polys_px, poles_px)
    for t, c, _d, (ox, oy), _row in spots.values():
        t.set_position(placer.to_data((c[0] - ox, c[1] - oy)))
    for i, (p, q) in leaders.items():
        a, b = placer.to_data(p), placer.to_data(q)
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


def draw_key(ax, dmap, numbers, renderer, *, grow, unlabelled=0):
    """List "number  label" for the numbered domains to the right of the axes.

    Entries fill columns as tall as the axes, as many columns as needed; with
    ``unlabelled`` domains left out (a crowded map), a note heading the key
    counts them and says where they are listed. When
    ``grow`` is true (a figure of our own) the figure is widened so the key
    fits and the axes keep their size in inches; on a user's axes the key is
    placed the same way and the user sizes the figure.
    """
    fig = ax.figure
    ppt = fig.dpi / 72.0
    entries = sorted(numbers.items(), key=lambda kv: kv[1])
    # what stands right of the axes: its own decorations and a second potential axis
    # (the labels and numbers all sit inside the frame)
    tight = ax.get_tightbbox(renderer, bbox_extra_artists=ax.child_axes)
    right_pt = max(tight.x1 - ax.bbox.x1, 0.0) / ppt + _KEY_GAP_PT
    line_pt = _KEY_SIZE * 1.75
    height_pt = ax.bbox.height / ppt
    top_pt = 0.0
    note_w_pt = 0.0
    if unlabelled:
        note = ax.annotate(
            unlabelled_note(unlabelled),
            xy=(1.0, 1.0),
            xycoords="axes fraction",
            xytext=(right_pt, 0.0),
            textcoords="offset points",
            ha="left",
            va="top",
            fontsize=_KEY_SIZE - 1.0,
            color="#3c3c3c",
            annotation_clip=False,
            gid="pourbaix-key-note:unlabelled",
        )
        ext = note.get_window_extent(renderer)
        top_pt = ext.height / ppt + 6.0
        note_w_pt = ext.width / ppt
    rows = max(1, int((height_pt - top_pt) // line_pt))
    ncol = math.ceil(len(entries) / rows)
    rows = math.ceil(len(entries) / ncol)
    num_w_pt = (_KEY_SIZE - 1.0) * 1.9  # room for a two-digit number in its circle
    x_pt = right_pt
    for col in range(ncol):
        chunk = entries[col * rows : (col + 1) * rows]
        widest = 0.0
        for r, (i, n) in enumerate(chunk):
            y_pt = -top_pt - (r + 0.5) * line_pt
            num = ax.annotate(
                str(n),
                xy=(1.0, 1.0),
                xycoords="axes fraction",
                xytext=(x_pt + num_w_pt / 2, y_pt),
                textcoords="offset points",
                ha="center",
                va="center",
                fontsize=_KEY_SIZE - 1.0,
                color=INK,
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
                color=INK,
                annotation_clip=False,
                gid=f"pourbaix-key:{i}",
            )
            del num
            widest = max(widest, lab.get_window_extent(renderer).width / ppt)
        x_pt += num_w_pt + 4.0 + widest + _KEY_GAP_PT
    x_pt = max(x_pt, right_pt + note_w_pt + _KEY_GAP_PT)
    if grow:
        w, h = fig.get_size_inches()
        need_in = (ax.bbox.x1 / ppt + x_pt) / 72.0
        if need_in > w:
            pos = ax.get_position()
            fig.set_size_inches(need_in, h)
            fig.subplots_adjust(left=pos.x0 * w / need_in, right=pos.x1 * w / need_in)


def label_line(
    ax, placer, text, e0, slope, *, colour, size=8.0, above=True, gid="pourbaix-label:line"
):
    """Label a straight line E = e0 + slope pH along it, at the first free spot.

    Spots are tried from the right end leftwards, on the preferred side of
    the line and then on the other, in the given size and then a smaller one;
    a spot must be clear of the other labels and cross no boundary. Where no
    spot is, the line goes unlabelled (the map's legend names it) and None is
    returned.
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
    # a straight line: one angle for every spot on it
    p = tr.transform((0.0, e0))
    q = tr.transform((1.0, e0 + slope))
    ang = math.degrees(math.atan2(q[1] - p[1], q[0] - p[0]))
    t.set_rotation(ang)
    nx, ny = -math.sin(math.radians(ang)), math.cos(math.radians(ang))
    spots = [
        (s, f, side)
        for s in (size, size - 1.5)
        for side in (above, not above)
        for f in np.linspace(0.9, 0.06, 36)
    ]
    extent = {}  # size -> the text's box [px] about its anchor: the same at every spot
    for s, f, side in spots:
        ph = x0 + f * (x1 - x0)
        e = e0 + slope * ph
        if not (y0 < e < y1):
            continue
        p = tr.transform((ph, e))
        # centre the text a little above (or below) the line, measured across the line
        hh = 0.66 * s * placer.px_per_pt
        sgn = 1.0 if side else -1.0
        c = (p[0] + sgn * nx * hh, p[1] + sgn * ny * hh)
        if s not in extent:
            t.set_fontsize(s)
            t.set_position(placer.to_data(c))
            ext = t.get_window_extent(placer.renderer)
            extent[s] = (ext.x0 - c[0], ext.y0 - c[1], ext.x1 - c[0], ext.y1 - c[1])
        dx0, dy0, dx1, dy1 = extent[s]
        box = np.array([[c[0] + dx0, c[1] + dy0, c[0] + dx1, c[1] + dy1]])
        if placer.clear(box)[0] and not placer.crosses_lines(box[0]):
            t.set_fontsize(s)
            t.set_position(placer.to_data(c))
            placer.take(box[0])
            t.set_gid(gid)
            return t
    t.remove()
    return None


def label_neutral(ax, placer, neutral):
    """Small note beside the neutral-pH line, upright or level, at a free spot.

    The note crosses no boundary; where no such spot is free it is left out (the
    legend names the line and its pH).
    """
    y0, y1 = ax.get_ylim()
    t = ax.text(
        0, 0, f"neutral pH {neutral:.2f}", fontsize=7, color="#262626", va="center", zorder=6
    )
    extent = {}  # (rotation, side) -> the text's box [px] about its anchor, alike at every spot
    for rotation in (90, 0):
        for f in (0.86, 0.14, 0.75, 0.25, 0.64, 0.36, 0.5, 0.95, 0.05):
            for side in (1, -1):
                p = ax.transData.transform((neutral, y0 + f * (y1 - y0)))
                c = (p[0] + side * 3.0 * placer.px_per_pt, p[1])
                if (rotation, side) not in extent:
                    t.set_rotation(rotation)
                    t.set_ha("left" if side > 0 else "right")
                    t.set_position(placer.to_data(c))
                    ext = t.get_window_extent(placer.renderer)
                    extent[(rotation, side)] = (
                        ext.x0 - c[0],
                        ext.y0 - c[1],
                        ext.x1 - c[0],
                        ext.y1 - c[1],
                    )
                dx0, dy0, dx1, dy1 = extent[(rotation, side)]
                box = np.array([[c[0] + dx0, c[1] + dy0, c[0] + dx1, c[1] + dy1]])
                if placer.clear(box)[0] and not placer.crosses_lines(box[0], clearance_pt=1.5):
                    t.set_rotation(rotation)
                    t.set_ha("left" if side > 0 else "right")
                    t.set_position(placer.to_data(c))
                    placer.take(box[0])
                    t.set_gid("pourbaix-label:neutral")
                    return t
    t.remove()
    return None


def label_points(ax, x, y, labels):
    """Label field points beside their markers, clear of every text and marker already on the axes.

    Each label goes at the first free spot around its point (nearest first);
    in a crowd it goes to the nearest free spot further off with a leader to
    its point. An empty label is skipped (its marker still counts).
    """
    renderer = get_renderer(ax.figure)
    placer = Placer(ax, renderer)
    for t in ax.texts:
        if t.get_visible() and t.get_text():
            patch = t.get_bbox_patch()
            if patch is not None:
                t.update_bbox_position_size(renderer)  # the box is placed at draw time otherwise
            e = (patch or t).get_window_extent(renderer)
            placer.take((e.x0, e.y0, e.x1, e.y1))
    ppt = placer.px_per_pt
    r = 4 * ppt
    for ln in ax.get_lines():  # markers drawn before (other series, earlier calls)
        if (ln.get_gid() or "") == "pourbaix-points":
            for p in ax.transData.transform(np.column_stack(ln.get_data())):
                placer.take((p[0] - r, p[1] - r, p[0] + r, p[1] + r))
    for ln in ax.get_lines():  # leaders of domain labels: point labels keep off them
        if (ln.get_gid() or "").startswith("pourbaix-leader:"):
            xy = ax.transData.transform(np.column_stack(ln.get_data()))
            placer.leaders.append((tuple(xy[0]), tuple(xy[-1])))
    pts = ax.transData.transform(np.column_stack([x, y]))
    for p in pts:  # the markers themselves
        placer.take((p[0] - r, p[1] - r, p[0] + r, p[1] + r))
    offsets = [(1, 1), (1, -1), (-1, 1), (-1, -1), (1, 0), (-1, 0), (0, 1), (0, -1)]
    for k, (p, text) in enumerate(zip(pts, labels, strict=True)):
        if not text:
            continue
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
        bpad = 0.12 * 7.5 * ppt
        w, h = w + 2 * bpad, h + 2 * bpad
        c = None
        for dist in (5, 9, 14):
            for sx, sy in offsets:
                cand = (p[0] + sx * (dist * ppt + w / 2), p[1] + sy * (dist * ppt + h / 2))
                box = _boxes_at(cand, w, h)
                if placer.clear(box)[0] and not _segments_hit_boxes(placer.leaders, box)[0]:
                    c = cand
                    break
            if c is not None:
                break
        leader = False
        if c is None:  # crowded: the nearest free spot further off, with a leader
            c = place_callout(placer, tuple(p), w, h)
            leader = c is not None
        if c is None:
            c = (p[0] + 5 * ppt + w / 2, p[1] + 5 * ppt + h / 2)
        box = _boxes_at(c, w, h)[0]
        placer.take(box)
        t.set_position(placer.to_data((c[0] - ox, c[1] - oy)))
        if leader:
            q = _nearest_on_box(p, box)
            a, b = placer.to_data(p), placer.to_data(q)
            ax.plot([a[0], b[0]], [a[1], b[1]], color="#3c3c3c", lw=0.6, zorder=10.5,
                    gid=f"pourbaix-point-leader:{k}")  # fmt: skip
