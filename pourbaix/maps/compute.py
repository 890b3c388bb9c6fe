"""Computing a map: from checked conditions and the species tables to a DomainMap.

References
----------
Pourbaix, M. (1974). Atlas of Electrochemical Equilibria in Aqueous Solutions,
2nd English ed. NACE, Houston; ch. II (transformed energies of species formed
from the element, water, H+ and electrons).
"""

from __future__ import annotations

from dataclasses import replace

from pourbaix.conditions import Conditions, make_conditions
from pourbaix.errors import OptionError
from pourbaix.maps.build import (
    build_map,
    dissolved_activity,
    route_warnings,
    select_species,
    to_frame,
)
from pourbaix.maps.result import Entry, species_id, species_label, state_of
from pourbaix.physics import energies

__all__ = ["compute_map", "compute_element_map", "compute_sweep"]


def compute_map(
    elements=None,
    *,
    conditions=None,
    exclude=(),
    only=None,
    metastable="exclude",
    table=None,
    slow_species="exclude",
    **condition_keywords,
):
    """Compute the exact potential-pH map of an element system.

    Parameters
    ----------
    elements : str or sequence of str, optional
        Principal element (e.g. "Fe"); several metals for a fixed-ratio map.
        Omit it when ``conditions`` are given.
    conditions : Conditions, optional
        Conditions already checked by :func:`pourbaix.conditions.make_conditions`.
    exclude : sequence of str
        Species to leave out.
    only : sequence of str, optional
        Keep only these species (plus the element itself).
    metastable : {"exclude", "include", "only"}
        Leave out metastable forms, include them, or use them in place of
        the stable solid compounds.
    table : SpeciesTable, optional
        Pre-loaded tables (skips loading).
    slow_species : {"exclude", "include"}
        Ligand maps: leave out (default) or include the ligand species the
        data name as not forming on a practical time scale (perchlorate).
    **condition_keywords
        The keywords of :func:`pourbaix.conditions.make_conditions`
        (``activity``, ``molality``, ``temperature_c``, ``pressure_bar``,
        ``ionic_strength``, ``background``, ``activity_model``,
        ``water_activity``, ``ligands``, ``ratio``, ``ph_range``,
        ``potential_range_v``, ``reference``, ``dataset``, ``data_files``),
        checked once there with their plausible ranges.

    Returns
    -------
    DomainMap
        A :class:`~pourbaix.maps.systems.SystemMap` when ligands or several
        metals are given.

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
    if conditions is None:
        if elements is None:
            raise OptionError("give the element(s) of the map, e.g. compute_map('Fe')")
        conditions = make_conditions(elements, **condition_keywords)
    elif elements is not None or condition_keywords:
        raise OptionError(
            "give either checked conditions or the element(s) with condition keywords, not both"
        )
    elif not isinstance(conditions, Conditions):
        raise OptionError(
            f"conditions must be a Conditions object, got {type(conditions).__name__}"
        )
    if table is None:
        from pourbaix.tables.species import load_species

        table = load_species(conditions.dataset, conditions.data_files)
    if getattr(table, "dataset", conditions.dataset) != conditions.dataset:
        conditions = replace(conditions, dataset=table.dataset)  # the tables given win
    if conditions.ligands or conditions.ratio is not None or len(conditions.elements) > 1:
        from pourbaix.maps.systems import compute_system_map

        return compute_system_map(
            conditions,
            exclude=exclude,
            only=only,
            metastable=metastable,
            table=table,
            slow_species=slow_species,
        )
    return compute_element_map(
        conditions, exclude=exclude, only=only, metastable=metastable, table=table
    )


def compute_element_map(conditions, *, table, exclude=(), only=None, metastable="exclude"):
    """Map of one element with water only (no ligands, one metal).

    Parameters
    ----------
    conditions : Conditions
        Checked conditions with one element.
    table : SpeciesTable
        Species tables.
    exclude, only, metastable
        As for :func:`compute_map`.

    Returns
    -------
    DomainMap
    """
    (element,) = conditions.elements
    energies.reference_species(table, element)  # raises if the element has no data
    warn = [*getattr(table, "overrides", ()), *conditions.notes]
    chosen = select_species(table, element, (), metastable, exclude, only)
    ctx = energies.context_for(table, conditions)
    off0, off1 = conditions.reference_offset_v, conditions.reference_slope_v_per_ph
    energies_list = []
    entries = []
    for sp in chosen:
        act, gam = dissolved_activity(sp, conditions)
        se = energies.species_energy(sp, element, ctx, act, gam)
        energies_list.append(se)
        entries.append(
            Entry(
                names=(species_id(sp),),
                plane=to_frame(se.plane, off0, off1),
                state=state_of(sp, element),
                label=species_label(sp),
            )
        )
    route_warnings(energies_list, ctx.temperature_c, warn)
    water_she = energies.water_lines(ctx)
    water_sp = energies.water_energy(table, ctx)
    sources = {}
    for se in [*energies_list, water_sp]:
        sources[se.species.source] = table.sources.get(se.species.source, se.species.source)
    return build_map(conditions, entries, [*energies_list, water_sp], water_she, warn, sources)


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
