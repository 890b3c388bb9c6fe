"""Rich display in notebooks: a map shows itself as its figure, a table as a pandas DataFrame."""

from __future__ import annotations

import io

from pourbaix.errors import OptionError

__all__ = ["map_png", "as_frame"]

#: Resolution of the figure a notebook shows [dots per inch].
NOTEBOOK_DPI = 110


def map_png(dmap, dpi=NOTEBOOK_DPI):
    """The map drawn as a PNG image (what a notebook shows for a map on its own).

    Parameters
    ----------
    dmap : DomainMap
        The map.
    dpi : float
        Resolution [dots per inch].

    Returns
    -------
    bytes
        PNG data.

    Examples
    --------
    >>> from pourbaix import compute_map
    >>> map_png(compute_map("Zn"))[1:4] == b"PNG"
    True
    """
    from pourbaix.plot.maps import draw_map
    from pourbaix.plot.style import load_pyplot

    plt = load_pyplot()
    ax = draw_map(dmap)
    buffer = io.BytesIO()
    try:
        ax.figure.savefig(buffer, format="png", dpi=dpi, facecolor="white")
    finally:
        plt.close(ax.figure)  # shown once, as the map's image, not again as an open figure
    return buffer.getvalue()


def as_frame(rows):
    """A table (list of dicts, one per row) as a pandas DataFrame.

    Parameters
    ----------
    rows : list of dict
        Rows with the same keys.

    Returns
    -------
    pandas.DataFrame

    Raises
    ------
    OptionError
        When pandas is not installed (it is an optional extra: ``pip install "pourbaix[scale]"``).

    Examples
    --------
    >>> as_frame([{"ph": 7.0, "state": "corrosion"}]).shape
    (1, 2)
    """
    try:
        import pandas as pd
    except ImportError:
        raise OptionError(
            "tables as DataFrames need pandas, an optional extra: pip install pandas "
            '(or pip install "pourbaix[scale]")'
        ) from None
    return pd.DataFrame(list(rows))
