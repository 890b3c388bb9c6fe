"""Draw the 95 % bands of a map's boundaries (from pourbaix.analyses.uncertainty)."""

from __future__ import annotations

__all__ = ["band_caption", "draw_bands"]


def band_caption(result):
    """What the hatched band shows, for the figure's caption.

    Parameters
    ----------
    result : UncertainMap
        From :func:`pourbaix.analyses.uncertainty.sample_maps`.

    Returns
    -------
    str
    """
    return (
        f"//// 95 % band ({len(result.samples)} draws; u(ΔfG°) as the source states it for "
        f"{result.stated} of {result.perturbed} species, "
        f"{result.default_uncertainty_kj_mol:g} kJ/mol for the others)"
    )


def draw_bands(ax, result, resolution=160, caption_in_axes=True):
    """Hatch the points no species holds with 97.5 % probability.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        The axes of the drawn nominal map (same window and reference).
    result : UncertainMap
        From :func:`pourbaix.analyses.uncertainty.sample_maps`.
    resolution : int
        Grid points per axis.
    caption_in_axes : bool
        Write :func:`band_caption` in a box at the lower right of the axes; give
        False when the caption goes under the figure instead (``draw_map(notes=...)``),
        where it cannot hide a label.

    Returns
    -------
    matplotlib.axes.Axes

    References
    ----------
    JCGM 101:2008 (Monte Carlo propagation; see pourbaix.analyses.uncertainty).
    """
    import matplotlib as mpl

    from pourbaix.analyses.uncertainty import boundary_band

    ph, potential, band = boundary_band(result, resolution)
    with mpl.rc_context({"hatch.color": "#3a3a3a", "hatch.linewidth": 0.6}):
        ax.contourf(
            ph,
            potential,
            band.astype(float),
            levels=[0.5, 1.5],
            colors="none",
            hatches=["////"],
            zorder=2.5,
        )
    if caption_in_axes:
        ax.text(
            0.99,
            0.01,
            band_caption(result),
            transform=ax.transAxes,
            ha="right",
            va="bottom",
            fontsize=7,
            zorder=6,
            bbox={"facecolor": "white", "edgecolor": "#3a3a3a", "linewidth": 0.5, "pad": 2.0},
        )
    return ax
