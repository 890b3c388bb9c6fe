"""Exact stability domains: the lower envelope of planes over a rectangular window.

Each candidate (a species, or an assemblage of species) has a transformed
energy that is linear in pH and potential,

    psi_i(pH, E) = c0_i + cph_i * pH + ce_i * E          [V per atom of metal]

and the stable candidate at a point is the one with the lowest psi. The domain
of candidate i is ``window ∩ {psi_i <= psi_j for all j}``, a convex polygon.
All domains together are the projection of the upper facets of the 3-D
half-space intersection ``{z <= psi_i(x, y) for all i} ∩ box``, which Qhull
computes in O(N log N) (Barber, Dobkin & Huhdanpaa, ACM TOMS 22, 469, 1996;
scipy.spatial.HalfspaceIntersection). No grid is involved.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import lru_cache
from itertools import combinations

import numpy as np

from pourbaix.errors import ConditionsError

__all__ = ["Envelope", "Edge", "lower_envelope", "clip_domains", "clip_halfplane", "unique_points"]

# Two vertices closer than this (in window-normalised units) are one vertex;
# a plane within this (in volts) of the envelope at a vertex is on it.
_VERTEX_TOL = 1e-9
_PLANE_TOL = 1e-9
# Domains smaller than this fraction of the window area are touching points
# or slivers produced by rounding, not stability fields.
_AREA_TOL = 1e-12
# Up to this many distinct planes the vertices come from direct clipping,
# above it from Qhull's half-space intersection (O(N log N)).
_SMALL_N = 32


@dataclass(frozen=True)
class Edge:
    """A boundary segment shared by two domains.

    Attributes
    ----------
    pair : tuple of int
        Indices ``(i, j)`` of the two planes, ``i < j``.
    start, end : tuple of float
        End points ``(pH, E)`` of the segment [pH, V].
    e_at_ph0_v : float
        Potential of the boundary line at pH 0 [V]; ``nan`` for a vertical line.
    slope_v_per_ph : float
        Slope of the boundary line [V/pH]; ``inf`` for a vertical line.
    ph_at_vertical : float
        pH of a vertical boundary (``nan`` otherwise) [pH].
    """

    pair: tuple[int, int]
    start: tuple[float, float]
    end: tuple[float, float]
    e_at_ph0_v: float
    slope_v_per_ph: float
    ph_at_vertical: float = float("nan")


@dataclass(frozen=True)
class Envelope:
    """Result of the exact solve.

    Attributes
    ----------
    polygons : list of ndarray or None
        For each input plane, the counter-clockwise vertices ``(k, 2)`` of its
        domain in (pH, E), or None when the plane is never lowest in the window.
    edges : list of Edge
        Every shared boundary segment.
    coincident : dict
        ``{j: i}`` for planes identical to an earlier plane ``i`` (within
        rounding); such a plane gets no domain of its own.
    window : tuple of float
        ``(ph_lo, ph_hi, e_lo, e_hi)``.
    """

    polygons: list
    edges: list
    coincident: dict = field(default_factory=dict)
    window: tuple = (0.0, 1.0, 0.0, 1.0)

    @property
    def stable(self):
        """Indices of the planes that have a domain."""
        return [i for i, p in enumerate(self.polygons) if p is not None]


def _check_window(window):
    try:
        x0, x1, y0, y1 = (float(v) for v in window)
    except (TypeError, ValueError) as exc:
        raise ConditionsError(
            f"window must be four numbers (pH lo, pH hi, E lo, E hi), got {window!r}"
        ) from exc
    if not all(np.isfinite([x0, x1, y0, y1])):
        raise ConditionsError(f"window limits must be finite, got {window!r}")
    if not (x1 > x0):
        raise ConditionsError(f"pH range must increase: got {x0} .. {x1}")
    if not (y1 > y0):
        raise ConditionsError(f"potential range must increase: got {y0} .. {y1} V")
    return x0, x1, y0, y1


def _dedupe(planes):
    """Map each plane that repeats an earlier one (within rounding) to it."""
    coincident = {}
    scale = 1.0 + np.abs(planes).max(axis=1)
    order = np.lexsort(planes.T[::-1])
    a_all, b_all = order[:-1], order[1:]
    same = np.all(
        np.abs(planes[a_all] - planes[b_all])
        <= 1e-12 * np.maximum(scale[a_all], scale[b_all])[:, None],
        axis=1,
    )
    for a, b in zip(a_all[same].tolist(), b_all[same].tolist(), strict=True):
        keep, drop = min(a, b), max(a, b)
        root = coincident.get(keep, keep)
        coincident[drop] = root
    # resolve chains so every duplicate points at its first occurrence
    for j in sorted(coincident):
        i = coincident[j]
        while i in coincident:
            i = coincident[i]
        coincident[j] = i
    return {int(j): int(i) for j, i in coincident.items()}


def _order_ccw(points):
    c = points.mean(axis=0)
    ang = np.arctan2(points[:, 1] - c[1], points[:, 0] - c[0])
    return points[np.argsort(ang, kind="stable")]


def _polygon_area(poly):
    x, y = poly[:, 0], poly[:, 1]
    return 0.5 * float(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))


def unique_points(points, tol):
    """Sort points by (u, v) and drop each one within ``tol`` of an earlier kept point."""
    if len(points) < 2:
        return points
    order = np.lexsort((points[:, 1], points[:, 0]))
    pts = points[order]
    # Only points in a run of sorted u-gaps <= tol can repeat one another.
    close = np.flatnonzero(np.diff(pts[:, 0]) <= tol)
    if len(close) == 0:
        return pts
    keep = np.ones(len(pts), dtype=bool)
    u, v = pts[:, 0].tolist(), pts[:, 1].tolist()
    in_run = np.zeros(len(u), dtype=bool)
    in_run[close] = True
    in_run[close + 1] = True
    for a in np.flatnonzero(in_run).tolist():
        if not keep[a]:
            continue
        b = a + 1
        while b < len(u) and u[b] - u[a] <= tol:
            if keep[b] and abs(v[b] - v[a]) <= tol:
                keep[b] = False
            b += 1
    return pts[keep]


def lower_envelope(planes, window):
    """Exact domains of the lowest plane over a rectangular window.

    Parameters
    ----------
    planes : array_like, shape (N, 3)
        Rows ``(c0, cph, ce)`` with ``psi = c0 + cph * pH + ce * E`` [V, V/pH, V/V].
    window : sequence of 4 float
        ``(ph_lo, ph_hi, e_lo, e_hi)`` [pH, pH, V, V].

    Returns
    -------
    Envelope
        Polygons per plane (None where never lowest), shared edges and the
        planes that coincide with earlier ones.

    Raises
    ------
    ConditionsError
        If the window is empty or not finite, or the planes are not finite.

    Notes
    -----
    Half-space form (scipy convention ``A x + b <= 0``) in window-normalised
    coordinates u, v in [0, 1]: ``z - psi_i(u, v) <= 0`` for each plane, the
    four sides of the box, and a floor ``z >= z_min`` below every plane so the
    region is bounded. Vertices on the upper surface are those with
    ``z = min_i psi_i``; plane i owns the vertices where it attains the
    minimum, and its domain is their convex hull (it is convex).

    Examples
    --------
    >>> env = lower_envelope([[0, 0, 0], [0, 0, -1]], (0, 14, -1, 1))
    >>> [round(float(a), 6) for a in sorted(env.polygons[0][:, 1])]
    [-1.0, -1.0, 0.0, 0.0]
    """
    x0, x1, y0, y1 = _check_window(window)
    planes = np.atleast_2d(np.asarray(planes, dtype=float))
    if planes.ndim != 2 or planes.shape[1] != 3:
        raise ConditionsError(f"planes must have shape (N, 3), got {planes.shape}")
    if not np.all(np.isfinite(planes)):
        bad = int(np.argwhere(~np.isfinite(planes))[0][0])
        raise ConditionsError(f"plane {bad} has a non-finite coefficient: {planes[bad].tolist()}")
    n = len(planes)
    dx, dy = x1 - x0, y1 - y0
    # Normalise: psi = a0 + au * u + av * v with pH = x0 + dx u, E = y0 + dy v.
    a0 = planes[:, 0] + planes[:, 1] * x0 + planes[:, 2] * y0
    au = planes[:, 1] * dx
    av = planes[:, 2] * dy
    norm = np.column_stack([a0, au, av])

    coincident = _dedupe(norm) if n > 1 else {}
    active = (
        np.arange(n)
        if not coincident
        else np.array([i for i in range(n) if i not in coincident], dtype=int)
    )

    polygons = [None] * n
    if len(active) == 1:
        i = int(active[0])
        polygons[i] = np.array([[x0, y0], [x1, y0], [x1, y1], [x0, y1]])
        return Envelope(polygons, [], coincident, (x0, x1, y0, y1))

    A = norm[active]
    if len(active) <= _SMALL_N:
        uv = _vertices_by_enumeration(A)
    else:
        uv = _vertices_by_qhull(A)
    # Snap to the box (rounding), merge repeated vertices, evaluate every plane at every vertex.
    uv = np.clip(uv, 0.0, 1.0)
    uv[np.abs(uv) < 1e-11] = 0.0
    uv[np.abs(uv - 1.0) < 1e-11] = 1.0
    uv = unique_points(uv, _VERTEX_TOL)
    vals = A[:, :1].T + np.outer(uv[:, 0], A[:, 1]) + np.outer(uv[:, 1], A[:, 2])  # (M, K)
    env = vals.min(axis=1)
    tol = _PLANE_TOL * (1.0 + np.abs(env).max())
    member = vals <= env[:, None] + tol  # (M, K)
    _drop_near_coincident(member, A, tol, active, coincident)

    stable_cols = _faces(uv, member, active, polygons, (x0, dx, y0, dy))
    edges = _edges(uv, member, active, stable_cols, planes, (x0, dx, y0, dy))
    return Envelope(polygons, edges, coincident, (x0, x1, y0, y1))


def _drop_near_coincident(member, A, tol, active, coincident):
    """Planes within rounding of each other over the whole window: keep the lower one.

    Two planes that both sit on the envelope at three or more vertices and
    differ by less than the tolerance at all four window corners are the same
    plane for this map (a linear function's extremes over the box are at its
    corners); the one lower at the window centre keeps the face, the other is
    recorded as coincident with it and loses its membership (in place).
    """
    cols = np.flatnonzero(member.sum(axis=0) >= 3)
    if len(cols) < 2:
        return
    sub = member[:, cols].astype(np.int32)
    shared = sub.T @ sub
    corners = np.array([[1, 0, 0], [1, 1, 0], [1, 0, 1], [1, 1, 1]], dtype=float)
    for a in range(len(cols)):
        for b in range(a + 1, len(cols)):
            if shared[a, b] < 3:
                continue
            ka, kb = cols[a], cols[b]
            diff = corners @ (A[ka] - A[kb])
            if np.max(np.abs(diff)) > tol:
                continue
            centre = diff.mean()
            keep, drop = (ka, kb) if (centre < 0 or (centre == 0 and ka < kb)) else (kb, ka)
            member[:, drop] = False
            coincident[int(active[drop])] = int(active[keep])


def _vertices_by_qhull(A):
    """Upper-surface vertices of {z <= psi_i} ∩ box, in normalised (u, v)."""
    from scipy.spatial import HalfspaceIntersection, QhullError  # imported only for large systems

    corners = np.array([[0, 0], [1, 0], [1, 1], [0, 1]], dtype=float)
    corner_vals = A[:, :1] + A[:, 1:2] * corners[:, 0] + A[:, 2:3] * corners[:, 1]
    span = float(np.ptp(corner_vals)) + 1.0
    z_floor = float(corner_vals.min()) - span
    n = len(A)
    hs = np.empty((n + 5, 4))
    hs[:n] = np.column_stack([-A[:, 1], -A[:, 2], np.ones(n), -A[:, 0]])
    hs[n:] = [
        [-1.0, 0.0, 0.0, 0.0],  # u >= 0
        [1.0, 0.0, 0.0, -1.0],  # u <= 1
        [0.0, -1.0, 0.0, 0.0],  # v >= 0
        [0.0, 1.0, 0.0, -1.0],  # v <= 1
        [0.0, 0.0, -1.0, z_floor],  # z >= z_floor
    ]
    interior = np.array([0.5, 0.5, z_floor + 0.5 * span])
    try:
        verts = HalfspaceIntersection(hs, interior).intersections
    except QhullError as exc:  # pragma: no cover - box + floor keeps it full-dimensional
        raise ConditionsError(f"exact solve failed in Qhull: {exc}") from exc
    top = verts[:, 2] > z_floor + 0.25 * span
    return verts[top, :2]


_BOX = np.array([[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0]])
_BOX.setflags(write=False)


def _vertices_by_enumeration(A):
    """Envelope vertices of a few planes by enumerating every candidate point.

    Every vertex of the lower envelope over the box is a point where three
    planes are equal, where two planes are equal on a side of the box, or a
    corner. All candidates are solved at once (2x2 systems, Cramer's rule)
    and those where a defining plane is on the envelope are kept. O(N^3) but
    vectorised, it beats the 3-D hull for a few dozen planes and needs no
    scipy.spatial import.
    """
    n = len(A)
    cands = [_BOX]
    owner = [np.zeros(4, dtype=np.intp)]
    ii, jj = _pairs(n)
    d = A[ii] - A[jj]  # lines d0 + du u + dv v = 0
    d0, du, dv = d[:, 0], d[:, 1], d[:, 2]
    # Crossings of each pair's line with the four sides; a (near-)parallel side gives nan.
    du = np.where(np.abs(du) > 1e-15, du, np.nan)
    dv = np.where(np.abs(dv) > 1e-15, dv, np.nan)
    zero, one = np.zeros_like(d0), np.ones_like(d0)
    cands += [
        np.column_stack([zero, -d0 / dv]),  # u = 0
        np.column_stack([one, -(d0 + d[:, 1]) / dv]),  # u = 1
        np.column_stack([-d0 / du, zero]),  # v = 0
        np.column_stack([-(d0 + d[:, 2]) / du, one]),  # v = 1
    ]
    owner += [ii] * 4
    if n >= 3:
        i, j, k = _triples(n)
        a1, a2 = A[i] - A[j], A[i] - A[k]
        det = a1[:, 1] * a2[:, 2] - a1[:, 2] * a2[:, 1]
        det = np.where(np.abs(det) > 1e-15, det, np.nan)
        u = (-a1[:, 0] * a2[:, 2] + a2[:, 0] * a1[:, 2]) / det
        v = (-a1[:, 1] * a2[:, 0] + a2[:, 1] * a1[:, 0]) / det
        cands.append(np.column_stack([u, v]))
        owner.append(i)
    pts = np.concatenate(cands)
    own = np.concatenate(owner)
    inside = np.all((pts >= -1e-12) & (pts <= 1 + 1e-12), axis=1)
    pts, own = pts[inside], own[inside]
    vals = A[:, 0][None, :] + np.outer(pts[:, 0], A[:, 1]) + np.outer(pts[:, 1], A[:, 2])
    env = vals.min(axis=1)
    on = vals[np.arange(len(pts)), own] <= env + _PLANE_TOL * (1.0 + np.abs(env).max())
    corner = np.zeros(len(pts), dtype=bool)
    corner[:4] = inside[:4]
    return pts[on | corner]


@lru_cache(maxsize=64)
def _pairs(n):
    """Index arrays (i, j), i < j < n, of every pair of planes (cached per n)."""
    i, j = np.triu_indices(n, 1)
    i.setflags(write=False)
    j.setflags(write=False)
    return i, j


@lru_cache(maxsize=64)
def _triples(n):
    """Index arrays (i, j, k), i < j < k < n, of every triple of planes (cached per n)."""
    i, j, k = np.array(list(combinations(range(n), 3)), dtype=np.intp).reshape(-1, 3).T
    for arr in (i, j, k):
        arr.setflags(write=False)
    return i, j, k


def _faces(uv, member, active, polygons, frame):
    """Fill ``polygons`` with each plane's domain; return the local columns that have one.

    A domain is convex, so its vertices ordered by angle about their mean
    form its boundary counter-clockwise. All faces are ordered and measured
    at once (shoelace area per group), which keeps the per-face cost to a
    slice.
    """
    x0, dx, y0, dy = frame
    counts = member.sum(axis=0)
    cand = np.flatnonzero(counts >= 3)
    if len(cand) == 0:
        return []
    col, vert = np.nonzero(member[:, cand].T)  # grouped by column, vertices in uv order
    n_per = counts[cand]
    starts = np.concatenate(([0], np.cumsum(n_per)[:-1]))
    pts = uv[vert]
    centre = np.add.reduceat(pts, starts, axis=0) / n_per[:, None]
    ang = np.arctan2(pts[:, 1] - centre[col, 1], pts[:, 0] - centre[col, 0])
    order = np.lexsort((ang, col))
    pts = pts[order]
    nxt = np.arange(1, len(pts) + 1)
    nxt[starts + n_per - 1] = starts
    cross = pts[:, 0] * pts[nxt, 1] - pts[:, 1] * pts[nxt, 0]
    area = 0.5 * np.add.reduceat(cross, starts)
    xy = np.column_stack([x0 + dx * pts[:, 0], y0 + dy * pts[:, 1]])
    stable = []
    for g in np.flatnonzero(area > _AREA_TOL).tolist():
        k = int(cand[g])
        polygons[int(active[k])] = xy[starts[g] : starts[g] + n_per[g]]
        stable.append(k)
    return stable


def _edges(uv, member, active, stable_cols, planes, frame):
    """Shared boundary segments between the stable domains, with their lines.

    Two domains share an edge when they share two or more envelope vertices;
    the segment runs between the extreme ones. ``uv`` is sorted by (u, v),
    so for the usual two shared vertices the first and last are the ends.
    """
    x0, dx, y0, dy = frame
    edges = []
    if len(stable_cols) < 2:
        return edges
    sub = member[:, stable_cols]
    subi = sub.astype(np.int32)
    shared = subi.T @ subi
    ia, ib = _pairs(len(stable_cols))
    keep = shared[ia, ib] >= 2
    ia, ib = ia[keep], ib[keep]
    if len(ia) == 0:
        return edges
    both = sub[:, ia] & sub[:, ib]  # (M, pairs)
    first = both.argmax(axis=0)
    last = len(uv) - 1 - both[::-1].argmax(axis=0)
    p_uv, q_uv = uv[first], uv[last]
    for c in np.flatnonzero(shared[ia, ib] > 2).tolist():
        # three or more collinear shared vertices: take the extremes along the segment
        pts = uv[both[:, c]]
        d = pts - pts[0]
        direction = d[np.argmax(np.hypot(d[:, 0], d[:, 1]))]
        t = d @ direction
        p_uv[c], q_uv[c] = pts[np.argmin(t)], pts[np.argmax(t)]
    long_enough = np.hypot(*(q_uv - p_uv).T) > _VERTEX_TOL
    p = np.column_stack([x0 + dx * p_uv[:, 0], y0 + dy * p_uv[:, 1]])
    q = np.column_stack([x0 + dx * q_uv[:, 0], y0 + dy * q_uv[:, 1]])
    swap = (p[:, 0] > q[:, 0]) | ((p[:, 0] == q[:, 0]) & (p[:, 1] > q[:, 1]))
    p[swap], q[swap] = q[swap], p[swap].copy()
    cols = np.asarray(stable_cols)
    gi, gj = active[cols[ia]], active[cols[ib]]
    # Boundary line psi_i = psi_j: d0 + dph pH + de E = 0.
    d = planes[gi] - planes[gj]
    vertical = np.abs(d[:, 2]) <= 1e-14
    with np.errstate(divide="ignore", invalid="ignore"):
        e0 = np.where(vertical, np.nan, -d[:, 0] / d[:, 2])
        slope = np.where(vertical, np.inf, -d[:, 1] / d[:, 2])
        xv = np.where(vertical, -d[:, 0] / d[:, 1], np.nan)
    rows = zip(
        gi.tolist(),
        gj.tolist(),
        p.tolist(),
        q.tolist(),
        e0.tolist(),
        slope.tolist(),
        xv.tolist(),
        long_enough.tolist(),
        strict=True,
    )
    for i, j, pp, qq, e, s, x, ok in rows:
        if ok:
            edges.append(Edge((i, j), (pp[0], pp[1]), (qq[0], qq[1]), e, s, x))
    return edges


def clip_domains(planes, window):
    """Exact domains by clipping the window with N-1 half planes per plane.

    The O(N^2) textbook route (Sutherland & Hodgman, Commun. ACM 17, 32, 1974),
    kept as an independent exact reference for tests; ``lower_envelope`` is the
    production route.

    Parameters
    ----------
    planes : array_like, shape (N, 3)
        Rows ``(c0, cph, ce)`` [V, V/pH, V/V].
    window : sequence of 4 float
        ``(ph_lo, ph_hi, e_lo, e_hi)`` [pH, pH, V, V].

    Returns
    -------
    list of ndarray or None
        Counter-clockwise polygon per plane, None where empty. Ties go to the
        lower index, as in ``lower_envelope``.
    """
    x0, x1, y0, y1 = _check_window(window)
    planes = np.atleast_2d(np.asarray(planes, dtype=float))
    box = np.array([[x0, y0], [x1, y0], [x1, y1], [x0, y1]])
    out = []
    coincident = _dedupe(planes) if len(planes) > 1 else {}
    for i, pi in enumerate(planes):
        if i in coincident:
            out.append(None)
            continue
        poly = box
        for j, pj in enumerate(planes):
            if j == i or j in coincident:
                continue
            d = pi - pj  # keep d0 + dph x + de y <= 0
            poly = clip_halfplane(poly, d, 1e-12)
            if poly is None:
                break
        if poly is not None and abs(_polygon_area(poly)) > _AREA_TOL * (x1 - x0) * (y1 - y0):
            out.append(poly)
        else:
            out.append(None)
    return out


def clip_halfplane(poly, d, tol=0.0):
    """Clip a convex polygon to the half plane ``d0 + d1 x + d2 y <= 0`` (Sutherland & Hodgman 1974).

    Parameters
    ----------
    poly : ndarray, shape (k, 2), or None
        Vertices in order (either orientation).
    d : array_like, shape (3,)
        Half-plane coefficients, in the units of ``poly``.
    tol : float
        Values within ``tol`` of zero count as on the line: the polygon is
        kept whole when every vertex is at or below ``tol`` and dropped when
        every vertex is at or above ``-tol``.

    Returns
    -------
    ndarray or None
        The clipped polygon, or None when less than a triangle is left.
    """
    if poly is None or len(poly) < 3:
        return None
    vals = d[0] + d[1] * poly[:, 0] + d[2] * poly[:, 1]
    if np.all(vals <= tol):
        return poly
    if np.all(vals >= -tol):
        return None
    res = []
    n = len(poly)
    for k in range(n):
        p, q = poly[k], poly[(k + 1) % n]
        vp, vq = vals[k], vals[(k + 1) % n]
        if vp <= 0:
            res.append(p)
        if (vp < 0 < vq) or (vq < 0 < vp):
            res.append(p + (vp / (vp - vq)) * (q - p))
    return np.array(res) if len(res) >= 3 else None
