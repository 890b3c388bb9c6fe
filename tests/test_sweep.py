"""Sweeps against one compute_map call per grid point; resuming; outputs; a Dask LocalCluster.

The reference for every value is the single-map route at the same conditions:
compute_map and its probe, the domains' areas, shapely for the passive width
(length of a vertical line inside the passivation domains) and
analyses.solubility. Grid points are drawn from a seeded generator.
"""

import numpy as np
import pytest
import shapely

pytest.importorskip("xarray")

from pourbaix.analyses import sweep as sweep_module  # noqa: E402
from pourbaix.analyses.solubility import solubility  # noqa: E402
from pourbaix.analyses.sweep import parse_values, sweep  # noqa: E402
from pourbaix.cli.commands import main  # noqa: E402
from pourbaix.errors import OptionError, PourbaixError  # noqa: E402
from pourbaix.maps.compute import compute_map  # noqa: E402
from pourbaix.tables.species import load_species  # noqa: E402

TABLE = load_species()
POINTS = [(7.0, -0.5), (9.5, 0.3), (3.0, 0.9)]


def check_against_single_maps(ds, system, rng, n, extra=None):
    grid = [d for d in ds.dims if d not in ("system", "point", "domain")]
    for _ in range(n):
        sel = {d: int(rng.integers(ds.sizes[d])) for d in grid}
        sel["system"] = ds["system"].values.tolist().index("-".join(system.split()))
        here = ds.isel(sel)
        kw = dict(extra or {})
        kw["temperature_c"] = float(here["temperature_c"])
        amount = "molality" if "molality" in ds.dims else "activity"
        kw[amount] = float(here[amount])
        if "ionic_strength" in ds.dims:
            kw["ionic_strength"] = float(here["ionic_strength"])
        if "ratio" in ds.dims:
            kw["ratio"] = tuple(float(v) for v in str(here["ratio"].values).split(":"))
        ligs = {d[7:]: float(here[d]) for d in grid if d.startswith("ligand_")}
        if ligs:
            kw["ligands"] = ligs
        single = compute_map(system, table=TABLE, **kw)
        ph = ds["ph"].values
        e = ds["potential_v"].values
        ref = single.probe(ph, e)
        assert here["species"].values.tolist() == list(ref.species)
        assert here["state"].values.tolist() == list(ref.state)
        for key in ("neighbour_up", "neighbour_down", "neighbour_acid", "neighbour_alkaline"):
            assert here[key].values.tolist() == list(getattr(ref, key)), key
        for key in ("margin_up_v", "margin_down_v", "margin_acid_ph", "margin_alkaline_ph"):
            np.testing.assert_allclose(here[key].values, getattr(ref, key), atol=1e-9)
        areas = {}
        for d in single.domains:
            name = " + ".join(d.species)
            areas[name] = areas.get(name, 0.0) + d.area
        got = {
            str(k): float(v)
            for k, v in zip(ds["domain"].values, here["area"].values, strict=True)
            if v > 0
        }
        assert set(got) == set(areas)
        for name, area in areas.items():
            assert got[name] == pytest.approx(area, rel=1e-8, abs=1e-9)
        lo, hi = single.conditions.potential_range_v
        line = shapely.LineString([(9.0, lo), (9.0, hi)])
        width = sum(
            d.polygon.intersection(line).length for d in single.domains if d.state == "passivation"
        )
        assert float(here["passive_width_v"]) == pytest.approx(width, abs=1e-9)
        if "log10_solubility" in ds and len(system.split()) == 1:
            sol = solubility(single, 7.0, -0.5)
            assert float(here["log10_solubility"]) == pytest.approx(sol.log10_total, abs=1e-9)
            assert str(here["solubility_solid"].values) == sol.solid


def test_batched_sweep_equals_single_maps_at_random_grid_points():
    ds = sweep(
        "Fe",
        temperature_c="25:250:6",
        activity="1e-8:1e-4:5",
        ionic_strength=[0.0, 0.1],
        at=POINTS,
        passive_ph=9.0,
        solubility_at=(7.0, -0.5),
        workers=1,
    )
    assert dict(ds.sizes) == {
        "system": 1,
        "temperature_c": 6,
        "activity": 5,
        "ionic_strength": 2,
        "point": 3,
        "domain": ds.sizes["domain"],
    }
    assert ds["margin_up_v"].attrs["units"] == "V"
    assert ds["temperature_c"].attrs["units"] == "°C"
    check_against_single_maps(ds, "Fe", np.random.default_rng(161), 8)


def test_map_by_map_sweep_equals_single_maps_for_alloys_and_ligands():
    rng = np.random.default_rng(162)
    ds = sweep(
        systems=["Fe Cr", "Ni Cu"],
        ratio=["3:1", "1:2"],
        temperature_c=[25.0, 90.0],
        at=POINTS,
        passive_ph=9.0,
        workers=1,
    )
    assert ds.sizes["ratio"] == 2 and ds.sizes["system"] == 2
    check_against_single_maps(ds, "Fe Cr", rng, 3)
    check_against_single_maps(ds, "Ni Cu", rng, 3)
    ds = sweep(
        "Cu",
        ligands={"C": "1e-4:1e-2:3"},
        molality=[1e-6, 1e-4],
        at=POINTS,
        passive_ph=9.0,
        solubility_at=(7.0, -0.5),
        workers=1,
    )
    check_against_single_maps(ds, "Cu", rng, 3)


def test_alloy_sweep_maps_once_per_condition_and_walks_each_ratio(monkeypatch):
    import pourbaix.maps.compute as compute_module

    calls = []
    real = compute_module.compute_map

    def counted(*args, **kwargs):
        calls.append(kwargs.get("ratio"))
        return real(*args, **kwargs)

    monkeypatch.setattr(compute_module, "compute_map", counted)
    ds = sweep(
        systems=["Fe Cr Ni"],
        ratio=["70:19:11", "60:25:15", "50:30:20", "20:50:30"],
        temperature_c=[25.0, 80.0],
        activity=[1e-6, 1e-4],
        at=POINTS,
        passive_ph=9.0,
        workers=1,
    )
    monkeypatch.undo()
    assert len(calls) == 4  # one map per (temperature, activity), not one per grid point (16)
    check_against_single_maps(ds, "Fe Cr Ni", np.random.default_rng(163), 5)


def test_alloy_chunks_hold_every_ratio_of_a_condition():
    # ratio is the first grid dimension: a condition's points are rest + k * stride
    for n_ratios, stride, step in ((4, 6, 16), (20, 3, 16), (1, 40, 16)):
        tasks = sweep_module._ratio_tasks(0, n_ratios * stride, n_ratios, step)
        flats = [f for _, _, chunk in tasks for f in chunk]
        assert sorted(flats) == list(range(n_ratios * stride))  # every point once
        assert len({start for _, start, _ in tasks}) == len(tasks)  # chunk names unique
        if n_ratios <= step:
            for _, _, chunk in tasks:
                rests = {f % stride for f in chunk}
                assert len(chunk) == n_ratios * len(rests)  # whole groups only


def test_interrupted_sweep_resumes_where_it_stopped(tmp_path, monkeypatch):
    out = tmp_path / "fe.nc"
    settings = dict(
        temperature_c="25:200:8", activity="1e-8:1e-4:5", at=POINTS, workers=1, chunk_size=5
    )
    real = sweep_module.compute_chunk
    calls = []

    def stopped_after_three(spec, s, flat):
        if len(calls) == 3:
            raise KeyboardInterrupt
        calls.append(flat)
        return real(spec, s, flat)

    monkeypatch.setattr(sweep_module, "compute_chunk", stopped_after_three)
    with pytest.raises(KeyboardInterrupt):
        sweep("Fe", out=out, **settings)
    assert not out.exists()  # nothing half-written
    assert len(list((tmp_path / "fe.nc.parts").glob("*.npz"))) == 3
    monkeypatch.setattr(sweep_module, "compute_chunk", real)
    resumed = sweep("Fe", out=out, **settings)
    assert resumed.attrs["chunks_reused"] == 3
    assert resumed.attrs["chunks"] == 8
    assert not (tmp_path / "fe.nc.parts").exists()
    fresh = sweep("Fe", **settings)
    for name in ("species", "state", "margin_up_v", "area"):
        np.testing.assert_array_equal(resumed[name].values, fresh[name].values)
    import xarray as xr

    with xr.open_dataset(out) as back:
        np.testing.assert_array_equal(back["species"].values, fresh["species"].values)
        np.testing.assert_allclose(back["area"].values, fresh["area"].values)
        assert "thermodynamic prediction" in back.attrs["caution"]


def test_saved_chunks_of_other_settings_are_not_mixed_in(tmp_path):
    out = tmp_path / "fe.nc"
    sweep("Fe", temperature_c=[25, 60], at=POINTS, workers=1, out=out)
    (tmp_path / "fe.nc.parts").mkdir()
    (tmp_path / "fe.nc.parts" / "manifest.json").write_text('{"fingerprint": "other"}')
    with pytest.raises(OptionError, match="other settings"):
        sweep("Fe", temperature_c=[25, 60], at=POINTS, workers=1, out=out)
    ds = sweep("Fe", temperature_c=[25, 60], at=POINTS, workers=1, out=out, restart=True)
    assert ds.attrs["chunks_reused"] == 0


def test_parquet_and_csv_hold_one_row_per_grid_point(tmp_path):
    pd = pytest.importorskip("pandas")
    pytest.importorskip("pyarrow")
    ds = sweep(
        "Zn",
        temperature_c=[25, 80],
        activity=[1e-6, 1e-4],
        at=POINTS[:2],
        passive_ph=9.0,
        workers=1,
        out=tmp_path / "zn.parquet",
    )
    table = pd.read_parquet(tmp_path / "zn.parquet")
    assert len(table) == 4
    assert list(table["species@0"]) == ds["species"].isel(point=0).values.ravel().tolist()
    sweep(
        "Zn",
        temperature_c=[25, 80],
        activity=[1e-6, 1e-4],
        at=POINTS[:2],
        passive_ph=9.0,
        workers=1,
        out=tmp_path / "zn.csv",
    )
    csv = pd.read_csv(tmp_path / "zn.csv")
    np.testing.assert_allclose(csv["passive_width_v"], table["passive_width_v"])


def test_local_processes_give_the_same_results():
    kw = dict(temperature_c=[25, 60, 95], activity=[1e-6, 1e-4], at=POINTS, chunk_size=2)
    serial = sweep("Fe", workers=1, **kw)
    pooled = sweep("Fe", workers=2, **kw)
    whole = sweep("Fe", workers=1, **{**kw, "chunk_size": 100})  # other chunks, same answer
    for name in serial.data_vars:
        np.testing.assert_array_equal(serial[name].values, pooled[name].values)
        np.testing.assert_array_equal(serial[name].values, whole[name].values)
    np.testing.assert_array_equal(serial["domain"].values, whole["domain"].values)


def test_dask_local_cluster_matches_the_local_run():
    distributed = pytest.importorskip("distributed")
    kw = dict(
        temperature_c="25:150:4", activity="1e-8:1e-4:3", at=POINTS, passive_ph=9.0, chunk_size=3
    )
    local = sweep("Fe", workers=1, **kw)
    with (
        distributed.LocalCluster(
            n_workers=2, threads_per_worker=1, processes=False, dashboard_address=":0"
        ) as cluster,
        distributed.Client(cluster) as client,
    ):
        remote = sweep("Fe", client=client, **kw)
    for name in local.data_vars:
        np.testing.assert_array_equal(local[name].values, remote[name].values)


def test_command_line_sweep(tmp_path, capsys):
    out = tmp_path / "s.nc"
    code = main(
        [
            "sweep",
            "Fe",
            "--temperature",
            "25:100:3",
            "--activity",
            "1e-8:1e-4:3",
            "--at",
            "7,-0.5",
            "--passive-at",
            "9",
            "--out",
            str(out),
            "--workers",
            "1",
            "--no-progress",
        ]
    )
    assert code == 0
    assert "9 maps" in capsys.readouterr().out
    import xarray as xr

    with xr.open_dataset(out) as ds:
        assert ds["species"].shape == (1, 3, 3, 1)


@pytest.mark.parametrize(
    "args, match",
    [
        (["--temperature", "25:100"], "temperature"),
        (["--activity", "1e-8:1e-4:x"], "activity"),
        (["--out", "x.png"], "cannot write a sweep"),
        (["--ratio", "1:1"], "ratio"),
        (["--temperature", "25,400"], "pressure"),
    ],
)
def test_command_line_bad_input_exits_2_without_a_file(tmp_path, capsys, args, match):
    argv = ["sweep", "Fe", "--at", "7,0", "--workers", "1", "--no-progress"]
    if "--out" not in args:
        argv += ["--out", str(tmp_path / "s.nc")]
    assert main(argv + args) == 2
    assert match in capsys.readouterr().err
    assert not (tmp_path / "s.nc").exists()


def test_the_package_offers_the_sweep():
    import pourbaix

    assert pourbaix.sweep is sweep


def test_parse_values():
    assert parse_values("25:300:12", "t")[-1] == 300.0
    assert parse_values("1e-8:1e-4:5", "a", log=True) == pytest.approx(
        (1e-8, 1e-7, 1e-6, 1e-5, 1e-4)
    )
    assert parse_values(5, "t") == (5.0,)
    with pytest.raises(OptionError, match="N must be at least 1"):
        parse_values("1:2:0", "t")
    with pytest.raises(OptionError, match="log-spaced"):
        parse_values("0:1:3", "a", log=True)
    with pytest.raises(PourbaixError, match="nothing to compute"):
        sweep("Fe", areas=False, workers=1)
