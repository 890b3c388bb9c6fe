"""The walk over optimal bases (multi-parametric LP) against independent references.

References used here, none of them the code under test:
* scipy.optimize.linprog (HiGHS interior point, not the simplex the walk
  starts from) for the optimum at random points;
* a brute-force enumeration written here: every set of up to k species whose
  metal content matches the ratio (numpy.linalg.lstsq), the cheapest at each
  point of a set of random points;
* the map by enumeration of combinations (``ratio_method="enumerate"``), the
  reference method the issue keeps, on the project's steel systems.
Random systems are drawn from a seeded generator (a fixed budget, the same
systems on every run).
"""

import itertools

import numpy as np
import pytest
from scipy.optimize import linprog

from pourbaix.errors import ConditionsError, PourbaixError
from pourbaix.maps.systems import compute_system_map, units_at_ratio
from pourbaix.solve import parametric_lp
from pourbaix.tables.species import load_species

TABLE = load_species()
WINDOW = (-2.0, 16.0, -2.0, 2.0)


def random_system(rng, k, n_extra, degenerate):
    """Pure metals plus random compounds (1-3 atoms of 1-2 metals each) with random cost planes."""
    counts = [np.eye(k)[i] for i in range(k)]
    costs = [np.zeros(3) for _ in range(k)]
    for _ in range(n_extra):
        c = np.zeros(k)
        metals = rng.choice(k, size=rng.integers(1, 3), replace=False)
        c[metals] = rng.integers(1, 4, size=len(metals))
        counts.append(c)
        # a plane like a species formed from the metal, water, H+ and e- (Pourbaix 1974, ch. III):
        # intercept, pH slope from the protons, E slope from the electrons
        electrons = rng.integers(0, 4)
        protons = rng.integers(0, electrons + 2)
        costs.append(
            np.array([rng.uniform(-1.5, 1.5) * c.sum(), -0.0592 * protons, -float(electrons)])
        )
    counts = np.array(counts)
    if degenerate:
        # the metal content of two compounds (plus pure metals where it has none):
        # met by fewer than k species, so the optimal vertices can be degenerate
        a, b = rng.integers(k, k + n_extra, size=2)
        ratio = counts[a] + counts[b]
        ratio[ratio == 0] = 1.0
    else:
        ratio = rng.integers(1, 100, size=k).astype(float)
    return np.array(costs), counts, ratio


def brute_force_optimum(costs, counts, ratio, points):
    """Cheapest set of up to k species matching the ratio at each point, and its cost."""
    r = ratio / ratio.sum()
    k = counts.shape[1]
    sets = []
    for m in range(1, k + 1):
        for idx in itertools.combinations(range(len(costs)), m):
            B = counts[list(idx)].T
            n, *_ = np.linalg.lstsq(B, r, rcond=None)
            if np.abs(B @ n - r).max() < 1e-9 and np.all(n > 1e-9):
                sets.append((idx, n @ costs[list(idx)]))
    planes = np.array([p for _, p in sets])
    vals = (
        planes[:, 0][None]
        + np.outer(points[:, 0], planes[:, 1])
        + np.outer(points[:, 1], planes[:, 2])
    )
    return vals.min(axis=1), [sets[i][0] for i in vals.argmin(axis=1)]


def region_cost_at(regions, costs, points):
    """Cost of the region (basis) that contains each point."""
    from shapely import Point, Polygon

    polys = [Polygon(reg.polygon) for reg in regions]
    out = np.full(len(points), np.nan)
    for m, (x, y) in enumerate(points):
        for reg, poly in zip(regions, polys, strict=True):
            if poly.buffer(1e-9).contains(Point(x, y)):
                plane = reg.amounts @ costs[list(reg.basis)]
                out[m] = plane[0] + plane[1] * x + plane[2] * y
                break
    return out


@pytest.mark.parametrize("k", [2, 3, 4])
def test_walk_matches_brute_force_enumeration_on_random_systems(k):
    rng = np.random.default_rng(1600 + k)
    budget = {2: 25, 3: 15, 4: 8}[k]
    for trial in range(budget):
        costs, counts, ratio = random_system(
            rng, k, n_extra={2: 10, 3: 10, 4: 9}[k], degenerate=trial % 3 == 0
        )
        regions = parametric_lp.walk(costs, counts, ratio, WINDOW)
        # the regions tile the window
        from shapely import Polygon, box, union_all

        # (snapped to 1e-9: GEOS's overlay of edges shared up to rounding is unreliable without it)
        covered = union_all([Polygon(reg.polygon) for reg in regions], grid_size=1e-9)
        assert covered.symmetric_difference(box(-2, -2, 16, 2), grid_size=1e-9).area < 1e-8
        points = np.column_stack([rng.uniform(-2, 16, 60), rng.uniform(-2, 2, 60)])
        best, best_sets = brute_force_optimum(costs, counts, ratio, points)
        np.testing.assert_allclose(region_cost_at(regions, costs, points), best, atol=1e-9)
        # every set that wins at a sampled point is one the walk returns
        walked = {s for s, _ in parametric_lp.optimal_combinations(costs, counts, ratio, WINDOW)}
        assert set(best_sets) <= walked


def test_walk_optimum_equals_linprog_at_random_points():
    rng = np.random.default_rng(16)
    costs, counts, ratio = random_system(rng, 3, 12, degenerate=False)
    regions = parametric_lp.walk(costs, counts, ratio, WINDOW)
    points = np.column_stack([rng.uniform(-2, 16, 40), rng.uniform(-2, 2, 40)])
    ours = region_cost_at(regions, costs, points)
    A = counts.T
    r = ratio / ratio.sum()
    for (x, y), value in zip(points, ours, strict=True):
        c = costs[:, 0] + costs[:, 1] * x + costs[:, 2] * y
        ref = linprog(c, A_eq=A, b_eq=r, bounds=(0, None), method="highs-ipm")
        assert value == pytest.approx(ref.fun, abs=1e-8)


@pytest.mark.parametrize("k", [2, 3, 5])
def test_simplex_basis_is_optimal_where_linprog_says(k):
    # the starting basis of the walk (our own two-phase simplex) against HiGHS
    # (scipy.optimize.linprog, interior point) at random points of random systems,
    # a third of them with degenerate optima
    rng = np.random.default_rng(160 + k)
    for trial in range(12):
        costs, counts, ratio = random_system(rng, k, 4 * k + 4, degenerate=trial % 3 == 0)
        A, r = counts.T, ratio / ratio.sum()
        x, y = rng.uniform(-2, 16), rng.uniform(-2, 2)
        basis = parametric_lp.simplex_basis(costs, counts, ratio, x, y)
        c = costs[:, 0] + costs[:, 1] * x + costs[:, 2] * y
        B = A[:, list(basis)]
        amounts = np.linalg.solve(B, r)
        assert np.all(amounts >= -1e-12)  # primal feasible
        duals = np.linalg.solve(B.T, c[list(basis)])
        assert np.all(c - A.T @ duals >= -1e-9)  # dual feasible: optimal
        ref = linprog(c, A_eq=A, b_eq=r, bounds=(0, None), method="highs-ipm")
        assert amounts @ c[list(basis)] == pytest.approx(ref.fun, abs=1e-9)


def test_simplex_basis_refuses_a_ratio_no_species_meets():
    with pytest.raises(ConditionsError, match="matches the ratio"):
        parametric_lp.simplex_basis([[0, 0, 0]], [[1, 1]], [3, 1], 7.0, 0.0)


@pytest.mark.parametrize("k", [2, 3, 4])
def test_envelope_of_regions_equals_the_envelope_solve(k):
    # the domains and shared edges assembled from the walk's regions against the
    # exact envelope of the same combination planes solved on its own (Qhull route
    # for many planes, vertex enumeration for few), on random systems
    from pourbaix.solve.envelope import lower_envelope

    rng = np.random.default_rng(2600 + k)
    for trial in range(6):
        costs, counts, ratio = random_system(rng, k, 9, degenerate=trial % 3 == 0)
        regions = parametric_lp.walk(costs, counts, ratio, WINDOW)
        combos = parametric_lp.combinations_of(regions)
        planes = np.array([n @ costs[list(c)] for c, n in combos])
        ours = parametric_lp.envelope_of_regions(regions, planes, WINDOW)
        ref = lower_envelope(planes, WINDOW)
        assert ours is not None
        assert ours.stable == ref.stable
        for a, b in zip(ours.polygons, ref.polygons, strict=True):
            if a is None:
                continue
            assert sorted(map(tuple, a.round(7))) == sorted(map(tuple, b.round(7)))

        def edges(env):
            # end points as a set: a vertical edge's order hangs on the last bit of its pH
            return sorted(
                (e.pair, sorted([np.round(e.start, 7).tolist(), np.round(e.end, 7).tolist()]))
                for e in env.edges
            )

        assert edges(ours) == edges(ref)


def test_envelope_of_regions_refuses_planes_that_overlap():
    # two combinations with one plane (equal energy everywhere) would both own the same
    # domain: not a tiling, so the caller solves the envelope itself
    costs, counts, ratio = [[0, 0, 0], [0, 0, 0], [-1, 0.1, 0]], [[1, 0], [0, 1], [1, 1]], [1, 1]
    regions = parametric_lp.walk(costs, counts, ratio, (0, 14, -1, 1))
    combos = parametric_lp.combinations_of(regions)
    planes = [n @ np.asarray(costs, dtype=float)[list(c)] for c, n in combos]
    assert parametric_lp.envelope_of_regions(regions, planes, (0, 14, -1, 1)) is not None
    twice = [*planes, planes[0]]
    assert parametric_lp.envelope_of_regions(regions, twice, (0, 14, -1, 1)) is None


def test_critical_region_of_a_textbook_case():
    # Two metals and a 1:1 compound whose cost -1 + 0.1 pH per formula unit
    # (0.5 formula units per mole of metal) beats the pure metals below pH 10:
    # the metals' region is 10 <= pH <= 14 at every E in [-1, 1], area 4 x 2.
    costs = [[0, 0, 0], [0, 0, 0], [-1, 0.1, 0]]
    counts = [[1, 0], [0, 1], [1, 1]]
    reg = parametric_lp.critical_region(costs, counts, [1, 1], (0, 1), (0, 14, -1, 1))
    assert reg.support == (0, 1)
    assert reg.area == pytest.approx(8.0, rel=1e-12)
    assert sorted(set(reg.polygon[:, 0].round(9))) == [10.0, 14.0]
    # the compound's region is the rest (a degenerate vertex: a zero amount in its basis)
    combos = parametric_lp.optimal_combinations(costs, counts, [1, 1], (0, 14, -1, 1))
    assert [c for c, _ in combos] == [(2,), (0, 1)]
    np.testing.assert_allclose(combos[0][1], [0.5])
    # a basis optimal nowhere in the window has no region
    assert parametric_lp.critical_region(costs, counts, [1, 1], (0, 1), (0, 9, -1, 1)) is None


@pytest.mark.parametrize(
    "metals, ratio",
    [
        (("Fe", "Cr"), (3, 1)),
        (("Fe", "Ni"), (2, 1)),  # the ratio of a mixed spinel, NiFe2O4: a degenerate vertex
        (("Fe", "Cr", "Ni"), (70, 19, 11)),
        (("Cr", "Ni", "Fe"), (1, 1, 1)),
    ],
)
def test_steel_maps_by_walk_equal_the_enumeration(metals, ratio):
    walked = compute_system_map(metals, ratio=ratio, table=TABLE)
    listed = compute_system_map(metals, ratio=ratio, table=TABLE, ratio_method="enumerate")

    def domains(m):
        return sorted((tuple(sorted(d.species)), round(d.area, 7)) for d in m.domains)

    def boundaries(m):
        return sorted(
            (
                tuple(sorted(b.between)),
                sorted([np.round(b.start, 6).tolist(), np.round(b.end, 6).tolist()]),
            )
            for b in m.boundaries
        )

    assert domains(walked) == domains(listed)
    assert boundaries(walked) == boundaries(listed)
    assert sorted(walked.never_stable) == sorted(listed.never_stable)
    assert "multi-parametric" in walked.method


def test_ligand_alloy_maps_by_walk_equal_the_enumeration_on_random_systems():
    # metals, ratio and the ligand's activity drawn at random (seeded), every ligand
    # family with species for these metals in turn: the walk in
    # each region of the ligand's predominant species against the enumeration of
    # every combination matching the ratio (the reference method)
    rng = np.random.default_rng(1616)
    pool = ("Fe", "Cr", "Ni", "Cu", "Zn", "Mo", "Mn", "Co")
    for trial in range(8):
        metals = tuple(
            str(m) for m in rng.choice(pool, size=int(rng.integers(2, 4)), replace=False)
        )
        ratio = tuple(int(v) for v in rng.integers(1, 100, size=len(metals)))
        ligand = ("Cl", "S", "C", "NH3", "CN")[trial % 5]
        ligands = {ligand: float(10 ** rng.uniform(-4, 0))}
        walked = compute_system_map(metals, ratio=ratio, ligands=ligands, table=TABLE)
        listed = compute_system_map(
            metals, ratio=ratio, ligands=ligands, table=TABLE, ratio_method="enumerate"
        )
        case = (metals, ratio, ligands)
        assert _domains(walked) == _domains(listed), case
        assert _boundaries(walked) == _boundaries(listed), case
        assert sorted(walked.never_stable) == sorted(listed.never_stable), case
        assert "in each region of the ligands' predominant species" in walked.method
        assert len(walked.units) < len(listed.units)


def _domains(m):
    return sorted((tuple(sorted(d.species)), round(d.area, 7)) for d in m.domains)


def _boundaries(m):
    return sorted(
        (
            tuple(sorted(b.between)),
            sorted([np.round(b.start, 6).tolist(), np.round(b.end, 6).tolist()]),
        )
        for b in m.boundaries
    )


def test_units_at_another_ratio_are_the_maps_at_that_ratio():
    # one map's species walked at other ratios against the map computed at each ratio by
    # the enumeration (the reference): the same assemblages, planes and areas
    rng = np.random.default_rng(1617)
    m = compute_system_map(("Fe", "Cr", "Ni"), ratio=(70, 19, 11), temperature_c=80.0, table=TABLE)
    for _ in range(3):
        ratio = tuple(float(v) for v in rng.integers(1, 100, size=3))
        units, areas = units_at_ratio(m, ratio)
        ref = compute_system_map(
            ("Fe", "Cr", "Ni"),
            ratio=ratio,
            temperature_c=80.0,
            table=TABLE,
            ratio_method="enumerate",
        )
        ref_areas = {}
        for d in ref.domains:
            ref_areas[d.species] = ref_areas.get(d.species, 0.0) + d.area
        ours = {u.names: a for u, a in zip(units, areas, strict=True)}
        assert set(ours) == set(ref_areas)
        for names, area in ref_areas.items():
            assert ours[names] == pytest.approx(area, abs=1e-9)
        planes = {e.names: e.plane for e in ref.entries}
        for u in units:
            np.testing.assert_allclose(u.plane, planes[u.names], atol=1e-12)
    with pytest.raises(PourbaixError, match="several metals without ligands"):
        units_at_ratio(compute_system_map(("Fe",), ligands={"Cl": 0.1}, table=TABLE), (1,))
    with pytest.raises(PourbaixError, match="needs 3 amounts"):
        units_at_ratio(m, (1, 1))


def test_walk_covers_five_and_more_metals():
    # 316-type steel plus copper, cobalt and titanium: eight metals; the enumeration
    # of up to eight species from the whole table is far out of reach here.
    m = compute_system_map(
        ("Fe", "Cr", "Ni", "Mo", "Mn", "Cu", "Co", "Ti"),
        ratio=(60, 17, 11, 3, 3, 2, 2, 2),
        table=TABLE,
    )
    from shapely import union_all

    total = union_all([d.polygon for d in m.domains], grid_size=1e-9).area
    assert total == pytest.approx(18 * 4, rel=1e-9)
    assert sum(d.area for d in m.domains) == pytest.approx(18 * 4, rel=1e-9)
    assert m.probe(7.0, -1.9).state == "immunity"  # every metal zero-valent far below water


@pytest.mark.parametrize(
    "args, match",
    [
        (([[0, 0, 0]], [[1, 0, 0]], [1, 1], (0, 1, 0, 1)), "counts must be"),
        (([[0, 0]], [[1]], [1], (0, 1, 0, 1)), "costs must be"),
        (([[0, 0, 0]], [[1]], [-1], (0, 1, 0, 1)), "ratio amounts"),
        (([[0, 0, 0]], [[1]], [1], (1, 0, 0, 1)), "window"),
        (([[0, 0, 0]], [[1], [1]], [1], (0, 1, 0, 1)), "counts must be"),
    ],
)
def test_bad_input_names_the_fault(args, match):
    with pytest.raises(ConditionsError, match=match):
        parametric_lp.walk(*args)


def test_a_ratio_no_species_can_meet_is_an_error():
    # only a 1:1 compound of two metals and no pure metals: 3:1 cannot be met
    with pytest.raises(PourbaixError, match="matches the ratio"):
        parametric_lp.walk([[0, 0, 0]], [[1, 1]], [3, 1], (0, 1, 0, 1))


def test_ratio_method_is_checked():
    with pytest.raises(PourbaixError, match="ratio_method"):
        compute_system_map(("Fe", "Cr"), ratio=(1, 1), table=TABLE, ratio_method="grid")
