"""Rich display in notebooks: a map shows itself as its figure, a table as a pandas DataFrame."""

from __future__ import annotations

import io

from pourbaix.frames import as_frame

__all__ = ["map_png", "as_frame"]  # as_frame lives in pourbaix.frames

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
