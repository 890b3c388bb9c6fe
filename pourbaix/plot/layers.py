"""Layers of a map figure: domain fills, boundaries, water lines, caption and bottom legend."""

from __future__ import annotations

import math

import numpy as np

from pourbaix.plot.style import (
    CAPTION_COLOUR,
    CAPTION_SIZE,
    HATCH,
    INK,
    WATER_COLOUR,
    get_renderer,
    resolve_palette,
)

__all__ = [
    "add_caption",
    "bottom_band",
    "bottom_legend",
    "domain_colours",
    "draw_boundaries",
    "draw_water",
    "fill_domains",
    "legend_height_pt",
    "neutral_ph_in_window",
    "water_segments",
]


# ------------------------------------------------------------------ layers
def domain_colours(dmap, palette):
    """One tint per domain: its state's family, neighbours of one state told apart."""
    pal = resolve_palette(palette)
    index = {d.entry: k for k, d in enumerate(dmap.domains)}
    nbrs = {k: set() for k in range(len(dmap.domains))}
    for b in dmap.boundaries:
        i, j = (index.get(e) for e in b.entries)
        if i is not None and j is not None:
            nbrs[i].add(j)
            nbrs[j].add(i)
    chosen = {}
    for k in sorted(nbrs, key=lambda k: -dmap.domains[k].area):
        state = (
            dmap.domains[k].state
            if dmap.domains[k].state in ("corrosion", "passivation", "immunity")
            else "passivation"
        )
        tints = pal[state]
        used = {chosen[n] for n in nbrs[k] if n in chosen}
        chosen[k] = next((c for c in tints if c not in used), tints[len(chosen) % len(tints)])
    return [chosen[k] for k in range(len(dmap.domains))], pal


def fill_domains(ax, dmap, colours, pal, *, reading=False, alpha=1.0, zorder=1.0):
    """Fill each domain with its tint (hatching corrosion domains for the reading).

    The axes' limits are set before (``style_axes``): the patches are added as
    plain artists, without the data-limit update of ``add_patch`` (a third of
    the cost on a map of a hundred domains).
    """
    from matplotlib.patches import Polygon as MplPolygon

    for k, d in enumerate(dmap.domains):
        xy = np.asarray(d.polygon.exterior.coords)
        ax.add_artist(
            MplPolygon(
                xy,
                closed=True,
                facecolor=colours[k],
                edgecolor="none",
                lw=0,
                alpha=alpha,
                zorder=zorder,
                gid=f"pourbaix-domain:{k}",
            )
        )
        hatch = HATCH.get(d.state) if reading else None
        if hatch:
            ax.add_artist(
                MplPolygon(
                    xy,
                    closed=True,
                    facecolor="none",
                    edgecolor=pal["hatch"],
                    lw=0.0,
                    hatch=hatch,
                    zorder=zorder + 0.1,
                    alpha=0.55,
                )
            )


def draw_boundaries(ax, dmap, *, colour=INK, lw=0.9, ls="-", zorder=3.0, label=None):
    """Draw every boundary segment of a map as one line collection."""
    from matplotlib.collections import LineCollection

    segs = [[b.start, b.end] for b in dmap.boundaries]
    lc = LineCollection(
        segs,
        colors=colour,
        linewidths=lw,
        linestyles=ls,
        zorder=zorder,
        capstyle="round",
        label=label,
    )
    ax.add_collection(lc)
    return lc


def draw_water(ax, dmap, *, colour=WATER_COLOUR, lw=1.1, ls=(0, (5, 3)), zorder=2.5):
    """Draw the water lines (oxygen and hydrogen) over the map's pH range."""
    x0, x1 = dmap.conditions.ph_range
    ph = np.array([x0, x1])
    lines = []
    for key in ("oxygen", "hydrogen"):
        if key not in dmap.water:
            continue
        e0, s = dmap.water[key]
        (ln,) = ax.plot(
            ph, e0 + s * ph, color=colour, lw=lw, ls=ls, zorder=zorder, gid=f"pourbaix-water:{key}"
        )
        lines.append(ln)
    return lines


def water_segments(dmap):
    """Return the water lines as segments over the map's pH range (data units)."""
    x0, x1 = dmap.conditions.ph_range
    return [
        [(x0, e0 + s * x0), (x1, e0 + s * x1)]
        for e0, s in (dmap.water[k] for k in ("oxygen", "hydrogen") if k in dmap.water)
    ]


def neutral_ph_in_window(dmap):
    """Neutral pH at the map's temperature when it lies inside the window, else None."""
    try:
        v = float(dmap.neutral_ph)
    except Exception:  # noqa: BLE001 - thermo may be unavailable for hand-made maps; the marker is optional
        return None
    lo, hi = dmap.conditions.ph_range
    return v if lo < v < hi and math.isfinite(v) else None


def bottom_band(ax, renderer):
    """Distance from the axes' bottom edge to below its x-axis decorations [pt]."""
    tb = ax.xaxis.get_tightbbox(renderer)
    gap_px = ax.bbox.y0 - tb.y0 if tb is not None else 0.0
    return gap_px * 72.0 / ax.figure.dpi + 5.0


def add_caption(ax, lines, offset_pt):
    """Write the caption lines below the axes, ``offset_pt`` under the frame."""
    text = "\n".join(lines)
    return ax.annotate(
        text,
        xy=(0.0, 0.0),
        xycoords="axes fraction",
        xytext=(0.0, -offset_pt),
        textcoords="offset points",
        ha="left",
        va="top",
        fontsize=CAPTION_SIZE,
        color=CAPTION_COLOUR,
        linespacing=1.45,
        annotation_clip=False,
        gid="pourbaix-caption",
    )


def bottom_legend(ax, handles, labels, offset_pt, title=None, ncol=None):
    """A legend below the axes, in as many columns as fit the axes' width."""
    from matplotlib.transforms import ScaledTranslation

    fig = ax.figure
    tr = ax.transAxes + ScaledTranslation(0.0, -offset_pt / 72.0, fig.dpi_scale_trans)
    leg = ax.legend(
        handles,
        labels,
        loc="upper left",
        bbox_to_anchor=(0.0, 0.0),
        bbox_transform=tr,
        ncol=ncol or len(handles),
        frameon=False,
        fontsize=8,
        title=title,
        title_fontsize=8,
        alignment="left",
        borderaxespad=0.0,
        borderpad=0.0,
        handlelength=2.6,
        handleheight=1.0,
        columnspacing=1.6,
    )
    leg.set_gid("pourbaix-legend")
    renderer = get_renderer(fig, layout=False)
    if ncol is None or ncol > 1:
        cols = ncol or len(handles)
        while cols > 1 and leg.get_window_extent(renderer).width > ax.bbox.width:
            cols -= 1
            leg.remove()
            return bottom_legend(ax, handles, labels, offset_pt, title=title, ncol=cols)
    return leg


def legend_height_pt(leg, renderer):
    """Height of a legend [pt]."""
    ext = leg.get_window_extent(renderer)
    return ext.height * 72.0 / leg.figure.dpi
