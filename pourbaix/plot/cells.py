"""Figures for galvanic couples: Evans diagrams and the coupled metals' maps with their points."""

from __future__ import annotations

import math
import os
import sys

__all__ = ["draw_evans", "draw_couple_maps"]

_INK = "#1f1f1f"
_MUTED = "#4a4a4a"
# one line style per electrode: colour-blind-safe hues that also differ in greyscale by dash
_STYLES = (
    ("#1a1a1a", "o"),
    ("#0a6ab0", "s"),
    ("#c65a00", "^"),
    ("#3b8a3a", "D"),
    ("#8b3d9e", "v"),
)
_COUPLE_COLOUR = "#b00020"


def load_pyplot():
    """Import pyplot, choosing the Agg backend only if the user chose none."""
    import matplotlib

    if "matplotlib.pyplot" not in sys.modules and not os.environ.get("MPLBACKEND"):
        chosen = getattr(matplotlib.rcParams, "_get_backend_or_none", lambda: "unknown")()
        if chosen is None:
            matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt


def _sub(text):
    from pourbaix.tables.formula import parse_formula

    try:
        return parse_formula(text.split(":")[0]).plain()
    except Exception:  # a label that is not a formula stays as it is
        return text


def draw_evans(mixed, ax=None, *, reference="SHE", title=None):
    """Evans diagram: each coupled electrode's current magnitude on a log axis against potential.

    Parameters
    ----------
    mixed : pourbaix.analyses.cells.MixedPotential
        The solved couple.
    ax : matplotlib.axes.Axes, optional
        Axes to draw onto; a new figure when None.
    reference : str
        Name of the potential scale, for the axis label.
    title : str, optional
        Title (default names the electrodes).

    Returns
    -------
    matplotlib.axes.Axes

    Notes
    -----
    Each electrode's net Butler–Volmer current times its area: solid above its
    rest potential (anodic), dashed below (cathodic). The couple sits where
    the anodic and cathodic totals are equal (Wagner & Traud 1938; Evans
    diagram after U. R. Evans, 1929); the galvanic current is read there.

    Examples
    --------
    >>> from pourbaix.analyses.cells import ElectrodeKinetics, mixed_potential
    >>> k = ElectrodeKinetics(0.06, 0.12, exchange_current_a_m2=1e-2)
    >>> ax = draw_evans(mixed_potential([-0.76, 0.34], [k, k], names=["Zn", "Cu"]))
    >>> ax.get_xscale()
    'log'
    """
    import numpy as np

    from pourbaix.analyses.cells import butler_volmer

    plt = load_pyplot()
    if ax is None:
        fig, ax = plt.subplots(figsize=(7.0, 5.2))
        fig.subplots_adjust(left=0.13, right=0.96, top=0.9, bottom=0.2)
    rest = mixed.rest_potentials_v
    span = max(rest) - min(rest)
    lo, hi = min(rest) - max(0.15, 0.25 * span), max(rest) + max(0.2, 0.3 * span)
    smallest = min(k.current_a_m2 * a for k, a in zip(mixed.kinetics, mixed.areas_m2, strict=True))
    e_mix, i_g = mixed.potential_v, mixed.galvanic_current_a
    floor = min(smallest, i_g) / 100.0
    top = max(i_g, smallest) * 1e3
    for idx, (name, e_rest, kin, area) in enumerate(
        zip(mixed.names, rest, mixed.kinetics, mixed.areas_m2, strict=True)
    ):
        colour, _ = _STYLES[idx % len(_STYLES)]
        up = np.linspace(e_rest, hi, 600)
        down = np.linspace(lo, e_rest, 600)
        i_up = np.abs(np.asarray(butler_volmer(up, e_rest, kin))) * area
        i_down = np.abs(np.asarray(butler_volmer(down, e_rest, kin))) * area
        keep_up = (i_up > floor) & (i_up < top)
        keep_down = (i_down > floor) & (i_down < top)
        ax.plot(i_up[keep_up], up[keep_up], color=colour, lw=1.6, label=f"{_sub(name)} anodic")
        ax.plot(
            i_down[keep_down],
            down[keep_down],
            color=colour,
            lw=1.4,
            ls=(0, (5, 2.5)),
            label=f"{_sub(name)} cathodic",
        )
        ax.annotate(
            f"{_sub(name)}: E_rest {e_rest:+.3f} V",
            xy=(top, e_rest),
            xytext=(-4, 3),
            textcoords="offset points",
            ha="right",
            fontsize=8,
            color=colour,
        )
        ax.axhline(e_rest, color=colour, lw=0.6, ls=(0, (1, 2)), zorder=1)
    ax.axhline(e_mix, color=_COUPLE_COLOUR, lw=0.9, ls=(0, (4, 2, 1, 2)), zorder=2)
    ax.plot([i_g], [e_mix], marker="o", ms=7, mfc="white", mec=_COUPLE_COLOUR, mew=1.6, zorder=5)
    ax.text(
        0.02,
        0.97,
        f"couple potential {e_mix:+.3f} V (○)\ngalvanic current {i_g:.3g} A",
        transform=ax.transAxes,
        ha="left",
        va="top",
        fontsize=8.5,
        color=_COUPLE_COLOUR,
        bbox={"boxstyle": "round,pad=0.3", "fc": "white", "ec": _COUPLE_COLOUR, "lw": 0.6},
        zorder=6,
    )
    ax.set_xscale("log")
    ax.set_xlim(floor, top)
    ax.set_ylim(lo, hi)
    ax.set_xlabel("|I| / A  (current density × area)", fontsize=10.5)
    ax.set_ylabel(f"E / V vs {reference}", fontsize=10.5)
    ax.tick_params(which="both", direction="out", labelsize=9, color=_INK)
    ax.set_title(
        title or "Evans diagram: " + " – ".join(_sub(n) for n in mixed.names),
        loc="left",
        fontsize=12,
        fontweight="bold",
        color=_INK,
    )
    ax.legend(
        loc="upper center",
        bbox_to_anchor=(0.5, -0.13),
        ncol=min(4, 2 * len(mixed.names)),
        fontsize=8,
        frameon=False,
    )
    ax.figure.text(
        0.01,
        0.01,
        "Butler–Volmer per electrode from the kinetics given; a thermodynamic driving force is not "
        "a corrosion rate.",
        fontsize=7,
        color=_MUTED,
    )
    return ax


def draw_couple_maps(couple, *, overlay=False, palette="default"):
    """The coupled metals' maps side by side (or overlaid), each metal's point marked.

    Parameters
    ----------
    couple : pourbaix.analyses.cells.CoupleResult
        The couple.
    overlay : bool
        One axes with every map's boundaries instead of one panel per metal.
    palette : str
        Map palette (``default`` or ``grey``).

    Returns
    -------
    matplotlib.figure.Figure

    Notes
    -----
    Filled markers: each metal's equilibrium potential at the water's pH (the
    top of its immunity domain); the star: the couple's mixed potential when
    kinetics were given. The arrow on the anode's panel spans the open-circuit
    driving force.

    Examples
    --------
    >>> from pourbaix.analyses.cells import galvanic_couple
    >>> fig = draw_couple_maps(galvanic_couple(["Zn", "Cu"], ph=8.0))
    >>> len(fig.axes)
    2
    """
    from pourbaix.plot.draw import draw_map, draw_overlay

    plt = load_pyplot()
    metals = couple.metals
    if overlay:
        fig, ax = plt.subplots(figsize=(7.6, 6.2))
        fig.subplots_adjust(left=0.11, right=0.97, top=0.9, bottom=0.28)
        draw_overlay([m.dmap for m in metals], ax=ax, labels=[m.element for m in metals])
        axes = [ax]
    else:
        count = len(metals)
        fig, axes = plt.subplots(1, count, figsize=(5.6 * count, 6.6), squeeze=False)
        axes = list(axes[0])
        fig.subplots_adjust(left=0.07, right=0.98, top=0.9, bottom=0.36, wspace=0.22)
        for ax, m in zip(axes, metals, strict=True):
            draw_map(m.dmap, ax=ax, reading=True, caption=False, palette=palette, title=m.element)
    handles = []
    for ax_index, ax in enumerate(axes):
        for idx, m in enumerate(metals):
            if m.equilibrium_potential_v is None:
                continue
            colour, marker = _STYLES[idx % len(_STYLES)]
            own = overlay or ax_index == idx
            h = ax.plot(
                [couple.ph],
                [m.equilibrium_potential_v],
                marker=marker,
                ms=8 if own else 6,
                mfc=colour if own else "white",
                mec=colour,
                mew=1.5,
                ls="none",
                zorder=12,
                label=f"{m.element}: E_eq {m.equilibrium_potential_v:+.3f} V"
                + (" (anode)" if m.element == couple.anode else ""),
            )[0]
            if ax_index == 0:
                handles.append(h)
        ax.axvline(couple.ph, color=_MUTED, lw=0.8, ls=(0, (2, 2)), zorder=11)
        if couple.mixed is not None:
            h = ax.plot(
                [couple.ph],
                [couple.mixed.potential_v],
                marker="*",
                ms=13,
                mfc=_COUPLE_COLOUR,
                mec="white",
                mew=0.8,
                ls="none",
                zorder=13,
                label=f"couple (mixed) potential {couple.mixed.potential_v:+.3f} V",
            )[0]
            if ax_index == 0:
                handles.append(h)
    anode = next(m for m in metals if m.element == couple.anode)
    cathode = next(m for m in metals if m.element == couple.cathode)
    target = axes[0] if overlay else axes[[m.element for m in metals].index(couple.anode)]
    target.annotate(
        "",
        xy=(couple.ph, cathode.equilibrium_potential_v),
        xytext=(couple.ph, anode.equilibrium_potential_v),
        arrowprops={"arrowstyle": "<->", "color": _COUPLE_COLOUR, "lw": 1.2},
        zorder=12,
    )
    target.annotate(
        f"ΔE {couple.driving_force_v:.3f} V",
        xy=(couple.ph, 0.5 * (cathode.equilibrium_potential_v + anode.equilibrium_potential_v)),
        xytext=(6, 0),
        textcoords="offset points",
        fontsize=8.5,
        color=_COUPLE_COLOUR,
        va="center",
        bbox={"boxstyle": "round,pad=0.2", "fc": "white", "ec": "none", "alpha": 0.85},
        zorder=14,
    )
    c = metals[0].dmap.conditions
    act = (
        f"molality {c.molality:g} mol/kg" if c.molality is not None else f"activity {c.activity:g}"
    )
    fig.suptitle(
        f"Galvanic couple {' – '.join(m.element for m in metals)} at pH {couple.ph:g}, "
        f"{couple.temperature_c:g} °C, dissolved {act}",
        x=0.01,
        ha="left",
        fontsize=12,
        fontweight="bold",
        color=_INK,
    )
    # the markers' key goes below everything the maps put under their axes (state keys, captions)
    renderer = fig.canvas.get_renderer()
    lowest = min(
        [ax.get_tightbbox(renderer).y0 for ax in axes] + [fig.bbox.height * 0.2], default=0.0
    )
    fig.legend(
        handles=handles,
        loc="upper center",
        ncol=min(3, len(handles)),
        fontsize=8.5,
        frameon=False,
        bbox_to_anchor=(0.5, max(lowest - 4.0, 30.0) / fig.bbox.height),
    )
    fig.text(
        0.01,
        0.008,
        "Thermodynamic prediction: which metal is driven anodic and by how much, not how fast it "
        "corrodes. Potentials vs " + couple.reference + ".",
        fontsize=7.5,
        color=_MUTED,
    )
    if math.isfinite(couple.driving_force_v):
        fig._pourbaix_couple = True  # marker for tests: drawn by this function
    return fig
