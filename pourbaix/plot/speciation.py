"""Drawing a speciation sweep: shares of the metal and of the ligand, solids shaded."""

from __future__ import annotations

import numpy as np

from pourbaix.plot.style import (
    CAPTION_COLOUR,
    INK,
    PALETTES,
    power_text,
    typeset_formulas,
    wrap_measured,
)

__all__ = ["SPECIES_STYLES", "draw_speciation"]

#: Line styles for species, one per curve (colour-blind-safe hues, distinct dashes so a
#: greyscale print still tells them apart).
SPECIES_STYLES = (
    ("#1a1a1a", "-"),
    ("#0a6ab0", "-"),
    ("#c65a00", "-"),
    ("#3b8a3a", "-"),
    ("#8b3d9e", "-"),
    ("#1a1a1a", (0, (5, 2))),
    ("#0a6ab0", (0, (5, 2))),
    ("#c65a00", (0, (5, 2))),
    ("#3b8a3a", (0, (5, 2))),
    ("#8b3d9e", (0, (5, 2))),
    ("#6b6b6b", (0, (1.5, 1.5))),
)


def _spans(x, mask):
    """(start, end) of each run of True in mask along x (half-way to the neighbours)."""
    out = []
    edges = np.concatenate([[x[0]], 0.5 * (x[1:] + x[:-1]), [x[-1]]])
    n = 0
    while n < len(mask):
        if mask[n]:
            m = n
            while m + 1 < len(mask) and mask[m + 1]:
                m += 1
            out.append((edges[n], edges[m + 1]))
            n = m + 1
        else:
            n += 1
    return out


def _shade_solids(ax, result, labels_at=None):
    """Shade where each solid holding the metal is present; name it at the top, staggered."""
    from matplotlib.colors import to_rgb

    pal = PALETTES["default"]["passivation"]
    hatches = (None, "....", "////", "xxxx")
    s = result.system
    held = s.counts[:, 0] > 0
    for k, i in enumerate(np.flatnonzero(result.present.any(axis=0) & held)):
        for a, b in _spans(result.x, result.present[:, i]):
            ax.axvspan(
                a,
                b,
                facecolor=(*to_rgb(pal[k % len(pal)]), 0.5),
                edgecolor=(*to_rgb(INK), 0.25),
                hatch=hatches[k % len(hatches)],
                lw=0,
                zorder=0.5,
            )
            if labels_at is not None and (b - a) > 0.04 * (result.x[-1] - result.x[0]):
                ax.text(
                    0.5 * (a + b),
                    labels_at - 0.075 * k,
                    s.labels[i],
                    ha="center",
                    va="top",
                    fontsize=7.5,
                    color=CAPTION_COLOUR,
                    clip_on=True,
                    zorder=4,
                    bbox={"boxstyle": "round,pad=0.15", "fc": "white", "ec": "none", "alpha": 0.8},
                )


def _curves(ax, x, values, labels, *, threshold, log=False):
    shown = np.flatnonzero(values.max(axis=0) > threshold)
    order = sorted(shown, key=lambda i: int(np.argmax(values[:, i])))
    for k, i in enumerate(order):
        colour, dash = SPECIES_STYLES[k % len(SPECIES_STYLES)]
        y = values[:, i]
        if log:
            y = np.where(y > 0, y, np.nan)
        ax.plot(x, y, color=colour, ls=dash, lw=1.5, label=labels[i], zorder=3)
    return order


def draw_speciation(result, axes=None, *, molality=False, caption=True):
    """Draw the shares of the metal (top) and of each ligand (bottom) along the sweep.

    Parameters
    ----------
    result : SpeciationResult
        From :func:`pourbaix.analyses.speciation.compute_speciation`.
    axes : sequence of matplotlib.axes.Axes, optional
        One Axes for the metal, plus one for the ligands when the system has
        ligands; new ones are made when None.
    molality : bool
        Plot log molality instead of fractions of the totals.
    caption : bool
        Write the totals and the conditions under the figure.

    Returns
    -------
    numpy.ndarray of matplotlib.axes.Axes
        The Axes drawn on.

    Notes
    -----
    Solid phases present are shaded (and named) across the top panel. In the
    ligand panel, the dashed grey curve is the free-ligand molality (ligand
    not bound to the metal, right-hand axis) and the shaded band the share of
    the ligand bound by the metal.

    Examples
    --------
    >>> from pourbaix.analyses.speciation import compute_speciation
    >>> r = compute_speciation("Cu", {"Cu": 1e-3, "N": 1.0}, potential_v=0.2, points=41)
    >>> axes = draw_speciation(r)
    >>> len(axes)
    2
    """
    s = result.system
    n_panels = 1 + (1 if s.ligands else 0)
    if axes is None:
        from pourbaix.plot.style import load_pyplot

        plt = load_pyplot()
        fig, axes = plt.subplots(
            n_panels,
            1,
            figsize=(7.0, 3.2 + 2.6 * (n_panels - 1) + 0.5),
            sharex=True,
            gridspec_kw={"height_ratios": [1.4, 1.0][:n_panels]},
        )
        axes = np.atleast_1d(axes)
        fig.subplots_adjust(
            left=0.11, right=0.7, top=0.92, bottom=0.17 if n_panels == 2 else 0.22, hspace=0.12
        )
    else:
        axes = np.atleast_1d(axes)
        fig = axes[0].figure
    x = result.x
    xlabel = "pH" if result.axis == "ph" else f"E / V vs {result.reference}"
    metal = s.metals[0]
    ax = axes[0]
    if molality:
        values = result.amounts * (s.counts[:, 0] > 0)
        ax.set_yscale("log")
        ax.set_ylim(max(s.totals[0] * 1e-8, 1e-20), s.totals[0] * 3)
        ax.set_ylabel(f"{metal} species / mol kg⁻¹")
        _curves(ax, x, values, s.labels, threshold=s.totals[0] * 1e-8, log=True)
        _shade_solids(ax, result)
    else:
        values = result.metal_fraction()
        ax.set_ylim(0, 1.08)
        ax.set_ylabel(f"share of {typeset_formulas(metal)}")
        _curves(ax, x, values, s.labels, threshold=0.01)
        _shade_solids(ax, result, labels_at=1.065)
    ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), fontsize=8, frameon=False)
    ax.set_xlim(x[0], x[-1])
    fixed = (
        f"E = {result.fixed:+.3f} V vs {result.reference}"
        if result.axis == "ph"
        else f"pH {result.fixed:g}"
    )
    ax.set_title(
        typeset_formulas(f"{'–'.join(s.components)}–H₂O"),
        loc="left",
        fontsize=12,
        fontweight="bold",
        color=INK,
    )
    ax.set_title(
        f"{result.temperature_c:g} °C  ·  {fixed}", loc="right", fontsize=9, color="#4a4a4a"
    )
    for lig_index, lig in enumerate(s.ligands[:1]):
        lx = axes[1 + lig_index]
        frac = result.ligand_fraction(lig)
        own = s.counts[:, : len(s.metals)].sum(axis=1) == 0
        j = len(s.metals) + s.ligands.index(lig)
        _curves(lx, x, np.where(own & (s.counts[:, j] > 0), frac, 0.0), s.labels, threshold=0.01)
        bound = result.bound_ligand(lig) / s.totals[j]
        lx.fill_between(
            x, 0, bound, color="#c65a00", alpha=0.25, lw=0, label=f"bound by {metal}", zorder=1
        )
        lx.set_ylim(0, 1.05)
        lx.set_ylabel(f"share of {typeset_formulas(lig)}")
        from matplotlib.ticker import LogLocator, NullFormatter

        free = lx.twinx()
        free_m = result.free_ligand(lig)
        free.plot(
            x,
            free_m,
            color="#6b6b6b",
            ls=(0, (4, 2)),
            lw=1.3,
            label=f"free {typeset_formulas(lig)} (right)",
        )
        free.set_yscale("log")
        free.set_ylim(
            min(max(free_m.min() / 3.0, s.totals[j] * 1e-8), s.totals[j] / 10.0), s.totals[j] * 2.0
        )
        free.yaxis.set_major_locator(LogLocator(base=10.0, numticks=6))
        free.yaxis.set_minor_formatter(NullFormatter())
        free.set_ylabel(f"free {typeset_formulas(lig)} / mol kg⁻¹", color="#4a4a4a")
        h1, l1 = lx.get_legend_handles_labels()
        h2, l2 = free.get_legend_handles_labels()
        lx.legend(
            h1 + h2,
            l1 + l2,
            loc="upper left",
            bbox_to_anchor=(1.16, 1.0),
            fontsize=8,
            frameon=False,
        )
    axes[-1].set_xlabel(xlabel)
    if caption:
        totals = ", ".join(
            f"{typeset_formulas(c)} {power_text(v)}"
            for c, v in zip(s.components, s.totals, strict=True)
        )
        text = (
            f"{result.state_text}  ·  totals: {totals} mol/kg  ·  mass-balanced equilibrium  ·  "
            "shaded: solids present"
            + ("  ·  band: ligand bound by the metal" if s.ligands else "")
            + ".  A thermodynamic prediction (equilibrium only). Cyanide and ammonia are "
            "hazardous: follow local codes, the applicable standards and licensed practice."
        )
        width_pt = fig.get_figwidth() * 72.0 * (1.0 - 0.11 - 0.02)  # left at 0.11, a margin right
        wrapped = "\n".join(wrap_measured(text, width_pt, 7.5))
        fig.text(0.11, 0.012, wrapped, fontsize=7.5, color=CAPTION_COLOUR, va="bottom", ha="left")
    return axes
