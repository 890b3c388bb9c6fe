"""Command-line commands for the analyses: solubility, window, field, reading, compare."""

from __future__ import annotations

import argparse
import json
import sys

from pourbaix.cli.files import (
    FIGURE_SUFFIXES,
    add_outputs,
    checked_outputs,
    csv_text,
    report_target,
    save_figures,
    write_report_from_args,
    write_text,
)
from pourbaix.cli.types import finite_number as _number
from pourbaix.cli.types import positive_number as _positive
from pourbaix.errors import DataFileError, OptionError
from pourbaix.outputs import announce_written

__all__ = ["register"]

_FIGURES = FIGURE_SUFFIXES
_SAFETY = (
    "Safety: a map is a thermodynamic prediction (equilibrium only); it says nothing about rates, film "
    "quality, pitting, crevices or microbiology. Cathodic-protection criteria, drinking-water decisions and "
    "leach chemistries (cyanide, strong acids, sulfide/H2S) are for local codes, the applicable standards and "
    "licensed practice to decide."
)


# Most rows a solubility table may have (a finer step is a typing slip, not a table).
_MAX_TABLE_ROWS = 10_000


# ------------------------------------------------------------------ argument types


def _one_element(a, command):
    if len(a.element) != 1:
        raise OptionError(f"{command}: give one element, got {' '.join(a.element)}")
    return a.element[0]


def _notes(dmap):
    for w in dmap.warnings:
        print(f"pourbaix: note: {w}", file=sys.stderr)


def _report(a, dmap, extra, figure=None):
    """Write the report asked for with ``--report`` (map, analysis sections, cautions).

    Under ``--json`` the "wrote" line goes to stderr so that stdout stays one JSON document.
    """
    if not getattr(a, "report", None):
        return None
    return write_report_from_args(a, dmap, extra=extra, figure=figure, to_stderr=a.json)


def _parser(sub, name, help_text, description, example):
    return sub.add_parser(
        name,
        help=help_text,
        description=description,
        epilog=f"example: {example}\n\n{_SAFETY}",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )


# ------------------------------------------------------------------ solubility
def _cmd_solubility(a, map_kwargs):
    import numpy as np

    from pourbaix.analyses.limits import REAL_SOLUTION_LIMIT_MOL_KG, beyond_real_solution
    from pourbaix.analyses.solubility import DEFAULT_LEVELS, solubility_curve, solubility_minimum
    from pourbaix.maps.domain_map import compute_map
    from pourbaix.plot.analysis_figures import add_solubility_lines, draw_solubility_curve

    element = _one_element(a, "solubility")
    if (a.potential is None) == (a.along is None):
        raise OptionError("solubility: give either --potential E or --along oxygen|hydrogen")
    lo, hi = a.ph
    if not hi > lo:
        raise OptionError(f"--ph: LO must be below HI, got {lo:g} {hi:g}")
    if not (0 < a.step <= hi - lo):
        raise OptionError(
            f"--step must be above 0 and at most the pH span ({hi - lo:g}), got {a.step:g}"
        )
    if (hi - lo) / a.step > _MAX_TABLE_ROWS:
        raise OptionError(
            f"--step {a.step:g} would make {(hi - lo) / a.step:.3g} rows; give a step of at least "
            f"{(hi - lo) / _MAX_TABLE_ROWS:g} (at most {_MAX_TABLE_ROWS} rows)"
        )
    outs = checked_outputs(a.out, (*_FIGURES, ".csv", ".json"))
    map_outs = checked_outputs(a.map_out, _FIGURES, "--map-out")
    report = report_target(a)
    kwargs = map_kwargs(a)
    kwargs["ph_range"] = (min(lo, -2.0), max(hi, 16.0))
    dmap = compute_map(element, **kwargs)
    _notes(dmap)
    n = int(round((hi - lo) / a.step))
    ph = np.linspace(lo, lo + n * a.step, n + 1)
    ph = ph[ph <= hi + 1e-9]
    res = solubility_curve(dmap, ph, potential_v=a.potential, along=a.along)
    ph_min, at_min = solubility_minimum(
        dmap, potential_v=a.potential, along=a.along, ph_range=(lo, hi)
    )
    ref = dmap.conditions.reference
    rows = res.rows()
    where = (
        f"E = {a.potential:+.3f} V vs {ref}"
        if a.along is None
        else f"along the {a.along} water line (1 bar), vs {ref}"
    )
    if a.json:
        print(
            json.dumps(
                {
                    "element": element,
                    "reference": ref,
                    "rows": [
                        {**r, "beyond_real_solution": beyond_real_solution(r["total_mol_kg"])}
                        for r in rows
                    ],
                    "real_solution_limit_mol_kg": REAL_SOLUTION_LIMIT_MOL_KG,
                    "minimum": {
                        "ph": ph_min,
                        "total_mol_kg": float(at_min.total_molality),
                        "solid": at_min.solid,
                    },
                },
                indent=2,
                ensure_ascii=False,
                allow_nan=False,
                default=str,
            )
        )
    else:
        c = dmap.conditions
        print(
            f"Solubility of {element} at {c.temperature_c:g} °C, {where}: total dissolved {element} in equilibrium "
            f"with the least-soluble solid"
        )
        print(
            f"{'pH':>6}  {'E [V]':>7}  {'log10 S':>8}  {'S [mol/kg]':>10}  {'solid':<14} {'main dissolved':<16} at the map's activity"
        )
        from pourbaix.analyses.limits import amount_text, beyond_real_solution

        for r in rows:
            e = r[f"potential_v_vs_{ref}"]
            if beyond_real_solution(r["total_mol_kg"]):  # not a number anyone can use
                log_s, s, sat = "—", "—", amount_text(r["total_mol_kg"])
            else:
                log_s, s, sat = (
                    f"{r['log10_total']:.3f}",
                    f"{r['total_mol_kg']:.3g}",
                    r["saturation"],
                )
            print(
                f"{r['ph']:6.2f}  {e:+7.3f}  {log_s:>8}  {s:>10}  {r['solid']:<14} {r['dominant']:<16} {sat}"
            )
        print(
            f"minimum: pH {ph_min:.2f}, S = {float(at_min.total_molality):.3g} mol/kg ({at_min.solid}, mainly {at_min.dominant})"
        )
        if np.nanmax(res.log10_total) > 0:
            print(
                "note: S above 1 mol/kg means no solid can form there (the solid would dissolve entirely)"
            )
    for o in outs:
        if o.suffix.lower() == ".csv":
            write_text(o, csv_text(rows))
        elif o.suffix.lower() == ".json":
            write_text(
                o,
                json.dumps(
                    {"element": element, "reference": ref, "rows": rows},
                    indent=2,
                    ensure_ascii=False,
                    default=str,
                )
                + "\n",
            )
    figs = [o for o in outs if o.suffix.lower() in _FIGURES]
    if figs:
        fine = np.linspace(lo, hi, max(201, int((hi - lo) / 0.02) + 1))
        save_figures(
            draw_solubility_curve(
                solubility_curve(dmap, fine, potential_v=a.potential, along=a.along)
            ),
            figs,
        )
    levels = a.levels or DEFAULT_LEVELS
    if map_outs or report:
        from pourbaix.plot import draw

        # one drawing of the map with its iso-solubility lines serves --map-out and the report
        map_ax = draw.draw_map(dmap)
        add_solubility_lines(map_ax, dmap, levels, basis=a.basis)
        save_figures(map_ax, map_outs)
        if report:
            summary = (
                f"Lowest total dissolved {element} between pH {lo:g} and {hi:g}, {where}: pH {ph_min:.2f}, "
                f"S = {float(at_min.total_molality):.3g} mol/kg (solid {at_min.solid}, mainly {at_min.dominant}).",
                "Iso-solubility lines on the map ("
                + ("total dissolved" if a.basis == "total" else "each dissolved species on its own")
                + "): "
                + ", ".join(f"{v:g}" for v in levels)
                + " mol/kg.",
            )
            try:
                _report(
                    a,
                    dmap,
                    [res, ("Solubility minimum and iso-solubility lines", "\n\n".join(summary))],
                    figure=map_ax,
                )
            finally:
                import matplotlib.pyplot as plt

                plt.close(map_ax.figure)
    return 0


# ------------------------------------------------------------------ window
def _cmd_window(a, map_kwargs):
    from pourbaix.analyses.windows import describe_window, leach_window
    from pourbaix.plot.analysis_figures import draw_window

    target = _one_element(a, "window")
    outs = checked_outputs(a.out, (*_FIGURES, ".json"))
    report_target(a)
    kwargs = map_kwargs(a)
    w = leach_window(
        target,
        a.keep_solid or (),
        a.dissolved_at_least,
        a.others_at_most,
        basis=a.basis,
        within_water=not a.beyond_water,
        **kwargs,
    )
    for m in w.maps.values():
        _notes(m)
    if a.json:
        print(json.dumps(w.to_dict(), indent=2, ensure_ascii=False))
    else:
        print("\n".join(describe_window(w)))
        for note in w.notes[1:]:
            print(f"  note: {note}")
    for o in outs:
        if o.suffix.lower() == ".json":
            write_text(o, json.dumps(w.to_dict(), indent=2, ensure_ascii=False) + "\n")
    figs = [o for o in outs if o.suffix.lower() in _FIGURES]
    if figs:
        save_figures(draw_window(w), figs)
    _report(a, w.maps[w.dissolve], w)
    return 0


# ------------------------------------------------------------------ field
def _cmd_field(a, map_kwargs):
    from dataclasses import replace

    from pourbaix.analyses.field import (
        field_table_lines,
        place_readings_at_temperature,
        read_field_csv,
    )
    from pourbaix.plot.analysis_figures import draw_field_groups

    outs = checked_outputs(a.out, (*_FIGURES, ".json", ".csv", ".html"))
    report_target(a)
    data = read_field_csv(a.readings)
    for p in data.problems:
        print(
            f"pourbaix: skipped {a.readings}:{p.line}: {p.reason}"
            + (f" (column {p.column})" if p.column else ""),
            file=sys.stderr,
        )
    if not data.rows:
        raise DataFileError(
            [
                (
                    str(a.readings),
                    0,
                    "",
                    f"no usable reading ({len(data.problems)} row(s) skipped, listed above)",
                )
            ]
        )
    # readings without a temperature column use --temperature
    groups = place_readings_at_temperature(a.element, data, group=a.group, **map_kwargs(a))
    dmap = groups[0][0]
    _notes(dmap)
    rows = [r for _, d in groups for r in d.rows]
    temps = [d.map_temperature_c for _, d in groups for _ in d.rows]
    notes = [n for _, d in groups for n in d.notes]
    data = replace(groups[0][1], rows=rows, notes=notes, problems=data.problems)
    table = [{**row, "map_temperature_c": t} for row, t in zip(data.table(), temps, strict=True)]
    if a.json:
        print(
            json.dumps(
                {
                    "reference": data.reference,
                    "readings": table,
                    "problems": [
                        {"line": p.line, "column": p.column, "reason": p.reason}
                        for p in data.problems
                    ],
                    "notes": data.notes,
                },
                indent=2,
                ensure_ascii=False,
            )
        )
    else:
        c = dmap.conditions
        where = (
            f"the {'-'.join(c.elements)} map at {c.temperature_c:g} °C"
            if len(groups) == 1
            else f"the {'-'.join(c.elements)} maps at their own temperatures "
            f"({', '.join(f'{d.map_temperature_c:g}' for _, d in groups)} °C)"
        )
        print(
            f"{len(data.rows)} reading(s) on {where}, potentials vs {c.reference}; "
            f"{len(data.problems)} row(s) skipped"
        )
        print("\n".join(field_table_lines(data, groups)))
        for n in data.notes:
            print(f"note: {n}")
        if any(r.state == "passivation" for r in data.rows):
            print(
                "note: passivation means a solid is thermodynamically stable; whether it protects is a kinetic question"
            )
    for o in outs:
        if o.suffix.lower() == ".json":
            write_text(
                o,
                json.dumps(
                    {"reference": data.reference, "readings": table},
                    indent=2,
                    ensure_ascii=False,
                )
                + "\n",
            )
        elif o.suffix.lower() == ".csv":
            write_text(o, csv_text(table))
        elif o.suffix.lower() == ".html":
            _field_page(o, groups)
    figs = [o for o in outs if o.suffix.lower() in _FIGURES]
    if figs:
        save_figures(draw_field_groups(groups), figs)
    _report(a, dmap, data)
    return 0


def _field_page(path, groups):
    """Interactive page of the readings: a slider over the maps of their temperatures."""
    from pourbaix.plot.interactive import write_interactive

    readings = []
    for d, data in groups:
        for r in data.rows:
            details = {
                "site": r.site,
                "time": r.time,
                "measured": f"{r.potential_v:+.3f} V vs {r.reference}",
                "temperature": "" if r.temperature_c is None else f"{r.temperature_c:g} °C",
                "classified on": f"the map at {d.conditions.temperature_c:g} °C: {r.species} ({r.state})",
                "file line": str(r.line),
            }
            readings.append(
                {
                    "label": r.label or r.site or r.time or f"line {r.line}",
                    "ph": r.ph,
                    "potential_v": r.potential_v_map,
                    "details": {k: v for k, v in details.items() if v},
                }
            )
    maps = [d for d, _ in groups]
    write_interactive(
        path, maps, parameter="temperature" if len(maps) > 1 else None, readings=readings
    )
    announce_written(path)


# ------------------------------------------------------------------ reading
def _cmd_reading(a, map_kwargs):
    from pourbaix.analyses.reading import corrosion_reading
    from pourbaix.maps.domain_map import compute_map
    from pourbaix.physics.electrodes import get_reference

    element = _one_element(a, "reading")
    report_target(a)
    kwargs = map_kwargs(a)
    # the map is vs the electrode of the measurement, as corrosion_reading(element, ...) builds it;
    # computed here once so that the report shows the same map
    ref = get_reference(kwargs.pop("reference")).name
    dmap = compute_map(element, reference=ref, **kwargs)
    _notes(dmap)
    r = corrosion_reading(dmap, a.ph, a.potential, ref)
    if a.json:
        print(json.dumps(r.to_dict(), indent=2, ensure_ascii=False))
        _report(a, dmap, r)
        return 0
    print(
        f"{element} at pH {r.ph:g}, E = {r.potential_v:+.3f} V vs {r.reference} ({r.potential_v_she:+.3f} V vs SHE), {r.temperature_c:g} °C"
    )
    print(f"  reading:  {r.reading.upper()} ({r.state}; stable: {r.species})")
    if r.margin_to_immunity_mv is None:
        print(f"  immunity: none at pH {r.ph:g}")
    elif r.margin_to_immunity_mv > 0:
        print(
            f"  immunity: below {r.immunity_potential_v:+.3f} V vs {r.reference}; the potential must fall {r.margin_to_immunity_mv:.0f} mV to reach it"
        )
    else:
        print(
            f"  immunity: up to {r.immunity_potential_v:+.3f} V vs {r.reference}; {-r.margin_to_immunity_mv:.0f} mV of room inside it"
        )
    if r.cp_check is not None:
        cp = r.cp_check
        verdict = "more negative than" if cp["meets"] else "less negative than"
        print(
            f"  cathodic-protection criterion (common practice): {cp['potential_v']:+.3f} V vs {cp['reference']} is "
            f"{abs(cp['difference_mv']):.0f} mV {verdict} {cp['criterion_v']:+.2f} V"
        )
    for text in r.cautions:
        print(f"  caution: {text}")
    _report(a, dmap, r)
    return 0


# ------------------------------------------------------------------ compare
def _cmd_compare(a, map_kwargs):
    from pourbaix.analyses.compare import compare_maps, comparison_table_lines
    from pourbaix.maps.domain_map import compute_map
    from pourbaix.plot.analysis_figures import draw_comparison
    from pourbaix.tables.species import load_species

    outs = checked_outputs(a.out, (*_FIGURES, ".json", ".csv"))
    report_target(a)
    base = map_kwargs(a)
    other = dict(base)
    changed = []
    if a.against_dataset is not None:
        other["dataset"] = a.against_dataset
        changed.append("dataset")
    if a.against_temperature is not None:
        other["temperature_c"] = a.against_temperature
        changed.append("temperature")
    if a.against_activity is not None:
        other["activity"] = a.against_activity
        other["molality"] = None
        changed.append("activity")
    if a.against_data:
        other["data_files"] = tuple(base.get("data_files", ())) + tuple(a.against_data)
        changed.append("data")
    if not changed:
        raise OptionError(
            "compare: say what the second map changes: --against-dataset, --against-temperature, --against-activity or --against-data"
        )
    if (
        base.get("table") is None
        and other.get("dataset") == base.get("dataset")
        and other.get("data_files") == base.get("data_files")
    ):
        table = load_species(base.get("dataset", "default"), tuple(base.get("data_files", ())))
        base["table"] = other["table"] = table
    map_a = compute_map(a.element, **base)
    map_b = compute_map(a.element, **other)
    _notes(map_a)
    _notes(map_b)
    cmp = compare_maps(map_a, map_b, ph=a.at_ph)
    ca, cb = map_a.conditions, map_b.conditions
    if any(o.suffix.lower() in _FIGURES for o in outs) and (
        abs(ca.reference_offset_v - cb.reference_offset_v) > 1e-9
        or ca.reference_slope_v_per_ph != cb.reference_slope_v_per_ph
    ):
        raise OptionError(
            f"--out: the {ca.reference} electrode itself moves between {ca.temperature_c:g} and {cb.temperature_c:g} °C, "
            "so one potential axis cannot serve both maps; draw the overlay vs SHE (--reference SHE)"
        )
    rows = cmp.rows()
    if a.json:
        print(
            json.dumps(
                {
                    "map_a": cmp.label_a,
                    "map_b": cmp.label_b,
                    "reference": cmp.reference,
                    "boundaries": rows,
                    "notes": cmp.notes,
                },
                indent=2,
                ensure_ascii=False,
            )
        )
    else:
        print("\n".join(comparison_table_lines(cmp)))
    for o in outs:
        if o.suffix.lower() == ".json":
            write_text(
                o,
                json.dumps(
                    {
                        "map_a": cmp.label_a,
                        "map_b": cmp.label_b,
                        "reference": cmp.reference,
                        "boundaries": rows,
                    },
                    indent=2,
                    ensure_ascii=False,
                )
                + "\n",
            )
        elif o.suffix.lower() == ".csv":
            write_text(o, csv_text(rows))
    figs = [o for o in outs if o.suffix.lower() in _FIGURES]
    if figs:
        save_figures(draw_comparison(cmp), figs)
    _report(a, map_a, cmp)
    return 0


# ------------------------------------------------------------------ registration
def register(sub, add_conditions, map_kwargs):
    """Add the analysis commands to the main parser.

    Parameters
    ----------
    sub : argparse._SubParsersAction
        The main parser's subcommands.
    add_conditions : callable
        ``add_conditions(parser, window=True)`` adds the common condition options.
    map_kwargs : callable
        ``map_kwargs(args)`` turns them into keyword arguments of ``compute_map``.
    """
    p = _parser(
        sub,
        "solubility",
        "total dissolved element against pH (table, curve, iso-solubility lines)",
        "Total dissolved element in equilibrium with its least-soluble solid, summed over every dissolved "
        "species (complexes included), along pH at a fixed potential or along a water line.",
        "pourbaix solubility Zn --potential 0.0 --ph 4 14 --out zn.png --out zn.csv",
    )
    add_conditions(p, window=False)
    p.add_argument(
        "--potential", type=_number, metavar="E", help="fixed potential [V vs --reference]"
    )
    p.add_argument(
        "--along",
        choices=("oxygen", "hydrogen"),
        help="follow the O2/H2O or H2O/H2 line (1 bar) instead",
    )
    p.add_argument(
        "--ph-range",
        "--ph",
        dest="ph",
        nargs=2,
        type=_number,
        metavar=("LO", "HI"),
        default=(0.0, 14.0),
        help="pH range of the table (default 0 14); --ph LO HI is the older spelling",
    )
    p.add_argument(
        "--step",
        type=_positive,
        default=0.5,
        metavar="DPH",
        help=f"pH step of the table (default 0.5; at most {_MAX_TABLE_ROWS} rows)",
    )
    p.add_argument(
        "--out",
        action="append",
        default=[],
        metavar="FILE",
        help="curve as .png/.svg/.pdf, table as .csv/.json; repeatable",
    )
    p.add_argument(
        "--map-out",
        action="append",
        default=[],
        metavar="FILE",
        help="the map with iso-solubility lines (.png/.svg/.pdf)",
    )
    p.add_argument(
        "--solubility-lines",
        "--levels",
        dest="levels",
        nargs="+",
        type=_positive,
        default=None,
        metavar="MOL_KG",
        help="levels of the iso-solubility lines [mol/kg] (default 1e-2 1e-4 1e-6 1e-8; the same "
        "option as on `pourbaix map`; --levels is the older name)",
    )
    p.add_argument(
        "--basis",
        choices=("total", "species"),
        default="total",
        help="lines of the total (default) or of each dissolved species on its own",
    )
    add_outputs(p)
    p.set_defaults(func=lambda a: _cmd_solubility(a, map_kwargs), window=False)

    w = _parser(
        sub,
        "window",
        "leach/separation window: where one element dissolves and others stay solid",
        "The region of pH and potential where ELEMENT is dissolved at or above a level while each element "
        "given with --keep-solid stays solid or dissolved at or below its level; with its area, bounds, the "
        "point with most room and the room there. An empty window says which condition rules it out.",
        "pourbaix window Cu --keep-solid Fe --dissolved-at-least 1e-2 --others-at-most 1e-5 --ligand S=0.1 --out w.png",
    )
    add_conditions(w)
    w.add_argument(
        "--keep-solid",
        nargs="+",
        action="extend",
        metavar="ELEMENT",
        help="element(s) to keep solid (repeatable)",
    )
    w.add_argument(
        "--dissolved-at-least",
        type=_positive,
        default=1e-2,
        metavar="MOL_KG",
        help="level ELEMENT must reach (default 1e-2)",
    )
    w.add_argument(
        "--others-at-most",
        type=_positive,
        default=1e-5,
        metavar="MOL_KG",
        help="level the kept elements must stay under (default 1e-5)",
    )
    w.add_argument(
        "--basis",
        choices=("total", "species"),
        default="total",
        help="total dissolved (default) or each dissolved species on its own",
    )
    w.add_argument(
        "--beyond-water",
        action="store_true",
        help="do not limit the window to the stability field of water",
    )
    add_outputs(w, "figure (.png/.svg/.pdf) or .json; repeatable")
    w.set_defaults(func=lambda a: _cmd_window(a, map_kwargs), window=True)

    f = _parser(
        sub,
        "field",
        "place field readings (CSV) on a map",
        "Read measured points (columns ph, potential_v, reference; optional temperature_c, label, time, site), "
        "convert each to SHE and to the map's reference, classify it (species, state, margins) on the map at its "
        "own temperature and print a table; bad rows are listed with their line numbers and the rest are used. "
        "With a time column, the readings of each site (or label) are drawn as one path.",
        "pourbaix field Fe --readings loop.csv --reference SCE --out loop.png",
    )
    add_conditions(f)
    f.add_argument("--readings", required=True, metavar="FILE.csv", help="the readings")
    f.add_argument(
        "--group",
        choices=("temperature", "reading", "none"),
        default="temperature",
        help="maps for the readings: one per temperature of the readings, rounded to 1 °C (default); "
        "one per reading at its exact temperature; or none (all on the map at --temperature)",
    )
    add_outputs(f, "figure (.png/.svg/.pdf), .csv, .json or .html (interactive page); repeatable")
    f.set_defaults(func=lambda a: _cmd_field(a, map_kwargs), window=True)

    r = _parser(
        sub,
        "reading",
        "corrosion reading of one measurement (immune, passive, corroding)",
        "Read a measured potential (vs --reference) and pH against the metal's map: immune, passive or "
        "corroding, the margin to immunity in mV and, for iron/steel, the usual cathodic-protection criterion "
        "(-0.85 V vs Cu/CuSO4, common practice) alongside.",
        "pourbaix reading Fe --ph 8 --potential -0.9 --reference Cu/CuSO4",
    )
    add_conditions(r, window=False)
    r.add_argument("--ph", type=_number, required=True, metavar="X", help="measured pH")
    r.add_argument(
        "--potential",
        type=_number,
        required=True,
        metavar="E",
        help="measured potential [V vs --reference]",
    )
    add_outputs(r)
    r.set_defaults(func=lambda a: _cmd_reading(a, map_kwargs), window=False)

    c = _parser(
        sub,
        "compare",
        "how far each boundary moves between two maps",
        "Compute the map twice - as given, and with another data set, temperature, activity or user data file - "
        "and list how far each boundary moved (mV at a pH, or pH for vertical lines); draws both on one figure.",
        "pourbaix compare Fe --dataset default --against-dataset bpj85 --out fe-sets.png",
    )
    add_conditions(c)
    c.add_argument("--against-dataset", metavar="NAME", help="second map: this data set")
    c.add_argument(
        "--against-temperature", type=_number, metavar="C", help="second map: this temperature [°C]"
    )
    c.add_argument(
        "--against-activity",
        type=_positive,
        metavar="A",
        help="second map: this activity of dissolved species",
    )
    c.add_argument(
        "--against-data",
        action="append",
        default=[],
        metavar="FILE",
        help="second map: add this user species table",
    )
    c.add_argument(
        "--at-ph",
        type=_number,
        metavar="X",
        help="compare every sloped boundary at this pH (default: each boundary's midpoint)",
    )
    add_outputs(c, "overlay figure (.png/.svg/.pdf), .csv or .json; repeatable")
    c.set_defaults(func=lambda a: _cmd_compare(a, map_kwargs), window=True)
