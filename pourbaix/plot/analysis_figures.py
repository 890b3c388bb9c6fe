"""Figures of the analyses: solubility lines and curves, leach windows, field readings, comparisons.

Each function takes an analysis result from :mod:`pourbaix.analyses` (and the
map it belongs to where needed), draws onto the given Axes (a new figure when
None) and returns it. The analyses compute; everything here only draws.

References
----------
Pourbaix, M. (1974). Atlas of Electrochemical Equilibria in Aqueous Solutions,
2nd ed. NACE, Houston (iso-solubility lines on potential–pH maps, ch. II).
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np

from pourbaix.analyses.field import series_of
from pourbaix.analyses.solubility import DEFAULT_LEVELS, polygon_parts, solubility_lines
from pourbaix.errors import OptionError
from pourbaix.plot import draw
from pourbaix.plot.style import FIGURE_SIZE_IN, load_pyplot, typeset_formulas
from pourbaix.tables.formula import TO_SUPERSCRIPT

__all__ = [
    "add_solubility_lines",
    "draw_solubility_curve",
    "draw_window",
    "draw_field",
    "draw_field_groups",
    "draw_comparison",
]


def _level_text(v):
    e = math.log10(v)
    if abs(e - round(e)) < 1e-9:
        return "10" + str(int(round(e))).translate(TO_SUPERSCRIPT)
    return f"{v:.2g}"


def add_solubility_lines(
    ax, dmap, levels=DEFAULT_LEVELS, *, basis="total", labels=True, colour="#5a2d82", **style
):
    """Draw iso-solubility lines on a map's Axes.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes of a map of ``dmap`` (e.g. from ``pourbaix.plot.draw.draw_map``).
    dmap : DomainMap
        The single-element map drawn there.
    levels : sequence of float
        Solubility levels [mol/kg].
    basis : {"total", "species"}
        As for :func:`~pourbaix.analyses.solubility.solubility_region`.
    labels : bool
        Write each level beside its longest line.
    colour : str
        Line colour.
    **style
        Passed to ``Axes.plot`` (e.g. ``lw``, ``ls``).

    Returns
    -------
    matplotlib.axes.Axes
    """
    lines = solubility_lines(dmap, levels, basis=basis)
    kw = dict(color=colour, lw=0.9, ls=(0, (6, 2, 1.5, 2)), zorder=4.2, gid="pourbaix-solubility")
    kw.update(style)
    x0, x1, y0, y1 = dmap.window
    scale = np.array([x1 - x0, y1 - y0])
    n = len(lines)
    for j, (level, parts) in enumerate(lines.items()):
        for pts in parts:
            ax.plot(pts[:, 0], pts[:, 1], **kw)
        if labels and parts:
            # staggered along the longest line (a quarter to three quarters of its length) so that
            # the labels of neighbouring levels do not sit on top of each other
            longest = max(
                parts, key=lambda a: float(np.sum(np.hypot(*(np.diff(a, axis=0) / scale).T)))
            )
            seg = np.hypot(*(np.diff(longest, axis=0) / scale).T)
            s_at = np.concatenate([[0.0], np.cumsum(seg)])
            frac = 0.5 if n == 1 else 0.25 + 0.5 * j / (n - 1)
            p = np.array([np.interp(frac * s_at[-1], s_at, longest[:, k]) for k in (0, 1)])
            t = ax.text(
                p[0],
                p[1],
                _level_text(level),
                fontsize=7,
                color=colour,
                ha="center",
                va="center",
                zorder=4.3,
                gid=f"pourbaix-label:solubility:{level:g}",
            )
            t.set_bbox(
                dict(boxstyle="round,pad=0.1", facecolor="white", edgecolor="none", alpha=0.8)
            )
    return ax


def draw_solubility_curve(result, ax=None, *, label=None, title=None):
    """Plot log10 total solubility against pH.

    Parameters
    ----------
    result : SolubilityResult
        From :func:`~pourbaix.analyses.solubility.solubility_curve` (one-dimensional).
    ax : matplotlib.axes.Axes, optional
        Axes to draw onto; a new figure is made when None.
    label : str, optional
        Legend text for the curve.
    title : str, optional
        Title; default names the element and the potential.

    Returns
    -------
    matplotlib.axes.Axes
    """
    if ax is None:
        from matplotlib.figure import Figure

        fig = Figure(figsize=(7.0, 4.6))
        ax = fig.add_subplot()
        fig.subplots_adjust(left=0.11, right=0.97, top=0.9, bottom=0.13)
    x = np.ravel(result.ph)
    y = np.ravel(result.log10_total)
    ax.plot(
        x, y, color="#1f3b5c", lw=1.6, label=label or f"total dissolved {result.element}", zorder=3
    )
    lo = float(np.nanmin(y))
    top = (
        min(float(np.nanmax(y)), 1.0) + 0.5
    )  # above ~1 mol/kg no solid forms: the axis stops there
    bottom = max(lo - 1.5, -16.0)
    spm = np.asarray(result.species_molality).reshape(len(x), -1)
    dom = np.ravel(np.asarray(result.dominant, dtype=object))
    labels = result.species_labels or result.species
    for j, name in enumerate(result.species):
        with np.errstate(divide="ignore"):
            ly = np.log10(spm[:, j])
        if not np.any(ly > bottom):
            continue
        ax.plot(x, ly, lw=0.7, ls=(0, (3, 2)), color="#7a7a7a", zorder=2)
        # label where this species carries most of the element (else where it comes closest to the
        # total), within the drawn range
        visible = (ly > bottom) & (ly < top)
        where = np.flatnonzero((dom == name) & visible)
        if not where.size and np.any(visible):
            gap = np.where(visible, y - ly, np.inf)
            where = np.array([int(np.argmin(gap))]) if np.min(gap) < 1.5 else where
        if where.size:
            k = int(where[len(where) // 2])
            ax.annotate(
                labels[j],
                (x[k], ly[k]),
                xytext=(0, -11),
                textcoords="offset points",
                fontsize=7.5,
                color="#444444",
                ha="center",
                va="top",
            )
    k = int(np.nanargmin(y))
    ax.plot([x[k]], [y[k]], marker="o", ms=4.5, color="#1f3b5c", zorder=4)
    ax.annotate(
        f"lowest: pH {x[k]:.2f}, {10 ** y[k]:.2g} mol/kg",
        (x[k], y[k]),
        xytext=(0, 9),
        textcoords="offset points",
        fontsize=8,
        color="#1f3b5c",
        ha="center",
        va="bottom",
    )
    ax.set_ylim(bottom, top)
    ax.set_xlim(float(x.min()), float(x.max()))
    ax.set_xlabel("pH")
    ax.set_ylabel(f"log₁₀ dissolved {result.element} [mol/kg]")
    ax.grid(True, lw=0.4, color="#dddddd")
    if title is None:
        e = np.ravel(result.potential_v)
        where = (
            f"E = {e[0]:+.3f} V vs {result.reference}"
            if np.allclose(e, e[0])
            else f"along a line, vs {result.reference}"
        )
        title = f"Solubility of {result.element} ({where})"
    if title:
        ax.set_title(title, loc="left", fontsize=11)
    ax.legend(loc="upper right", fontsize=8, frameon=False)
    return ax


_TARGET_COLOUR = "#8a2b0d"
_KEEP_COLOUR = "#1d4f2a"


def _add_geometry(ax, geom, **kw):
    """Fill a shapely (Multi)Polygon on matplotlib Axes, holes included."""
    from matplotlib.patches import PathPatch
    from matplotlib.path import Path

    for part in polygon_parts(geom):
        verts, codes = [], []
        for ring in (part.exterior, *part.interiors):
            pts = np.asarray(ring.coords)
            verts += pts.tolist()
            codes += [Path.MOVETO] + [Path.LINETO] * (len(pts) - 2) + [Path.CLOSEPOLY]
        ax.add_patch(PathPatch(Path(verts, codes), **kw))
    return ax


def draw_window(window, ax=None, *, lines=True):
    """Draw a window over the target element's map.

    Parameters
    ----------
    window : LeachWindow
        From :func:`~pourbaix.analyses.windows.leach_window`.
    ax : matplotlib.axes.Axes, optional
        Axes to draw onto; a new figure is made when None.
    lines : bool
        Add the iso-solubility lines of the target at its level and of each
        kept element at its level.

    Returns
    -------
    matplotlib.axes.Axes
    """
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    tmap = window.maps[window.dissolve]
    keep = ", ".join(f"{el} ≤ {window.max_dissolved[el]:g}" for el in window.keep_solid)
    if window.empty:
        title = (
            f"No {window.dissolve} window ({window.dissolve} ≥ {window.min_dissolved:g}"
            + (f"; {keep}" if keep else "")
            + " mol/kg)"
        )
    else:
        title = (
            f"{window.dissolve} window: {window.dissolve} ≥ {window.min_dissolved:g}"
            + (f"; {keep}" if keep else "")
            + " mol/kg"
        )
    ax = draw.draw_map(tmap, ax=ax, title=title)
    handles, names = [], []
    line_style = (0, (6, 2, 1.5, 2))
    basis = "total" if window.basis == "total" else "each species"
    if lines:
        add_solubility_lines(
            ax,
            tmap,
            [window.min_dissolved],
            basis=window.basis,
            colour=_TARGET_COLOUR,
            labels=False,
        )
        handles.append(Line2D([], [], color=_TARGET_COLOUR, lw=0.9, ls=line_style))
        names.append(f"{window.dissolve} dissolved ({basis}) = {window.min_dissolved:g}")
        for el in window.keep_solid:
            add_solubility_lines(
                ax,
                window.maps[el],
                [window.max_dissolved[el]],
                basis=window.basis,
                colour=_KEEP_COLOUR,
                labels=False,
            )
        if window.keep_solid:
            handles.append(Line2D([], [], color=_KEEP_COLOUR, lw=0.9, ls=line_style))
            names.append(
                ", ".join(
                    f"{el} dissolved ({basis}) = {window.max_dissolved[el]:g}"
                    for el in window.keep_solid
                )
            )
    if not window.empty:
        _add_geometry(
            ax,
            window.region,
            facecolor="none",
            edgecolor=_TARGET_COLOUR,
            hatch="////",
            lw=1.6,
            zorder=5,
            gid="pourbaix-window",
        )
        bx, by = window.best_point
        ax.plot(
            [bx],
            [by],
            marker="*",
            ms=11,
            mfc=_TARGET_COLOUR,
            mec="white",
            mew=0.8,
            ls="none",
            zorder=6,
            gid="pourbaix-window-best",
        )
        handles = [
            Patch(facecolor="none", edgecolor=_TARGET_COLOUR, hatch="////"),
            Line2D([], [], marker="*", ms=9, mfc=_TARGET_COLOUR, mec="white", ls="none"),
            *handles,
        ]
        names = ["window", f"most room: pH {bx:.2f}, {by:+.3f} V", *names]
    else:
        ax.text(
            0.5,
            0.5,
            "no window:\n" + "\n".join(typeset_formulas(r) for r in window.reasons),
            transform=ax.transAxes,
            ha="center",
            va="center",
            fontsize=8,
            color=_TARGET_COLOUR,
            zorder=7,
            wrap=True,
            bbox=dict(
                boxstyle="round,pad=0.3", facecolor="white", edgecolor=_TARGET_COLOUR, alpha=0.9
            ),
            gid="pourbaix-window-text",
        )
    if handles:
        ax.legend(
            handles,
            names,
            loc="lower left",
            fontsize=7,
            framealpha=0.92,
            borderpad=0.4,
            handlelength=2.4,
        ).set_zorder(8)
    return ax


def draw_field(dmap, data, ax=None, *, labels=True, reading=False):
    """Draw the map with the readings on it (one path with arrows per site of a time series).

    Parameters
    ----------
    dmap : DomainMap
        The map.
    data : FieldData
        Placed readings (from :func:`~pourbaix.analyses.field.place_readings` or :func:`~pourbaix.analyses.field.field_readings`).
    ax : matplotlib.axes.Axes, optional
        Axes to draw onto; a new figure is made when None.
    labels : bool
        Label each site's path once (by its site name) and each single
        reading by its label (or time, or line number).
    reading : bool
        Shade the corrosion reading on the map.

    Returns
    -------
    matplotlib.axes.Axes
    """
    rows = [r for r in data.rows if r.potential_v_map is not None]
    if len(rows) != len(data.rows):
        raise OptionError("draw_field: place the readings on the map first (place_readings)")
    ax = draw.draw_map(dmap, ax=ax, reading=reading)
    _draw_readings(ax, data, labels)
    return ax


def _draw_readings(ax, data, labels):
    rows = data.rows
    if not rows:
        return
    series = series_of(data)
    in_series = {k for s in series for k in s}
    for s in series:
        # a path per site, labelled once at its last reading
        name = rows[s[-1]].site or rows[s[-1]].label or "readings"
        text = [""] * (len(s) - 1) + [name]
        draw.draw_points(
            ax,
            [rows[k].ph for k in s],
            [rows[k].potential_v_map for k in s],
            labels=text if labels else None,
            path=True,
        )
    singles = [k for k in range(len(rows)) if k not in in_series]
    if singles:
        text = [
            rows[k].label or rows[k].site or rows[k].time or f"line {rows[k].line}" for k in singles
        ]
        draw.draw_points(
            ax,
            [rows[k].ph for k in singles],
            [rows[k].potential_v_map for k in singles],
            labels=text if labels else None,
        )


def draw_field_groups(groups, *, labels=True, reading=False):
    """Draw readings placed on the maps of their own temperatures: one panel per map.

    Parameters
    ----------
    groups : list of (DomainMap, FieldData)
        From :func:`~pourbaix.analyses.field.place_readings_at_temperature`.
    labels, reading : bool
        As for :func:`draw_field`.

    Returns
    -------
    matplotlib.figure.Figure or matplotlib.axes.Axes
        The Axes for one map, else the figure with one panel per map.
    """
    if len(groups) == 1:
        return draw_field(*groups[0], labels=labels, reading=reading)
    plt = load_pyplot()
    ncol = 2
    nrow = math.ceil(len(groups) / ncol)
    w, h = FIGURE_SIZE_IN
    fig, axes = plt.subplots(nrow, ncol, figsize=(w * ncol, (h + 0.6) * nrow), squeeze=False)
    fig.subplots_adjust(left=0.06, right=0.97, top=0.95, bottom=0.11, hspace=0.62, wspace=0.22)
    # every site's whole series, faint on each panel, so a site reads as one path across the maps
    everything = replace(groups[0][1], rows=[r for _, d in groups for r in d.rows])
    order = sorted(range(len(everything.rows)), key=lambda k: everything.rows[k].line)
    everything = replace(everything, rows=[everything.rows[k] for k in order])
    for ax, (dmap, data) in zip(axes.ravel(), groups, strict=False):
        draw.draw_map(dmap, ax=ax, reading=reading, caption=False)
        for s in series_of(everything):
            ax.plot(
                [everything.rows[k].ph for k in s],
                [everything.rows[k].potential_v_map for k in s],
                color="#8a8a8a",
                lw=0.9,
                ls=(0, (3, 2)),
                marker="D",
                ms=3.0,
                mfc="#d9d9d9",
                mec="#8a8a8a",
                zorder=9,
                gid="pourbaix-series-context",
            )
        _draw_readings(ax, data, labels)
    for ax in axes.ravel()[len(groups) :]:
        ax.set_visible(False)
    temps = ", ".join(f"{d.conditions.temperature_c:g}" for d, _ in groups)
    fig.text(
        0.06,
        0.015,
        f"Each reading is placed on the map at its own temperature ({temps} °C); grey dashed: "
        "each site's whole series. A map is a thermodynamic prediction.",
        fontsize=8,
        color="#3a3a3a",
    )
    return fig


def draw_comparison(comparison, ax=None):
    """Overlay the two maps' boundaries (``pourbaix.plot.draw.draw_overlay``).

    Parameters
    ----------
    comparison : MapComparison
        From :func:`~pourbaix.analyses.compare.compare_maps`.
    ax : matplotlib.axes.Axes, optional
        Axes to draw onto; a new figure is made when None.

    Returns
    -------
    matplotlib.axes.Axes
    """
    return draw.draw_overlay(
        [comparison.map_a, comparison.map_b], ax=ax, labels=[comparison.label_a, comparison.label_b]
    )
