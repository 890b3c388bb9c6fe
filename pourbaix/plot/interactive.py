"""An interactive map page: one self-contained HTML file (no network) with hover details and a slider.

The page carries one or more maps computed ahead (for a set of temperatures
or activities, say) as data, and draws them as SVG with a few lines of plain
JavaScript: hovering over the map shows the stable species, its state, the
margins to the nearest boundaries up, down, acid- and alkaline-wards, and the
equation of the nearest boundary; a slider steps through the maps; field
readings drawn on the map show their details on hover. Nothing is fetched:
fonts are the browser's own, no script or style comes from elsewhere.

The page is a thermodynamic prediction like every map; it says so.
"""

from __future__ import annotations

import html
import json
import math

from pourbaix.errors import OptionError
from pourbaix.plot.style import (
    STATE_NAMES,
    power_text,
    resolve_palette,
    system_text,
    typeset_formulas,
)

__all__ = ["interactive_page", "write_interactive"]

# the drawing area of the SVG [px]: viewBox and the plot frame inside it
_VIEW = (780, 560)
_FRAME = (72, 24, 700, 500)  # x0, y0, x1, y1
_LABEL_PT = 12.0  # [px] domain label size on the page
_CHAR_W = 0.6  # width of a character in units of the font size (an estimate for the fit test)

_CAUTION = (
    "A map is a thermodynamic prediction (equilibrium only): it says nothing about rates, film "
    "quality, pitting, crevices or microbiology. Decisions on cathodic protection, drinking water "
    "or leach chemistries are for local codes, the applicable standards and licensed practice."
)


def _typeset_reaction(text):
    """A reaction as the figures write it: formulas typeset, electrons as e⁻."""
    return typeset_formulas(text).replace(" e-", " e⁻").replace("H+", "H⁺")


def _frame_label(dmap, parameter):
    c = dmap.conditions
    if parameter == "temperature":
        return f"{c.temperature_c:g} °C"
    if parameter == "activity":
        if c.molality is not None:
            return f"{power_text(c.molality)} mol/kg"
        return f"activity {power_text(c.activity)}"
    return f"{c.temperature_c:g} °C"


def _label_spot(dmap, domain, taken):
    """Where a domain's label fits on the page [pH, V], clear of labels already placed; else None.

    Works in page pixels: candidates on a grid over the polygon are kept when
    the label's box (estimated from its length) lies inside the polygon and
    off the boxes taken; the one with the most room around it wins.
    """
    import numpy as np
    import shapely
    from shapely import affinity

    x0, x1 = dmap.conditions.ph_range
    y0, y1 = dmap.conditions.potential_range_v
    sx = (_FRAME[2] - _FRAME[0]) / (x1 - x0)
    sy = (_FRAME[3] - _FRAME[1]) / (y1 - y0)
    poly = affinity.scale(domain.polygon, xfact=sx, yfact=sy, origin=(0, 0))
    w = _CHAR_W * _LABEL_PT * len(domain.label) + 6
    h = 1.3 * _LABEL_PT
    bx0, by0, bx1, by1 = poly.bounds
    if bx1 - bx0 < w or by1 - by0 < h:
        return None
    gx, gy = np.meshgrid(
        np.linspace(bx0 + w / 2, bx1 - w / 2, 25), np.linspace(by0 + h / 2, by1 - h / 2, 19)
    )
    cx, cy = gx.ravel(), gy.ravel()
    boxes = shapely.box(cx - w / 2, cy - h / 2, cx + w / 2, cy + h / 2)
    ok = shapely.contains(poly, boxes)
    for other in taken:
        ok &= ~shapely.intersects(boxes, other)
    if not ok.any():
        return None
    # off the water lines where there is room
    lines = [
        shapely.LineString([(x0 * sx, (e0 + s * x0) * sy), (x1 * sx, (e0 + s * x1) * sy)])
        for e0, s in dmap.water.values()
    ]
    if lines:
        clear = ok & ~np.any([shapely.intersects(boxes, ln) for ln in lines], axis=0)
        if clear.any():
            ok = clear
    k = np.flatnonzero(ok)
    room = shapely.distance(shapely.points(cx[k], cy[k]), poly.exterior)
    best = k[int(np.argmax(room))]
    taken.append(boxes[best])
    return [round(float(cx[best] / sx), 6), round(float(cy[best] / sy), 6)]


def _frame_data(dmap, parameter, palette):
    from pourbaix.maps.lines import boundary_equations
    from pourbaix.plot.layers import domain_colours

    colours, pal = domain_colours(dmap, palette)
    c = dmap.conditions
    taken = []
    domains = []
    for k, d in enumerate(dmap.domains):
        spot = _label_spot(dmap, d, taken)
        domains.append(
            {
                "label": d.label,
                "state": d.state,
                "state_text": STATE_NAMES.get(d.state, d.state),
                "colour": colours[k],
                "points": [[round(x, 6), round(y, 6)] for x, y in d.polygon.exterior.coords[:-1]],
                "label_at": spot or [round(v, 6) for v in d.label_point],
                "show_label": spot is not None,
            }
        )
    boundaries = []
    for b, eq in zip(dmap.boundaries, boundary_equations(dmap), strict=True):
        boundaries.append(
            {
                "between": [typeset_formulas(s) for s in b.between],
                "start": [round(v, 6) for v in b.start],
                "end": [round(v, 6) for v in b.end],
                "reaction": _typeset_reaction(eq["reaction"]) if eq.get("reaction") else "",
                "e0": eq.get("e0_v_she"),
                "line": eq["line"],
            }
        )
    return {
        "label": _frame_label(dmap, parameter),
        "title": f"{system_text(c)}, {c.temperature_c:g} °C",
        "window": [*c.ph_range, *c.potential_range_v],
        "reference": c.reference,
        "water": {k: list(v) for k, v in dmap.water.items()},
        "water_colour": pal["water"],
        "domains": domains,
        "boundaries": boundaries,
        "warnings": [typeset_formulas(str(w)) for w in dmap.warnings],
    }


def _readings_data(readings):
    out = []
    for r in readings or ():
        ph, e = float(r["ph"]), float(r["potential_v"])
        if not (math.isfinite(ph) and math.isfinite(e)):
            raise OptionError(
                f"reading {r.get('label', '?')!r}: pH and potential must be finite numbers"
            )
        details = {str(k): str(v) for k, v in (r.get("details") or {}).items()}
        out.append({"label": str(r.get("label", "")), "ph": ph, "e": e, "details": details})
    return out


def interactive_page(maps, *, parameter=None, readings=None, title=None, palette="default"):
    """Build the interactive page for one map or several maps computed ahead.

    Parameters
    ----------
    maps : DomainMap or sequence of DomainMap
        One map, or maps for a set of temperatures or activities (the slider
        steps through them in the order given). All must be drawn vs one
        reference electrode.
    parameter : {"temperature", "activity"}, optional
        What differs between the maps (names the slider); None for one map.
    readings : sequence of dict, optional
        Field readings, each with ``ph``, ``potential_v`` [V vs the maps'
        reference], ``label`` and ``details`` (a dict shown on hover).
    title : str, optional
        Page title; by default the element system.
    palette : str or dict
        As for :func:`pourbaix.plot.maps.draw_map`.

    Returns
    -------
    str
        The HTML text of the page.

    Raises
    ------
    OptionError
        For no maps, maps vs different references, an unknown parameter or
        palette, or a reading that is not a finite point.

    Examples
    --------
    >>> from pourbaix import compute_map
    >>> page = interactive_page(compute_map("Zn"))
    >>> page.startswith("<!DOCTYPE html>") and "src=" not in page and "href=" not in page
    True
    """
    if hasattr(maps, "domains"):
        maps = [maps]
    maps = list(maps)
    if not maps:
        raise OptionError("interactive page: give at least one map")
    if parameter not in (None, "temperature", "activity"):
        raise OptionError(
            f"interactive page: unknown parameter {parameter!r}; valid: temperature, activity"
        )
    refs = {m.conditions.reference for m in maps}
    if len(refs) > 1:
        raise OptionError(
            "interactive page: every map must be drawn vs one reference electrode; got "
            + ", ".join(sorted(refs))
        )
    resolve_palette(palette)
    frames = [_frame_data(m, parameter, palette) for m in maps]
    data = {
        "frames": frames,
        "parameter": parameter or "",
        "readings": _readings_data(readings),
        "view": list(_VIEW),
        "frame": list(_FRAME),
    }
    heading = title or system_text(maps[0].conditions)
    payload = json.dumps(data, ensure_ascii=False, separators=(",", ":")).replace("</", "<\\/")
    slider_name = {"temperature": "temperature", "activity": "dissolved amount"}.get(
        parameter or "", "map"
    )
    return (
        _PAGE.replace("@TITLE@", html.escape(heading))
        .replace("@CAUTION@", html.escape(_CAUTION))
        .replace("@SLIDER_NAME@", html.escape(slider_name))
        .replace("@NFRAMES@", str(len(frames) - 1))
        .replace("@HIDE_SLIDER@", "" if len(frames) > 1 else " hidden")
        .replace("@DATA@", payload)
    )


def write_interactive(path, maps, **options):
    """Write :func:`interactive_page` to ``path`` (all or nothing).

    Parameters
    ----------
    path : str or Path
        Destination ``.html`` file.
    maps : DomainMap or sequence of DomainMap
        As for :func:`interactive_page`.
    **options
        Passed to :func:`interactive_page`.

    Returns
    -------
    str or Path
        ``path``, as given.

    Raises
    ------
    OptionError
        As for :func:`interactive_page`.
    ExportError
        If the file cannot be written; nothing is left half-written.
    """
    from pourbaix.outputs import atomic_write_text

    atomic_write_text(path, interactive_page(maps, **options))
    return path


_PAGE = r"""<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>@TITLE@</title>
<style>
body { font-family: "DejaVu Sans", "Segoe UI", Helvetica, Arial, sans-serif; color: #1f1f1f;
       margin: 16px 24px; background: #ffffff; }
h1 { font-size: 20px; margin: 0 0 6px 0; }
#layout { display: flex; flex-wrap: wrap; gap: 18px; align-items: flex-start; }
#map { width: 780px; height: 560px; flex: none; border: 0; }
#panel { width: 300px; flex: none; font-size: 13px; line-height: 1.45; border: 1px solid #c8c8c8;
         border-radius: 4px; padding: 10px 12px; min-height: 240px; }
#panel h2 { font-size: 15px; margin: 0 0 4px 0; }
#panel table { border-collapse: collapse; }
#panel td { padding: 1px 8px 1px 0; vertical-align: top; }
#controls { margin: 6px 0 10px 0; font-size: 14px; }
#controls input { width: 320px; vertical-align: middle; }
.caution { font-size: 12px; color: #4a4a4a; max-width: 1150px; }
.warn { font-size: 12px; color: #6a4a1a; }
svg text { font-family: inherit; }
.hint { color: #5a5a5a; }
</style>
</head>
<body>
<h1 id="title">@TITLE@</h1>
<div id="controls"@HIDE_SLIDER@>
  <label for="frame">@SLIDER_NAME@:</label>
  <input id="frame" type="range" min="0" max="@NFRAMES@" step="1" value="0">
  <output id="frame-label" for="frame"></output>
</div>
<div id="layout">
  <svg id="map" xmlns="http://www.w3.org/2000/svg" role="img" aria-label="potential-pH map"></svg>
  <div id="panel" aria-live="polite"><p class="hint">Point at the map for the stable species,
  its state, the margins to the boundaries and the nearest boundary's equation.</p></div>
</div>
<ul id="warnings" class="warn"></ul>
<p class="caution">@CAUTION@</p>
<script id="map-data" type="application/json">@DATA@</script>
<script>
"use strict";
const DATA = JSON.parse(document.getElementById("map-data").textContent);
const SVG = "http://www.w3.org/2000/svg";
const svg = document.getElementById("map");
const panel = document.getElementById("panel");
const slider = document.getElementById("frame");
const frameLabel = document.getElementById("frame-label");
const [VW, VH] = DATA.view;
const [FX0, FY0, FX1, FY1] = DATA.frame;
svg.setAttribute("viewBox", "0 0 " + VW + " " + VH);
let current = 0;

function el(name, attrs, parent, text) {
  const e = document.createElementNS(SVG, name);
  for (const k in attrs) e.setAttribute(k, attrs[k]);
  if (text !== undefined) e.textContent = text;
  if (parent) parent.appendChild(e);
  return e;
}
function fr() { return DATA.frames[current]; }
function sx(ph) { const w = fr().window; return FX0 + (ph - w[0]) / (w[1] - w[0]) * (FX1 - FX0); }
function sy(e) { const w = fr().window; return FY1 - (e - w[2]) / (w[3] - w[2]) * (FY1 - FY0); }
function toData(px, py) {
  const w = fr().window;
  return [w[0] + (px - FX0) / (FX1 - FX0) * (w[1] - w[0]), w[2] + (FY1 - py) / (FY1 - FY0) * (w[3] - w[2])];
}
function inside(pts, x, y) {
  let c = false;
  for (let i = 0, j = pts.length - 1; i < pts.length; j = i++) {
    const [xi, yi] = pts[i], [xj, yj] = pts[j];
    if ((yi > y) !== (yj > y) && x < (xj - xi) * (y - yi) / (yj - yi) + xi) c = !c;
  }
  return c;
}
function domainAt(x, y) {
  const ds = fr().domains;
  for (let k = 0; k < ds.length; k++) if (inside(ds[k].points, x, y)) return k;
  return -1;
}
// where a vertical (or horizontal) line through the point leaves the domain
function exits(pts, x, y, vertical) {
  let lo = -Infinity, hi = Infinity;
  for (let i = 0, j = pts.length - 1; i < pts.length; j = i++) {
    const [ax, ay] = pts[j], [bx, by] = pts[i];
    const [a, b, pa, pb, q] = vertical ? [ax, bx, ay, by, x] : [ay, by, ax, bx, y];
    if ((a - q) * (b - q) > 0 || a === b) continue;
    const t = (q - a) / (b - a), v = pa + t * (pb - pa), here = vertical ? y : x;
    if (v >= here && v < hi) hi = v;
    if (v <= here && v > lo) lo = v;
  }
  return [lo, hi];
}
function neighbour(x, y) { const k = domainAt(x, y); return k < 0 ? "" : fr().domains[k].label; }
function fmtMargin(v, unit) {
  if (!isFinite(v)) return "none (edge of the window)";
  return unit === "V" ? (v * 1000).toFixed(0) + " mV" : v.toFixed(2) + " pH";
}
function nearestBoundary(x, y) {
  const w = fr().window, kx = 1 / (w[1] - w[0]), ky = 1 / (w[3] - w[2]);
  let best = -1, bestD = Infinity;
  fr().boundaries.forEach((b, k) => {
    const ax = b.start[0] * kx, ay = b.start[1] * ky, bx = b.end[0] * kx, by = b.end[1] * ky;
    const px = x * kx, py = y * ky, dx = bx - ax, dy = by - ay;
    const L = dx * dx + dy * dy;
    let t = L > 0 ? ((px - ax) * dx + (py - ay) * dy) / L : 0;
    t = Math.max(0, Math.min(1, t));
    const d = Math.hypot(px - ax - t * dx, py - ay - t * dy);
    if (d < bestD) { bestD = d; best = k; }
  });
  return best;
}
function row(name, value, id) {
  return "<tr><td>" + name + "</td><td" + (id ? ' id="' + id + '"' : "") + ">" + value + "</td></tr>";
}
function esc(s) { return String(s).replace(/[&<>"]/g, c => ({"&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;"}[c])); }
function showPoint(x, y) {
  const k = domainAt(x, y);
  if (k < 0) return;
  const d = fr().domains[k], ref = fr().reference, eps = 1e-6;
  const [down, up] = exits(d.points, x, y, true);
  const [acid, base] = exits(d.points, x, y, false);
  const w = fr().window;
  const m = v => (v === Infinity || v === -Infinity) ? Infinity : v;
  const upM = up >= w[3] - eps ? Infinity : up - y, downM = down <= w[2] + eps ? Infinity : y - down;
  const acidM = acid <= w[0] + eps ? Infinity : x - acid, baseM = base >= w[1] - eps ? Infinity : base - x;
  let h = '<h2 id="probe-species">' + esc(d.label) + "</h2>";
  h += '<div id="probe-state">' + esc(d.state_text) + "</div><table>";
  h += row("pH", x.toFixed(2), "probe-ph") + row("E", y.toFixed(3) + " V vs " + esc(ref), "probe-e");
  h += row("up", fmtMargin(m(upM), "V") + (isFinite(upM) ? " → " + esc(neighbour(x, up + eps)) : ""), "probe-up");
  h += row("down", fmtMargin(m(downM), "V") + (isFinite(downM) ? " → " + esc(neighbour(x, down - eps)) : ""), "probe-down");
  h += row("acid", fmtMargin(m(acidM), "pH") + (isFinite(acidM) ? " → " + esc(neighbour(acid - eps, y)) : ""), "probe-acid");
  h += row("alkaline", fmtMargin(m(baseM), "pH") + (isFinite(baseM) ? " → " + esc(neighbour(base + eps, y)) : ""), "probe-alkaline");
  h += "</table>";
  const b = nearestBoundary(x, y);
  if (b >= 0) {
    const B = fr().boundaries[b];
    h += '<div id="probe-boundary"><b>nearest boundary:</b> ' + esc(B.between.join(" | ")) + "<br>";
    if (B.reaction) h += esc(B.reaction) + "<br>";
    if (B.e0 !== null && B.e0 !== undefined) h += "E° = " + B.e0.toFixed(4) + " V vs SHE<br>";
    h += esc(B.line) + "</div>";
  }
  if (d.state === "passivation") h += '<p class="hint">A solid is stable here; whether it protects is a kinetic question.</p>';
  panel.innerHTML = h;
  marker.setAttribute("cx", sx(x)); marker.setAttribute("cy", sy(y));
  marker.setAttribute("visibility", "visible");
}
function showReading(r) {
  let h = '<h2 id="reading-name">' + esc(r.label || "reading") + "</h2><table>";
  h += row("pH", r.ph.toFixed(2)) + row("E", r.e.toFixed(3) + " V vs " + esc(fr().reference));
  for (const k in r.details) h += row(esc(k), esc(r.details[k]));
  h += "</table>";
  const k = domainAt(r.ph, r.e);
  if (k >= 0) h += "<p>on this map: " + esc(fr().domains[k].label) + " (" + esc(fr().domains[k].state_text) + ")</p>";
  panel.innerHTML = h;
}
let marker;
function draw() {
  const f = fr();
  while (svg.firstChild) svg.removeChild(svg.firstChild);
  const clip = el("clipPath", {id: "frame-clip"}, el("defs", {}, svg));
  el("rect", {x: FX0, y: FY0, width: FX1 - FX0, height: FY1 - FY0}, clip);
  const g = el("g", {"clip-path": "url(#frame-clip)", id: "domains"}, svg);
  f.domains.forEach((d, k) => {
    el("polygon", {points: d.points.map(p => sx(p[0]) + "," + sy(p[1])).join(" "), fill: d.colour,
                   stroke: "none", "data-species": d.label, "data-state": d.state, class: "domain"}, g);
  });
  f.boundaries.forEach(b => el("line", {x1: sx(b.start[0]), y1: sy(b.start[1]), x2: sx(b.end[0]),
    y2: sy(b.end[1]), stroke: "#1f1f1f", "stroke-width": 1.2, class: "boundary"}, g));
  for (const key of ["oxygen", "hydrogen"]) {
    if (!f.water[key]) continue;
    const [e0, s] = f.water[key], w = f.window;
    el("line", {x1: sx(w[0]), y1: sy(e0 + s * w[0]), x2: sx(w[1]), y2: sy(e0 + s * w[1]),
      stroke: f.water_colour, "stroke-width": 1.3, "stroke-dasharray": "7 4", class: "water"}, g);
  }
  f.domains.forEach(d => { if (d.show_label) el("text", {x: sx(d.label_at[0]), y: sy(d.label_at[1]),
    "text-anchor": "middle", "dominant-baseline": "central", "font-size": @LABEL@, class: "label",
    fill: "#1f1f1f", "pointer-events": "none"}, g, d.label); });
  el("rect", {x: FX0, y: FY0, width: FX1 - FX0, height: FY1 - FY0, fill: "none", stroke: "#1f1f1f",
              "stroke-width": 1.2}, svg);
  const w = f.window;
  for (let ph = Math.ceil(w[0]); ph <= w[1] + 1e-9; ph += 2) {
    el("line", {x1: sx(ph), y1: FY1, x2: sx(ph), y2: FY1 + 5, stroke: "#1f1f1f"}, svg);
    el("text", {x: sx(ph), y: FY1 + 19, "text-anchor": "middle", "font-size": 12}, svg, String(ph).replace("-", "−"));
  }
  const step = (w[3] - w[2]) > 2.5 ? 0.5 : 0.25;
  for (let e = Math.ceil(w[2] / step) * step; e <= w[3] + 1e-9; e += step) {
    el("line", {x1: FX0 - 5, y1: sy(e), x2: FX0, y2: sy(e), stroke: "#1f1f1f"}, svg);
    el("text", {x: FX0 - 8, y: sy(e) + 4, "text-anchor": "end", "font-size": 12}, svg, e.toFixed(1).replace("-", "−"));
  }
  el("text", {x: (FX0 + FX1) / 2, y: VH - 18, "text-anchor": "middle", "font-size": 14}, svg, "pH");
  el("text", {x: 16, y: (FY0 + FY1) / 2, "text-anchor": "middle", "font-size": 14,
              transform: "rotate(-90 16 " + (FY0 + FY1) / 2 + ")"}, svg, "E / V vs " + f.reference);
  const rg = el("g", {id: "readings"}, svg);
  DATA.readings.forEach((r, k) => {
    const c = el("rect", {x: sx(r.ph) - 5, y: sy(r.e) - 5, width: 10, height: 10, fill: "#ffffff",
      stroke: "#111111", "stroke-width": 1.6, transform: "rotate(45 " + sx(r.ph) + " " + sy(r.e) + ")",
      class: "reading", "data-index": k}, rg);
    el("title", {}, c, r.label);
    c.addEventListener("mouseenter", ev => { ev.stopPropagation(); showReading(r); });
  });
  marker = el("circle", {r: 4, fill: "none", stroke: "#c65a00", "stroke-width": 2, visibility: "hidden",
                         "pointer-events": "none", id: "marker"}, svg);
  frameLabel.textContent = f.label;
  document.getElementById("title").textContent = f.title;
  const ul = document.getElementById("warnings");
  ul.innerHTML = "";
  f.warnings.forEach(t => { const li = document.createElement("li"); li.textContent = t; ul.appendChild(li); });
}
svg.addEventListener("mousemove", ev => {
  if (ev.target.classList && ev.target.classList.contains("reading")) return;
  const pt = svg.createSVGPoint(); pt.x = ev.clientX; pt.y = ev.clientY;
  const p = pt.matrixTransform(svg.getScreenCTM().inverse());
  if (p.x < FX0 || p.x > FX1 || p.y < FY0 || p.y > FY1) return;
  const [x, y] = toData(p.x, p.y);
  showPoint(x, y);
});
slider.addEventListener("input", () => { current = Number(slider.value); draw(); });
draw();
</script>
</body>
</html>
""".replace("@LABEL@", f"{_LABEL_PT:g}")
