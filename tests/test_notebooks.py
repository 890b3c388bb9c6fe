"""Run every worked-scenario notebook top to bottom and check it tells its story with figures."""

from __future__ import annotations

from pathlib import Path

import pytest

nbformat = pytest.importorskip("nbformat", reason="nbformat is in the test extra")
nbclient = pytest.importorskip("nbclient", reason="nbclient is in the test extra")
pytest.importorskip("ipykernel", reason="ipykernel is in the test extra")

NOTEBOOKS = Path(__file__).resolve().parent.parent / "notebooks"

# Each notebook, and words its cautions must carry (README, "Safety and limits").
EXPECTED = {
    "cooling_loop_steel.ipynb": (
        "Passivation on a map is not protection",
        "pitting",
        "crevice",
        "microbiolog",
        "applicable standards",
    ),
    "heap_leach_copper.ipynb": (
        "thermodynamic",
        "Sulfuric acid",
        "H₂S",
        "cyanide",
        "local codes",
        "licensed practice",
    ),
    "lead_service_lines.ipynb": (
        "drinking water",
        "particulate",
        "local codes and the applicable standards",
        "licensed",
    ),
}


def test_every_notebook_is_listed():
    assert sorted(p.name for p in NOTEBOOKS.glob("*.ipynb")) == sorted(EXPECTED)


@pytest.mark.parametrize("name", sorted(EXPECTED))
def test_notebook_is_committed_clean(name):
    nb = nbformat.read(NOTEBOOKS / name, as_version=4)
    nbformat.validate(nb)
    for cell in nb.cells:
        if cell.cell_type == "code":
            assert not cell.outputs and cell.execution_count is None, (
                f"{name}: commit notebooks without outputs"
            )


@pytest.mark.parametrize("name", sorted(EXPECTED))
def test_notebook_runs_and_shows_figures(name, tmp_path):
    nb = nbformat.read(NOTEBOOKS / name, as_version=4)
    client = nbclient.NotebookClient(
        nb, timeout=180, kernel_name="python3", resources={"metadata": {"path": str(tmp_path)}}
    )
    client.execute()  # raises CellExecutionError on the first failing cell
    errors, images = [], 0
    for cell in nb.cells:
        if cell.cell_type != "code":
            continue
        for out in cell.outputs:
            if out.output_type == "error":
                errors.append(f"{out.ename}: {out.evalue}")
            if out.output_type in ("display_data", "execute_result") and "image/png" in out.get(
                "data", {}
            ):
                images += 1
    assert not errors, errors
    assert images >= 1, f"{name} drew no inline figure"
    story = "\n".join(c.source for c in nb.cells if c.cell_type == "markdown")
    assert "invented" in story.lower()  # each scenario says it is made up
    for phrase in EXPECTED[name]:
        assert phrase in story, f"{name}: caution phrase {phrase!r} missing"
    # the notebook cleans up after itself: nothing left in its working folder
    assert not list(tmp_path.iterdir()), sorted(p.name for p in tmp_path.iterdir())
