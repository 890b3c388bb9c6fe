"""The map object: exact domains, boundaries, the water window, probing and export."""

from __future__ import annotations

import json
import math
import warnings
from dataclasses import dataclass, field

import numpy as np

from pourbaix.errors import ConditionsError, OptionError, UnknownSpeciesError
from pourbaix.physics import energies
from pourbaix.solve import envelope as solve

__all__ = [
    "Conditions",
    "Entry",
    "Domain",
    "Boundary",
    "ProbeResult",
    "DomainMap",
    "compute_map",
    "compute_sweep",
    "build_map",
    "CAUTION",
]

CAUTION = (
    "A potential-pH map is a thermodynamic prediction at equilibrium. It says nothing about "
    "rates, film quality, pitting, crevices, stress corrosion, microbiology or mixed potentials; "
    "'passivation' only means a solid is stable, not that it protects. Decisions on cathodic "
    "protection, drinking water and leach chemistries (cyanide, strong acids, sulfide/H2S) belong "
    "to local codes, the applicable standards and licensed practice."
)

_STATES = ("immunity", "passivation", "corrosion")


@dataclass(frozen=True)
class Conditions:
    """The conditions a map was computed for.

    Attributes
    ----------
    elements : tuple of str
        Principal element first, then other metals of a fixed-ratio system.
    temperature_c : float
        Temperature [°C].
    pressure_bar : float
        Pressure used [bar] (1 bar, or saturation above 100 °C).
    activity : float or None
        Activity set for dissolved species of the element(s) [-].
    molality : float or None
        Molality set instead of activity [mol/kg].
    ionic_strength : float
        Ionic strength used [mol/kg].
    activity_model : str or None
        Activity-coefficient model, when the ionic strength is not zero.
    water_activity : float
        Activity of water [-].
    ligands : dict
        Ligand name -> total activity [-].
    ratio : tuple of float or None
        Amounts of the metals, in the order of ``elements``.
    ph_range : tuple of float
        pH window.
    potential_range_v : tuple of float
        Potential window [V vs the reference].
    reference : str
        Reference electrode name.
    reference_offset_v : float
        Reference potential vs SHE at pH 0 [V].
    reference_slope_v_per_ph : float
        pH dependence of the reference vs SHE [V/pH] (non-zero only for RHE).
    dataset : str
        Data set name.
    data_files : tuple of str
        User tables used.
    """

    elements: tuple
    temperature_c: float = 25.0
    pressure_bar: float = 1.0
    activity: float | None = 1e-6
    molality: float | None = None
    ionic_strength: float = 0.0
    activity_model: str | None = None
    water_activity: float = 1.0
    ligands: dict = field(default_factory=dict)
    ratio: tuple | None = None
    ph_range: tuple = (-2.0, 16.0)
    potential_range_v: tuple = (-2.0, 2.0)
    reference: str = "SHE"
    reference_offset_v: float = 0.0
    reference_slope_v_per_ph: float = 0.0
    dataset: str = "default"
    data_files: tuple = ()

    def to_she(self, ph, potential_v):
        """Convert a potential vs this map's reference to SHE [V]."""
        return (
            np.asarray(potential_v)
            + self.reference_offset_v
            + self.reference_slope_v_per_ph * np.asarray(ph)
        )

    def from_she(self, ph, potential_v):
        """Convert a potential vs SHE to this map's reference [V]."""
        return (
            np.asarray(potential_v)
            - self.reference_offset_v
            - self.reference_slope_v_per_ph * np.asarray(ph)
        )


@dataclass(frozen=True)
class Entry:
    """A candidate for stability: one species, or an assemblage.

    Attributes
    ----------
    names : tuple of str
        Species names (one for a single-element map).
    plane : tuple of float
        ``(c0, cph, ce)`` in the map's reference frame [V, V/pH, V/V].
    state : str
        ``immunity``, ``passivation`` or ``corrosion`` for the principal element.
    label : str
        Typeset label (Unicode sub- and superscripts).
    metal_states : dict
        State per metal (several-metal maps).
    """

    names: tuple
    plane: tuple
    state: str
    label: str
    metal_states: dict = field(default_factory=dict)


@dataclass(frozen=True)
class Domain:
    """A stability domain.

    Attributes
    ----------
    species : tuple of str
        Stable species (assemblage).
    state : str
        Corrosion reading of the principal element.
    polygon : shapely.Polygon
        Exact domain in (pH, E vs reference) [-, V].
    label : str
        Typeset label.
    label_point : tuple of float
        Interior pole of inaccessibility (pH, E) for the label.
    entry : int
        Index into the map's entries.
    """

    species: tuple
    state: str
    polygon: object
    label: str
    label_point: tuple
    entry: int

    @property
    def area(self):
        """Area of the domain [pH V]."""
        return float(self.polygon.area)


@dataclass(frozen=True)
class Boundary:
    """A boundary segment between two domains.

    Attributes
    ----------
    between : tuple of str
        The two species (or assemblage labels joined by " + ").
    entries : tuple of int
        Entry indices.
    start, end : tuple of float
        End points (pH, E vs reference).
    e_at_ph0_v : float or None
        Line potential at pH 0 [V vs reference]; None for a vertical line.
    slope_v_per_ph : float or None
        Line slope [V/pH]; None for a vertical line.
    ph : float or None
        pH of a vertical (electron-free) boundary.
    """

    between: tuple
    entries: tuple
    start: tuple
    end: tuple
    e_at_ph0_v: float | None
    slope_v_per_ph: float | None
    ph: float | None = None

    def potential_at(self, ph):
        """Potential of the boundary line at ``ph`` [V vs reference]; nan if vertical."""
        if self.e_at_ph0_v is None:
            return float("nan")
        return self.e_at_ph0_v + self.slope_v_per_ph * ph


@dataclass(frozen=True)
class ProbeResult:
    """What is stable at given points and how far the nearest boundaries are.

    Attributes hold arrays shaped like the broadcast input (scalars for scalar
    input). Margins are positive distances to the boundary in that direction,
    ``inf`` where no other candidate takes over in that direction.

    Attributes
    ----------
    ph, potential_v : ndarray
        The points (potential vs the map's reference) [-, V].
    species : ndarray of str
        Stable species (assemblage joined by " + ").
    state : ndarray of str
        immunity, passivation or corrosion.
    margin_up_v, margin_down_v : ndarray
        Distance to the boundary above and below at that pH [V].
    margin_acid_ph, margin_alkaline_ph : ndarray
        Distance to the boundary towards lower and higher pH at that potential [pH units].
    neighbour_up, neighbour_down, neighbour_acid, neighbour_alkaline : ndarray of str
        The species across each of those boundaries ("" where none).
    """

    ph: object
    potential_v: object
    species: object
    state: object
    margin_up_v: object
    margin_down_v: object
    margin_acid_ph: object
    margin_alkaline_ph: object
    neighbour_up: object
    neighbour_down: object
    neighbour_acid: object
    neighbour_alkaline: object

    def rows(self):
        """The result as a list of plain dicts, one per point (JSON-ready; inf -> None)."""
        names = [f for f in self.__dataclass_fields__]
        cols = {n: np.atleast_1d(getattr(self, n)) for n in names}
        out = []
        for k in range(len(cols["ph"])):
            row = {}
            for n in names:
                v = cols[n][k]
                if isinstance(v, np.generic):
                    v = v.item()
                if isinstance(v, float) and not math.isfinite(v):
                    v = None
                row[n] = v
            out.append(row)
        return out


@dataclass
class DomainMap:
    """An exact potential-pH map.

    Attributes
    ----------
    conditions : Conditions
        What the map was computed for.
    species : list of SpeciesEnergy
        Every species considered, with the values used (see ``pourbaix.physics.energies``).
    entries : list of Entry
        Candidates (species or assemblages) with their planes.
    domains : list of Domain
        The stable domains.
    boundaries : list of Boundary
        Shared edges with their line equations.
    water : dict
        ``{"oxygen": (e0, slope), "hydrogen": (e0, slope)}`` vs the reference [V, V/pH].
    never_stable : list of str
        Candidates with no domain in the window.
    warnings : list of str
        Things the user must know (data routes past their range, model limits, overrides).
    method : str
        How the map was computed (and its approximations).
    """

    conditions: Conditions
    species: list
    entries: list
    domains: list
    boundaries: list
    water: dict
    never_stable: list
    warnings: list
    method: str = "exact lower envelope of transformed-energy planes (half-space intersection)"
    sources: dict = field(default_factory=dict)
    extra_species: list = field(default_factory=list)
    _planes: object = None
    _neutral_ph: float | None = None

    # ------------------------------------------------------------------ queries
    @property
    def window(self):
        """``(ph_lo, ph_hi, e_lo, e_hi)`` [-, -, V, V] vs the reference."""
        return (*self.conditions.ph_range, *self.conditions.potential_range_v)

    @property
    def neutral_ph(self):
        """Neutral pH at the map's temperature (pKw / 2)."""
        if self._neutral_ph is None:
            from pourbaix.physics import thermo

            self._neutral_ph = float(
                thermo.neutral_ph(self.conditions.temperature_c, self.conditions.pressure_bar)
            )
        return self._neutral_ph

    def domain_of(self, name):
        """The domain of a species (or assemblage text); None if not stable.

        Parameters
        ----------
        name : str
            Species name as in ``Domain.species`` or an assemblage "A + B".
        """
        for d in self.domains:
            if name in d.species or name == " + ".join(d.species):
                return d
        return None

    def probe(self, ph, potential_v):
        """Stable species, state and margins at points.

        Parameters
        ----------
        ph : float or array_like
            pH.
        potential_v : float or array_like
            Potential [V vs the map's reference].

        Returns
        -------
        ProbeResult
            Scalars for scalar input, arrays otherwise.

        Notes
        -----
        The stable candidate is the argmin of the transformed energies. Along
        the vertical line through the point, candidate j overtakes the stable
        one d where psi_j = psi_d, i.e. at E* = -(Δ0 + Δph pH)/Δe with
        Δ = plane_j - plane_d; the nearest such crossing above and below gives
        the margins (likewise along pH). This is exact and extends beyond the
        window.
        """
        ph_a, e_a = np.broadcast_arrays(
            np.asarray(ph, dtype=float), np.asarray(potential_v, dtype=float)
        )
        scalar = ph_a.ndim == 0
        x = ph_a.ravel()
        y = e_a.ravel()
        if not (np.all(np.isfinite(x)) and np.all(np.isfinite(y))):
            raise ConditionsError("probe points must be finite numbers (pH and potential)")
        P = self._planes  # (N, 3)
        if self._active is None:
            raise ConditionsError("this map has no candidates to probe")
        P = P[self._active]
        vals = P[:, 0][None, :] + np.outer(x, P[:, 1]) + np.outer(y, P[:, 2])
        best = np.argmin(vals, axis=1)
        d = P[None, :, :] - P[best][:, None, :]  # (M, N, 3)
        base = d[:, :, 0] + d[:, :, 1] * x[:, None]  # Δ0 + Δph pH
        with np.errstate(divide="ignore", invalid="ignore"):
            e_cross = -base / d[:, :, 2]
            up = np.where(d[:, :, 2] < -1e-15, e_cross, np.inf)
            down = np.where(d[:, :, 2] > 1e-15, e_cross, -np.inf)
            base_e = d[:, :, 0] + d[:, :, 2] * y[:, None]
            ph_cross = -base_e / d[:, :, 1]
            right = np.where(d[:, :, 1] < -1e-15, ph_cross, np.inf)
            left = np.where(d[:, :, 1] > 1e-15, ph_cross, -np.inf)
        iu, idn = np.argmin(up, axis=1), np.argmax(down, axis=1)
        ir, il = np.argmin(right, axis=1), np.argmax(left, axis=1)
        rows = np.arange(len(x))
        m_up = up[rows, iu] - y
        m_dn = y - down[rows, idn]
        m_r = right[rows, ir] - x
        m_l = x - left[rows, il]
        act = self._active
        names = np.array([" + ".join(self.entries[i].names) for i in act], dtype=object)
        states = np.array([self.entries[i].state for i in act], dtype=object)

        def nb(idx, margin):
            out = names[idx].copy()
            out[~np.isfinite(margin)] = ""
            return out

        res = dict(
            ph=x,
            potential_v=y,
            species=names[best],
            state=states[best],
            margin_up_v=np.maximum(m_up, 0.0),
            margin_down_v=np.maximum(m_dn, 0.0),
            margin_acid_ph=np.maximum(m_l, 0.0),
            margin_alkaline_ph=np.maximum(m_r, 0.0),
            neighbour_up=nb(iu, m_up),
            neighbour_down=nb(idn, m_dn),
            neighbour_acid=nb(il, m_l),
            neighbour_alkaline=nb(ir, m_r),
        )
        shape = ph_a.shape
        for k, v in res.items():
            res[k] = (
                v.reshape(shape)
                if not scalar
                else v.reshape(()).item()
                if v.dtype != object
                else v[0]
            )
        return ProbeResult(**res)

    _active: object = None

    # ------------------------------------------------------------------ export
    def to_dict(self):
        """The map as the version-1 JSON structure (see MAP_FORMAT.md).

        Returns
        -------
        dict
        """
        c = self.conditions
        act_key = {c.elements[0]: c.activity if c.activity is not None else c.molality}
        species = []
        for se in self.species:
            sp = se.species
            row = {
                "name": species_id(sp),
                "phase": sp.phase,
                "composition": dict(sp.composition),
                "charge": sp.charge,
                "dgf_kj_mol": sp.dgf_kj_mol,
                "dg_kj_mol": se.dg_kj_mol,
                "activity": se.activity,
                "source": sp.source,
                "stable": any(species_id(sp) in d.species for d in self.domains),
                "route": se.route,
                "origin": sp.origin,
            }
            if sp.note:
                row["note"] = sp.note
            species.append(row)
        domains = []
        for d in self.domains:
            domains.append(
                {
                    "species": list(d.species),
                    "state": d.state,
                    "polygon": _rings(d.polygon),
                    "area": round(d.area, 10),
                    "label_point": [round(v, 6) for v in d.label_point],
                }
            )
        boundaries = []
        for b in self.boundaries:
            row = {
                "between": list(b.between),
                "points": [[round(v, 6) for v in b.start], [round(v, 6) for v in b.end]],
                "e_at_ph0_v": None if b.e_at_ph0_v is None else round(b.e_at_ph0_v, 6),
                "slope_v_per_ph": None if b.slope_v_per_ph is None else round(b.slope_v_per_ph, 8),
            }
            if b.ph is not None:
                row["ph"] = round(b.ph, 6)
            boundaries.append(row)
        out = {
            "format": "pourbaix.map",
            "version": 1,
            "conditions": {
                "elements": list(c.elements),
                "temperature_c": c.temperature_c,
                "pressure_bar": c.pressure_bar,
                "activities": act_key,
                "ligands": dict(c.ligands),
                "ratio": None if c.ratio is None else dict(zip(c.elements, c.ratio, strict=True)),
                "ionic_strength": c.ionic_strength,
                "reference": {
                    "name": c.reference,
                    "offset_v": c.reference_offset_v,
                    **(
                        {"slope_v_per_ph": c.reference_slope_v_per_ph}
                        if c.reference_slope_v_per_ph
                        else {}
                    ),
                },
                "ph_range": list(c.ph_range),
                "potential_range_v": list(c.potential_range_v),
                "activity_model": c.activity_model,
                "water_activity": c.water_activity,
                "dataset": c.dataset,
                "data_files": list(c.data_files),
                "molality": c.molality,
            },
            "species": species,
            "domains": domains,
            "boundaries": boundaries,
            "water": {
                k: {"e_at_ph0_v": round(v[0], 6), "slope_v_per_ph": round(v[1], 8)}
                for k, v in self.water.items()
            },
            "never_stable": list(self.never_stable),
            "warnings": list(self.warnings),
            "method": self.method,
            "caution": CAUTION,
            "sources": dict(self.sources),
        }
        return out

    def to_json(self, path=None, indent=2):
        """Write (atomically) or return the version-1 JSON text.

        Parameters
        ----------
        path : str or Path, optional
            Destination; when None the text is returned.
        indent : int
            JSON indentation.
        """
        text = json.dumps(self.to_dict(), indent=indent, ensure_ascii=False, allow_nan=False) + "\n"
        if path is None:
            return text
        from pourbaix.outputs import atomic_write_text

        atomic_write_text(path, text)
        return path

    def boundaries_csv(self, path=None):
        """Boundaries as CSV text (pair, end points, line); written atomically if ``path``.

        Parameters
        ----------
        path : str or Path, optional
            Destination; when None the text is returned.
        """
        import csv
        import io

        buf = io.StringIO()
        w = csv.writer(buf, lineterminator="\n")
        ref = self.conditions.reference
        w.writerow(
            [
                "species_1",
                "species_2",
                "ph_start",
                f"e_start_v_vs_{ref}",
                "ph_end",
                f"e_end_v_vs_{ref}",
                f"e_at_ph0_v_vs_{ref}",
                "slope_v_per_ph",
                "vertical_at_ph",
            ]
        )
        for b in self.boundaries:
            w.writerow(
                [
                    b.between[0],
                    b.between[1],
                    f"{b.start[0]:.6f}",
                    f"{b.start[1]:.6f}",
                    f"{b.end[0]:.6f}",
                    f"{b.end[1]:.6f}",
                    "" if b.e_at_ph0_v is None else f"{b.e_at_ph0_v:.6f}",
                    "" if b.slope_v_per_ph is None else f"{b.slope_v_per_ph:.8f}",
                    "" if b.ph is None else f"{b.ph:.6f}",
                ]
            )
        text = buf.getvalue()
        if path is None:
            return text
        from pourbaix.outputs import atomic_write_text

        atomic_write_text(path, text)
        return path

    def __repr__(self):
        c = self.conditions
        return (
            f"<DomainMap {'-'.join(c.elements)} {c.temperature_c:g} °C, {len(self.domains)} domains, "
            f"{len(self.boundaries)} boundaries, vs {c.reference}>"
        )


def _rings(poly):
    coords = np.asarray(poly.exterior.coords)[:-1]
    if poly.exterior.is_ccw is False:
        coords = coords[::-1]
    return [[round(float(a), 6), round(float(b), 6)] for a, b in coords]


# ---------------------------------------------------------------------- build
def species_id(sp):
    """Name of a species on a map, unique across phases.

    Neutral dissolved species carry "(aq)" so that, e.g., dissolved
    Zn(OH)2(aq) and solid Zn(OH)2 are told apart; ions are aqueous by
    definition and keep their bare name.

    Parameters
    ----------
    sp : Species
        Table row.

    Returns
    -------
    str
    """
    if sp.phase == "aq" and sp.charge == 0:
        return f"{sp.name}(aq)"
    if sp.phase == "g":
        return f"{sp.name}(g)"
    return sp.name


def species_label(sp):
    """Typeset (Unicode) label of a species, with "(aq)" for neutral dissolved species.

    E.g. ``"Fe²⁺"``, ``"Zn(OH)₂(aq)"``, ``"Fe₂O₃ (maghemite)"``.

    Parameters
    ----------
    sp : Species
        Table row.

    Returns
    -------
    str
    """
    label = sp.formula.plain()
    if sp.phase == "aq" and sp.charge == 0:
        label += "(aq)"
    return f"{label} ({sp.form})" if sp.form else label


def _state_of(sp, element):
    comp = dict(sp.composition)
    if sp.phase == "aq" or sp.phase == "g":
        return "corrosion"
    if list(comp) == [element] and sp.charge == 0:
        return "immunity"
    return "passivation"


def build_map(
    conditions,
    entries,
    species_energies,
    water_she,
    warnings_list,
    sources,
    method=None,
    extra_species=(),
):
    """Solve the envelope of ``entries`` and assemble a DomainMap.

    Parameters
    ----------
    conditions : Conditions
        Conditions (the window is in the reference frame).
    entries : list of Entry
        Candidates whose planes are already in the reference frame.
    species_energies : list of SpeciesEnergy
        Species considered.
    water_she : dict
        Water lines vs SHE.
    warnings_list : list of str
        Warnings gathered so far.
    sources : dict
        Source key -> citation for the species used.
    method : str, optional
        Method text for the export.
    extra_species : sequence
        Extra rows for the export (e.g. water).

    Returns
    -------
    DomainMap
    """
    from shapely.geometry import Point, Polygon
    from shapely.ops import polylabel

    planes = np.array([e.plane for e in entries], dtype=float)
    window = (*conditions.ph_range, *conditions.potential_range_v)
    env = solve.lower_envelope(planes, window)
    domains = []
    for i, poly in enumerate(env.polygons):
        if poly is None:
            continue
        P = Polygon(poly)
        # interior pole found in window-normalised units, so pH and volts weigh alike
        sx = window[1] - window[0]
        sy = window[3] - window[2]
        Pn = Polygon(
            np.column_stack([(poly[:, 0] - window[0]) / sx, (poly[:, 1] - window[2]) / sy])
        )
        lpn = polylabel(Pn, tolerance=2e-3)
        lp = Point(window[0] + lpn.x * sx, window[2] + lpn.y * sy)
        e = entries[i]
        domains.append(Domain(e.names, e.state, P, e.label, (float(lp.x), float(lp.y)), i))
    boundaries = []
    for edge in env.edges:
        i, j = edge.pair
        vertical = not math.isfinite(edge.slope_v_per_ph)
        boundaries.append(
            Boundary(
                between=(" + ".join(entries[i].names), " + ".join(entries[j].names)),
                entries=(i, j),
                start=edge.start,
                end=edge.end,
                e_at_ph0_v=None if vertical else edge.e_at_ph0_v,
                slope_v_per_ph=None if vertical else edge.slope_v_per_ph,
                ph=edge.ph_at_vertical if vertical else None,
            )
        )
    never = [" + ".join(entries[i].names) for i, p in enumerate(env.polygons) if p is None]
    water = {}
    for k, (e0, s) in water_she.items():
        water[k] = (e0 - conditions.reference_offset_v, s - conditions.reference_slope_v_per_ph)
    active = np.array([i for i in range(len(entries)) if i not in env.coincident], dtype=int)
    for j, i in env.coincident.items():
        warnings_list.append(
            f"{' + '.join(entries[j].names)} has exactly the same transformed energy as "
            f"{' + '.join(entries[i].names)}; only the latter is shown"
        )
    m = DomainMap(
        conditions=conditions,
        species=list(species_energies),
        entries=list(entries),
        domains=domains,
        boundaries=boundaries,
        water=water,
        never_stable=never,
        warnings=warnings_list,
        sources=sources,
        extra_species=list(extra_species),
    )
    if method:
        m.method = method
    m._planes = planes
    m._active = active
    return m


def _reference_frame(reference, temperature_c, warn_list):
    from pourbaix.physics import electrodes

    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        info = electrodes.get_reference(reference)
        off0 = float(electrodes.reference_offset(info.name, temperature_c, ph=0.0))
        off1 = float(electrodes.reference_offset(info.name, temperature_c, ph=1.0)) - off0
    for w in caught:
        warn_list.append(str(w.message))
    return info.name, off0, off1


def _select_species(table, element, others, metastable, exclude, only):
    allowed = {element, "H", "O", *others}
    chosen = []
    for sp in table.species:
        comp = dict(sp.composition)
        if element not in comp or not set(comp) <= allowed:
            continue
        if sp.phase == "g":
            continue  # gaseous compounds of metals play no part in aqueous maps
        chosen.append(sp)
    if metastable not in ("exclude", "include", "only"):
        raise OptionError(f"metastable must be one of exclude, include, only; got {metastable!r}")
    names = {s.name for s in chosen} | {f"{s.name}({s.phase})" for s in chosen}
    for n in list(exclude) + list(only or ()):
        if n not in names:
            try:
                sp = table.get(n)
            except UnknownSpeciesError:
                raise
            if sp.name not in names:
                raise UnknownSpeciesError(f"species {n!r} is not part of the {element} system")
    excl = {table.get(n).key for n in exclude}
    keep = None if not only else {table.get(n).key for n in only}
    out = []
    for sp in chosen:
        if sp.key in excl:
            continue
        if keep is not None and sp.key not in keep and _state_of(sp, element) != "immunity":
            continue
        is_compound_solid = sp.phase == "s" and _state_of(sp, element) == "passivation"
        if metastable == "exclude" and sp.metastable:
            continue
        if metastable == "only" and is_compound_solid and not sp.metastable:
            continue
        out.append(sp)
    return out


def _parse_elements(elements):
    from pourbaix.tables.formula import ELEMENTS

    if isinstance(elements, str):
        elements = elements.replace(",", " ").replace("-", " ").split()
    elements = tuple(elements)
    if not elements:
        raise OptionError("give at least one element, e.g. Fe")
    for el in elements:
        if el not in ELEMENTS:
            raise OptionError(f"unknown element {el!r}; give a chemical symbol such as Fe, Cu, Zn")
    if len(set(elements)) != len(elements):
        raise OptionError(f"element listed twice in {' '.join(elements)}")
    return elements


def _check_range(name, rng, unit=""):
    try:
        lo, hi = (float(v) for v in rng)
    except (TypeError, ValueError) as exc:
        raise ConditionsError(f"{name} must be two numbers LO HI, got {rng!r}") from exc
    if not (math.isfinite(lo) and math.isfinite(hi)) or hi <= lo:
        raise ConditionsError(f"{name} must be finite with LO < HI, got {lo:g} .. {hi:g}{unit}")
    return (lo, hi)


def _check_basics(elements, activity, molality, ph_range, potential_range_v):
    """Validate and normalise the conditions every map takes (elements, amount, window).

    Returns
    -------
    tuple
        ``(elements, activity, molality, ph_range, potential_range_v)``; the
        activity defaults to 1e-6 when neither it nor a molality is given.
    """
    elements = _parse_elements(elements)
    ph_range = _check_range("pH range", ph_range)
    potential_range_v = _check_range("potential range", potential_range_v, " V")
    if activity is not None and molality is not None:
        raise OptionError("give either activity or molality, not both")
    if activity is None and molality is None:
        activity = 1e-6
    for label, v in (("activity", activity), ("molality", molality)):
        if v is not None and not (math.isfinite(float(v)) and float(v) > 0):
            raise ConditionsError(f"{label} must be a positive number, got {v}")
    return elements, activity, molality, ph_range, potential_range_v


def compute_map(
    elements,
    *,
    activity=None,
    molality=None,
    temperature_c=25.0,
    pressure_bar=None,
    ionic_strength=None,
    background=None,
    activity_model="davies",
    water_activity=1.0,
    ligands=None,
    ratio=None,
    ph_range=(-2.0, 16.0),
    potential_range_v=(-2.0, 2.0),
    reference="SHE",
    dataset="default",
    data_files=(),
    exclude=(),
    only=None,
    metastable="exclude",
    table=None,
):
    """Compute the exact potential-pH map of an element system.

    Parameters
    ----------
    elements : str or sequence of str
        Principal element (e.g. "Fe"); several metals for a fixed-ratio map.
    activity : float, optional
        Activity of every dissolved species of the element [-]; default 1e-6
        (the corrosion convention, common practice).
    molality : float, optional
        Molality of dissolved species instead of activity [mol/kg]; the
        activity is molality × γ from the activity model.
    temperature_c : float
        Temperature [°C], 0 to 300.
    pressure_bar : float, optional
        Pressure [bar]; default 1 bar, or the saturation pressure above 100 °C.
    ionic_strength : float, optional
        Ionic strength [mol/kg].
    background : dict or str, optional
        Background electrolyte, e.g. ``{"NaCl": 0.5}`` or ``"NaCl=0.5,CaCl2=0.01"``
        [mol/kg]; sets the ionic strength.
    activity_model : str
        ``davies``, ``extended-debye-huckel`` or ``b-dot``.
    water_activity : float
        Activity of water [-] (below 1 for brines).
    ligands : dict, optional
        Ligand -> total activity, e.g. ``{"S": 1e-3}`` [-].
    ratio : sequence of float, optional
        Amounts of the metals in ``elements`` for an alloy map.
    ph_range : (float, float)
        pH window.
    potential_range_v : (float, float)
        Potential window [V vs ``reference``].
    reference : str
        Reference electrode for all potentials (in and out), e.g. "SCE".
    dataset : str
        Data set name (``default`` or an alternative such as ``bpj85``).
    data_files : sequence of path
        User species tables that add or override rows.
    exclude : sequence of str
        Species to leave out.
    only : sequence of str, optional
        Keep only these species (plus the element itself).
    metastable : {"exclude", "include", "only"}
        Leave out metastable forms, include them, or use them in place of
        the stable solid compounds.
    table : SpeciesTable, optional
        Pre-loaded tables (skips loading).

    Returns
    -------
    DomainMap

    Raises
    ------
    PourbaixError
        For unknown elements, species, references or models, and for
        conditions out of range; the message names the culprit.

    Examples
    --------
    >>> m = compute_map("Fe")
    >>> m.probe(7.0, -0.6).state
    'immunity'
    """
    from pourbaix.tables.species import load_species

    elements, activity, molality, ph_range, potential_range_v = _check_basics(
        elements, activity, molality, ph_range, potential_range_v
    )
    if table is None:
        table = load_species(dataset, tuple(data_files))
    warn = list(getattr(table, "overrides", ()))
    if ligands or ratio is not None or len(elements) > 1:
        from pourbaix.maps import systems

        return systems.compute_system_map(**locals())

    element = elements[0]
    from pourbaix.physics.energies import reference_species

    reference_species(table, element)  # raises if the element has no data
    ctx, gamma_of, ionic, model = _conditions_context(
        table,
        elements,
        temperature_c,
        pressure_bar,
        water_activity,
        ionic_strength,
        background,
        activity_model,
        warn,
    )
    ref_name, off0, off1 = _reference_frame(reference, ctx.temperature_c, warn)
    if ionic > 0 and molality is None:
        warn.append(
            "dissolved species were set by activity, which the activity coefficients do not change; "
            "give a molality to apply the model"
        )
    chosen = _select_species(table, element, (), metastable, exclude, only)
    conditions = Conditions(
        elements=elements,
        temperature_c=ctx.temperature_c,
        pressure_bar=ctx.pressure_bar,
        activity=None if activity is None else float(activity),
        molality=None if molality is None else float(molality),
        ionic_strength=ionic,
        activity_model=model,
        water_activity=ctx.water_activity,
        ligands={},
        ratio=None,
        ph_range=ph_range,
        potential_range_v=potential_range_v,
        reference=ref_name,
        reference_offset_v=off0,
        reference_slope_v_per_ph=off1,
        dataset=table.dataset,
        data_files=tuple(str(p) for p in data_files),
    )
    energies_list = []
    entries = []
    for sp in chosen:
        act, gam = dissolved_activity(sp, activity, molality, gamma_of)
        se = energies.species_energy(sp, element, ctx, act, gam)
        energies_list.append(se)
        entries.append(
            Entry(
                names=(species_id(sp),),
                plane=to_frame(se.plane, off0, off1),
                state=_state_of(sp, element),
                label=species_label(sp),
            )
        )
    _route_warnings(energies_list, ctx.temperature_c, warn)
    water_she = energies.water_lines(ctx)
    water_sp = energies.SpeciesEnergy(
        table.get("H2O", "l"), ctx.g_water_kj, "IAPWS-95", 300.0, ctx.water_activity, 1.0, (0, 0, 0)
    )
    sources = {}
    for se in [*energies_list, water_sp]:
        sources[se.species.source] = table.sources.get(se.species.source, se.species.source)
    return build_map(conditions, entries, [*energies_list, water_sp], water_she, warn, sources)


def to_frame(plane, off0, off1):
    """Express a SHE plane in a reference frame E_SHE = E_ref + off0 + off1 pH.

    Parameters
    ----------
    plane : tuple of float
        ``(c0, cph, ce)`` vs SHE.
    off0, off1 : float
        Reference offset at pH 0 [V] and its pH slope [V/pH].

    Returns
    -------
    tuple of float
    """
    c0, cph, ce = plane
    return (c0 + ce * off0, cph + ce * off1, ce)


def dissolved_activity(sp, activity, molality, gamma_of):
    """Activity and activity coefficient for a species (1 for solids and liquids).

    Parameters
    ----------
    sp : Species
        Species row.
    activity, molality : float or None
        What the user set for dissolved species.
    gamma_of : callable
        charge -> activity coefficient.

    Returns
    -------
    (float, float)
        Activity [-] and activity coefficient [-].
    """
    if sp.phase != "aq":
        return 1.0, 1.0
    if molality is not None:
        g = gamma_of(sp.charge)
        return float(molality) * g, g
    return float(activity), 1.0


def _conditions_context(
    table,
    elements,
    temperature_c,
    pressure_bar,
    water_activity,
    ionic_strength,
    background,
    activity_model,
    warn,
):
    from pourbaix.physics.energies import make_context

    try:
        t = float(temperature_c)
    except (TypeError, ValueError) as exc:
        raise ConditionsError(f"temperature must be a number in °C, got {temperature_c!r}") from exc
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        ctx = make_context(table, t, pressure_bar, water_activity, elements)
        ionic = 0.0
        if background is not None or ionic_strength is not None:
            from pourbaix.physics import solution
        if background is not None and ionic_strength is not None:
            raise OptionError("give either an ionic strength or a background electrolyte, not both")
        if background is not None:
            bg = (
                solution.parse_background(background)
                if isinstance(background, str)
                else dict(background)
            )
            ions = solution.background_ions(bg)
            ionic = float(solution.ionic_strength([(m, z) for _, m, z in ions]))
        elif ionic_strength is not None:
            ionic = float(ionic_strength)
            if not (math.isfinite(ionic) and ionic >= 0):
                raise ConditionsError(
                    f"ionic strength must be a number >= 0 mol/kg, got {ionic_strength}"
                )
        model = None
        if ionic > 0:
            model = activity_model
            solution.log_gamma(
                1, ionic, t, model=model
            )  # validates model and range (raises or warns)

            def gamma_of(z, _i=ionic, _m=model):
                # the model's range warning was recorded once above; not repeated per species
                with warnings.catch_warnings():
                    warnings.simplefilter("ignore", category=Warning)
                    return float(10 ** solution.log_gamma(z, _i, t, model=_m))

            lo, hi, text = solution.model_validity(model)
            warn.append(f"activity coefficients: {model} model at I = {ionic:g} mol/kg ({text})")
        else:

            def gamma_of(z):
                return 1.0

    for w in caught:
        msg = str(w.message)
        if msg not in warn:
            warn.append(msg)
    return ctx, gamma_of, ionic, model


def _route_warnings(energies_list, temperature_c, warn):
    if temperature_c == 25.0:
        return
    past = [se.species.name for se in energies_list if temperature_c > se.valid_to_c]
    if past:
        warn.append(
            f"at {temperature_c:g} °C these species are past the range their temperature route is trusted for: "
            + ", ".join(past)
        )


def compute_sweep(elements, *, temperatures_c=None, activities=None, **kwargs):
    """Compute one map per temperature (or per activity) for overlays.

    Parameters
    ----------
    elements : str or sequence of str
        As for :func:`compute_map`.
    temperatures_c : sequence of float, optional
        Temperatures [°C].
    activities : sequence of float, optional
        Activities of dissolved species [-].
    **kwargs
        Other arguments of :func:`compute_map`.

    Returns
    -------
    list of DomainMap
    """
    if (temperatures_c is None) == (activities is None):
        raise OptionError("give exactly one of temperatures_c or activities for a sweep")
    from pourbaix.tables.species import load_species

    if "table" not in kwargs:
        kwargs["table"] = load_species(
            kwargs.get("dataset", "default"), tuple(kwargs.get("data_files", ()))
        )
    if temperatures_c is not None:
        return [compute_map(elements, temperature_c=t, **kwargs) for t in temperatures_c]
    return [
        compute_map(elements, activity=a, **{k: v for k, v in kwargs.items() if k != "activity"})
        for a in activities
    ]
