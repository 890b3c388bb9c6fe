"""Batched maps against one compute_map call per map, and against shapely.

Reference for every batched answer: the single-map route (compute_map, its
probe, analyses.solubility) at the same conditions, and shapely for the
passive width (the length of a vertical line inside the passivation domains).
Grid points are drawn from a seeded generator.
"""

import numpy as np
import pytest
import shapely

from pourbaix.analyses.solubility import solubility
from pourbaix.errors import ConditionsError, PourbaixError
from pourbaix.maps.domain_map import compute_map
from pourbaix.solve import batch
from pourbaix.tables.species import load_species

TABLE = load_species()


def grid(rng, n):
    temps = rng.choice([25.0, 60.0, 95.0, 150.0, 220.0], size=n)
    acts = 10.0 ** rng.uniform(-8, -3, size=n)
    return temps, acts


CASES = [
    ("Fe", {}, "activity", None),
    ("Zn", {"reference": "SCE"}, "activity", None),
    ("Cu", {}, "molality", 0.3),
    ("Ni", {"ph_range": (0.0, 14.0), "potential_range_v": (-1.5, 1.5)}, "activity", 0.05),
]


@pytest.mark.parametrize("element, extra, amount, ionic", CASES)
def test_batch_equals_single_maps_at_random_grid_points(element, extra, amount, ionic):
    rng = np.random.default_rng(sum(map(ord, element)))
    temps, acts = grid(rng, 24)
    kwargs = dict(extra, table=TABLE)
    if ionic is not None:
        kwargs["ionic_strength"] = ionic
    b = batch.batch_planes(element, temperature_c=temps, **{amount: acts}, **kwargs)
    points_ph = np.array([2.0, 7.0, 11.5])
    points_e = np.array([-0.6, 0.1, 0.8])
    probe = batch.stable_at(b.planes, points_ph, points_e)
    areas = batch.domain_areas(b.planes, b.window)
    passive = batch.passive_width(b.planes, np.array(b.states) == "passivation", 7.0, b.window)
    log_total, solid = batch.solubility_at(b, 7.0, 0.1)
    for m in rng.choice(len(temps), size=6, replace=False):
        single = compute_map(element, temperature_c=temps[m], **{amount: acts[m]}, **kwargs)
        assert [e.names[0] for e in single.entries] == list(b.names)
        np.testing.assert_allclose(b.planes[m], np.array(single._planes), atol=1e-12)
        ref = single.probe(points_ph, points_e)
        assert [b.names[i] for i in probe["species"][m]] == list(ref.species)
        for key in ("margin_up_v", "margin_down_v", "margin_acid_ph", "margin_alkaline_ph"):
            np.testing.assert_allclose(probe[key][m], getattr(ref, key), atol=1e-9)
        for key in ("neighbour_up", "neighbour_down", "neighbour_acid", "neighbour_alkaline"):
            names = ["" if i < 0 else b.names[i] for i in probe[key][m]]
            assert names == list(getattr(ref, key))
        want = {d.species[0]: d.area for d in single.domains}
        got = {n: a for n, a in zip(b.names, areas[m], strict=True) if a > 0}
        assert set(got) == set(want)
        for name, area in want.items():
            assert got[name] == pytest.approx(area, rel=1e-9, abs=1e-9)
        ph_lo, ph_hi, e_lo, e_hi = single.window
        line = shapely.LineString([(7.0, e_lo), (7.0, e_hi)])
        width = sum(
            d.polygon.intersection(line).length for d in single.domains if d.state == "passivation"
        )
        assert passive[m] == pytest.approx(width, abs=1e-9)
        sol = solubility(single, 7.0, 0.1)
        assert log_total[m] == pytest.approx(sol.log10_total, abs=1e-9)
        assert b.names[solid[m]] == sol.solid


def test_areas_tile_the_window_for_many_maps():
    temps = np.linspace(25, 300, 40)
    b = batch.batch_planes("Fe", temperature_c=temps, activity=1e-6, table=TABLE)
    areas = batch.domain_areas(b.planes, b.window, workers=2)
    np.testing.assert_allclose(areas.sum(axis=1), 18.0 * 4.0, rtol=1e-9)


def test_small_cases_by_hand():
    # two planes crossing at E = 0: each holds half of a 1 x 2 window
    assert batch.domain_areas([[[0, 0, 0], [0, 0, -1]]], (0, 1, -1, 1)).tolist() == [[1.0, 1.0]]
    # a single plane holds the whole window
    assert batch.domain_areas([[[0, 0, 0]]], (0, 2, 0, 3)).tolist() == [[6.0]]
    r = batch.stable_at([[[0, 0, 0], [1, 0, -1]]], 7.0, [0.25, 2.0])
    assert r["species"].tolist() == [[0, 1]]
    assert r["margin_up_v"][0, 0] == pytest.approx(0.75)
    assert r["neighbour_up"][0, 1] == -1 and np.isinf(r["margin_up_v"][0, 1])


@pytest.mark.parametrize(
    "call, match",
    [
        (lambda: batch.domain_areas([[0, 0, 0]], (0, 1, 0, 1)), "planes must be"),
        (lambda: batch.domain_areas([[[0, 0, 0]]], (1, 0, 0, 1)), "window"),
        (lambda: batch.stable_at([[[0, 0, 0]]], [np.nan], [0.0]), "finite"),
        (
            lambda: batch.batch_planes("Fe", temperature_c=[25, 30], activity=[1e-6] * 3),
            "one length",
        ),
        (lambda: batch.batch_planes("Fe", activity=[-1.0]), "> 0"),
        (lambda: batch.batch_planes("Fe Cr"), "one element"),
        (lambda: batch.batch_planes("Fe", activity=1e-6, molality=1e-6), "either"),
    ],
)
def test_bad_input_names_the_fault(call, match):
    with pytest.raises(PourbaixError, match=match):
        call()


def test_solubility_needs_a_solid_and_a_dissolved_species():
    b = batch.batch_planes("Fe", only=["Fe^2+"], table=TABLE)
    b = batch.PlaneBatch(**{**b.__dict__, "dissolved": np.zeros_like(b.dissolved)})
    with pytest.raises(ConditionsError, match="no solubility"):
        batch.solubility_at(b, 7.0, 0.0)
