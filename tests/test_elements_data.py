"""The element coverage of the tables and the `pourbaix elements` command.

Checks:
- at least 45 elements carry species (issue 13), among them the elements users
  asked for by name;
- `pourbaix species` without an element fails with one message naming
  `pourbaix elements` (exit 2, no traceback);
- every listed element draws a map whose domains tile the window (areas sum
  to the window's area: a property of a partition, common practice for maps).
"""

import json

import pytest

from pourbaix.cli import main
from pourbaix.cli.data_commands import element_summary
from pourbaix.tables.species import load_species

ASKED = (
    "As Sb Bi Cd Hg Se Te U V W Zr Nb Ta Pt Pd Ga In Ge Si Be Ca Sr Ba Li Tl Ce La Re P F"
).split()


def test_at_least_45_elements_and_the_ones_asked_for():
    summary = element_summary(load_species())
    names = {e["element"] for e in summary}
    assert len(names) >= 45
    assert set(ASKED) <= names
    for e in summary:
        assert e["species"] >= e["solids"] + e["aqueous"] > 0
        assert e["sources"]


def test_elements_command_text_and_json(capsys):
    assert main(["elements"]) == 0
    out = capsys.readouterr().out
    assert "elements in data set default" in out
    assert "\nU " in out and "92gre/fug" in out
    assert main(["elements", "--json"]) == 0
    rows = json.loads(capsys.readouterr().out)
    assert {"element", "species", "sources", "routes", "from_memory"} <= set(rows[0])


def test_species_without_element_points_to_elements(capsys):
    assert main(["species"]) == 2
    err = capsys.readouterr().err
    assert "pourbaix elements" in err and "Traceback" not in err


@pytest.mark.parametrize("element", ASKED)
def test_new_element_maps_tile_the_window(element):
    from pourbaix.maps.domain_map import compute_map

    m = compute_map(element)
    ph_lo, ph_hi, e_lo, e_hi = m.window
    window = (ph_hi - ph_lo) * (e_hi - e_lo)
    total = sum(d.area for d in m.domains)
    assert total == pytest.approx(window, rel=1e-9)
    assert len(m.domains) >= 2


def test_datasets_counts_the_rows_typed_from_memory(capsys):
    rows = load_species().species
    # a note speaks of the value first; its stated uncertainty's remark begins "u(dG) ="
    typed = [s for s in rows if "from memory" in s.note.split("u(dG) =")[0]]
    uncertain = [s for s in rows if "from memory" in s.note.partition("u(dG) =")[2]]
    assert main(["datasets"]) == 0
    out = capsys.readouterr().out
    assert f"{len(typed)} of {len(rows)} rows of the default data set were typed from memory" in out
    assert f"{len(uncertain)} rows carry a standard uncertainty typed" in out
    # cassiterite: dH and S are CODATA key values the CRC table reprints (not typed from memory);
    # only their +/- was
    sno2 = load_species().get("SnO2", "s")
    assert sno2 not in typed and sno2 in uncertain
    # every imported row names the file it was read from, none of its read values is typed from
    # memory; the CODATA uncertainty the import adds to a few rows (typed from the printed table,
    # from memory) follows "; u(dG) =" and says so there
    imported = [s for s in rows if s.note.startswith("read by species_data/import")]
    assert len(imported) > 500
    assert not [s for s in imported if "from memory" in s.note.split("; u(dG) =")[0]]
    with_u = [s for s in imported if s.dgf_unc_kj_mol is not None]
    assert with_u and all("; u(dG) =" in s.note and "from memory" in s.note for s in with_u)


def _all_elements():
    return [e["element"] for e in element_summary(load_species())]


@pytest.mark.parametrize("element", _all_elements())
def test_every_element_map_agrees_with_a_dense_grid_argmin(element):
    """Each domain polygon holds exactly the grid points whose argmin of the map's planes
    (``probe``) is its species; points within 1 mV or 0.002 pH of a line are skipped.
    Brute-force argmin on a 41 x 41 grid: common practice for checking a partition."""
    import numpy as np
    import shapely

    from pourbaix.maps.domain_map import compute_map

    m = compute_map(element)
    x0, x1, y0, y1 = m.window
    xx, yy = np.meshgrid(np.linspace(x0, x1, 41)[1:-1], np.linspace(y0, y1, 41)[1:-1])
    x, y = xx.ravel(), yy.ravel()
    r = m.probe(x, y)
    near = np.zeros(x.shape, dtype=bool)
    for margin, tol in (
        (r.margin_up_v, 1e-3),
        (r.margin_down_v, 1e-3),
        (r.margin_acid_ph, 2e-3),
        (r.margin_alkaline_ph, 2e-3),
    ):
        margin = np.asarray(margin, dtype=float)
        near |= np.isfinite(margin) & (margin < tol)
    points = shapely.points(x, y)
    owner = np.full(x.shape, "", dtype=object)
    for d in m.domains:
        inside = shapely.contains(d.polygon, points)
        owner[inside] = " + ".join(d.species)
    species = np.asarray(r.species, dtype=object)
    assert (owner != "").mean() > 0.95  # the polygons cover the grid
    bad = (~near) & (owner != species)
    examples = list(zip(x[bad], y[bad], owner[bad], species[bad], strict=True))[:3]
    assert not bad.any(), examples
