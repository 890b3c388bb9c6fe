"""Assembling a map: candidates' planes in the reference frame, the envelope solve, domains and boundaries."""

from __future__ import annotations

import math

import numpy as np

from pourbaix.errors import OptionError, UnknownSpeciesError
from pourbaix.maps.result import Boundary, Domain, DomainMap, state_of
from pourbaix.solve import envelope as solve

__all__ = [
    "build_map",
    "select_species",
    "to_frame",
    "dissolved_activity",
    "route_warnings",
]


def build_map(
    conditions,
    entries,
    species_energies,
    water_she,
    warnings_list,
    sources,
    method=None,
    extra_species=(),
    envelope=None,
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
    envelope : Envelope, optional
        The envelope of the entries' planes when the caller has it already
        (an alloy map's walk); solved here otherwise.

    Returns
    -------
    DomainMap
    """
    from shapely.geometry import Point, Polygon
    from shapely.ops import polylabel

    planes = np.array([e.plane for e in entries], dtype=float)
    window = (*conditions.ph_range, *conditions.potential_range_v)
    env = solve.lower_envelope(planes, window) if envelope is None else envelope
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
        _planes=planes,
        _active=active,
        **({"method": method} if method else {}),
    )
    return m


def select_species(table, element, others, metastable, exclude, only):
    """The species of a one-element system after the user's exclusions.

    Parameters
    ----------
    table : SpeciesTable
        Species tables.
    element : str
        The element.
    others : iterable of str
        Other elements allowed besides H and O.
    metastable : {"exclude", "include", "only"}
        Treatment of metastable solids.
    exclude, only : sequence of str
        Species to leave out; species to keep (plus the element itself).

    Returns
    -------
    list of Species

    Raises
    ------
    OptionError
        Unknown ``metastable`` choice.
    UnknownSpeciesError
        A named species that is not in the tables or not part of the system.
    """
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
        if keep is not None and sp.key not in keep and state_of(sp, element) != "immunity":
            continue
        is_compound_solid = sp.phase == "s" and state_of(sp, element) == "passivation"
        if metastable == "exclude" and sp.metastable:
            continue
        if metastable == "only" and is_compound_solid and not sp.metastable:
            continue
        out.append(sp)
    return out


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


def dissolved_activity(sp, conditions):
    """Activity and activity coefficient for a species (1 for solids and liquids).

    Parameters
    ----------
    sp : Species
        Species row.
    conditions : Conditions
        Checked conditions (activity or molality, activity coefficients).

    Returns
    -------
    (float, float)
        Activity [-] and activity coefficient [-].
    """
    if sp.phase != "aq":
        return 1.0, 1.0
    if conditions.molality is not None:
        g = conditions.activity_coefficient(sp.charge)
        return conditions.molality * g, g
    return float(conditions.activity), 1.0


def route_warnings(energies_list, temperature_c, warn):
    """Append a warning naming the species whose temperature route is past its range.

    Parameters
    ----------
    energies_list : sequence of SpeciesEnergy
        Species used.
    temperature_c : float
        Map temperature [°C].
    warn : list of str
        Warnings gathered so far (appended to).
    """
    if temperature_c == 25.0:
        return
    stuck = [se.species.name for se in energies_list if se.route == "no entropy: 25 °C value"]
    if stuck:
        warn.append(
            f"at {temperature_c:g} °C these species keep their 25 °C ΔG (no S° in the tables and "
            "no estimate: no route to temperature), so their domains here are unreliable: "
            + ", ".join(stuck)
        )
    past = [
        se.species.name
        for se in energies_list
        if temperature_c > se.valid_to_c and se.route != "no entropy: 25 °C value"
    ]
    if past:
        warn.append(
            f"at {temperature_c:g} °C these species are past the range their temperature route is trusted for: "
            + ", ".join(past)
        )
