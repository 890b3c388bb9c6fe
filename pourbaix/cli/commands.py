"""The ``pourbaix`` command line: maps, probes, boundary equations and data listings."""

from __future__ import annotations

import argparse
import dataclasses
import json
import math
import sys
from pathlib import Path

from pourbaix.cli.files import add_report_option, write_report_from_args
from pourbaix.cli.types import finite_number as _float
from pourbaix.cli.types import named_positive, ratio_amounts
from pourbaix.cli.types import positive_number as _positive_float
from pourbaix.errors import OptionError, PourbaixError
from pourbaix.outputs import announce_written

__all__ = ["main", "build_parser"]

SAFETY = (
    "Safety: a map is a thermodynamic prediction (equilibrium only). It says nothing about rates, "
    "film quality, pitting, crevices, stress corrosion or microbiology. Cathodic-protection "
    "criteria, drinking-water decisions and leach chemistries (cyanide, strong acids, sulfide/H2S) "
    "are for local codes, the applicable standards and licensed practice to decide. Hot "
    "pressurised water (boilers, autoclaves, geothermal brines) is a pressure-vessel hazard: "
    "equipment is designed, inspected and run under the applicable pressure-equipment codes."
)

_OUT_KINDS = (".png", ".svg", ".pdf", ".json", ".csv", ".html")
# names of pourbaix.plot.draw.PALETTES, kept here so that building the parser does not import the drawing
_PALETTES = ("default", "grey")


class _Parser(argparse.ArgumentParser):
    """argparse with our exit status 2 and a one-line message."""

    def error(self, message):
        self.print_usage(sys.stderr)
        sys.stderr.write(f"pourbaix: error: {message}\n")
        raise SystemExit(2)


_ligand = named_positive("S=1e-3", "activity")


def _add_conditions(p, window=True):
    g = p.add_argument_group("conditions")
    g.add_argument("element", nargs="+", help="element symbol(s); several metals need --ratio")
    g.add_argument(
        "--activity",
        type=_positive_float,
        help="activity of dissolved species (default 1e-6; accepted 1e-20 to 10, noted outside 1e-12 to 1)",
    )
    g.add_argument(
        "--molality",
        type=_positive_float,
        help="molality of dissolved species [mol/kg] (instead of --activity; accepted 1e-20 to 20)",
    )
    if window:
        # ranges are --ph-range/--potential-range; --ph X and --potential E name a point
        # (probe, reading); the range commands still take the older --ph LO HI / --potential LO HI
        g.add_argument(
            "--ph-range",
            "--ph",
            dest="ph",
            nargs=2,
            type=_float,
            metavar=("LO", "HI"),
            default=(-2.0, 16.0),
            help="pH window (default -2 16; within -4 to 18); --ph LO HI is the older spelling",
        )
        g.add_argument(
            "--potential-range",
            "--potential",
            dest="potential",
            nargs=2,
            type=_float,
            metavar=("LO", "HI"),
            default=(-2.0, 2.0),
            help="potential window [V vs --reference] (default -2 2; within -5 to 5); "
            "--potential LO HI is the older spelling",
        )
    g.add_argument(
        "--reference",
        default="SHE",
        help="reference electrode for all potentials (see `pourbaix references`)",
    )
    g.add_argument(
        "--temperature",
        type=_float,
        default=25.0,
        metavar="C",
        help="temperature [°C], 0-350 along saturation, to 600 with --pressure (default 25)",
    )
    g.add_argument(
        "--pressure",
        type=_positive_float,
        metavar="BAR",
        help="pressure [bar], up to 5000 (default 1, or saturation above 100 °C)",
    )
    g.add_argument(
        "--ionic-strength",
        type=_float,
        metavar="I",
        help="ionic strength [mol/kg], 0 to the model's limit",
    )
    g.add_argument(
        "--background",
        metavar="SALT=M,...",
        help="background electrolyte, e.g. NaCl=0.5,CaCl2=0.01 [mol/kg]",
    )
    g.add_argument(
        "--activity-model",
        default="davies",
        help="davies, extended-debye-huckel or b-dot (default davies; checked even without an ionic strength)",
    )
    g.add_argument(
        "--water-activity",
        type=_positive_float,
        default=1.0,
        help="activity of water, 0.05 to 1 (below 1 for brines; noted below 0.5)",
    )
    g.add_argument(
        "--ligand",
        action="append",
        type=_ligand,
        default=[],
        metavar="NAME=A",
        help="ligand total activity, e.g. S=1e-3, Cl=0.1, CN=1e-3 (repeatable, each ligand once; accepted 1e-20 to 20)",
    )
    g.add_argument(
        "--ratio",
        type=ratio_amounts,
        help="amounts of the metals, e.g. 70:19:11 for Fe Cr Ni, or 3:1 for Fe K (jarosite, with --ligand S) (largest at most 1e9 x smallest)",
    )
    g.add_argument(
        "--exclude",
        nargs="+",
        default=[],
        metavar="SPECIES",
        help="species to leave out (metal species, or a ligand's own species such as ClO4-)",
    )
    g.add_argument(
        "--include-slow",
        action="store_true",
        help="keep ligand species that do not form on a practical time scale (perchlorate), "
        "which ligand maps leave out by default",
    )
    g.add_argument(
        "--only", nargs="+", metavar="SPECIES", help="keep only these species (and the element)"
    )
    g.add_argument(
        "--metastable",
        choices=("exclude", "include", "only"),
        default="exclude",
        help="metastable solids: leave out (default), include, or use instead of stable ones",
    )
    g.add_argument("--dataset", default="default", help="data set (see `pourbaix datasets`)")
    g.add_argument(
        "--data",
        action="append",
        default=[],
        metavar="FILE",
        help="user species table (same columns); repeatable",
    )


def _map_kwargs(a):
    return dict(
        activity=a.activity,
        molality=a.molality,
        temperature_c=a.temperature,
        pressure_bar=a.pressure,
        ionic_strength=a.ionic_strength,
        background=a.background,
        activity_model=a.activity_model,
        water_activity=a.water_activity,
        ligands=tuple(a.ligand) or None,  # pairs: a ligand given twice is refused, not overwritten
        ratio=a.ratio,
        ph_range=tuple(a.ph) if a.window else (-2.0, 16.0),
        potential_range_v=tuple(a.potential) if a.window else (-2.0, 2.0),
        reference=a.reference,
        dataset=a.dataset,
        data_files=tuple(a.data),
        exclude=tuple(a.exclude),
        only=tuple(a.only) if a.only else None,
        metastable=a.metastable,
        slow_species="include" if getattr(a, "include_slow", False) else "exclude",
    )


def _compute(a):
    if getattr(a, "balance", False) or getattr(a, "total", None):
        from pourbaix.cli.balance import compute_balanced_from_args

        return compute_balanced_from_args(a, _map_kwargs(a))
    from pourbaix.maps.domain_map import compute_map

    return compute_map(a.element, **_map_kwargs(a))


def _print_warnings(dmap):
    for w in dmap.warnings:
        print(f"pourbaix: note: {w}", file=sys.stderr)


def _note_missing_solid(dmap):
    """Say so when a one-element map shows no solid compound, and from what activity one would show."""
    from pourbaix.analyses.solubility import missing_solid_note

    note = missing_solid_note(dmap)
    if note:
        print(f"pourbaix: note: {note}", file=sys.stderr)


def _fmt_margin(v, unit):
    if v is None or not math.isfinite(v):
        return "none"
    return f"{v * 1000:.0f} mV" if unit == "V" else f"{v:.2f} pH"


def _add_uncertainty(parser):
    """--uncertainty and --samples (pourbaix.analyses.uncertainty)."""
    parser.add_argument(
        "--uncertainty",
        type=float,
        nargs="?",
        const=1.0,
        default=None,
        metavar="KJ",
        help="sample the Gibbs energies (each row's stated standard uncertainty, else KJ "
        "kJ/mol, default 1) and show the 95%% bands of the lines / the probability of each species",
    )
    parser.add_argument(
        "--samples", type=int, default=200, help="number of sampled maps (default 200)"
    )


def _uncertain(a):
    from pourbaix.analyses.uncertainty import sample_maps

    return sample_maps(a.element, a.samples, a.uncertainty, **_map_kwargs(a))


# ------------------------------------------------------------------ commands
def cmd_map(a):
    """Draw and/or export a map."""
    outs = [Path(o) for o in (a.out or [])]
    if not outs and not a.report:
        raise OptionError("give at least one --out FILE (or --report FILE)")
    for o in outs:
        if o.suffix.lower() not in _OUT_KINDS:
            raise OptionError(
                f"--out {o}: unknown file type {o.suffix or '(none)'}; use one of {', '.join(_OUT_KINDS)}"
            )
    from pourbaix.outputs import check_writable

    for o in outs + ([Path(a.report)] if a.report else []):
        check_writable(o)
    if a.second_axis:
        from pourbaix.physics.electrodes import get_reference

        get_reference(a.second_axis)  # an unknown name fails before any work
    dmap = _compute(a)
    widened = _widen_for_immunity(a, dmap)
    if widened:
        dmap = widened[0]
        print(f"pourbaix: note: {widened[1]}", file=sys.stderr)
    _print_warnings(dmap)
    if not getattr(a, "balance", False):
        _note_missing_solid(dmap)
    figure_outs = [o for o in outs if o.suffix.lower() in (".png", ".svg", ".pdf")]
    for o in outs:
        if o.suffix.lower() == ".json":
            dmap.to_json(o)
        elif o.suffix.lower() == ".csv":
            dmap.boundaries_csv(o)
    page_outs = [o for o in outs if o.suffix.lower() == ".html"]
    if page_outs:
        from pourbaix.plot.interactive import write_interactive

        maps, parameter = _slider_maps(a, dmap)
        for o in page_outs:
            write_interactive(o, maps, parameter=parameter, palette=a.palette)
    if figure_outs:
        from pourbaix.plot import draw

        notes = [widened[1]] if widened else []
        bands = None
        if a.uncertainty is not None:
            from pourbaix.plot.uncertainty import band_caption

            bands = _uncertain(a)
            notes.append(band_caption(bands))  # under the map, where it hides no label
        ax = draw.draw_map(
            dmap,
            reading=a.reading,
            second_reference=a.second_axis,
            palette=a.palette,
            notes=notes,
        )
        if bands is not None:
            from pourbaix.plot.uncertainty import draw_bands

            draw_bands(ax, bands, caption_in_axes=False)
        if a.solubility_lines is not None:
            from pourbaix.analyses.solubility import DEFAULT_LEVELS
            from pourbaix.plot.analysis_figures import add_solubility_lines

            add_solubility_lines(ax, dmap, a.solubility_lines or DEFAULT_LEVELS)
        for o in figure_outs:
            draw.save_figure(ax, o)
    for o in outs:
        announce_written(o)
    write_report_from_args(a, dmap)
    print(f"{len(dmap.domains)} domains: " + ", ".join(" + ".join(d.species) for d in dmap.domains))
    if dmap.never_stable:
        print("never stable in the window: " + ", ".join(dmap.never_stable))
    return 0


def _widen_for_immunity(a, dmap):
    """(map, note) on a window widened down to show the metal's immunity, or None.

    Only when the potential window is the default one and the metal's
    immunity lies below it somewhere in the pH window (magnesium, aluminium).
    """
    from pourbaix.maps.window import LOWEST_FLOOR_V, widened_floor_v

    if not isinstance(a.potential, tuple) or getattr(a, "balance", False):
        return None  # the user chose the window (argparse gives a list), or a balanced map
    if len(dmap.conditions.elements) != 1:
        return None
    lo, hi = a.potential
    wide = _compute(_with_potential(a, (LOWEST_FLOOR_V, hi)))
    floor = widened_floor_v(wide, lo)
    if floor is None:
        return None
    element = dmap.conditions.elements[0]
    note = (
        f"window widened down to {floor:g} V vs {dmap.conditions.reference} to show {element}'s immunity, "
        f"which lies below the default {lo:g} V (give --potential LO HI to choose the window)"
    )
    return _compute(_with_potential(a, (floor, hi))), note


def _with_potential(a, window):
    b = argparse.Namespace(**vars(a))
    b.potential = list(window)
    return b


def _report_of(a, dmap):
    """Write the --report of a probe, lines or species command (the map's report)."""
    write_report_from_args(a, dmap, to_stderr=True)


def _slider_maps(a, dmap):
    """The maps an interactive page steps through: one per --slider-temperature or --slider-activity."""
    from pourbaix.maps.domain_map import compute_map

    temps, amounts = a.slider_temperature, a.slider_activity
    if temps and amounts:
        raise OptionError("give --slider-temperature or --slider-activity, not both")
    if not temps and not amounts:
        return [dmap], None
    kw = _map_kwargs(a)
    if temps:
        return [compute_map(a.element, **{**kw, "temperature_c": v}) for v in temps], "temperature"
    key = "molality" if a.molality is not None else "activity"
    kw = {k: v for k, v in kw.items() if k not in ("activity", "molality")}
    return [compute_map(a.element, **{**kw, key: v}) for v in amounts], "activity"


def cmd_probe(a):
    """Report the stable species at a point."""
    dmap = _compute(a)
    _print_warnings(dmap)
    r = dmap.probe(a.ph, a.potential)
    _report_of(a, dmap)
    if a.json:
        row = r.rows()[0]
        row["reference"] = dmap.conditions.reference
        row["temperature_c"] = dmap.conditions.temperature_c
        print(json.dumps(row, indent=2))
        return 0
    ref = dmap.conditions.reference
    print(
        f"{'-'.join(dmap.conditions.elements)} at pH {a.ph:g}, E = {a.potential:+.3f} V vs {ref}, {dmap.conditions.temperature_c:g} °C"
    )
    print(f"  stable:  {r.species}")
    print(f"  state:   {r.state}")
    print("  margins to the nearest boundaries:")
    print(f"    up    {_fmt_margin(r.margin_up_v, 'V'):>9}  -> {r.neighbour_up or '-'}")
    print(f"    down  {_fmt_margin(r.margin_down_v, 'V'):>9}  -> {r.neighbour_down or '-'}")
    print(f"    acid  {_fmt_margin(r.margin_acid_ph, 'pH'):>9}  -> {r.neighbour_acid or '-'}")
    print(
        f"    base  {_fmt_margin(r.margin_alkaline_ph, 'pH'):>9}  -> {r.neighbour_alkaline or '-'}"
    )
    if r.state == "passivation":
        print(
            "  (passivation: a solid is thermodynamically stable; whether it protects is a kinetic question)"
        )
    if a.uncertainty is not None:
        from pourbaix.analyses.uncertainty import species_probabilities

        result = _uncertain(a)
        print(
            f"  probability of each species ({len(result.samples)} sampled maps; u(ΔfG°) as "
            f"stated by {result.stated} of {result.perturbed} rows, else {a.uncertainty:g} kJ/mol):"
        )
        for name, share in species_probabilities(result, a.ph, a.potential).items():
            print(f"    {share:6.1%}  {name}")
    return 0


def cmd_lines(a):
    """Print every boundary's reaction and equation."""
    from pourbaix.maps.lines import boundary_equations

    dmap = _compute(a)
    _print_warnings(dmap)
    rows = boundary_equations(dmap)
    _report_of(a, dmap)
    if a.json:
        print(json.dumps(rows, indent=2, ensure_ascii=False))
        return 0
    ref = dmap.conditions.reference
    c = dmap.conditions
    print(
        f"Boundaries of {'-'.join(c.elements)} at {c.temperature_c:g} °C, potentials vs {ref}; k = {rows[0]['nernst_v'] if rows else 0:.5f} V"
    )
    if (c.temperature_c, c.pressure_bar) != (25.0, 1.0):
        print(f"ΔG of each species at {c.temperature_c:g} °C, {c.pressure_bar:.4g} bar from:")
        for se in dmap.species:
            print(f"    {se.species.name:<14} {se.route}")
    for i, r in enumerate(rows, 1):
        print(f"\n{i:2d}. {r['between'][0]}  |  {r['between'][1]}")
        if r.get("reaction"):
            print(f"    {r['reaction']}")
        if r.get("e0_v_she") is not None:
            print(f"    E0 = {r['e0_v_she']:+.4f} V vs SHE;  {r['nernst']}")
        elif r.get("log_k") is not None:
            print(f"    log K = {r['log_k']:.3f};  {r['nernst']}")
        print(f"    line: {r['line']}")
        if r.get("points"):  # a traced curve (mass-balanced map): its vertices, pH and E
            pts = [f"({x:.3f}, {y:+.4f})" for x, y in r["points"]]
            for k in range(0, len(pts), 5):
                print("      " + " ".join(pts[k : k + 5]))
    w = dmap.water
    print(
        f"\nwater: O2/H2O  E = {w['oxygen'][0]:+.4f} {w['oxygen'][1]:+.5f} pH;  H2O/H2  E = {w['hydrogen'][0]:+.4f} {w['hydrogen'][1]:+.5f} pH  (V vs {ref})"
    )
    return 0


def cmd_species(a):
    """List the species of a system."""
    from pourbaix.tables.species import load_species

    if not a.element:
        raise OptionError(
            "species: name an element, e.g. `pourbaix species Fe`; "
            "`pourbaix elements` lists every element with data"
        )
    if getattr(a, "report", None) and len(a.element) != 1:
        raise OptionError(
            "species --report: name one element (the report holds its map, species and sources)"
        )
    table = load_species(a.dataset, tuple(a.data))
    for msg in table.overrides:
        print(f"pourbaix: note: {msg}", file=sys.stderr)
    if getattr(a, "report", None):
        from pourbaix.maps.domain_map import compute_map

        _report_of(
            a,
            compute_map(
                a.element[0],
                dataset=a.dataset,
                data_files=tuple(a.data),
                temperature_c=getattr(a, "temperature", 25.0),
            ),
        )
    els = set(a.element)
    from pourbaix.conditions import parse_elements

    parse_elements(a.element)
    rows = [s for s in table.for_elements(els) if els & set(s.composition)]
    if not rows:
        raise OptionError(
            f"no species of {' '.join(a.element)} in the tables (data set {table.dataset})"
        )
    routes, route_t = _species_routes(table, rows, a.temperature, a.pressure)
    if a.json:
        out = []
        for s in rows:
            d = {
                "name": s.name,
                "phase": s.phase,
                "composition": dict(s.composition),
                "charge": s.charge,
                "dgf_kj_mol": s.dgf_kj_mol,
                "source": s.source,
            }
            for k in (
                "dgf_unc_kj_mol", "dhf_kj_mol", "s_j_molk", "cp_j_molk", "v_cm3_mol", "hkf_source"
            ):  # fmt: skip
                v = getattr(s, k)
                if v is not None:
                    d[k] = v
            if s.hkf is not None:
                d["hkf"] = dict(zip(HKF_NAMES, dataclasses.astuple(s.hkf), strict=True))
            d["route"] = routes[s.key]
            d["route_at"] = route_t
            d["metastable"] = s.metastable
            d["note"] = s.note
            d["origin"] = s.origin
            out.append(d)
        print(json.dumps(out, indent=2, ensure_ascii=False))
        return 0
    print(
        f"{len(rows)} species with {' '.join(a.element)} (data set {table.dataset}; ΔfG° at 25 °C, kJ/mol)"
    )
    w = max(len(s.name) for s in rows)
    print(f"route: how ΔG is carried to {route_t}")
    rw = max(len(r) for r in routes.values())
    print(
        f"{'species':<{w}}  phase  {'ΔfG°':>10}  {'ΔfH°':>10}  {'S°':>8}  {'route':<{rw}}  source      note"
    )
    for s in rows:
        dh = "" if s.dhf_kj_mol is None else f"{s.dhf_kj_mol:10.2f}"
        so = "" if s.s_j_molk is None else f"{s.s_j_molk:8.2f}"
        note = ("[metastable] " if s.metastable else "") + (s.note or "")
        print(
            f"{s.name:<{w}}  {s.phase:<5}  {s.dgf_kj_mol:10.2f}  {dh:>10}  {so:>8}  "
            f"{routes[s.key]:<{rw}}  {s.source:<10}  {note}"
        )
    print("\nsources:")
    for key in sorted({s.source for s in rows}):
        print(f"  {key}: {table.sources.get(key, '(user-provided)')}")
    return 0


HKF_NAMES = (
    "a1_cal_mol_bar",
    "a2_cal_mol",
    "a3_cal_k_mol_bar",
    "a4_cal_k_mol",
    "c1_cal_mol_k",
    "c2_cal_k_mol",
    "omega_cal_mol",
)


def _species_routes(table, rows, temperature_c, pressure_bar):
    """Route each species takes to (T, P); at 25 °C and 1 bar, the route it takes to 100 °C."""
    from pourbaix.physics import energies

    t = float(temperature_c)
    if t == 25.0 and pressure_bar in (None, 1.0):
        t = 100.0
    ctx = energies.make_context(table, t, pressure_bar)
    routes = {s.key: energies.species_gibbs_at(s, ctx)[1] for s in rows}
    return routes, f"{t:g} °C, {ctx.pressure_bar:.4g} bar"


def cmd_references(a):
    """List the reference electrodes."""
    from pourbaix.physics.electrodes import list_references

    refs = list_references()
    if a.json:
        print(json.dumps(refs, indent=2, ensure_ascii=False))
        return 0
    print("Reference electrodes (potential vs SHE at 25 °C; E(SHE) = E(ref) + offset)")
    for r in refs:
        off = r.get("offset_v")
        off_txt = "-0.05916 pH" if off is None else f"{off:+.4f} V"
        print(f"  {r['name']:<18} {off_txt:>12}   {r.get('description', '')}")
        print(f"  {'':<18} {'':>12}   source: {r.get('source', '')}")
    return 0


def cmd_datasets(a):
    """List the data sets."""
    from pourbaix.tables.species import available_datasets, load_species, typed_from_memory

    for name, desc in available_datasets().items():
        print(f"{name}: {desc}")
    rows = load_species().species
    marks = [typed_from_memory(s) for s in rows]
    typed = sum(value for value, _ in marks)
    uncertain = sum(unc for _, unc in marks)
    print(
        f"\n{typed} of {len(rows)} rows of the default data set were typed from memory "
        "(their notes say so and why); `pourbaix elements` shows which elements hold them. "
        f"{uncertain} rows carry a standard uncertainty typed from the printed table from memory."
    )
    return 0


# ------------------------------------------------------------------ parser
def build_parser():
    """The argument parser (exposed for documentation and tests)."""
    p = _Parser(
        prog="pourbaix",
        description="Exact potential-pH (Pourbaix) maps from traceable thermodynamic data.",
        epilog=SAFETY,
    )
    from pourbaix import __version__

    p.add_argument("--version", action="version", version=f"pourbaix {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    sub.required = True

    m = sub.add_parser(
        "map",
        help="draw or export a map",
        description="Compute the exact map of an element system and write it as PNG, SVG, PDF, JSON (map format v1) or CSV (boundaries).",
        epilog="example: pourbaix map Fe --activity 1e-6 --reference SCE --out fe.png --out fe.json\n\n"
        + SAFETY,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    _add_conditions(m)
    m.add_argument(
        "--out",
        action="append",
        metavar="FILE",
        help="output file; extension picks the kind (.png .svg .pdf .json .csv, or .html for an "
        "interactive page: hover for species, state, margins and the nearest boundary); repeatable",
    )
    m.add_argument(
        "--reading",
        action="store_true",
        help="shade the corrosion reading (immunity / passivation / corrosion)",
    )
    m.add_argument(
        "--second-axis",
        metavar="REFERENCE",
        help="add a right-hand potential axis vs another reference",
    )
    m.add_argument(
        "--palette",
        choices=_PALETTES,
        default="default",
        help="fill colours: default (tints by state) or grey (for greyscale print)",
    )
    m.add_argument(
        "--solubility-lines",
        nargs="*",
        type=_positive_float,
        metavar="LEVEL",
        help="draw iso-solubility lines of the total dissolved element [mol/kg] (default levels 1e-2 1e-4 1e-6 1e-8)",
    )
    m.add_argument(
        "--slider-temperature",
        nargs="+",
        type=_float,
        metavar="C",
        help="for an .html page: maps computed at these temperatures [°C], stepped through by a slider",
    )
    m.add_argument(
        "--slider-activity",
        nargs="+",
        type=_positive_float,
        metavar="A",
        help="for an .html page: maps at these dissolved activities (or molalities with --molality), "
        "stepped through by a slider",
    )
    from pourbaix.cli.balance import add_balance_options

    add_balance_options(m)
    add_report_option(m)
    _add_uncertainty(m)
    m.set_defaults(func=cmd_map, window=True)

    pr = sub.add_parser(
        "probe",
        help="what is stable at a point, with margins",
        description="Report the stable species, the corrosion reading and the distances to the nearest boundaries at one pH and potential.",
        epilog="example: pourbaix probe Fe --ph 7 --potential -0.6 --reference SCE\n\n" + SAFETY,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    _add_conditions(pr, window=False)
    pr.add_argument("--ph", type=_float, required=True, metavar="X", help="pH of the point")
    pr.add_argument(
        "--potential",
        type=_float,
        required=True,
        metavar="E",
        help="potential of the point [V vs --reference]",
    )
    pr.add_argument("--json", action="store_true", help="print JSON")
    _add_uncertainty(pr)
    add_report_option(pr)
    pr.set_defaults(func=cmd_probe, window=False)

    ln = sub.add_parser(
        "lines",
        help="each boundary's reaction and equation",
        description="Print every boundary of the map with the reaction it comes from, its E0 and its Nernst form.",
        epilog="example: pourbaix lines Cu --activity 1e-6\n\n" + SAFETY,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    _add_conditions(ln)
    ln.add_argument("--json", action="store_true", help="print JSON")
    from pourbaix.cli.balance import add_balance_options

    add_balance_options(ln)  # a mass-balanced map lists its traced curves
    add_report_option(ln)
    ln.set_defaults(func=cmd_lines, window=True)

    sp = sub.add_parser(
        "species",
        help="list the species of a system with values and sources",
        description="List the species holding the element(s) with ΔfG°, phase, source and notes.",
        epilog="example: pourbaix species Fe --json",
    )
    sp.add_argument("element", nargs="*", help="element symbol(s); `pourbaix elements` lists them")
    sp.add_argument(
        "--dataset", default="default", help="data set to list (see `pourbaix datasets`)"
    )
    sp.add_argument(
        "--data",
        action="append",
        default=[],
        metavar="FILE",
        help="user species table (same columns) added to the data set; repeatable",
    )
    sp.add_argument(
        "--temperature",
        type=_float,
        default=25.0,
        metavar="C",
        help="show the route each species takes to this temperature [°C] (default: to 100 °C)",
    )
    sp.add_argument("--pressure", type=_positive_float, metavar="BAR", help="pressure [bar]")
    sp.add_argument("--json", action="store_true", help="print JSON")
    add_report_option(sp)
    sp.set_defaults(func=cmd_species)

    rf = sub.add_parser(
        "references",
        help="list reference electrodes with values and sources",
        epilog="example: pourbaix references",
    )
    rf.add_argument("--json", action="store_true")
    rf.set_defaults(func=cmd_references)

    ds = sub.add_parser("datasets", help="list the data sets", epilog="example: pourbaix datasets")
    ds.set_defaults(func=cmd_datasets)

    _add_analysis_commands(sub)
    return p


#: Modules that add command groups: each has ``register(sub, add_conditions, map_kwargs)``.
#: A new command group is a new module under ``pourbaix/cli/`` and one line here.
COMMAND_MODULES = (
    "pourbaix.cli.analyses",
    "pourbaix.cli.data_commands",
    "pourbaix.cli.balance",
    "pourbaix.cli.cells",
    "pourbaix.cli.sweep",
)


def _add_analysis_commands(sub):
    import importlib

    for name in COMMAND_MODULES:
        importlib.import_module(name).register(sub, _add_conditions, _map_kwargs)


def main(argv=None):
    """Run the command line; returns the exit status.

    Parameters
    ----------
    argv : list of str, optional
        Arguments (default ``sys.argv[1:]``).
    """
    from pourbaix.outputs import all_or_nothing, check_outputs

    parser = build_parser()
    # Negative numbers as option values (e.g. --potential -1 1) are ordinary here.
    a = parser.parse_args(argv)
    try:
        # every output path is checked before any work, and the files appear together
        # only when the whole command succeeded (an existing file is never replaced otherwise)
        for option, path in output_paths(a):
            try:
                check_outputs([path])
            except PourbaixError as exc:
                raise OptionError(f"{option}: {exc}") from None
        with all_or_nothing():
            return a.func(a) or 0
    except PourbaixError as exc:
        print(f"pourbaix: error: {_one_message(exc)}{_nothing_written()}", file=sys.stderr)
        return 2
    except BrokenPipeError:  # pragma: no cover
        return 0
    except OSError as exc:  # anything the system refused that no check above foresaw
        where = f" ({_one_message(exc.filename)})" if getattr(exc, "filename", None) else ""
        print(f"pourbaix: error: {exc.strerror or exc}{where}{_nothing_written()}", file=sys.stderr)
        return 2
    except MemoryError:
        print("pourbaix: error: out of memory; make the problem smaller", file=sys.stderr)
        return 2


def _nothing_written():
    """Words for the error line when files reported as written were discarded after all."""
    from pourbaix.outputs import discarded_outputs

    gone = discarded_outputs()
    if not gone:
        return ""
    return f" (nothing was written: {len(gone)} finished file(s) discarded, existing files kept)"


def _one_message(exc, limit=4000):
    """The error text, shortened when huge (a message never floods the terminal)."""
    text = str(exc)
    if len(text) <= limit:
        return text
    return f"{text[: limit - 200]} ... ({len(text) - limit + 200} more characters)"


def output_paths(a):
    """Every file a parsed command will write (``--out``, ``--report`` and a Markdown report's figures).

    Parameters
    ----------
    a : argparse.Namespace
        Parsed arguments.

    Returns
    -------
    list of (str, Path)
        The option and the path.
    """
    outs = getattr(a, "out", None) or []
    if isinstance(outs, str | Path):
        outs = [outs]
    paths = [("--out", Path(o)) for o in outs]
    paths += [("--map-out", Path(o)) for o in getattr(a, "map_out", None) or []]
    report = getattr(a, "report", None)
    if report:
        p = Path(report)
        paths.append(("--report", p))
        if p.suffix.lower() == ".md":
            paths.append(("--report", p.with_name(f"{p.stem}-figure-1.svg")))
    return paths


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
