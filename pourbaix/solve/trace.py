"""Curved domain boundaries over (pH, E), traced from a classification of points.

A mass-balanced map has no planes to intersect: which domain holds a point
is known only by solving the equilibrium there, and boundaries are curves
f(pH, E) = 0. They are traced as follows (Allgower & Georg 1990, ch. 1 and
13, for continuation and piecewise-linear approximation of implicit curves):

1. **Coarse mesh.** Classify the corners of an ``n_ph x n_e`` mesh of cells.
2. **Refinement where domains meet.** A cell whose boundary shows three or
   more domains, or two domains crossing more than twice, is split into four
   (a quadtree), down to a depth limit, so that every leaf cell is crossed by
   one boundary or holds one junction.
3. **Crossings.** Along every leaf edge whose end points differ, the
   boundary point is found by a safeguarded regula falsi (Illinois variant;
   Dowell & Jarratt 1971) on the continuous boundary function of the pair,
   bracketed by the classification, to the stated tolerance. Neighbouring
   cells share their edge points exactly.
4. **Curves.** In a leaf cell crossed once, the chord between its two
   crossings is the predictor; the corrector finds the curve along the
   chord's normal at its midpoint; a chord farther than the tolerance from
   the curve is split there (step control) until every chord lies within
   tolerance of the curve at its midpoint.
5. **Junctions.** Where three domains meet, the point where both boundary
   functions vanish is solved as a 2 x 2 system by Newton's method with a
   finite-difference Jacobian, and the crossings of the cell join it.

With a ``gradient`` of the boundary functions (for equilibria, from the
implicit-function theorem), steps 3-5 take Newton steps instead (stopping
when a step is below a tenth of the tolerance; bracketing takes over where
Newton's method leaves its bracket or meets a third domain), and with a
``classify_many`` the mesh, each round of the quadtree, and each Newton round
over all edges and all chords are classified in one batch.

The caller supplies ``classify(ph, e) -> (key, state)`` and
``boundary(state, key_a, key_b) -> float`` (negative on a's side, positive on
b's); this module knows nothing of chemistry.
"""

from __future__ import annotations

import bisect
import math
from dataclasses import dataclass

import numpy as np

__all__ = ["TracedCurves", "trace_domains"]


@dataclass(frozen=True)
class TracedCurves:
    """Boundary polylines and the classified samples of a traced window.

    Attributes
    ----------
    segments : list of tuple
        ``(key_a, key_b, points)``: a polyline (array (k, 2) of pH, E) with
        domain ``key_a`` on one side and ``key_b`` on the other.
    samples : dict
        ``(ph, e) -> key`` of every classified point.
    evaluations : int
        Number of classifications (equilibrium solves) made.
    """

    segments: list
    samples: dict
    evaluations: int


_BATCH_MIN = 16  # fewer new points than this are classified one by one (warm starts)


def _between(values, lo, hi):
    """The items v of a sorted list with lo <= v < hi."""
    return values[bisect.bisect_left(values, lo) : bisect.bisect_left(values, hi)]


class _Tracer:
    def __init__(
        self, classify, boundary, window, mesh, depth, tolerance, gradient=None, classify_many=None
    ):
        self.classify_fn = classify
        self.boundary_fn = boundary
        self.gradient_fn = gradient
        self.classify_many_fn = classify_many
        self.x0, self.x1, self.y0, self.y1 = window
        self.nx, self.ny = mesh
        self.depth = depth
        self.tol = tolerance  # (pH, V)
        self.scale = 1 << depth
        self.dx = (self.x1 - self.x0) / (self.nx * self.scale)
        self.dy = (self.y1 - self.y0) / (self.ny * self.scale)
        self.grid = {}  # (ci, cj) -> (key, state)
        self.rows = {}  # cj -> sorted list of ci sampled
        self.cols = {}  # ci -> sorted list of cj sampled
        self.edge_points = {}  # ((ci, cj), (ci, cj)) -> list of (point, key_left, key_right)
        self.recent = []  # points sampled since the quadtree's last pass
        self.converged = False  # whether the last junction's Newton iteration converged
        self.evaluations = 0

    # -------------------------------------------------------------- points
    def xy(self, ci, cj):
        return (self.x0 + ci * self.dx, self.y0 + cj * self.dy)

    def classify(self, x, y):
        self.evaluations += 1
        return self.classify_fn(x, y)

    def at(self, ci, cj):
        got = self.grid.get((ci, cj))
        if got is None:
            got = self.classify(*self.xy(ci, cj))
            self._store(ci, cj, got)
        return got

    def _store(self, ci, cj, got):
        self.recent.append((ci, cj))
        self.grid[(ci, cj)] = got
        bisect.insort(self.rows.setdefault(cj, []), ci)
        bisect.insort(self.cols.setdefault(ci, []), cj)

    def at_many(self, cells):
        """Classify the cells not yet sampled, in one call where a batch classifier is given."""
        new = [c for c in dict.fromkeys(cells) if c not in self.grid]
        if self.classify_many_fn is None or len(new) < _BATCH_MIN:
            for c in new:
                self.at(*c)
            return
        self.evaluations += len(new)
        got = self.classify_many_fn([self.xy(*c) for c in new])
        for c, g in zip(new, got, strict=True):
            self._store(*c, g)

    def key(self, ci, cj):
        return self.at(ci, cj)[0]

    # -------------------------------------------------------------- cells
    def ring(self, ci, cj, s):
        """Sampled points around a cell, counter-clockwise from its lower-left corner."""
        for c in ((ci, cj), (ci + s, cj), (ci + s, cj + s), (ci, cj + s)):
            self.at(*c)
        bottom = _between(self.rows[cj], ci, ci + s)  # ci <= i < ci + s
        right = _between(self.cols[ci + s], cj, cj + s)
        top = _between(self.rows[cj + s], ci + 1, ci + s + 1)[::-1]  # ci < i <= ci + s
        left = _between(self.cols[ci], cj + 1, cj + s + 1)[::-1]
        return (
            [(i, cj) for i in bottom]
            + [(ci + s, j) for j in right]
            + [(i, cj + s) for i in top]
            + [(ci, j) for j in left]
        )

    def complex_cell(self, ci, cj, s):
        pts = self.ring(ci, cj, s)
        keys = [self.grid[p][0] for p in pts]
        changes = sum(keys[k] != keys[k - 1] for k in range(len(keys)))
        return len(set(keys)) >= 3 or changes > 2

    def leaves(self):
        """Quadtree leaf cells (ci, cj, size), refined where the cell is not simple."""
        todo = [
            (i * self.scale, j * self.scale, self.scale)
            for i in range(self.nx)
            for j in range(self.ny)
        ]
        self.at_many(
            [
                (i * self.scale, j * self.scale)
                for i in range(self.nx + 1)
                for j in range(self.ny + 1)
            ]
        )
        changed = True
        leaves = todo
        simple = set()  # leaves found simple, whose edges have had no sample since
        while changed:  # a split adds samples on neighbours' edges: look again until stable
            changed = False
            rows, cols = {}, {}
            for i, j in self.recent:
                rows.setdefault(j, []).append(i)
                cols.setdefault(i, []).append(j)
            for v in (*rows.values(), *cols.values()):
                v.sort()
            self.recent = []

            def touched(ci, cj, s, rows=rows, cols=cols):
                for j in (cj, cj + s):
                    if j in rows and _between(rows[j], ci, ci + s + 1):
                        return True
                for i in (ci, ci + s):
                    if i in cols and _between(cols[i], cj, cj + s + 1):
                        return True
                return False

            nxt, split = [], []
            for ci, cj, s in leaves:
                if (ci, cj, s) in simple and not touched(ci, cj, s):
                    nxt.append((ci, cj, s))
                elif s > 1 and self.complex_cell(ci, cj, s):
                    h = s // 2
                    split += [
                        (ci + a, cj + b)
                        for a, b in ((h, 0), (0, h), (h, h), (2 * h, h), (h, 2 * h))
                    ]
                    for a, b in ((0, 0), (h, 0), (0, h), (h, h)):
                        nxt.append((ci + a, cj + b, h))
                    changed = True
                else:
                    simple.add((ci, cj, s))
                    nxt.append((ci, cj, s))
            self.at_many(split)  # the next pass sees them on every ring
            leaves = nxt
        return leaves

    # -------------------------------------------------------------- root finding
    def _t_tolerance(self, p, q):
        d = np.abs(np.subtract(q, p))
        with np.errstate(divide="ignore"):
            return float(
                min(self.tol[0] / d[0] if d[0] else np.inf, self.tol[1] / d[1] if d[1] else np.inf)
            )

    def _step(self, state, value, key_a, key_b, direction):
        """Newton step -f / (grad f . direction) from a solved point, or None."""
        if not math.isfinite(value):
            return None
        g = self.gradient_fn(state, key_a, key_b)
        slope = g[0] * direction[0] + g[1] * direction[1]
        if not (math.isfinite(slope) and slope > 0):
            return None  # f rises from key_a to key_b; anything else: no Newton step here
        return -value / slope

    def crossings(self, p, kp, sp, q, kq, sq, depth=0):
        """Boundary points on the segment p -> q (keys differ), as (point, key_before, key_after)."""
        tol_t = self._t_tolerance(p, q)
        lo, hi = 0.0, 1.0
        flo = self.boundary_fn(sp, kp, kq)
        fhi = self.boundary_fn(sq, kp, kq)
        seg = (q[0] - p[0], q[1] - p[1])
        newton = None  # where Newton's method puts the root from the last point solved
        if self.gradient_fn is not None:
            # from the end whose own Newton step is the shorter
            steps = [self._step(sp, flo, kp, kq, seg), self._step(sq, fhi, kp, kq, seg)]
            starts = [
                (abs(d), t + d) for t, d in zip((0.0, 1.0), steps, strict=True) if d is not None
            ]
            if starts:
                newton = min(starts)[1]
        moved = 0  # which end moved last: -1 lo, +1 hi
        it = 0
        while hi - lo > tol_t and it < 80:
            it += 1
            t = 0.5 * (lo + hi)
            if newton is not None and lo < newton < hi:
                t = newton
            elif flo < 0 < fhi and math.isfinite(flo) and math.isfinite(fhi) and it % 4:
                t = lo + (hi - lo) * (-flo) / (fhi - flo)  # regula falsi
                # just past the estimate on the side that has not moved, to close the bracket
                t += 0.45 * tol_t if moved == -1 else -0.45 * tol_t if moved == 1 else 0.0
                t = min(max(t, lo + 0.25 * tol_t), hi - 0.25 * tol_t)
            newton = None
            x = (p[0] + t * (q[0] - p[0]), p[1] + t * (q[1] - p[1]))
            k, st = self.classify(*x)
            if k in (kp, kq) and self.gradient_fn is not None:
                f = self.boundary_fn(st, kp, kq)
                d = self._step(st, f, kp, kq, seg)
                if d is not None and abs(d) <= 0.1 * tol_t:
                    # Newton's step has fallen below a tenth of the tolerance: converged
                    t = min(max(t + d, lo), hi)
                    return [((p[0] + t * (q[0] - p[0]), p[1] + t * (q[1] - p[1])), kp, kq)]
                newton = None if d is None else t + d
            if k == kp:
                lo, flo = t, self.boundary_fn(st, kp, kq)
                if moved == -1:
                    fhi *= 0.5  # Illinois: the end that stays has its value halved
                moved = -1
            elif k == kq:
                hi, fhi = t, self.boundary_fn(st, kp, kq)
                if moved == 1:
                    flo *= 0.5
                moved = 1
            else:  # a third domain between: two crossings
                if depth > 30:
                    break
                pa = (p[0] + lo * (q[0] - p[0]), p[1] + lo * (q[1] - p[1]))
                pb = (p[0] + hi * (q[0] - p[0]), p[1] + hi * (q[1] - p[1]))
                sa = self.classify(*pa)[1] if lo > 0 else sp
                sb = self.classify(*pb)[1] if hi < 1 else sq
                return self.crossings(pa, kp, sa, x, k, st, depth + 1) + self.crossings(
                    x, k, st, pb, kq, sb, depth + 1
                )
        t = 0.5 * (lo + hi)
        return [((p[0] + t * (q[0] - p[0]), p[1] + t * (q[1] - p[1])), kp, kq)]

    def edge(self, a, b):
        """Crossings between two consecutive ring samples (cached, shared by both cells)."""
        key = (a, b) if a < b else (b, a)
        got = self.edge_points.get(key)
        if got is None:
            ka, sa = self.grid[key[0]]
            kb, sb = self.grid[key[1]]
            got = (
                []
                if ka == kb
                else self.crossings(self.xy(*key[0]), ka, sa, self.xy(*key[1]), kb, sb)
            )
            self.edge_points[key] = got
        if key == (a, b):
            return got
        return [(pt, k2, k1) for pt, k1, k2 in reversed(got)]

    # -------------------------------------------------------------- curves
    def refine(self, p, q, ka, kb, level=0):
        """Points strictly between p and q so that every chord lies within tolerance of the curve."""
        if level > 12:
            return []
        u = np.array([(q[0] - p[0]) / self.tol[0], (q[1] - p[1]) / self.tol[1]])
        length = float(np.hypot(*u))
        if length <= 2.0:
            return []
        n = np.array([-u[1], u[0]]) / length  # unit normal in tolerance units
        mid = (0.5 * (p[0] + q[0]), 0.5 * (p[1] + q[1]))
        km, sm = self.classify(*mid)
        if km not in (ka, kb):
            return []  # another domain comes close: the chord stays (a junction is near)
        want = kb if km == ka else ka

        def along(d):  # the point d tolerance units from mid along the normal
            return (mid[0] + d * n[0] * self.tol[0], mid[1] + d * n[1] * self.tol[1])

        def inside(x):
            return self.x0 <= x[0] <= self.x1 and self.y0 <= x[1] <= self.y1

        fm = self.boundary_fn(sm, ka, kb)
        if self.gradient_fn is not None:
            got = self._newton_normal(mid, sm, fm, n, length, ka, kb, along, inside)
            if got == "near" or got == "other":
                return []  # within tolerance of the chord, or another domain comes close
            if got is not None:
                r = got
                dev = math.hypot((r[0] - mid[0]) / self.tol[0], (r[1] - mid[1]) / self.tol[1])
                if dev <= 1.0:
                    return []
                return (
                    self.refine(p, r, ka, kb, level + 1)
                    + [r]
                    + self.refine(r, q, ka, kb, level + 1)
                )
        # corrector, first try: a secant along the normal from mid predicts the curve
        probe = along(2.0)
        found = None
        if inside(probe) and math.isfinite(fm):
            kp_, sp_ = self.classify(*probe)
            if kp_ == want:
                found = (probe, sp_)
            elif kp_ in (ka, kb):
                fp = self.boundary_fn(sp_, ka, kb)
                if math.isfinite(fp) and fp != fm:
                    d = -2.0 * fm / (fp - fm)
                    if abs(d) <= 0.5:
                        return []  # the curve passes within tolerance of the chord's midpoint
                    beyond = along(1.5 * d)
                    if inside(beyond) and abs(1.5 * d) <= 0.5 * length:
                        kb_, sb_ = self.classify(*beyond)
                        if kb_ == want:
                            found = (beyond, sb_)
        step = max(0.02 * length, 2.0)
        while step <= 0.5 * length and found is None:
            for sign in (1.0, -1.0):
                x = along(sign * step)
                if not inside(x):
                    continue
                k, st = self.classify(*x)
                if k == want:
                    found = (x, st)
                    break
                if k not in (ka, kb):
                    return []
            step *= 3.0
        if found is None:
            return []
        if km == ka:
            pts = self.crossings(mid, ka, sm, found[0], kb, found[1])
        else:
            pts = self.crossings(found[0], ka, found[1], mid, kb, sm)
        if len(pts) != 1:
            return []
        r = pts[0][0]
        dev = math.hypot((r[0] - mid[0]) / self.tol[0], (r[1] - mid[1]) / self.tol[1])
        if dev <= 1.0:
            return []
        return self.refine(p, r, ka, kb, level + 1) + [r] + self.refine(r, q, ka, kb, level + 1)

    def _newton_normal(self, mid, state, value, normal, length, ka, kb, along, inside):
        """Corrector: Newton's method for the curve along the chord's normal through its midpoint.

        Returns the curve point, "near" if the first step shows the curve within half a
        tolerance of the midpoint, "other" if a third domain is met, or None (no
        convergence: the caller falls back to bracketing).
        """
        # direction of one tolerance unit along the normal, in (pH, V)
        direction = (normal[0] * self.tol[0], normal[1] * self.tol[1])
        d, st, f = 0.0, state, value
        for it in range(6):
            g = self.gradient_fn(st, ka, kb)
            slope = g[0] * direction[0] + g[1] * direction[1]
            if not (math.isfinite(slope) and math.isfinite(f)) or slope == 0:
                return None
            dd = -f / slope
            if it == 0 and abs(dd) <= 0.5:
                return "near"
            d += dd
            if it and abs(dd) <= 0.1:  # the step is a tenth of the tolerance: converged
                return along(d)
            x = along(d)
            if abs(d) > 0.5 * length or not inside(x):
                return None
            k, st = self.classify(*x)
            if k not in (ka, kb):
                return "other"
            f = self.boundary_fn(st, ka, kb)
        return None

    def junction(self, crossings, cell):
        """Point where three domains meet: Newton on two boundary functions (2 x 2)."""
        keys = []
        for _, k1, k2 in crossings:
            for k in (k1, k2):
                if k not in keys:
                    keys.append(k)
        guess = np.mean([c[0] for c in crossings], axis=0)
        self.converged = False
        if len(keys) != 3:
            return tuple(guess)
        a, b, c = keys
        x0, y0, x1, y1 = cell
        p = guess.copy()
        hx, hy = 0.25 * self.tol[0], 0.25 * self.tol[1]

        def F(pt):
            st = self.classify(*pt)[1]
            return np.array([self.boundary_fn(st, a, b), self.boundary_fn(st, b, c)]), st

        for _ in range(8):
            f0, st = F(p)
            if not np.all(np.isfinite(f0)):
                return tuple(guess)
            if self.gradient_fn is not None:
                jac = np.array([self.gradient_fn(st, a, b), self.gradient_fn(st, b, c)], float)
            else:  # finite differences
                jac = np.column_stack(
                    [(F(p + [hx, 0.0])[0] - f0) / hx, (F(p + [0.0, hy])[0] - f0) / hy]
                )
            try:
                dp = np.linalg.solve(jac, -f0)
            except np.linalg.LinAlgError:
                return tuple(guess)
            p = p + dp
            # the point may lie just beyond the cell (a triple point near a cell edge is seen
            # by both cells): accept it within one cell's size, so both cells find the same one
            wx, wy = x1 - x0, y1 - y0
            if not (x0 - wx <= p[0] <= x1 + wx and y0 - wy <= p[1] <= y1 + wy):
                return tuple(guess)
            if abs(dp[0]) < 0.1 * self.tol[0] and abs(dp[1]) < 0.1 * self.tol[1]:
                self.converged = True
                return (float(p[0]), float(p[1]))
        return tuple(guess)

    def classify_points(self, points):
        """Classify a list of points, in one batch where a batch classifier is given."""
        if self.classify_many_fn is None or len(points) < _BATCH_MIN:
            return [self.classify(*x) for x in points]
        self.evaluations += len(points)
        return self.classify_many_fn(points)

    def batch_crossings(self, edges):
        """Newton's method on many edges at once: each round solves all edges' iterates together.

        Edges that meet a third domain, leave their bracket or do not settle in a few rounds
        are left to :meth:`crossings` (called by :meth:`edge`).
        """
        work = []
        for a, b in edges:
            (kp, sp), (kq, sq) = self.grid[a], self.grid[b]
            p, q = self.xy(*a), self.xy(*b)
            seg = (q[0] - p[0], q[1] - p[1])
            steps = [
                (abs(d), t + d)
                for t, st in ((0.0, sp), (1.0, sq))
                if (d := self._step(st, self.boundary_fn(st, kp, kq), kp, kq, seg)) is not None
            ]
            if steps:
                t = min(steps)[1]
                if 0.0 < t < 1.0:
                    work.append([(a, b), p, q, kp, kq, seg, self._t_tolerance(p, q), 0.0, 1.0, t])
        for _ in range(6):
            if not work:
                return
            got = self.classify_points(
                [(w[1][0] + w[9] * w[5][0], w[1][1] + w[9] * w[5][1]) for w in work]
            )
            nxt = []
            for w, (k, st) in zip(work, got, strict=True):
                key, p, q, kp, kq, seg, tol_t, lo, hi, t = w
                if k not in (kp, kq):
                    continue  # a third domain between: bracketing sorts it out
                d = self._step(st, self.boundary_fn(st, kp, kq), kp, kq, seg)
                if d is None:
                    continue
                if abs(d) <= 0.1 * tol_t:
                    t = min(max(t + d, lo), hi)
                    self.edge_points[key] = [((p[0] + t * seg[0], p[1] + t * seg[1]), kp, kq)]
                    continue
                lo, hi = (t, hi) if k == kp else (lo, t)
                if lo < t + d < hi:
                    nxt.append([key, p, q, kp, kq, seg, tol_t, lo, hi, t + d])
            work = nxt

    def batch_refine(self, chords):
        """:meth:`refine` for many chords at once: each round solves all chords' points together.

        ``chords`` is a list of (p, q, key_a, key_b); returns, for each, the points strictly
        between p and q. A chord whose corrector does not settle in a few rounds (or leaves
        the window) is refined by :meth:`refine` alone.
        """
        nodes = []  # [p, q, ka, kb, level, result]; result: list, or (left node, r, right node)
        todo = []
        for p, q, ka, kb in chords:
            nodes.append([p, q, ka, kb, 0, None])
            todo.append(len(nodes) - 1)
        tx, ty = self.tol

        def inside(x):
            return self.x0 <= x[0] <= self.x1 and self.y0 <= x[1] <= self.y1

        while todo:
            work = []  # [node, mid, normal, length, d]
            for i in todo:
                p, q, ka, kb, level, _ = nodes[i]
                u = ((q[0] - p[0]) / tx, (q[1] - p[1]) / ty)
                length = math.hypot(*u)
                if level > 12 or length <= 2.0:
                    nodes[i][5] = []
                    continue
                normal = (-u[1] / length, u[0] / length)
                work.append([i, (0.5 * (p[0] + q[0]), 0.5 * (p[1] + q[1])), normal, length, 0.0])
            todo = []
            for rnd in range(7):
                if not work:
                    break
                points = [
                    (w[1][0] + w[4] * w[2][0] * tx, w[1][1] + w[4] * w[2][1] * ty) for w in work
                ]
                got = self.classify_points(points)
                nxt = []
                for w, x, (k, st) in zip(work, points, got, strict=True):
                    i, mid, normal, length, d = w
                    p, q, ka, kb, level, _ = nodes[i]
                    if k not in (ka, kb):
                        nodes[i][5] = []  # another domain comes close: the chord stays
                        continue
                    f = self.boundary_fn(st, ka, kb)
                    g = self.gradient_fn(st, ka, kb)
                    slope = g[0] * normal[0] * tx + g[1] * normal[1] * ty
                    if not (math.isfinite(slope) and math.isfinite(f)) or slope == 0:
                        nodes[i][5] = self.refine(p, q, ka, kb, level)
                        continue
                    dd = -f / slope
                    if rnd == 0 and abs(dd) <= 0.5:
                        nodes[i][5] = []  # the curve passes within tolerance of the midpoint
                        continue
                    d += dd
                    x = (mid[0] + d * normal[0] * tx, mid[1] + d * normal[1] * ty)
                    if rnd and abs(dd) <= 0.1:  # converged: a step of a tenth of the tolerance
                        if abs(d) <= 1.0:
                            nodes[i][5] = []
                            continue
                        nodes.append([p, x, ka, kb, level + 1, None])
                        nodes.append([x, q, ka, kb, level + 1, None])
                        nodes[i][5] = (len(nodes) - 2, x, len(nodes) - 1)
                        todo += [len(nodes) - 2, len(nodes) - 1]
                        continue
                    if abs(d) > 0.5 * length or not inside(x) or rnd == 6:
                        nodes[i][5] = self.refine(p, q, ka, kb, level)
                        continue
                    nxt.append([i, mid, normal, length, d])
                work = nxt
            for w in work:  # not settled in the rounds allowed
                i = w[0]
                nodes[i][5] = self.refine(*nodes[i][:5])

        def assemble(i):
            res = nodes[i][5]
            if isinstance(res, tuple):
                left, r, right = res
                return assemble(left) + [r] + assemble(right)
            return list(res)

        return [assemble(i) for i in range(len(chords))]

    def run(self):
        segments = []
        leaves = self.leaves()
        if self.gradient_fn is not None and self.classify_many_fn is not None:
            edges = {}
            for ci, cj, s in leaves:
                pts = self.ring(ci, cj, s)
                for k in range(len(pts)):
                    a, b = sorted((pts[k], pts[(k + 1) % len(pts)]))
                    if self.grid[a][0] != self.grid[b][0]:
                        edges[(a, b)] = None
            self.batch_crossings(list(edges))
        chords = []
        junctions = []  # [point, keys, cell, converged, first segment, number of segments]
        for ci, cj, s in leaves:
            pts = self.ring(ci, cj, s)
            found = []
            for k in range(len(pts)):
                found += self.edge(pts[k], pts[(k + 1) % len(pts)])
            if not found:
                continue
            if len(found) == 2:
                (p, ka, kb), (q, _, _) = found
                # walking the ring counter-clockwise: ka lies before p, i.e. to the right of p -> q
                chords.append((p, q, ka, kb))
                continue
            x0, y0 = self.xy(ci, cj)
            x1, y1 = self.xy(ci + s, cj + s)
            j = self.junction(found, (x0, y0, x1, y1))
            pairs = {}
            for pt, k1, k2 in found:
                pairs.setdefault(frozenset((k1, k2)), []).append((pt, k1, k2))
            outside = not (x0 <= j[0] <= x1 and y0 <= j[1] <= y1)
            if self.converged and outside and all(len(v) == 2 for v in pairs.values()):
                # the triple point lies in a neighbouring cell: here each boundary only
                # passes through, in at one crossing and out at the other
                for (pt, k1, k2), (qt, _, _) in pairs.values():
                    segments.append((k1, k2, np.array([pt, qt])))
                keys = frozenset(k for _, k1, k2 in found for k in (k1, k2))
                junctions.append([j, keys, (x0, y0, x1, y1), True, len(segments), 0])
                continue
            keys = frozenset(k for _, k1, k2 in found for k in (k1, k2))
            junctions.append([j, keys, (x0, y0, x1, y1), self.converged, len(segments), len(found)])
            for pt, k1, k2 in found:
                segments.append((k1, k2, np.array([pt, j])))
        # a triple point near a cell edge is seen by two cells; where one cell's Newton failed
        # (its point is the crossings' mean), it takes the point its neighbour found
        for _point, keys, (x0, y0, x1, y1), ok, first, count in junctions:
            if ok:
                continue
            wx, wy = x1 - x0, y1 - y0
            near = [
                other[0]
                for other in junctions
                if other[3]
                and other[1] == keys
                and x0 - wx <= other[0][0] <= x1 + wx
                and y0 - wy <= other[0][1] <= y1 + wy
            ]
            if near:
                for n in range(first, first + count):
                    ka, kb, pts = segments[n]
                    segments[n] = (ka, kb, np.array([pts[0], near[0]]))
        if junctions:  # two cells sharing a triple point list the piece along their edge twice
            seen, unique = set(), []
            for ka, kb, pts in segments:
                tag = (frozenset((ka, kb)), frozenset(map(tuple, np.asarray(pts)[[0, -1]])))
                if len(pts) == 2 and tag in seen:
                    continue
                seen.add(tag)
                unique.append((ka, kb, pts))
            segments = unique
        if self.gradient_fn is not None and self.classify_many_fn is not None:
            inner = self.batch_refine(chords)
        else:
            inner = [self.refine(p, q, ka, kb) for p, q, ka, kb in chords]
        for (p, q, ka, kb), mid in zip(chords, inner, strict=True):
            segments.append((ka, kb, np.array([p, *mid, q])))
        samples = {self.xy(*ij): v[0] for ij, v in self.grid.items()}
        return TracedCurves(segments, samples, self.evaluations)


def trace_domains(
    classify,
    boundary,
    window,
    *,
    mesh=(24, 24),
    depth=6,
    tolerance=(1e-3, 1e-4),
    gradient=None,
    classify_many=None,
):
    """Trace the boundaries between the domains of a classification of the plane.

    Parameters
    ----------
    classify : callable
        ``classify(ph, e) -> (key, state)``; ``key`` is hashable and names the
        domain, ``state`` is passed back to ``boundary``.
    boundary : callable
        ``boundary(state, key_a, key_b) -> float``, continuous, negative where
        ``key_a`` holds and positive where ``key_b`` holds.
    window : tuple of float
        ``(ph_lo, ph_hi, e_lo, e_hi)`` [-, -, V, V].
    mesh : (int, int)
        Coarse cells along pH and along E.
    depth : int
        Largest number of halvings of a coarse cell near junctions.
    tolerance : (float, float)
        Accuracy of boundary points along pH and along E [-, V].
    gradient : callable, optional
        ``gradient(state, key_a, key_b) -> (df/dpH, df/dE)`` of ``boundary`` at a
        classified point. With it, crossings and the corrector take Newton steps
        (stopping when a step is below a tenth of the tolerance) instead of
        bracketing, and junctions use it as their Jacobian; where Newton's method
        leaves its bracket or meets a third domain, bracketing takes over.
    classify_many : callable, optional
        ``classify_many(points) -> list of (key, state)`` for a list of (pH, E):
        the mesh and each round of the quadtree's new points are classified in
        one call (e.g. a batched solve) instead of one call per point.

    Returns
    -------
    TracedCurves

    Notes
    -----
    Domains smaller than a coarse cell that touch no sampled point are not
    found; the mesh sets that resolution. See the module docstring for the
    method.

    References
    ----------
    Allgower, E. L. & Georg, K. (1990). *Numerical Continuation Methods*.
    Springer, ch. 1 and 13.
    Dowell, M. & Jarratt, P. (1971). A modified regula falsi method for
    computing the root of an equation. BIT 11, 168-174.

    Examples
    --------
    >>> def classify(x, y):
    ...     return ("in" if x * x + y * y < 1 else "out"), (x, y)
    >>> def boundary(st, a, b):
    ...     f = st[0] ** 2 + st[1] ** 2 - 1
    ...     return f if a == "in" else -f
    >>> t = trace_domains(classify, boundary, (-2, 2, -2, 2), mesh=(8, 8))
    >>> pts = np.vstack([s[2] for s in t.segments])
    >>> bool(np.all(np.abs(np.hypot(pts[:, 0], pts[:, 1]) - 1) < 2e-3))
    True
    """
    nx, ny = (int(v) for v in mesh)
    return _Tracer(
        classify,
        boundary,
        tuple(float(v) for v in window),
        (nx, ny),
        int(depth),
        tolerance,
        gradient,
        classify_many,
    ).run()
