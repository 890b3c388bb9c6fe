"""Public drawing functions: a map, an overlay of maps, field points, saving a figure."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np

from pourbaix.errors import ConditionsError, OptionError
from pourbaix.plot.labels import (
    Placer,
    draw_key,
    label_domains,
    label_line,
    label_neutral,
    label_pending,
    label_points,
    needs_numbers,
    number_pending,
    readable_pending,
)
from pourbaix.plot.layers import (
    add_caption,
    bottom_band,
    bottom_legend,
    domain_colours,
    draw_boundaries,
    draw_water,
    fill_domains,
    legend_height_pt,
    neutral_ph_in_window,
    water_segments,
)
from pourbaix.plot.style import (
    CAPTION_LINE_PT,
    CAPTION_SIZE,
    FIGURE_FORMATS,
    HATCH,
    INK,
    OVERLAY_STYLES,
    READING_CAUTION,
    STATE_NAMES,
    activity_text,
    caption_lines,
    fit_bottom,
    get_renderer,
    new_axes,
    pack_caption,
    power_text,
    second_axis,
    second_shift,
    style_axes,
    system_text,
    title_y,
)

__all__ = ["draw_map", "draw_overlay", "draw_points", "save_figure"]


# ------------------------------------------------------------------ public
def draw_map(
    dmap,
    ax=None,
    *,
    reading=False,
    second_reference=None,
    caption=True,
    water=True,
    labels=True,
    palette="default",
    title=None,
    notes=(),
):
    """Draw a potential-pH map: filled domains, labels, boundaries, water lines, caption.

    Parameters
    ----------
    dmap : DomainMap
        The map to draw (potentials vs its own reference).
    ax : matplotlib.axes.Axes, optional
        Axes to draw onto; a new figure of :data:`~pourbaix.plot.style.FIGURE_SIZE_IN` is made when None.
    reading : bool
        Add the corrosion reading: hatching on corrosion domains, a legend of
        the three states and the caution that passivation is thermodynamic only.
    second_reference : str, optional
        Name of a reference electrode for a second potential axis on the
        right, e.g. ``"SCE"`` (must not depend on pH).
    caption : bool
        Add the caption of conditions below the axes.
    water : bool
        Draw and label the two water lines and mark neutral pH.
    labels : bool
        Label the domains.
    palette : str or dict
        ``"default"`` or ``"grey"``, or a dict of tints per state
        (``corrosion``, ``passivation``, ``immunity``; optional ``hatch``).
    title : str or False, optional
        Title; None gives the element system, False or "" gives none.
    notes : sequence of str
        Extra lines for the caption (e.g. why the window was widened).

    Returns
    -------
    matplotlib.axes.Axes
        The Axes drawn on.

    Raises
    ------
    OptionError
        For an unknown palette or reference, or a pH-dependent second reference.

    Notes
    -----
    Labels are placed after the axes are laid out, in display units: a label
    goes at the domain's interior pole if its text box fits inside the
    polygon (else elsewhere inside, else in a smaller size), otherwise outside
    in a white box with a leader line, at the nearest free position. Resize
    the figure before drawing, not after, to keep that placement.

    Examples
    --------
    >>> from pourbaix import compute_map
    >>> ax = draw_map(compute_map("Cu"), second_reference="SCE")
    >>> ax.get_ylabel()
    'E / V vs SHE'
    """
    # check every choice before anything is drawn
    colours, pal = domain_colours(dmap, palette)
    second = second_shift(dmap, second_reference) if second_reference else None
    own = ax is None
    c = dmap.conditions
    extra = [str(n) for n in notes] + ([READING_CAUTION] if reading else [])
    if own:
        fig, ax = new_axes()
        right = 0.885 if second_reference else 0.965
        width_pt = (right - 0.105) * fig.get_figwidth() * 72.0
        cap = caption_lines(c, extra, dmap, width_pt) if caption else []
        fit_bottom(fig, 44 + 18 + CAPTION_LINE_PT * len(cap) + 6, right=right)
    else:
        width_pt = ax.get_position().width * ax.figure.get_figwidth() * 72.0
        cap = caption_lines(c, extra, dmap, width_pt) if caption else []
    fig = ax.figure
    style_axes(ax, (*c.ph_range, *c.potential_range_v), c.reference)
    fill_domains(ax, dmap, colours, pal, reading=reading)
    draw_boundaries(ax, dmap)
    if second is not None:
        second_axis(ax, *second)
    neutral = neutral_ph_in_window(dmap) if water else None
    if water:
        draw_water(ax, dmap, colour=pal["water"])
        if neutral is not None:
            ax.axvline(
                neutral,
                color="#4a4a4a",
                lw=0.7,
                ls=(0, (1, 2.2)),
                zorder=2.2,
                gid="pourbaix-neutral",
            )
    if title is None:
        ax.set_title(
            system_text(c),
            loc="left",
            fontsize=12.5,
            fontweight="bold",
            color=INK,
            pad=8,
            y=title_y(ax),
        )
        ax.set_title(
            f"{c.temperature_c:g} °C  ·  {activity_text(c, dmap)}",
            loc="right",
            fontsize=9,
            color="#4a4a4a",
            pad=8,
            y=title_y(ax),
        )
    elif title:
        ax.set_title(
            title, loc="left", fontsize=12.5, fontweight="bold", color=INK, pad=8, y=title_y(ax)
        )
    # legend and caption first, so a layout engine makes room for them before labels are placed
    renderer = get_renderer(fig, layout=False)
    offset = bottom_band(ax, renderer)
    leg = _state_legend(ax, dmap, pal, offset, reading=reading, water=water, neutral=neutral)
    offset += legend_height_pt(leg, renderer) + 5
    if cap:
        text = add_caption(ax, cap, offset)
        offset += text.get_window_extent(renderer).height * 72.0 / fig.dpi
    if own:  # make room for what was measured below the axes
        fit_bottom(fig, offset + 8, right=right)
    renderer = get_renderer(fig, reuse=renderer)
    _fit_titles_and_label(ax, renderer, grow=own)
    renderer = get_renderer(fig, reuse=renderer)
    if labels:
        soft = []
        if water:
            soft = [tuple(map(tuple, ax.transData.transform(seg))) for seg in water_segments(dmap)]
            if neutral is not None:
                soft.append(
                    tuple(
                        map(
                            tuple,
                            ax.transData.transform(
                                [
                                    (neutral, c.potential_range_v[0]),
                                    (neutral, c.potential_range_v[1]),
                                ]
                            ),
                        )
                    )
                )
        placer, pending, polys_px, poles_px = label_domains(
            ax, dmap, renderer, colours, soft_lines=soft
        )
    else:
        placer, pending, polys_px, poles_px = Placer(ax, renderer), [], [], []
    placer.add_lines([(b.start, b.end) for b in dmap.boundaries])
    if labels:
        placer.soft_lines = list(soft)
    if neutral is not None:
        placer.add_lines([((neutral, c.potential_range_v[0]), (neutral, c.potential_range_v[1]))])
    if water:
        texts = {"oxygen": "O₂/H₂O", "hydrogen": "H₂O/H₂"}
        for key, above in (("oxygen", True), ("hydrogen", False)):
            if key in dmap.water:
                e0, s = dmap.water[key]
                label_line(
                    ax,
                    placer,
                    texts[key],
                    e0,
                    s,
                    colour=pal["water"],
                    above=above,
                    gid=f"pourbaix-label:water:{key}",
                )
        if neutral is not None:
            placer.lines.pop()  # its own line does not count against the neutral note
            label_neutral(ax, placer, neutral)
    if labels:
        if needs_numbers(ax, dmap, placer, pending):
            shown, hidden = readable_pending(dmap, pending, polys_px, placer.px_per_pt)
            numbers = number_pending(ax, dmap, placer, shown, polys_px, poles_px)
            draw_key(ax, dmap, numbers, renderer, grow=own, unlabelled=len(hidden))
        else:
            label_pending(ax, dmap, placer, pending, polys_px, poles_px)
    return ax


_TITLE_GAP_PT = 6.0  # [pt] least gap between the title and the subtitle on one line
_EDGE_PT = 3.0  # [pt] least margin between the y-axis label and the figure's left edge


def _fit_titles_and_label(ax, renderer, *, grow):
    """Keep the title clear of the subtitle and the y-axis label on the figure.

    A subtitle (right-hand title) that would run into the title moves onto a
    line of its own below it, and the title moves up above it; a y-axis label
    (a long reference name) that would run off the left edge moves the axes
    right. With ``grow`` (a figure of our own) the figure grows by the room
    needed, so the axes keep their size in inches; on a user's axes only the
    titles are stacked.
    """
    fig = ax.figure
    ppt = fig.dpi / 72.0
    extra_top_pt = 0.0
    left_title, right_title = ax._left_title, ax._right_title
    if left_title.get_text() and right_title.get_text():
        a = left_title.get_window_extent(renderer)
        b = right_title.get_window_extent(renderer)
        if a.x1 + _TITLE_GAP_PT * ppt > b.x0:
            right_title.set_horizontalalignment("left")
            right_title.set_x(0.0)
            extra_top_pt = b.height / ppt + 3.0
            base = left_title.get_position()[1] if title_y(ax) is not None else 1.0
            left_title.set_y(base + extra_top_pt * ppt / max(ax.bbox.height, 1.0))
    short_pt = 0.0
    if ax.yaxis.label.get_text():
        # the axis's tight box places the label beside the tick labels first
        x0_pt = ax.yaxis.get_tightbbox(renderer).x0 / ppt
        short_pt = max(_EDGE_PT - x0_pt, 0.0)
    if not grow or (extra_top_pt == 0.0 and short_pt == 0.0):
        return
    w, h = fig.get_size_inches()
    sp = fig.subplotpars
    new_w, new_h = w + short_pt / 72.0, h + extra_top_pt / 72.0
    fig.set_size_inches(new_w, new_h)
    fig.subplots_adjust(
        left=(sp.left * w + short_pt / 72.0) / new_w,
        right=(sp.right * w + short_pt / 72.0) / new_w,
        bottom=sp.bottom * h / new_h,
        top=sp.top * h / new_h,
    )


def _state_legend(ax, dmap, pal, offset_pt, *, reading, water, neutral):
    """Legend below the axes: the states shown on the map, the water lines and neutral pH."""
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    shown = {d.state for d in dmap.domains}
    states = [s for s in ("immunity", "passivation", "corrosion") if s in shown or reading]
    handles = [
        Patch(
            facecolor=pal[s][0],
            edgecolor=INK,
            linewidth=0.5,
            hatch=HATCH[s] if reading and HATCH[s] else None,
        )
        for s in states
    ]
    # the reading spells the states out; a plain map keeps the legend to one row
    texts = [STATE_NAMES[s] if reading else s for s in states]
    if water and dmap.water:
        handles.append(Line2D([], [], color=pal["water"], lw=1.1, ls=(0, (5, 3))))
        texts.append("water stable between the dashed lines" if reading else "water limits")
    if neutral is not None:
        handles.append(Line2D([], [], color="#4a4a4a", lw=0.7, ls=(0, (1, 2.2))))
        texts.append(f"neutral pH {neutral:.2f}")
    return bottom_legend(ax, handles, texts, offset_pt, title=None, ncol=len(handles))


def _condition_labels(maps):
    """Legend text per map from the conditions that differ between them."""
    cs = [m.conditions for m in maps]

    def differs(get):
        vals = [get(c) for c in cs]
        return any(v != vals[0] for v in vals[1:])

    parts = [[] for _ in maps]
    if differs(lambda c: c.temperature_c):
        for p, c in zip(parts, cs, strict=True):
            p.append(f"{c.temperature_c:g} °C")
    if differs(lambda c: round(c.pressure_bar, 6)) and not differs(lambda c: c.temperature_c):
        for p, c in zip(parts, cs, strict=True):
            p.append(f"{c.pressure_bar:.4g} bar")
    if differs(lambda c: (c.activity, c.molality)):
        for p, c in zip(parts, cs, strict=True):
            p.append(
                f"{power_text(c.molality)} mol/kg"
                if c.molality is not None
                else f"activity {power_text(c.activity)}"
            )
    if differs(lambda c: c.ionic_strength):
        for p, c in zip(parts, cs, strict=True):
            p.append(f"I = {c.ionic_strength:g}")
    if differs(lambda c: (c.dataset, tuple(c.data_files))):
        for p, c in zip(parts, cs, strict=True):
            p.append(
                f"data set {c.dataset}"
                + (" + " + ", ".join(Path(f).name for f in c.data_files) if c.data_files else "")
            )
    if differs(lambda c: dict(c.ligands)):
        for p, c in zip(parts, cs, strict=True):
            p.append(
                ", ".join(f"{k} {power_text(v)}" for k, v in c.ligands.items()) or "no ligands"
            )
    if differs(lambda c: c.elements):
        for p, c in zip(parts, cs, strict=True):
            p.append(system_text(c))
    return [", ".join(p) if p else f"map {k + 1}" for k, p in enumerate(parts)]


def draw_overlay(maps, ax=None, *, labels=None, caption=True):
    """Overlay the boundaries of several maps, one line style per map.

    For sweeps over temperature or activity, or two data sets: the first
    map's domains are shaded and labelled lightly, every map's boundaries
    and water lines are drawn in its own style, and a legend names each
    condition.

    Parameters
    ----------
    maps : sequence of DomainMap
        Two to six maps vs the same reference electrode.
    ax : matplotlib.axes.Axes, optional
        Axes to draw onto; a new figure is made when None.
    labels : sequence of str, optional
        Legend text per map; by default built from the conditions that differ.
    caption : bool
        Add the caption of the conditions the maps share.

    Returns
    -------
    matplotlib.axes.Axes

    Raises
    ------
    OptionError
        For fewer than one or more than six maps, mismatched labels, or maps
        drawn vs different references.

    Examples
    --------
    >>> from pourbaix import compute_sweep
    >>> ax = draw_overlay(compute_sweep("Zn", activities=[1e-6, 1e-4]))
    >>> [t.get_text() for t in ax.get_legend().get_texts()]
    ['activity 10⁻⁶', 'activity 10⁻⁴']
    """
    maps = list(maps)
    if not 1 <= len(maps) <= len(OVERLAY_STYLES):
        raise OptionError(f"draw_overlay takes 1 to {len(OVERLAY_STYLES)} maps, got {len(maps)}")
    refs = {
        (
            m.conditions.reference,
            round(m.conditions.reference_offset_v, 9),
            m.conditions.reference_slope_v_per_ph,
        )
        for m in maps
    }
    if len(refs) > 1:
        names = ", ".join(sorted({r[0] for r in refs}))
        raise OptionError(
            f"maps in an overlay must be drawn vs one reference electrode; got {names}"
        )
    if labels is None:
        labels = _condition_labels(maps)
    else:
        labels = [str(s) for s in labels]
        if len(labels) != len(maps):
            raise OptionError(f"labels: give one per map ({len(maps)}), got {len(labels)}")
    own = ax is None
    if own:
        fig, ax = new_axes()
        width_pt = (0.965 - 0.105) * fig.get_figwidth() * 72.0
        cap = pack_caption(_shared_caption(maps, labels), width_pt, CAPTION_SIZE) if caption else []
        rows = math.ceil(len(maps) / 4)
        fit_bottom(fig, 44 + 18 * rows + 4 + CAPTION_LINE_PT * len(cap) + 6, right=0.965)
    else:
        width_pt = ax.get_position().width * ax.figure.get_figwidth() * 72.0
        cap = pack_caption(_shared_caption(maps, labels), width_pt, CAPTION_SIZE) if caption else []
    fig = ax.figure
    first = maps[0]
    c = first.conditions
    x0 = min(m.conditions.ph_range[0] for m in maps)
    x1 = max(m.conditions.ph_range[1] for m in maps)
    y0 = min(m.conditions.potential_range_v[0] for m in maps)
    y1 = max(m.conditions.potential_range_v[1] for m in maps)
    style_axes(ax, (x0, x1, y0, y1), c.reference)
    colours, pal = domain_colours(first, "default")
    fill_domains(ax, first, colours, pal, alpha=0.45)
    from matplotlib.lines import Line2D

    handles = []
    one_water = _same_water(maps)
    if one_water:
        draw_water(ax, first, colour="#4d4d4d", lw=0.9, ls=(0, (1.2, 2.2)))
    for k, m in enumerate(maps):
        colour, ls, lw = OVERLAY_STYLES[k]
        draw_boundaries(ax, m, colour=colour, lw=lw, ls=ls, zorder=3.0 + 0.1 * (len(maps) - k))
        if not one_water:
            draw_water(ax, m, colour=colour, lw=0.8, ls=(0, (2, 2.5)), zorder=2.4)
        handles.append(Line2D([], [], color=colour, ls=ls, lw=lw))
    ax.set_title(
        system_text(c),
        loc="left",
        fontsize=12.5,
        fontweight="bold",
        color=INK,
        pad=8,
        y=title_y(ax),
    )
    ax.set_title(
        f"boundaries of {len(maps)} maps overlaid",
        loc="right",
        fontsize=9,
        color="#4a4a4a",
        pad=8,
        y=title_y(ax),
    )
    renderer = get_renderer(fig, layout=False)
    offset = bottom_band(ax, renderer)
    leg = bottom_legend(ax, handles, labels, offset, ncol=min(len(maps), 4))
    offset += legend_height_pt(leg, renderer) + 5
    if cap:
        add_caption(ax, cap, offset)
    renderer = get_renderer(fig, reuse=renderer)
    soft = []
    for m in maps:
        segs = water_segments(m) + ([] if m is first else [[b.start, b.end] for b in m.boundaries])
        soft += [tuple(map(tuple, ax.transData.transform(seg))) for seg in segs]
    placer, pending, polys_px, poles_px = label_domains(
        ax, first, renderer, colours, light=True, soft_lines=soft
    )
    if one_water:
        placer.add_lines([(b.start, b.end) for m in maps for b in m.boundaries])
        texts = {"oxygen": "O₂/H₂O", "hydrogen": "H₂O/H₂"}
        for key, above in (("oxygen", True), ("hydrogen", False)):
            if key in first.water:
                e0, sl = first.water[key]
                label_line(
                    ax,
                    placer,
                    texts[key],
                    e0,
                    sl,
                    colour="#3a3a3a",
                    size=7.5,
                    above=above,
                    gid=f"pourbaix-label:water:{key}",
                )
    label_pending(ax, first, placer, pending, polys_px, poles_px, light=True)
    return ax


def _same_water(maps):
    """Tell whether every map has the same water lines (within 0.1 mV)."""
    ref = maps[0].water
    return all(
        set(m.water) == set(ref)
        and all(abs(a - b) < 1e-4 for k in ref for a, b in zip(m.water[k], ref[k], strict=True))
        for m in maps[1:]
    )


def _shared_caption(maps, labels):
    """Caption of an overlay as logical lines of parts: what the maps share, and how to read it."""
    cs = [m.conditions for m in maps]
    c = cs[0]

    def same(get):
        return all(get(x) == get(c) for x in cs[1:])

    shared = [system_text(c)]
    if same(lambda x: x.temperature_c):
        shared.append(f"{c.temperature_c:g} °C")
    if same(lambda x: round(x.pressure_bar, 6)):
        shared.append(f"{c.pressure_bar:.4g} bar")
    if same(lambda x: (x.activity, x.molality)):
        shared.append(activity_text(c))
    if same(lambda x: x.ionic_strength):
        if c.ionic_strength:
            model = f", {c.activity_model} model" if c.activity_model else ""
            shared.append(f"I = {c.ionic_strength:g} mol/kg{model}")
        else:
            shared.append("I = 0")
    if same(lambda x: (x.dataset, tuple(x.data_files))):
        shared.append(f"data set: {c.dataset}")
    shared.append(f"potentials vs {c.reference}")
    n_warn = sum(len(m.warnings) for m in maps)
    lines = [
        shared,
        [
            f"Shading and labels: {labels[0]}.",
            "Grey dotted: the water lines, the same for every map."
            if _same_water(maps)
            else "Dotted lines in each map's colour: the water lines at that map's conditions.",
        ],
    ]
    if n_warn:
        lines.append(
            [
                f"{n_warn} warning{'s' if n_warn > 1 else ''} with these maps (data routes, model limits): see each map's warnings."
            ]
        )
    return lines


def draw_points(ax, ph, potential_v, labels=None, path=False, **style):
    """Draw measured field points on a map.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes of a map (from :func:`draw_map`).
    ph : float or array_like
        Measured pH values.
    potential_v : float or array_like
        Measured potentials, already converted to the map's reference [V vs the map's reference].
    labels : sequence of str, optional
        A short label per point (sample name or date).
    path : bool
        Join the points in order with arrows (a time series).
    **style
        Marker style passed to ``Axes.plot`` (e.g. ``marker="o"``, ``color="k"``).

    Returns
    -------
    matplotlib.axes.Axes

    Raises
    ------
    ConditionsError
        If a value is not a finite number, or pH and potentials differ in length.
    OptionError
        If the number of labels does not match the points.

    Examples
    --------
    >>> from pourbaix import compute_map
    >>> ax = draw_map(compute_map("Fe"))
    >>> ax = draw_points(ax, [6.8, 7.4], [-0.55, -0.3], labels=["May", "June"], path=True)
    """
    x = np.atleast_1d(np.asarray(ph, dtype=float)).ravel()
    y = np.atleast_1d(np.asarray(potential_v, dtype=float)).ravel()
    if x.shape != y.shape:
        raise ConditionsError(
            f"draw_points: {x.size} pH values but {y.size} potentials; give one of each per point"
        )
    bad = np.flatnonzero(~(np.isfinite(x) & np.isfinite(y)))
    if bad.size:
        raise ConditionsError(
            f"draw_points: point {int(bad[0]) + 1} is not a finite (pH, potential) pair"
        )
    if labels is not None:
        labels = [str(s) for s in labels]
        if len(labels) != x.size:
            raise OptionError(
                f"draw_points: {len(labels)} labels for {x.size} points; give one per point"
            )
    kw = dict(
        marker="D",
        ms=5.5,
        mfc="white",
        mec="#111111",
        mew=1.1,
        ls="none",
        zorder=10,
        gid="pourbaix-points",
    )
    kw.update(style)
    ax.plot(x, y, **kw)
    if path and x.size > 1:
        colour = kw.get("mec", kw.get("color", "#111111"))
        for k in range(x.size - 1):
            ax.annotate(
                "",
                xy=(x[k + 1], y[k + 1]),
                xytext=(x[k], y[k]),
                arrowprops=dict(
                    arrowstyle="-|>,head_length=0.45,head_width=0.22",
                    color=colour,
                    lw=0.9,
                    shrinkA=4.5,
                    shrinkB=4.5,
                ),
                zorder=9.5,
                gid="pourbaix-path",
            )
    if labels:
        label_points(ax, x, y, labels)
    return ax


def save_figure(fig_or_ax, path, dpi=200):
    """Save a figure as PNG, SVG or PDF (chosen by the extension), atomically.

    Parameters
    ----------
    fig_or_ax : matplotlib.figure.Figure or matplotlib.axes.Axes
        The figure, or any Axes on it.
    path : str or Path
        Destination; ``.png``, ``.svg`` or ``.pdf``.
    dpi : float
        Resolution for PNG [dots per inch].

    Returns
    -------
    str or Path
        ``path``, as given.

    Raises
    ------
    OptionError
        For an extension other than .png, .svg, .pdf.
    ExportError
        If the folder is missing or not writable; no partial file is left.

    Examples
    --------
    >>> import tempfile, os
    >>> from pourbaix import compute_map
    >>> ax = draw_map(compute_map("Zn"))
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     path = save_figure(ax, os.path.join(folder, "zn.svg"))
    ...     os.path.getsize(path) > 0
    True
    """
    from pourbaix.outputs import atomic_write_with

    ext = Path(path).suffix.lower()
    if ext not in FIGURE_FORMATS:
        raise OptionError(
            f"cannot save a figure as {Path(path).name!r}: the extension must be one of {', '.join(FIGURE_FORMATS)}"
        )
    fig = getattr(fig_or_ax, "figure", None) if not hasattr(fig_or_ax, "savefig") else fig_or_ax
    if fig is None or not hasattr(fig, "savefig"):
        raise OptionError(
            f"save_figure needs a matplotlib Figure or Axes, got {type(fig_or_ax).__name__}"
        )
    fmt = FIGURE_FORMATS[ext]
    # PNG: zlib level 3 compresses these flat-coloured figures as small as the default
    # level 6 does, in less time (benchmarks/bench_draw.py)
    extra = {"pil_kwargs": {"compress_level": 3}} if fmt == "png" else {}
    atomic_write_with(
        path, lambda tmp: fig.savefig(tmp, dpi=dpi, format=fmt, facecolor="white", **extra)
    )
    return path
