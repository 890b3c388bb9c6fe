"""Command-line commands for half-reactions and cells: series, cell, couple."""

from __future__ import annotations

import argparse
import json
import math
import sys

from pourbaix.cli.files import (
    FIGURE_SUFFIXES,
    add_outputs,
    checked_outputs,
    csv_text,
    report_target,
    save_figures,
    write_text,
)
from pourbaix.cli.types import finite_number as _number
from pourbaix.cli.types import named_positive
from pourbaix.cli.types import positive_number as _positive
from pourbaix.errors import ConditionsError, OptionError
from pourbaix.outputs import announce_written

__all__ = ["register"]

_FIGURES = FIGURE_SUFFIXES
_CAUTION = (
    "Caution: a cell potential or galvanic driving force is thermodynamic; a thermodynamic driving "
    "force is not a corrosion rate. Cathodic-protection and material-selection decisions belong to "
    "the applicable standards and licensed practice."
)


# ------------------------------------------------------------------ argument types


_named_positive = named_positive("Zn2+=0.01", "value", last_equals=True)


_KINETIC_KEYS = {
    "anodic": "anodic_tafel_v",
    "ba": "anodic_tafel_v",
    "cathodic": "cathodic_tafel_v",
    "bc": "cathodic_tafel_v",
    "i0": "exchange_current_a_m2",
    "icorr": "corrosion_current_a_m2",
    "ecorr": "rest_potential_v",
}


def _kinetics(text):
    """``METAL:anodic=0.06,cathodic=0.12,i0=0.01`` -> (metal, dict of ElectrodeKinetics fields)."""
    metal, sep, rest = text.partition(":")
    if not sep or not metal.strip() or not rest.strip():
        raise argparse.ArgumentTypeError(
            f"expected METAL:anodic=B,cathodic=B,i0=I (or icorr=I[,ecorr=E]), got {text!r}"
        )
    fields = {}
    for part in rest.split(","):
        key, eq, value = part.partition("=")
        key = key.strip().lower()
        if not eq or key not in _KINETIC_KEYS:
            raise argparse.ArgumentTypeError(
                f"{metal.strip()}: unknown or incomplete item {part.strip()!r}; use "
                "anodic=, cathodic= (Tafel slopes, V/decade), i0= or icorr= (A/m²), ecorr= (V)"
            )
        try:
            v = float(value)
        except ValueError:
            raise argparse.ArgumentTypeError(
                f"{metal.strip()}: {key}={value!r} is not a number"
            ) from None
        if not math.isfinite(v):
            raise argparse.ArgumentTypeError(f"{metal.strip()}: {key} must be finite")
        if key != "ecorr" and v <= 0:
            raise argparse.ArgumentTypeError(
                f"{metal.strip()}: {key} must be > 0, got {value.strip()}"
            )
        fields[_KINETIC_KEYS[key]] = v
    for need in ("anodic_tafel_v", "cathodic_tafel_v"):
        if need not in fields:
            raise argparse.ArgumentTypeError(
                f"{metal.strip()}: give both Tafel slopes (anodic= and cathodic=, V/decade)"
            )
    return metal.strip(), fields


# ------------------------------------------------------------------ shared helpers
def _state_from(a, *, default_activity):
    """SolutionState from --ph, --activity, --molality, --species-activity/-molality, I."""
    from pourbaix.physics.halfreactions import SolutionState, find_species

    table = _table(a)
    ionic = _ionic_strength(a)
    acts = {}
    for name, v in getattr(a, "species_activity", None) or ():
        acts[str(find_species(table, name))] = v
    mols = {}
    for name, v in getattr(a, "species_molality", None) or ():
        mols[str(find_species(table, name))] = v
    return SolutionState(
        ph=a.ph,
        activity=a.activity if a.activity is not None else default_activity,
        molality=a.molality,
        activities=acts,
        molalities=mols,
        gas_bar=a.gas_pressure,
        water_activity=a.water_activity,
        ionic_strength=ionic,
        activity_model=a.activity_model,
    )


def _ionic_strength(a):
    if a.ionic_strength is not None and a.background is not None:
        raise OptionError("give either --ionic-strength or --background, not both")
    if a.background is not None:
        from pourbaix.physics import solution

        ions = solution.background_ions(solution.parse_background(a.background))
        return float(solution.ionic_strength([(m, z) for _, m, z in ions]))
    if a.ionic_strength is not None:
        if a.ionic_strength < 0:
            raise ConditionsError(f"--ionic-strength must be >= 0, got {a.ionic_strength:g}")
        return a.ionic_strength
    return 0.0


_TABLES = {}


def _table(a):
    from pourbaix.tables.species import load_species

    key = (a.dataset, tuple(a.data))
    if key not in _TABLES:
        _TABLES[key] = load_species(a.dataset, tuple(a.data))
    return _TABLES[key]


def _add_solution_options(p, *, ph_help):
    g = p.add_argument_group("conditions")
    g.add_argument(
        "--temperature",
        type=_number,
        default=25.0,
        metavar="C",
        help="temperature [°C], 0-300 (default 25)",
    )
    g.add_argument(
        "--pressure",
        type=_positive,
        metavar="BAR",
        help="pressure [bar] (default 1, or saturation above 100 °C)",
    )
    g.add_argument(
        "--reference",
        default="SHE",
        help="reference electrode for the potentials shown (see `pourbaix references`)",
    )
    g.add_argument("--ph", type=_number, metavar="X", help=ph_help)
    g.add_argument(
        "--activity",
        type=_positive,
        metavar="A",
        help="activity of dissolved species not named otherwise",
    )
    g.add_argument(
        "--molality",
        type=_positive,
        metavar="M",
        help="molality of dissolved species not named otherwise [mol/kg] (activity = m γ)",
    )
    g.add_argument(
        "--species-activity",
        action="append",
        type=_named_positive,
        default=[],
        metavar="NAME=A",
        help="activity of one species (gases: pressure in bar), e.g. Zn2+=0.01; repeatable",
    )
    g.add_argument(
        "--species-molality",
        action="append",
        type=_named_positive,
        default=[],
        metavar="NAME=M",
        help="molality of one species [mol/kg], e.g. Cu2+=1; repeatable",
    )
    g.add_argument(
        "--gas-pressure",
        type=_positive,
        default=1.0,
        metavar="BAR",
        help="partial pressure of gases not named (default 1 bar)",
    )
    g.add_argument(
        "--ionic-strength",
        type=_number,
        metavar="I",
        help="ionic strength for activity coefficients [mol/kg]",
    )
    g.add_argument(
        "--background", metavar="SALT=M,...", help="background electrolyte, e.g. NaCl=0.5 [mol/kg]"
    )
    g.add_argument(
        "--activity-model",
        default="davies",
        help="davies, extended-debye-huckel or b-dot (default davies)",
    )
    g.add_argument(
        "--water-activity", type=_positive, default=1.0, help="activity of water (default 1)"
    )
    g.add_argument("--dataset", default="default", help="data set (see `pourbaix datasets`)")
    g.add_argument(
        "--data",
        action="append",
        default=[],
        metavar="FILE",
        help="user species table (same columns); repeatable",
    )


def _parser(sub, name, help_text, description, examples):
    return sub.add_parser(
        name,
        help=help_text,
        description=description,
        epilog="examples:\n  " + "\n  ".join(examples) + f"\n\n{_CAUTION}",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )


def _notes(notes):
    for w in notes:
        print(f"pourbaix: note: {w}", file=sys.stderr)


def _write_report(a, **kwargs):
    from pourbaix.report.document import write_document

    announce_written(write_document(a.report, **kwargs), to_stderr=a.json)


# ------------------------------------------------------------------ series
def _cmd_series(a):
    from pourbaix.analyses.cells import CAUTION, electrochemical_series

    outs = checked_outputs(a.out, (".csv", ".json"))
    report_target(a)
    formal = any(x is not None and x != [] for x in (a.ph, a.activity, a.molality)) or bool(
        a.species_activity or a.species_molality
    )
    state = _state_from(a, default_activity=1.0) if formal else None
    res = electrochemical_series(
        a.temperature,
        reference=a.reference,
        elements=a.element or None,
        state=state,
        sort=a.sort,
        reactions=a.reaction,
        table=_table(a),
        pressure_bar=a.pressure,
    )
    _notes(res.warnings)
    rows = res.rows()
    for o in outs:
        if o.suffix.lower() == ".csv":
            write_text(o, csv_text(rows), to_stderr=a.json)
        else:
            write_text(o, json.dumps(rows, indent=2, ensure_ascii=False) + "\n", to_stderr=a.json)
    if a.json:
        print(json.dumps(rows, indent=2, ensure_ascii=False))
    elif a.reaction:
        _print_reactions(res, state)
    else:
        _print_series(res, state)
    if a.report:
        _write_report(a, **_series_report(res, state, CAUTION))
    return 0


def _conditions_text(res, state):
    text = f"{res.temperature_c:g} °C, {res.pressure_bar:.4g} bar, potentials vs {res.reference}"
    if res.reference != "SHE":
        text += f" (E_ref = {res.reference_offset_v:+.4f} V vs SHE at {res.temperature_c:g} °C)"
    if state is not None:
        what = (
            f"molality {state.molality:g} mol/kg"
            if state.molality is not None
            else f"activity {state.activity:g}"
        )
        ph = "standard state for H+" if state.ph is None else f"pH {state.ph:g}"
        text += f"; formal E at {ph}, dissolved {what}, gases {state.gas_bar:g} bar"
        if state.ionic_strength > 0:
            text += f", I = {state.ionic_strength:g} mol/kg ({state.activity_model})"
    return text


def _print_series(res, state):
    print(
        f"Electrochemical series from the tables (data set {res.dataset}): {_conditions_text(res, state)}"
    )
    print("E° = -ΔrG°/(nF) at the temperature; every couple written as a reduction.")
    w = max(len(e.label) for e in res.entries)
    texts = [e.reaction.text(unicode=True) for e in res.entries]
    wr = max(len(t) for t in texts)
    head = (
        f"{'couple':<{w}}  {'E° / V':>9}"
        + (f"  {'E / V':>9}" if state is not None else "")
        + f"  {'reaction':<{wr}}  sources"
    )
    print(head)
    for e, text in zip(res.entries, texts, strict=True):
        line = f"{e.label:<{w}}  {e.e0_v:+9.4f}"
        if state is not None:
            line += f"  {e.e_v:+9.4f}"
        keys = ", ".join(dict.fromkeys(key for _, key in e.sources))
        print(f"{line}  {text:<{wr}}  {keys}")
    keys = sorted(res.sources)
    print("\nsources:")
    for k in keys:
        print(f"  {k}: {res.sources[k]}")
    if res.skipped:
        print(f"not in the tables: {', '.join(res.skipped)}")


def _print_reactions(res, state):
    print(f"Half-reactions: {_conditions_text(res, state)}")
    for e in res.entries:
        print(f"\n{e.reaction.text(unicode=True)}")
        if e.reaction.reversed_input:
            print("  (written as an oxidation; turned round into the reduction above)")
        print("  balance: elements and charge check")
        print(
            f"  n = {e.n:g};  ΔrG° = {e.dg_kj_mol:+.2f} kJ/mol;  E° = {e.e0_v:+.4f} V vs {res.reference}"
        )
        if e.e_v is not None:
            print(f"  E = {e.e_v:+.4f} V vs {res.reference} at the conditions given")
        print(f"  Nernst: {e.nernst}")
        print(
            "  species: "
            + "; ".join(f"{sp} [{key}: {e.routes.get(sp, '')}]" for sp, key in e.sources)
        )


def _series_report(res, state, caution):
    from pourbaix.report.document import Section

    columns = [
        ("couple", "Couple"),
        ("reaction", "Reduction"),
        ("n", "n"),
        ("e0_v", f"E° [V vs {res.reference}]", "+.4f"),
    ]
    if state is not None:
        columns.append(("e_v", f"E [V vs {res.reference}]", "+.4f"))
    columns += [("nernst", "Nernst form"), ("sources", "Species: source")]
    sections = [
        Section(
            "Series",
            text=(
                f"Conditions: {_conditions_text(res, state)}.",
                "Each couple is written as a reduction; E° = -ΔrG°/(nF) from the species tables at the "
                "temperature, with G(H+) = 0 and the SHE at zero at every temperature; E by the Nernst "
                "equation. Vs a reference electrode, E(ref) = E(SHE) - E_ref(T).",
            ),
            rows=tuple(r for r in res.rows()),
            columns=tuple(columns),
        ),
        Section("Notes", text=() if res.warnings else ("No warnings.",), notes=tuple(res.warnings)),
        Section(
            "Sources",
            rows=tuple({"key": k, "citation": v} for k, v in res.sources.items()),
            columns=(("key", "Key"), ("citation", "Citation")),
        ),
    ]
    return {
        "title": f"Electrochemical series at {res.temperature_c:g} °C vs {res.reference}",
        "facts": [
            ("Temperature", f"{res.temperature_c:g} °C"),
            ("Reference", res.reference),
            ("Couples", str(len(res.entries))),
            ("Data set", res.dataset),
        ],
        "sections": sections,
        "cautions": (caution,),
    }


# ------------------------------------------------------------------ cell
def _cmd_cell(a):
    from pourbaix.analyses.cells import CAUTION, cell_potential

    outs = checked_outputs(a.out, (".json",))
    report_target(a)
    if len(a.cell) not in (1, 2):
        raise OptionError(
            "cell: give the cell in one string ('Zn | Zn2+ || Cu2+ | Cu') or the anode and the cathode"
        )
    if len(a.cell) == 1 and "||" not in a.cell[0]:
        raise OptionError(
            f"cell {a.cell[0]!r}: write two electrodes separated by '||', anode on the left, or give "
            "the anode and the cathode as two arguments"
        )
    if a.multiply is not None and a.multiply <= 0:
        raise OptionError(f"--multiply must be > 0, got {a.multiply:g}")
    state = _state_from(a, default_activity=1.0)
    cell = a.cell[0] if len(a.cell) == 1 else tuple(a.cell)
    res = cell_potential(
        cell,
        a.temperature,
        state=state,
        reference=a.reference,
        table=_table(a),
        pressure_bar=a.pressure,
    )
    _notes(res.warnings)
    factors = [1.0, 2.0] + ([a.multiply] if a.multiply and a.multiply not in (1.0, 2.0) else [])
    d = res.to_dict()
    d["multiplied"] = [
        {k: (round(v, 5) if isinstance(v, float) else v) for k, v in res.multiplied(f).items()}
        for f in factors
    ]
    for o in outs:
        write_text(o, json.dumps(d, indent=2, ensure_ascii=False) + "\n", to_stderr=a.json)
    if a.json:
        print(json.dumps(d, indent=2, ensure_ascii=False))
    else:
        _print_cell(res, factors)
    if a.report:
        _write_report(a, **_cell_report(res, factors, CAUTION))
    return 0


def _print_cell(res, factors):
    print(
        f"Cell {res.anode.label} || {res.cathode.label}   ({res.temperature_c:g} °C; anode written on the left)"
    )
    for row in res.electrode_rows():
        print(f"  {row['role']:<16} {row['reduction']}")
        extra = f" = {row['e_v_ref']:+.4f} V vs {res.reference}" if res.reference != "SHE" else ""
        print(
            f"  {'':<16} E° = {row['e0_v_she']:+.4f} V,  E = {row['e_v_she']:+.4f} V vs SHE{extra}"
        )
    print(f"  cell reaction    {res.reaction}")
    print(
        f"  E°cell = E°cathode - E°anode = {res.cathode_e0_v:+.4f} - ({res.anode_e0_v:+.4f}) = {res.e0_cell_v:+.4f} V"
    )
    print(
        f"  Ecell  = E°cell - (RT/nF) ln Q = {res.e_cell_v:+.4f} V   (n = {res.n:g}, log10 Q = {res.log10_q:+.3f})"
    )
    print(
        f"  ΔrG    = -nF·Ecell = {res.dg_kj_mol:+.2f} kJ/mol for the reaction as written (ΔrG° = {res.dg0_kj_mol:+.2f} kJ/mol)"
    )
    if abs(res.e_cell_v) < 1e-9:
        print("  at equilibrium: no net reaction")
    elif res.spontaneous:
        print(
            f"  spontaneous as written (Ecell > 0): the anode is {res.anode.label} (left), as written"
        )
    else:
        print(
            f"  not spontaneous as written (Ecell < 0): it runs the other way; the anode is {res.cathode.label} (right)"
        )
    print("  the reaction multiplied: E stays, n and ΔrG scale")
    for f in factors:
        m = res.multiplied(f)
        print(
            f"    × {f:g}:  n = {m['n']:g},  Ecell = {m['e_cell_v']:+.4f} V,  ΔrG = {m['dg_kj_mol']:+.2f} kJ/mol"
        )
    print(f"\n{_CAUTION}")


def _cell_report(res, factors, caution):
    from pourbaix.report.document import Section

    conclusion = (
        "At equilibrium: no net reaction."
        if abs(res.e_cell_v) < 1e-9
        else (
            f"Spontaneous as written (Ecell > 0); the anode is {res.anode.label} (left)."
            if res.spontaneous
            else f"Not spontaneous as written (Ecell < 0): it runs the other way; the anode is {res.cathode.label}."
        )
    )
    sections = [
        Section(
            "Electrodes",
            text=(
                "Each half-reaction written as a reduction, with its standard and Nernst potential vs SHE.",
            ),
            rows=tuple(res.electrode_rows(unicode=True)),
            columns=(
                ("role", "Role"),
                ("electrode", "Electrode"),
                ("reduction", "Reduction"),
                ("n", "n"),
                ("e0_v_she", "E° [V vs SHE]", "+.4f"),
                ("e_v_she", "E [V vs SHE]", "+.4f"),
            )
            + (
                (("e_v_ref", f"E [V vs {res.reference}]", "+.4f"),)
                if res.reference != "SHE"
                else ()
            ),
        ),
        Section(
            "Cell",
            text=(
                f"Cell reaction: {res.reaction_typeset}.",
                f"E°cell = E°cathode − E°anode = {res.e0_cell_v:+.4f} V; Ecell = E°cell − (RT/nF) ln Q = {res.e_cell_v:+.4f} V "
                f"(n = {res.n:g}, log10 Q = {res.log10_q:+.3f}); ΔrG = −nF·Ecell = {res.dg_kj_mol:+.2f} kJ/mol for the reaction as written.",
                conclusion,
            ),
        ),
        Section(
            "The reaction multiplied",
            text=(
                "Multiplying the reaction multiplies n and ΔrG; the potential E does not change (it is an intensive quantity).",
            ),
            rows=tuple(res.multiplied(f) for f in factors),
            columns=(
                ("factor", "Factor", "g"),
                ("n", "n", "g"),
                ("e_cell_v", "Ecell [V]", "+.4f"),
                ("dg_kj_mol", "ΔrG [kJ/mol]", "+.2f"),
                ("dg0_kj_mol", "ΔrG° [kJ/mol]", "+.2f"),
            ),
        ),
        Section("Notes", text=() if res.warnings else ("No warnings.",), notes=tuple(res.warnings)),
        Section(
            "Sources",
            rows=tuple({"key": k, "citation": v} for k, v in res.sources.items()),
            columns=(("key", "Key"), ("citation", "Citation")),
        ),
    ]
    return {
        "title": f"Cell {res.anode.label} || {res.cathode.label}",
        "facts": [
            ("Temperature", f"{res.temperature_c:g} °C"),
            ("Ecell", f"{res.e_cell_v:+.4f} V"),
            ("n", f"{res.n:g}"),
            ("ΔrG", f"{res.dg_kj_mol:+.2f} kJ/mol"),
        ],
        "sections": sections,
        "cautions": (caution,),
    }


# ------------------------------------------------------------------ couple
def _cmd_couple(a, map_kwargs):
    from pourbaix.analyses.cells import CAUTION, ElectrodeKinetics, galvanic_couple

    outs = checked_outputs(a.out, (*_FIGURES, ".json", ".csv"))
    evans = checked_outputs(a.evans, _FIGURES, "--evans")
    report_target(a)
    if a.ratio is not None:
        raise OptionError(
            "couple: --ratio is for alloy maps; give each metal of the couple on its own"
        )
    kinetics = {}
    for metal, fields in a.kinetics:
        if metal in kinetics:
            raise OptionError(f"--kinetics: {metal} given twice")
        try:
            kinetics[metal] = ElectrodeKinetics(**fields)
        except ConditionsError as exc:
            raise OptionError(f"--kinetics {metal}: {exc}") from None
    if evans and not kinetics:
        raise OptionError(
            "--evans needs kinetics (--kinetics METAL:anodic=...,cathodic=...,i0=...)"
        )
    if a.area and a.area_ratio is not None:
        raise OptionError("give either --area per metal or --area-ratio, not both")
    kwargs = map_kwargs(a)
    for key in ("temperature_c", "reference", "ph_range", "potential_range_v", "ratio"):
        kwargs.pop(key, None)
    res = galvanic_couple(
        a.element,
        a.ph,
        a.temperature,
        kinetics=kinetics or None,
        areas=dict(a.area) or None,
        cathode_to_anode_area=a.area_ratio,
        reference=a.reference,
        **kwargs,
    )
    _notes(res.warnings)
    figure_outs = [o for o in outs if o.suffix.lower() in _FIGURES]
    quiet = a.json
    for o in outs:
        if o.suffix.lower() == ".json":
            write_text(o, json.dumps(res.to_dict(), indent=2, ensure_ascii=False) + "\n", quiet)
        elif o.suffix.lower() == ".csv":
            write_text(o, csv_text(res.rows()), quiet)
    if figure_outs:
        from pourbaix.plot.cells import draw_couple_maps

        fig = draw_couple_maps(res, overlay=a.overlay)
        save_figures(fig, figure_outs, to_stderr=quiet)
    if evans:
        from pourbaix.plot.cells import draw_evans

        ax = draw_evans(res.mixed, reference=res.reference)
        save_figures(ax, evans, to_stderr=quiet)
    if a.json:
        print(json.dumps(res.to_dict(), indent=2, ensure_ascii=False))
    else:
        _print_couple(res)
    if a.report:
        _write_report(a, **_couple_report(res, a.overlay, CAUTION))
    return 0


def _print_couple(res):
    print(
        f"Galvanic couple {' - '.join(m.element for m in res.metals)} at pH {res.ph:g}, {res.temperature_c:g} °C; potentials vs {res.reference}"
    )
    for m in res.metals:
        role = (
            "anode" if m.element == res.anode else ("cathode" if m.element == res.cathode else "")
        )
        print(
            f"  {m.element:<4} E_eq = {m.equilibrium_potential_v:+.4f} V  (top of its immunity domain; above it: "
            f"{m.above}, {m.state_above})  {role}"
        )
    print(
        f"  driven anodic: {res.anode};  open-circuit driving force {res.driving_force_v:.4f} V ({res.cathode} vs {res.anode})"
    )
    if res.mixed is None:
        print(f"  {res.statement}")
    else:
        mx = res.mixed
        print(
            f"  mixed (couple) potential: {mx.potential_v:+.4f} V vs {res.reference} (Butler–Volmer, Σ I = 0)"
        )
        for name, i, j, area, rest in zip(
            mx.names,
            mx.currents_a,
            mx.current_densities_a_m2,
            mx.areas_m2,
            mx.rest_potentials_v,
            strict=True,
        ):
            m = next(x for x in res.metals if x.element == name)
            if not math.isclose(rest, m.equilibrium_potential_v, abs_tol=1e-9):
                print(f"    {name:<4} rest (corrosion) potential given: {rest:+.4f} V")
            print(
                f"    {name:<4} area {area:g} m²: net {i:+.4g} A ({j:+.4g} A/m²); at the couple potential: {m.species_at_couple} ({m.state_at_couple})"
            )
        print(
            f"  galvanic current {mx.galvanic_current_a:.4g} A; {mx.anode} at {mx.galvanic_current_density_a_m2:.4g} A/m²"
        )
        print(f"  {res.statement}")
    print(f"\n{_CAUTION}")


def _couple_report(res, overlay, caution):
    from pourbaix.plot.cells import draw_couple_maps, draw_evans
    from pourbaix.report.document import Section

    sections = [
        Section(
            "Metals in the water",
            text=(
                "Each metal's equilibrium potential is the top of its immunity domain at the water's pH, read from its exact map; "
                "above it the metal turns into the species named. The metal with the lowest potential is driven anodic.",
                f"Anode: {res.anode}; cathode: {res.cathode}; open-circuit driving force {res.driving_force_v:.4f} V.",
                res.statement,
            ),
            rows=tuple(res.rows()),
            figure=draw_couple_maps(res, overlay=overlay),
            caption=f"Maps of {', '.join(m.element for m in res.metals)} at pH {res.ph:g}, {res.temperature_c:g} °C, with each metal's equilibrium point"
            + (" and the couple potential (star)" if res.mixed is not None else "")
            + f"; potentials vs {res.reference}.",
        )
    ]
    if res.mixed is not None:
        sections.append(
            Section(
                "Mixed potential (Butler–Volmer)",
                text=(
                    "Each electrode: i = i0 [10^(η/ba) − 10^(−η/bc)], η = E − E_rest, times its area; the couple sits where Σ I = 0 "
                    "(Wagner & Traud 1938; Stern & Geary 1957), solved by Brent's method on the bracket of rest potentials.",
                    f"Couple potential {res.mixed.potential_v:+.4f} V vs {res.reference}; galvanic current {res.mixed.galvanic_current_a:.4g} A.",
                ),
                rows=tuple(res.mixed.rows()),
                figure=draw_evans(res.mixed, reference=res.reference),
                caption="Evans diagram: net current of each electrode (solid anodic, dashed cathodic) against potential.",
            )
        )
    notes = list(res.warnings)
    sections.append(Section("Notes", text=() if notes else ("No warnings.",), notes=tuple(notes)))
    return {
        "title": f"Galvanic couple {' – '.join(m.element for m in res.metals)} at pH {res.ph:g}",
        "facts": [
            ("Temperature", f"{res.temperature_c:g} °C"),
            ("pH", f"{res.ph:g}"),
            ("Reference", res.reference),
            ("Anode", res.anode),
            ("Driving force", f"{res.driving_force_v:.3f} V"),
        ],
        "sections": sections,
        "cautions": (caution,),
    }


# ------------------------------------------------------------------ registration
def register(sub, add_conditions, map_kwargs):
    """Add ``series``, ``cell`` and ``couple`` to the command line.

    Parameters
    ----------
    sub : argparse._SubParsersAction
        The subcommand registry.
    add_conditions : callable
        Adds the map conditions to a parser (used by ``couple``).
    map_kwargs : callable
        Parsed arguments -> keyword arguments of ``compute_map``.
    """
    s = _parser(
        sub,
        "series",
        "electrochemical series from the tables, or typed half-reactions checked and evaluated",
        "Print the reduction couples the tables support (each written as a reduction, E° from ΔrG° = -nFE°, the source "
        "of each species) at any temperature and on any reference electrode; with --ph or activities also formal "
        "potentials E. Given half-reactions instead, check each for element and charge balance and print its E°, E and "
        "Nernst form.",
        [
            "pourbaix series --temperature 60 --reference SCE",
            "pourbaix series --element Cu Zn --ph 7 --activity 1e-6 --out series.csv",
            'pourbaix series "MnO4- + 8H+ + 5e- = Mn2+ + 4H2O" --ph 2 --species-activity MnO4-=0.01',
        ],
    )
    s.add_argument(
        "reaction",
        nargs="*",
        metavar="HALF_REACTION",
        help="half-reaction(s) to check and evaluate instead of the series",
    )
    s.add_argument(
        "--element", nargs="+", metavar="EL", help="keep couples holding any of these elements"
    )
    s.add_argument(
        "--sort",
        choices=("potential", "descending", "element", "table"),
        default="potential",
        help="most negative first (default), most positive first, by element, or as listed",
    )
    _add_solution_options(
        s, ph_help="pH for formal potentials (default: standard state, a(H+) = 1)"
    )
    add_outputs(s, "table as .csv or .json; repeatable")
    s.set_defaults(func=_cmd_series)

    c = _parser(
        sub,
        "cell",
        "a cell in the notation of the trade: E°cell, Ecell, n, ΔrG, spontaneity, the anode",
        "Read a cell written anode on the left ('Zn | Zn2+ || Cu2+ | Cu'; an activity inline as Zn2+(0.01), m= for a "
        "molality, p= for a gas pressure; Pt and C are inert; a reference electrode such as SCE may stand for one side), "
        "or the anode and the cathode as two half-reactions or electrodes, and print each half-reaction as a reduction with "
        "E° and E, the balanced cell reaction, E°cell = E°cathode - E°anode, Ecell by the Nernst equation, n, ΔrG = -nFE "
        "for the reaction as written (and multiplied: E stays, ΔrG scales), whether it is spontaneous and which electrode is "
        "the anode. Activities default to 1 (standard state).",
        [
            'pourbaix cell "Zn | Zn2+ || Cu2+ | Cu"',
            'pourbaix cell "Zn | Zn2+(0.01) || Cu2+(1) | Cu" --temperature 40',
            'pourbaix cell "Pt | H2(g) | H+ || Ag+ | Ag" --ph 3 --species-activity Ag+=1e-3',
            'pourbaix cell "Zn2+ + 2e- = Zn" "O2 + 4H+ + 4e- = 2H2O" --ph 7',
        ],
    )
    c.add_argument(
        "cell",
        nargs="+",
        metavar="CELL",
        help="the cell ('A | A+ || B+ | B'), or the anode and the cathode",
    )
    c.add_argument(
        "--multiply",
        type=_positive,
        metavar="F",
        help="also show the reaction multiplied by F (×1 and ×2 are always shown)",
    )
    _add_solution_options(c, ph_help="pH (sets a(H+) and a(OH-); default: standard state)")
    add_outputs(c, "result as .json")
    c.set_defaults(func=_cmd_cell)

    cp = _parser(
        sub,
        "couple",
        "metals coupled in one water: anode, driving force, maps with points; mixed potential with kinetics",
        "For two or more metals in one water (pH, temperature, dissolved activity): each metal's equilibrium potential and "
        "what it turns into when driven anodic, read from its exact map; which metal is the anode and the open-circuit "
        "driving force; the maps side by side (or overlaid) with the points marked. With Tafel slopes and exchange or "
        "corrosion current densities for every metal (--kinetics) and areas, the Butler–Volmer mixed potential, the "
        "galvanic current and the Evans diagram. Without kinetics, thermodynamics gives only the driving force.",
        [
            "pourbaix couple Zn Cu --ph 8 --temperature 15 --out zn-cu.png",
            "pourbaix couple Zn Cu --ph 8 --kinetics Zn:anodic=0.03,cathodic=0.12,icorr=0.02,ecorr=-0.8 "
            "--kinetics Cu:anodic=0.06,cathodic=0.3,icorr=0.005,ecorr=-0.05 --area-ratio 10 --evans evans.png",
            "  (kinetic values above are invented for the example: use values measured on your surfaces)",
        ],
    )
    add_conditions(cp, window=False)
    cp.add_argument("--ph", type=_number, required=True, metavar="X", help="pH of the water")
    cp.add_argument(
        "--kinetics",
        action="append",
        type=_kinetics,
        default=[],
        metavar="METAL:anodic=B,cathodic=B,i0=I",
        help="per metal: Tafel slopes [V/decade] and an exchange current density i0 [A/m²] about its equilibrium potential, "
        "or icorr= [A/m²] with ecorr= [V vs --reference] for a freely corroding surface; repeat for every metal",
    )
    cp.add_argument(
        "--area",
        action="append",
        type=_named_positive,
        default=[],
        metavar="METAL=M2",
        help="wetted area of a metal [m²] (default 1); repeatable",
    )
    cp.add_argument(
        "--area-ratio",
        type=_positive,
        metavar="R",
        help="two metals: cathode (noble) area over anode area",
    )
    cp.add_argument(
        "--overlay", action="store_true", help="draw the maps overlaid instead of side by side"
    )
    cp.add_argument(
        "--evans",
        action="append",
        default=[],
        metavar="FILE",
        help="Evans diagram (.png/.svg/.pdf); needs --kinetics",
    )
    add_outputs(cp, "maps with points (.png/.svg/.pdf), .json or .csv; repeatable")
    cp.set_defaults(func=lambda a: _cmd_couple(a, map_kwargs), window=False)
