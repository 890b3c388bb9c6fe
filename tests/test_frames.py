"""Results as pandas DataFrames and as tables in a notebook (pandas is an optional extra).

Check values: CRC Handbook Electrochemical Series (from memory) E°(Zn2+/Zn) = -0.7618 V and
E°(Cu2+/Cu) = +0.3419 V; zinc is the anode of a zinc–copper couple (common practice).
"""

import builtins

import pytest

import pourbaix
from pourbaix.analyses.cells import electrochemical_series, galvanic_couple
from pourbaix.analyses.compare import compare_maps
from pourbaix.analyses.solubility import solubility_curve
from pourbaix.analyses.windows import leach_window

pd = pytest.importorskip("pandas")


def test_series_as_a_frame_holds_the_handbook_potentials():
    frame = electrochemical_series(elements=["Zn", "Cu"]).to_frame()
    e0 = dict(zip(frame["couple"], frame["e0_v"], strict=True))
    assert e0["Zn2+/Zn"] == pytest.approx(-0.7618, abs=0.001)  # CRC (from memory)
    assert e0["Cu2+/Cu"] == pytest.approx(0.3419, abs=0.003)  # CRC (from memory)
    assert set(frame["reference"]) == {"SHE"}


def test_couple_as_a_frame_names_zinc_the_anode():
    frame = galvanic_couple(["Zn", "Cu"], ph=8).to_frame()
    roles = dict(zip(frame["metal"], frame["role"], strict=True))
    assert roles == {"Zn": "anode", "Cu": "cathode"}


def test_probe_solubility_window_and_comparison_frames_hold_their_rows():
    fe = pourbaix.compute_map("Fe")
    probe = fe.probe([7.0, 8.0], [-0.5, 0.2])
    frame = probe.to_frame()
    assert list(frame["species"]) == [r["species"] for r in probe.rows()]

    zn = pourbaix.compute_map("Zn", activity=1e-6)
    sol = solubility_curve(zn, [6.0, 9.0, 12.0], potential_v=0.0)
    frame = sol.to_frame()
    assert len(frame) == 3 and list(frame["ph"]) == [6.0, 9.0, 12.0]
    # ZnO is least soluble near pH 9-10 (Baes & Mesmer 1976, from memory): the middle point is lowest
    assert frame["total_mol_kg"].idxmin() == 1

    window = leach_window("Cu", ["Fe"], 1e-2, 1e-5)
    frame = window.to_frame()
    assert frame["area_ph_v"].sum() == pytest.approx(window.area, rel=1e-9)
    assert (frame["ph_low"] < frame["ph_high"]).all()

    fe80 = pourbaix.compute_map("Fe", temperature_c=80)
    cmp = compare_maps(fe, fe80)
    assert len(cmp.to_frame()) == len(cmp.rows())


def test_results_show_as_tables_in_a_notebook_and_as_text_without_pandas(monkeypatch):
    formatters = pytest.importorskip("IPython.core.formatters")
    series = electrochemical_series(elements=["Zn"])
    shown, _ = formatters.format_display_data(series)
    assert "<table" in shown["text/html"]

    real_import = builtins.__import__

    def no_pandas(name, *args, **kwargs):
        if name == "pandas" or name.startswith("pandas."):
            raise ImportError("no pandas here")
        return real_import(name, *args, **kwargs)

    monkeypatch.setattr(builtins, "__import__", no_pandas)
    assert series._repr_html_() is None  # the plain text form is shown instead
    from pourbaix.errors import OptionError

    with pytest.raises(OptionError, match="pip install pandas"):
        series.to_frame()
