"""Field readings: conversions between electrodes, bad rows with line numbers, placement on the map."""

from pathlib import Path

import numpy as np
import pytest

from pourbaix.analyses.field import field_readings, place_readings, read_field_csv
from pourbaix.errors import DataFileError, OptionError
from pourbaix.maps.domain_map import compute_map

DATA = Path(__file__).parent / "data" / "field"


@pytest.fixture(scope="module")
def fe():
    return compute_map("Fe")


def test_one_sample_in_six_references_converts_to_one_potential(fe):
    # references.csv: the same sample (pH 7, -0.300 V vs SHE) typed vs six electrodes with the published
    # electrode potentials named in the file's comment
    data = place_readings(fe, read_field_csv(DATA / "references.csv"))
    assert not data.problems and len(data.rows) == 6
    she = np.array([r.potential_v_she for r in data.rows])
    # the typed values carry 1 mV; the package's SCE (0.2412 V, Ives & Janz) differs by 0.2 mV from 0.241
    assert np.allclose(she, -0.300, atol=1.5e-3)
    assert {r.species for r in data.rows} == {"Fe^2+"}
    assert {r.state for r in data.rows} == {"corrosion"}


def test_a_map_in_another_reference_places_the_sample_at_the_same_point():
    sce_map = compute_map("Fe", reference="SCE")
    data = place_readings(sce_map, read_field_csv(DATA / "references.csv"))
    # vs SCE: -0.300 - 0.2412 (Ives & Janz 1961, as tabulated by the package's electrode source)
    assert np.allclose([r.potential_v_map for r in data.rows], -0.5412, atol=1.5e-3)
    assert data.reference == "SCE"


def test_bad_rows_are_listed_with_line_numbers_and_the_rest_used(fe):
    data = read_field_csv(DATA / "bad_rows.csv")
    found = {p.line: (p.column, p.reason) for p in data.problems}
    assert sorted(found) == [4, 5, 6, 7, 10]
    assert found[4] == ("potential_v", "'seven' is not a number")  # text in a number
    assert found[5][0] == "reference" and "unknown reference electrode 'XYZ'" in found[5][1]
    assert "valid:" in found[5][1] and "SCE" in found[5][1]
    assert found[6][0] == "reference" and "missing reference" in found[6][1]  # a short row
    assert "not a finite number" in found[7][1]
    assert found[10][0] == "temperature_c" and "outside 0 to 300" in found[10][1]
    assert [r.line for r in data.rows] == [3, 9]
    placed = place_readings(fe, data)
    assert all(r.state in ("immunity", "passivation", "corrosion") for r in placed.rows)
    assert placed.problems == data.problems
    # line 9 is vs Cu/CuSO4 at 20 °C: offset 0.316 + 0.0009 (20 - 25) V (common practice)
    r9 = placed.rows[1]
    assert r9.potential_v_she == pytest.approx(-0.55 + 0.316 - 0.0045, abs=1e-9)
    assert r9.notes == ()  # 20 °C is within 5 °C of the map's 25 °C: no note


def test_missing_required_column_stops_the_file():
    with pytest.raises(
        DataFileError, match=r"missing_column.csv:1:.*missing column\(s\) reference"
    ):
        read_field_csv(DATA / "missing_column.csv")
    with pytest.raises(DataFileError, match="cannot read"):
        read_field_csv(DATA / "no_such_file.csv")


def test_time_series_sorted_and_flagged_far_from_map_temperature():
    sce = compute_map("Fe", reference="SCE", temperature_c=60.0)
    _, data = field_readings(sce, DATA / "series.csv")
    assert data.has_time and [r.label for r in data.rows] == [
        "week 1",
        "week 2",
        "week 3",
        "week 4",
    ]
    assert "rows sorted by time" in data.notes
    assert all(
        any("measured at 30 °C, the map is for 60 °C" in n for n in r.notes) for r in data.rows
    )
    # Ag/AgCl-sat -> SHE at 30 °C: 0.197 - 1.01e-3 * 5 V (Bard & Faulkner 2001; dE/dT from Sawyer et al. 1995)
    assert data.rows[0].potential_v_she == pytest.approx(-0.70 + 0.197 - 0.00505, abs=1e-9)


def test_table_is_json_ready_and_conditions_clash(fe):
    _, data = field_readings(fe, DATA / "references.csv")
    rows = data.table()
    assert rows[0]["label"] == "she" and rows[0]["species"] == "Fe^2+"
    assert all(
        v is None or isinstance(v, str | int | float | list) for r in rows for v in r.values()
    )
    with pytest.raises(OptionError, match="not both"):
        field_readings(fe, DATA / "references.csv", temperature_c=40)


# ---------------------------------------------------------------------- issue 17: what practitioners tripped over
def test_readings_are_placed_on_the_map_of_their_own_temperature():
    from pourbaix.analyses.field import place_readings_at_temperature

    data = read_field_csv(DATA / "two_sites.csv")
    groups = place_readings_at_temperature("Pb", data)
    # readings at 12.2, 12.4, 15.1, 14.8, 17.9, 18.2 °C: maps at 12, 15 and 18 °C (rounded to 1 °C)
    assert [d.conditions.temperature_c for d, _ in groups] == [12.0, 15.0, 18.0]
    for dmap, placed in groups:
        for r in placed.rows:
            assert abs(r.temperature_c - dmap.conditions.temperature_c) <= 0.5
            assert not any("the map is for" in n for n in r.notes)
    # per reading: one map per exact temperature
    per = place_readings_at_temperature("Pb", data, group="reading")
    assert [d.conditions.temperature_c for d, _ in per] == [12.2, 12.4, 14.8, 15.1, 17.9, 18.2]
    # the old way stays available, and says so for readings far from the map's temperature
    ((dmap, one),) = place_readings_at_temperature("Pb", data, group="none")
    assert dmap.conditions.temperature_c == 25.0
    assert all(any("the map is for 25 °C" in n for n in r.notes) for r in one.rows)
    with pytest.raises(OptionError, match="valid: temperature, reading, none"):
        place_readings_at_temperature("Pb", data, group="weekly")


def test_a_time_series_is_one_path_per_site():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from pourbaix.analyses.field import place_readings_at_temperature, series_of
    from pourbaix.plot.analysis_figures import draw_field

    data = read_field_csv(DATA / "two_sites.csv")
    series = series_of(data)
    # two sites read in turn: each site's three readings form one series, never joined across sites
    assert sorted(len(s) for s in series) == [3, 3]
    for s in series:
        assert len({data.rows[k].site for k in s}) == 1
    # a file without a site column whose labels name each reading (week 1, week 2 ...) is one site
    assert [len(s) for s in series_of(read_field_csv(DATA / "series.csv"))] == [4]

    ((dmap, placed),) = place_readings_at_temperature("Pb", data, group="none")
    ax = draw_field(dmap, placed)
    site_of = {(round(r.ph, 6), round(r.potential_v_map, 6)): r.site for r in placed.rows}
    arrows = [a for a in ax.texts if a.get_gid() == "pourbaix-path"]
    assert len(arrows) == 4  # 2 arrows per site of 3 readings
    for a in arrows:
        start = tuple(round(v, 6) for v in a.xyann)
        end = tuple(round(v, 6) for v in a.xy)
        assert site_of[start] == site_of[end], "an arrow joins readings of two sites"
    # labels of the points hide no other label
    fig = ax.figure
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    boxes = [
        (t.get_bbox_patch() or t).get_window_extent(renderer)
        for t in ax.texts
        if (t.get_gid() or "").startswith("pourbaix-label") and t.get_text()
    ]
    for i, a in enumerate(boxes):
        for b in boxes[i + 1 :]:
            assert not (
                min(a.x1, b.x1) - max(a.x0, b.x0) > 0.5 and min(a.y1, b.y1) - max(a.y0, b.y0) > 0.5
            )
    plt.close("all")


def test_field_table_keeps_whole_names_and_one_she_column(capsys):
    from pourbaix.cli.commands import main

    code = main(["field", "Pb", "--readings", str(DATA / "two_sites.csv")])
    out = capsys.readouterr().out
    assert code == 0
    assert "southern booster station" in out  # 24 characters, once cut at 14
    header = next(line for line in out.splitlines() if line.lstrip().startswith("line"))
    assert header.count("E SHE [V]") == 1
    assert "map °C" in header
    code = main(["field", "Pb", "--readings", str(DATA / "two_sites.csv"), "--reference", "SCE"])
    header = next(
        ln for ln in capsys.readouterr().out.splitlines() if ln.lstrip().startswith("line")
    )
    assert header.count("E SHE [V]") == 1 and "E SCE [V]" in header
