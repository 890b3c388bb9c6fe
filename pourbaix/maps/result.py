"""Map result types: entries, domains, boundaries, probe results and the map object with its export."""

from __future__ import annotations

import json
import math
from dataclasses import FrozenInstanceError, dataclass, field

import numpy as np

from pourbaix.conditions import Conditions
from pourbaix.errors import ConditionsError
from pourbaix.frames import Tabular

__all__ = [
    "CAUTION",
    "Conditions",
    "Entry",
    "Domain",
    "Boundary",
    "ProbeResult",
    "DomainMap",
    "species_id",
    "species_label",
    "state_of",
]

CAUTION = (
    "A potential-pH map is a thermodynamic prediction at equilibrium. It says nothing about "
    "rates, film quality, pitting, crevices, stress corrosion, microbiology or mixed potentials; "
    "'passivation' only means a solid is stable, not that it protects. Decisions on cathodic "
    "protection, drinking water and leach chemistries (cyanide, strong acids, sulfide/H2S) belong "
    "to local codes, the applicable standards and licensed practice."
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
class ProbeResult(Tabular):
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

    def __post_init__(self):
        object.__setattr__(self, "_sealed", True)

    def __setattr__(self, name, value):
        # public fields are fixed once the map is built (private caches may be set)
        if not name.startswith("_") and getattr(self, "_sealed", False):
            raise FrozenInstanceError(f"cannot assign to field {name!r}: a map is immutable")
        object.__setattr__(self, name, value)

    # ------------------------------------------------------------------ queries
    @property
    def window(self):
        """``(ph_lo, ph_hi, e_lo, e_hi)`` [-, -, V, V] vs the reference."""
        return (*self.conditions.ph_range, *self.conditions.potential_range_v)

    @property
    def neutral_ph(self):
        """Neutral pH at the map's temperature (pKw / 2)."""
        if self._neutral_ph is not None:  # set for invented systems (no water data)
            return self._neutral_ph
        if self.conditions.neutral_ph is not None:
            return self.conditions.neutral_ph
        from pourbaix.physics import thermo  # conditions built by hand carry no water properties

        return float(thermo.neutral_ph(self.conditions.temperature_c, self.conditions.pressure_bar))

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

    def _repr_png_(self):
        """The map's figure, for notebooks (``pourbaix.plot.notebook.map_png``)."""
        from pourbaix.plot.notebook import map_png

        return map_png(self)

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


# ---------------------------------------------------------------------- naming
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


def state_of(sp, element):
    """Corrosion reading of a species for an element: immunity, passivation or corrosion.

    Parameters
    ----------
    sp : Species
        Table row.
    element : str
        The element whose state is read.

    Returns
    -------
    str
    """
    comp = dict(sp.composition)
    if sp.phase == "aq" or sp.phase == "g":
        return "corrosion"
    if list(comp) == [element] and sp.charge == 0:
        return "immunity"
    return "passivation"
