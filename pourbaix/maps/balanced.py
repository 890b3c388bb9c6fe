"""Mass-balanced maps: totals of metal and ligands conserved, curved boundaries traced.

Where metal and ligand totals are comparable (a cyanide or ammonia leach, a
chloride brine), the ligand is consumed by the metal it binds and the
predominant-ligand method (:mod:`pourbaix.maps.systems`) no longer holds. Here
the equilibrium is solved with both mass balances
(:mod:`pourbaix.solve.equilibrium`) and each point is read by the criterion
:data:`CRITERION`; the boundaries, now curves, are traced by
:mod:`pourbaix.solve.trace` and the domains assembled as shapely polygons in a
:class:`BalancedMap`, a :class:`~pourbaix.maps.result.DomainMap`, so drawing,
export, reports and analyses take it unchanged.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, field

import numpy as np

from pourbaix.errors import ConditionsError, OptionError
from pourbaix.maps.result import Boundary, Domain, DomainMap, Entry, ProbeResult, state_of

__all__ = ["CRITERION", "BalancedMap", "TracedCurve", "compute_balanced_map", "point_key"]

#: How the domains of a mass-balanced map are defined ({metal} is filled in per map).
CRITERION = (
    "the solid phases present where the totals saturate them (phase rule); elsewhere the "
    "dissolved species holding the largest share of the dissolved {metal}"
)


@dataclass(frozen=True)
class TracedCurve:
    """One traced boundary of a mass-balanced map.

    Attributes
    ----------
    between : tuple of str
        The two domains (names as in ``domains``).
    points : numpy.ndarray, shape (k, 2)
        Vertices (pH, E vs the map's reference) [-, V]; each lies within the
        map's tolerance of the boundary, and so does each chord's midpoint.
    """

    between: tuple
    points: np.ndarray


def _chain(segments, names):
    """Join the traced pieces of each pair of domains into polylines, end to end.

    Pieces of one boundary share their end points exactly (neighbouring cells
    share their edge crossings and triple points), so they are chained by exact
    coordinates, either way round.
    """
    pieces = {}
    for ka, kb, pts in segments:
        if len(pts) < 2:
            continue
        pair = tuple(sorted((names[ka], names[kb])))
        pieces.setdefault(pair, []).append([tuple(map(float, p)) for p in pts])
    curves = []
    for pair, todo in pieces.items():
        ends = {}
        for k, line in enumerate(todo):
            for end in (line[0], line[-1]):
                ends.setdefault(end, []).append(k)
        used = [False] * len(todo)
        # begin at a free end (a point only one piece reaches), then anywhere left (loops)
        order = [k for k, line in enumerate(todo) if len(ends[line[0]]) == 1]
        order += [k for k, line in enumerate(todo) if len(ends[line[-1]]) == 1]
        order += list(range(len(todo)))
        for k in order:
            if used[k]:
                continue
            used[k] = True
            line = list(todo[k]) if len(ends[todo[k][0]]) == 1 else list(todo[k])[::-1]
            if len(ends[line[0]]) != 1 and len(ends[line[-1]]) == 1:
                line = line[::-1]
            while True:
                nxt = next((j for j in ends.get(line[-1], ()) if not used[j]), None)
                if nxt is None:
                    break
                used[nxt] = True
                piece = todo[nxt] if todo[nxt][0] == line[-1] else todo[nxt][::-1]
                line += piece[1:]
            clean = [line[0]] + [q for p, q in zip(line[:-1], line[1:], strict=True) if q != p]
            if len(clean) >= 2:
                curves.append(TracedCurve(pair, np.array(clean)))
    return tuple(curves)


@dataclass(repr=False)
class BalancedMap(DomainMap):
    """A mass-balanced map (a :class:`~pourbaix.maps.result.DomainMap`).

    Attributes
    ----------
    totals : dict
        Component -> total [mol/kg] (metals and ligand units).
    criterion : str
        How a point is assigned to a domain.
    system : MassBalanceSystem
        Species, counts and planes used.
    solves : int
        Equilibrium solves made to trace the map.
    tolerance : tuple of float
        Accuracy of boundary points (pH, V).
    curves : tuple of TracedCurve
        The traced boundaries, each a polyline between two domains (the
        ``boundaries`` are its chords, one per segment).
    """

    totals: dict = field(default_factory=dict)
    criterion: str = ""
    system: object = None
    solves: int = 0
    tolerance: tuple = (1e-3, 1e-4)
    curves: tuple = ()
    _solver: object = None
    _names: dict = field(default_factory=dict)
    _states: dict = field(default_factory=dict)

    def equilibrium(self, ph, potential_v):
        """The equilibrium at one point (potential vs the map's reference).

        Returns
        -------
        EquilibriumResult
        """
        return self._solver(float(ph), float(potential_v))[1]

    def probe(self, ph, potential_v):
        """Domain, state and margins at points, each solved with the mass balances.

        Parameters
        ----------
        ph : float or array_like
            pH.
        potential_v : float or array_like
            Potential [V vs the map's reference].

        Returns
        -------
        ProbeResult
            As :meth:`~pourbaix.maps.domain_map.DomainMap.probe`; margins are distances to the traced
            domain edge along E and along pH (``inf`` where that edge is the
            window's: beyond it nothing was traced).
        """
        from shapely.geometry import LineString, Point

        ph_a, e_a = np.broadcast_arrays(
            np.asarray(ph, dtype=float), np.asarray(potential_v, dtype=float)
        )
        scalar = ph_a.ndim == 0
        x, y = ph_a.ravel(), e_a.ravel()
        if not (np.all(np.isfinite(x)) and np.all(np.isfinite(y))):
            raise ConditionsError("probe points must be finite numbers (pH and potential)")
        x0, x1, y0, y1 = self.window
        cols = {k: [] for k in ProbeResult.__dataclass_fields__}
        for px, py in zip(x, y, strict=True):
            key = self._solver(px, py)[0]
            name = self._names[key]
            dom = next(
                (
                    d
                    for d in self.domains
                    if " + ".join(d.species) == name and d.polygon.covers(Point(px, py))
                ),
                None,
            )
            cols["ph"].append(px)
            cols["potential_v"].append(py)
            cols["species"].append(name)
            cols["state"].append(self._states[key])
            for direction, (dx, dy) in {
                "up": (0, 1),
                "down": (0, -1),
                "alkaline": (1, 0),
                "acid": (-1, 0),
            }.items():
                margin, nb = math.inf, ""
                if dom is not None:
                    far = (px + dx * (x1 - x0 + 1), py + dy * (y1 - y0 + 1))
                    hit = dom.polygon.boundary.intersection(LineString([(px, py), far]))
                    pts = [] if hit.is_empty else list(getattr(hit, "geoms", [hit]))
                    coords = [c for g in pts for c in g.coords]
                    dists = [abs(c[0] - px) + abs(c[1] - py) for c in coords]
                    if dists:
                        d = min(dists)
                        edge = (
                            abs(px + dx * d - (x1 if dx > 0 else x0)) < 1e-12
                            if dx
                            else (abs(py + dy * d - (y1 if dy > 0 else y0)) < 1e-12)
                        )
                        if not edge:
                            step = d + 2 * (self.tolerance[0] if dx else self.tolerance[1])
                            margin = d
                            nb = self._names[self._solver(px + dx * step, py + dy * step)[0]]
                key_m = {
                    "up": "margin_up_v",
                    "down": "margin_down_v",
                    "alkaline": "margin_alkaline_ph",
                    "acid": "margin_acid_ph",
                }[direction]
                cols[key_m].append(margin)
                cols[f"neighbour_{direction}"].append(nb)
        res = {}
        for k, v in cols.items():
            arr = np.array(
                v, dtype=object if k in ("species", "state") or k.startswith("neighbour") else float
            )
            res[k] = (
                (arr[0] if arr.dtype == object else arr.reshape(()).item())
                if scalar
                else arr.reshape(ph_a.shape)
            )
        return ProbeResult(**res)

    def __repr__(self):
        c = self.conditions
        totals = ", ".join(f"{k} {v:g}" for k, v in self.totals.items())
        return (
            f"<BalancedMap {'-'.join(c.elements)} ({totals} mol/kg) {c.temperature_c:g} °C, "
            f"{len(self.domains)} domains, {self.solves} solves, vs {c.reference}>"
        )


def point_key(system, result):
    """Domain key of an equilibrium by :data:`CRITERION`.

    Parameters
    ----------
    system : MassBalanceSystem
        The system.
    result : EquilibriumResult
        Its equilibrium at a point.

    Returns
    -------
    tuple
        ``("solid", rows)`` for a solid assemblage, ``("aq", row)`` for the
        predominant dissolved species of the principal metal.
    """
    if result.present.any():
        return ("solid", tuple(int(i) for i in np.flatnonzero(result.present)))
    share = result.amounts * system.counts[:, 0] * system.aqueous
    return ("aq", int(np.argmax(share)))


def _boundary_value(system, result, key_a, key_b):
    """Continuous function of the point, < 0 where key_a holds and > 0 where key_b holds."""
    if key_a[0] == "aq" and key_b[0] == "aq":
        m = result.amounts * system.counts[:, 0]
        return math.log(max(m[key_b[1]], 1e-300)) - math.log(max(m[key_a[1]], 1e-300))
    sa = set(key_a[1]) if key_a[0] == "solid" else set()
    sb = set(key_b[1]) if key_b[0] == "solid" else set()
    replace = bool(sa - sb) and bool(sb - sa)

    def g(q):  # amount (as a share of the component total) if present, else ln(saturation)
        if result.present[q] and not replace:
            j = int(np.argmax(system.counts[q] > 0))
            return result.amounts[q] * system.counts[q, j] / system.totals[j]
        # one solid replacing another: the amounts jump there, the saturations do not
        return result.saturation[q] * math.log(10.0)

    return sum(g(q) for q in sb - sa) - sum(g(q) for q in sa - sb)


def _boundary_gradient(system, result, key_a, key_b, derivatives):
    """(d/dpH, d/dE) of :func:`_boundary_value` at a point, by the implicit-function theorem."""
    from pourbaix.solve.equilibrium import sensitivity

    dlam, dlog = sensitivity(system, result, derivatives)
    if key_a[0] == "aq" and key_b[0] == "aq":
        return dlog[key_b[1]] - dlog[key_a[1]]
    sa = set(key_a[1]) if key_a[0] == "solid" else set()
    sb = set(key_b[1]) if key_b[0] == "solid" else set()
    replace = bool(sa - sb) and bool(sb - sa)

    def dg(q):  # derivative of g in _boundary_value
        if result.present[q]:
            if replace:
                return np.zeros(2)  # saturated: ln(saturation) stays 0
            j = int(np.argmax(system.counts[q] > 0))
            return dlog[q] * system.counts[q, j] / system.totals[j]
        return system.counts[q] @ dlam - derivatives[q]

    zero = np.zeros(2)
    return sum((dg(q) for q in sb - sa), zero) - sum((dg(q) for q in sa - sb), zero)


def _names(system, key):
    if key[0] == "aq":
        return (system.names[key[1]],)
    return tuple(system.names[i] for i in key[1])


def _state(system, key):
    principal = system.metals[0]
    if key[0] == "aq":
        return "corrosion"
    states = [state_of(system.species[i], principal) for i in key[1] if system.counts[i, 0] > 0]
    if not states:
        return "corrosion"  # only ligand solids present: the metal is dissolved
    return "passivation" if "passivation" in states else "immunity"


def compute_balanced_map(
    elements,
    totals,
    *,
    temperature_c=25.0,
    pressure_bar=None,
    ionic_strength=None,
    background=None,
    activity_model="davies",
    water_activity=1.0,
    ph_range=(-2.0, 16.0),
    potential_range_v=(-2.0, 2.0),
    reference="SHE",
    dataset="default",
    data_files=(),
    exclude=(),
    metastable="exclude",
    table=None,
    tolerance=(1e-3, 1e-4),
    mesh=(24, 24),
):
    """Potential-pH map with the totals of metal and ligands conserved.

    Parameters
    ----------
    elements : str
        The metal, e.g. ``"Cu"`` (one metal).
    totals : dict
        Component -> total [mol/kg]: the metal (default 1e-6 if left out,
        the corrosion convention) and each ligand (``N``/``NH3``, ``CN``,
        ``S``, ``C``/``CO3``, ``Cl``), e.g. ``{"Cu": 1e-2, "N": 1.0}``.
    temperature_c : float
        Temperature [°C].
    pressure_bar : float, optional
        Pressure [bar].
    ionic_strength : float, optional
        Ionic strength of a background electrolyte [mol/kg]; with it (or
        ``background``) the activity coefficients follow the ionic strength
        of each equilibrium (background + the system's ions). Without either
        the solution is taken as ideal.
    background : dict or str, optional
        Background electrolyte [mol/kg].
    activity_model : str
        Activity-coefficient model name.
    water_activity : float
        Activity of water [-].
    ph_range : (float, float)
        pH window.
    potential_range_v : (float, float)
        Potential window [V vs ``reference``].
    reference : str
        Reference electrode.
    dataset : str
        Data set name.
    data_files : sequence of path
        User species tables.
    exclude : sequence of str
        Species to leave out.
    metastable : {"exclude", "include"}
        Treatment of metastable solids.
    table : SpeciesTable, optional
        Pre-loaded tables.
    tolerance : (float, float)
        Accuracy of traced boundary points along pH and E [-, V].
    mesh : (int, int)
        Coarse cells along pH and E; domains smaller than a cell may be missed.

    Returns
    -------
    BalancedMap

    Raises
    ------
    PourbaixError
        Unknown element, ligand or species; totals not > 0; conditions out of
        range; an equilibrium that does not converge (EquilibriumError).

    Notes
    -----
    Each point: Gibbs minimisation under the mass balances
    (:func:`pourbaix.solve.equilibrium.solve_equilibrium`), read by
    :data:`CRITERION`. Boundaries: :func:`pourbaix.solve.trace.trace_domains`
    (equal shares of two dissolved species, or a solid's saturation index = 0).

    References
    ----------
    Smith, W. R. & Missen, R. W. (1982). *Chemical Reaction Equilibrium
    Analysis*. Wiley.
    Osseo-Asare, K. & Fuerstenau, D. W. (1978). Application of activity-activity
    diagrams to ammonia hydrometallurgy of copper, nickel and cobalt.
    Hydrometallurgy 3, 333-344 (mass-balanced Cu-NH3-H2O equilibria).

    Examples
    --------
    >>> m = compute_balanced_map("Cu", {"Cu": 1e-2, "N": 1.0}, mesh=(12, 12))
    >>> m.probe(10.0, 0.3).species
    'Cu(NH3)4^2+'
    """
    from shapely import polygonize, unary_union
    from shapely.geometry import LinearRing, LineString, Point, Polygon
    from shapely.ops import polylabel

    from pourbaix.conditions import make_conditions, parse_elements
    from pourbaix.physics import energies
    from pourbaix.physics.components import build_system, parse_totals
    from pourbaix.solve.equilibrium import energy_derivatives_rt, solve_at, solve_many
    from pourbaix.solve.trace import trace_domains
    from pourbaix.tables.species import load_species

    metals = parse_elements(elements)
    if len(metals) != 1:
        raise OptionError(
            "a mass-balanced map takes one metal; give the others as --total only if they are ligands"
        )
    metal = metals[0]
    metal_totals, families = parse_totals(totals, metals)
    totals = {metal: metal_totals.get(metal, 1e-6), **{f.name: v for f, v in families}}
    tol_ph, tol_v = (float(v) for v in tolerance)
    if not (tol_ph > 0 and tol_v > 0):
        raise ConditionsError(f"tolerance must be two numbers > 0 (pH, V), got {tolerance!r}")
    conditions = make_conditions(
        metals,
        molality=totals[metal],
        temperature_c=temperature_c,
        pressure_bar=pressure_bar,
        ionic_strength=ionic_strength,
        background=background,
        activity_model=activity_model,
        water_activity=water_activity,
        ligands={f.name: v for f, v in families} or None,
        ph_range=ph_range,
        potential_range_v=potential_range_v,
        reference=reference,
        dataset=dataset,
        data_files=data_files,
    )
    if table is None:
        table = load_species(conditions.dataset, conditions.data_files)
    system = build_system(
        metal,
        totals,
        table=table,
        temperature_c=conditions.temperature_c,
        pressure_bar=conditions.pressure_bar,
        water_activity=conditions.water_activity,
        metastable=metastable,
        exclude=exclude,
    )
    warn = [*getattr(table, "overrides", ()), *conditions.notes]
    model = conditions.activity_model if conditions.ionic_strength > 0 else None
    background_i = conditions.ionic_strength
    specific = None
    if model == "sit" and background is not None:
        from pourbaix.physics.sit import system_medium_terms

        specific, missing = system_medium_terms(system, background)
        warn.append(
            "SIT: epsilon terms of each species with the background ions (NEA-TDB); "
            + (
                "no epsilon tabulated (taken as 0) for " + ", ".join(missing)
                if missing
                else "all tabulated"
            )
        )
    if model == "pitzer":
        from pourbaix.physics.pitzer import system_note

        warn.append(system_note(system))
    state = {"last": None, "max_i": 0.0}

    def solve(ph, e):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            r = solve_at(
                system,
                ph,
                float(conditions.to_she(ph, e)),
                activity_model=model,
                background_ionic_strength=background_i,
                start=state["last"],
                specific_log_gamma=specific,
                background=background if model == "pitzer" else None,
            )
        state["last"] = r
        state["max_i"] = max(state["max_i"], r.ionic_strength)
        return point_key(system, r), r

    def solve_many_points(points):
        if model is not None:  # activity models: one point at a time, warm started
            return [solve(ph, e) for ph, e in points]
        ph = np.array([p[0] for p in points])
        she = conditions.to_she(ph, np.array([p[1] for p in points]))
        results = solve_many(system, ph, she)
        state["last"] = results[-1]
        state["max_i"] = max(state["max_i"], max(r.ionic_strength for r in results))
        return [(point_key(system, r), r) for r in results]

    derivatives = energy_derivatives_rt(system, conditions.reference_slope_v_per_ph)
    traced = trace_domains(
        solve,
        lambda r, a, b: _boundary_value(system, r, a, b),
        conditions.window,
        mesh=mesh,
        tolerance=(tol_ph, tol_v),
        gradient=lambda r, a, b: _boundary_gradient(system, r, a, b, derivatives),
        classify_many=solve_many_points,
    )
    x0, x1, y0, y1 = conditions.window
    lines = [LineString(pts) for _, _, pts in traced.segments if len(pts) >= 2]
    border = LinearRing([(x0, y0), (x1, y0), (x1, y1), (x0, y1)])
    noded = unary_union([*lines, LineString(border.coords)])
    faces = list(polygonize(list(getattr(noded, "geoms", [noded]))).geoms)
    by_key = {}
    extra = 0
    # faces far below the tolerance's scale (slivers where curves meet at a junction)
    # join the neighbour they share most edge with; the others are classified
    sliver = 0.25 * tol_ph * tol_v
    big = [f for f in faces if f.area > sliver]
    small = [f for f in faces if 0 < f.area <= sliver]
    face_key = []
    for face in big:
        p = face.representative_point()
        face_key.append(solve(p.x, p.y)[0])
        extra += 1
        by_key.setdefault(face_key[-1], []).append(face)
    for face in small:
        shared = [face.boundary.intersection(f.boundary).length for f in big]
        if shared and max(shared) > 0:
            k = face_key[int(np.argmax(shared))]
            by_key[k].append(face)
    keys = list(by_key)
    # every key seen on the mesh gets an entry, in a stable order
    for k in traced.samples.values():
        if k not in keys:
            keys.append(k)
    names = {k: " + ".join(_names(system, k)) for k in keys}
    states = {k: _state(system, k) for k in keys}
    entries = [
        Entry(
            names=_names(system, k),
            plane=(math.nan, math.nan, math.nan),
            state=states[k],
            label=" + ".join(system.labels[system.index(n)] for n in _names(system, k)),
        )
        for k in keys
    ]
    index = {k: i for i, k in enumerate(keys)}
    parts = []  # (key, polygon)
    for k, polys in by_key.items():
        merged = unary_union(polys)
        parts += [(k, g) for g in getattr(merged, "geoms", [merged]) if g.geom_type == "Polygon"]
    # pieces below the mesh's resolution (wedges cut off where curves meet) join the
    # neighbouring piece they share most boundary with
    tiny = 1e-6 * (x1 - x0) * (y1 - y0)
    keep = [[k, g] for k, g in parts if g.area > tiny]
    for _, g in (p for p in parts if p[1].area <= tiny):
        shared = [g.boundary.intersection(h.boundary).length for _, h in keep]
        if shared and max(shared) > 0:
            j = int(np.argmax(shared))
            keep[j][1] = unary_union([keep[j][1], g])
    domains = []
    for k, part in keep:
        if part.geom_type != "Polygon":  # a join left a multipart: keep its largest
            part = max(part.geoms, key=lambda g: g.area)
        part = Polygon(part.exterior.coords, [r.coords for r in part.interiors])
        xy = np.asarray(part.exterior.coords)
        norm = Polygon(np.column_stack([(xy[:, 0] - x0) / (x1 - x0), (xy[:, 1] - y0) / (y1 - y0)]))
        lp = polylabel(norm, tolerance=2e-3)
        label_point = (x0 + lp.x * (x1 - x0), y0 + lp.y * (y1 - y0))
        if not part.covers(Point(label_point)):
            rp = part.representative_point()
            label_point = (rp.x, rp.y)
        e = entries[index[k]]
        domains.append(Domain(e.names, e.state, part, e.label, label_point, index[k]))
    boundaries = []
    for ka, kb, pts in traced.segments:
        for a, b in zip(pts[:-1], pts[1:], strict=True):
            if a[0] == b[0] and a[1] == b[1]:
                continue
            vertical = abs(b[0] - a[0]) < 1e-12
            slope = None if vertical else (b[1] - a[1]) / (b[0] - a[0])
            boundaries.append(
                Boundary(
                    between=(names[ka], names[kb]),
                    entries=(index[ka], index[kb]),
                    start=(float(a[0]), float(a[1])),
                    end=(float(b[0]), float(b[1])),
                    e_at_ph0_v=None if vertical else float(a[1] - slope * a[0]),
                    slope_v_per_ph=None if vertical else float(slope),
                    ph=float(a[0]) if vertical else None,
                )
            )
    ctx = energies.context_for(table, conditions)
    water = {}
    for k, (e0, s) in energies.water_lines(ctx).items():
        water[k] = (e0 - conditions.reference_offset_v, s - conditions.reference_slope_v_per_ph)
    if model is not None:
        lo, hi, text = _model_limits(model)
        if state["max_i"] > lo:
            warn.append(
                f"ionic strength reaches {state['max_i']:.3g} mol/kg on this map, above the {model} "
                f"model's {lo:g} mol/kg ({text})"
            )
    water_sp = energies.water_energy(table, ctx)
    species_list = [*system.species_energies, water_sp]
    sources = {
        se.species.source: table.sources.get(se.species.source, se.species.source)
        for se in species_list
    }
    criterion = CRITERION.format(metal=metal)
    lig_text = ", ".join(f"{f.name} {v:g}" for f, v in families) or "none"
    method = (
        f"mass-balanced equilibrium (Gibbs minimisation under the mass balances of {metal} "
        f"{totals[metal]:g} mol/kg and ligands {lig_text} mol/kg; solids at unit activity, phase "
        "rule; Smith & Missen 1982) at each point; "
        + (
            f"activity coefficients from the {model} model at the ionic strength of each "
            f"equilibrium (background {background_i:g} mol/kg + the system's ions)"
            if model
            else "ideal solution (activity = molality; give an ionic strength or background to apply a model)"
        )
        + f"; domains: {criterion}; curved boundaries traced to {tol_ph:g} pH and "
        f"{tol_v * 1000:g} mV from a {mesh[0]} x {mesh[1]} mesh (Newton's method with the "
        "solver's implicit-function derivatives on mesh edges and along chord normals, "
        "bracketing where it fails; junctions by Newton); "
        + "; ".join(f.suppressed for f, _ in families if f.suppressed)
    ).rstrip("; ")
    seen = {names[k] for k in by_key}
    never = [names[k] for k in keys if names[k] not in seen]
    m = BalancedMap(
        conditions=conditions,
        species=species_list,
        entries=entries,
        domains=domains,
        boundaries=boundaries,
        water=water,
        never_stable=never,
        warnings=warn,
        method=method,
        sources=sources,
        totals=dict(totals),
        criterion=criterion,
        system=system,
        solves=traced.evaluations + extra,
        tolerance=(tol_ph, tol_v),
        curves=_chain(traced.segments, names),
        _solver=solve,
        _names=names,
        _states=states,
    )
    return m


def _model_limits(model):
    from pourbaix.physics import solution

    return solution.model_validity(model)
