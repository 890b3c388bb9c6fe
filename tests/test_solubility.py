"""Solubility: values against hand arithmetic from the tables, facts of the trade, and exact geometry."""

import math

import numpy as np
import pytest
import shapely

from pourbaix.analyses.solubility import (
    solid_onset,
    solubility,
    solubility_curve,
    solubility_lines,
    solubility_minimum,
    solubility_region,
)
from pourbaix.errors import ConditionsError, OptionError
from pourbaix.maps.domain_map import compute_map
from pourbaix.tables.species import load_species

# CODATA 2018 exact/recommended constants (independent of the package's own)
R = 8.314462618  # J/(mol K)
T = 298.15  # K
RT_LN10_KJ = R * T * math.log(10) / 1000.0  # kJ/mol per decade


@pytest.fixture(scope="module")
def zn():
    return compute_map("Zn")


def _hand_zinc_solubility(ph):
    """Total dissolved Zn over ZnO (or Zn(OH)2, whichever is lower), by hand from the table ΔfG° values.

    For Zn(OH)_j^(2-j), j = 0..4, formed from the solid written as Zn(OH)2:
        Zn(OH)2(s) + (2 - j) H+ = Zn(OH)_j^(2-j) + (2 - j) H2O
        log a_j = -ΔrG / (RT ln10) - (2 - j) pH          (mass action; G(H+) = 0)
    """
    t = load_species()
    g = lambda f, p: t.get(f, p).dgf_kj_mol  # noqa: E731
    g_w = g("H2O", "l")
    g_solid = min(g("ZnO", "s") + g_w, g("Zn(OH)2", "s"))
    dissolved = [("Zn^2+", 0), ("ZnOH^+", 1), ("Zn(OH)2", 2), ("Zn(OH)3^-", 3), ("Zn(OH)4^2-", 4)]
    total = np.zeros_like(ph)
    for formula, j in dissolved:
        d_rg = g(formula, "aq") + (2 - j) * g_w - g_solid
        total += 10.0 ** (-d_rg / RT_LN10_KJ - (2 - j) * ph)
    return total


def test_zinc_minimum_matches_hand_arithmetic_from_the_tables(zn):
    ph = np.arange(6.0, 14.0, 0.0005)
    s = _hand_zinc_solubility(ph)
    k = int(np.argmin(s))
    ph_min, res = solubility_minimum(zn, potential_v=0.0, ph_range=(6.0, 14.0))
    # the hand scan has a 0.0005 pH step; the minimum is flat, so 0.01 pH
    assert ph_min == pytest.approx(ph[k], abs=0.01)
    # same tables, different constants and code paths: agree to 0.001 decade
    assert math.log10(float(res.total_molality)) == pytest.approx(math.log10(s[k]), abs=1e-3)
    # the whole curve, not just the minimum
    grid = np.linspace(6.0, 14.0, 33)
    curve = solubility_curve(zn, grid, potential_v=0.0)
    assert np.allclose(curve.log10_total, np.log10(_hand_zinc_solubility(grid)), atol=1e-3)


def test_zinc_least_soluble_near_ph_9_to_10_and_amphoteric(zn):
    # common practice: zinc is amphoteric, least soluble near pH 9-10
    ph_min, res = solubility_minimum(zn, potential_v=0.0, ph_range=(4.0, 14.0))
    assert 9.0 <= ph_min <= 10.0
    assert res.solid == "ZnO"
    grid = np.linspace(5.0, 14.0, 91)
    logs = solubility_curve(zn, grid, potential_v=0.0).log10_total
    acid, alkaline = logs[grid < ph_min], logs[grid > ph_min]
    assert np.all(np.diff(acid) < 0) and np.all(np.diff(alkaline) > 0)
    # the rise is large on both sides (orders of magnitude, common practice)
    assert acid[0] - float(res.log10_total) > 4 and alkaline[-1] - float(res.log10_total) > 2


def test_aluminium_least_soluble_near_ph_6():
    # common practice: aluminium hydroxide is least soluble near pH 6 (coagulation practice works at 6-7)
    ph_min, res = solubility_minimum(compute_map("Al"), potential_v=0.0, ph_range=(2.0, 12.0))
    assert 5.5 <= ph_min <= 7.0
    assert res.dominant in ("Al(OH)3(aq)", "Al(OH)2^+", "Al(OH)4^-")


def test_scalar_array_and_beyond_window(zn):
    r = solubility(zn, 9.5, 0.0)
    assert isinstance(r.total_molality, float) and isinstance(r.solid, str)
    arr = solubility(zn, np.array([[7.0, 8.0], [9.0, 10.0]]), 0.0)
    assert arr.total_molality.shape == (2, 2) and arr.species_molality.shape == (
        2,
        2,
        len(arr.species),
    )
    # total is the sum of x_i m_i over species (all x_i = 1 for zinc)
    assert np.allclose(arr.total_molality, arr.species_molality.sum(axis=-1))
    # exact formula: valid beyond the drawn window (pH 20 is outside -2..16)
    far = solubility(zn, 20.0, 0.0)
    assert far.dominant == "Zn(OH)4^2-" and math.isfinite(far.log10_total)


def test_immune_point_is_over_metal_and_dissolved_domain_is_under_saturated(zn):
    # at -1.5 V the metal is the least-soluble solid; the map (1e-6) shows immunity there
    low = solubility(zn, 7.0, -1.5)
    assert low.solid == "Zn" and low.saturation == "over-saturated" and low.total_molality < 1e-6
    # at pH 5 the map shows Zn^2+ (corrosion): under-saturated at 1e-6, solubility far above it
    acid = solubility(zn, 5.0, 0.0)
    assert (
        acid.solid == "ZnO" and acid.saturation == "under-saturated" and acid.total_molality > 1e-6
    )
    assert zn.probe(5.0, 0.0).state == "corrosion"


def test_ionic_strength_turns_activity_into_molality():
    # the map is set by activity; molality = a / γ. Davies at I = 0.1 for z = 2 by hand:
    # log γ = -A z² (√I/(1+√I) - 0.3 I), A = 0.5091 at 25 °C (Robinson & Stokes 1959; from memory)
    i = 0.1
    log_g = -0.5091 * 4 * (math.sqrt(i) / (1 + math.sqrt(i)) - 0.3 * i)
    plain = solubility("Zn", 5.0, 0.0)
    salty = solubility("Zn", 5.0, 0.0, ionic_strength=i)
    assert plain.dominant == "Zn^2+"
    # A from memory to 4 digits: 1 % on the ratio
    assert salty.total_molality / plain.total_molality == pytest.approx(10 ** (-log_g), rel=0.01)


def test_ammonia_raises_copper_solubility_in_alkaline_water():
    # common practice: ammoniacal leaching dissolves copper as the tetraammine complex near pH 9-10
    plain = solubility("Cu", 10.0, 0.3)
    ammine = solubility("Cu", 10.0, 0.3, ligands={"NH3": 1.0})
    assert ammine.dominant == "Cu(NH3)4^2+"
    assert ammine.log10_total - plain.log10_total > 5


def _solid_dissolved_segments(dmap):
    segs = []
    for b in dmap.boundaries:
        states = {dmap.entries[i].state for i in b.entries}
        if "corrosion" in states and len(states) == 2:
            segs.append(shapely.LineString([b.start, b.end]))
    return shapely.union_all(segs)


@pytest.mark.parametrize(("element", "activity"), [("Zn", 1e-4), ("Cu", 1e-6), ("Fe", 1e-6)])
def test_species_lines_coincide_with_the_map_solid_dissolved_boundaries(element, activity):
    dmap = compute_map(element, activity=activity)
    lines = solubility_lines(dmap, [activity], basis="species")[activity]
    ours = shapely.union_all([shapely.LineString(p) for p in lines])
    theirs = _solid_dissolved_segments(dmap)
    # both ways: every point of one lies on the other (exact geometry, rounding only)
    assert ours.hausdorff_distance(theirs) < 1e-7
    assert ours.length == pytest.approx(theirs.length, rel=1e-7)


def test_total_lines_lie_exactly_on_their_level_and_beside_the_map_boundary(zn):
    level = 1e-4
    dmap = compute_map("Zn", activity=level)
    lines = solubility_lines(dmap, [level])[level]
    pts = np.vstack(lines)
    vals = solubility(dmap, pts[:, 0], pts[:, 1]).log10_total
    # every vertex on the curve (snapped to a 1e-9 grid to join pieces)
    assert np.max(np.abs(vals + 4.0)) < 1e-6
    # the total is at least the largest species: the line lies on the solid side of the map at that level
    states = dmap.probe(pts[:, 0], pts[:, 1])
    on_edge = np.minimum(states.margin_down_v, states.margin_up_v) < 1e-7
    assert np.all((states.state != "corrosion") | on_edge)


@pytest.mark.parametrize("side", ["above", "below"])
def test_regions_are_on_the_safe_side_and_match_a_grid(zn, side):
    level = 1e-4
    region = solubility_region(zn, level, side=side)
    x0, x1, y0, y1 = zn.window
    # a dense grid is the reference (never the method): area fraction
    gx, gy = np.meshgrid(np.linspace(x0, x1, 361), np.linspace(y0, y1, 161))
    logs = solubility(zn, gx, gy).log10_total
    frac = np.mean(logs >= -4.0) if side == "above" else np.mean(logs <= -4.0)
    area = (x1 - x0) * (y1 - y0)
    assert region.area / area == pytest.approx(frac, abs=0.01)  # grid cells of 0.05 pH x 0.025 V
    # every grid point inside the region meets the inequality (safe side), rounding aside
    inside = shapely.contains_xy(region, gx, gy)
    if side == "above":
        assert np.all(logs[inside] >= -4.0 - 1e-9)
    else:
        assert np.all(logs[inside] <= -4.0 + 1e-9)


def test_ligand_map_lines_and_regions():
    cu = compute_map("Cu", ligands={"S": 0.1})
    r = solubility(cu, 3.0, 0.9)
    assert r.ligand == "SO4^2-"
    lines = solubility_lines(cu, [1e-2])[1e-2]
    pts = np.vstack(lines)
    assert np.max(np.abs(solubility(cu, pts[:, 0], pts[:, 1]).log10_total + 2.0)) < 1e-6


def test_bad_input():
    fe = compute_map("Fe")
    with pytest.raises(ConditionsError, match="finite"):
        solubility(fe, float("nan"), 0.0)
    with pytest.raises(OptionError, match="either a map or an element"):
        solubility(fe, 7.0, 0.0, temperature_c=50)
    with pytest.raises(OptionError, match="one element"):
        solubility(compute_map(["Fe", "Cr"], ratio=(3, 1)), 7.0, 0.0)
    with pytest.raises(ConditionsError, match="positive number"):
        solubility_region(fe, -1.0)
    with pytest.raises(OptionError, match="basis"):
        solubility_lines(fe, [1e-6], basis="max")
    with pytest.raises(OptionError, match="either a fixed potential or a water line"):
        solubility_curve(fe, [7.0], potential_v=0.0, along="oxygen")
    with pytest.raises(OptionError, match="along"):
        solubility_curve(fe, [7.0], along="nitrogen")


def test_curve_along_the_oxygen_line(zn):
    ph = np.array([4.0, 8.0])
    r = solubility_curve(zn, ph, along="oxygen")
    e0, slope = zn.water["oxygen"]
    # O2/H2O: E = 1.229 - 0.05916 pH vs SHE at 25 °C (Bard & Faulkner 2001; textbook line)
    assert np.allclose(r.potential_v, 1.229 - 0.05916 * ph, atol=1e-3)
    assert np.allclose(r.potential_v, e0 + slope * ph)


def test_zinc_oxide_shows_from_the_activity_of_its_neutral_complex():
    """ZnO + H2O = Zn(OH)2(aq): the least-soluble compound's field needs a_set >= K.

    By hand from the table ΔfG° values (mass action): log K = -ΔrG / (RT ln10).
    The IUPAC review (Powell et al. 2013) gives log *Ks0(ZnO) = 11.12 and
    log *beta2 = -17.82, so log K = -6.70 (from memory): the tables and that
    source agree to 0.02.
    """
    t = load_species()
    d_rg = (
        t.get("Zn(OH)2", "aq").dgf_kj_mol
        - t.get("ZnO", "s").dgf_kj_mol
        - t.get("H2O", "l").dgf_kj_mol
    )
    log_k = -d_rg / RT_LN10_KJ
    assert log_k == pytest.approx(11.12 - 17.82, abs=0.02)  # Powell et al. 2013, from memory
    onset = solid_onset(compute_map("Zn", activity=1e-7))
    assert onset.solid == "ZnO" and onset.dominant == "Zn(OH)2(aq)" and not onset.shown
    assert math.log10(onset.activity) == pytest.approx(log_k, abs=1e-6)
    # the flat band: where Zn(OH)2(aq) is the largest species over ZnO. With the review's
    # constants Zn2+ equals it at pH (11.12 + 6.70)/2 = 8.91 (ZnOH+ at 2.16 + 6.70 = 8.86, below)
    # and Zn(OH)3- at pH 28.05 - 17.82 = 10.23; the search grid has 0.075 pH steps
    lo, hi = onset.ph_range
    assert lo == pytest.approx(8.91, abs=0.1) and hi == pytest.approx(10.23, abs=0.1)
    # the maps agree: just above that activity a ZnO field exists, just below it does not
    above = compute_map("Zn", activity=10 ** (log_k + 0.05))
    below = compute_map("Zn", activity=10 ** (log_k - 0.05))
    assert "ZnO" in [d.species[0] for d in above.domains]
    assert "ZnO" not in [d.species[0] for d in below.domains]
    assert solid_onset(above).shown


def test_onset_is_none_without_a_solid_compound_and_shown_for_iron():
    # iron at 1e-6 shows its oxides (Pourbaix 1974, iron; common practice)
    assert solid_onset(compute_map("Fe", activity=1e-6)).shown
    # a map whose only solid is the metal (all compounds excluded) has no compound to show
    m = compute_map("Zn", activity=1e-6, exclude=["ZnO", "Zn(OH)2(s)"])
    assert solid_onset(m) is None
