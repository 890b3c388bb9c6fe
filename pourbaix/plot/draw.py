"""Drawing potential-pH maps with matplotlib (one import for the drawing functions).

The drawing lives by topic in :mod:`pourbaix.plot.style` (palettes, sizes, typeset
text, captions, axes), :mod:`pourbaix.plot.labels` (label placement without overlaps),
:mod:`pourbaix.plot.layers` (fills, boundaries, water lines, caption, legend) and
:mod:`pourbaix.plot.maps` (the public functions). This module keeps the names it
always had, so ``from pourbaix.plot.draw import draw_map`` keeps working; the old
private names stay as aliases for code written against the single module.

matplotlib is imported inside the functions, never when this module is imported.
"""

from __future__ import annotations

from pourbaix.plot import labels as _labels
from pourbaix.plot import layers as _layers
from pourbaix.plot import maps as _maps
from pourbaix.plot import style as _style
from pourbaix.plot.maps import draw_map, draw_overlay, draw_points, save_figure
from pourbaix.plot.style import FIGURE_SIZE_IN, PALETTES

__all__ = ["draw_map", "draw_overlay", "draw_points", "save_figure", "PALETTES", "FIGURE_SIZE_IN"]

# the names this module had before the split (private: no promise beyond this release)
for _module in (_style, _labels, _layers, _maps):
    for _name in getattr(_module, "__all__", ()):
        globals().setdefault(_name, getattr(_module, _name))
    for _name, _value in vars(_module).items():
        if _name.startswith("_") and not _name.startswith("__"):
            globals().setdefault(_name, _value)
_OLD_NAMES = {
    "_label_line": "label_line",
    "_READING_CAUTION": "READING_CAUTION",
    "_new_axes": "new_axes",
    "_draw_water": "draw_water",
    "_draw_key": "draw_key",
    "_LABEL_SIZE": "LABEL_SIZE",
    "_label_neutral": "label_neutral",
    "_needs_numbers": "needs_numbers",
    "_label_pending": "label_pending",
    "_domain_colours": "domain_colours",
    "_caption_lines": "caption_lines",
    "_add_caption": "add_caption",
    "_fill_domains": "fill_domains",
    "_bottom_legend": "bottom_legend",
    "_style_axes": "style_axes",
    "_OVERLAY_STYLES": "OVERLAY_STYLES",
    "_STATE_NAMES": "STATE_NAMES",
    "_title_y": "title_y",
    "_WATER_COLOUR": "WATER_COLOUR",
    "_water_segments": "water_segments",
    "_second_shift": "second_shift",
    "_legend_height_pt": "legend_height_pt",
    "_renderer": "get_renderer",
    "_second_axis": "second_axis",
    "_neutral_ph": "neutral_ph_in_window",
    "_Placer": "Placer",
    "_palette": "resolve_palette",
    "_SMALL_LABEL_SIZE": "SMALL_LABEL_SIZE",
    "_number_pending": "number_pending",
    "_system_text": "system_text",
    "_bottom_band": "bottom_band",
    "_CAPTION_COLOUR": "CAPTION_COLOUR",
    "_CAPTION_SIZE": "CAPTION_SIZE",
    "_activity_text": "activity_text",
    "_draw_boundaries": "draw_boundaries",
    "_HATCH": "HATCH",
    "_INK": "INK",
    "_label_points": "label_points",
    "_label_domains": "label_domains",
    "_fit_bottom": "fit_bottom",
    "_FORMATS": "FIGURE_FORMATS",
    "_CAPTION_LINE_PT": "CAPTION_LINE_PT",
    "_sci": "power_text",
    "_pack": "pack_caption",
    "_BOX_PAD_PT": "BOX_PAD_PT",
}
for _old, _new in _OLD_NAMES.items():
    globals()[_old] = globals()[_new]
del _module, _name, _value, _old, _new
