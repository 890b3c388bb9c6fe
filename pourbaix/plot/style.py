"""Look of the figures: palettes, sizes, typeset text, captions, axes and the second potential axis.

matplotlib is imported inside the functions, never when this module is imported.

Visual style (our own): domains are filled by state, with lightness that
separates the three families even in greyscale and hues that stay apart for
colour-blind readers -- corrosion in light sand tints, passivation in mid
blue tints, immunity in darker slate greys. Boundaries are thin dark lines,
the water lines dark blue and dashed.
"""

from __future__ import annotations

import math
import os
import re
import sys
import warnings
from pathlib import Path

from pourbaix.errors import OptionError
from pourbaix.tables.formula import TO_SUPERSCRIPT

__all__ = [
    "text_width_pt",
    "typeset_formulas",
    "BOX_PAD_PT",
    "CAPTION_COLOUR",
    "CAPTION_LINE_PT",
    "CAPTION_SIZE",
    "FIGURE_FORMATS",
    "HATCH",
    "INK",
    "LABEL_SIZE",
    "OVERLAY_STYLES",
    "READING_CAUTION",
    "SMALL_LABEL_SIZE",
    "STATE_NAMES",
    "WATER_COLOUR",
    "activity_text",
    "caption_lines",
    "fit_bottom",
    "get_renderer",
    "new_axes",
    "pack_caption",
    "power_text",
    "resolve_palette",
    "second_axis",
    "second_shift",
    "style_axes",
    "system_text",
    "title_y",
    "FIGURE_SIZE_IN",
    "PALETTES",
    "load_pyplot",
]


#: Default size of a new figure [in].
FIGURE_SIZE_IN = (7.0, 5.5)

#: Fill tints per state family. Lightness separates the families (corrosion
#: lightest, immunity darkest) so a greyscale print still reads; within a
#: family the tints differ slightly so neighbouring domains of one state stay
#: distinct. Hues: warm sand vs mid blue vs neutral slate (apart for the
#: common colour-vision deficiencies).
PALETTES = {
    "default": {
        "corrosion": ("#fbedd7", "#f7e3c2", "#fdf4e6", "#f5dcb4", "#faead0"),
        "passivation": ("#b8d0e6", "#a9c5df", "#a6c8d8", "#9fbfdc", "#b0cae2"),
        "immunity": ("#98a1ab", "#8d97a2", "#a2aab3"),
        "hatch": "#8a6a3c",
        "water": "#1d4f91",
    },
    "grey": {
        "corrosion": ("#f3f3f3", "#ebebeb", "#f8f8f8", "#e6e6e6", "#efefef"),
        "passivation": ("#c9c9c9", "#bebebe", "#d2d2d2", "#b8b8b8", "#c4c4c4"),
        "immunity": ("#9a9a9a", "#919191", "#a3a3a3"),
        "hatch": "#555555",
        "water": "#262626",
    },
}

STATE_NAMES = {
    "immunity": "immunity (metal stable)",
    "passivation": "passivation (solid stable)",
    "corrosion": "corrosion (dissolved)",
}
READING_CAUTION = "Passivation = a solid is stable; whether it protects is a kinetic question."
HATCH = {"corrosion": "////", "passivation": None, "immunity": None}

INK = "#1f1f1f"  # boundaries, frame, labels
WATER_COLOUR = "#1d4f91"
CAPTION_COLOUR = "#3a3a3a"
LABEL_SIZE = 10.0  # [pt] label inside its domain
SMALL_LABEL_SIZE = 8.5  # [pt] second try inside, and labels placed outside
BOX_PAD_PT = 2.0  # [pt] clearance kept around every label box

# Line styles of an overlay, one per map (colour-blind-safe hues, distinct dashes).
OVERLAY_STYLES = (
    ("#1a1a1a", "-", 1.4),
    ("#0a6ab0", (0, (6, 2.5)), 1.4),
    ("#c65a00", (0, (7, 2, 1.5, 2)), 1.4),
    ("#3b8a3a", (0, (1.5, 1.8)), 1.7),
    ("#8b3d9e", (0, (10, 2.5, 2, 2.5, 2, 2.5)), 1.4),
    ("#6b6b6b", (0, (3, 3)), 1.4),
)

FIGURE_FORMATS = {".png": "png", ".svg": "svg", ".pdf": "pdf"}


# ---------------------------------------------------------------- matplotlib
def load_pyplot():
    """Import pyplot, choosing the Agg backend only if the user chose none."""
    import matplotlib

    if "matplotlib.pyplot" not in sys.modules and not os.environ.get("MPLBACKEND"):
        chosen = getattr(matplotlib.rcParams, "_get_backend_or_none", lambda: "unknown")()
        if chosen is None:
            matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt


def new_axes(figsize=FIGURE_SIZE_IN):
    """A new figure and axes of the given size [in]."""
    plt = load_pyplot()
    fig, ax = plt.subplots(figsize=figsize)
    return fig, ax


def fit_bottom(fig, bottom_pt, right=None):
    """Set a new figure's margins; a taller bottom band grows the figure, not shrinks the map."""
    base_pt = 44 + _LEGEND_ROW_PT + 2 * CAPTION_LINE_PT + 6  # a legend row, two caption lines
    bottom_pt = max(bottom_pt, base_pt)  # the map keeps one height whatever sits below it
    w = fig.get_size_inches()[0]
    h = FIGURE_SIZE_IN[1] + (bottom_pt - base_pt) / 72.0
    fig.set_size_inches(w, h)
    top_pt = (1 - 0.925) * FIGURE_SIZE_IN[1] * 72.0
    kw = {} if right is None else {"right": right}
    fig.subplots_adjust(left=0.105, top=1 - top_pt / 72.0 / h, bottom=bottom_pt / 72.0 / h, **kw)


def get_renderer(fig, layout=True, reuse=None):
    """The figure's renderer, after the layout engine (if any) placed the axes.

    ``reuse`` is a renderer taken earlier in the same drawing: it is returned
    again while the figure keeps its dpi. Text sizes depend on the dpi only,
    not on the figure's size, and matplotlib keeps its cache of measured texts
    per renderer, so a figure that grows while it is laid out (room for the
    caption, the key) has its texts measured once rather than once per size.
    """
    if layout and fig.get_layout_engine() is not None:
        fig.draw_without_rendering()  # let the layout engine place the axes first
    if reuse is not None and getattr(reuse, "dpi", None) == fig.dpi:
        return reuse
    get = getattr(fig.canvas, "get_renderer", None)
    return get() if get is not None else fig._get_renderer()


def resolve_palette(name):
    """Tints per state for a palette name or dict; OptionError lists the valid names."""
    if isinstance(name, dict):
        missing = [k for k in ("corrosion", "passivation", "immunity") if k not in name]
        if missing:
            raise OptionError(
                f"palette dict lacks {', '.join(missing)}; give colours for corrosion, passivation, immunity"
            )
        return {"hatch": INK, "water": WATER_COLOUR, **name}
    try:
        return PALETTES[name]
    except (KeyError, TypeError):
        raise OptionError(f"unknown palette {name!r}; valid: {', '.join(PALETTES)}") from None


# ------------------------------------------------------------------ text
def power_text(x):
    """Format a number with a Unicode power of ten: 1e-06 -> 10⁻⁶, 2.5e-05 -> 2.5×10⁻⁵, 0.5 -> 0.5."""
    x = float(x)
    if x == 0 or (1e-2 <= abs(x) < 1e4):
        return f"{x:g}"
    exp = math.floor(math.log10(abs(x)))
    mant = x / 10**exp
    power = "10" + str(exp).translate(TO_SUPERSCRIPT)
    if abs(mant - round(mant)) < 1e-9 and round(mant) == 1:
        return power
    return f"{mant:.3g}×{power}"


def system_text(c):
    """Element system as text, e.g. ``Cu–S–H₂O`` or ``Cu–NH₃–H₂O``."""
    els = "–".join(c.elements)
    lig = "".join(f"–{k}" for k in (c.ligands or {}))
    text = typeset_formulas(f"{els}{lig}–H₂O")
    if c.ratio is not None and len(c.elements) > 1:
        text += " (" + ":".join(f"{r:g}" for r in c.ratio) + ")"
    return text


def activity_text(c, dmap=None):
    """Dissolved amount of the map's elements as text (the totals of a mass-balanced map)."""
    totals = getattr(dmap, "totals", None)
    if totals:
        return (
            "totals: "
            + ", ".join(f"{typeset_formulas(k)} {power_text(v)}" for k, v in totals.items())
            + " mol/kg"
        )
    what = "dissolved " + ", ".join(c.elements)
    if c.molality is not None:
        return f"{what}: {power_text(c.molality)} mol/kg"
    if c.activity is not None:
        return f"{what}: activity {power_text(c.activity)}"
    return what


def _caption_parts(c, extra=(), dmap=None):
    """Caption of a map as logical lines, each a list of parts joined by a middle dot."""
    first = [
        system_text(c),
        f"{c.temperature_c:g} °C",
        f"{c.pressure_bar:.4g} bar",
        activity_text(c, dmap),
    ]
    if getattr(dmap, "criterion", None):
        first.append("mass balance")
    elif c.ligands:
        first.append(
            "ligands (total activity): "
            + ", ".join(f"{k} {power_text(v)}" for k, v in c.ligands.items())
        )
    if c.ratio is not None and len(c.elements) > 1:
        first.append("ratio " + ":".join(f"{r:g}" for r in c.ratio))
    second = []
    if c.ionic_strength and c.ionic_strength > 0:
        model = f", {c.activity_model} model" if c.activity_model else ""
        second.append(f"I = {c.ionic_strength:g} mol/kg{model}")
    else:
        second.append("I = 0")
    if c.water_activity != 1.0:
        second.append(f"water activity {c.water_activity:g}")
    ds = f"data set: {c.dataset}"
    if c.data_files:
        ds += " + " + ", ".join(Path(p).name for p in c.data_files)
    second.append(ds)
    second.append(f"potentials vs {c.reference}")
    lines = [first, second]
    if dmap is not None and c.temperature_c != 25.0:
        routes = {}
        for se in getattr(dmap, "species", ()):
            route = getattr(se, "route", None)
            if route and route != "IAPWS-95":
                routes[route] = routes.get(route, 0) + 1
        if routes:
            lines.append(
                [
                    f"ΔG at {c.temperature_c:g} °C from: "
                    + "; ".join(f"{r} ×{n}" for r, n in routes.items())
                ]
            )
    warns = list(getattr(dmap, "warnings", ()) or ()) if dmap is not None else []
    for n, w in enumerate(warns[:_CAPTION_WARNINGS]):
        w = typeset_formulas(str(w))
        if len(w) > _CAPTION_WARNING_CHARS:
            w = w[: _CAPTION_WARNING_CHARS - 2].rsplit(" ", 1)[0].rstrip(" ,;:") + " …"
        more = len(warns) - _CAPTION_WARNINGS
        tail = (
            f" (+{more} more: the map's warnings)"
            if n == _CAPTION_WARNINGS - 1 and more > 0
            else ""
        )
        lines.append([f"Warning: {w}{tail}"])
    if getattr(dmap, "criterion", None):
        lines.append([f"Domains: {dmap.criterion}"])
    lines += [[e] for e in extra]
    return lines


def text_width_pt(text, fontsize):
    """Width of a line of text in the figures' font [pt] (measured from the font's glyph metrics)."""
    from matplotlib.font_manager import FontProperties
    from matplotlib.textpath import text_to_path

    if not text:
        return 0.0
    width, _, _ = text_to_path.get_text_width_height_descent(
        text, FontProperties(size=fontsize), ismath=False
    )
    return float(width)


def wrap_measured(text, width_pt, fontsize):
    """Break one line of text at spaces into lines no wider than ``width_pt``.

    Word widths are measured once and added (with the space's width); a 2 %
    margin covers the kerning between words that the sum leaves out.
    """
    words = text.split(" ")
    widths = [text_width_pt(w, fontsize) for w in words]
    space = text_width_pt("a a", fontsize) - text_width_pt("aa", fontsize)
    limit = 0.98 * width_pt
    out, cur, cur_w = [], [], 0.0
    for word, w in zip(words, widths, strict=True):
        cand_w = w if not cur else cur_w + space + w
        if cur and cand_w > limit:
            out.append(" ".join(cur))
            cur, cur_w = [word], w
        else:
            cur.append(word)
            cur_w = cand_w
    out.append(" ".join(cur))
    return out


def pack_caption(lines, width_pt, fontsize):
    """Lay caption parts into lines no wider than ``width_pt`` (measured in the figures' font).

    Parts of one logical line are joined by a middle dot while they fit; a
    part too wide by itself is wrapped at spaces.
    """
    out = []
    for parts in lines:
        cur = ""
        for part in parts:
            cand = part if not cur else f"{cur}  ·  {part}"
            if not cur or text_width_pt(cand, fontsize) <= 0.98 * width_pt:
                cur = cand
            else:
                out += wrap_measured(cur, width_pt, fontsize)
                cur = part
        out += wrap_measured(cur, width_pt, fontsize)
    return out


_FORMULA_TOKEN = re.compile(r"(?<![\w^])([A-Z][A-Za-z0-9()\[\]]*(?:\^\d*[+-])?(?:\(aq\))?)")


def typeset_formulas(text):
    """Write the formulas in a message the way the figures label species (Unicode sub/superscripts).

    A word is typeset only when it reads as a formula of known elements with a
    subscript or a charge (``FeOH^+`` -> ``FeOH⁺``, ``Fe(OH)2`` -> ``Fe(OH)₂``,
    ``SO4^2-`` -> ``SO₄²⁻``); other words are left alone.

    Examples
    --------
    >>> typeset_formulas("past the range: FeOH^+, Fe(OH)2, IAPWS-95 and R11-07")
    'past the range: FeOH⁺, Fe(OH)₂, IAPWS-95 and R11-07'
    """
    from pourbaix.errors import PourbaixError
    from pourbaix.tables.formula import parse_formula

    def one(m):
        word = m.group(1)
        suffix = ""
        if word.endswith("(aq)"):
            word, suffix = word[:-4], "(aq)"
        if not re.search(r"[A-Za-z)\]]\d|\^", word):
            return m.group(0)
        try:
            return parse_formula(word).plain() + suffix
        except (PourbaixError, ValueError):
            return m.group(0)

    return _FORMULA_TOKEN.sub(one, text)


CAPTION_SIZE = 7.5  # [pt]
_LEGEND_ROW_PT = 18.0  # [pt] one row of the legend below a map, with its gap
_CAPTION_WARNINGS = 4  # warnings written out in a caption; the rest are counted
_CAPTION_WARNING_CHARS = 260  # a longer warning is cut at a word (the map keeps the full text)
CAPTION_LINE_PT = CAPTION_SIZE * 1.45


def caption_lines(c, extra=(), dmap=None, width_pt=440.0):
    """Caption lines stating the conditions of a map."""
    return pack_caption(_caption_parts(c, extra, dmap), width_pt, CAPTION_SIZE)


def title_y(ax):
    """Title height in axes units: 1.0 (just above the frame) when nothing sits on top.

    A fixed height spares matplotlib measuring both axes' tick labels at every draw
    to decide whether the title must move up (about 35 ms per saved figure); with
    ticks or a label on top, None keeps that automatic placement.
    """
    top = (
        ax.xaxis.get_ticks_position() in ("top", "unknown")
        or ax.xaxis.get_label_position() == "top"
    )
    return None if top else 1.0


def _axis_label(reference):
    return f"E / V vs {reference}"


def style_axes(ax, dmap_or_window, reference):
    """Limits, axis labels, ticks and frame of a map's axes."""
    from matplotlib.ticker import AutoMinorLocator, MaxNLocator, MultipleLocator

    x0, x1, y0, y1 = dmap_or_window
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)
    ax.set_xlabel("pH", fontsize=11)
    ax.set_ylabel(_axis_label(reference), fontsize=11)
    span = x1 - x0
    if 6 <= span <= 24:
        ax.xaxis.set_major_locator(MultipleLocator(2))
        ax.xaxis.set_minor_locator(MultipleLocator(1))
    else:
        ax.xaxis.set_major_locator(MaxNLocator(10, steps=[1, 2, 5, 10]))
        ax.xaxis.set_minor_locator(AutoMinorLocator())
    ax.yaxis.set_major_locator(MaxNLocator(9, steps=[1, 2, 2.5, 5, 10]))
    ax.yaxis.set_minor_locator(AutoMinorLocator())
    ax.tick_params(which="both", direction="out", labelsize=9.5, color=INK)
    ax.tick_params(which="major", length=4.5, width=0.8)
    ax.tick_params(which="minor", length=2.5, width=0.6)
    for sp in ax.spines.values():
        sp.set_linewidth(0.9)
        sp.set_color(INK)
        sp.set_zorder(9)
    ax.set_facecolor("white")


def second_shift(dmap, name):
    """Name of the second reference and the shift E_second - E_map [V] (pH-independent only)."""
    from pourbaix.physics import electrodes

    c = dmap.conditions
    ref = electrodes.get_reference(name)  # OptionError listing the valid names
    if c.reference_slope_v_per_ph:
        raise OptionError(
            f"the map is drawn vs {c.reference}, a pH-dependent reference; a second potential axis "
            "needs a map drawn vs a fixed reference (e.g. SHE)"
        )
    if ref.name == "RHE":
        raise OptionError(
            f"second_reference {name!r} is pH-dependent; a pH-dependent reference cannot be a second "
            "potential axis (give a fixed reference such as SCE, Ag/AgCl-sat or Cu/CuSO4)"
        )
    off0 = float(electrodes.reference_offset(ref.name, c.temperature_c, ph=0.0))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # a range warning was already given for this electrode
        off1 = float(electrodes.reference_offset(ref.name, c.temperature_c, ph=1.0))
    if abs(off1 - off0) > 1e-12:
        raise OptionError(
            f"second_reference {name!r} is pH-dependent; a pH-dependent reference cannot be a second "
            "potential axis (give a fixed reference such as SCE, Ag/AgCl-sat or Cu/CuSO4)"
        )
    # E_SHE = E_map + off_map = E_second + off_second  ->  E_second = E_map + (off_map - off_second)
    return ref.name, c.reference_offset_v - off0


def second_axis(ax, name, shift):
    """Add a potential axis on the right in another (pH-independent) reference."""
    sec = ax.secondary_yaxis("right", functions=(lambda e: e + shift, lambda e: e - shift))
    sec.set_ylabel(_axis_label(name), fontsize=11)
    sec.tick_params(which="both", direction="out", labelsize=9.5, color=INK)
    sec.set_gid("pourbaix-second-axis")
    sec.spines["right"].set_linewidth(0.9)
    sec.spines["right"].set_color(INK)
    return sec


# old private names, kept one release for code not yet moved to the public ones
_pyplot = load_pyplot
