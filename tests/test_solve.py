"""Properties of the exact solver: tiling, argmin agreement, boundaries on their lines.

The references here are independent of the production route: a dense grid
argmin (the grid is only ever a reference: DEVELOPERS.md) and the O(N^2)
clipping construction, checked against each other and against Qhull.
"""

import os

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from shapely.geometry import Polygon

from pourbaix.errors import ConditionsError
from pourbaix.solve.envelope import clip_domains, lower_envelope

# examples per property test multiply by this (a larger run: see DEVELOPERS.md)
PROPERTY_SCALE = int(os.environ.get("POURBAIX_PROPERTY_SCALE", "1"))

WINDOW = (-2.0, 16.0, -2.0, 2.0)
WINDOW_AREA = 18.0 * 4.0


def _planes(draw_floats, n):
    return np.array(draw_floats, dtype=float).reshape(n, 3)


@st.composite
def plane_sets(draw, max_n=25):
    """Random planes with the coefficient ranges real species have.

    c0 within a few volts; pH slopes are multiples of -k/x (k = 0.05916 V);
    potential slopes -n/x with small integers (common practice for
    metal-water systems: 0-8 electrons, 0-16 protons per atom). c0 is rounded
    to 1 µV: free energies are known to 0.1 kJ/mol at best (about 1 mV per
    electron), so features narrower than 1 µV are below the data's meaning and
    below the solver's stated resolution.
    """
    n = draw(st.integers(1, max_n))
    k = 0.05916
    rows = []
    for _ in range(n):
        x = draw(st.integers(1, 3))
        c0 = round(draw(st.floats(-3.0, 3.0, allow_nan=False)), 6)
        m = draw(st.integers(-4, 16))
        e = draw(st.integers(-2, 8))
        rows.append((c0, -m * k / x, -e / x))
    return np.array(rows)


def _area(poly):
    return Polygon(poly).area


@settings(max_examples=150 * PROPERTY_SCALE, deadline=None)
@given(plane_sets())
def test_domains_tile_the_window(planes):
    env = lower_envelope(planes, WINDOW)
    polys = [Polygon(p) for p in env.polygons if p is not None]
    assert polys, "at least one plane is lowest somewhere"
    total = sum(p.area for p in polys)
    assert total == pytest.approx(WINDOW_AREA, rel=1e-9)
    for a in range(len(polys)):
        for b in range(a + 1, len(polys)):
            assert polys[a].intersection(polys[b]).area <= 1e-9


@settings(max_examples=150 * PROPERTY_SCALE, deadline=None)
@given(plane_sets(), st.integers(0, 2**31 - 1))
def test_domain_holding_a_point_is_the_argmin(planes, seed):
    env = lower_envelope(planes, WINDOW)
    rng = np.random.default_rng(seed)
    pts = np.column_stack([rng.uniform(-2, 16, 200), rng.uniform(-2, 2, 200)])
    vals = (
        planes[:, 0][None, :]
        + np.outer(pts[:, 0], planes[:, 1])
        + np.outer(pts[:, 1], planes[:, 2])
    )
    best = vals.min(axis=1)
    polys = {i: Polygon(p) for i, p in enumerate(env.polygons) if p is not None}
    from shapely.geometry import Point

    for (x, y), b, row in zip(pts, best, vals, strict=True):
        owners = [i for i, P in polys.items() if P.distance(Point(x, y)) <= 1e-9]
        assert owners, "every point of the window is in some domain"
        # the owner's energy equals the minimum there (ties on boundaries allowed)
        assert min(row[i] for i in owners) == pytest.approx(b, abs=1e-7)


@settings(max_examples=150 * PROPERTY_SCALE, deadline=None)
@given(plane_sets())
def test_boundary_end_points_lie_on_their_pair_line(planes):
    env = lower_envelope(planes, WINDOW)
    for e in env.edges:
        i, j = e.pair
        for x, y in (e.start, e.end):
            vi = planes[i] @ (1.0, x, y)
            vj = planes[j] @ (1.0, x, y)
            assert vi == pytest.approx(vj, abs=1e-7)
            if np.isfinite(e.slope_v_per_ph):
                assert y == pytest.approx(e.e_at_ph0_v + e.slope_v_per_ph * x, abs=1e-7)
            else:
                assert x == pytest.approx(e.ph_at_vertical, abs=1e-7)


@settings(max_examples=100 * PROPERTY_SCALE, deadline=None)
@given(plane_sets(max_n=12))
def test_qhull_route_equals_clipping_route(planes):
    env = lower_envelope(planes, WINDOW)
    ref = clip_domains(planes, WINDOW)
    for a, b in zip(env.polygons, ref, strict=True):
        if a is None or b is None:
            # a sliver below rounding may be dropped by one route only
            other = b if a is None else a
            assert other is None or _area(other) < 1e-8
            continue
        pa, pb = Polygon(a), Polygon(b)
        assert pa.symmetric_difference(pb).area < 1e-8


def test_grid_argmin_agrees_away_from_boundaries():
    rng = np.random.default_rng(7)
    planes = np.column_stack(
        [rng.uniform(-1, 1, 30), -0.05916 * rng.integers(0, 8, 30), -rng.integers(0, 6, 30)]
    )
    env = lower_envelope(planes, WINDOW)
    xs, ys = np.meshgrid(np.linspace(-2, 16, 181), np.linspace(-2, 2, 161))
    x, y = xs.ravel(), ys.ravel()
    vals = planes[:, 0][None, :] + np.outer(x, planes[:, 1]) + np.outer(y, planes[:, 2])
    arg = vals.argmin(axis=1)
    srt = np.sort(vals, axis=1)
    clear = (srt[:, 1] - srt[:, 0]) > 1e-3  # not within 1 mV of a boundary
    from shapely import dwithin, points

    for i, p in enumerate(env.polygons):
        if p is None:
            assert not np.any(arg[clear] == i)
            continue
        inside = dwithin(Polygon(p), points(x, y), 1e-9)
        assert np.all(inside[clear] == (arg[clear] == i))


# ---------------------------------------------------------------- degenerate cases
def test_one_species_owns_the_whole_window():
    env = lower_envelope([[0.3, -0.02, 0.5]], WINDOW)
    assert _area(env.polygons[0]) == pytest.approx(WINDOW_AREA)
    assert env.edges == []


def test_parallel_planes_give_parallel_strips():
    # psi = c0 - E: three parallel planes, the lowest everywhere wins
    env = lower_envelope([[0.0, 0.0, -1.0], [0.5, 0.0, -1.0], [-0.2, 0.0, -1.0]], WINDOW)
    assert env.polygons[0] is None and env.polygons[1] is None
    assert _area(env.polygons[2]) == pytest.approx(WINDOW_AREA)


def test_parallel_boundaries_make_bands():
    # metal (0), ion at -0.4 V (2 e-), higher ion at +0.8 V: horizontal bands
    # (M^3+ / M^2+ at +0.8 V: psi_3 = psi_2 there, so c0_3 = -0.8 - 1.6 + 2.4 = 0)
    planes = [[0.0, 0.0, 0.0], [-0.8, 0.0, -2.0], [0.0, 0.0, -3.0]]
    env = lower_envelope(planes, WINDOW)
    lines = sorted(e.e_at_ph0_v for e in env.edges)
    assert lines == pytest.approx([-0.4, 0.8])
    assert all(e.slope_v_per_ph == pytest.approx(0.0) for e in env.edges)


def test_coincident_planes_keep_the_first():
    env = lower_envelope([[0.0, 0.0, 0.0], [0.1, 0.0, -1.0], [0.1, 0.0, -1.0]], WINDOW)
    assert env.coincident == {2: 1}
    assert env.polygons[2] is None and env.polygons[1] is not None


def test_species_never_stable_has_no_domain():
    env = lower_envelope([[0.0, 0.0, 0.0], [5.0, 0.0, 0.0]], WINDOW)
    assert env.polygons[1] is None
    assert env.stable == [0]


def test_window_inside_one_domain():
    planes = [[0.0, 0.0, 0.0], [-0.8, 0.0, -2.0]]  # boundary at E = -0.4 V
    env = lower_envelope(planes, (0.0, 14.0, 0.0, 1.0))
    assert env.polygons[0] is None
    assert _area(env.polygons[1]) == pytest.approx(14.0)


def test_triple_point_on_the_window_edge():
    # lines E = 0 (0|1), pH = 0 (0|2 vertical), both meeting at (0, 0) on the left edge
    planes = [[0.0, 0.0, 0.0], [0.0, 0.0, -1.0], [0.0, 1.0, 0.0]]
    env = lower_envelope(planes, (0.0, 14.0, -1.0, 1.0))
    assert env.polygons[2] is None  # plane 2 is above plane 0 for all pH > 0
    assert _area(env.polygons[0]) + _area(env.polygons[1]) == pytest.approx(28.0)
    planes = [[0.0, 0.0, 0.0], [0.0, 0.0, -1.0], [0.0, -0.1, 0.5]]
    env = lower_envelope(planes, (0.0, 14.0, -1.0, 1.0))
    total = sum(_area(p) for p in env.polygons if p is not None)
    assert total == pytest.approx(28.0)
    xs = [x for e in env.edges for x in (e.start[0], e.end[0])]
    assert min(xs) == pytest.approx(0.0, abs=1e-12)


def test_vertical_boundary_is_reported_by_ph():
    # acid-base pair: psi differs only in pH (no electrons): boundary at pH 7
    planes = [[0.0, 0.0, -1.0], [7 * 0.05916, -0.05916, -1.0]]
    env = lower_envelope(planes, WINDOW)
    (e,) = env.edges
    assert e.ph_at_vertical == pytest.approx(7.0)
    assert not np.isfinite(e.slope_v_per_ph)


@pytest.mark.parametrize(
    "window, match",
    [
        ((0, 0, -1, 1), "pH range must increase"),
        ((0, 14, 1, -1), "potential range must increase"),
        ((0, np.inf, -1, 1), "finite"),
        ((0, 14), "four numbers"),
    ],
)
def test_bad_windows_are_refused(window, match):
    with pytest.raises(ConditionsError, match=match):
        lower_envelope([[0, 0, 0]], window)


def test_non_finite_plane_is_refused():
    with pytest.raises(ConditionsError, match="plane 1 has a non-finite"):
        lower_envelope([[0, 0, 0], [np.nan, 0, 0]], WINDOW)


@settings(max_examples=100 * PROPERTY_SCALE, deadline=None)
@given(plane_sets(max_n=20))
def test_enumeration_and_qhull_vertex_routes_agree(planes):
    """The small-N route (candidate enumeration) and the large-N route (Qhull) give one answer."""
    import pourbaix.solve.envelope as solve_module

    small = lower_envelope(planes, WINDOW)
    saved = solve_module._SMALL_N
    solve_module._SMALL_N = 0
    try:
        big = lower_envelope(planes, WINDOW)
    finally:
        solve_module._SMALL_N = saved
    for a, b in zip(small.polygons, big.polygons, strict=True):
        assert (a is None) == (b is None)
        if a is not None:
            assert Polygon(a).symmetric_difference(Polygon(b)).area < 1e-9
    assert sorted(e.pair for e in small.edges) == sorted(e.pair for e in big.edges)


def test_clip_halfplane_matches_shapely():
    # Reference: GEOS intersection of the polygon with a large box on the kept side of the line.
    from shapely.geometry import Polygon as ShapelyPolygon

    from pourbaix.solve.envelope import clip_halfplane

    rng = np.random.default_rng(7)
    for _ in range(200):
        ang = np.sort(rng.uniform(0, 2 * np.pi, rng.integers(3, 9)))
        poly = np.column_stack([np.cos(ang), np.sin(ang)]) * rng.uniform(0.5, 3) + rng.uniform(
            -1, 1, 2
        )
        d = rng.normal(size=3)
        got = clip_halfplane(poly, d)
        # kept side d0 + d1 x + d2 y <= 0 as a big polygon: points far along -normal from the line
        n = d[1:] / np.hypot(*d[1:])
        p0 = -d[0] * d[1:] / (d[1:] @ d[1:])  # a point on the line
        t = np.array([-n[1], n[0]])
        side = ShapelyPolygon(
            [p0 + 50 * t, p0 - 50 * t, p0 - 50 * t - 50 * n, p0 + 50 * t - 50 * n]
        )
        want = ShapelyPolygon(poly).intersection(side).area
        assert (0.0 if got is None else ShapelyPolygon(got).area) == pytest.approx(want, abs=1e-9)
    square = np.array([[0.0, 0.0], [1.0, 0.0], [1.0, 1.0], [0.0, 1.0]])
    assert clip_halfplane(square, np.array([-2.0, 1.0, 0.0])) is square  # x <= 2 keeps it whole
    assert clip_halfplane(square, np.array([2.0, 1.0, 0.0])) is None  # x <= -2 leaves nothing
    assert clip_halfplane(None, np.array([0.0, 1.0, 0.0])) is None
