"""Rich display in notebooks: a map shows itself as its figure, tables as DataFrames."""

from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import pytest  # noqa: E402

import pourbaix  # noqa: E402
from pourbaix.analyses.field import place_readings, read_field_csv  # noqa: E402
from pourbaix.maps.lines import boundary_equations_frame  # noqa: E402

DATA = Path(__file__).parent / "data" / "field"


def test_a_map_displays_as_its_figure_in_a_notebook():
    formatters = pytest.importorskip("IPython.core.formatters")
    m = pourbaix.compute_map("Cu")
    open_before = plt.get_fignums()  # figures other tests in this process may have left open
    data, _ = formatters.format_display_data(m)
    png = data["image/png"]
    assert png[1:4] == b"PNG"
    import io

    from PIL import Image

    w, h = Image.open(io.BytesIO(png)).size
    assert w > 600 and h > 450  # the figure at notebook resolution, not a thumbnail
    assert plt.get_fignums() == open_before  # shown once: no figure left open to be shown again


def test_tables_as_dataframes():
    pd = pytest.importorskip("pandas")
    m = pourbaix.compute_map("Fe")
    frame = boundary_equations_frame(m)
    assert isinstance(frame, pd.DataFrame)
    assert len(frame) == len(m.boundaries) and "reaction" in frame.columns
    data = place_readings(m, read_field_csv(DATA / "references.csv"))
    readings = data.to_frame()
    assert list(readings["species"]) == [r.species for r in data.rows]
    formatters = pytest.importorskip("IPython.core.formatters")
    shown, _ = formatters.format_display_data(data)
    assert "<table" in shown["text/html"]
