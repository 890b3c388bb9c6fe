"""Screening sweeps: the answers of many maps over a grid of conditions, local or on a Dask cluster.

A sweep runs over every combination of the values given for its dimensions —
element systems (one metal, or several at a ratio), ratio, temperature,
activity or molality of the dissolved species, ionic strength and each
ligand's total activity — and keeps, for every grid point, what a screen
needs rather than the maps themselves:

* the stable species (or assemblage) and its state at given (pH, E) points,
  with the margins to the nearest boundary in each direction and the species
  across it;
* the width in potential over which a solid compound is stable at a pH
  (the passive window at that pH);
* the total dissolved element at a point (single-element systems);
* the area of every domain.

Grid points whose maps share a species set (one element with water, any
temperature, activity or ionic strength) are solved as batches by
:mod:`pourbaix.solve.batch`. Alloy points (several metals at a ratio, no
ligands) take one map per temperature, amount and ionic strength and a walk
of the linear programme per ratio (:func:`pourbaix.maps.systems.units_at_ratio`),
the answers read from the assemblages' planes with the same batch functions:
the species do not change with the ratio, but the optimal combinations do,
so each ratio still needs its walk (most of an alloy map's time). Ligand
systems go map by map with :func:`pourbaix.maps.compute.compute_map`: the
ligands' own maps, and so the regions where the metal's species form from
one ligand species, change with the ligand total and the temperature. The grid is cut into chunks that
run in local processes by default or as tasks on a Dask cluster; each chunk
returns small arrays and, when an output file is given, is saved as it
finishes beside it, so that a sweep that was stopped resumes where it stopped.
The results come back as an ``xarray.Dataset`` with one labelled
dimension per swept condition and units in the attributes, and are written
to NetCDF, Parquet or CSV.

xarray, pandas, a NetCDF engine, pyarrow, tqdm and dask.distributed are
optional (``pip install "pourbaix[scale]"``) and imported only when used.

Every value is a thermodynamic prediction at equilibrium: it says nothing
about rates, film quality, pitting or crevices (see ``CAUTION``).

References
----------
Pourbaix, M. (1974). Atlas of Electrochemical Equilibria in Aqueous
Solutions, 2nd English ed., ch. II. NACE.
Rocklin, M. (2015). Dask: parallel computation with blocked algorithms and
task scheduling. Proceedings of the 14th Python in Science Conference,
130-136. https://doi.org/10.25080/Majora-7b98e3ed-013
Hoyer, S. & Hamman, J. (2017). xarray: N-D labeled arrays and datasets in
Python. Journal of Open Research Software 5(1), 10.
https://doi.org/10.5334/jors.148
"""

from __future__ import annotations

import hashlib
import json
import math
import os
import shutil
import sys
from dataclasses import asdict, dataclass, field
from functools import lru_cache
from pathlib import Path

import numpy as np

from pourbaix.errors import OptionError

__all__ = [
    "SweepSpec",
    "parse_values",
    "make_spec",
    "grid_dimensions",
    "compute_chunk",
    "sweep",
    "sweep_table",
    "write_sweep",
    "OUTPUT_KINDS",
]

#: File kinds a sweep is written to.
OUTPUT_KINDS = (".nc", ".parquet", ".csv")

_POINT_FLOATS = ("margin_up_v", "margin_down_v", "margin_acid_ph", "margin_alkaline_ph")
_POINT_TEXTS = (
    "species",
    "state",
    "neighbour_up",
    "neighbour_down",
    "neighbour_acid",
    "neighbour_alkaline",
)
_UNITS = {
    "temperature_c": "°C",
    "activity": "1",
    "molality": "mol/kg",
    "ionic_strength": "mol/kg",
    "margin_up_v": "V",
    "margin_down_v": "V",
    "margin_acid_ph": "pH units",
    "margin_alkaline_ph": "pH units",
    "passive_width_v": "V",
    "log10_solubility": "log10(mol/kg)",
    "area": "pH V",
    "ph": "1",
    "potential_v": "V",
}
_DESCRIPTIONS = {
    "species": "stable species (assemblage joined by ' + ') at the point",
    "state": "immunity, passivation or corrosion of the principal element at the point",
    "margin_up_v": "distance to the boundary above the point at its pH (inf: none)",
    "margin_down_v": "distance to the boundary below the point at its pH (inf: none)",
    "margin_acid_ph": "distance to the boundary towards lower pH at its potential (inf: none)",
    "margin_alkaline_ph": "distance to the boundary towards higher pH at its potential (inf: none)",
    "neighbour_up": "species across the boundary above ('' where none)",
    "neighbour_down": "species across the boundary below ('' where none)",
    "neighbour_acid": "species across the boundary towards lower pH ('' where none)",
    "neighbour_alkaline": "species across the boundary towards higher pH ('' where none)",
    "passive_width_v": "length of potential, within the window, where a solid compound of the "
    "principal element is stable at the pH given",
    "log10_solubility": "total dissolved element in equilibrium with its least-soluble solid",
    "solubility_solid": "the least-soluble solid, which sets the solubility",
    "area": "area of each domain in the window (0: not stable there)",
}
# maps per chunk: batched grid points are cheap, single maps are not
_CHUNK_BATCH = 512
_CHUNK_SINGLE = 8
# how grid points are cut into chunks (part of the fingerprint: chunks saved under another
# layout are not mixed in); 2: alloy chunks hold every ratio of a condition together
_LAYOUT = 2
_CHUNK_RATIOS = 16  # alloy points solved ratio by ratio: a walk each, one map per condition


@dataclass(frozen=True)
class SweepSpec:
    """What a sweep computes (plain, frozen and picklable: every worker gets a copy).

    Attributes
    ----------
    systems : tuple of tuple of str
        Element systems; several metals need ``ratios``.
    temperature_c : tuple of float
        Temperatures [°C].
    amount : str
        ``activity`` or ``molality``.
    amounts : tuple of float
        Activities [-] or molalities [mol/kg] of the dissolved species.
    ionic_strength : tuple of float or None
        Ionic strengths [mol/kg], or None (zero; not a dimension).
    ligands : tuple of (str, tuple of float)
        Ligand name and its total activities [-].
    ratios : tuple of tuple of float or None
        Amounts of the metals [mol] for several-metal systems.
    points : tuple of (float, float)
        (pH, E) points probed [-, V vs ``reference``].
    passive_ph : float or None
        pH at which the passive width is measured.
    solubility_point : (float, float) or None
        (pH, E) at which the solubility is computed.
    areas : bool
        Whether domain areas are computed.
    options : tuple of (str, object)
        Other keywords of :func:`pourbaix.maps.compute.compute_map`, the same at every grid point.
    """

    systems: tuple
    temperature_c: tuple = (25.0,)
    amount: str = "activity"
    amounts: tuple = (1e-6,)
    ionic_strength: tuple | None = None
    ligands: tuple = ()
    ratios: tuple | None = None
    points: tuple = ()
    passive_ph: float | None = None
    solubility_point: tuple | None = None
    areas: bool = True
    options: tuple = field(default=())

    def fingerprint(self):
        """A short hash of the settings (saved chunks are reused only for the same settings)."""
        text = json.dumps(asdict(self), sort_keys=True, default=str) + f"layout {_LAYOUT}"
        return hashlib.sha256(text.encode()).hexdigest()[:16]


def parse_values(text, name, log=False):
    """Values of a swept condition from text.

    Parameters
    ----------
    text : str or float or sequence of float
        ``LO:HI:N`` (N values from LO to HI, evenly spaced, or log-spaced when
        ``log``), a comma list ``A,B,C``, or one number.
    name : str
        The option, for messages.
    log : bool
        Space ``LO:HI:N`` evenly in log10 (activities, molalities, ligand totals).

    Returns
    -------
    tuple of float

    Raises
    ------
    OptionError
        For text that is not one of these forms, non-finite values or N < 1.

    Examples
    --------
    >>> parse_values("25:100:4", "--temperature")
    (25.0, 50.0, 75.0, 100.0)
    >>> parse_values("1e-8:1e-4:3", "--activity", log=True)
    (1e-08, 1e-06, 0.0001)
    >>> parse_values("7,9.5", "--ph")
    (7.0, 9.5)
    """
    if isinstance(text, int | float):
        vals = (float(text),)
    elif not isinstance(text, str):
        vals = tuple(float(v) for v in text)
    elif text.count(":") == 2:
        lo_t, hi_t, n_t = text.split(":")
        try:
            lo, hi, n = float(lo_t), float(hi_t), int(n_t)
        except ValueError:
            raise OptionError(
                f"{name}: expected LO:HI:N (N a whole number of values), got {text!r}"
            ) from None
        if n < 1:
            raise OptionError(f"{name}: N must be at least 1, got {text!r}")
        if log:
            if lo <= 0 or hi <= 0:
                raise OptionError(f"{name}: log-spaced values need LO and HI > 0, got {text!r}")
            vals = tuple(float(v) for v in np.logspace(math.log10(lo), math.log10(hi), n))
        else:
            vals = tuple(float(v) for v in np.linspace(lo, hi, n))
        if n == 1:
            vals = (lo,)
    else:
        try:
            vals = tuple(float(v) for v in text.replace(" ", "").split(",") if v)
        except ValueError:
            raise OptionError(f"{name}: expected LO:HI:N or A,B,C numbers, got {text!r}") from None
    if not vals or not all(math.isfinite(v) for v in vals):
        raise OptionError(f"{name}: values must be finite numbers, got {text!r}")
    return vals


def _system(elements):
    from pourbaix.conditions import parse_elements

    return tuple(parse_elements(elements))


def make_spec(
    elements=None,
    *,
    systems=None,
    temperature_c=25.0,
    activity=None,
    molality=None,
    ionic_strength=None,
    ligands=None,
    ratio=None,
    at=(),
    passive_ph=None,
    solubility_at=None,
    areas=True,
    **options,
):
    """Check the settings of a sweep once and build its :class:`SweepSpec`.

    Parameters are those of :func:`sweep` (without the running options).

    Returns
    -------
    SweepSpec

    Raises
    ------
    OptionError, ConditionsError
        Naming the option at fault.
    """
    if (elements is None) == (systems is None):
        raise OptionError("give the element(s) of one system, or systems=[...], not both")
    system_list = [elements] if systems is None else list(systems)
    if not system_list:
        raise OptionError("give at least one element system to sweep")
    systems_t = tuple(_system(s) for s in system_list)
    if activity is not None and molality is not None:
        raise OptionError("give either activity or molality values, not both")
    amount = "molality" if molality is not None else "activity"
    given = molality if molality is not None else activity
    amounts = parse_values(1e-6 if given is None else given, amount, log=True)
    temps = parse_values(temperature_c, "temperature")
    ionic = None if ionic_strength is None else parse_values(ionic_strength, "ionic strength")
    lig = []
    for name, values in ligands.items() if isinstance(ligands, dict) else (ligands or ()):
        lig.append((str(name), parse_values(values, f"ligand {name}", log=True)))
    if len({n for n, _ in lig}) != len(lig):
        raise OptionError("a ligand is given twice")
    ratios = None
    if ratio is not None:
        single = isinstance(ratio, str) or isinstance(ratio[0], int | float | np.number)
        rlist = [ratio] if single else list(ratio)
        ratios = tuple(
            tuple(float(v) for v in (r.replace(",", ":").split(":") if isinstance(r, str) else r))
            for r in rlist
        )
    for s in systems_t:
        if len(s) > 1 and ratios is None:
            raise OptionError(f"the system {'-'.join(s)} needs a ratio (ratio=... or --ratio)")
        if ratios is not None and any(len(r) != len(s) for r in ratios):
            raise OptionError(f"every ratio needs {len(s)} amounts for the system {'-'.join(s)}")
    points = tuple((float(p), float(e)) for p, e in at)
    if not points and passive_ph is None and solubility_at is None and not areas:
        raise OptionError(
            "nothing to compute: give points (at), passive_ph, solubility_at or areas"
        )
    for p, e in points:
        if not (math.isfinite(p) and math.isfinite(e)):
            raise OptionError(f"points must be finite (pH, E) pairs, got {(p, e)}")
    sol = None if solubility_at is None else (float(solubility_at[0]), float(solubility_at[1]))
    if sol is not None and all(len(s) > 1 for s in systems_t):
        raise OptionError("solubility is computed for single-element systems only")
    for key in ("ligands", "ratio", "temperature_c", "activity", "molality", "ionic_strength"):
        options.pop(key, None)
    for key in ("ph_range", "potential_range_v", "exclude", "data_files"):
        if key in options and options[key] is not None:
            options[key] = tuple(options[key])
    if options.get("only") is not None:
        options["only"] = tuple(options["only"])
    spec = SweepSpec(
        systems=systems_t,
        temperature_c=temps,
        amount=amount,
        amounts=amounts,
        ionic_strength=ionic,
        ligands=tuple(lig),
        ratios=ratios,
        points=points,
        passive_ph=None if passive_ph is None else float(passive_ph),
        solubility_point=sol,
        areas=bool(areas),
        options=tuple(sorted(options.items())),
    )
    _check_values(spec)
    return spec


def _check_values(spec):
    """Every value of every dimension checked once, the others at their first value."""
    from pourbaix.conditions import make_conditions

    opts = _condition_options(spec)
    base = dict(
        temperature_c=spec.temperature_c[0],
        **{spec.amount: spec.amounts[0]},
        ionic_strength=None if spec.ionic_strength is None else spec.ionic_strength[0],
    )
    for s in spec.systems:
        ratio = None if len(s) == 1 else spec.ratios[0]
        ligs = {n: v[0] for n, v in spec.ligands} or None
        make_conditions(s, ratio=ratio, ligands=ligs, **base, **opts)
        for name, values in grid_dimensions(spec):
            for v in values[1:]:
                kw = dict(base, ratio=ratio, ligands=ligs)
                if name == "ratio":
                    if len(s) == 1:
                        continue
                    kw["ratio"] = tuple(float(x) for x in v.split(":"))
                elif name.startswith("ligand_"):
                    kw["ligands"] = dict(ligs or {}, **{name[7:]: float(v)})
                else:
                    kw[name] = float(v)
                make_conditions(s, **kw, **opts)


def _condition_options(spec):
    return {k: v for k, v in spec.options if k not in ("exclude", "only", "metastable")}


def _species_options(spec):
    return {k: v for k, v in spec.options if k in ("exclude", "only", "metastable")}


def grid_dimensions(spec):
    """The swept dimensions other than the system, in order, with their values.

    Parameters
    ----------
    spec : SweepSpec
        The sweep.

    Returns
    -------
    list of (str, tuple)
        ``ratio`` (labels such as ``"66:17:11"``) when ratios are given,
        ``temperature_c``, ``activity`` or ``molality``, ``ionic_strength``
        when given, then ``ligand_NAME`` for each ligand.

    Examples
    --------
    >>> spec = SweepSpec(systems=(("Fe",),), temperature_c=(25.0, 60.0))
    >>> [(n, len(v)) for n, v in grid_dimensions(spec)]
    [('temperature_c', 2), ('activity', 1)]
    """
    dims = []
    if spec.ratios is not None:
        dims.append(("ratio", tuple(":".join(f"{v:g}" for v in r) for r in spec.ratios)))
    dims.append(("temperature_c", spec.temperature_c))
    dims.append((spec.amount, spec.amounts))
    if spec.ionic_strength is not None:
        dims.append(("ionic_strength", spec.ionic_strength))
    for name, values in spec.ligands:
        dims.append((f"ligand_{name}", values))
    return dims


@lru_cache(maxsize=8)
def _table(dataset, data_files):
    from pourbaix.tables.species import load_species

    return load_species(dataset, data_files)


def _grid_columns(spec, flat):
    dims = grid_dimensions(spec)
    shape = tuple(len(v) for _, v in dims)
    index = np.unravel_index(np.asarray(flat, dtype=int), shape)
    return {name: [values[i] for i in idx] for (name, values), idx in zip(dims, index, strict=True)}


def compute_chunk(spec, system_index, flat):
    """The answers for some grid points of one system (the unit of work of a sweep).

    Parameters
    ----------
    spec : SweepSpec
        The sweep.
    system_index : int
        Index into ``spec.systems``.
    flat : sequence of int
        Flat indices into the grid of :func:`grid_dimensions`.

    Returns
    -------
    dict of ndarray
        Plain arrays (numbers and fixed-width text), small enough to send
        back from a worker: per point variables shaped (n, P), per map ones
        (n,), ``area`` (n, D) with ``area_names`` (D,).
    """
    system = spec.systems[system_index]
    flat = np.asarray(flat, dtype=int)
    cols = _grid_columns(spec, flat)
    opts = dict(spec.options)
    table = _table(opts.get("dataset", "default"), tuple(opts.get("data_files", ())))
    if len(system) == 1 and not spec.ligands:
        out = _chunk_batched(spec, system[0], cols, table)
    elif _by_ratio(spec, system):
        out = _chunk_ratios(spec, system, cols, table)
    else:
        out = _chunk_by_map(spec, system, cols, table)
    out["flat"] = flat
    return out


def _chunk_batched(spec, element, cols, table):
    from pourbaix.solve import batch

    b = batch.batch_planes(
        element,
        temperature_c=cols["temperature_c"],
        **{spec.amount: cols[spec.amount]},
        ionic_strength=cols.get("ionic_strength"),
        table=table,
        **_species_options(spec),
        **_condition_options(spec),
    )
    names = np.array(b.names + ("",), dtype=str)  # index -1 -> ""
    states = np.array(b.states, dtype=str)
    out = {}
    n = b.size
    if spec.points:
        ph = np.array([p for p, _ in spec.points])
        e = np.array([q for _, q in spec.points])
        r = batch.stable_at(b.planes, ph, e)
        out["species"] = names[r["species"]]
        out["state"] = states[r["species"]]
        for key in _POINT_FLOATS:
            out[key] = r[key]
        for key in _POINT_TEXTS[2:]:
            out[key] = names[r[key]]
    if spec.passive_ph is not None:
        passive = np.array(b.states) == "passivation"
        out["passive_width_v"] = batch.passive_width(b.planes, passive, spec.passive_ph, b.window)
    if spec.solubility_point is not None:
        log_total, solid = batch.solubility_at(b, *spec.solubility_point)
        out["log10_solubility"] = log_total
        out["solubility_solid"] = names[solid]
    if spec.areas:
        areas = batch.domain_areas(b.planes, b.window, workers=1)
        keep = areas.max(axis=0) > 0
        out["area_names"] = np.array(
            [nm for nm, k in zip(b.names, keep, strict=True) if k], dtype=str
        )
        out["area"] = areas[:, keep].reshape(n, int(keep.sum()))
    return out


def _by_ratio(spec, system):
    """Whether a system's grid points are solved ratio by ratio from one map per condition."""
    return len(system) > 1 and not spec.ligands and spec.ratios is not None


def _chunk_ratios(spec, system, cols, table):
    """Alloy grid points: one map per temperature, amount and ionic strength, then each ratio.

    The species and their planes do not depend on the ratio, so one map at
    each distinct condition gives them and every ratio is a walk of the
    linear programme (:func:`pourbaix.maps.systems.units_at_ratio`); the
    answers then come from the assemblages' planes with the batch functions
    (:func:`pourbaix.solve.batch.stable_at`, :func:`~pourbaix.solve.batch.passive_width`)
    and the walk's areas, as the map at that ratio would give them.
    """
    from pourbaix.maps.compute import compute_map
    from pourbaix.maps.systems import units_at_ratio
    from pourbaix.solve import batch

    n = len(cols["temperature_c"])
    P = len(spec.points)
    keys = [k for k in ("temperature_c", spec.amount, "ionic_strength") if k in cols]
    groups = {}
    for m in range(n):
        groups.setdefault(tuple(float(cols[k][m]) for k in keys), []).append(m)
    texts = {k: np.empty((n, P), dtype=object) for k in _POINT_TEXTS}
    floats = {k: np.empty((n, P)) for k in _POINT_FLOATS}
    passive = np.full(n, np.nan)
    area_rows = [None] * n
    ph = np.array([p for p, _ in spec.points])
    e = np.array([q for _, q in spec.points])
    for values, members in groups.items():
        kw = dict(_condition_options(spec), **dict(zip(keys, values, strict=True)))
        first = tuple(float(v) for v in cols["ratio"][members[0]].split(":"))
        dmap = compute_map(system, table=table, ratio=first, **_species_options(spec), **kw)
        window = dmap.conditions.window
        for m in members:
            ratio = tuple(float(v) for v in cols["ratio"][m].split(":"))
            units, areas = units_at_ratio(dmap, ratio)
            planes = np.array([u.plane for u in units], dtype=float)[None]  # (1, N, 3)
            names = np.array([" + ".join(u.names) for u in units] + [""], dtype=object)
            states = np.array([u.state for u in units], dtype=object)
            if P:
                r = batch.stable_at(planes, ph, e)
                texts["species"][m] = names[r["species"][0]]
                texts["state"][m] = states[r["species"][0]]
                for key in _POINT_FLOATS:
                    floats[key][m] = r[key][0]
                for key in _POINT_TEXTS[2:]:
                    texts[key][m] = names[r[key][0]]
            if spec.passive_ph is not None:
                mask = states == "passivation"
                passive[m] = batch.passive_width(planes, mask, spec.passive_ph, window)[0]
            area_rows[m] = dict(zip(names[:-1].tolist(), areas.tolist(), strict=True))
    # solubility is a single-element answer: none for an alloy
    no_solid = np.array([""] * n, dtype=object)
    return _chunk_answers(spec, n, texts, floats, passive, np.full(n, np.nan), no_solid, area_rows)


def _chunk_by_map(spec, system, cols, table):
    import shapely

    from pourbaix.maps.compute import compute_map

    n = len(cols["temperature_c"])
    P = len(spec.points)
    texts = {k: np.empty((n, P), dtype=object) for k in _POINT_TEXTS}
    floats = {k: np.empty((n, P)) for k in _POINT_FLOATS}
    passive = np.full(n, np.nan)
    log_sol = np.full(n, np.nan)
    sol_solid = np.empty(n, dtype=object)
    area_rows = []
    opts = _condition_options(spec)
    for m in range(n):
        kw = dict(opts)
        kw["temperature_c"] = float(cols["temperature_c"][m])
        kw[spec.amount] = float(cols[spec.amount][m])
        if "ionic_strength" in cols:
            kw["ionic_strength"] = float(cols["ionic_strength"][m])
        if "ratio" in cols and len(system) > 1:
            kw["ratio"] = tuple(float(v) for v in cols["ratio"][m].split(":"))
        if spec.ligands:
            kw["ligands"] = {name: float(cols[f"ligand_{name}"][m]) for name, _ in spec.ligands}
        dmap = compute_map(system, table=table, **_species_options(spec), **kw)
        if P:
            ph = np.array([p for p, _ in spec.points])
            e = np.array([q for _, q in spec.points])
            r = dmap.probe(ph, e)
            for key in _POINT_TEXTS:
                texts[key][m] = np.asarray(getattr(r, key), dtype=object)
            for key in _POINT_FLOATS:
                floats[key][m] = getattr(r, key)
        if spec.passive_ph is not None:
            lo, hi = dmap.conditions.potential_range_v
            line = shapely.LineString([(spec.passive_ph, lo), (spec.passive_ph, hi)])
            passive[m] = sum(
                d.polygon.intersection(line).length
                for d in dmap.domains
                if d.state == "passivation"
            )
        if spec.solubility_point is not None and len(system) == 1:
            from pourbaix.analyses.solubility import solubility

            s = solubility(dmap, *spec.solubility_point)
            log_sol[m] = float(s.log10_total)
            sol_solid[m] = s.solid
        else:
            sol_solid[m] = ""
        row = {}
        for d in dmap.domains:
            key = " + ".join(d.species)
            row[key] = row.get(key, 0.0) + d.area
        area_rows.append(row)
    return _chunk_answers(spec, n, texts, floats, passive, log_sol, sol_solid, area_rows)


def _chunk_answers(spec, n, texts, floats, passive, log_sol, sol_solid, area_rows):
    """The answers of ``n`` grid points solved map by map or ratio by ratio, as arrays."""
    out = {}
    if spec.points:
        for key in _POINT_TEXTS:
            out[key] = texts[key].astype(str)
        out.update(floats)
    if spec.passive_ph is not None:
        out["passive_width_v"] = passive
    if spec.solubility_point is not None:
        out["log10_solubility"] = log_sol
        out["solubility_solid"] = sol_solid.astype(str)
    if spec.areas:
        names = list(dict.fromkeys(k for row in area_rows for k in row))
        out["area_names"] = np.array(names, dtype=str)
        out["area"] = np.array([[row.get(k, 0.0) for k in names] for row in area_rows]).reshape(
            n, len(names)
        )
    return out


# ---------------------------------------------------------------------- running
def _tasks(spec, chunk_size):
    dims = grid_dimensions(spec)
    size = int(np.prod([len(v) for _, v in dims]))
    tasks = []
    for s, system in enumerate(spec.systems):
        if _by_ratio(spec, system):
            tasks += _ratio_tasks(s, size, len(spec.ratios), chunk_size or _CHUNK_RATIOS)
            continue
        batched = len(system) == 1 and not spec.ligands
        # batched points: chunks of up to 512, at least ~24 of them on a long sweep, so the
        # progress bar moves and an interruption loses little
        step = chunk_size or (
            min(_CHUNK_BATCH, max(16, -(-size // 24))) if batched else _CHUNK_SINGLE
        )
        for start in range(0, size, step):
            tasks.append((s, start, tuple(range(start, min(start + step, size)))))
    return tasks


def _ratio_tasks(s, size, n_ratios, step):
    """Chunks of an alloy system that hold all ratios of a condition together.

    The ratio is the grid's first dimension, so the points of one condition
    (temperature, amount, ionic strength) at every ratio are ``rest + k *
    stride``; a chunk takes such groups whole (split only when there are more
    ratios than ``step``) so that one map serves every ratio in it. A chunk
    is named by its first grid point.
    """
    stride = size // n_ratios
    tasks, current = [], []
    for rest in range(stride):
        group = [rest + k * stride for k in range(n_ratios)]
        for i in range(0, n_ratios, step):
            current += group[i : i + step]
            if len(current) >= step:
                tasks.append((s, current[0], tuple(current)))
                current = []
    if current:
        tasks.append((s, current[0], tuple(current)))
    return tasks


class _Store:
    """Chunks saved beside the output as they finish (``OUT.parts/``), for resuming."""

    def __init__(self, out, spec, restart):
        self.dir = Path(str(out) + ".parts")
        fp = spec.fingerprint()
        manifest = self.dir / "manifest.json"
        if restart and self.dir.exists():
            shutil.rmtree(self.dir)
        if self.dir.exists():
            try:
                saved = json.loads(manifest.read_text())
            except (OSError, ValueError):
                saved = {}
            if saved.get("fingerprint") != fp:
                raise OptionError(
                    f"{self.dir} holds chunks of a sweep with other settings; remove it or "
                    "start again with --restart (restart=True)"
                )
        else:
            self.dir.mkdir(parents=True)
            # written at once (not staged with the command's outputs): it must outlive a failure
            tmp = manifest.with_suffix(".tmp")
            tmp.write_text(json.dumps({"fingerprint": fp, "spec": asdict(spec)}, default=str))
            os.replace(tmp, manifest)

    def _path(self, s, start):
        return self.dir / f"system{s:03d}-chunk{start:09d}.npz"

    def load(self, s, start):
        path = self._path(s, start)
        if not path.exists():
            return None
        try:
            with np.load(path, allow_pickle=False) as data:
                return {k: data[k] for k in data.files}
        except (OSError, ValueError):
            return None  # a chunk cut short: computed again

    def save(self, s, start, result):
        path = self._path(s, start)
        tmp = path.with_suffix(".tmp.npz")
        np.savez(tmp, **result)
        os.replace(tmp, path)

    def remove(self):
        shutil.rmtree(self.dir, ignore_errors=True)


class _Progress:
    """tqdm when it is installed and wanted; else a plain line on stderr now and then."""

    def __init__(self, total, initial, enabled):
        self.bar = None
        self.total, self.done, self.enabled = total, initial, enabled
        if not enabled:
            return
        try:
            from tqdm import tqdm
        except ImportError:
            self._line()
            return
        self.bar = tqdm(total=total, initial=initial, unit="map", desc="sweep", file=sys.stderr)

    def _line(self):
        print(f"sweep: {self.done}/{self.total} maps", file=sys.stderr, flush=True)

    def update(self, n):
        self.done += n
        if self.bar is not None:
            self.bar.update(n)
        elif self.enabled:
            self._line()

    def close(self):
        if self.bar is not None:
            self.bar.close()


def _run(spec, tasks, store, client, workers, progress):
    results = {}
    pending = []
    for s, start, flat in tasks:
        saved = store.load(s, start) if store is not None else None
        if saved is not None:
            results[(s, start)] = saved
        else:
            pending.append((s, start, flat))
    reused = len(results)
    total = sum(len(f) for _, _, f in tasks)
    bar = _Progress(total, sum(len(f) for s, st, f in tasks if (s, st) in results), progress)

    def finish(key, flat, res):
        if store is not None:
            store.save(*key, res)
        results[key] = res
        bar.update(len(flat))

    try:
        if client is not None and pending:
            from dask.distributed import as_completed

            futures = {}
            for s, start, flat in pending:
                fut = client.submit(compute_chunk, spec, s, flat, pure=False)
                futures[fut] = ((s, start), flat)
            for fut in as_completed(list(futures)):
                key, flat = futures[fut]
                finish(key, flat, fut.result())
        elif workers > 1 and len(pending) > 1:
            from concurrent.futures import ProcessPoolExecutor, as_completed

            with ProcessPoolExecutor(max_workers=workers) as pool:
                futures = {
                    pool.submit(compute_chunk, spec, s, flat): ((s, start), flat)
                    for s, start, flat in pending
                }
                for fut in as_completed(futures):
                    key, flat = futures[fut]
                    finish(key, flat, fut.result())
        else:
            for s, start, flat in pending:
                finish((s, start), flat, compute_chunk(spec, s, flat))
    finally:
        bar.close()
    return results, reused


def sweep(
    elements=None,
    *,
    systems=None,
    temperature_c=25.0,
    activity=None,
    molality=None,
    ionic_strength=None,
    ligands=None,
    ratio=None,
    at=(),
    passive_ph=None,
    solubility_at=None,
    areas=True,
    out=None,
    restart=False,
    client=None,
    scheduler=None,
    workers=None,
    chunk_size=None,
    progress=False,
    **options,
):
    """Screen many maps: the answers at every point of a grid of conditions.

    Parameters
    ----------
    elements : str or sequence of str, optional
        One system: an element, or several metals at ``ratio``.
    systems : sequence, optional
        Several systems (each like ``elements``): a dimension of the result.
    temperature_c : float, sequence or str
        Temperatures [°C]; text ``LO:HI:N`` or ``A,B,C`` (see :func:`parse_values`).
    activity, molality : float, sequence or str, optional
        Activities [-] or molalities [mol/kg] of the dissolved species
        (log-spaced for ``LO:HI:N``); default activity 1e-6.
    ionic_strength : float, sequence or str, optional
        Ionic strengths [mol/kg].
    ligands : dict, optional
        Ligand -> total activities, e.g. ``{"S": "1e-4:1e-2:3"}`` [-].
    ratio : sequence or list of sequences, optional
        Amounts of the metals (one ratio, or several: a dimension).
    at : sequence of (float, float)
        (pH, E) points probed [-, V vs ``reference``].
    passive_ph : float, optional
        pH at which the passive width is measured.
    solubility_at : (float, float), optional
        (pH, E) of the solubility [-, V].
    areas : bool
        Compute domain areas.
    out : str or Path, optional
        Write the result (``.nc``, ``.parquet`` or ``.csv``); chunks are
        saved in ``OUT.parts/`` as they finish and reused by a later call
        with the same settings, then removed.
    restart : bool
        Discard saved chunks of an earlier, different or unwanted run.
    client : dask.distributed.Client, optional
        Run the chunks on this Dask cluster.
    scheduler : str, optional
        Address of a Dask scheduler to connect to (instead of ``client``).
    workers : int, optional
        Local processes (default: the number of CPUs); 1 runs in this process.
    chunk_size : int, optional
        Grid points per chunk (default: batched points in chunks of 16 to
        512, about 24 of them on a long sweep; 8 maps map by map).
    progress : bool
        Show a progress bar (tqdm when installed) on stderr.
    **options
        Other keywords of :func:`pourbaix.maps.compute.compute_map`, the same
        at every grid point (``reference``, ``ph_range``, ``potential_range_v``,
        ``activity_model``, ``water_activity``, ``pressure_bar``, ``dataset``,
        ``data_files``, ``exclude``, ``only``, ``metastable``).

    Returns
    -------
    xarray.Dataset
        Dimensions ``system``, the swept conditions (see
        :func:`grid_dimensions`), ``point`` (coordinates ``ph`` and
        ``potential_v``) and ``domain``; units and descriptions in each
        variable's attributes; the caution in the dataset's attributes.

    Raises
    ------
    PourbaixError
        For bad settings (naming the option) before anything runs.

    Examples
    --------
    >>> ds = sweep("Fe", temperature_c=[25, 80], activity="1e-8:1e-4:3", at=[(7.0, -0.5)],
    ...            workers=1)
    >>> dict(ds["state"].sizes)
    {'system': 1, 'temperature_c': 2, 'activity': 3, 'point': 1}
    >>> str(ds["state"].sel(temperature_c=25.0, activity=1e-6, point=0).values[0])
    'corrosion'
    """
    spec = make_spec(
        elements,
        systems=systems,
        temperature_c=temperature_c,
        activity=activity,
        molality=molality,
        ionic_strength=ionic_strength,
        ligands=ligands,
        ratio=ratio,
        at=at,
        passive_ph=passive_ph,
        solubility_at=solubility_at,
        areas=areas,
        **options,
    )
    kind = None
    if out is not None:
        kind = Path(out).suffix.lower()
        if kind not in OUTPUT_KINDS:
            raise OptionError(
                f"cannot write a sweep to {out}: use one of {', '.join(OUTPUT_KINDS)}"
            )
    _require("xarray", "xarray")
    own_client = None
    if scheduler is not None:
        if client is not None:
            raise OptionError("give either a Dask client or a scheduler address, not both")
        _require("dask.distributed", "distributed")
        from dask.distributed import Client

        try:
            own_client = client = Client(scheduler, timeout=20)
        except OSError as exc:
            raise OptionError(f"cannot reach the Dask scheduler at {scheduler}: {exc}") from None
    workers = (os.cpu_count() or 1) if workers is None else int(workers)
    if workers < 1:
        raise OptionError(f"workers must be at least 1, got {workers}")
    store = _Store(out, spec, restart) if out is not None else None
    try:
        results, reused = _run(spec, _tasks(spec, chunk_size), store, client, workers, progress)
    finally:
        if own_client is not None:
            own_client.close()
    ds = _assemble(spec, results)
    ds.attrs["chunks_reused"] = reused
    ds.attrs["chunks"] = len(results)
    if out is not None:
        write_sweep(ds, out)
        store.remove()
    return ds


def _require(module, package):
    import importlib

    try:
        importlib.import_module(module)
    except ImportError:
        raise OptionError(
            f'sweeps need the optional package {package!r}: pip install "pourbaix[scale]"'
        ) from None


# ---------------------------------------------------------------------- results
def _assemble(spec, results):
    import xarray as xr

    from pourbaix.maps.result import CAUTION

    dims = grid_dimensions(spec)
    shape = (len(spec.systems), *(len(v) for _, v in dims))
    size = int(np.prod(shape[1:]))
    P = len(spec.points)
    grid_dims = ["system", *(n for n, _ in dims)]
    arrays = {}

    def slot(name, tail, dtype, fill):
        if name not in arrays:
            arrays[name] = np.full((len(spec.systems), size, *tail), fill, dtype=dtype)
        return arrays[name]

    # domains in the order they first appear in grid order, whatever the chunks were
    # and whatever order they finished in: key (system, grid index, place in that map)
    first = {}
    for s_idx, start in sorted(results):
        res = results[(s_idx, start)]
        if "area" not in res:
            continue
        for j, name in enumerate(res["area_names"]):
            rows = np.flatnonzero(res["area"][:, j] > 0)
            if len(rows):
                key = (s_idx, int(res["flat"][rows[0]]), j)
                first[str(name)] = min(first.get(str(name), key), key)
    area_names = sorted(first, key=first.get)
    col = {n: i for i, n in enumerate(area_names)}
    for (s, _), res in results.items():
        flat = res["flat"]
        for key in _POINT_TEXTS:
            if key in res:
                slot(key, (P,), object, "")[s, flat] = res[key]
        for key in _POINT_FLOATS:
            if key in res:
                slot(key, (P,), float, np.nan)[s, flat] = res[key]
        for key in ("passive_width_v", "log10_solubility"):
            if key in res:
                slot(key, (), float, np.nan)[s, flat] = res[key]
        if "solubility_solid" in res:
            slot("solubility_solid", (), object, "")[s, flat] = res["solubility_solid"]
        if "area" in res:
            a = slot("area", (len(area_names),), float, 0.0)
            for j, name in enumerate(res["area_names"]):
                if str(name) in col:
                    a[s, flat, col[str(name)]] = res["area"][:, j]
    data_vars = {}
    for name, arr in arrays.items():
        tail = {"area": ["domain"]}.get(name, ["point"] if arr.ndim == 3 else [])
        full = arr.reshape(*shape, *arr.shape[2:])
        if full.dtype == object:
            full = full.astype(str)
        attrs = {"description": _DESCRIPTIONS.get(name, name)}
        if name in _UNITS:
            attrs["units"] = _UNITS[name]
        data_vars[name] = (grid_dims + tail, full, attrs)
    coords = {"system": ["-".join(s) for s in spec.systems]}
    for name, values in dims:
        coords[name] = (name, list(values), {"units": _UNITS.get(name, "1")})
    if P:
        coords["point"] = np.arange(P)
        coords["ph"] = ("point", [p for p, _ in spec.points], {"units": "1"})
        ref = dict(spec.options).get("reference", "SHE")
        coords["potential_v"] = ("point", [e for _, e in spec.points], {"units": f"V vs {ref}"})
    if "area" in arrays:
        coords["domain"] = area_names
    opts = dict(spec.options)
    attrs = {
        "title": "pourbaix sweep",
        "reference": str(opts.get("reference", "SHE")),
        "ph_range": list(opts.get("ph_range", (-2.0, 16.0))),
        "potential_range_v": list(opts.get("potential_range_v", (-2.0, 2.0))),
        "dataset": str(opts.get("dataset", "default")),
        "caution": CAUTION,
        "method": "single-element grid points solved as batches of planes (pourbaix.solve.batch); "
        "alloys one map per temperature, amount and ionic strength and a walk of the linear "
        "programme per ratio (pourbaix.maps.systems.units_at_ratio); ligand systems map by map "
        "(compute_map); exact lower envelopes, no raster",
    }
    if spec.passive_ph is not None:
        attrs["passive_ph"] = spec.passive_ph
    if spec.solubility_point is not None:
        attrs["solubility_point"] = list(spec.solubility_point)
    return xr.Dataset(data_vars, coords=coords, attrs=attrs)


def sweep_table(ds):
    """The sweep as one row per grid point (per-point and per-domain values as columns).

    Parameters
    ----------
    ds : xarray.Dataset
        A result of :func:`sweep`.

    Returns
    -------
    pandas.DataFrame
        Columns: the grid coordinates; ``NAME@p`` for point ``p`` of each
        per-point variable; ``passive_width_v``, ``log10_solubility``,
        ``solubility_solid``; ``area[DOMAIN]``.
    """
    import pandas as pd

    grid = [d for d in ds.dims if d not in ("point", "domain")]
    index = pd.MultiIndex.from_product([ds[d].values for d in grid], names=grid)
    cols = {}
    for name, var in ds.data_vars.items():
        if "point" in var.dims:
            for p in range(ds.sizes["point"]):
                cols[f"{name}@{p}"] = var.isel(point=p).transpose(*grid).values.ravel()
        elif "domain" in var.dims:
            for d, dom in enumerate(ds["domain"].values):
                cols[f"area[{dom}]"] = var.isel(domain=d).transpose(*grid).values.ravel()
        else:
            cols[name] = var.transpose(*grid).values.ravel()
    return pd.DataFrame(cols, index=index).reset_index()


def write_sweep(ds, path):
    """Write a sweep (all or nothing) as NetCDF, Parquet or CSV by the file's extension.

    Parameters
    ----------
    ds : xarray.Dataset
        A result of :func:`sweep`.
    path : str or Path
        ``.nc`` (the Dataset as it is), ``.parquet`` or ``.csv`` (one row per
        grid point, see :func:`sweep_table`).

    Returns
    -------
    Path

    Raises
    ------
    OptionError
        For another extension, or a missing optional package.
    """
    path = Path(path)
    kind = path.suffix.lower()
    if kind not in OUTPUT_KINDS:
        raise OptionError(f"cannot write a sweep to {path}: use one of {', '.join(OUTPUT_KINDS)}")
    from pourbaix.outputs import atomic_write_with

    if kind == ".nc":
        out = ds.copy()
        out.attrs = {
            k: (json.dumps(v) if isinstance(v, list | dict) else v) for k, v in ds.attrs.items()
        }

        def writer(tmp):
            out.to_netcdf(tmp)
    else:
        _require("pandas", "pandas")
        if kind == ".parquet":
            _require("pyarrow", "pyarrow")
        table = sweep_table(ds)

        def writer(tmp):
            if kind == ".parquet":
                table.to_parquet(tmp, index=False)
            else:
                table.to_csv(tmp, index=False)

    # finished under a temporary name and moved into place (with the command's other
    # outputs, inside outputs.all_or_nothing)
    atomic_write_with(path, writer)
    return path
