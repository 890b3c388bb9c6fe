"""Mass-balanced maps: tiling, traced boundaries against the solver, hand calculations, the
predominant-ligand limit and the command line.

Independent references: a point classified directly by the equilibrium solver
(tested against scipy in test_equilibrium.py) and hand calculations from the
NBS tables (Wagman et al. 1982) and Bard, Parsons & Jordan (1985).
"""

import json
import math

import numpy as np
import pytest
from shapely.geometry import Point

from pourbaix import compute_map
from pourbaix.cli.commands import main
from pourbaix.errors import ConditionsError, OptionError
from pourbaix.maps.balanced import BalancedMap, compute_balanced_map, point_key
from pourbaix.maps.result import DomainMap
from pourbaix.solve.equilibrium import solve_at
from pourbaix.solve.trace import trace_domains

R_KJ = 8.314462618e-3  # kJ/(mol K), CODATA 2018
FARADAY_KJ = 96.48533212  # kJ/(mol V), CODATA 2018
RT = R_KJ * 298.15
K25 = RT * math.log(10) / FARADAY_KJ


@pytest.fixture(scope="module")
def cu_nh3():
    return compute_balanced_map("Cu", {"Cu": 1e-2, "N": 1.0})


@pytest.fixture(scope="module")
def au_cn():
    return compute_balanced_map("Au", {"Au": 1e-5, "CN": 1e-3})


def _window_area(m):
    x0, x1, y0, y1 = m.window
    return (x1 - x0) * (y1 - y0)


@pytest.mark.parametrize("name", ["cu_nh3", "au_cn"])
def test_domains_tile_the_window(name, request):
    m = request.getfixturevalue(name)
    assert isinstance(m, DomainMap) and isinstance(m, BalancedMap)
    total = sum(d.area for d in m.domains)
    assert total == pytest.approx(_window_area(m), rel=1e-6)
    for i, a in enumerate(m.domains):
        for b in m.domains[i + 1 :]:
            assert a.polygon.intersection(b.polygon).area < 1e-9 * _window_area(m)


@pytest.mark.parametrize("name", ["cu_nh3", "au_cn"])
def test_points_away_from_boundaries_lie_in_their_domain(name, request):
    m = request.getfixturevalue(name)
    system = m.system
    rng = np.random.default_rng(11)
    x0, x1, y0, y1 = m.window
    lines = [((b.start, b.end)) for b in m.boundaries]
    from shapely.geometry import MultiLineString

    net = MultiLineString(lines)
    checked = 0
    while checked < 40:
        ph, e = rng.uniform(x0, x1), rng.uniform(y0, y1)
        if net.distance(Point(ph, e)) < 0.02:
            continue
        r = solve_at(system, ph, e)
        key = point_key(system, r)
        expected = {system.names[key[1]]} if key[0] == "aq" else {system.names[i] for i in key[1]}
        dom = [d for d in m.domains if d.polygon.covers(Point(ph, e))]
        assert len(dom) == 1
        assert set(dom[0].species) == expected
        checked += 1


@pytest.mark.parametrize("name", ["cu_nh3", "au_cn"])
def test_boundary_points_are_within_tolerance(name, request):
    # each traced vertex has two different domains within the tolerance (0.001 pH, 0.1 mV)
    m = request.getfixturevalue(name)
    system = m.system
    tol_ph, tol_v = m.tolerance
    x0, x1, y0, y1 = m.window
    rng = np.random.default_rng(3)
    picks = rng.choice(len(m.boundaries), size=min(40, len(m.boundaries)), replace=False)
    for k in picks:
        ph, e = m.boundaries[k].start
        keys = set()
        for dph, de in ((0, 0), (tol_ph, 0), (-tol_ph, 0), (0, tol_v), (0, -tol_v)):
            p, q = min(max(ph + dph, x0), x1), min(max(e + de, y0), y1)
            keys.add(point_key(system, solve_at(system, p, q)))
        assert len(keys) >= 2, (ph, e)


def test_gold_cyanide_boundary_at_ph_10_5_by_hand(au_cn):
    # hand calculation (as in test_equilibrium): Au(s) is gone where all 1e-5 gold is Au(CN)2-
    # and the rest of the cyanide splits CN-/HCN; NBS82 dG (kJ/mol): Au(CN)2- 285.8, CN- 172.4,
    # HCN 119.7; E0(Au+/Au) 1.692 V (Bard, Parsons & Jordan 1985) gives dG(Au+) 163.25
    log_beta2 = (163.25 + 2 * 172.4 - 285.8) / (RT * math.log(10))
    e0 = 1.692 - K25 * log_beta2
    pka = (172.4 - 119.7) / (RT * math.log(10))
    cn = (1e-3 - 2e-5) / (1 + 10 ** (pka - 10.5))
    e_hand = e0 + K25 * math.log10(1e-5 / cn**2)
    gold = au_cn.domain_of("Au").polygon
    from shapely.geometry import LineString

    cut = gold.intersection(LineString([(10.5, -2.0), (10.5, 2.0)]))
    e_map = max(y for _, y in cut.coords)
    assert e_map == pytest.approx(e_hand, abs=1.5e-3)  # data rounded to 0.1 kJ/mol (~1 mV)
    # and the traced line against the solver's own boundary there (the tracing tolerance)
    system = au_cn.system
    assert solve_at(system, 10.5, e_map - 2e-4).present[system.index("Au")]
    assert not solve_at(system, 10.5, e_map + 2e-4).present[system.index("Au")]


def test_copper_tetraammine_field(cu_nh3):
    # the Cu(NH3)4^2+ field exists between the two CuO fields (Osseo-Asare & Fuerstenau 1978
    # show the same arrangement for comparable totals); here at 0.5 V it spans about pH 7.7-10.9
    dom = cu_nh3.domain_of("Cu(NH3)4^2+")
    assert dom is not None and dom.state == "corrosion"
    assert dom.polygon.covers(Point(9.5, 0.5))
    assert cu_nh3.probe(9.5, 0.5).species == "Cu(NH3)4^2+"
    assert cu_nh3.probe(6.0, 1.0).species == "CuO"
    assert cu_nh3.probe(5.0, -1.0).state == "immunity"


def test_probe_margins_and_export(cu_nh3, tmp_path):
    r = cu_nh3.probe(9.5, 0.5)
    assert r.neighbour_down == "Cu(NH3)2^+"
    assert 0.2 < r.margin_down_v < 0.5
    assert r.margin_up_v == math.inf  # the field reaches the top of the window
    arr = cu_nh3.probe([9.5, 2.0], [0.5, 1.0])
    assert list(arr.species) == ["Cu(NH3)4^2+", "Cu^2+"]
    d = json.loads(cu_nh3.to_json())
    assert d["format"] == "pourbaix.map" and len(d["domains"]) == len(cu_nh3.domains)
    assert "mass-balanced" in d["method"]
    assert cu_nh3.boundaries_csv().count("\n") == len(cu_nh3.boundaries) + 1


def test_draws_like_any_map(cu_nh3):
    pytest.importorskip("matplotlib")
    from pourbaix.plot.draw import draw_map

    ax = draw_map(cu_nh3)
    texts = " ".join(t.get_text() for t in ax.texts)
    assert "Cu(NH₃)₄²⁺" in texts
    import matplotlib.pyplot as plt

    plt.close(ax.figure)


def _disagreement(balanced, ligand_map):
    """Area (share of the window) where the two maps name different metal species."""
    area = 0.0
    for d in balanced.domains:
        same = [
            p.polygon
            for p in ligand_map.domains
            if [s for s in p.species if "Cu" in s] == [s for s in d.species if "Cu" in s]
        ]
        from shapely.ops import unary_union

        overlap = unary_union(same).intersection(d.polygon).area if same else 0.0
        area += d.area - overlap
    return area / _window_area(balanced)


def test_converges_to_the_predominant_ligand_map_when_ligand_is_in_excess():
    # ligand totals 10, 1e3 and 1e5 times the copper: the predominant-ligand map at the same
    # ligand activity and copper activity disagrees less and less (the predominant-ligand limit)
    window = dict(ph_range=(7.0, 13.0), potential_range_v=(-0.6, 0.6))
    shares = []
    for copper in (0.1, 1e-3, 1e-5):
        bal = compute_balanced_map("Cu", {"Cu": copper, "N": 1.0}, mesh=(12, 12), **window)
        lig = compute_map("Cu", activity=copper, ligands={"NH3": 1.0}, **window)
        shares.append(_disagreement(bal, lig))
    assert shares[0] > shares[1] > shares[2]
    # what stays is the predominant-ligand method's own approximation (NH3 taken at the total
    # where it predominates, dissolved species each at the set activity): under 5 % of the window
    assert shares[2] < 0.05


def test_trace_of_a_circle_is_within_tolerance():
    def classify(x, y):
        return ("in" if x * x + y * y < 1 else "out"), (x, y)

    def boundary(st, a, b):
        f = st[0] ** 2 + st[1] ** 2 - 1
        return f if a == "in" else -f

    t = trace_domains(classify, boundary, (-2, 2, -2, 2), mesh=(6, 6), tolerance=(1e-4, 1e-4))
    pts = np.vstack([s[2] for s in t.segments])
    assert np.abs(np.hypot(pts[:, 0], pts[:, 1]) - 1).max() < 2e-4
    # chord midpoints too: the step control keeps every chord within tolerance
    mids = np.vstack([0.5 * (s[2][1:] + s[2][:-1]) for s in t.segments])
    assert np.abs(np.hypot(mids[:, 0], mids[:, 1]) - 1).max() < 5e-4


def test_trace_with_gradient_is_within_tolerance_with_fewer_evaluations():
    # Newton's steps with the exact gradient of x^2 + y^2 - 1 instead of bracketing
    def classify(x, y):
        return ("in" if x * x + y * y < 1 else "out"), (x, y)

    def boundary(st, a, b):
        f = st[0] ** 2 + st[1] ** 2 - 1
        return f if a == "in" else -f

    def gradient(st, a, b):
        g = np.array([2 * st[0], 2 * st[1]])
        return g if a == "in" else -g

    window, tolerance = (-2, 2, -2, 2), (1e-4, 1e-4)
    plain = trace_domains(classify, boundary, window, mesh=(6, 6), tolerance=tolerance)
    t = trace_domains(
        classify, boundary, window, mesh=(6, 6), tolerance=tolerance, gradient=gradient
    )
    pts = np.vstack([s[2] for s in t.segments])
    assert np.abs(np.hypot(pts[:, 0], pts[:, 1]) - 1).max() < 1e-4
    mids = np.vstack([0.5 * (s[2][1:] + s[2][:-1]) for s in t.segments])
    assert np.abs(np.hypot(mids[:, 0], mids[:, 1]) - 1).max() < 5e-4
    assert t.evaluations < plain.evaluations


def test_bad_input():
    with pytest.raises(OptionError, match="Xx"):
        compute_balanced_map("Cu", {"Xx": 1.0})
    with pytest.raises(ConditionsError, match="> 0"):
        compute_balanced_map("Cu", {"Cu": 0.0})
    with pytest.raises(OptionError, match="one metal"):
        compute_balanced_map("Cu Fe", {"Cu": 1e-3})


def test_cli_balanced_map(tmp_path, capsys):
    out = tmp_path / "cu.json"
    code = main(
        [
            "map",
            "Cu",
            "--total",
            "Cu=1e-3",
            "--total",
            "N=0.1",
            "--balance",
            "--ph",
            "8",
            "12",
            "--potential",
            "-0.5",
            "0.5",
            "--out",
            str(out),
        ]
    )
    assert code == 0
    printed = capsys.readouterr()
    assert "domain criterion" in printed.out
    assert "Caution" in printed.err
    assert json.loads(out.read_text())["domains"]


def test_cli_balanced_map_bad_input(tmp_path, capsys):
    out = tmp_path / "x.png"
    assert main(["map", "Cu", "--total", "Q=1", "--balance", "--out", str(out)]) == 2
    assert "Q" in capsys.readouterr().err
    assert main(["map", "Cu", "--total", "N=1", "--out", str(out)]) == 2
    assert "--balance" in capsys.readouterr().err
    assert main(["map", "Cu", "--balance", "--ligand", "S=1e-3", "--out", str(out)]) == 2
    assert "--ligand" in capsys.readouterr().err
    assert not out.exists()


def test_cli_balanced_map_refuses_options_of_the_plane_method(tmp_path, capsys):
    out = tmp_path / "x.html"
    code = main(
        [
            "map",
            "Cu",
            "--total",
            "N=1",
            "--balance",
            "--slider-temperature",
            "25",
            "60",
            "--out",
            str(out),
        ]
    )
    assert code == 2
    assert "--slider-temperature" in capsys.readouterr().err
    assert not out.exists()


def test_lines_list_the_traced_curves(au_cn):
    from pourbaix.maps.lines import boundary_equations

    rows = boundary_equations(au_cn)
    # one row per traced curve, each a polyline whose chords are the map's boundary segments
    assert all(len(r["points"]) >= 2 and r["e_at_ph0_v"] is None for r in rows)
    assert sum(len(r["points"]) - 1 for r in rows) == len(au_cn.boundaries)
    pairs = {frozenset(b.between) for b in au_cn.boundaries}
    assert {frozenset(r["between"]) for r in rows} == pairs
    assert len(rows) < len(au_cn.boundaries) / 5  # curves, not chords
    assert rows[0]["tolerance"] == {"ph": 1e-3, "potential_v": 1e-4}
    # the Au | Au(CN)2- curve crosses pH 10.5 where the domains change, within the tolerance
    # (the solver itself, checked against scipy and hand calculation in test_equilibrium)
    row = next(r for r in rows if set(r["between"]) == {"Au", "Au(CN)2^-"})
    pts = np.array(row["points"])
    order = np.argsort(pts[:, 0])
    e = float(np.interp(10.5, pts[order, 0], pts[order, 1]))
    system = au_cn.system
    gold = system.index("Au")
    assert solve_at(system, 10.5, e - 1e-4).present[gold]
    assert not solve_at(system, 10.5, e + 1e-4).present[gold]


def test_cli_lines_of_a_balanced_map(capsys, tmp_path):
    args = ["lines", "Au", "--total", "Au=1e-5", "--total", "CN=1e-3", "--balance"]
    report = tmp_path / "lines.md"
    assert main([*args, "--ph", "8", "12", "--potential", "-1", "0", "--report", str(report)]) == 0
    assert "a traced curve, no single reaction" in report.read_text(encoding="utf-8")
    capsys.readouterr()
    assert main([*args, "--ph", "8", "12", "--potential", "-1", "0"]) == 0
    printed = capsys.readouterr().out
    assert "traced curve" in printed and "0.1 mV" in printed
    assert main([*args, "--ph", "8", "12", "--potential", "-1", "0", "--json"]) == 0
    out = capsys.readouterr().out
    rows = json.loads(out[out.index("[") :])
    assert [set(r["between"]) for r in rows] == [{"Au", "Au(CN)2^-"}]
    assert len(rows[0]["points"]) > 5


@pytest.mark.parametrize("name", ["cu_nh3", "au_cn"])
def test_curves_meet_at_their_triple_points(name, request):
    # where three traced curves end at one point, the solver (checked against scipy in
    # test_equilibrium) finds three domains within two tolerances of it
    from collections import Counter

    m = request.getfixturevalue(name)
    tol_ph, tol_v = m.tolerance
    ends = Counter(tuple(p) for c in m.curves for p in (c.points[0], c.points[-1]))
    x0, x1, y0, y1 = m.window
    triple = [p for p, n in ends.items() if n >= 3 and x0 < p[0] < x1 and y0 < p[1] < y1]
    assert triple
    for ph, e in triple:
        keys = {
            point_key(m.system, solve_at(m.system, ph + dx, e + dy))
            for dx in (-2 * tol_ph, 0.0, 2 * tol_ph)
            for dy in (-2 * tol_v, 0.0, 2 * tol_v)
        }
        assert len(keys) == 3, (ph, e)
    # and no curve of a pair ends loose near a triple point of that pair
    for c in m.curves:
        for p in (c.points[0], c.points[-1]):
            on_border = p[0] in (x0, x1) or p[1] in (y0, y1)
            assert on_border or ends[tuple(p)] >= 2, (c.between, p)


def test_balanced_map_with_pitzer_coefficients():
    # gypsum in 1 mol/kg NaCl (Pitzer inside the solver, checked against measured solubilities
    # in test_activity_models): the map is traced, tiles its window and says what Pitzer covers.
    # Totals of twice the solubility: with the brine's water activity (0.966) fed back, the
    # tables' gypsum dissolves to 0.051 mol/kg here, so 0.05 would no longer saturate it
    m = compute_balanced_map(
        "Ca",
        {"Ca": 0.1, "S": 0.1},
        background="NaCl=1",
        activity_model="pitzer",
        exclude=["CaSO4(aq)"],
        ph_range=(2.0, 12.0),
        potential_range_v=(-0.5, 1.0),
        mesh=(8, 8),
    )
    assert m.probe(7.0, 0.6).species == "CaSO4·2H2O:gypsum"
    assert sum(d.area for d in m.domains) == pytest.approx(_window_area(m), rel=1e-6)
    assert any(w.startswith("Pitzer (Harvie") for w in m.warnings)
