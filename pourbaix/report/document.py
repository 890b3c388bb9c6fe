"""Reports: a map and its analyses as one self-contained HTML page or a Markdown file.

A report holds the figure, every condition of the map, each boundary's
reaction and equation, the species used with their values and sources, the
full citations, the warnings, the method and the cautions. HTML reports embed
every figure inline as SVG and carry their own stylesheet, so the single file
opens anywhere (and prints) without fetching anything. Markdown reports link
each figure as a sibling SVG file. Every file is written atomically.

All text that reaches a report (species names, notes from user tables,
titles, analysis tables) is escaped for the format written, so user data can
never inject markup.
"""

from __future__ import annotations

import datetime as _dt
import html
import io
import math
import re
from dataclasses import dataclass, field
from pathlib import Path

from pourbaix.errors import OptionError

__all__ = [
    "REPORT_FORMATS",
    "REPORT_CAUTIONS",
    "Section",
    "report_cautions",
    "table_html",
    "table_markdown",
    "analysis_sections",
    "render_report",
    "write_report",
    "write_document",
    "report_kind",
]

#: Report kinds by file extension.
REPORT_FORMATS = {".html": "html", ".htm": "html", ".md": "markdown"}

#: Cautions every report carries after the map's own caution
#: (``pourbaix.maps.domain_map.CAUTION``); the README's "Safety and limits".
REPORT_CAUTIONS = (
    "Maps are thermodynamic: they say nothing about rates, film quality, pitting, crevices, "
    "stress corrosion, microbiology (microbiologically influenced corrosion), galvanic coupling or "
    "mixed potentials. Measure and inspect; a map only says which form is stable.",
    "Drinking-water decisions (lead and copper release, changes of disinfectant or pH), "
    "cathodic-protection criteria (the -0.85 V vs Cu/CuSO4 figure for steel is common practice, not "
    "a verdict) and leach chemistries (cyanide, strong acids, sulfides releasing H2S) carry real "
    "hazards: they defer to local codes, the applicable standards and licensed practice. This "
    "report does not replace them.",
    "The values are compilations with real uncertainties: a few kJ/mol moves a line by tens of "
    "millivolts. Check the rows that matter for a decision (species table and notes below).",
)

_STATE_WORDS = {
    "immunity": "immunity (metal stable)",
    "passivation": "passivation (solid stable)",
    "corrosion": "corrosion (dissolved)",
}


# ---------------------------------------------------------------------- content model
@dataclass(frozen=True)
class Section:
    """One section of a report, in terms that render to HTML and to Markdown alike.

    Attributes
    ----------
    heading : str
        Section heading (plain text).
    text : tuple of str
        Paragraphs (plain text; escaped when rendered).
    rows : tuple of dict
        Table rows (each a dict of column -> value); no table when empty.
    columns : tuple or None
        Columns of the table: keys, or ``(key, header)`` or
        ``(key, header, format)`` tuples where format is a format spec such
        as ``"+.3f"`` or a callable value -> text. None: every key of the rows.
    notes : tuple of str
        Bullet points under the table (plain text).
    figure : matplotlib Figure or Axes, optional
        A figure for the section (embedded as SVG).
    caption : str
        Caption of the figure.
    """

    heading: str
    text: tuple = ()
    rows: tuple = ()
    columns: tuple | None = None
    notes: tuple = ()
    figure: object = None
    caption: str = ""


def _as_section(item):
    """Turn a caller's section (Section or (heading, content)) into a Section."""
    if isinstance(item, Section):
        return item
    if isinstance(item, tuple | list) and len(item) == 2 and isinstance(item[0], str):
        heading, content = item
        if isinstance(content, Section):
            return Section(
                heading,
                content.text,
                content.rows,
                content.columns,
                content.notes,
                content.figure,
                content.caption,
            )
        if isinstance(content, str):
            return Section(
                heading, text=tuple(p.strip() for p in content.split("\n\n") if p.strip())
            )
        if isinstance(content, list | tuple) and all(isinstance(r, dict) for r in content):
            return Section(heading, rows=tuple(content))
        raise OptionError(
            f"report section {heading!r}: content must be text, a list of dict rows or a Section, "
            f"got {type(content).__name__}"
        )
    raise OptionError(
        f"report section: give a Section or a (heading, content) pair, got {type(item).__name__}"
    )


# ---------------------------------------------------------------------- formatting
_SUPER = str.maketrans("0123456789-+", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻⁺")


def _sci(x, digits=3):
    """1e-06 -> '1×10⁻⁶', 2.5e-3 -> '2.5×10⁻³', 0.5 -> '0.5'."""
    x = float(x)
    if x == 0 or not math.isfinite(x) or 1e-2 <= abs(x) < 1e5:
        return f"{x:.{digits}g}"
    exp = math.floor(math.log10(abs(x)))
    mant = x / 10**exp
    power = "10" + str(exp).translate(_SUPER)
    if abs(mant - 1.0) < 1e-9:
        return power if x > 0 else "-" + power
    return f"{mant:.{digits}g}×{power}"


def _cell(value, fmt=None):
    """Plain text of one table value."""
    if callable(fmt):
        return str(fmt(value))
    if value is None or value == "":
        return "—"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, int | float) and not isinstance(value, bool):
        v = float(value)
        if math.isnan(v):
            return "—"
        if math.isinf(v):
            return "∞" if v > 0 else "-∞"
        if fmt:
            return format(v, fmt)
        if isinstance(value, int):
            return str(value)
        return _sci(v, 4) if (v != 0 and (abs(v) < 1e-2 or abs(v) >= 1e5)) else f"{v:.4g}"
    if isinstance(value, dict):
        return "; ".join(f"{k}: {_cell(v)}" for k, v in value.items()) or "—"
    if isinstance(value, list | tuple | set | frozenset):
        return ", ".join(_cell(v) for v in value) or "—"
    if hasattr(value, "item"):  # numpy scalar
        return _cell(value.item(), fmt)
    return str(value)


def _numeric(value):
    return isinstance(value, int | float) and not isinstance(value, bool) or hasattr(value, "dtype")


def _normal_columns(rows, columns):
    if columns is None:
        keys = []
        for r in rows:
            keys += [k for k in r if k not in keys]
        columns = keys
    out = []
    for c in columns:
        if isinstance(c, str):
            out.append((c, c, None))
        elif isinstance(c, tuple | list) and len(c) in (2, 3):
            out.append((c[0], c[1], c[2] if len(c) == 3 else None))
        else:
            raise OptionError(
                f"report table: a column is a key or (key, header[, format]), got {c!r}"
            )
    return out


def _md_escape(text):
    """Escape text for a Markdown paragraph or table cell (CommonMark backslash escapes)."""
    text = str(text).replace("\r", " ").replace("\n", " ")
    text = re.sub(r"([\\`*_\[\]<>#!|~$&])", r"\\\1", text)
    return text


def _cls(key, numeric):
    """Class attribute of a table cell: the column key (sanitised) and "num" for numbers."""
    name = "col-" + re.sub(r"[^A-Za-z0-9_-]+", "-", str(key)).strip("-")
    return f' class="{name} num"' if numeric else f' class="{name}"'


def table_html(rows, columns=None, *, caption=None):
    """Render a list of dict rows as an HTML table (all text escaped).

    Parameters
    ----------
    rows : sequence of dict
        One dict per row.
    columns : sequence, optional
        Keys, or ``(key, header)`` / ``(key, header, format)`` tuples (format:
        a format spec such as ``".3f"`` or a callable value -> text). Default:
        every key found in the rows, in order of appearance.
    caption : str, optional
        Table caption.

    Returns
    -------
    str
        The ``<table>`` element.

    Raises
    ------
    OptionError
        For a malformed column specification.

    Examples
    --------
    >>> print(table_html([{"pH": 7.0, "state": "<passive>"}]))  # doctest: +NORMALIZE_WHITESPACE
    <table><thead><tr><th class="col-pH num">pH</th><th class="col-state">state</th></tr></thead>
    <tbody><tr><td class="col-pH num">7</td><td class="col-state">&lt;passive&gt;</td></tr></tbody></table>
    """
    rows = list(rows)
    cols = _normal_columns(rows, columns)
    numeric = {
        k: any(_numeric(r.get(k)) for r in rows)
        and all(r.get(k) is None or _numeric(r.get(k)) for r in rows)
        for k, _, _ in cols
    }
    cap = f"<caption>{html.escape(str(caption))}</caption>" if caption else ""
    head = "".join(f"<th{_cls(k, numeric[k])}>{html.escape(str(h))}</th>" for k, h, _ in cols)
    body = "\n".join(
        "<tr>"
        + "".join(
            f"<td{_cls(k, numeric[k])}>{html.escape(_cell(r.get(k), f))}</td>" for k, _, f in cols
        )
        + "</tr>"
        for r in rows
    )
    return f"<table>{cap}<thead><tr>{head}</tr></thead>\n<tbody>{body}</tbody></table>"


def table_markdown(rows, columns=None):
    r"""Render a list of dict rows as a Markdown (pipe) table, cells escaped.

    Parameters
    ----------
    rows : sequence of dict
        One dict per row.
    columns : sequence, optional
        As for :func:`table_html`.

    Returns
    -------
    str

    Raises
    ------
    OptionError
        For a malformed column specification.

    Examples
    --------
    >>> print(table_markdown([{"pair": "A|B", "E0": -0.44}]))
    | pair | E0 |
    |---|---:|
    | A\|B | -0.44 |
    """
    rows = list(rows)
    cols = _normal_columns(rows, columns)
    numeric = {
        k: any(_numeric(r.get(k)) for r in rows)
        and all(r.get(k) is None or _numeric(r.get(k)) for r in rows)
        for k, _, _ in cols
    }
    lines = ["| " + " | ".join(_md_escape(h) for _, h, _ in cols) + " |"]
    lines.append("|" + "|".join("---:" if numeric[k] else "---" for k, _, _ in cols) + "|")
    for r in rows:
        lines.append("| " + " | ".join(_md_escape(_cell(r.get(k), f)) for k, _, f in cols) + " |")
    return "\n".join(lines)


# ---------------------------------------------------------------------- the map's content
def _names(dmap):
    """Species id -> unicode label (Fe(OH)₂⁺, CO₂(aq), Fe₂O₃ (maghemite))."""
    from pourbaix.maps.domain_map import species_id

    out = {}
    for se in dmap.species:
        sp = se.species
        text = sp.formula.plain()
        if sp.phase == "aq" and sp.charge == 0:
            text += "(aq)"
        elif sp.phase == "g":
            text += "(g)"
        if sp.form:
            text += f" ({sp.form})"
        out[species_id(sp)] = text
    return out


def _pretty(name, names):
    """Unicode label of a species or an assemblage 'A + B'."""
    return " + ".join(names.get(part, part) for part in str(name).split(" + "))


def _system(c):
    text = "–".join(c.elements)
    if c.ligands:
        text += "–" + "–".join(c.ligands)
    return text + "–H₂O"


def report_cautions(dmap=None):
    """Every caution a report carries: the map's own caution, then :data:`REPORT_CAUTIONS`.

    Parameters
    ----------
    dmap : DomainMap, optional
        Unused today; kept so map-specific cautions can join later.

    Returns
    -------
    tuple of str
    """
    from pourbaix.maps.domain_map import CAUTION

    return (CAUTION, *REPORT_CAUTIONS)


def _conditions_rows(dmap):
    c = dmap.conditions
    k = _nernst(dmap)
    rows = [("System", _system(c))]
    if c.ratio is not None:
        rows.append(
            ("Metal ratio", ":".join(c.elements) + " = " + ":".join(f"{r:g}" for r in c.ratio))
        )
    rows.append(("Temperature", f"{c.temperature_c:g} °C"))
    pressure = f"{c.pressure_bar:.4g} bar"
    if c.temperature_c > 100:
        pressure += " (liquid water: saturation pressure or above)"
    rows.append(("Pressure", pressure))
    if c.molality is not None:
        rows.append(
            (
                "Dissolved species",
                f"molality {_sci(c.molality)} mol/kg each (activity = molality × γ)",
            )
        )
    else:
        rows.append(
            (
                "Dissolved species",
                f"activity {_sci(c.activity)} each (solids and liquid water at unit activity)",
            )
        )
    if c.ionic_strength:
        rows.append(("Ionic strength", f"{c.ionic_strength:.4g} mol/kg"))
        rows.append(("Activity-coefficient model", str(c.activity_model)))
    else:
        rows.append(("Ionic strength", "0 mol/kg (activity coefficients 1)"))
    rows.append(("Water activity", f"{c.water_activity:g}"))
    if c.ligands:
        rows.append(
            (
                "Ligands (total activity)",
                ", ".join(f"{name}: {_sci(v)}" for name, v in c.ligands.items()),
            )
        )
    else:
        rows.append(("Ligands", "none"))
    ref = f"{c.reference}: E(SHE) = E({c.reference}) {'+' if c.reference_offset_v >= 0 else '-'} {abs(c.reference_offset_v):.4f} V"
    if c.reference_slope_v_per_ph:
        ref += f" {'+' if c.reference_slope_v_per_ph >= 0 else '-'} {abs(c.reference_slope_v_per_ph):.5f} pH"
    ref += f" at {c.temperature_c:g} °C"
    rows.append(("Reference electrode", ref))
    rows.append(("pH window", f"{c.ph_range[0]:g} to {c.ph_range[1]:g}"))
    rows.append(
        (
            "Potential window",
            f"{c.potential_range_v[0]:g} to {c.potential_range_v[1]:g} V vs {c.reference}",
        )
    )
    rows.append(("Nernst factor k = RT ln10 / F", f"{k:.5f} V"))
    rows.append(("Neutral pH at temperature", f"{dmap.neutral_ph:.2f}"))
    rows.append(("Data set", c.dataset))
    rows.append(
        ("User data files", ", ".join(str(f) for f in c.data_files) if c.data_files else "none")
    )
    return [{"condition": a, "value": b} for a, b in rows]


def _nernst(dmap):
    return float(dmap.conditions.nernst_v)


def _domain_rows(dmap, names):
    x0, x1, y0, y1 = dmap.window
    total = (x1 - x0) * (y1 - y0)
    rows = []
    for d in sorted(
        dmap.domains,
        key=lambda d: (
            ("immunity", "passivation", "corrosion").index(d.state)
            if d.state in _STATE_WORDS
            else 3
        ),
    ):
        rows.append(
            {
                "species": _pretty(" + ".join(d.species), names),
                "state": _STATE_WORDS.get(d.state, d.state),
                "share": 100.0 * d.area / total if total > 0 else float("nan"),
                "label_ph": d.label_point[0],
                "label_e": d.label_point[1],
            }
        )
    return rows


def _boundary_rows(dmap, names):
    from pourbaix.maps.lines import boundary_equations

    rows = []
    for i, r in enumerate(boundary_equations(dmap), 1):
        if r.get("e0_v_she") is not None:
            const = f"E0 = {r['e0_v_she']:+.4f} V vs SHE"
        elif r.get("log_k") is not None:
            const = f"log K = {r['log_k']:.3f}"
        else:
            const = ""
        rows.append(
            {
                "n": i,
                "between": " | ".join(_pretty(b, names) for b in r["between"]),
                "reaction": r.get("reaction")
                or (
                    "(mass balance: a traced curve, no single reaction)"
                    if r.get("points")
                    else "(assemblage boundary: line only)"
                ),
                "constant": const,
                "nernst": r.get("nernst") or "",
                "line": r["line"],
            }
        )
    return rows


def _water_rows(dmap):
    ref = dmap.conditions.reference
    rows = []
    for key, couple in (
        ("oxygen", "O₂ + 4 H⁺ + 4 e⁻ = 2 H₂O (1 bar O₂)"),
        ("hydrogen", "2 H⁺ + 2 e⁻ = H₂ (1 bar H₂)"),
    ):
        if key in dmap.water:
            e0, s = dmap.water[key]
            rows.append(
                {
                    "couple": couple,
                    "line": f"E = {round(e0, 4) + 0.0:+.4f} {'-' if s < 0 else '+'} {abs(s):.5f} pH  (V vs {ref})",
                }
            )
    return rows


def _species_rows(dmap, names):
    from pourbaix.maps.domain_map import species_id

    stable = {s for d in dmap.domains for s in d.species}
    rows, notes = [], []
    for se in dmap.species:
        sp = se.species
        sid = species_id(sp)
        rows.append(
            {
                "species": names.get(sid, sid),
                "phase": sp.phase,
                "dgf": sp.dgf_kj_mol,
                "dg": se.dg_kj_mol,
                "activity": se.activity,
                "gamma": se.gamma,
                "route": se.route,
                "stable": sid in stable,
                "source": sp.source,
                "origin": sp.origin,
            }
        )
        flags = []
        if getattr(sp, "metastable", False):
            flags.append("metastable form")
        text = "; ".join([*flags, sp.note] if sp.note else flags)
        if text:
            notes.append(f"{names.get(sid, sid)} ({sp.phase}, {sp.origin or 'no file'}): {text}")
    return rows, notes


# ---------------------------------------------------------------------- analyses
def analysis_sections(obj, dmap=None):
    """Report sections for an analysis result.

    Parameters
    ----------
    obj : object
        A result of :mod:`pourbaix.analyses`: ``LeachWindow``, ``FieldData``
        (placed readings), ``CorrosionReading``, ``SolubilityResult`` or
        ``MapComparison``; or a :class:`Section`, or a ``(heading, content)``
        pair (content: text, a list of dict rows or a Section).
    dmap : DomainMap, optional
        The report's map (field readings are drawn on it).

    Returns
    -------
    list of Section

    Raises
    ------
    OptionError
        For an object the report does not know how to show.
    """
    if (
        isinstance(obj, Section)
        or isinstance(obj, tuple | list)
        and len(obj) == 2
        and isinstance(obj[0], str)
    ):
        return [_as_section(obj)]
    kind = type(obj).__name__
    handler = _ANALYSES.get(kind)
    if handler is None:
        raise OptionError(
            f"report: cannot show a {kind}; give one of {', '.join(sorted(_ANALYSES))}, a Section or a (heading, content) pair"
        )
    return handler(obj, dmap)


def _other_warnings(maps, dmap):
    """Warnings of an analysis's own maps that the report's Warnings section (``dmap``'s) does not show.

    Parameters
    ----------
    maps : iterable of (str, DomainMap)
        A label for each map (e.g. "map B", "Fe map") and the map.
    dmap : DomainMap or None
        The report's map.
    """
    shown = set(getattr(dmap, "warnings", ()) or ())
    out = []
    for label, m in maps:
        if m is dmap:
            continue
        out += [f"{label}: {text}" for text in getattr(m, "warnings", ()) if text not in shown]
    return out


def _window_sections(w, dmap):
    from pourbaix.plot.analysis_figures import draw_window

    ref = w.reference
    d = w.to_dict()
    keep = ", ".join(f"{el} ≤ {_sci(w.max_dissolved[el])} mol/kg" for el in w.keep_solid) or "none"
    rows = [
        {
            "item": "Dissolve",
            "value": f"{w.dissolve} ≥ {_sci(w.min_dissolved)} mol/kg (basis: {w.basis})",
        },
        {"item": "Keep solid", "value": keep},
        {"item": "Within the stability field of water", "value": "yes" if w.within_water else "no"},
        {"item": "Window", "value": "empty" if w.empty else f"area {w.area:.4g} pH·V"},
    ]
    if not w.empty:
        rows += [
            {"item": "pH bounds", "value": f"{d['ph_bounds'][0]:.2f} to {d['ph_bounds'][1]:.2f}"},
            {
                "item": "Potential bounds",
                "value": f"{d['potential_bounds_v'][0]:+.3f} to {d['potential_bounds_v'][1]:+.3f} V vs {ref}",
            },
            {
                "item": "Point with most room",
                "value": f"pH {w.best_point[0]:.2f}, {w.best_point[1]:+.3f} V vs {ref}",
            },
        ]
        m = w.margins
        room = []
        for key, label, unit in (
            ("acid_ph", "towards acid", "pH"),
            ("alkaline_ph", "towards alkaline", "pH"),
            ("down_v", "down", "V"),
            ("up_v", "up", "V"),
        ):
            if key in m and m[key] is not None:
                room.append(
                    f"{label} {m[key] * 1000:.0f} mV" if unit == "V" else f"{label} {m[key]:.2f} pH"
                )
        rows.append({"item": "Room there", "value": ", ".join(room)})
        rows.append(
            {
                "item": "Dissolved there",
                "value": ", ".join(
                    f"{el}: {_sci(v)} mol/kg" for el, v in w.solubility_at_best.items()
                ),
            }
        )
    title = f"Leach window: dissolve {w.dissolve}" + (
        f", keep {', '.join(w.keep_solid)} solid" if w.keep_solid else ""
    )
    ax = draw_window(w)
    return [
        Section(
            title,
            text=(
                "Where the target is dissolved at or above its level while each kept element stays solid or below its own level.",
            ),
            rows=tuple(rows),
            columns=(("item", "Item"), ("value", "Value")),
            notes=tuple(
                [
                    *(f"empty because: {r}" for r in w.reasons),
                    *w.notes,
                    *_other_warnings(((f"{el} map", m) for el, m in w.maps.items()), dmap),
                ]
            ),
            figure=ax,
            caption=f"{w.dissolve} leach window over the {w.dissolve} map; potentials vs {ref}.",
        )
    ]


def _mv(v):
    """A margin in volts as whole millivolts ("none" where there is no boundary)."""
    if v is None or not math.isfinite(v):
        return "none"
    return f"{round(v * 1000.0) + 0:.0f}"


def _signed(v, fmt):
    """Format with a sign, never as negative zero."""
    text = format(v, fmt)
    if text.startswith("-") and float(text) == 0.0:
        text = "+" + text[1:]
    return text


def _field_sections(data, dmap):
    from pourbaix.plot.analysis_figures import draw_field

    ref = data.reference or (dmap.conditions.reference if dmap is not None else "")
    names = _names(dmap) if dmap is not None else {}
    rows = []
    for r in data.rows:
        rows.append(
            {
                "line": r.line,
                "name": r.label or r.time or "",
                "ph": r.ph,
                "measured": f"{r.potential_v:+.3f} vs {r.reference}",
                "she": r.potential_v_she,
                "map": r.potential_v_map,
                "state": r.state,
                "species": _pretty(r.species, names) if r.species else None,
                "room": f"{_mv(r.margin_down_v)} / {_mv(r.margin_up_v)}",
            }
        )
    cols = (
        ("line", "Line"),
        ("name", "Reading"),
        ("ph", "pH", ".2f"),
        ("measured", "E measured [V]"),
        ("she", "E [V vs SHE]", "+.3f"),
        ("map", f"E [V vs {ref}]", "+.3f"),
        ("state", "State"),
        ("species", "Stable species"),
        ("room", "Room down / up [mV]"),
    )
    if ref == "SHE":
        cols = tuple(c for c in cols if c[0] != "map")
    notes = [str(p) for p in data.problems]
    notes = [f"skipped {data.path}: {n}" for n in notes]
    notes += list(data.notes)
    for r in data.rows:
        notes += [f"line {r.line}: {n}" for n in r.notes]
    if any(r.state == "passivation" for r in data.rows):
        notes.append(
            "passivation means a solid is thermodynamically stable; whether it protects is a kinetic question"
        )
    figure = None
    if dmap is not None and data.rows and all(r.potential_v_map is not None for r in data.rows):
        figure = draw_field(dmap, data)
    return [
        Section(
            "Field readings",
            text=(
                f"{len(data.rows)} reading(s) from {data.path}, converted to SHE and to the map's reference and classified on the map; "
                f"{len(data.problems)} row(s) skipped.",
            ),
            rows=tuple(rows),
            columns=cols,
            notes=tuple(notes),
            figure=figure,
            caption=f"Field readings on the map; potentials vs {ref}."
            + (" Arrows follow the time order." if data.has_time else ""),
        )
    ]


def _reading_sections(r, dmap):
    ref = r.reference
    names = _names(dmap) if dmap is not None else {}
    rows = [
        {
            "item": "Measured",
            "value": f"pH {r.ph:g}, {r.potential_v:+.3f} V vs {ref} "
            f"({r.potential_v_she:+.3f} V vs SHE) at {r.temperature_c:g} °C",
        },
        {
            "item": "Reading",
            "value": f"{r.reading} ({r.state}); stable: {_pretty(r.species, names)}",
        },
    ]
    if r.margin_to_immunity_mv is None:
        immunity = f"none at pH {r.ph:g}"
    elif r.margin_to_immunity_mv > 0:
        immunity = (
            f"below {r.immunity_potential_v:+.3f} V vs {ref}: "
            f"the potential must fall {r.margin_to_immunity_mv:.0f} mV to reach it"
        )
    else:
        immunity = (
            f"up to {r.immunity_potential_v:+.3f} V vs {ref}: "
            f"{-r.margin_to_immunity_mv:.0f} mV of room inside it"
        )
    rows.append({"item": "Immunity", "value": immunity})
    for label, margin, other in (
        ("Nearest boundary below", r.margin_down_v, r.neighbour_down),
        ("Nearest boundary above", r.margin_up_v, r.neighbour_up),
    ):
        value = f"{_mv(margin)} mV → {_pretty(other, names)}" if math.isfinite(margin) else "none"
        rows.append({"item": label, "value": value})
    if r.cp_check is not None:
        cp = r.cp_check
        verdict = "more negative than" if cp["meets"] else "less negative than"
        rows.append(
            {
                "item": "Cathodic-protection criterion (common practice)",
                "value": f"{cp['potential_v']:+.3f} V vs {cp['reference']} is "
                f"{abs(cp['difference_mv']):.0f} mV {verdict} {cp['criterion_v']:+.2f} V",
            }
        )
    shown = set(report_cautions())  # already at the top of the report
    return [
        Section(
            f"Corrosion reading: {r.element}",
            rows=tuple(rows),
            columns=(("item", "Item"), ("value", "Value")),
            notes=tuple(c for c in r.cautions if c not in shown),
        )
    ]


def _solubility_sections(res, dmap):
    from pourbaix.plot.analysis_figures import draw_solubility_curve

    names = _names(dmap) if dmap is not None else {}
    ref = res.reference
    key_e = f"potential_v_vs_{ref}"
    rows = []
    for r in res.rows():
        r = dict(r)
        for k in ("solid", "dominant", "ligand"):
            if r.get(k):
                r[k] = _pretty(r[k], names)
        rows.append(r)
    cols = [
        ("ph", "pH", ".2f"),
        (key_e, f"E [V vs {ref}]", lambda v: _signed(v, "+.3f")),
        ("total_mol_kg", "Total dissolved [mol/kg]"),
        ("log10_total", "log₁₀ total", ".2f"),
        ("solid", "Solid"),
        ("dominant", "Main dissolved species"),
        ("saturation", "At the map's activity"),
    ]
    if rows and "ligand" in rows[0]:
        cols.append(("ligand", "Ligand species"))
    figure = draw_solubility_curve(res) if len(rows) > 1 else None
    high = any((r["log10_total"] or 0) > 0 for r in rows)
    return [
        Section(
            f"Solubility of {res.element}",
            text=(
                f"Total dissolved {res.element} in equilibrium with the least-soluble solid, "
                "summed over every dissolved species (complexes included).",
            ),
            rows=tuple(rows),
            columns=tuple(cols),
            notes=("values above 1 mol/kg only say that no solid can form there",) if high else (),
            figure=figure,
            caption=f"Solubility of {res.element}; potentials vs {ref}.",
        )
    ]


def _comparison_sections(cmp, dmap):
    from pourbaix.plot.analysis_figures import draw_comparison

    names = {**_names(cmp.map_b), **_names(cmp.map_a)}

    def side(r, which):
        if r.get("kind") == "potential" and r.get(f"potential_{which}_v") is not None:
            return f"{_signed(r[f'potential_{which}_v'], '+.4f')} V"
        if r.get("kind") == "ph" and r.get(f"ph_{which}") is not None:
            return f"pH {r[f'ph_{which}']:.3f}"
        return None

    rows = []
    for r in cmp.rows():
        if r.get("shift_mv") is not None:
            moved = f"{_signed(r['shift_mv'], '+.1f')} mV"
        elif r.get("shift_ph") is not None:
            moved = f"{_signed(r['shift_ph'], '+.3f')} pH"
        else:
            moved = None
        rows.append(
            {
                "between": " | ".join(_pretty(b, names) for b in r["between"]),
                "status": r.get("status"),
                "at": f"pH {r['at_ph']:.2f}"
                if r.get("at_ph") is not None
                else ("vertical line" if r.get("kind") == "ph" else None),
                "a": side(r, "a"),
                "b": side(r, "b"),
                "moved": moved,
            }
        )
    notes = list(cmp.notes)
    notes += _other_warnings((("map A", cmp.map_a), ("map B", cmp.map_b)), dmap)
    ca, cb = cmp.map_a.conditions, cmp.map_b.conditions
    # same test as pourbaix.plot.draw.draw_overlay: one potential axis needs one electrode position
    if (
        abs(ca.reference_offset_v - cb.reference_offset_v) > 1e-9
        or ca.reference_slope_v_per_ph != cb.reference_slope_v_per_ph
    ):
        figure = None
        notes.append(
            f"no overlay figure: the {ca.reference} electrode itself moves between {ca.temperature_c:g} and "
            f"{cb.temperature_c:g} °C, so one potential axis cannot serve both maps (compare vs SHE to draw it)"
        )
    else:
        figure = draw_comparison(cmp)
    return [
        Section(
            "Comparison of two maps",
            text=(f"A = {cmp.label_a}; B = {cmp.label_b}. Potentials vs {cmp.reference}.",),
            rows=tuple(rows),
            columns=(
                ("between", "Boundary"),
                ("status", "Present"),
                ("at", "Compared at"),
                ("a", "A"),
                ("b", "B"),
                ("moved", "Moved"),
            ),
            notes=tuple(notes),
            figure=figure,
            caption=f"Boundaries of A ({cmp.label_a}) and B ({cmp.label_b}); potentials vs {cmp.reference}.",
        )
    ]


_ANALYSES = {
    "LeachWindow": _window_sections,
    "FieldData": _field_sections,
    "CorrosionReading": _reading_sections,
    "SolubilityResult": _solubility_sections,
    "MapComparison": _comparison_sections,
}


# ---------------------------------------------------------------------- figures
def _figure_of(fig_or_ax):
    fig = fig_or_ax if hasattr(fig_or_ax, "savefig") else getattr(fig_or_ax, "figure", None)
    if fig is None or not hasattr(fig, "savefig"):
        raise OptionError(
            f"report figure: give a matplotlib Figure or Axes, got {type(fig_or_ax).__name__}"
        )
    return fig


def _svg_text(fig, *, text_as_text):
    """The figure as SVG text; text kept as <text> (for inline HTML) or as paths (portable file)."""
    import matplotlib

    buf = io.StringIO()
    rc = {"svg.fonttype": "none" if text_as_text else "path", "svg.hashsalt": "pourbaix-report"}
    with matplotlib.rc_context(rc):
        fig.savefig(buf, format="svg", facecolor="white", metadata={"Date": None})
    return buf.getvalue()


def _inline_svg(svg, prefix, label):
    """Strip the XML prologue, make ids unique on the page, let the SVG scale with the page."""
    svg = re.sub(r"^\s*<\?xml[^>]*\?>\s*", "", svg)
    svg = re.sub(r"<!DOCTYPE[^>]*>\s*", "", svg)
    svg = re.sub(r"<metadata>.*?</metadata>\s*", "", svg, flags=re.S)
    svg = re.sub(r'\bid="([^"]+)"', lambda m: f'id="{prefix}-{m.group(1)}"', svg)
    svg = re.sub(r"url\(#([^)]+)\)", lambda m: f"url(#{prefix}-{m.group(1)})", svg)
    svg = re.sub(
        r'(xlink:href|href)="#([^"]+)"', lambda m: f'{m.group(1)}="#{prefix}-{m.group(2)}"', svg
    )

    def root(m):
        attrs = re.sub(r'\s(width|height)="[^"]*"', "", m.group(1))
        return f'<svg{attrs} class="figure-svg" role="img" aria-label="{html.escape(label)}">'

    return re.sub(r"<svg\b([^>]*)>", root, svg, count=1)


# ---------------------------------------------------------------------- document
@dataclass
class _Doc:
    title: str
    subtitle: str
    facts: list
    cautions: tuple
    figures: list = field(default_factory=list)  # (fig, caption, owned)
    sections: list = field(default_factory=list)  # (anchor, Section, figure index or None)


def _build(dmap, *, title, extra_sections, analyses, figure, reading, second_reference):
    from pourbaix import __version__
    from pourbaix.maps.domain_map import DomainMap

    if not isinstance(dmap, DomainMap):
        raise OptionError(f"report: give a computed map (DomainMap), got {type(dmap).__name__}")
    c = dmap.conditions
    names = _names(dmap)
    when = _dt.datetime.now(_dt.UTC).strftime("%Y-%m-%d %H:%M UTC")
    doc = _Doc(
        title=str(title) if title else f"{_system(c)} potential–pH map at {c.temperature_c:g} °C",
        subtitle=f"pourbaix {__version__} · {when} · potentials vs {c.reference}",
        facts=[
            ("Temperature", f"{c.temperature_c:g} °C"),
            (
                "Dissolved",
                f"{_sci(c.molality)} mol/kg"
                if c.molality is not None
                else f"activity {_sci(c.activity)}",
            ),
            ("Reference", c.reference),
            (
                "Data set",
                c.dataset + (f" + {len(c.data_files)} user file(s)" if c.data_files else ""),
            ),
            ("Domains", str(len(dmap.domains))),
        ],
        cautions=report_cautions(dmap),
    )
    # main figure
    if figure is None or figure is True:
        from pourbaix.plot.draw import draw_map

        ax = draw_map(dmap, reading=reading, second_reference=second_reference)
        doc.figures.append(
            (
                _figure_of(ax),
                f"The {_system(c)} map at {c.temperature_c:g} °C; potentials vs {c.reference}.",
                True,
            )
        )
    elif figure is not False:
        doc.figures.append(
            (
                _figure_of(figure),
                f"The {_system(c)} map at {c.temperature_c:g} °C; potentials vs {c.reference}.",
                False,
            )
        )

    by_state = {}
    for d in dmap.domains:
        by_state.setdefault(d.state, []).append(_pretty(" + ".join(d.species), names))
    summary = [
        f"{_STATE_WORDS.get(s, s).split(' (')[0].capitalize()}: {', '.join(v)}."
        for s, v in sorted(
            by_state.items(),
            key=lambda kv: (
                ("immunity", "passivation", "corrosion").index(kv[0])
                if kv[0] in _STATE_WORDS
                else 3
            ),
        )
    ]
    never = [_pretty(n, names) for n in dmap.never_stable]

    def add(anchor, section):
        fig_index = None
        if section.figure is not None:
            doc.figures.append(
                (_figure_of(section.figure), section.caption or section.heading, True)
            )
            fig_index = len(doc.figures) - 1
        doc.sections.append((anchor, section, fig_index))

    add(
        "domains",
        Section(
            "Stable domains",
            text=tuple(summary)
            + ((f"Never stable in the window: {', '.join(never)}.",) if never else ()),
            rows=tuple(_domain_rows(dmap, names)),
            columns=(
                ("species", "Species"),
                ("state", "State"),
                ("share", "Share of window [%]", ".1f"),
                ("label_ph", "Label pH", ".2f"),
                ("label_e", f"Label E [V vs {c.reference}]", "+.3f"),
            ),
        ),
    )
    add(
        "conditions",
        Section(
            "Conditions",
            rows=tuple(_conditions_rows(dmap)),
            columns=(("condition", "Condition"), ("value", "Value")),
        ),
    )
    add(
        "boundaries",
        Section(
            "Boundaries",
            text=(
                f"Each boundary with the reaction behind it (written as a reduction), its standard constant at {c.temperature_c:g} °C and "
                f"its Nernst form, E = E0 − (m/n) k pH − (k/n) log10 Q with k = {_nernst(dmap):.5f} V, and the line as drawn "
                f"(activities included, V vs {c.reference}).",
            ),
            rows=tuple(_boundary_rows(dmap, names)),
            columns=(
                ("n", "#"),
                ("between", "Between"),
                ("reaction", "Reaction"),
                ("constant", "Constant"),
                ("nernst", "Nernst form"),
                ("line", "Line on the map"),
            ),
        ),
    )
    add(
        "water",
        Section(
            "Water stability lines",
            rows=tuple(_water_rows(dmap)),
            columns=(("couple", "Couple"), ("line", "Line")),
        ),
    )
    sp_rows, sp_notes = _species_rows(dmap, names)
    add(
        "species",
        Section(
            "Species and values used",
            text=(
                f"ΔfG° at 25 °C from the tables; ΔG at {c.temperature_c:g} °C as used in the map (apparent Gibbs energy, route shown); "
                "activity as set (dissolved species: molality × γ).",
            ),
            rows=tuple(sp_rows),
            columns=(
                ("species", "Species"),
                ("phase", "Phase"),
                ("dgf", "ΔfG° 25 °C [kJ/mol]", ".2f"),
                ("dg", f"ΔG {c.temperature_c:g} °C [kJ/mol]", ".2f"),
                ("activity", "Activity", _sci),
                ("gamma", "γ", ".3f"),
                ("route", "Route"),
                ("stable", "Stable here"),
                ("source", "Source"),
                ("origin", "Row"),
            ),
            notes=tuple(sp_notes),
        ),
    )
    k = 0
    for obj in analyses or ():
        for s in analysis_sections(obj, dmap):
            k += 1
            add(f"analysis-{k}", s)
    for item in extra_sections or ():
        k += 1
        add(f"analysis-{k}", _as_section(item))
    notes = list(dmap.warnings)
    if isinstance(dmap, DomainMap):
        from pourbaix.analyses.solubility import missing_solid_note

        notes += [n for n in (missing_solid_note(dmap),) if n]
    add(
        "warnings",
        Section(
            "Warnings",
            text=() if notes else ("No warnings for this map.",),
            notes=tuple(notes),
        ),
    )
    add(
        "method",
        Section("Method", text=(dmap.method[:1].upper() + dmap.method[1:] + ".", _METHOD_NOTE)),
    )
    add(
        "sources",
        Section(
            "Sources",
            rows=tuple(
                {"key": key, "citation": cit}
                for key, cit in sorted(_all_sources(dmap, analyses).items())
            ),
            columns=(("key", "Key"), ("citation", "Citation")),
        ),
    )
    return doc


def _all_sources(dmap, analyses):
    """Source key -> citation over the report's map and every map an analysis used."""
    out = dict(dmap.sources)
    for obj in analyses or ():
        maps = (
            list(getattr(obj, "maps", {}).values())
            if isinstance(getattr(obj, "maps", None), dict)
            else []
        )
        maps += [getattr(obj, k) for k in ("map_a", "map_b") if getattr(obj, k, None) is not None]
        for m in maps:
            for key, cit in getattr(m, "sources", {}).items():
                out.setdefault(key, cit)
    return out


_METHOD_NOTE = (
    "Each species is a plane of transformed free energy per atom of the element over (pH, E), from the Nernst "
    "equation written for every pair at once; the stable species at a point is the lowest plane, and the domains "
    "are the exact projections of that lower envelope (half-space intersection), not a grid. Solids and liquid "
    "water have unit activity (water as set for brines); dissolved species the set activity; gases 1 bar."
)


# ---------------------------------------------------------------------- rendering
_CSS = """
:root{--ink:#1b2430;--muted:#5b6673;--rule:#d5dbe2;--band:#f4f6f8;--accent:#24566b;--warn:#8a5a00;--warnbg:#fff7e6}
*{box-sizing:border-box}
html{-webkit-text-size-adjust:100%}
body{margin:0;background:#eef1f4;color:var(--ink);font:15px/1.5 "DejaVu Sans","Liberation Sans",Arial,sans-serif}
main{max-width:1040px;margin:24px auto;background:#fff;padding:36px 48px 28px;border:1px solid var(--rule);border-radius:6px}
header h1{font-size:26px;line-height:1.25;margin:0 0 4px;font-weight:700;letter-spacing:-.01em}
header .sub{color:var(--muted);font-size:13px;margin:0 0 16px}
.facts{display:flex;flex-wrap:wrap;gap:8px;margin:0 0 18px;padding:0;list-style:none}
.facts li{background:var(--band);border:1px solid var(--rule);border-radius:4px;padding:4px 10px;font-size:13px}
.facts b{color:var(--muted);font-weight:600;margin-right:6px}
nav.toc{font-size:13px;color:var(--muted);margin:0 0 18px}
nav.toc a{color:var(--accent);text-decoration:none;margin-right:12px;white-space:nowrap}
.cautions{border-left:4px solid #c98a12;background:var(--warnbg);padding:10px 16px 10px 18px;margin:0 0 24px;border-radius:0 4px 4px 0}
.cautions h2{margin:0 0 4px;font-size:15px;color:var(--warn);border:0;padding:0;text-transform:uppercase;letter-spacing:.06em}
.cautions ul{margin:4px 0 0;padding-left:20px}
.cautions li{margin:3px 0;font-size:14px}
figure{margin:8px 0 28px;text-align:center}
figure .figure-svg{width:100%;max-width:820px;height:auto;display:block;margin:0 auto}
figcaption{color:var(--muted);font-size:13px;margin-top:6px}
section{margin:0 0 26px}
h2{font-size:19px;margin:0 0 8px;padding-bottom:4px;border-bottom:2px solid var(--accent);color:var(--ink)}
p{margin:6px 0 10px}
.table-wrap{overflow-x:auto}
table{border-collapse:collapse;width:100%;font-size:13px;margin:6px 0 8px}
caption{text-align:left;color:var(--muted);padding-bottom:4px}
th,td{border-bottom:1px solid var(--rule);padding:5px 8px;text-align:left;vertical-align:top}
thead th{background:var(--band);font-weight:600;border-bottom:2px solid #b9c3cd}
tbody tr:nth-child(even) td{background:#fafbfc}
td.num,th.num{text-align:right;font-variant-numeric:tabular-nums;white-space:nowrap}
td.col-reaction,td.col-nernst,td.col-line{font-family:"DejaVu Sans Mono","Liberation Mono",monospace;font-size:12px}
td.col-origin{font-size:11.5px;color:var(--muted);overflow-wrap:break-word;min-width:11em}
td.col-route{min-width:7.5em}
td.col-measured,td.col-at,td.col-a,td.col-b,td.col-moved,td.col-room{white-space:nowrap}
td.col-a,td.col-b,td.col-moved,td.col-room,th.col-a,th.col-b,th.col-moved,th.col-room{text-align:right;font-variant-numeric:tabular-nums}
td.col-reaction{min-width:13em}
td.col-n,th.col-n{width:2em}
td.col-condition,td.col-item{width:32%;color:var(--muted)}
td.col-key{white-space:nowrap;font-weight:600}
ul.notes{font-size:13px;color:#333d48;margin:4px 0 0;padding-left:20px}
ul.notes li{margin:2px 0}
footer{color:var(--muted);font-size:12px;border-top:1px solid var(--rule);padding-top:10px;margin-top:24px}
@page{size:A4;margin:14mm 12mm}
@media print{
 body{background:#fff;font-size:10.5pt}
 main{max-width:none;margin:0;padding:0;border:0}
 nav.toc{display:none}
 figure,tr,.cautions{break-inside:avoid}
 h2{break-after:avoid}
 thead{display:table-header-group}
 table{font-size:8.5pt}
 tbody tr:nth-child(even) td{background:none}
 a{color:inherit;text-decoration:none}
}
"""


def _html_section(anchor, s, fig_html):
    e = html.escape
    out = [f'<section id="{e(anchor)}">', f"<h2>{e(s.heading)}</h2>"]
    out += [f"<p>{e(p)}</p>" for p in s.text]
    if fig_html:
        out.append(fig_html)
    if s.rows:
        out.append('<div class="table-wrap">' + table_html(s.rows, s.columns) + "</div>")
    if s.notes:
        out.append('<ul class="notes">' + "".join(f"<li>{e(n)}</li>" for n in s.notes) + "</ul>")
    out.append("</section>")
    return "\n".join(out)


def _render_html(doc):
    e = html.escape
    figs_html = []
    for i, (fig, caption, _) in enumerate(doc.figures, 1):
        svg = _inline_svg(_svg_text(fig, text_as_text=True), f"f{i}", f"Figure {i}: {caption}")
        figs_html.append(
            f'<figure id="figure-{i}">\n{svg}\n<figcaption>Figure {i}. {e(caption)}</figcaption>\n</figure>'
        )
    main_fig = figs_html[0] if doc.figures and not any(fi == 0 for _, _, fi in doc.sections) else ""
    toc = "".join(f'<a href="#{e(a)}">{e(s.heading)}</a>' for a, s, _ in doc.sections)
    parts = [
        "<!DOCTYPE html>",
        '<html lang="en">',
        "<head>",
        '<meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        '<meta name="generator" content="pourbaix">',
        f"<title>{e(doc.title)}</title>",
        f"<style>{_CSS}</style>",
        "</head>",
        "<body>",
        "<main>",
        "<header>",
        f"<h1>{e(doc.title)}</h1>",
        f'<p class="sub">{e(doc.subtitle)}</p>',
        '<ul class="facts">'
        + "".join(f"<li><b>{e(k)}</b>{e(v)}</li>" for k, v in doc.facts)
        + "</ul>",
        f'<nav class="toc">{toc}<a href="#cautions">Cautions</a></nav>',
        "</header>",
        '<aside class="cautions" id="cautions">',
        "<h2>Cautions</h2>",
        "<ul>" + "".join(f"<li>{e(t)}</li>" for t in doc.cautions) + "</ul>",
        "</aside>",
    ]
    if main_fig:
        parts.append(main_fig)
    for anchor, s, fi in doc.sections:
        parts.append(_html_section(anchor, s, figs_html[fi] if fi is not None else ""))
    parts += [
        f"<footer>{e(doc.subtitle)}. A thermodynamic prediction: read the cautions above before acting on it.</footer>",
        "</main>",
        "</body>",
        "</html>",
        "",
    ]
    return "\n".join(parts)


def _render_markdown(doc, figure_files):
    m = _md_escape
    out = [f"# {m(doc.title)}", "", f"*{m(doc.subtitle)}*", ""]
    out.append(" · ".join(f"**{m(k)}:** {m(v)}" for k, v in doc.facts))
    out += ["", "> **Cautions**", ">"]
    out += [f"> - {m(t)}" for t in doc.cautions]
    out.append("")

    def fig_md(i):
        _, caption, _ = doc.figures[i]
        return [
            f"![Figure {i + 1}: {m(caption)}]({figure_files[i]})",
            "",
            f"*Figure {i + 1}. {m(caption)}*",
            "",
        ]

    if doc.figures and not any(fi == 0 for _, _, fi in doc.sections):
        out += fig_md(0)
    for _, s, fi in doc.sections:
        out += [f"## {m(s.heading)}", ""]
        for p in s.text:
            out += [m(p), ""]
        if fi is not None:
            out += fig_md(fi)
        if s.rows:
            out += [table_markdown(s.rows, s.columns), ""]
        for n in s.notes:
            out.append(f"- {m(n)}")
        if s.notes:
            out.append("")
    out += [
        "---",
        "",
        f"*{m(doc.subtitle)}. A thermodynamic prediction: read the cautions above before acting on it.*",
        "",
    ]
    return "\n".join(out)


def report_kind(path):
    """The kind of report a file name asks for.

    Parameters
    ----------
    path : str or Path
        The report's file name.

    Returns
    -------
    str
        ``"html"`` or ``"markdown"``.

    Raises
    ------
    OptionError
        If the extension is not one of :data:`REPORT_FORMATS`.
    """
    ext = Path(path).suffix.lower()
    if ext not in REPORT_FORMATS:
        raise OptionError(
            f"cannot write a report as {Path(path).name!r}: the extension must be one of {', '.join(REPORT_FORMATS)}"
        )
    return REPORT_FORMATS[ext]


def _close(doc):
    import matplotlib.pyplot as plt

    for fig, _, owned in doc.figures:
        if owned:
            plt.close(fig)


def render_report(
    dmap,
    *,
    fmt="html",
    title=None,
    extra_sections=(),
    analyses=None,
    figure=None,
    reading=True,
    second_reference=None,
):
    """The report as text, without writing a file (e.g. for display in a notebook).

    Parameters
    ----------
    dmap : DomainMap
        The map.
    fmt : {"html", "markdown"}
        Format. Markdown figures are not rendered here (see :func:`write_report`).
    title, extra_sections, analyses, figure, reading, second_reference
        As for :func:`write_report`.

    Returns
    -------
    str

    Raises
    ------
    OptionError
        For an unknown format or analysis object.
    """
    if fmt not in ("html", "markdown"):
        raise OptionError(f"report format {fmt!r} is not known; use html or markdown")
    doc = _build(
        dmap,
        title=title,
        extra_sections=extra_sections,
        analyses=analyses,
        figure=figure,
        reading=reading,
        second_reference=second_reference,
    )
    try:
        if fmt == "html":
            return _render_html(doc)
        return _render_markdown(doc, [f"figure-{i + 1}.svg" for i in range(len(doc.figures))])
    finally:
        _close(doc)


def write_report(
    path,
    dmap,
    *,
    title=None,
    extra_sections=(),
    analyses=None,
    figure=None,
    reading=True,
    second_reference=None,
):
    """Write a report of a map (and analyses) as HTML or Markdown, chosen by the extension.

    Parameters
    ----------
    path : str or Path
        Destination: ``.html`` (or ``.htm``) for one self-contained page with
        every figure inline as SVG; ``.md`` for Markdown, whose figures are
        written beside it as ``<stem>-figure-<n>.svg`` and linked relatively.
    dmap : DomainMap
        The map the report is about.
    title : str, optional
        Title; default names the system and temperature.
    extra_sections : sequence, optional
        More sections: :class:`Section` objects or ``(heading, content)``
        pairs, where content is plain text (paragraphs split at blank lines),
        a list of dict rows (rendered as a table in the report's format) or a
        Section. All text is escaped.
    analyses : sequence, optional
        Results of :mod:`pourbaix.analyses` (``LeachWindow``, placed
        ``FieldData``, ``CorrosionReading``, ``SolubilityResult``,
        ``MapComparison``), each shown as a section with its table, notes and
        figure.
    figure : matplotlib Figure or Axes, or bool, optional
        The main figure; None draws the map (``pourbaix.plot.draw.draw_map``),
        False leaves it out.
    reading : bool
        Shade the corrosion reading on the drawn map.
    second_reference : str, optional
        Add a second potential axis vs this reference on the drawn map.

    Returns
    -------
    Path
        The report's path.

    Raises
    ------
    OptionError
        For an extension other than .html, .htm or .md, or a section or
        analysis the report cannot show.
    ExportError
        If the folder is missing or not writable; nothing is left behind.

    Examples
    --------
    >>> import os, tempfile
    >>> from pourbaix import compute_map
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     path = write_report(os.path.join(folder, "zn.html"), compute_map("Zn"))
    ...     "<svg" in path.read_text(encoding="utf-8")
    True
    """
    from pourbaix.outputs import check_writable

    p = Path(path)
    kind = report_kind(p)
    check_writable(p)
    doc = _build(
        dmap,
        title=title,
        extra_sections=extra_sections,
        analyses=analyses,
        figure=figure,
        reading=reading,
        second_reference=second_reference,
    )
    _write_doc(p, kind, doc)  # closes the figures
    return p


def _write_doc(p, kind, doc):
    """Write a built document (Markdown with its figures beside it: all of them or none)."""
    from pourbaix.outputs import (
        all_or_nothing,
        atomic_write_text,
        atomic_write_with,
        check_writable,
    )

    try:
        if kind == "html":
            atomic_write_text(p, _render_html(doc))
            return
        names = [f"{p.stem}-figure-{i + 1}.svg" for i in range(len(doc.figures))]
        for name in names:
            check_writable(p.with_name(name))
        # a Markdown report is complete with its figures, or absent (existing files untouched)
        with all_or_nothing():
            for (fig, _, _), name in zip(doc.figures, names, strict=True):
                svg = _svg_text(fig, text_as_text=False)
                atomic_write_with(
                    p.with_name(name),
                    lambda tmp, _svg=svg: Path(tmp).write_text(_svg, encoding="utf-8"),
                )
            atomic_write_text(p, _render_markdown(doc, names))
        return
    finally:
        _close(doc)


def write_document(path, *, title, facts=(), sections=(), cautions=(), figure=None, caption=""):
    """Write a report that is not about one map (a series, a cell, a couple of metals).

    Parameters
    ----------
    path : str or Path
        ``.html``/``.htm`` (one self-contained page) or ``.md`` (figures as sibling SVG files).
    title : str
        Title.
    facts : sequence of (str, str)
        Key facts shown under the title.
    sections : sequence
        :class:`Section` objects or ``(heading, content)`` pairs (see :func:`write_report`).
    cautions : sequence of str
        Cautions shown first; :data:`REPORT_CAUTIONS` are added after them.
    figure : matplotlib Figure or Axes, optional
        A main figure (closed after writing).
    caption : str
        Its caption.

    Returns
    -------
    Path
        The report's path.

    Raises
    ------
    OptionError
        For an unknown extension or a section the report cannot show.
    ExportError
        If the folder is missing or not writable; nothing is left behind.
    """
    from pourbaix import __version__
    from pourbaix.outputs import check_writable

    p = Path(path)
    kind = report_kind(p)
    check_writable(p)
    when = _dt.datetime.now(_dt.UTC).strftime("%Y-%m-%d %H:%M UTC")
    doc = _Doc(
        title=str(title),
        subtitle=f"pourbaix {__version__} · {when}",
        facts=[(str(k), str(v)) for k, v in facts],
        cautions=(*cautions, *REPORT_CAUTIONS),
    )
    if figure is not None:
        doc.figures.append((_figure_of(figure), caption or title, True))
    for k, item in enumerate(sections, 1):
        section = _as_section(item)
        fig_index = None
        if section.figure is not None:
            doc.figures.append((_figure_of(section.figure), section.caption or section.heading, True))
            fig_index = len(doc.figures) - 1
        doc.sections.append((f"section-{k}", section, fig_index))
    _write_doc(p, kind, doc)  # closes the figures
    return p
