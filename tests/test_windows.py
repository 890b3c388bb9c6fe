"""Leach windows: a known separation, every point meeting the definition, and empty windows that say why."""

import numpy as np
import pytest
import shapely

from pourbaix.analyses.solubility import solubility
from pourbaix.analyses.windows import leach_window
from pourbaix.errors import ConditionsError, OptionError
from pourbaix.maps.domain_map import compute_map
from pourbaix.tables.species import load_species

SULFATE = {"S": 0.1}


@pytest.fixture(scope="module")
def table():
    return load_species()


@pytest.fixture(scope="module")
def cu_over_fe(table):
    return leach_window("Cu", ["Fe"], 1e-2, 1e-5, ligands=SULFATE, table=table)


def _sample(region, n, seed=1, keep_off=1e-6):
    rng = np.random.default_rng(seed)
    x0, y0, x1, y1 = region.bounds
    out = []
    while len(out) < n:
        x = rng.uniform(x0, x1, 4 * n)
        y = rng.uniform(y0, y1, 4 * n)
        inside = shapely.contains_xy(region, x, y)
        pts = np.column_stack([x[inside], y[inside]])
        d = shapely.distance(region.boundary, shapely.points(pts))
        out += list(pts[d > keep_off])
    return np.array(out[:n])


def test_copper_dissolves_over_ferric_solid_in_acid_sulfate(cu_over_fe):
    # common practice: in oxidising acid sulfate liquors iron drops out as a ferric solid from a pH of
    # about 1-3 (hematite to ferrihydrite) while copper stays in solution up to about pH 4-5
    w = cu_over_fe
    assert not w.empty and w.reasons == []
    main = w.components[0]
    assert 0.5 < main["ph_bounds"][0] < 3.0
    assert 3.0 < main["ph_bounds"][1] < 6.0
    assert w.contains(3.0, 0.9)  # an oxidising acid sulfate leach
    assert not w.contains(0.0, 0.9)  # strong acid: iron dissolves as Fe3+
    assert not w.contains(3.0, 0.3)  # reducing: iron dissolves as Fe2+
    assert w.maps["Fe"].probe(3.0, 0.9).species.startswith("Fe2O3")


def test_every_window_point_meets_the_definition_when_probed(table):
    # species basis: the map convention, checked with the maps' own exact probe at each level
    w = leach_window("Cu", ["Fe"], 1e-2, 1e-5, ligands=SULFATE, basis="species", table=table)
    pts = _sample(w.region, 300)
    cu = compute_map("Cu", activity=1e-2, ligands=SULFATE, table=table).probe(pts[:, 0], pts[:, 1])
    fe = compute_map("Fe", activity=1e-5, ligands=SULFATE, table=table).probe(pts[:, 0], pts[:, 1])
    assert np.all(cu.state == "corrosion")
    assert np.all(fe.state != "corrosion")


def test_total_basis_window_is_on_the_safe_side(cu_over_fe):
    w = cu_over_fe
    pts = _sample(w.region, 300, seed=2, keep_off=0.0)
    cu = solubility(w.maps["Cu"], pts[:, 0], pts[:, 1]).log10_total
    fe = solubility(w.maps["Fe"], pts[:, 0], pts[:, 1]).log10_total
    assert np.all(cu >= -2.0 - 1e-9) and np.all(fe <= -5.0 + 1e-9)
    # inside the water window: between the H2O/H2 and O2/H2O lines
    e_o, s_o = w.maps["Cu"].water["oxygen"]
    e_h, s_h = w.maps["Cu"].water["hydrogen"]
    assert np.all(pts[:, 1] <= e_o + s_o * pts[:, 0] + 1e-9) and np.all(
        pts[:, 1] >= e_h + s_h * pts[:, 0] - 1e-9
    )


def test_best_point_and_margins_are_consistent(cu_over_fe):
    w = cu_over_fe
    x, y = w.best_point
    assert w.contains(x, y)
    m = w.margins
    assert min(m["acid_ph"], m["alkaline_ph"], m["down_v"], m["up_v"]) > 0
    assert w.contains(x - 0.99 * m["acid_ph"], y) and w.contains(x + 0.99 * m["alkaline_ph"], y)
    assert w.contains(x, y - 0.99 * m["down_v"]) and w.contains(x, y + 0.99 * m["up_v"])
    assert not w.contains(x - 1.01 * m["acid_ph"], y) and not w.contains(x, y + 1.01 * m["up_v"])
    assert w.solubility_at_best["Cu"] >= 1e-2 and w.solubility_at_best["Fe"] <= 1e-5
    assert w.area == pytest.approx(sum(c["area"] for c in w.components))


def test_iron_leach_leaving_copper_metal(table):
    # common practice (cementation's reverse): at mildly reducing potentials in acid, iron dissolves as
    # Fe2+ while copper stays metallic
    w = leach_window("Fe", "Cu", 1e-2, 1e-9, table=table)
    assert not w.empty
    x, y = w.best_point
    assert w.maps["Cu"].probe(x, y).species == "Cu"
    assert w.maps["Fe"].probe(x, y).species == "Fe^2+"


def test_empty_windows_say_why(table):
    # gold dissolves only above the O2/H2O line in plain water (common practice: it needs a complexant)
    w = leach_window("Au", ["Cu"], 1e-2, 1e-5, table=table)
    assert w.empty and "outside the stability field of water" in w.reasons[0]
    assert w.to_dict()["empty"] is True
    wide = leach_window("Au", [], 1e-2, 1e-5, within_water=False, table=table)
    assert not wide.empty
    # zinc metal (the only place zinc stays below 1e-9) lies below the H2O/H2 line
    w = leach_window("Cu", ["Zn"], 1e-2, 1e-9, table=table)
    assert w.empty and w.reasons[0].startswith("Zn stays at or below 1e-09 mol/kg only outside")
    # copper at 1 mol/kg needs strong acid, where ferric solids hold iron only far above 1e-12
    w = leach_window("Cu", ["Fe"], 1.0, 1e-12, table=table)
    assert w.empty and w.reasons == [
        "wherever Cu reaches 1 mol/kg, Fe is dissolved (total) above 1e-12 mol/kg"
    ]
    assert w.best_point is None and w.ph_bounds is None and w.area == 0.0


def test_bad_input(table):
    with pytest.raises(OptionError, match="both the element to dissolve and one to keep"):
        leach_window("Cu", ["Cu"], table=table)
    with pytest.raises(ConditionsError, match="min_dissolved"):
        leach_window("Cu", ["Fe"], -1.0, table=table)
    with pytest.raises(OptionError, match="give a level for Zn"):
        leach_window("Cu", ["Fe", "Zn"], 1e-2, {"Fe": 1e-5}, table=table)
    with pytest.raises(OptionError, match="basis"):
        leach_window("Cu", ["Fe"], basis="mean", table=table)
    with pytest.raises(OptionError, match="one element to dissolve"):
        leach_window("Cu Ni", ["Fe"], table=table)
    with pytest.raises(OptionError, match="precomputed maps or conditions"):
        leach_window("Cu", ["Fe"], maps={}, temperature_c=40)
