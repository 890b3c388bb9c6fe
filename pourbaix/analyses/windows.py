"""Leach and separation windows: where one element dissolves while others stay solid."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from pourbaix.analyses.limits import REAL_SOLUTION_PH_MAX, amount_text
from pourbaix.analyses.solubility import (
    DEFAULT_TOLERANCE,
    check_basis,
    check_level,
    solubility,
    solubility_region,
)
from pourbaix.errors import ConditionsError, OptionError
from pourbaix.frames import Tabular

__all__ = [
    "LeachWindow",
    "leach_window",
    "describe_window",
]


@dataclass
class LeachWindow(Tabular):
    """A leach (separation) window and how much room it leaves.

    Attributes
    ----------
    dissolve : str
        Element to dissolve.
    keep_solid : tuple of str
        Elements to keep solid (or dissolved below their level).
    min_dissolved : float
        Level the target must reach [mol/kg].
    max_dissolved : dict
        Element -> level each kept element must stay under [mol/kg].
    basis : str
        ``total`` (sum over dissolved species) or ``species`` (each species on its own).
    within_water : bool
        Whether the window was limited to the stability field of water.
    region : shapely.Geometry
        The window in (pH, E vs ``reference``) [-, V]; empty when there is none.
    area : float
        Its area [pH V].
    ph_bounds : tuple of float or None
        Lowest and highest pH of the window.
    potential_bounds_v : tuple of float or None
        Lowest and highest potential of the window [V vs ``reference``].
    best_point : tuple of float or None
        (pH, E) farthest from the window's edges, with the potential scaled by
        the Nernst factor (one pH unit weighs as much as k_T volts) [-, V].
    margins : dict
        At ``best_point``: ``acid_ph`` and ``alkaline_ph`` (room towards lower
        and higher pH at that potential) [pH units], ``down_v`` and ``up_v``
        (room towards lower and higher potential at that pH) [V].
    solubility_at_best : dict
        Element -> total dissolved at ``best_point`` [mol/kg].
    reasons : list of str
        Why the window is empty (empty list otherwise).
    maps : dict
        Element -> DomainMap used.
    reference : str
        Reference electrode of all potentials.
    notes : list of str
        Method and cautions.
    """

    dissolve: str
    keep_solid: tuple
    min_dissolved: float
    max_dissolved: dict
    basis: str
    within_water: bool
    region: object
    area: float
    ph_bounds: tuple | None
    potential_bounds_v: tuple | None
    best_point: tuple | None
    margins: dict
    solubility_at_best: dict
    reasons: list
    maps: dict
    reference: str
    notes: list = field(default_factory=list)

    @property
    def empty(self):
        """True when no point meets every condition."""
        return self.region.is_empty or self.area <= 0.0

    @property
    def components(self):
        """The separate parts of the window, largest first.

        Returns
        -------
        list of dict
            ``area`` [pH V], ``ph_bounds`` and ``potential_bounds_v`` [V] of each part.
        """
        from pourbaix.analyses.solubility import polygon_parts

        parts = sorted(polygon_parts(self.region), key=lambda g: -g.area)
        return [
            {
                "area": float(g.area),
                "ph_bounds": (g.bounds[0], g.bounds[2]),
                "potential_bounds_v": (g.bounds[1], g.bounds[3]),
            }
            for g in parts
        ]

    def rows(self):
        """One plain dict per separate part of the window, largest first (none when empty).

        Returns
        -------
        list of dict
            ``part``, ``area_ph_v`` [pH V], ``ph_low``, ``ph_high``, and
            ``potential_low_v``, ``potential_high_v`` [V vs ``reference``].
        """
        return [
            {
                "part": k,
                "area_ph_v": c["area"],
                "ph_low": float(c["ph_bounds"][0]),
                "ph_high": float(c["ph_bounds"][1]),
                f"potential_low_v_vs_{self.reference}": float(c["potential_bounds_v"][0]),
                f"potential_high_v_vs_{self.reference}": float(c["potential_bounds_v"][1]),
            }
            for k, c in enumerate(self.components, 1)
        ]

    def contains(self, ph, potential_v):
        """Whether points lie in the window (edges included).

        Parameters
        ----------
        ph : float or array_like
            pH [-].
        potential_v : float or array_like
            Potential [V vs ``reference``].

        Returns
        -------
        bool or ndarray of bool
        """
        import shapely

        x, y = np.broadcast_arrays(
            np.asarray(ph, dtype=float), np.asarray(potential_v, dtype=float)
        )
        pts = shapely.points(x, y)
        inside = shapely.covers(self.region, pts)
        return bool(inside) if np.ndim(inside) == 0 else inside

    def to_dict(self):
        """The window as plain data (JSON-ready): numbers, bounds, margins and polygon rings.

        Returns
        -------
        dict
        """
        from pourbaix.analyses.solubility import polygon_parts

        rings = []
        for part in polygon_parts(self.region):
            rings.append(
                [[round(float(a), 6), round(float(b), 6)] for a, b in part.exterior.coords[:-1]]
            )
        return {
            "dissolve": self.dissolve,
            "keep_solid": list(self.keep_solid),
            "min_dissolved_mol_kg": self.min_dissolved,
            "max_dissolved_mol_kg": dict(self.max_dissolved),
            "basis": self.basis,
            "within_water": self.within_water,
            "reference": self.reference,
            "empty": self.empty,
            "area_ph_v": self.area,
            "ph_bounds": None if self.ph_bounds is None else list(self.ph_bounds),
            "potential_bounds_v": None
            if self.potential_bounds_v is None
            else list(self.potential_bounds_v),
            "best_point": None if self.best_point is None else list(self.best_point),
            "margins": dict(self.margins),
            "solubility_at_best_mol_kg": dict(self.solubility_at_best),
            "reasons": list(self.reasons),
            "components": [
                {
                    "area_ph_v": c["area"],
                    "ph_bounds": list(c["ph_bounds"]),
                    "potential_bounds_v": list(c["potential_bounds_v"]),
                }
                for c in self.components
            ],
            "polygons": rings,
            "notes": list(self.notes),
        }


_NOTE_METHOD = (
    "window = {target: dissolved >= level} ∩ {each kept element: dissolved <= its level}, each the exact "
    "solubility region of that element's own map (pourbaix.analyses.solubility): straight edges exact, curved "
    "edges of the total-solubility basis traced on the safe side, so every point of the window meets every "
    "condition"
)
_NOTE_CAUTION = (
    "Thermodynamic window only: rates, passivating films, galvanic coupling between minerals and the "
    "reagents' own hazards (acid mist, H2S from sulfides, cyanide) decide in practice; leach chemistries are "
    "for the applicable standards and licensed practice."
)


def _elements(value, what):
    if isinstance(value, str):
        value = value.replace(",", " ").split()
    out = tuple(str(v).strip() for v in value)
    if not all(out):
        raise OptionError(f"{what}: give element symbols such as Fe")
    return out


def _water_region(dmap):
    from shapely.geometry import Polygon

    x0, x1, y0, y1 = dmap.window
    e_o, s_o = dmap.water["oxygen"]
    e_h, s_h = dmap.water["hydrogen"]
    far = 1e3
    # between the H2O/H2 line (below) and the O2/H2O line (above), inside the window
    band = Polygon(
        [
            (x0 - far, e_h + s_h * (x0 - far)),
            (x1 + far, e_h + s_h * (x1 + far)),
            (x1 + far, e_o + s_o * (x1 + far)),
            (x0 - far, e_o + s_o * (x0 - far)),
        ]
    )
    return band.intersection(Polygon([(x0, y0), (x1, y0), (x1, y1), (x0, y1)]))


def _best_point(region, k):
    """Pole of inaccessibility (Garcia-Castellanos & Lombardo 2007) with E scaled by 1/k, via shapely's polylabel."""
    from shapely import affinity
    from shapely.ops import polylabel

    from pourbaix.analyses.solubility import polygon_parts

    best, radius = None, -1.0
    for part in polygon_parts(region):
        scaled = affinity.scale(part, xfact=1.0, yfact=1.0 / k, origin=(0.0, 0.0))
        p = polylabel(scaled, tolerance=1e-6)
        r = scaled.exterior.distance(p)
        for hole in scaled.interiors:
            r = min(r, hole.distance(p))
        if r > radius:
            best, radius = (float(p.x), float(p.y) * k), float(r)
    return best, radius


def _span(region, point, horizontal, window):
    """Room from the point to the region's edge along a horizontal or vertical line."""
    import shapely
    from shapely.geometry import LineString, Point

    x0, x1, y0, y1 = window
    px, py = point
    line = (
        LineString([(x0 - 1, py), (x1 + 1, py)])
        if horizontal
        else LineString([(px, y0 - 1), (px, y1 + 1)])
    )
    inter = shapely.intersection(region, line)
    parts = [inter] if inter.geom_type == "LineString" else list(getattr(inter, "geoms", []))
    p = Point(px, py)
    for seg in parts:
        if seg.geom_type != "LineString" or seg.distance(p) > 1e-9:
            continue
        xs, ys = np.asarray(seg.coords).T
        if horizontal:
            return px - float(xs.min()), float(xs.max()) - px
        return py - float(ys.min()), float(ys.max()) - py
    return 0.0, 0.0


def _why_empty(target, keep, regions, water, lo_level, hi_levels, what, area_tol):
    """Which condition rules the window out, in words."""

    def none(g):
        return g.is_empty or g.area <= area_tol

    outside = "only outside the stability field of water (above the O2/H2O or below the H2O/H2 line; --beyond-water lifts that limit)"
    inside = {
        el: g if water is None else g.intersection(water, grid_size=1e-10)
        for el, g in regions.items()
    }
    reasons = []
    if none(regions[target]):
        reasons.append(f"{target} is nowhere {what} at {lo_level:g} mol/kg or more in the window")
    elif none(inside[target]):
        reasons.append(f"{target} reaches {lo_level:g} mol/kg {outside}")
    for el in keep:
        if none(regions[el]):
            reasons.append(
                f"{el} is {what} above {hi_levels[el]:g} mol/kg everywhere in the window"
            )
        elif none(inside[el]):
            reasons.append(f"{el} stays at or below {hi_levels[el]:g} mol/kg {outside}")
    if not reasons:
        for el in keep:
            if none(inside[target].intersection(inside[el], grid_size=1e-10)):
                reasons.append(
                    f"wherever {target} reaches {lo_level:g} mol/kg, {el} is {what} above {hi_levels[el]:g} mol/kg"
                )
    if not reasons:
        reasons.append(
            "the target's level can be met together with each kept element's limit, but not with all of them at "
            "once: " + ", ".join(keep)
        )
    return reasons


def leach_window(
    dissolve,
    keep_solid=(),
    min_dissolved=1e-2,
    max_dissolved=1e-5,
    *,
    basis="total",
    within_water=True,
    tolerance=DEFAULT_TOLERANCE,
    maps=None,
    **conditions,
):
    """Find the region where one element dissolves while others stay solid.

    Parameters
    ----------
    dissolve : str
        Element to dissolve, e.g. "Cu".
    keep_solid : str or sequence of str
        Elements to keep solid, e.g. ["Fe"]; each may stay dissolved below
        its ``max_dissolved`` level.
    min_dissolved : float
        Total dissolved target element the window must reach [mol/kg].
    max_dissolved : float or dict
        Highest total dissolved amount allowed for each kept element, one
        value for all or element -> value [mol/kg].
    basis : {"total", "species"}
        ``total``: sum over every dissolved species of the element;
        ``species``: each dissolved species on its own (the map convention).
    within_water : bool
        Limit the window to the stability field of water (between the H2O/H2
        and O2/H2O lines at 1 bar), the potentials a leach can hold.
    tolerance : float
        Chord tolerance of curved edges, window-normalised [-].
    maps : dict, optional
        Element -> precomputed single-element DomainMap (same window and
        reference); then no ``conditions`` may be given.
    **conditions
        Keyword arguments of :func:`pourbaix.maps.domain_map.compute_map`
        (temperature_c, ligands, reference, ph_range, potential_range_v ...),
        used for every element's map.

    Returns
    -------
    LeachWindow

    Raises
    ------
    OptionError
        For a target also listed as kept, an element missing from ``maps``, or
        maps with different windows or references.
    ConditionsError
        For levels that are not positive numbers.

    Notes
    -----
    Each element's solubility region is exact (see
    :func:`pourbaix.analyses.solubility.solubility_region`); the window is
    their intersection (shapely). The best point is the pole of
    inaccessibility (Garcia-Castellanos & Lombardo 2007, Scott. Geogr. J.
    123, 227; computed with shapely's ``polylabel``) with potentials scaled
    by 1/k_T, so one pH unit of room
    weighs as much as k_T (59 mV at 25 °C) of potential room - the Nernst
    equivalence of a tenfold change in H+ activity.

    Examples
    --------
    >>> w = leach_window("Cu", ["Fe"], 1e-2, 1e-5, ligands={"S": 0.1})
    >>> w.empty, 1.5 < w.best_point[0] < 5.0
    (False, True)
    """
    from shapely.geometry import Polygon

    check_basis(basis)
    target = _elements(dissolve, "dissolve")
    if len(target) != 1:
        raise OptionError(
            f"dissolve: give one element to dissolve, got {' '.join(target) or 'none'}"
        )
    target = target[0]
    keep = _elements(keep_solid, "keep_solid") if keep_solid else ()
    if target in keep:
        raise OptionError(f"{target} is both the element to dissolve and one to keep solid")
    if len(set(keep)) != len(keep):
        raise OptionError(f"keep_solid lists an element twice: {' '.join(keep)}")
    lo_level = check_level(min_dissolved, "min_dissolved")
    if isinstance(max_dissolved, dict):
        unknown = set(max_dissolved) - set(keep)
        if unknown:
            raise OptionError(
                f"max_dissolved names {', '.join(sorted(unknown))}, not among the kept elements {', '.join(keep) or '(none)'}"
            )
        missing = [el for el in keep if el not in max_dissolved]
        if missing:
            raise OptionError(f"max_dissolved: give a level for {', '.join(missing)} too")
        hi_levels = {el: check_level(max_dissolved[el], f"max_dissolved[{el}]") for el in keep}
    else:
        v = check_level(max_dissolved, "max_dissolved")
        hi_levels = {el: v for el in keep}

    if maps is not None:
        if conditions:
            raise OptionError("give either precomputed maps or conditions, not both")
        missing = [el for el in (target, *keep) if el not in maps]
        if missing:
            raise OptionError(f"maps: no map given for {', '.join(missing)}")
        maps = {el: maps[el] for el in (target, *keep)}
    else:
        from pourbaix.maps.domain_map import compute_map
        from pourbaix.tables.species import load_species

        if "table" not in conditions:
            conditions["table"] = load_species(
                conditions.get("dataset", "default"), tuple(conditions.get("data_files", ()))
            )
        maps = {el: compute_map(el, **conditions) for el in (target, *keep)}
    tmap = maps[target]
    frames = {
        (m.window, m.conditions.reference, round(m.conditions.reference_offset_v, 12))
        for m in maps.values()
    }
    if len(frames) > 1:
        raise OptionError(
            "the maps of a window must share one pH/potential window and one reference electrode"
        )

    k = float(tmap.conditions.nernst_v)
    regions = {
        target: solubility_region(tmap, lo_level, side="above", basis=basis, tolerance=tolerance)
    }
    for el in keep:
        regions[el] = solubility_region(
            maps[el], hi_levels[el], side="below", basis=basis, tolerance=tolerance
        )
    x0, x1, y0, y1 = tmap.window
    region = Polygon([(x0, y0), (x1, y0), (x1, y1), (x0, y1)])
    for g in regions.values():
        region = region.intersection(g, grid_size=1e-10)
    water = _water_region(tmap) if within_water else None
    if water is not None:
        region = region.intersection(water, grid_size=1e-10)
    area_tol = 1e-10 * (x1 - x0) * (y1 - y0)
    reasons = []
    what = "dissolved (total)" if basis == "total" else "dissolved (any one species)"
    if region.area <= area_tol:
        reasons = _why_empty(target, keep, regions, water, lo_level, hi_levels, what, area_tol)
    empty = bool(reasons)
    if empty:
        from shapely.geometry import Polygon as _P

        region = _P()
    best, margins, at_best = None, {}, {}
    ph_b = e_b = None
    if not empty:
        bx0, by0, bx1, by1 = region.bounds
        ph_b, e_b = (bx0, bx1), (by0, by1)
        best, radius = _best_point(region, k)
        acid, alk = _span(region, best, True, tmap.window)
        down, up = _span(region, best, False, tmap.window)
        margins = {
            "acid_ph": acid,
            "alkaline_ph": alk,
            "down_v": down,
            "up_v": up,
            "inscribed_radius_ph": radius,
        }
        for el, m in maps.items():
            at_best[el] = float(solubility(m, best[0], best[1]).total_molality)
    notes = [_NOTE_METHOD]
    if within_water:
        notes.append("limited to the stability field of water at 1 bar H2 and O2")
    for m in maps.values():
        notes += [w for w in m.warnings if w not in notes]
        if m.conditions.ligands:
            notes.append(
                "ligand taken at its total activity (predominant-ligand method, no mass balance): a window "
                "that needs more ligand than is present is optimistic"
            )
            break
    notes.append(_NOTE_CAUTION)
    return LeachWindow(
        dissolve=target,
        keep_solid=keep,
        min_dissolved=lo_level,
        max_dissolved=hi_levels,
        basis=basis,
        within_water=bool(within_water),
        region=region,
        area=0.0 if empty else float(region.area),
        ph_bounds=ph_b,
        potential_bounds_v=e_b,
        best_point=best,
        margins=margins,
        solubility_at_best=at_best,
        reasons=reasons,
        maps=maps,
        reference=tmap.conditions.reference,
        notes=notes,
    )


def _fmt_bounds(b, unit):
    if b is None:
        return "-"
    if unit == "V":
        return f"{b[0]:+.3f} .. {b[1]:+.3f} V"
    return f"{b[0]:.2f} .. {b[1]:.2f}"


_BEYOND_PH = "more than 1 mol/kg hydroxide, beyond any real solution"


def describe_window(window):
    """Plain-text lines describing a window (used by the command line)."""
    out = []
    w = window
    keep = (
        ", ".join(f"{el} <= {w.max_dissolved[el]:g}" for el in w.keep_solid)
        or "(no element kept solid)"
    )
    out.append(
        f"Window: {w.dissolve} dissolved >= {w.min_dissolved:g} mol/kg; {keep} mol/kg ({w.basis} basis), potentials vs {w.reference}"
    )
    if w.empty:
        out.append("  no window:")
        out += [f"    - {r}" for r in w.reasons]
        return out
    out.append(f"  area:       {w.area:.4g} pH·V")
    out.append(f"  pH:         {_fmt_bounds(w.ph_bounds, 'pH')}")
    out.append(f"  potential:  {_fmt_bounds(w.potential_bounds_v, 'V')}")
    parts = w.components
    if len(parts) > 1:
        out.append(f"  {len(parts)} separate parts:")
        for c in parts:
            flag = (
                f" (above pH {REAL_SOLUTION_PH_MAX:g}: {_BEYOND_PH})"
                if c["ph_bounds"][0] >= REAL_SOLUTION_PH_MAX
                else ""
            )
            out.append(
                f"    pH {_fmt_bounds(c['ph_bounds'], 'pH')}, E {_fmt_bounds(c['potential_bounds_v'], 'V')}, area {c['area']:.3g} pH·V{flag}"
            )
    bx, by = w.best_point
    out.append(f"  best point: pH {bx:.2f}, E = {by:+.3f} V")
    m = w.margins
    out.append(
        f"  room there: {m['acid_ph']:.2f} pH acid-ward, {m['alkaline_ph']:.2f} pH alkali-ward, "
        f"{m['down_v'] * 1000:.0f} mV down, {m['up_v'] * 1000:.0f} mV up"
    )
    out.append(
        "  dissolved there: "
        + ", ".join(f"{el} {amount_text(v)}" for el, v in w.solubility_at_best.items())
    )
    if not math.isfinite(w.area):
        raise ConditionsError("window area is not finite")
    return out


# old private names, kept one release for code not yet moved to the public ones
_describe = describe_window
